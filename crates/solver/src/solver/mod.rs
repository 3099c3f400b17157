//! The reusable solver: caches the Gram matrix of the cells outside their bands and the factor of the
//! free block, so re-solves after target, weight or rate edits are warm.
//!
//! Method: finite Newton for band targets (Mangasarian 2002; Keerthi & DeCoste 2005) — classify cells as
//! below / inside / above their band at the current x, solve that box-constrained least squares exactly on
//! the Gram matrix (Bro & De Jong 1997 style active set, see [`crate::boxqp`]), exact line search on the true
//! piecewise-quadratic objective, repeat. A time budget adds one multiplier ν found by bracketed
//! Illinois regula falsi on Σx(ν), which is non-increasing and piecewise linear.
//!
//! Inside: [`classes`] (a cell's class and its contribution), [`gram`] (the cached Gram matrix kept
//! in line with the specification), [`lagged`] (the predictions A·x, brought up to date only where
//! a class could change), [`newton`] (the finite-Newton passes and the exact line search),
//! [`budget`] (the multiplier of a binding budget).

mod budget;
mod classes;
mod gram;
mod lagged;
mod newton;

use crate::boxqp::Vars;
use crate::error::{Field, InputError};
use crate::kkt;
use crate::problem::{Rates, Spec, band_distance, check_rate, objective};
use crate::solution::{Iterations, Solution, Status};
use classes::{Change, Class, changed_cells, classify, contribution};
use nalgebra::DMatrix;

/// Relative KKT tolerance the inner solves aim for.
const KKT_TOL: f64 = 1e-10;
/// Finite-Newton passes before giving up.
const MAX_NEWTON: usize = 200;
/// Budget-multiplier evaluations before giving up.
const MAX_BUDGET: usize = 200;
/// Low-rank Gram updates allowed before a full rebuild refreshes rounding.
const REBUILD_AFTER: usize = 4096;

/// Dwell solver for one rate matrix, reusable across specifications.
///
/// ```
/// use traycast_solver::{DwellSolver, Rates, Spec};
/// // Two configurations heating two cells; cell 0 must rise 30 K, cell 1 at least 10 K.
/// let rates = Rates::from_row_major(2, 2, &[0.5, 0.1, 0.1, 0.4]).unwrap();
/// let mut solver = DwellSolver::new(rates);
/// let spec = Spec::band(vec![30.0, 10.0], vec![30.0, f64::INFINITY], 2);
/// let sol = solver.solve(&spec).unwrap();
/// assert!(sol.band_distance.iter().all(|d| d.abs() < 1e-9));
/// ```
#[derive(Clone, Debug)]
pub struct DwellSolver {
    rates: Rates,
    spec: Option<Spec>,
    class: Vec<Class>,
    gram: DMatrix<f64>,
    b: Vec<f64>,
    /// Σ w·t² over the active cells: the objective's constant, so it can be evaluated from the Gram.
    yy: f64,
    /// [`kkt::target_scale`] of the current spec.
    y_scale: f64,
    colnorm2: Vec<f64>,
    /// The predictions A·x, exact at `z_x` (see [`lagged`]).
    z: Vec<f64>,
    /// The x at which `z` is exact.
    z_x: Vec<f64>,
    /// Per cell, the largest rate magnitude max_j |a_ij|: how fast its prediction can move.
    row_max: Vec<f64>,
    vars: Vars,
    nu: f64,
    updates_since_rebuild: usize,
    row: Vec<f64>,
}

impl DwellSolver {
    /// A solver for these rates. Nothing is computed until the first solve.
    pub fn new(rates: Rates) -> Self {
        let (m, n) = (rates.cells(), rates.configs());
        let row_max = (0..m).map(|i| lagged::row_max(&rates, i)).collect();
        DwellSolver {
            rates,
            spec: None,
            class: vec![Class::Inside; m],
            gram: DMatrix::zeros(n, n),
            b: vec![0.0; n],
            yy: 0.0,
            y_scale: 0.0,
            colnorm2: vec![0.0; n],
            z: vec![0.0; m],
            z_x: vec![0.0; n],
            row_max,
            vars: Vars::new(n),
            nu: 0.0,
            updates_since_rebuild: 0,
            row: vec![0.0; n],
        }
    }

    /// The rates this solver works on.
    pub fn rates(&self) -> &Rates {
        &self.rates
    }

    /// Forgets every cached quantity and warm-start state (the next solve is fully cold).
    pub fn reset(&mut self) {
        *self = DwellSolver::new(std::mem::replace(
            &mut self.rates,
            Rates::from_row_major(0, 0, &[]).expect("empty rates are valid"),
        ));
    }

    /// Replaces the rates of some cells (`rows` holds `cells.len()` rows of `configs` values, row-major).
    /// Cached quantities are corrected by low-rank updates instead of being rebuilt.
    pub fn update_rates(&mut self, cells: &[usize], rows: &[f64]) -> Result<(), InputError> {
        let (m, n) = (self.rates.cells(), self.rates.configs());
        if rows.len() != cells.len() * n {
            return Err(InputError::Dimension {
                field: Field::Rates,
                expected: cells.len() * n,
                found: rows.len(),
            });
        }
        for (k, &cell) in cells.iter().enumerate() {
            if cell >= m {
                return Err(InputError::OutOfRange {
                    field: Field::CellIndex,
                    index: cell,
                    len: m,
                });
            }
            for j in 0..n {
                check_rate(cell, j, rows[k * n + j])?;
            }
        }
        let Some(spec) = self.spec.take() else {
            // Before the first solve x = 0, so z = 0 holds whatever the rates.
            for (k, &cell) in cells.iter().enumerate() {
                self.rates.replace_row(cell, &rows[k * n..(k + 1) * n]);
                self.row_max[cell] = lagged::row_max(&self.rates, cell);
            }
            return Ok(());
        };
        // z must be exact at x before some of its rows are recomputed there.
        self.ensure_z();
        if cells.len() * 4 > m {
            for (k, &cell) in cells.iter().enumerate() {
                self.rates.replace_row(cell, &rows[k * n..(k + 1) * n]);
                self.row_max[cell] = lagged::row_max(&self.rates, cell);
            }
            let x = self.vars.x.clone();
            self.set_z(&x);
            self.rebuild(&spec);
            self.spec = Some(spec);
            return Ok(());
        }
        // Remove the old rows' contributions, swap the rows in, add the new ones.
        let removal: Vec<Change> = cells.iter().map(|&c| self.negated(&spec, c)).collect();
        self.low_rank(&removal);
        for (k, &cell) in cells.iter().enumerate() {
            self.rates.replace_row(cell, &rows[k * n..(k + 1) * n]);
            self.row_max[cell] = lagged::row_max(&self.rates, cell);
            let a = self.rates.matrix();
            self.z[cell] = (0..n).map(|j| a[(cell, j)] * self.vars.x[j]).sum();
            self.class[cell] = classify(self.z[cell], spec.lo[cell], spec.hi[cell]);
            let w = spec.weights[cell];
            for j in 0..n {
                self.colnorm2[j] += w * a[(cell, j)] * a[(cell, j)];
            }
        }
        let addition: Vec<Change> = cells
            .iter()
            .map(|&c| {
                let add = contribution(self.class[c], spec.weights[c], spec.lo[c], spec.hi[c]);
                Change::between(c, (0.0, 0.0, 0.0), add)
            })
            .collect();
        self.apply_changes(&addition, &spec);
        self.vars.factor_valid = false;
        self.spec = Some(spec);
        Ok(())
    }

    /// Validates `spec` and brings the cache (Gram matrix of the cells outside their bands) in line
    /// with it without solving: the first call builds it, later calls apply low-rank corrections.
    pub fn prepare(&mut self, spec: &Spec) -> Result<(), InputError> {
        self.take_spec(spec)?;
        Ok(())
    }

    /// Solves for `spec`, warm-starting from the previous solve where possible.
    pub fn solve(&mut self, spec: &Spec) -> Result<Solution, InputError> {
        self.solve_inner(spec, true)
    }

    /// The same answer as [`DwellSolver::solve`] without the per-cell predictions: `achieved` and
    /// `band_distance` come back empty, and the objective comes from the Gram matrix rather than a
    /// sum over cells (equal up to rounding). With point targets this skips the one A·x product a
    /// solve otherwise ends with, which is what an interactive caller wants before it redraws.
    pub fn solve_dwell(&mut self, spec: &Spec) -> Result<Solution, InputError> {
        self.solve_inner(spec, false)
    }

    fn solve_inner(&mut self, spec: &Spec, predictions: bool) -> Result<Solution, InputError> {
        self.take_spec(spec)?;
        let budget = spec.budget_or_inf();
        let upper: Vec<f64> = spec.upper.iter().map(|&u| u.min(budget)).collect();
        self.make_feasible(spec, &upper);

        let mut it = Iterations::default();
        let mut converged = self.newton(spec, &upper, 0.0, &mut it);
        let mut status = Status::Optimal;
        let total: f64 = self.vars.x.iter().sum();
        self.nu = 0.0;
        if total > budget * (1.0 + 1e-12) {
            converged &= self.budget_search(spec, &upper, budget, &mut it);
        }
        // Σx at T means the budget binds (also when the cap min(u, T) did the work, as with one configuration).
        if budget.is_finite() && self.vars.x.iter().sum::<f64>() >= budget * (1.0 - 1e-12) {
            status = Status::BudgetBinding;
        }
        if !converged {
            status = Status::IterationLimit;
        }
        let mut sol = self.solution(spec, status, it, predictions);
        // Never call a point optimal that its own certificate does not prove.
        let certified = sol.kkt_residual.is_finite() && sol.kkt_residual <= crate::CERTIFY_TOL;
        if !certified && sol.status != Status::IterationLimit {
            sol.status = Status::Uncertified;
        }
        Ok(sol)
    }

    /// Validates `spec` (against the last one, already valid, only the cells that changed) and
    /// brings the cache in line with it.
    fn take_spec(&mut self, spec: &Spec) -> Result<(), InputError> {
        let (m, n) = (self.rates.cells(), self.rates.configs());
        let changed: Vec<usize> = match &self.spec {
            Some(old) if spec.lo.len() == m && spec.hi.len() == m && spec.weights.len() == m => {
                let changed: Vec<usize> = changed_cells(old, spec).collect();
                spec.validate_changed(m, n, changed.iter().copied())?;
                changed
            }
            _ => {
                // The first specification (the cache is built from it) or one of the wrong size
                // (refused here).
                spec.validate(m, n)?;
                Vec::new()
            }
        };
        self.sync_spec(spec, &changed);
        Ok(())
    }

    fn solution(
        &mut self,
        spec: &Spec,
        status: Status,
        iterations: Iterations,
        predictions: bool,
    ) -> Solution {
        if predictions {
            self.ensure_z();
        }
        let x = self.vars.x.clone();
        let xv = nalgebra::DVectorView::from_slice(&x, x.len());
        let gx = &self.gram * xv;
        let grad: Vec<f64> = (0..x.len())
            .map(|j| gx[j] - self.b[j] + 0.5 * spec.time_penalty + spec.ridge * x[j])
            .collect();
        let scales = kkt::gradient_scales(&self.colnorm2, self.y_scale, spec, &x);
        let report = kkt::from_gradient(&grad, &x, spec, &scales);
        let time_scale = spec
            .budget
            .unwrap_or(0.0)
            .max(x.iter().fold(0.0, |m: f64, v| m.max(*v)));
        let objective = if !predictions {
            // xᵀGx − 2bᵀx + Σwt² + μΣx + λ‖x‖², all from cached quantities (the classes are those
            // of the final x, so this is the objective up to rounding; the per-cell sum is kept
            // for callers that asked for the predictions anyway).
            let quad: f64 = x.iter().zip(gx.iter()).map(|(a, b)| a * b).sum();
            let lin: f64 = x.iter().zip(&self.b).map(|(a, b)| a * b).sum();
            let total: f64 = x.iter().sum();
            let sq: f64 = x.iter().map(|v| v * v).sum();
            (quad - 2.0 * lin + self.yy).max(0.0) + spec.time_penalty * total + spec.ridge * sq
        } else {
            objective(spec, &self.z, &x)
        };
        let (achieved, band) = if predictions {
            let band = self
                .z
                .iter()
                .enumerate()
                .map(|(i, &z)| band_distance(z, spec.lo[i], spec.hi[i]))
                .collect();
            (self.z.clone(), band)
        } else {
            (Vec::new(), Vec::new())
        };
        Solution {
            objective,
            achieved,
            band_distance: band,
            status,
            budget_multiplier: 2.0 * report.budget_multiplier,
            iterations,
            kkt_residual: report.residual(time_scale),
            dwell: x,
        }
    }
}
