//! The band fit under hard rows: finite Newton passes over exact quadratic pieces.
//!
//! f(x) = Σ wᵢ·dist(aᵢᵀx, [loᵢ, hiᵢ])² + μ·Σx + λ‖x‖² is convex and piecewise quadratic: on the
//! set of x that leaves the same cells below and above their bands it equals the quadratic
//! q(x) = Σ_out wᵢ(aᵢᵀx − bᵢ)² + μ·Σx + λ‖x‖², bᵢ the edge crossed. Each pass classifies the cells
//! at the current x, minimises that quadratic exactly over the hard rows (`dual_qp.rs`), and moves
//! to the best point of f on the segment (exact line search on the piecewise quadratic; both ends
//! feasible, so the segment is). When the minimiser classifies the cells as its own model did, it
//! satisfies the optimality conditions of f itself, which the certificate then confirms.
//!
//! H = 2(A_Oᵀ W A_O + λI) can be singular (a configuration no outside cell sees, or two
//! configurations that heat alike), so each piece carries the proximal term ρ/2·‖x − xₖ‖²
//! (ρ = [`PROXIMAL`] × the largest curvature any piece can have): strictly convex and well conditioned, yet with no
//! bias at the answer, where x stops moving — the proximal point method, which ends in finitely
//! many steps on polyhedral problems like these (Ferris 1991, *Math. Programming* 50:359–366).

use nalgebra::DMatrix;

use super::rows::Rows;
use super::{Multipliers, Refusal, Task, dual_qp};
use crate::problem::{Rates, Spec, band_distance};

/// Weight of the proximal term, relative to the largest curvature.
const PROXIMAL: f64 = 1e-6;
/// A proximal pass that moves x by less than this (relative) has settled: the proximal term's
/// pull ρ·Δx is then below 1e-14 of the gradient's scale.
const SETTLED: f64 = 1e-8;
/// Newton passes before giving up.
const PASSES: usize = 60;

pub(super) struct Fit {
    pub dwell: Vec<f64>,
    pub multipliers: Multipliers,
    pub changes: usize,
    pub passes: usize,
}

pub(super) fn solve(rates: &Rates, task: &Task, spec: &Spec) -> Result<Fit, Refusal> {
    let a = rates.matrix();
    let (m, n) = a.shape();
    let rows = Rows::new(a, task, None);
    let mut x = vec![0.0; n];
    let mut ax = vec![0.0; m];
    let mut changes = 0;
    let mut have_feasible = false;
    // ρ from the largest curvature any piece can have (every cell outside its band).
    let curvature = (0..n)
        .map(|j| {
            (0..m)
                .map(|i| 2.0 * spec.weights[i] * a[(i, j)] * a[(i, j)])
                .sum::<f64>()
        })
        .fold(0.0f64, f64::max);
    let rho = if curvature > 0.0 {
        PROXIMAL * curvature
    } else {
        1.0
    };
    for pass in 0..PASSES {
        let class: Vec<i8> = (0..m).map(|i| side(ax[i], spec, i)).collect();
        let (h, c) = piece(a, spec, &class, &x, rho);
        let qp = dual_qp::solve(&rows, &h, &c)?;
        changes += qp.changes;
        let ax_new = rates.apply(&qp.x);
        // The model held if every cell it misclassified sits on its band edge (to rounding),
        // where either class gives the same gradient.
        let same = (0..m).all(|i| {
            side(ax_new[i], spec, i) == class[i]
                || band_distance(ax_new[i], spec.lo[i], spec.hi[i]).abs()
                    <= 1e-10 * (1.0 + spec.lo[i].abs().min(spec.hi[i].abs()))
        });
        let moved =
            qp.x.iter()
                .zip(&x)
                .fold(0.0f64, |acc, (p, q)| acc.max((p - q).abs()));
        let size = qp.x.iter().fold(1.0f64, |acc, v| acc.max(v.abs()));
        if same && have_feasible && moved <= SETTLED * size {
            let mut multipliers = Multipliers::zeros(m, n);
            for (r, y) in qp.active {
                multipliers.set(rows.list[r], y.max(0.0));
            }
            return Ok(Fit {
                dwell: qp.x.into_iter().map(|v| v.max(0.0)).collect(),
                multipliers,
                changes,
                passes: pass + 1,
            });
        }
        if same || !have_feasible {
            // The first feasible point is taken whole, and so is a step that stays on its piece
            // (a proximal step); otherwise every move stays on segments between feasible points.
            x = qp.x;
            ax = ax_new;
            have_feasible = true;
            continue;
        }
        let d: Vec<f64> = qp.x.iter().zip(&x).map(|(p, q)| p - q).collect();
        let ad: Vec<f64> = ax_new.iter().zip(&ax).map(|(p, q)| p - q).collect();
        let t = line_search(spec, &x, &d, &ax, &ad);
        for (xi, di) in x.iter_mut().zip(&d) {
            *xi += t * di;
        }
        for (ai, di) in ax.iter_mut().zip(&ad) {
            *ai += t * di;
        }
    }
    Err(Refusal::IterationLimit(PASSES))
}

/// −1 below the band, +1 above, 0 inside.
fn side(z: f64, spec: &Spec, i: usize) -> i8 {
    let d = band_distance(z, spec.lo[i], spec.hi[i]);
    if d < 0.0 {
        -1
    } else if d > 0.0 {
        1
    } else {
        0
    }
}

/// H and c of the quadratic piece for one classification plus the proximal term
/// ρ/2·‖x − centre‖²: q = ½xᵀHx + cᵀx + const.
fn piece(
    a: &DMatrix<f64>,
    spec: &Spec,
    class: &[i8],
    centre: &[f64],
    rho: f64,
) -> (DMatrix<f64>, Vec<f64>) {
    let n = a.ncols();
    let out: Vec<usize> = (0..class.len()).filter(|&i| class[i] != 0).collect();
    let mut ao = DMatrix::zeros(out.len(), n);
    let mut wb = vec![0.0; out.len()];
    for (k, &i) in out.iter().enumerate() {
        let sw = spec.weights[i].sqrt();
        for j in 0..n {
            ao[(k, j)] = sw * a[(i, j)];
        }
        wb[k] = sw * if class[i] < 0 { spec.lo[i] } else { spec.hi[i] };
    }
    let mut h = ao.tr_mul(&ao) * 2.0;
    for j in 0..n {
        h[(j, j)] += 2.0 * spec.ridge + rho;
    }
    let atb = ao.tr_mul(&nalgebra::DVector::from_column_slice(&wb));
    let c = (0..n)
        .map(|j| -2.0 * atb[j] + spec.time_penalty - rho * centre[j])
        .collect();
    (h, c)
}

/// The minimiser over t ∈ [0, 1] of f(x + t·d), with A·x and A·d given: bisection on the
/// derivative, which is piecewise linear and non-decreasing.
fn line_search(spec: &Spec, x: &[f64], d: &[f64], ax: &[f64], ad: &[f64]) -> f64 {
    let slope = |t: f64| -> f64 {
        let fit: f64 = (0..ax.len())
            .map(|i| {
                let dist = band_distance(ax[i] + t * ad[i], spec.lo[i], spec.hi[i]);
                2.0 * spec.weights[i] * dist * ad[i]
            })
            .sum();
        let lin: f64 = d
            .iter()
            .zip(x)
            .map(|(di, xi)| spec.time_penalty * di + 2.0 * spec.ridge * (xi + t * di) * di)
            .sum();
        fit + lin
    };
    if slope(1.0) <= 0.0 {
        return 1.0;
    }
    if slope(0.0) >= 0.0 {
        return 0.0;
    }
    let (mut lo, mut hi) = (0.0, 1.0);
    for _ in 0..64 {
        let mid = 0.5 * (lo + hi);
        if slope(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}
