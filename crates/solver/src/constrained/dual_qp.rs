//! The dual active-set method of Goldfarb and Idnani (1983, *Math. Programming* 27:1–33) for
//! min ½xᵀHx + cᵀx subject to G·x ≥ g, H positive definite.
//!
//! It starts at the unconstrained minimum and adds the most violated row; each step moves x and the
//! active multipliers together so that every active row stays held with equality and every
//! multiplier stays ≥ 0, dropping an active row whose multiplier would turn negative. It needs no
//! feasible start, and when a violated row cannot be reached — its normal is a non-negative
//! combination of the active ones pointing the other way — that combination is a Farkas
//! certificate naming the conflicting rows.
//!
//! With H = L·Lᵀ and V = L⁻¹N for the active normals N, the step is r = (VᵀV)⁻¹Vᵀv_p,
//! z = L⁻ᵀ(v_p − V·r), where v_p = L⁻¹n_p. The Cholesky factor of VᵀV grows and shrinks one row
//! at a time (`factor.rs`), so a step costs O(n² + n·k) plus one product with the rates.

use nalgebra::{DMatrix, DVector};

use super::rows::{Constraint, Rows, largest};
use super::{Infeasible, Refusal};
use crate::factor::Factor;

/// A violation this small against its row's scale is rounding, not infeasibility.
const ROUNDING: f64 = 1e-9;

/// The minimiser with its active rows and their multipliers (for ½xᵀHx + cᵀx).
pub(super) struct DualQp {
    pub x: Vec<f64>,
    pub active: Vec<(usize, f64)>,
    pub changes: usize,
}

/// Minimises ½xᵀHx + cᵀx over the rows (which must not carry a margin). The rows in `first`
/// (a guess at the active set) are taken first while they are violated; any violated row may
/// enter next in this method, so the answer is the same.
pub(super) fn solve(
    rows: &Rows,
    h: &DMatrix<f64>,
    c: &[f64],
    first: &[usize],
) -> Result<DualQp, Refusal> {
    let n = rows.n;
    let Some(chol) = h.clone().cholesky() else {
        return Err(Refusal::IterationLimit(0));
    };
    let l = chol.l();
    let lower = |v: &[f64]| -> Vec<f64> {
        let mut b = DVector::from_column_slice(v);
        l.solve_lower_triangular_mut(&mut b);
        b.iter().copied().collect()
    };
    let upper_t = |v: &[f64]| -> Vec<f64> {
        let mut b = DVector::from_column_slice(v);
        l.tr_solve_lower_triangular_mut(&mut b);
        b.iter().copied().collect()
    };
    // x = −H⁻¹c.
    let mut x = upper_t(&lower(&c.iter().map(|v| -v).collect::<Vec<_>>()));
    let mut ax = Vec::new();
    let mut factor = Factor::new(n);
    let mut vcols: Vec<Vec<f64>> = Vec::new(); // in factor order
    let mut u: Vec<f64> = Vec::new(); // in factor order
    let mut rowof: Vec<usize> = Vec::new(); // in factor order
    let mut in_active = vec![false; rows.list.len()];
    // Rows found met to rounding though no step can reach them exactly.
    let mut settled = vec![false; rows.list.len()];
    let cap = 10 * (n + rows.list.len()) + 1000;
    let mut changes = 0usize;
    let mut guesses = first.iter().copied();
    // A·x is brought up to date only when every row must be looked at: while guesses are taken,
    // each needs only its own row (O(n)), not the whole product (O(mn)).
    let mut ax_ok = false;
    loop {
        let zmax = largest(&x);
        let guess = guesses.by_ref().find(|&r| {
            !in_active[r]
                && !settled[r]
                && rows.value_direct(r, &x) - rows.rhs[r] < -1e-13 * rows.scale(r, zmax)
        });
        let chosen = match guess {
            Some(p) => Some(p),
            None => {
                if !ax_ok {
                    ax = apply(rows, &x);
                    ax_ok = true;
                }
                most_violated(rows, &x, &ax, &in_active, &settled)
            }
        };
        let Some(p) = chosen else {
            return Ok(DualQp {
                x,
                active: rowof.into_iter().zip(u).collect(),
                changes,
            });
        };
        let vp = lower(&rows.dense(p));
        let mut up = 0.0;
        let mut sp = rows.value_direct(p, &x) - rows.rhs[p];
        loop {
            changes += 1;
            if changes > cap {
                return Err(Refusal::IterationLimit(cap));
            }
            let mut r: Vec<f64> = vcols.iter().map(|v| dot(v, &vp)).collect();
            factor.solve(&mut r);
            let mut q = vp.clone();
            for (v, rk) in vcols.iter().zip(&r) {
                for (qi, vi) in q.iter_mut().zip(v) {
                    *qi -= rk * vi;
                }
            }
            let qq = dot(&q, &q);
            let vv = dot(&vp, &vp);
            // Dependent on the active normals (the same test as the factor's append, a little wider).
            // With n rows active every normal is in their span, whatever rounding says.
            let z_zero = qq <= 1e-10 * vv || vcols.len() == n;
            // Partial step: the first active multiplier to reach zero.
            let mut block: Option<(usize, f64)> = None;
            for (k, &rk) in r.iter().enumerate() {
                if rk > 1e-12 * vv.sqrt() {
                    let t = u[k] / rk;
                    if block.is_none_or(|(_, tb)| t < tb) {
                        block = Some((k, t));
                    }
                }
            }
            let t2 = if z_zero { f64::INFINITY } else { -sp / qq };
            let t1 = block.map_or(f64::INFINITY, |(_, t)| t);
            if t1.is_infinite() && t2.is_infinite() {
                // A row that cannot be reached but is violated only by rounding (far inside what
                // the certificate tolerates) is left as met rather than called infeasible.
                if -sp <= ROUNDING * rows.scale(p, largest(&x)) {
                    settled[p] = true;
                    break;
                }
                return Err(Refusal::Infeasible(conflict(rows, &rowof, &r, p, -sp)));
            }
            let t = t1.min(t2);
            if !z_zero {
                let z = upper_t(&q);
                for (xi, zi) in x.iter_mut().zip(&z) {
                    *xi += t * zi;
                }
                ax_ok = false;
                sp += t * qq;
            }
            for (uk, rk) in u.iter_mut().zip(&r) {
                *uk -= t * rk;
            }
            up += t;
            if t2 <= t1 {
                // Full step: p joins the active set.
                // The new pivot is ‖q‖, the part of v_p outside the active span, computed
                // directly: the same number that decided the step was not zero.
                let col: Vec<f64> = vcols.iter().map(|v| dot(v, &vp)).collect();
                factor.append_pivot(p, &col, qq);
                vcols.push(vp);
                u.push(up);
                rowof.push(p);
                in_active[p] = true;
                break;
            }
            // Partial step: drop the blocking row and try again.
            let (k, _) = block.expect("t1 is finite only with a blocking row");
            factor.remove(k);
            vcols.remove(k);
            u.remove(k);
            in_active[rowof.remove(k)] = false;
        }
    }
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(p, q)| p * q).sum()
}

/// A·x for the rows' rate matrix.
fn apply(rows: &Rows, x: &[f64]) -> Vec<f64> {
    let m = rows.a.nrows();
    let mut out = vec![0.0; m];
    for (j, &xj) in x.iter().enumerate() {
        if xj != 0.0 {
            for (o, a) in out.iter_mut().zip(rows.a.column(j).iter()) {
                *o += a * xj;
            }
        }
    }
    out
}

fn most_violated(
    rows: &Rows,
    x: &[f64],
    ax: &[f64],
    active: &[bool],
    settled: &[bool],
) -> Option<usize> {
    let mut best: Option<(usize, f64)> = None;
    let zmax = largest(x);
    for r in 0..rows.list.len() {
        if active[r] || settled[r] {
            continue;
        }
        let slack = rows.value(r, x, ax) - rows.rhs[r];
        if slack >= -1e-13 * rows.scale(r, zmax) {
            continue;
        }
        let score = -slack / rows.norm[r];
        if best.is_none_or(|(_, s)| score > s) {
            best = Some((r, score));
        }
    }
    best.map(|(r, _)| r)
}

/// n_p = N·r with every rₖ ≤ 0: the rows with rₖ < 0 and p cannot hold together.
fn conflict(rows: &Rows, rowof: &[usize], r: &[f64], p: usize, shortfall: f64) -> Infeasible {
    let mut support: Vec<(Constraint, f64)> = rowof
        .iter()
        .zip(r)
        .filter(|&(_, &rk)| rk < 0.0)
        .map(|(&row, &rk)| (rows.list[row], -rk * rows.norm[row]))
        .filter(|(c, _)| !matches!(c, Constraint::Dwell(_)))
        .collect();
    support.sort_by(|a, b| b.1.total_cmp(&a.1));
    Infeasible {
        constraint: rows.list[p],
        shortfall,
        conflicts: support.into_iter().map(|(c, _)| c).collect(),
    }
}
