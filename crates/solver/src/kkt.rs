//! Optimality certificate: the Karush–Kuhn–Tucker conditions, measured relative to the data's scale.
//!
//! For this convex problem KKT at x proves global optimality. [`check`] recomputes everything from the
//! raw rates, independently of the solver's cached Gram matrix, so tests can use it as an oracle.

use crate::problem::{Rates, Spec, band_distance};

/// How far a dwell vector is from satisfying the optimality conditions.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Kkt {
    /// Largest violation of stationarity/multiplier signs, each relative to its variable's gradient scale.
    pub stationarity: f64,
    /// Largest bound or budget violation, in seconds.
    pub infeasibility: f64,
    /// The budget multiplier that best explains x (0 when the budget is slack), per unit of ½·objective.
    pub budget_multiplier: f64,
}

impl Kkt {
    /// One number: stationarity plus infeasibility relative to the largest time scale involved.
    pub fn residual(&self, time_scale: f64) -> f64 {
        self.stationarity
            .max(self.infeasibility / time_scale.max(1.0))
    }
}

/// Natural size of each gradient component: ‖a_j‖_W·‖targets‖_W + μ/2 + λ·x_j, floored above zero.
/// `y` is [`target_scale`] of `spec`, passed in so callers that solve repeatedly compute it once.
pub(crate) fn gradient_scales(colnorm2: &[f64], y: f64, spec: &Spec, x: &[f64]) -> Vec<f64> {
    colnorm2
        .iter()
        .zip(x)
        .map(|(&c2, &xj)| {
            (c2.sqrt() * y + 0.5 * spec.time_penalty + spec.ridge * xj.abs()).max(f64::MIN_POSITIVE)
        })
        .collect()
}

/// W-norm of the finite band edges: the scale of what the predictions must reach.
pub(crate) fn target_scale(spec: &Spec) -> f64 {
    spec.lo
        .iter()
        .zip(&spec.hi)
        .zip(&spec.weights)
        .map(|((&lo, &hi), &w)| {
            let e = [lo, hi]
                .into_iter()
                .filter(|v| v.is_finite())
                .fold(0.0f64, |a, v| a.max(v.abs()));
            w * e * e
        })
        .sum::<f64>()
        .sqrt()
}

/// KKT measures from a half-gradient (Σ w r a + μ/2 + λx) already computed.
pub(crate) fn from_gradient(grad: &[f64], x: &[f64], spec: &Spec, scales: &[f64]) -> Kkt {
    let budget = spec.budget_or_inf();
    let total: f64 = x.iter().sum();
    let mut infeasibility = (total - budget).max(0.0);
    for (j, &xj) in x.iter().enumerate() {
        infeasibility = infeasibility.max(-xj).max(xj - spec.upper[j]);
    }
    let at_lower = |j: usize| x[j] <= 0.0;
    let at_upper = |j: usize| x[j] >= spec.upper[j] * (1.0 - 1e-12);
    let worst = |nu: f64| -> f64 {
        (0..x.len())
            .map(|j| {
                let g = grad[j] + nu;
                let v = match (at_lower(j), at_upper(j)) {
                    (true, true) => 0.0,
                    (true, false) => (-g).max(0.0),
                    (false, true) => g.max(0.0),
                    (false, false) => g.abs(),
                };
                v / scales[j]
            })
            .fold(0.0, f64::max)
    };
    let binding = budget.is_finite() && total >= budget * (1.0 - 1e-9);
    let nu = if binding {
        // The worst violation is convex in ν: ternary search on [0, max |g|], run until the
        // bracket stops shrinking. Gradients can span many orders of magnitude (one column's rates
        // 1e78 times another's): a fixed count of steps would stop far from the multiplier.
        let (mut a, mut b) = (
            0.0,
            grad.iter().fold(0.0f64, |m, g| m.max(g.abs())) * 2.0 + 1.0,
        );
        for _ in 0..4000 {
            let (m1, m2) = (a + (b - a) / 3.0, b - (b - a) / 3.0);
            if !(m1 > a && m2 < b && m1 < m2) {
                break;
            }
            if worst(m1) <= worst(m2) {
                b = m2;
            } else {
                a = m1;
            }
        }
        let mid = 0.5 * (a + b);
        if worst(0.0) <= worst(mid) { 0.0 } else { mid }
    } else {
        0.0
    };
    Kkt {
        stationarity: worst(nu),
        infeasibility,
        budget_multiplier: nu,
    }
}

/// Checks x against the problem from scratch (gradient from the rates, not from any cache).
pub fn check(rates: &Rates, spec: &Spec, x: &[f64]) -> Kkt {
    let a = rates.matrix();
    let z = rates.apply(x);
    let wr: Vec<f64> = z
        .iter()
        .enumerate()
        .map(|(i, &zi)| spec.weights[i] * band_distance(zi, spec.lo[i], spec.hi[i]))
        .collect();
    let grad: Vec<f64> = (0..rates.configs())
        .map(|j| {
            let s: f64 = a.column(j).iter().zip(&wr).map(|(p, q)| p * q).sum();
            s + 0.5 * spec.time_penalty + spec.ridge * x[j]
        })
        .collect();
    let colnorm2: Vec<f64> = (0..rates.configs())
        .map(|j| {
            a.column(j)
                .iter()
                .zip(&spec.weights)
                .map(|(p, w)| w * p * p)
                .sum()
        })
        .collect();
    from_gradient(
        &grad,
        x,
        spec,
        &gradient_scales(&colnorm2, target_scale(spec), spec, x),
    )
}
