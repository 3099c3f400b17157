//! The dual simplex method for the linear goals, on a basis of n constraint rows.
//!
//! In the form min cᵀz subject to G·z ≥ g (the rows of `rows.rs`), a vertex is n linearly
//! independent rows held with equality: z = B⁻¹·g_W, and its row multipliers solve Bᵀ·y = c. The
//! method keeps y ≥ 0 (dual feasibility) from the start and repairs primal feasibility: the most
//! violated row enters, the ratio test on y picks the row that leaves (Dantzig's dual simplex;
//! Bland's smallest-index rule after a run of steps without dual progress, so it cannot cycle).
//! When no row can leave, the ray it found is a Farkas certificate of infeasibility, and its
//! support names the conflicting constraints.
//!
//! The start is dual feasible by construction: shortest has c = 1 and the rows xⱼ ≥ 0 (y = 1);
//! max-margin has c = (price·1, −1) and the rows xⱼ ≥ 0 plus the working cap on s. B⁻¹ is kept
//! explicitly (n ≤ 512) with rank-one updates, and rebuilt from scratch every [`REFRESH`] pivots.

use nalgebra::DMatrix;

use super::rows::{Constraint, Rows, largest};
use super::{Goal, Infeasible, MARGIN_TIME_PRICE, Multipliers, Refusal, Task};
use crate::problem::Rates;

/// Pivots between fresh inversions of the basis.
const REFRESH: usize = 40;
/// Steps without dual progress before switching to Bland's rule.
const STALL: usize = 60;

/// What the simplex returns.
pub(super) struct Lp {
    pub dwell: Vec<f64>,
    pub margin: Option<f64>,
    pub multipliers: Multipliers,
    pub pivots: usize,
    /// The final basis, by name.
    pub basis: Vec<Constraint>,
    /// The final basis's inverse, which warm-starts the next task on the same rates.
    pub inverse: DMatrix<f64>,
}

/// Solves a linear goal, from the basis `hint` names when it is still a dual-feasible vertex of
/// this task (the cost vector is the same for every task of a goal, so a basis stays dual
/// feasible when only the bands, limits or budget change); otherwise from the start above.
/// `inverse`, the hint's basis inverse from the last solve, spares inverting it again when it
/// still inverts this task's basis (checked, never assumed: the rates may have changed).
pub(super) fn solve(
    rates: &Rates,
    task: &Task,
    hint: &[Constraint],
    inverse: Option<&DMatrix<f64>>,
) -> Result<Lp, Refusal> {
    let a = rates.matrix();
    let (m, n) = a.shape();
    let margin_cap = match task.goal {
        Goal::MaxMargin => Some(margin_cap(a, task)?),
        _ => None,
    };
    let rows = Rows::new(a, task, margin_cap);
    let nv = rows.nv();
    let mut cost = vec![
        if margin_cap.is_some() {
            MARGIN_TIME_PRICE
        } else {
            1.0
        };
        nv
    ];
    let mut basis: Vec<usize> = (0..n).collect(); // the rows xⱼ ≥ 0 come first in `rows`
    if margin_cap.is_some() {
        cost[n] = -1.0;
        basis.push(rows.list.len() - 1); // the margin cap is the last row
    }
    let mut state = match warm(&rows, &cost, hint, inverse) {
        Some(s) => s,
        None => State::start(&rows, &cost, basis)?,
    };
    let cap = 20 * (nv + m) + 1000;
    let mut stall = 0usize;
    let mut best_dual = f64::NEG_INFINITY;
    for pivot in 0..cap {
        if pivot % REFRESH == REFRESH - 1 {
            state.refresh(&rows, &cost)?;
        }
        let bland = stall > STALL;
        let Some(p) = state.entering(&rows, bland) else {
            return finish(&rows, task, state, pivot);
        };
        let gp = rows.dense(p);
        let w = state
            .binv
            .tr_mul(&nalgebra::DVector::from_column_slice(&gp));
        let wmax = w.iter().fold(0.0f64, |acc, v| acc.max(v.abs()));
        let tiny = 1e-10 * wmax.max(f64::MIN_POSITIVE);
        // Ratio test on the multipliers: the first to reach zero as y_p grows leaves.
        let mut leave: Option<(usize, f64)> = None;
        for k in 0..nv {
            if w[k] > tiny {
                let ratio = state.y[k].max(0.0) / w[k];
                let better = match leave {
                    None => true,
                    Some((kb, rb)) => {
                        if bland {
                            ratio < rb - 1e-14 * rb.abs()
                                || (ratio <= rb + 1e-14 * rb.abs()
                                    && state.basis[k] < state.basis[kb])
                        } else {
                            ratio < rb || (ratio == rb && w[k] > w[kb])
                        }
                    }
                };
                if better {
                    leave = Some((k, ratio));
                }
            }
        }
        let Some((k, theta)) = leave else {
            return Err(Refusal::Infeasible(farkas(&rows, &state, p, &w, tiny)));
        };
        // Dual step.
        for i in 0..nv {
            state.y[i] -= theta * w[i];
        }
        state.y[k] = theta;
        // Primal step along column k of B⁻¹ until row p holds with equality.
        let d: Vec<f64> = state.binv.column(k).iter().copied().collect();
        let viol = rows.rhs[p] - rows.value(p, &state.z, &state.ax);
        let sigma = viol / w[k];
        for (zi, di) in state.z.iter_mut().zip(&d) {
            *zi += sigma * di;
        }
        let ad = rates.apply(&d[..n]);
        for (axi, adi) in state.ax.iter_mut().zip(&ad) {
            *axi += sigma * adi;
        }
        // B⁻¹ ← B⁻¹ − d·(wᵀ − e_kᵀ)/w_k.
        let mut row = w.clone();
        row[k] -= 1.0;
        let inv_wk = 1.0 / w[k];
        for c in 0..nv {
            let f = row[c] * inv_wk;
            if f != 0.0 {
                for r in 0..nv {
                    state.binv[(r, c)] -= d[r] * f;
                }
            }
        }
        state.basis[k] = p;
        let dual = state.dual_value(&rows);
        if dual > best_dual + 1e-12 * (1.0 + best_dual.abs()) {
            best_dual = dual;
            stall = 0;
        } else {
            stall += 1;
        }
    }
    Err(Refusal::IterationLimit(cap))
}

/// The state at the basis `hint` names, if every constraint of it is a row of this task, the rows
/// are independent and their multipliers are non-negative.
fn warm(
    rows: &Rows,
    cost: &[f64],
    hint: &[Constraint],
    inverse: Option<&DMatrix<f64>>,
) -> Option<State> {
    if hint.len() != rows.nv() {
        return None;
    }
    let index: std::collections::HashMap<Constraint, usize> =
        rows.list.iter().enumerate().map(|(r, &c)| (c, r)).collect();
    let basis: Option<Vec<usize>> = hint.iter().map(|c| index.get(c).copied()).collect();
    let basis = basis?;
    let state = match inverse.filter(|inv| inverts(rows, &basis, inv)) {
        Some(inv) => State::at(rows, cost, basis, inv.clone()),
        None => State::start(rows, cost, basis).ok()?,
    };
    let ymax = state.y.iter().fold(0.0f64, |a, v| a.max(v.abs()));
    state
        .y
        .iter()
        .all(|&y| y >= -1e-12 * ymax.max(f64::MIN_POSITIVE))
        .then_some(state)
}

/// Whether `inv` inverts the basis matrix of `basis` (rows of this task): B·(inv·v) = v on two
/// fixed probe vectors, to rounding. O(n²), against O(n³) for a fresh inverse. The probes' entries
/// are spaced irrationally (and alternate in sign in the second), so no simple structure of a
/// basis can hide a changed row from both.
fn inverts(rows: &Rows, basis: &[usize], inv: &DMatrix<f64>) -> bool {
    let nv = rows.nv();
    if inv.shape() != (nv, nv) {
        return false;
    }
    let golden = 0.618_033_988_749_894_9_f64;
    let probes = [
        nalgebra::DVector::from_iterator(
            nv,
            (0..nv).map(|k| 1.0 + ((k + 1) as f64 * golden).fract()),
        ),
        nalgebra::DVector::from_iterator(
            nv,
            (0..nv).map(|k| if k % 2 == 0 { 1.0 } else { -1.0 } * ((k + 2) as f64).sqrt()),
        ),
    ];
    probes.iter().all(|v| {
        let u = inv * v;
        let (mut err, mut scale) = (0.0f64, 0.0f64);
        for (k, &r) in basis.iter().enumerate() {
            let g = rows.dense(r);
            let bu: f64 = g.iter().zip(u.iter()).map(|(a, b)| a * b).sum();
            let size: f64 = g.iter().zip(u.iter()).map(|(a, b)| (a * b).abs()).sum();
            err = err.max((bu - v[k]).abs());
            scale = scale.max(size).max(v[k].abs());
        }
        err.is_finite() && err <= 1e-9 * scale
    })
}

/// The working bound on the margin: above anything a bounded margin can reach, or a refusal when
/// nothing limits it.
fn margin_cap(a: &DMatrix<f64>, task: &Task) -> Result<f64, Refusal> {
    let (m, n) = a.shape();
    let edges = task
        .floor
        .iter()
        .chain(&task.ceiling)
        .filter(|v| v.is_finite())
        .fold(0.0f64, |acc, v| acc.max(v.abs()));
    let any_edge = task
        .floor
        .iter()
        .chain(&task.ceiling)
        .any(|v| v.is_finite());
    if !any_edge {
        return Err(Refusal::Unbounded(
            "the max-margin goal needs at least one hard band edge (a minimum or a maximum)",
        ));
    }
    if task.ceiling.iter().any(|v| v.is_finite()) {
        return Ok(10.0 * edges + 1.0);
    }
    // Only minima: the margin is limited by how much A·x can reach within the limits and budget.
    let t = task.budget.unwrap_or(f64::INFINITY);
    let reach = (0..m)
        .map(|i| {
            (0..n)
                .map(|j| {
                    let cap = task.upper[j].min(t);
                    if a[(i, j)] == 0.0 {
                        0.0
                    } else {
                        a[(i, j)] * cap
                    }
                })
                .sum::<f64>()
        })
        .fold(0.0f64, f64::max);
    if !reach.is_finite() {
        return Err(Refusal::Unbounded(
            "with only minima, the max-margin goal needs a time budget or dwell limits",
        ));
    }
    Ok(10.0 * (edges + reach) + 1.0)
}

struct State {
    basis: Vec<usize>,
    binv: DMatrix<f64>,
    z: Vec<f64>,
    ax: Vec<f64>,
    y: Vec<f64>,
}

impl State {
    fn start(rows: &Rows, cost: &[f64], basis: Vec<usize>) -> Result<Self, Refusal> {
        let nv = rows.nv();
        let mut s = State {
            basis,
            binv: DMatrix::identity(nv, nv),
            z: vec![0.0; nv],
            ax: vec![0.0; rows.a.nrows()],
            y: vec![0.0; nv],
        };
        s.refresh(rows, cost)?;
        Ok(s)
    }

    /// The state at `basis` whose inverse is known.
    fn at(rows: &Rows, cost: &[f64], basis: Vec<usize>, binv: DMatrix<f64>) -> Self {
        let nv = rows.nv();
        let mut s = State {
            basis,
            binv,
            z: vec![0.0; nv],
            ax: vec![0.0; rows.a.nrows()],
            y: vec![0.0; nv],
        };
        s.recompute(rows, cost);
        s
    }

    /// Inverts the basis afresh and recomputes z, A·x and y from it.
    fn refresh(&mut self, rows: &Rows, cost: &[f64]) -> Result<(), Refusal> {
        let nv = rows.nv();
        let mut b = DMatrix::zeros(nv, nv);
        for (k, &r) in self.basis.iter().enumerate() {
            let g = rows.dense(r);
            for c in 0..nv {
                b[(k, c)] = g[c];
            }
        }
        let Some(inv) = b.try_inverse() else {
            return Err(Refusal::IterationLimit(0));
        };
        self.binv = inv;
        self.recompute(rows, cost);
        Ok(())
    }

    /// z, A·x and y from the basis inverse.
    fn recompute(&mut self, rows: &Rows, cost: &[f64]) {
        let nv = rows.nv();
        let gw = nalgebra::DVector::from_iterator(nv, self.basis.iter().map(|&r| rows.rhs[r]));
        let z = &self.binv * gw;
        self.z = z.iter().copied().collect();
        self.ax = {
            let x = &self.z[..rows.n];
            let mut ax = vec![0.0; rows.a.nrows()];
            for (j, &xj) in x.iter().enumerate() {
                if xj != 0.0 {
                    for (i, v) in ax.iter_mut().enumerate() {
                        *v += rows.a[(i, j)] * xj;
                    }
                }
            }
            ax
        };
        let y = self
            .binv
            .tr_mul(&nalgebra::DVector::from_column_slice(cost));
        self.y = y.iter().copied().collect();
    }

    /// The most violated row (relative to its scale), or with Bland's rule the first violated one.
    fn entering(&self, rows: &Rows, bland: bool) -> Option<usize> {
        let mut best: Option<(usize, f64)> = None;
        let mut in_basis = vec![false; rows.list.len()];
        self.basis.iter().for_each(|&r| in_basis[r] = true);
        let zmax = largest(&self.z);
        for r in 0..rows.list.len() {
            let slack = rows.value(r, &self.z, &self.ax) - rows.rhs[r];
            if slack >= -1e-10 * rows.scale(r, zmax) || in_basis[r] {
                continue;
            }
            if bland {
                return Some(r);
            }
            let score = -slack / rows.norm[r];
            if best.is_none_or(|(_, s)| score > s) {
                best = Some((r, score));
            }
        }
        best.map(|(r, _)| r)
    }

    fn dual_value(&self, rows: &Rows) -> f64 {
        self.basis
            .iter()
            .zip(&self.y)
            .map(|(&r, &y)| rows.rhs[r] * y)
            .sum()
    }
}

/// The Farkas ray: row p with weight 1 and the basis rows with weight −w. Gᵀr = 0 and gᵀr > 0
/// prove that no z meets every row.
fn farkas(
    rows: &Rows,
    state: &State,
    p: usize,
    w: &nalgebra::DVector<f64>,
    tiny: f64,
) -> Infeasible {
    let mut support: Vec<(Constraint, f64)> = state
        .basis
        .iter()
        .zip(w.iter())
        .filter(|&(_, &wk)| wk < -tiny)
        .map(|(&r, &wk)| (rows.list[r], -wk * rows.norm[r]))
        .filter(|(c, _)| !matches!(c, Constraint::Dwell(_)))
        .collect();
    support.sort_by(|a, b| b.1.total_cmp(&a.1));
    Infeasible {
        constraint: rows.list[p],
        shortfall: rows.rhs[p] - rows.value(p, &state.z, &state.ax),
        conflicts: support.into_iter().map(|(c, _)| c).collect(),
    }
}

fn finish(rows: &Rows, task: &Task, state: State, pivots: usize) -> Result<Lp, Refusal> {
    let n = rows.n;
    let mut multipliers = Multipliers::zeros(rows.a.nrows(), n);
    for (&r, &y) in state.basis.iter().zip(&state.y) {
        if rows.list[r] == Constraint::MarginCap && y > 1e-9 {
            return Err(Refusal::Unbounded(
                "the margin has no limit: give a time budget, dwell limits or band maxima",
            ));
        }
        multipliers.set(rows.list[r], y.max(0.0));
    }
    let dwell: Vec<f64> = state.z[..n].iter().map(|&v| v.max(0.0)).collect();
    let margin = rows.margin.then(|| state.z[n]);
    let _ = task;
    Ok(Lp {
        dwell,
        margin,
        multipliers,
        pivots,
        basis: state.basis.iter().map(|&r| rows.list[r]).collect(),
        inverse: state.binv,
    })
}
