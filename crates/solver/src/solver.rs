//! The reusable solver: caches the Gram matrix of the cells outside their bands and the factor of the
//! free block, so re-solves after target, weight or rate edits are warm.
//!
//! Method: finite Newton for band targets (Mangasarian 2002; Keerthi & DeCoste 2005) — classify cells as
//! below / inside / above their band at the current x, solve that box-constrained least squares exactly on
//! the Gram matrix (Bro & De Jong 1997 style active set, see [`crate::boxqp`]), exact line search on the true
//! piecewise-quadratic objective, repeat. A time budget adds one multiplier ν found by bracketed
//! Illinois regula falsi on Σx(ν), which is non-increasing and piecewise linear.

use crate::boxqp::{self, Quad, Vars};
use crate::error::{Field, InputError};
use crate::kkt;
use crate::problem::{Rates, Spec, band_distance, check_rate, objective};
use crate::solution::{Iterations, Solution, Status};
use nalgebra::DMatrix;

/// Relative KKT tolerance the inner solves aim for.
const KKT_TOL: f64 = 1e-10;
/// Finite-Newton passes before giving up.
const MAX_NEWTON: usize = 200;
/// Budget-multiplier evaluations before giving up.
const MAX_BUDGET: usize = 200;
/// Low-rank Gram updates allowed before a full rebuild refreshes rounding.
const REBUILD_AFTER: usize = 4096;

#[derive(Clone, Copy, Debug, PartialEq)]
enum Class {
    Inside,
    Below,
    Above,
    Point,
}

fn classify(z: f64, lo: f64, hi: f64) -> Class {
    // Branch-free: every cell is classified on every Newton pass, and the classes mix unpredictably.
    let code = u8::from(z < lo) | (u8::from(z > hi) << 1) | (u8::from(lo == hi) << 2);
    match code {
        0 => Class::Inside,
        1 => Class::Below,
        2 => Class::Above,
        _ => Class::Point,
    }
}

/// What a cell contributes in a class: (w to the Gram, w·t to b, w·t² to the constant).
fn contribution(class: Class, w: f64, lo: f64, hi: f64) -> (f64, f64, f64) {
    match class_target(class, lo, hi) {
        None => (0.0, 0.0, 0.0),
        Some(t) => (w, w * t, w * t * t),
    }
}

/// A cell whose contribution to the Gram (`dg`), to b (`db`) and to Σ w·t² (`dyy`) changes.
struct Change {
    cell: usize,
    dg: f64,
    db: f64,
    dyy: f64,
}

impl Change {
    fn between(cell: usize, before: (f64, f64, f64), after: (f64, f64, f64)) -> Self {
        Change {
            cell,
            dg: after.0 - before.0,
            db: after.1 - before.1,
            dyy: after.2 - before.2,
        }
    }
}

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
    z: Vec<f64>,
    /// True when x moved without z following (point-target solves defer A·x to the end).
    z_stale: bool,
    vars: Vars,
    nu: f64,
    updates_since_rebuild: usize,
    row: Vec<f64>,
}

/// Candidates for cells whose band or weight differs between `old` and `new` (same lengths): the
/// cells of every block of 64 whose bits differ anywhere. A brush stroke changes a cell or two, so
/// a bitwise sweep (which vectorises) finds them without comparing every cell one by one.
fn changed_cells<'a>(old: &'a Spec, new: &'a Spec) -> impl Iterator<Item = usize> + 'a {
    const BLOCK: usize = 64;
    let m = new.lo.len();
    let differs = |a: &[f64], b: &[f64]| {
        a.iter()
            .zip(b)
            .fold(0u64, |acc, (x, y)| acc | (x.to_bits() ^ y.to_bits()))
            != 0
    };
    (0..m.div_ceil(BLOCK))
        .filter(move |&k| {
            let r = k * BLOCK..((k + 1) * BLOCK).min(m);
            differs(&old.lo[r.clone()], &new.lo[r.clone()])
                || differs(&old.hi[r.clone()], &new.hi[r.clone()])
                || differs(&old.weights[r.clone()], &new.weights[r])
        })
        .flat_map(move |k| k * BLOCK..((k + 1) * BLOCK).min(m))
}

impl DwellSolver {
    /// A solver for these rates. Nothing is computed until the first solve.
    pub fn new(rates: Rates) -> Self {
        let (m, n) = (rates.cells(), rates.configs());
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
            z_stale: false,
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
            for (k, &cell) in cells.iter().enumerate() {
                self.rates.replace_row(cell, &rows[k * n..(k + 1) * n]);
            }
            return Ok(());
        };
        if cells.iter().any(|&c| spec.lo[c] != spec.hi[c]) {
            self.ensure_z();
        }
        if cells.len() * 4 > m {
            for (k, &cell) in cells.iter().enumerate() {
                self.rates.replace_row(cell, &rows[k * n..(k + 1) * n]);
            }
            self.z = self.rates.apply(&self.vars.x);
            self.rebuild(&spec);
            self.spec = Some(spec);
            return Ok(());
        }
        // Remove the old rows' contributions, swap the rows in, add the new ones.
        let removal: Vec<Change> = cells.iter().map(|&c| self.negated(&spec, c)).collect();
        self.low_rank(&removal);
        for (k, &cell) in cells.iter().enumerate() {
            self.rates.replace_row(cell, &rows[k * n..(k + 1) * n]);
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

    fn negated(&mut self, spec: &Spec, c: usize) -> Change {
        let old = contribution(self.class[c], spec.weights[c], spec.lo[c], spec.hi[c]);
        let w = spec.weights[c];
        let a = self.rates.matrix();
        for j in 0..self.rates.configs() {
            self.colnorm2[j] -= w * a[(c, j)] * a[(c, j)];
        }
        Change::between(c, old, (0.0, 0.0, 0.0))
    }

    /// Validates `spec` and brings the cache (Gram matrix of the cells outside their bands) in line
    /// with it without solving: the first call builds it, later calls apply low-rank corrections.
    pub fn prepare(&mut self, spec: &Spec) -> Result<(), InputError> {
        self.validate(spec)?;
        self.sync_spec(spec);
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
        self.validate(spec)?;
        self.sync_spec(spec);
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

    /// Validates `spec`; against the last one (already valid) only the cells that changed.
    fn validate(&self, spec: &Spec) -> Result<(), InputError> {
        let (m, n) = (self.rates.cells(), self.rates.configs());
        match &self.spec {
            Some(old) if spec.lo.len() == m && spec.hi.len() == m && spec.weights.len() == m => {
                spec.validate_changed(m, n, changed_cells(old, spec))
            }
            _ => spec.validate(m, n),
        }
    }

    /// Brings the cached classification, Gram matrix and b in line with `spec` by diffing against the last one.
    fn sync_spec(&mut self, spec: &Spec) {
        let Some(old) = self.spec.take() else {
            self.rebuild(spec);
            self.spec = Some(spec.clone());
            self.y_scale = kkt::target_scale(spec);
            return;
        };
        let n = self.rates.configs();
        let mut changes = Vec::new();
        for i in changed_cells(&old, spec) {
            let same = old.lo[i] == spec.lo[i]
                && old.hi[i] == spec.hi[i]
                && old.weights[i] == spec.weights[i];
            if same {
                continue;
            }
            let before = contribution(self.class[i], old.weights[i], old.lo[i], old.hi[i]);
            if spec.lo[i] != spec.hi[i] && self.z_stale {
                // Only band cells need the prediction to be classified.
                self.z = self.rates.apply(&self.vars.x);
                self.z_stale = false;
            }
            let class = classify(self.z[i], spec.lo[i], spec.hi[i]);
            let after = contribution(class, spec.weights[i], spec.lo[i], spec.hi[i]);
            self.class[i] = class;
            let dw = spec.weights[i] - old.weights[i];
            if dw != 0.0 {
                for j in 0..n {
                    let aij = self.rates.get(i, j);
                    self.colnorm2[j] += dw * aij * aij;
                }
            }
            changes.push(Change::between(i, before, after));
        }
        self.apply_changes(&changes, spec);
        // Keep our copy without reallocating (the common case: same sizes).
        let mut kept = old;
        kept.clone_from(spec);
        self.spec = Some(kept);
        self.y_scale = kkt::target_scale(spec);
    }

    /// Builds the Gram matrix and b of the active cells from scratch.
    fn rebuild(&mut self, spec: &Spec) {
        if spec.lo != spec.hi {
            self.ensure_z();
        }
        let (m, n) = (self.rates.cells(), self.rates.configs());
        let a = self.rates.matrix();
        for i in 0..m {
            self.class[i] = classify(self.z[i], spec.lo[i], spec.hi[i]);
        }
        let active: Vec<usize> = (0..m).filter(|&i| self.class[i] != Class::Inside).collect();
        let parts: Vec<(f64, f64, f64)> = active
            .iter()
            .map(|&i| contribution(self.class[i], spec.weights[i], spec.lo[i], spec.hi[i]))
            .collect();
        if active.len() == m && parts.iter().all(|p| p.0 == 1.0) {
            // Every cell active with unit weight (point targets, the common case): G = AᵀA straight
            // from A, b = Aᵀt by one product, no copy of A.
            self.gram = gram_of(a);
            let t = nalgebra::DVector::from_iterator(m, parts.iter().map(|p| p.1));
            let b = a.tr_mul(&t);
            self.b.copy_from_slice(b.as_slice());
            self.yy = parts.iter().map(|p| p.2).sum();
            self.colnorm2 = (0..n).map(|j| self.gram[(j, j)]).collect();
            self.updates_since_rebuild = 0;
            self.vars.factor_valid = false;
            return;
        }
        // One product gives everything: with B = [W½·A_active, W½·t], BᵀB holds the Gram matrix
        // (top left), b = AᵀW·t (last column) and Σ w·t² (corner).
        let mut ext = DMatrix::zeros(active.len(), n + 1);
        let root_w: Vec<f64> = parts.iter().map(|p| p.0.sqrt()).collect();
        let all_active = active.len() == m;
        for j in 0..n {
            let col = a.column(j);
            let col = col.as_slice();
            let mut out_col = ext.column_mut(j);
            let out = out_col.as_mut_slice();
            if all_active {
                for ((o, &c), &r) in out.iter_mut().zip(col).zip(&root_w) {
                    *o = r * c;
                }
            } else {
                for ((o, &i), &r) in out.iter_mut().zip(&active).zip(&root_w) {
                    *o = r * col[i];
                }
            }
        }
        for (r, p) in parts.iter().enumerate() {
            // √w·t = (w·t)/√w; every active cell has w > 0.
            ext[(r, n)] = p.1 / root_w[r];
        }
        let full = gram_of(&ext);
        self.gram = full.view((0, 0), (n, n)).into_owned();
        for j in 0..n {
            self.b[j] = full[(j, n)];
        }
        self.yy = full[(n, n)];
        // Σ over all cells of w·a²: the Gram diagonal plus the cells inside their bands.
        for j in 0..n {
            self.colnorm2[j] = self.gram[(j, j)];
        }
        for i in (0..m).filter(|&i| self.class[i] == Class::Inside) {
            for j in 0..n {
                let v = a[(i, j)];
                self.colnorm2[j] += spec.weights[i] * v * v;
            }
        }
        self.updates_since_rebuild = 0;
        self.vars.factor_valid = false;
    }

    /// Applies contribution changes as one low-rank update, or rebuilds when that is cheaper or due.
    fn apply_changes(&mut self, changes: &[Change], spec: &Spec) {
        if changes.is_empty() {
            return;
        }
        let grams = changes.iter().filter(|c| c.dg != 0.0).count();
        if self.updates_since_rebuild + grams > REBUILD_AFTER || grams * 4 > self.rates.cells() {
            self.rebuild(spec);
            return;
        }
        self.low_rank(changes);
    }

    /// Gram and b corrections for `changes` with the rows as they stand, never a rebuild.
    fn low_rank(&mut self, changes: &[Change]) {
        let n = self.rates.configs();
        let a = self.rates.matrix();
        for ch in changes {
            self.yy += ch.dyy;
            if ch.db != 0.0 {
                for j in 0..n {
                    self.b[j] += ch.db * a[(ch.cell, j)];
                }
            }
        }
        let grams: Vec<&Change> = changes.iter().filter(|c| c.dg != 0.0).collect();
        if grams.is_empty() {
            return;
        }
        self.vars.factor_valid = false;
        self.updates_since_rebuild += grams.len();
        if grams.len() == 1 {
            let c = grams[0];
            for j in 0..n {
                self.row[j] = a[(c.cell, j)];
            }
            let row = nalgebra::DVectorView::from_slice(&self.row, n);
            self.gram.ger(c.dg, &row, &row, 1.0);
            return;
        }
        // G += Rᵀ·D·R with R the changed rows: one matrix product (n × k times k × n).
        let rows_t = DMatrix::from_fn(n, grams.len(), |j, r| a[(grams[r].cell, j)]);
        let weighted = DMatrix::from_fn(grams.len(), n, |r, j| grams[r].dg * rows_t[(j, r)]);
        self.gram.gemm(1.0, &rows_t, &weighted, 1.0);
    }

    /// Clips the warm start into the new bounds and budget so the active-set method starts feasible.
    fn make_feasible(&mut self, spec: &Spec, upper: &[f64]) {
        let before = self.vars.x.clone();
        for (x, &u) in self.vars.x.iter_mut().zip(upper) {
            *x = x.min(u);
        }
        let total: f64 = self.vars.x.iter().sum();
        let budget = spec.budget_or_inf();
        if total > budget {
            let s = budget / total;
            self.vars.x.iter_mut().for_each(|x| *x *= s);
        }
        self.vars.resnap(upper);
        if self.vars.x != before {
            let x = self.vars.x.clone();
            self.move_to(spec, &x);
        }
    }

    /// Sets x, recomputes the prediction and re-classifies every cell.
    fn move_to(&mut self, spec: &Spec, x: &[f64]) {
        self.vars.x.copy_from_slice(x);
        self.z = self.rates.apply(x);
        self.z_stale = false;
        self.reclassify(spec);
    }

    /// Recomputes z = A·x if a point-target solve left it behind.
    fn ensure_z(&mut self) {
        if self.z_stale {
            self.z = self.rates.apply(&self.vars.x);
            self.z_stale = false;
        }
    }

    fn reclassify(&mut self, spec: &Spec) {
        let mut changes = Vec::new();
        for i in 0..self.rates.cells() {
            let class = classify(self.z[i], spec.lo[i], spec.hi[i]);
            if class != self.class[i] {
                let before = contribution(self.class[i], spec.weights[i], spec.lo[i], spec.hi[i]);
                let after = contribution(class, spec.weights[i], spec.lo[i], spec.hi[i]);
                self.class[i] = class;
                changes.push(Change::between(i, before, after));
            }
        }
        self.apply_changes(&changes, spec);
    }

    fn linear_term(&self, spec: &Spec, nu: f64) -> Vec<f64> {
        let shift = 0.5 * spec.time_penalty + nu;
        self.b.iter().map(|b| b - shift).collect()
    }

    /// Finite Newton at a fixed budget multiplier ν. Returns false on an iteration limit.
    fn newton(&mut self, spec: &Spec, upper: &[f64], nu: f64, it: &mut Iterations) -> bool {
        let n = self.rates.configs();
        let points_only = spec.lo == spec.hi;
        if !points_only {
            self.ensure_z();
        }
        let max_active = 50 * n + 200;
        // The cap is per call: a budget search makes many calls, each of which may need a few passes.
        let mut passes = 0;
        loop {
            let c = self.linear_term(spec, nu);
            let tol: Vec<f64> =
                kkt::gradient_scales(&self.colnorm2, self.y_scale, spec, &self.vars.x)
                    .into_iter()
                    .map(|s| s * KKT_TOL)
                    .collect();
            let quad = Quad {
                gram: &self.gram,
                ridge: spec.ridge,
                c: &c,
                upper,
                tol: &tol,
            };
            let support: Vec<usize> = (0..n).filter(|&i| self.vars.x[i] != 0.0).collect();
            let grad = quad.gradient_on(&self.vars.x, &support);
            let optimal = (0..n).all(|j| quad.violation(grad[j], self.vars.state[j], j) <= 1.0);
            if optimal {
                return true;
            }
            if passes >= MAX_NEWTON {
                return false;
            }
            passes += 1;
            it.newton += 1;
            let x_old = self.vars.x.clone();
            let mut active = it.active_set;
            let done = boxqp::solve(
                &quad,
                &mut self.vars,
                &mut active,
                it.active_set + max_active,
            );
            it.active_set = active;
            let d: Vec<f64> = self.vars.x.iter().zip(&x_old).map(|(a, b)| a - b).collect();
            if d.iter().all(|&v| v == 0.0) {
                // The model cannot improve on x: the optimum to working precision.
                return done;
            }
            if points_only {
                // With point targets the quadratic model is the objective and no cell changes class:
                // the box solve is the answer, and A·x can wait until someone needs it.
                self.z_stale = true;
                return done;
            }
            let delta = self.rates.apply(&d);
            let t = self.line_search(spec, nu, &x_old, &d, &delta);
            if t <= 0.0 {
                // The true objective does not fall along d (possible only when x is already optimal
                // to working precision, e.g. with duplicate columns): keep x and stop.
                self.vars.x.copy_from_slice(&x_old);
                self.vars.resnap(upper);
                self.vars.factor_valid = false;
                return done;
            }
            if t < 1.0 {
                for j in 0..n {
                    self.vars.x[j] = x_old[j] + t * d[j];
                }
                self.vars.resnap(upper);
                self.vars.factor_valid = false;
            }
            for (zi, di) in self.z.iter_mut().zip(&delta) {
                *zi += t * di;
            }
            self.reclassify(spec);
            if !done {
                return false;
            }
        }
    }

    /// Exact minimiser over t ∈ [0, 1] of the true objective along x + t·d (z moves by t·δ).
    fn line_search(&self, spec: &Spec, nu: f64, x: &[f64], d: &[f64], delta: &[f64]) -> f64 {
        // φ'(t)/2 is piecewise linear and non-decreasing: α + β·t between breakpoints.
        let lin = 0.5 * spec.time_penalty + nu;
        let mut alpha: f64 = d.iter().map(|v| lin * v).sum::<f64>()
            + spec.ridge * x.iter().zip(d).map(|(a, b)| a * b).sum::<f64>();
        let mut beta: f64 = spec.ridge * d.iter().map(|v| v * v).sum::<f64>();
        let m = self.rates.cells();
        let (z, lo, hi, w) = (
            &self.z[..m],
            &spec.lo[..m],
            &spec.hi[..m],
            &spec.weights[..m],
        );
        let delta = &delta[..m];
        // Slope terms of the cells outside their bands at t = 0, in four independent lanes so the
        // sum does not wait on itself (this loop runs over every cell on every Newton pass).
        let (mut a4, mut b4) = ([0.0f64; 4], [0.0f64; 4]);
        for i in 0..m {
            let (ga, gb) = slope_terms(z[i], delta[i], lo[i], hi[i], w[i]);
            a4[i % 4] += ga;
            b4[i % 4] += gb;
        }
        alpha += (a4[0] + a4[1]) + (a4[2] + a4[3]);
        beta += (b4[0] + b4[1]) + (b4[2] + b4[3]);
        // Breakpoints: band edges crossed strictly inside (0, 1), i.e. edge − z strictly between
        // 0 and dz. Few cells cross, so the test is cheap and the division rare.
        let mut events: Vec<(f64, usize, bool)> = Vec::new();
        let crosses = |gap: f64, dz: f64| ((gap > 0.0) & (gap < dz)) | ((gap < 0.0) & (gap > dz));
        for i in 0..m {
            let (zi, dz) = (z[i], delta[i]);
            let (gap_lo, gap_hi) = (lo[i] - zi, hi[i] - zi);
            let (at_lo, at_hi) = (crosses(gap_lo, dz), crosses(gap_hi, dz));
            if !((at_lo | at_hi) & (lo[i] != hi[i])) {
                continue;
            }
            for (gap, is_lo, hit) in [(gap_lo, true, at_lo), (gap_hi, false, at_hi)] {
                let te = gap / dz;
                if hit && te > 0.0 && te < 1.0 {
                    events.push((te, i, is_lo));
                }
            }
        }
        events.sort_by(|a, b| a.0.total_cmp(&b.0));
        let root = |alpha: f64, beta: f64, t0: f64, t1: f64| {
            if beta > 0.0 {
                (-alpha / beta).clamp(t0, t1)
            } else {
                t0
            }
        };
        let mut t0 = 0.0;
        for &(te, i, is_lo) in &events {
            if alpha + beta * te >= 0.0 {
                return root(alpha, beta, t0, te);
            }
            // Cell i reaches an edge at te: swap its contribution for that of the class it enters.
            let (z, dz) = (self.z[i], delta[i]);
            let (lo, hi, w) = (spec.lo[i], spec.hi[i], spec.weights[i]);
            let (before, after) = match (is_lo, dz > 0.0) {
                (true, true) => (Class::Below, Class::Inside),
                (true, false) => (Class::Inside, Class::Below),
                (false, true) => (Class::Inside, Class::Above),
                (false, false) => (Class::Above, Class::Inside),
            };
            for (class, sign) in [(before, -1.0), (after, 1.0)] {
                if let Some(t) = class_target(class, lo, hi) {
                    alpha += sign * w * (z - t) * dz;
                    beta += sign * w * dz * dz;
                }
            }
            t0 = te;
        }
        if alpha + beta >= 0.0 {
            root(alpha, beta, t0, 1.0)
        } else {
            1.0
        }
    }

    /// Multiplier search for a binding budget. Returns false if any inner solve hit its limit.
    fn budget_search(
        &mut self,
        spec: &Spec,
        upper: &[f64],
        budget: f64,
        it: &mut Iterations,
    ) -> bool {
        let total = |s: &Self| s.vars.x.iter().sum::<f64>() - budget;
        let mut ok = true;
        // At ν ≥ max_j ‖a_j‖·‖t‖ + |μ| every gradient is non-negative at x = 0 (Cauchy–Schwarz), so Σx(ν) = 0.
        let y = self.y_scale;
        let mut hi = self
            .colnorm2
            .iter()
            .fold(0.0f64, |m, c| m.max(c.sqrt() * y))
            * (1.0 + 1e-9)
            + 1e-300;
        let mut s_hi = -budget;
        // When the optimum at ν = 0 is not unique, Σx can jump at 0: a tiny ν picks the optimum with
        // the least total time, and if that one fits, the budget does not really bind.
        // The probe must be well above the KKT tolerance to steer the active set; the re-solve at ν = 0
        // from the probe's active set then removes its bias.
        let probe = hi * 1e-7;
        it.budget += 1;
        ok &= self.newton(spec, upper, probe, it);
        let s = total(self);
        // The last solutions on each side of the root, with their true excess Σx − T.
        let (mut lo, mut s_lo, mut x_lo);
        let mut x_hi: Option<(Vec<f64>, f64)> = None;
        let mut have_hi_solution = false;
        if s <= 0.0 {
            let at_probe = (self.vars.x.clone(), s);
            ok &= self.newton(spec, upper, 0.0, it);
            let s0 = total(self);
            if s0 <= 0.0 {
                self.nu = 0.0;
                return ok;
            }
            // Σx(0) > T ≥ Σx(probe): the root lies between 0 and the probe (a flat objective, a
            // small ridge, makes Σx steep in ν). Search there; never keep the probe's point, which
            // leaves time unused and is not optimal.
            (lo, s_lo, x_lo) = (0.0, s0, (self.vars.x.clone(), s0));
            (hi, s_hi) = (probe, s);
            x_hi = Some(at_probe);
            have_hi_solution = true;
        } else {
            (lo, s_lo, x_lo) = (probe, s, (self.vars.x.clone(), s));
        }
        let mut side = 0i8;
        while it.budget < MAX_BUDGET {
            let nu = if it.budget == 1 && self.nu > lo && self.nu < hi {
                self.nu
            } else {
                let r = hi - s_hi * (hi - lo) / (s_hi - s_lo);
                if r.is_finite() && r > lo && r < hi {
                    r
                } else {
                    0.5 * (lo + hi)
                }
            };
            it.budget += 1;
            ok &= self.newton(spec, upper, nu, it);
            let s = total(self);
            if s.abs() <= 1e-11 * budget.max(1e-300) {
                self.nu = nu;
                return ok;
            }
            if s > 0.0 {
                lo = nu;
                s_lo = s;
                x_lo = (self.vars.x.clone(), s);
                if side == -1 {
                    s_hi *= 0.5;
                }
                side = -1;
            } else {
                hi = nu;
                s_hi = s;
                x_hi = Some((self.vars.x.clone(), s));
                have_hi_solution = true;
                if side == 1 {
                    s_lo *= 0.5;
                }
                side = 1;
            }
            if hi - lo <= 1e-15 * hi {
                break;
            }
        }
        // Land on the root: x(ν) is linear between breakpoints, so when the bracket has closed the
        // point on the segment between the two sides' solutions with Σx = T is the optimum.
        if let Some((xh, sh)) = &x_hi {
            let (xl, sl) = &x_lo;
            let theta = (-sh / (sl - sh)).clamp(0.0, 1.0);
            let x: Vec<f64> = xh
                .iter()
                .zip(xl)
                .map(|(h, l)| h + theta * (l - h))
                .collect();
            self.move_to(spec, &x);
            self.vars.resnap(upper);
            self.vars.factor_valid = false;
        } else if !have_hi_solution || total(self) > 0.0 {
            ok &= self.newton(spec, upper, hi, it);
        }
        let sum: f64 = self.vars.x.iter().sum();
        if sum > budget {
            let x: Vec<f64> = self.vars.x.iter().map(|v| v * budget / sum).collect();
            self.move_to(spec, &x);
            self.vars.resnap(upper);
        }
        self.nu = hi;
        ok && it.budget < MAX_BUDGET
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
        let objective = if self.z_stale || !predictions {
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

/// BᵀB. Large products go through nalgebra's blocked kernel (matrixmultiply) with B viewed as Bᵀ by
/// strides (no copy), one column panel at a time and only on and below the diagonal, then mirrored:
/// about 60 % of a full product's work. Small ones use the plain loop (nalgebra's small path wants
/// unit strides).
fn gram_of(b: &DMatrix<f64>) -> DMatrix<f64> {
    const PANEL: usize = 32;
    let (m, n) = b.shape();
    if m <= 5 || n <= 5 {
        return b.tr_mul(b);
    }
    let mut g = DMatrix::zeros(n, n);
    let bt = nalgebra::DMatrixView::from_slice_with_strides(b.as_slice(), n, m, m, 1);
    let mut j0 = 0;
    while j0 < n {
        let nj = PANEL.min(n - j0);
        let ni = n - j0;
        if ni > 5 && nj > 5 {
            let mut out = g.view_mut((j0, j0), (ni, nj));
            out.gemm(1.0, &bt.rows(j0, ni), &b.columns(j0, nj), 0.0);
        } else {
            let tail = b.columns(j0, nj);
            let block = b.columns(j0, ni).tr_mul(&tail);
            g.view_mut((j0, j0), (ni, nj)).copy_from(&block);
        }
        j0 += nj;
    }
    for j in 0..n {
        for i in 0..j {
            g[(i, j)] = g[(j, i)];
        }
    }
    g
}

fn class_target(class: Class, lo: f64, hi: f64) -> Option<f64> {
    match class {
        Class::Inside => None,
        Class::Below | Class::Point => Some(lo),
        Class::Above => Some(hi),
    }
}

/// One cell's share of the line search's slope at t = 0, (w·(z − t)·dz, w·dz²), where t is the
/// edge the cell is outside of (its class by [`band_class_at`]); zero for a cell inside its band.
/// Branch-free: cells in and out of their bands mix unpredictably.
fn slope_terms(z: f64, dz: f64, lo: f64, hi: f64, w: f64) -> (f64, f64) {
    let point = lo == hi;
    let below = (z < lo) | ((z == lo) & (dz < 0.0));
    let above = !below & ((z > hi) | ((z == hi) & (dz > 0.0)));
    let target = if above { hi } else { lo };
    let on = below | above | point;
    let gap = if on { z - target } else { 0.0 };
    let weight = if on { w } else { 0.0 };
    (weight * gap * dz, weight * dz * dz)
}

#[cfg(test)]
/// Class of a band cell at value `z` moving in direction `dz` (ties resolved by the direction of motion).
fn band_class_at(z: f64, lo: f64, hi: f64, dz: f64) -> Class {
    if z < lo || (z == lo && dz < 0.0) {
        Class::Below
    } else if z > hi || (z == hi && dz > 0.0) {
        Class::Above
    } else {
        Class::Inside
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The branch-free forms agree with the plain definitions on every tie and infinite edge.
    #[test]
    fn branch_free_classes_match_their_definitions() {
        let values = [f64::NEG_INFINITY, -2.0, -1.0, 0.0, 1.0, 2.0, f64::INFINITY];
        let finite = [-2.0, -1.0, 0.0, 1.0, 2.0];
        for &lo in &values[..6] {
            for &hi in &values[1..] {
                if lo > hi {
                    continue;
                }
                for &z in &finite {
                    let plain = if lo == hi {
                        Class::Point
                    } else if z < lo {
                        Class::Below
                    } else if z > hi {
                        Class::Above
                    } else {
                        Class::Inside
                    };
                    assert_eq!(classify(z, lo, hi), plain, "z {z} in [{lo}, {hi}]");
                    for &dz in &[-1.5, 0.0, 1.5] {
                        let class = if lo == hi {
                            Class::Point
                        } else {
                            band_class_at(z, lo, hi, dz)
                        };
                        let want = class_target(class, lo, hi)
                            .map_or((0.0, 0.0), |t| (3.0 * (z - t) * dz, 3.0 * dz * dz));
                        assert_eq!(
                            slope_terms(z, dz, lo, hi, 3.0),
                            want,
                            "z {z} dz {dz} in [{lo}, {hi}]"
                        );
                    }
                }
            }
        }
    }
}
