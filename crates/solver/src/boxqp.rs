//! Primal active-set method for the box-constrained quadratic ½xᵀQx − cᵀx, 0 ≤ x ≤ u, on the Gram matrix.
//!
//! This is the Lawson–Hanson / Bro–De Jong logic generalised to upper bounds (as in Stark–Parker BVLS):
//! free one bound variable whose multiplier has the wrong sign, re-solve the free block with the
//! cached Cholesky factor, step back to feasibility when a free variable would cross a bound.
//! Safeguards from Lawson & Hanson (1974, ch. 23): a column dependent on the free set is never
//! freed, and a variable is only freed if it moves into the interior.

use crate::factor::{Append, Factor};
use nalgebra::DMatrix;

/// Where a variable sits.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Bound {
    /// x = 0.
    Lower,
    /// x = u.
    Upper,
    /// 0 < x < u (solved for).
    Free,
}

/// The quadratic's data: Q = gram + ridge·I, linear term c, bounds u, per-variable gradient tolerance.
pub(crate) struct Quad<'a> {
    pub gram: &'a DMatrix<f64>,
    pub ridge: f64,
    pub c: &'a [f64],
    pub upper: &'a [f64],
    pub tol: &'a [f64],
}

impl Quad<'_> {
    #[inline]
    pub fn q(&self, i: usize, j: usize) -> f64 {
        self.gram[(i, j)] + if i == j { self.ridge } else { 0.0 }
    }

    /// Gradient component (Qx − c)_j.
    pub fn grad(&self, x: &[f64], j: usize) -> f64 {
        let col = self.gram.column(j);
        let s: f64 = col.iter().zip(x).map(|(a, b)| a * b).sum();
        s + self.ridge * x[j] - self.c[j]
    }

    /// The whole gradient Qx − c using only the variables in `support` (all others are zero): one
    /// column update per supported variable, which vectorises, rather than one dot product per
    /// component, which waits on itself.
    pub fn gradient_on(&self, x: &[f64], support: &[usize]) -> Vec<f64> {
        let n = self.c.len();
        let mut g = vec![0.0; n];
        let gram = self.gram.as_slice();
        for &k in support {
            let xk = x[k];
            for (gj, &a) in g.iter_mut().zip(&gram[k * n..(k + 1) * n]) {
                *gj += a * xk;
            }
        }
        for ((gj, &xj), &cj) in g.iter_mut().zip(x).zip(self.c) {
            *gj += self.ridge * xj - cj;
        }
        g
    }

    /// How far variable j violates its optimality condition (≤ 1 when satisfied), in units of its
    /// tolerance, from its gradient component `g`.
    pub fn violation(&self, g: f64, state: Bound, j: usize) -> f64 {
        let v = match state {
            Bound::Lower => -g,
            Bound::Upper => g,
            Bound::Free => g.abs(),
        };
        v / self.tol[j]
    }
}

/// The variables and the factor of their free block, kept between solves for warm starts.
#[derive(Clone, Debug)]
pub(crate) struct Vars {
    pub x: Vec<f64>,
    pub state: Vec<Bound>,
    pub factor: Factor,
    pub factor_valid: bool,
}

impl Vars {
    pub fn new(n: usize) -> Self {
        Vars {
            x: vec![0.0; n],
            state: vec![Bound::Lower; n],
            factor: Factor::new(n),
            factor_valid: false,
        }
    }

    /// Snaps x into [0, u] and re-derives each variable's state from its value.
    pub fn resnap(&mut self, upper: &[f64]) {
        for j in 0..self.x.len() {
            let new = if self.x[j] <= 0.0 {
                self.x[j] = 0.0;
                Bound::Lower
            } else if self.x[j] >= upper[j] {
                self.x[j] = upper[j];
                Bound::Upper
            } else {
                Bound::Free
            };
            if new != self.state[j] {
                self.state[j] = new;
                self.factor_valid = false;
            }
        }
    }

    fn set_bound(&mut self, j: usize, b: Bound, upper: &[f64]) {
        self.x[j] = if b == Bound::Upper { upper[j] } else { 0.0 };
        self.state[j] = b;
    }
}

/// Largest step t ≥ 0 along `d` (over variables `idx`) that keeps them in [0, u]; the blocking variable and its bound.
fn max_step(x: &[f64], idx: &[usize], d: &[f64], upper: &[f64]) -> (f64, usize, Bound) {
    let mut best = (f64::INFINITY, usize::MAX, Bound::Lower);
    for (&i, &di) in idx.iter().zip(d) {
        let cand = if di < 0.0 {
            (x[i] / -di, Bound::Lower)
        } else if di > 0.0 && upper[i].is_finite() {
            ((upper[i] - x[i]) / di, Bound::Upper)
        } else {
            continue;
        };
        if cand.0 < best.0 {
            best = (cand.0.max(0.0), i, cand.1);
        }
    }
    best
}

/// Brings free variable `j` into the factor. If its column depends on the free ones, step along the
/// null direction (d_P, ±1) downhill — the quadratic term is zero there, so the objective falls
/// linearly — until some variable binds; drop that one and retry. Returns true if `j` ends in the
/// factor, false if it ends at a bound.
fn absorb(q: &Quad, v: &mut Vars, j: usize) -> bool {
    loop {
        let col: Vec<f64> = v.factor.order.iter().map(|&i| q.q(i, j)).collect();
        let Append::Dependent { null } = v.factor.append(j, &col, q.q(j, j)) else {
            return true;
        };
        let mut idx = v.factor.order.clone();
        idx.push(j);
        let mut d = null;
        d.push(1.0);
        let slope: f64 = idx
            .iter()
            .zip(&d)
            .map(|(&i, &di)| q.grad(&v.x, i) * di)
            .sum();
        if slope > 0.0 || !max_step(&v.x, &idx, &d, q.upper).0.is_finite() {
            d.iter_mut().for_each(|e| *e = -*e);
        }
        let (t, hit, bound) = max_step(&v.x, &idx, &d, q.upper);
        if t.is_finite() {
            for (&i, &di) in idx.iter().zip(&d) {
                v.x[i] += t * di;
            }
        }
        v.set_bound(hit, bound, q.upper);
        if hit == j {
            return false;
        }
        let p = v.factor.position(hit).expect("blocking variable is free");
        v.factor.remove(p);
    }
}

/// Rebuilds the factor for the current free set, resolving dependent columns exactly (see [`absorb`]).
pub(crate) fn refactor(q: &Quad, v: &mut Vars) {
    v.factor.clear();
    for j in 0..v.x.len() {
        if v.state[j] == Bound::Free {
            absorb(q, v, j);
        }
    }
    v.factor_valid = true;
}

/// Solves the free block for the current bound values; `refine` adds one step of iterative refinement.
fn free_solve(q: &Quad, v: &Vars, at_upper: &[usize], z: &mut Vec<f64>, refine: bool) {
    let order = &v.factor.order;
    z.clear();
    z.extend(order.iter().map(|&j| {
        q.c[j]
            - at_upper
                .iter()
                .map(|&i| q.q(j, i) * q.upper[i])
                .sum::<f64>()
    }));
    if !refine {
        v.factor.solve(z);
        return;
    }
    let rhs = z.clone();
    v.factor.solve(z);
    let mut r: Vec<f64> = (0..order.len())
        .map(|p| {
            let j = order[p];
            rhs[p]
                - order
                    .iter()
                    .zip(z.iter())
                    .map(|(&i, &zi)| q.q(j, i) * zi)
                    .sum::<f64>()
        })
        .collect();
    v.factor.solve(&mut r);
    for (zi, ri) in z.iter_mut().zip(&r) {
        *zi += ri;
    }
}

/// At the optimum, one refined solve of the free block removes the factor's rounding where it stays feasible.
fn polish(q: &Quad, v: &mut Vars, z: &mut Vec<f64>) {
    if v.factor.len() == 0 {
        return;
    }
    let at_upper = upper_set(v);
    free_solve(q, v, &at_upper, z, true);
    let inside = v
        .factor
        .order
        .iter()
        .zip(z.iter())
        .all(|(&j, &zj)| zj > 0.0 && zj < q.upper[j]);
    if inside {
        for (p, &j) in v.factor.order.iter().enumerate() {
            v.x[j] = z[p];
        }
    }
}

fn upper_set(v: &Vars) -> Vec<usize> {
    (0..v.x.len())
        .filter(|&j| v.state[j] == Bound::Upper)
        .collect()
}

/// Runs the active-set method from the feasible point in `v`. Returns false if `max_iters` was reached
/// (x is then the best feasible point found so far).
pub(crate) fn solve(q: &Quad, v: &mut Vars, iters: &mut usize, max_iters: usize) -> bool {
    if !v.factor_valid {
        refactor(q, v);
    }
    let n = v.x.len();
    let mut blocked = vec![false; n];
    let mut z = Vec::with_capacity(n);
    // True when z already holds the free-block solution for the current free set.
    let mut z_ready = false;
    loop {
        // Inner loop: move to the free-block optimum, stepping back at bounds.
        loop {
            if !z_ready {
                let at_upper = upper_set(v);
                free_solve(q, v, &at_upper, &mut z, false);
            }
            z_ready = false;
            let mut alpha = 1.0;
            let mut hit: Option<(usize, Bound)> = None;
            for (p, &j) in v.factor.order.iter().enumerate() {
                let (xj, zj) = (v.x[j], z[p]);
                let cand = if zj <= 0.0 {
                    let a = if xj > zj { xj / (xj - zj) } else { 0.0 };
                    (a, Bound::Lower)
                } else if zj >= q.upper[j] {
                    let a = if zj > xj {
                        (q.upper[j] - xj) / (zj - xj)
                    } else {
                        0.0
                    };
                    (a, Bound::Upper)
                } else {
                    continue;
                };
                if cand.0 < alpha || hit.is_none() {
                    alpha = cand.0.clamp(0.0, 1.0);
                    hit = Some((j, cand.1));
                }
            }
            let Some((hit_var, hit_bound)) = hit else {
                for (p, &j) in v.factor.order.iter().enumerate() {
                    v.x[j] = z[p];
                }
                break;
            };
            let order = v.factor.order.clone();
            for (p, &j) in order.iter().enumerate() {
                v.x[j] += alpha * (z[p] - v.x[j]);
            }
            for p in (0..order.len()).rev() {
                let j = order[p];
                let leave = if j == hit_var {
                    Some(hit_bound)
                } else if v.x[j] <= 0.0 {
                    Some(Bound::Lower)
                } else if v.x[j] >= q.upper[j] {
                    Some(Bound::Upper)
                } else {
                    None
                };
                if let Some(b) = leave {
                    v.set_bound(j, b, q.upper);
                    v.factor.remove(p);
                }
            }
            *iters += 1;
            if *iters >= max_iters {
                return false;
            }
        }
        // Outer loop: free the bound variable that most violates its multiplier sign.
        loop {
            let mut best: Option<(f64, usize)> = None;
            let support: Vec<usize> = (0..n).filter(|&i| v.x[i] != 0.0).collect();
            let grad = q.gradient_on(&v.x, &support);
            for j in 0..n {
                if v.state[j] == Bound::Free || blocked[j] {
                    continue;
                }
                let viol = q.violation(grad[j], v.state[j], j);
                if viol > 1.0 && best.is_none_or(|(b, _)| viol > b) {
                    best = Some((viol, j));
                }
            }
            let Some((_, j)) = best else {
                polish(q, v, &mut z);
                return true;
            };
            let (from, x_before) = (v.state[j], v.x[j]);
            v.state[j] = Bound::Free;
            if !absorb(q, v, j) {
                if v.state[j] == from && v.x[j] == x_before {
                    blocked[j] = true;
                } else {
                    // j crossed to its other bound along a null direction: progress, look again.
                    blocked.iter_mut().for_each(|b| *b = false);
                    *iters += 1;
                    if *iters >= max_iters {
                        return false;
                    }
                }
                continue;
            }
            if v.x[j] == x_before {
                // Lawson–Hanson check: only keep j free if the free-block solution moves it inward.
                let at_upper = upper_set(v);
                free_solve(q, v, &at_upper, &mut z, false);
                let p = v.factor.position(j).expect("j was just added");
                let moves_in = match from {
                    Bound::Lower => z[p] > 0.0,
                    _ => z[p] < q.upper[j],
                };
                if !moves_in {
                    v.factor.remove(p);
                    v.state[j] = from;
                    blocked[j] = true;
                    continue;
                }
                z_ready = true;
            }
            blocked.iter_mut().for_each(|b| *b = false);
            break;
        }
        *iters += 1;
        if *iters >= max_iters {
            return false;
        }
    }
}
