//! Planning for the outcome: dwell schedules under hard linear constraints on A·x.
//!
//! A [`Task`] holds hard per-cell minima and maxima on the linear prediction (`floor ≤ A·x ≤
//! ceiling`), per-configuration dwell limits `0 ≤ x ≤ u` and an optional budget `Σx ≤ T`, and one of
//! three goals ([`Goal`]):
//!
//! - [`Goal::Shortest`]: the least total time Σx that holds every constraint (a linear programme,
//!   solved exactly by the dual simplex method on the n-dimensional vertex basis: `simplex.rs`);
//! - [`Goal::MaxMargin`]: the largest common margin s (K) with `floor + s ≤ A·x ≤ ceiling − s`
//!   inside the budget, ties broken toward the shorter schedule by [`MARGIN_TIME_PRICE`] (also a
//!   linear programme; s may come out negative when the bands cannot all be held, and then says by
//!   how much the worst cell misses);
//! - [`Goal::Fit`]: today's band fit (Σ wᵢ·dist(aᵢᵀx, [loᵢ, hiᵢ])² + μ·Σx + λ‖x‖²) with the hard
//!   rows on top — the safe-minimum objective, where the floors are the safety minima. Solved by
//!   finite Newton passes whose quadratic pieces go to the dual active-set method of Goldfarb and
//!   Idnani (1983) (`dual_qp.rs`, `fit.rs`).
//!
//! Every answer carries its [`Multipliers`] and a [`Certificate`] recomputed from the raw rates by
//! [`certify`]: primal feasibility, multiplier signs, stationarity, complementarity and (for the
//! linear goals) the duality gap. For these convex problems that proves optimality. A task that no
//! schedule can meet is refused with [`Refusal::Infeasible`], which names the constraint that
//! cannot be met and the ones it conflicts with, from a Farkas certificate; it is never answered
//! with a schedule that breaks a hard constraint.

mod certify;
mod dual_qp;
mod fit;
mod rows;
mod simplex;

use std::fmt;

pub use certify::{Certificate, certify};
pub use rows::Constraint;

use crate::error::Field;
use crate::problem::{Rates, Spec, check_size};
use crate::{CERTIFY_TOL, InputError};

/// Price of one second of dwell in the max-margin goal, in kelvin of margin: among schedules with
/// the same margin, the shorter wins. Small enough that 1,000 s of dwell weigh 0.001 K.
pub const MARGIN_TIME_PRICE: f64 = 1e-6;

/// What a [`Task`] optimises.
#[derive(Clone, Debug, PartialEq)]
pub enum Goal {
    /// Least total time.
    Shortest,
    /// Largest common margin inside the hard bands.
    MaxMargin,
    /// The band fit of `Spec` (its bands, weights, μ and λ; its limits and budget are ignored in
    /// favour of the task's own).
    Fit(Spec),
}

impl Goal {
    /// Lower-case name used in machine-readable output.
    pub fn as_str(&self) -> &'static str {
        match self {
            Goal::Shortest => "shortest",
            Goal::MaxMargin => "max_margin",
            Goal::Fit(_) => "fit",
        }
    }
}

/// A constrained planning task over a rate matrix with `cells` rows and `configs` columns.
#[derive(Clone, Debug, PartialEq)]
pub struct Task {
    /// The objective.
    pub goal: Goal,
    /// Hard minimum of A·x per cell (K of rise); −∞ for none.
    pub floor: Vec<f64>,
    /// Hard maximum of A·x per cell (K); +∞ for none.
    pub ceiling: Vec<f64>,
    /// Dwell limit per configuration (s), ≥ 0, may be +∞.
    pub upper: Vec<f64>,
    /// Total time budget T (s), if any.
    pub budget: Option<f64>,
}

impl Task {
    /// A task with no hard rows, no limits and no budget.
    pub fn new(goal: Goal, cells: usize, configs: usize) -> Self {
        Task {
            goal,
            floor: vec![f64::NEG_INFINITY; cells],
            ceiling: vec![f64::INFINITY; cells],
            upper: vec![f64::INFINITY; configs],
            budget: None,
        }
    }

    /// The band fit of `spec` with its limits and budget, and no hard rows yet.
    pub fn fit(spec: Spec) -> Self {
        let (cells, configs) = (spec.lo.len(), spec.upper.len());
        let mut task = Task::new(Goal::Fit(Spec::band(vec![], vec![], 0)), cells, configs);
        task.upper = spec.upper.clone();
        task.budget = spec.budget;
        task.goal = Goal::Fit(spec);
        task
    }

    /// Checks sizes and values against the rate matrix's shape, naming the field and index.
    pub fn validate(&self, cells: usize, configs: usize) -> Result<(), InputError> {
        check_size(cells, configs)?;
        // The per-configuration and budget checks are the band problem's own.
        let mut limits = Spec::band(vec![], vec![], configs);
        limits.upper = self.upper.clone();
        limits.budget = self.budget;
        limits.validate(0, configs)?;
        for (field, v) in [(Field::Lower, &self.floor), (Field::Upper, &self.ceiling)] {
            if v.len() != cells {
                return Err(InputError::Dimension {
                    field,
                    expected: cells,
                    found: v.len(),
                });
            }
        }
        for (i, (&f, &c)) in self.floor.iter().zip(&self.ceiling).enumerate() {
            hard_edge(Field::Lower, i, f, f64::INFINITY)?;
            hard_edge(Field::Upper, i, c, f64::NEG_INFINITY)?;
        }
        if let Goal::Fit(spec) = &self.goal {
            let mut soft = spec.clone();
            soft.upper = self.upper.clone();
            soft.budget = self.budget;
            soft.validate(cells, configs)?;
        }
        Ok(())
    }
}

/// A hard edge must be a number inside the magnitude range, or the infinity meaning "none".
fn hard_edge(field: Field, i: usize, v: f64, wrong_infinity: f64) -> Result<(), InputError> {
    if v.is_nan() || v == wrong_infinity {
        return Err(InputError::NotFinite {
            field,
            index: Some(i),
            config: None,
            value: v,
        });
    }
    if !crate::problem::in_magnitude(v) {
        return Err(InputError::Magnitude {
            field,
            index: Some(i),
            config: None,
            value: v,
        });
    }
    Ok(())
}

/// Lagrange multipliers of every hard constraint (≥ 0; zero where the constraint is slack or
/// absent), in the units of the objective per unit of the constraint.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Multipliers {
    /// Per configuration, on xⱼ ≥ 0.
    pub dwell: Vec<f64>,
    /// Per configuration, on xⱼ ≤ uⱼ.
    pub limit: Vec<f64>,
    /// On Σx ≤ T.
    pub budget: f64,
    /// Per cell, on aᵢᵀx ≥ floorᵢ.
    pub floor: Vec<f64>,
    /// Per cell, on aᵢᵀx ≤ ceilingᵢ.
    pub ceiling: Vec<f64>,
}

impl Multipliers {
    fn zeros(cells: usize, configs: usize) -> Self {
        Multipliers {
            dwell: vec![0.0; configs],
            limit: vec![0.0; configs],
            budget: 0.0,
            floor: vec![0.0; cells],
            ceiling: vec![0.0; cells],
        }
    }

    fn set(&mut self, c: Constraint, y: f64) {
        match c {
            Constraint::Dwell(j) => self.dwell[j] = y,
            Constraint::Limit(j) => self.limit[j] = y,
            Constraint::Budget => self.budget = y,
            Constraint::Floor(i) => self.floor[i] = y,
            Constraint::Ceiling(i) => self.ceiling[i] = y,
            Constraint::MarginCap => {}
        }
    }

    /// The multiplier of one constraint.
    pub fn get(&self, c: Constraint) -> f64 {
        match c {
            Constraint::Dwell(j) => self.dwell[j],
            Constraint::Limit(j) => self.limit[j],
            Constraint::Budget => self.budget,
            Constraint::Floor(i) => self.floor[i],
            Constraint::Ceiling(i) => self.ceiling[i],
            Constraint::MarginCap => 0.0,
        }
    }
}

/// How a constrained solve ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Outcome {
    /// Optimal, and the certificate is within [`CERTIFY_TOL`].
    Optimal,
    /// The method ended but its certificate is above [`CERTIFY_TOL`]: feasible, not proven optimal.
    Uncertified,
}

impl Outcome {
    /// Lower-case name used in machine-readable output.
    pub fn as_str(self) -> &'static str {
        match self {
            Outcome::Optimal => "optimal",
            Outcome::Uncertified => "uncertified",
        }
    }
}

/// The answer to a [`Task`].
#[derive(Clone, Debug, PartialEq)]
pub struct Planned {
    /// Seconds per configuration.
    pub dwell: Vec<f64>,
    /// A·x per cell (K of rise).
    pub achieved: Vec<f64>,
    /// The goal's value: Σx for shortest, the margin s (K) for max-margin, the fit objective for fit.
    pub objective: f64,
    /// The common margin s (K), for max-margin.
    pub margin: Option<f64>,
    /// Multipliers of the hard constraints.
    pub multipliers: Multipliers,
    /// The optimality certificate, recomputed from the raw rates.
    pub certificate: Certificate,
    /// Whether the certificate holds.
    pub outcome: Outcome,
    /// Basis changes (simplex pivots or active-set changes) over all passes.
    pub iterations: usize,
    /// Finite-Newton passes (fit goal only).
    pub passes: usize,
    /// The constraints held with equality at the answer (the simplex basis, or the active set of
    /// the fit's last piece). Handed back to [`solve_task_from`], they warm-start the next solve.
    pub active: Vec<Constraint>,
    /// The simplex basis's inverse, for the next warm start (checked before it is used).
    basis_inverse: Option<nalgebra::DMatrix<f64>>,
}

impl Planned {
    /// Total dwell time Σx (s).
    pub fn total_time(&self) -> f64 {
        self.dwell.iter().sum()
    }
}

/// A task that cannot be met, with the reason recoverable from the data.
#[derive(Clone, Debug, PartialEq)]
pub struct Infeasible {
    /// The constraint that cannot be met.
    pub constraint: Constraint,
    /// By how much it was short at the last point tried, in its own units (K or s).
    pub shortfall: f64,
    /// The constraints it conflicts with, heaviest first (the support of the Farkas certificate).
    pub conflicts: Vec<Constraint>,
}

/// Why a task got no schedule.
#[derive(Clone, Debug, PartialEq)]
pub enum Refusal {
    /// The input itself is malformed.
    Input(InputError),
    /// No schedule meets every hard constraint.
    Infeasible(Infeasible),
    /// The goal has no finite optimum (for example a margin with nothing to limit it).
    Unbounded(&'static str),
    /// The method reached its iteration cap without an answer.
    IterationLimit(usize),
}

impl From<InputError> for Refusal {
    fn from(e: InputError) -> Self {
        Refusal::Input(e)
    }
}

impl fmt::Display for Refusal {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Refusal::Input(e) => e.fmt(f),
            Refusal::Infeasible(inf) => {
                write!(
                    f,
                    "infeasible: {} cannot be met (short by {:.3})",
                    inf.constraint, inf.shortfall
                )?;
                if !inf.conflicts.is_empty() {
                    let names: Vec<String> = inf
                        .conflicts
                        .iter()
                        .take(4)
                        .map(|c| c.to_string())
                        .collect();
                    write!(f, " together with {}", names.join(", "))?;
                    if inf.conflicts.len() > 4 {
                        write!(f, " and {} more", inf.conflicts.len() - 4)?;
                    }
                }
                Ok(())
            }
            Refusal::Unbounded(why) => write!(f, "unbounded: {why}"),
            Refusal::IterationLimit(n) => {
                write!(
                    f,
                    "no answer within the iteration cap of {n}; the task is refused"
                )
            }
        }
    }
}

impl std::error::Error for Refusal {}

/// Solves a constrained planning task exactly, or says why not.
pub fn solve_task(rates: &Rates, task: &Task) -> Result<Planned, Refusal> {
    solve_task_from(rates, task, None)
}

/// [`solve_task`] started from a previous answer (of the same rates, after a few bands changed,
/// say): its [`Planned::active`] constraints and, for the fit, its dwells. The answer is the same
/// as from a cold start; only the work differs. A previous answer that does not fit the task is
/// ignored.
pub fn solve_task_from(
    rates: &Rates,
    task: &Task,
    from: Option<&Planned>,
) -> Result<Planned, Refusal> {
    let hint = from.map_or(&[][..], |p| &p.active[..]);
    task.validate(rates.cells(), rates.configs())?;
    if let Some(c) = crossed_row(task) {
        return Err(Refusal::Infeasible(c));
    }
    let (dwell, margin, multipliers, iterations, passes, active, basis_inverse) = match &task.goal {
        Goal::Shortest | Goal::MaxMargin => {
            let inverse = from.and_then(|p| p.basis_inverse.as_ref());
            let lp = simplex::solve(rates, task, hint, inverse)?;
            (
                lp.dwell,
                lp.margin,
                lp.multipliers,
                lp.pivots,
                0,
                lp.basis,
                Some(lp.inverse),
            )
        }
        Goal::Fit(spec) => {
            let start = from
                .map(|p| &p.dwell[..])
                .filter(|d| d.len() == rates.configs());
            // The warm start only saves work: if it runs out of steps, the cold start decides.
            let qp = match fit::solve(rates, task, spec, hint, start) {
                Err(Refusal::IterationLimit(_)) if from.is_some() => {
                    fit::solve(rates, task, spec, &[], None)?
                }
                other => other?,
            };
            (
                qp.dwell,
                None,
                qp.multipliers,
                qp.changes,
                qp.passes,
                qp.active,
                None,
            )
        }
    };
    let certificate = certify(rates, task, &dwell, margin, &multipliers);
    let achieved = rates.apply(&dwell);
    let objective = match &task.goal {
        Goal::Shortest => dwell.iter().sum(),
        Goal::MaxMargin => margin.unwrap_or(f64::NAN),
        Goal::Fit(spec) => crate::problem::objective(spec, &achieved, &dwell),
    };
    let outcome = if certificate.residual() <= CERTIFY_TOL {
        Outcome::Optimal
    } else {
        Outcome::Uncertified
    };
    Ok(Planned {
        dwell,
        achieved,
        objective,
        margin,
        multipliers,
        certificate,
        outcome,
        iterations,
        passes,
        active,
        basis_inverse,
    })
}

/// A cell whose hard minimum is above its hard maximum: infeasible before any solve (for every goal
/// but max-margin, whose margin may go negative).
fn crossed_row(task: &Task) -> Option<Infeasible> {
    if task.goal == Goal::MaxMargin {
        return None;
    }
    let i = (0..task.floor.len()).find(|&i| task.floor[i] > task.ceiling[i])?;
    Some(Infeasible {
        constraint: Constraint::Floor(i),
        shortfall: task.floor[i] - task.ceiling[i],
        conflicts: vec![Constraint::Ceiling(i)],
    })
}
