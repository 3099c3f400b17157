//! The optimality certificate of a constrained schedule, recomputed from the raw rates.
//!
//! For min f(z) subject to G·z ≥ g with f convex, (z, y) is optimal when z is feasible, y ≥ 0,
//! ∇f(z) = Gᵀy (stationarity) and yᵣ·(Gᵣz − gᵣ) = 0 (complementarity); for the linear goals the
//! duality gap cᵀz − gᵀy is then zero as well. [`certify`] measures each of these against the
//! task and the rates alone — it shares no state with the methods that produced the answer, so
//! tests and users can use it as an oracle.

use super::rows::{Constraint, Rows, largest};
use super::{Goal, MARGIN_TIME_PRICE, Multipliers, Task};
use crate::problem::{Rates, band_distance};

/// How far an answer is from proven optimal; each part is relative to its natural scale, so 0 is
/// exact and [`crate::CERTIFY_TOL`] is the most a certified answer may have.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Certificate {
    /// Largest violation of a hard constraint, relative to the row's scale.
    pub infeasibility: f64,
    /// Most negative multiplier, relative to the largest one.
    pub sign: f64,
    /// Largest mismatch between the objective's gradient and Gᵀy, per variable, relative.
    pub stationarity: f64,
    /// Σ yᵣ·slackᵣ relative to Σ yᵣ·scaleᵣ.
    pub complementarity: f64,
    /// The duality gap |cᵀz − gᵀy|, relative (linear goals; 0 for the fit).
    pub gap: f64,
}

impl Certificate {
    /// The largest part.
    pub fn residual(&self) -> f64 {
        [
            self.infeasibility,
            self.sign,
            self.stationarity,
            self.complementarity,
            self.gap,
        ]
        .into_iter()
        .fold(0.0, |a, v| if v.is_nan() { f64::NAN } else { a.max(v) })
    }
}

/// Recomputes the certificate of `dwell` (and `margin`, for max-margin) with `multipliers` on
/// `task`, from the rates alone.
pub fn certify(
    rates: &Rates,
    task: &Task,
    dwell: &[f64],
    margin: Option<f64>,
    multipliers: &Multipliers,
) -> Certificate {
    let a = rates.matrix();
    let n = rates.configs();
    let is_margin = task.goal == Goal::MaxMargin;
    let rows = Rows::new(a, task, is_margin.then_some(f64::MAX));
    let mut z = dwell.to_vec();
    if is_margin {
        z.push(margin.unwrap_or(f64::NAN));
    }
    let ax = rates.apply(dwell);
    // Gradient of the objective in z.
    let mut grad = vec![0.0; z.len()];
    match &task.goal {
        Goal::Shortest => grad.iter_mut().for_each(|g| *g = 1.0),
        Goal::MaxMargin => {
            grad[..n].iter_mut().for_each(|g| *g = MARGIN_TIME_PRICE);
            grad[n] = -1.0;
        }
        Goal::Fit(spec) => {
            for (j, g) in grad.iter_mut().enumerate() {
                let s: f64 = (0..rates.cells())
                    .map(|i| {
                        let d = band_distance(ax[i], spec.lo[i], spec.hi[i]);
                        2.0 * spec.weights[i] * d * a[(i, j)]
                    })
                    .sum();
                *g = s + spec.time_penalty + 2.0 * spec.ridge * dwell[j];
            }
        }
    }
    // The natural size of each gradient component (what "zero" is relative to): for the fit,
    // ‖aⱼ‖_W·‖targets‖_W + μ + λxⱼ, as in the band problem's own certificate.
    let natural: Vec<f64> = match &task.goal {
        Goal::Fit(spec) => {
            let y = crate::kkt::target_scale(spec);
            (0..z.len())
                .map(|j| {
                    let c2: f64 = (0..rates.cells())
                        .map(|i| spec.weights[i] * a[(i, j)] * a[(i, j)])
                        .sum();
                    2.0 * (c2.sqrt() * y + spec.ridge * dwell[j].abs()) + spec.time_penalty
                })
                .collect()
        }
        _ => grad.iter().map(|g| g.abs()).collect(),
    };
    let mut gty = vec![0.0; z.len()];
    let mut gty_abs = vec![0.0; z.len()];
    let (mut infeasibility, mut ymax, mut yneg) = (0.0f64, 0.0f64, 0.0f64);
    let (mut comp, mut comp_scale, mut dual) = (0.0, 0.0, 0.0);
    let zmax = largest(&z);
    for r in 0..rows.list.len() {
        if rows.list[r] == Constraint::MarginCap {
            continue;
        }
        let scale = rows.scale(r, zmax);
        let slack = rows.value(r, &z, &ax) - rows.rhs[r];
        infeasibility = infeasibility.max((-slack / scale).max(0.0));
        let y = multipliers.get(rows.list[r]);
        ymax = ymax.max(y.abs());
        yneg = yneg.max(-y);
        if y != 0.0 {
            rows.add_to(r, y, &mut gty);
            for (o, g) in gty_abs.iter_mut().zip(rows.dense(r)) {
                *o += (y * g).abs();
            }
            comp += y.abs() * slack.abs();
            comp_scale += y.abs() * scale;
            dual += y * rows.rhs[r];
        }
    }
    // Multipliers recorded for constraints the task does not have count against the answer.
    let absent = absent_multipliers(task, multipliers);
    // Each variable's mismatch against its own scale, but never against less than the largest
    // natural scale of the problem: a configuration that heats nothing has no scale of its own,
    // and rounding on it is measured against the gradients that matter.
    let floor = natural.iter().fold(0.0f64, |a, &v| a.max(v));
    let stationarity = grad
        .iter()
        .zip(&gty)
        .zip(&gty_abs)
        .zip(&natural)
        .map(|(((g, gy), ga), s)| (g - gy).abs() / (g.abs() + ga.abs() + s.max(floor) + 1e-300))
        .fold(
            0.0f64,
            |acc, v| if v.is_nan() { f64::NAN } else { acc.max(v) },
        );
    let primal: f64 = z.iter().zip(&grad).map(|(zi, gi)| zi * gi).sum();
    let gap = match task.goal {
        Goal::Fit(_) => 0.0,
        _ => (primal - dual).abs() / (primal.abs() + dual.abs() + comp_scale + 1e-300),
    };
    Certificate {
        infeasibility,
        sign: (yneg / ymax.max(1e-300)).max(absent),
        stationarity,
        complementarity: comp / (comp_scale + 1e-300),
        gap,
    }
}

/// 1 if a multiplier is non-zero on a constraint the task does not have (an absent limit, budget,
/// minimum or maximum), else 0.
fn absent_multipliers(task: &Task, y: &Multipliers) -> f64 {
    let bad = y
        .limit
        .iter()
        .zip(&task.upper)
        .any(|(&v, u)| v != 0.0 && !u.is_finite())
        || (y.budget != 0.0 && task.budget.is_none())
        || y.floor
            .iter()
            .zip(&task.floor)
            .any(|(&v, f)| v != 0.0 && !f.is_finite())
        || y.ceiling
            .iter()
            .zip(&task.ceiling)
            .any(|(&v, c)| v != 0.0 && !c.is_finite());
    if bad { 1.0 } else { 0.0 }
}
