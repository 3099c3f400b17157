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
//! (ρⱼ = [`PROXIMAL`] × the largest curvature configuration j can have in any piece): strictly convex and well conditioned, yet with no
//! bias at the answer, where x stops moving — the proximal point method, which ends in finitely
//! many steps on polyhedral problems like these (Ferris 1991, *Math. Programming* 50:359–366).

use nalgebra::DMatrix;

use super::rows::{Constraint, Rows};
use super::{Multipliers, Refusal, Task, dual_qp};
use crate::problem::{Rates, Spec, band_distance};

/// Weight of the proximal term, relative to each configuration's largest curvature.
const PROXIMAL: f64 = 1e-6;
/// The least curvature a configuration's proximal weight is taken from, relative to the largest
/// (a configuration that heats nothing still needs a pull).
const FLOOR: f64 = 0.1;
/// A proximal pass whose pull ρ·Δx is below this fraction of the gradient's scale has settled.
const SETTLED: f64 = 1e-11;
/// The most the pull may be stiffened after a piece's solve lost its way.
const STIFFEST: f64 = 1e7;
/// Newton passes before giving up.
const PASSES: usize = 60;

pub(super) struct Fit {
    pub dwell: Vec<f64>,
    pub multipliers: Multipliers,
    pub changes: usize,
    pub passes: usize,
    pub active: Vec<Constraint>,
}

pub(super) fn solve(
    rates: &Rates,
    task: &Task,
    spec: &Spec,
    hint: &[Constraint],
    start: Option<&[f64]>,
) -> Result<Fit, Refusal> {
    let a = rates.matrix();
    let (m, n) = a.shape();
    let rows = Rows::new(a, task, None);
    // A previous answer's dwells classify the cells nearly as the answer will; its active rows go
    // first into each piece's solve.
    let mut x = start.map_or_else(|| vec![0.0; n], <[f64]>::to_vec);
    let mut ax = rates.apply(&x);
    let first: Vec<usize> = {
        let index: std::collections::HashMap<Constraint, usize> =
            rows.list.iter().enumerate().map(|(r, &c)| (c, r)).collect();
        hint.iter().filter_map(|c| index.get(c).copied()).collect()
    };
    let mut changes = 0;
    let mut have_feasible = false;
    // ρⱼ from the largest curvature configuration j can have (every cell outside its band): a
    // weak configuration gets a weak pull, so its proximal steps are not slowed by a strong one's.
    let curvature: Vec<f64> = (0..n)
        .map(|j| {
            (0..m)
                .map(|i| 2.0 * spec.weights[i] * a[(i, j)] * a[(i, j)])
                .sum::<f64>()
        })
        .collect();
    let most = curvature.iter().fold(0.0f64, |acc, &v| acc.max(v));
    let rho: Vec<f64> = curvature
        .iter()
        .map(|&c| {
            if most == 0.0 {
                1.0
            } else if c == 0.0 {
                // A configuration that heats no cell moves only for the time price and the
                // limits, and is best left at zero: a full-strength pull keeps its steps (and
                // their rounding) small.
                most
            } else {
                PROXIMAL * c.max(FLOOR * most)
            }
        })
        .collect();
    let mut piece = Piece::new(n, m);
    // While the pieces agree but x still creeps (a configuration far weaker than the others has
    // far to go), the pull is weakened tenfold a pass; a new piece restores it.
    let mut shrink = 1.0;
    // Raised when a piece's solve lost its way in rounding (see below).
    let mut stiff = 1.0;
    for pass in 0..PASSES {
        let class: Vec<i8> = (0..m).map(|i| side(ax[i], spec, i)).collect();
        piece.update(a, spec, &class);
        let pull: Vec<f64> = rho.iter().map(|r| r * shrink * stiff).collect();
        let (h, c) = piece.quadratic(spec, &x, &pull);
        let qp = match dual_qp::solve(&rows, &h, &c, &first) {
            Ok(qp) => qp,
            // A weakened pull the factorisation cannot take: back to the full one.
            Err(Refusal::IterationLimit(0)) if shrink < 1.0 => {
                shrink = 1.0;
                continue;
            }
            // The dual method starts far outside the feasible set and can lose a hard row in
            // rounding on badly scaled data. The linear programme decides feasibility exactly:
            // infeasible, its refusal stands; feasible, its point becomes the centre of a much
            // stiffer pull, whose short steps keep the rounding small.
            Err(Refusal::Infeasible(_)) if stiff < STIFFEST => {
                let mut lp_task = task.clone();
                lp_task.goal = super::Goal::Shortest;
                let lp = super::simplex::solve(rates, &lp_task, &[], None)?;
                x = lp.dwell;
                ax = rates.apply(&x);
                have_feasible = true;
                stiff *= 1e3;
                shrink = 1.0;
                continue;
            }
            Err(e) => return Err(e),
        };
        changes += qp.changes;
        let ax_new = rates.apply(&qp.x);
        // The model held if every cell it misclassified sits on its band edge (to rounding),
        // where either class gives the same gradient.
        let same = (0..m).all(|i| {
            side(ax_new[i], spec, i) == class[i]
                || band_distance(ax_new[i], spec.lo[i], spec.hi[i]).abs()
                    <= 1e-10 * (1.0 + spec.lo[i].abs().min(spec.hi[i].abs()))
        });
        // On its own piece the answer satisfies the optimality conditions of f up to the
        // proximal term's pull ρ·(x̂ − xₖ): small against the gradient's scale, it has settled.
        let pull = (0..n)
            .map(|j| rho[j] * shrink * stiff * (qp.x[j] - x[j]).abs())
            .fold(0.0f64, f64::max);
        let size = qp.x.iter().fold(0.0f64, |acc, v| acc.max(v.abs()));
        let gradient = piece.atb.iter().fold(0.0f64, |a, v| a.max(2.0 * v.abs()))
            + most * size
            + spec.time_penalty;
        if same && have_feasible && pull <= SETTLED * gradient.max(f64::MIN_POSITIVE) {
            let mut multipliers = Multipliers::zeros(m, n);
            for &(r, y) in &qp.active {
                multipliers.set(rows.list[r], y.max(0.0));
            }
            return Ok(Fit {
                dwell: qp.x.into_iter().map(|v| v.max(0.0)).collect(),
                multipliers,
                changes,
                passes: pass + 1,
                active: qp.active.iter().map(|&(r, _)| rows.list[r]).collect(),
            });
        }
        shrink = if same && have_feasible {
            (shrink * 0.1).max(1e-3)
        } else {
            1.0
        };
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

/// Σ_out wᵢ·aᵢaᵢᵀ and Σ_out wᵢ·bᵢ·aᵢ over the cells outside their bands, kept up to date as the
/// classification changes: a pass that moves k cells across an edge costs k rank-one updates.
struct Piece {
    class: Vec<i8>,
    gram: DMatrix<f64>,
    atb: Vec<f64>,
}

impl Piece {
    fn new(n: usize, m: usize) -> Self {
        Piece {
            class: vec![0; m],
            gram: DMatrix::zeros(n, n),
            atb: vec![0.0; n],
        }
    }

    /// Moves to the classification `class`.
    fn update(&mut self, a: &DMatrix<f64>, spec: &Spec, class: &[i8]) {
        let n = a.ncols();
        for (i, (&new, old)) in class.iter().zip(self.class.iter_mut()).enumerate() {
            if new == *old {
                continue;
            }
            for (c, sign) in [(*old, -1.0), (new, 1.0)] {
                if c == 0 {
                    continue;
                }
                let w = sign * spec.weights[i];
                let b = if c < 0 { spec.lo[i] } else { spec.hi[i] };
                let row: Vec<f64> = (0..n).map(|j| a[(i, j)]).collect();
                for (p, &ap) in row.iter().enumerate() {
                    if ap == 0.0 {
                        continue;
                    }
                    self.atb[p] += w * b * ap;
                    for (q, &aq) in row.iter().enumerate().skip(p) {
                        self.gram[(p, q)] += w * ap * aq;
                    }
                }
            }
            *old = new;
        }
    }

    /// H and c of the piece plus the proximal term ρ/2·‖x − centre‖²: q = ½xᵀHx + cᵀx + const.
    fn quadratic(&self, spec: &Spec, centre: &[f64], rho: &[f64]) -> (DMatrix<f64>, Vec<f64>) {
        let n = self.atb.len();
        let mut h = DMatrix::zeros(n, n);
        for p in 0..n {
            for q in p..n {
                let v = 2.0 * self.gram[(p, q)];
                h[(p, q)] = v;
                h[(q, p)] = v;
            }
            h[(p, p)] += 2.0 * spec.ridge + rho[p];
        }
        let c = (0..n)
            .map(|j| -2.0 * self.atb[j] + spec.time_penalty - rho[j] * centre[j])
            .collect();
        (h, c)
    }
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
