//! Finite-Newton passes at a fixed budget multiplier: solve the box-constrained model of the
//! current classes, then the exact line search on the true piecewise-quadratic objective.

use super::classes::{Class, class_target, slope_terms};
use super::{DwellSolver, KKT_TOL, MAX_NEWTON};
use crate::boxqp::{self, Quad};
use crate::kkt;
use crate::problem::Spec;
use crate::solution::Iterations;

impl DwellSolver {
    /// Clips the warm start into the new bounds and budget so the active-set method starts feasible.
    pub(super) fn make_feasible(&mut self, spec: &Spec, upper: &[f64]) {
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
    pub(super) fn move_to(&mut self, spec: &Spec, x: &[f64]) {
        self.vars.x.copy_from_slice(x);
        self.set_z(x);
        self.reclassify(spec);
    }

    pub(super) fn linear_term(&self, spec: &Spec, nu: f64) -> Vec<f64> {
        let shift = 0.5 * spec.time_penalty + nu;
        self.b.iter().map(|b| b - shift).collect()
    }

    /// Finite Newton at a fixed budget multiplier ν. Returns false on an iteration limit.
    pub(super) fn newton(
        &mut self,
        spec: &Spec,
        upper: &[f64],
        nu: f64,
        it: &mut Iterations,
    ) -> bool {
        let n = self.rates.configs();
        let points_only = spec.lo == spec.hi;
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
                return done;
            }
            // Only cells within reach of an edge along the step can change class ([`super::lagged`]).
            let reach = self.drift(&x_old) + d.iter().map(|v| v.abs()).sum::<f64>();
            let near = self.near_edges(spec, reach);
            let (t, moved) = match &near {
                Some(cells) => (self.line_search_near(spec, &grad, &d, cells, &x_old), None),
                None => {
                    // Bring z to x_old and take A·d in one pass over the matrix.
                    let lag: Vec<f64> = x_old.iter().zip(&self.z_x).map(|(a, b)| a - b).collect();
                    let (shift, delta) = self.rates.apply_pair(&lag, &d);
                    self.z.iter_mut().zip(&shift).for_each(|(z, s)| *z += s);
                    self.z_x.copy_from_slice(&x_old);
                    (self.line_search(spec, nu, &x_old, &d, &delta), Some(delta))
                }
            };
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
            match (near, moved) {
                (_, Some(delta)) => {
                    // z was exact at x_old: move it with x.
                    for (zi, di) in self.z.iter_mut().zip(&delta) {
                        *zi += t * di;
                    }
                    self.z_x.copy_from_slice(&self.vars.x);
                    self.reclassify(spec);
                }
                (Some(cells), None) if self.drift(&self.vars.x) <= reach * (1.0 + 1e-9) => {
                    let x = self.vars.x.clone();
                    let at: Vec<(usize, f64)> =
                        cells.iter().map(|&i| (i, self.z_at(i, &x))).collect();
                    self.reclassify_cells(spec, &at);
                }
                _ => {
                    // Snapping to a bound took x outside the reach the cells were chosen for.
                    let x = self.vars.x.clone();
                    self.set_z(&x);
                    self.reclassify(spec);
                }
            }
            if !done {
                return false;
            }
        }
    }

    /// Exact minimiser over t ∈ [0, 1] of the true objective along x + t·d (z moves by t·δ).
    pub(super) fn line_search(
        &self,
        spec: &Spec,
        nu: f64,
        x: &[f64],
        d: &[f64],
        delta: &[f64],
    ) -> f64 {
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
        let mut events = Vec::new();
        for i in 0..m {
            push_crossings(&mut events, z[i], delta[i], lo[i], hi[i], w[i]);
        }
        walk(alpha, beta, events)
    }

    /// [`DwellSolver::line_search`] with only the `near` cells computed (see [`super::lagged`]):
    /// the slope at t = 0 comes from the model's gradient `grad` at x and the Gram matrix, which
    /// hold every cell in its current class; the near cells are then corrected to their exact
    /// class along d and supply the breakpoints.
    pub(super) fn line_search_near(
        &self,
        spec: &Spec,
        grad: &[f64],
        d: &[f64],
        near: &[usize],
        x: &[f64],
    ) -> f64 {
        // α = dᵀ(Qx − c) and β = dᵀQd with Q = G + λI: the slope over the cells as classed now.
        let mut alpha: f64 = grad.iter().zip(d).map(|(g, v)| g * v).sum();
        let support: Vec<usize> = (0..d.len()).filter(|&j| d[j] != 0.0).collect();
        let gram = self.gram.as_slice();
        let n = d.len();
        let mut beta = 0.0;
        for &j in &support {
            let col = &gram[j * n..(j + 1) * n];
            let gd: f64 = support.iter().map(|&k| col[k] * d[k]).sum();
            beta += d[j] * (gd + spec.ridge * d[j]);
        }
        let mut events = Vec::new();
        for &i in near {
            let (z, dz) = (self.z_at(i, x), self.row_times(i, d));
            let (lo, hi, w) = (spec.lo[i], spec.hi[i], spec.weights[i]);
            if let Some(t) = class_target(self.class[i], lo, hi) {
                alpha -= w * (z - t) * dz;
                beta -= w * dz * dz;
            }
            let (ga, gb) = slope_terms(z, dz, lo, hi, w);
            alpha += ga;
            beta += gb;
            push_crossings(&mut events, z, dz, lo, hi, w);
        }
        walk(alpha, beta, events)
    }
}

/// A band edge a cell reaches at `t` ∈ (0, 1) along the step, with what the walk needs to swap
/// its contribution.
struct Crossing {
    t: f64,
    z: f64,
    dz: f64,
    lo: f64,
    hi: f64,
    w: f64,
    at_lo: bool,
}

/// Adds the edges of a band cell crossed strictly inside (0, 1), i.e. edge − z strictly between 0
/// and dz. Few cells cross, so the test is cheap and the division rare.
fn push_crossings(events: &mut Vec<Crossing>, z: f64, dz: f64, lo: f64, hi: f64, w: f64) {
    let crosses = |gap: f64| ((gap > 0.0) & (gap < dz)) | ((gap < 0.0) & (gap > dz));
    let (gap_lo, gap_hi) = (lo - z, hi - z);
    let (at_lo, at_hi) = (crosses(gap_lo), crosses(gap_hi));
    if !((at_lo | at_hi) & (lo != hi)) {
        return;
    }
    for (gap, is_lo, hit) in [(gap_lo, true, at_lo), (gap_hi, false, at_hi)] {
        let t = gap / dz;
        if hit && t > 0.0 && t < 1.0 {
            events.push(Crossing {
                t,
                z,
                dz,
                lo,
                hi,
                w,
                at_lo: is_lo,
            });
        }
    }
}

/// The exact minimiser over t ∈ [0, 1] given the slope α + β·t at t = 0 (halved) and the
/// breakpoints where cells change class.
fn walk(mut alpha: f64, mut beta: f64, mut events: Vec<Crossing>) -> f64 {
    events.sort_by(|a, b| a.t.total_cmp(&b.t));
    let root = |alpha: f64, beta: f64, t0: f64, t1: f64| {
        if beta > 0.0 {
            (-alpha / beta).clamp(t0, t1)
        } else {
            t0
        }
    };
    let mut t0 = 0.0;
    for e in &events {
        if alpha + beta * e.t >= 0.0 {
            return root(alpha, beta, t0, e.t);
        }
        // The cell reaches an edge at t: swap its contribution for that of the class it enters.
        let (before, after) = match (e.at_lo, e.dz > 0.0) {
            (true, true) => (Class::Below, Class::Inside),
            (true, false) => (Class::Inside, Class::Below),
            (false, true) => (Class::Inside, Class::Above),
            (false, false) => (Class::Above, Class::Inside),
        };
        for (class, sign) in [(before, -1.0), (after, 1.0)] {
            if let Some(t) = class_target(class, e.lo, e.hi) {
                alpha += sign * e.w * (e.z - t) * e.dz;
                beta += sign * e.w * e.dz * e.dz;
            }
        }
        t0 = e.t;
    }
    if alpha + beta >= 0.0 {
        root(alpha, beta, t0, 1.0)
    } else {
        1.0
    }
}
