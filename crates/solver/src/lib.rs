//! Dwell optimisation for field-steered microwave ovens.
//!
//! An oven switches between configurations, each heating the tray in its own pattern: a heating map of
//! rates `A` (cells × configurations, K/s, all ≥ 0). Given the temperature rise each cell must reach —
//! a band `[lo, hi]` — this crate finds the seconds `x` to dwell in each configuration by minimising
//!
//! ```text
//! Σ wᵢ · dist(aᵢᵀx, [loᵢ, hiᵢ])²  +  μ·Σx  +  λ·‖x‖²    subject to  0 ≤ x ≤ u,  Σx ≤ T
//! ```
//!
//! exactly (the KKT conditions hold to a tolerance relative to the data's scale).
//!
//! # Overview
//!
//! - [`Rates`] and [`Spec`] hold the problem; both are validated and bad input is an [`InputError`]
//!   naming what is wrong and where. Sizes are bounded ([`MAX_CELLS`], [`MAX_CONFIGS`]) and every
//!   non-zero number must lie inside [`MAGNITUDE_RANGE`]: data the method cannot certify is refused,
//!   and a solve whose certificate fails [`CERTIFY_TOL`] says so ([`Status::Uncertified`]).
//! - [`DwellSolver`] caches everything that depends only on the rates and weights (the Gram matrix of
//!   the cells outside their band, the Cholesky factor of the free block), so a re-solve after a target
//!   edit is warm, and [`DwellSolver::update_rates`] corrects the cache by low-rank updates.
//! - [`Solution`] carries dwell seconds, achieved values, band distances, [`Status`], iteration counts
//!   and the KKT residual; [`kkt::check`] re-derives the certificate from scratch.
//! - [`synthetic`] builds seeded, illustrative test problems for benchmarks and examples.
//!
//! No I/O, no panics on user input; builds for `wasm32-unknown-unknown` and natively.
//!
//! # Example
//!
//! ```
//! use traycast_solver::{DwellSolver, Rates, Spec, Status};
//!
//! // Three cells, two configurations (K/s). Cell 2 is a chilled item: at most 5 K of rise.
//! let rates = Rates::from_row_major(3, 2, &[
//!     0.40, 0.05,
//!     0.10, 0.30,
//!     0.02, 0.01,
//! ]).unwrap();
//! let mut spec = Spec::band(vec![60.0, 45.0, f64::NEG_INFINITY], vec![70.0, 55.0, 5.0], 2);
//! spec.budget = Some(300.0);
//! let mut solver = DwellSolver::new(rates);
//! let sol = solver.solve(&spec).unwrap();
//! assert!(sol.total_time() <= 300.0 + 1e-9);
//! assert!(sol.kkt_residual < 1e-8);
//! assert!(matches!(sol.status, Status::Optimal | Status::BudgetBinding));
//! ```
#![deny(missing_docs)]

mod boxqp;
mod constrained;
mod error;
mod factor;
pub mod kkt;
mod problem;
mod solution;
mod solver;
pub mod synthetic;

pub use constrained::{
    Certificate, Constraint, Goal, Infeasible, MARGIN_TIME_PRICE, Multipliers, Outcome, Planned,
    Refusal, Task, certify, solve_task, solve_task_from,
};
pub use error::{Field, InputError};
pub use problem::{
    MAGNITUDE_RANGE, MAX_CELLS, MAX_CONFIGS, Rates, Spec, band_distance, check_size, objective,
};
pub use solution::{Iterations, Solution, Status};
pub use solver::DwellSolver;

/// Largest KKT residual (relative to the data's scale) a solve may have and still report
/// [`Status::Optimal`] or [`Status::BudgetBinding`]; above it the status is [`Status::Uncertified`].
pub const CERTIFY_TOL: f64 = 1e-6;
