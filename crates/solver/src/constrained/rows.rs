//! The constraint rows of a [`Task`](super::Task), written as G·z ≥ g over z = (x, s).
//!
//! x are the dwell seconds; s is the common margin (K) that only the max-margin goal has. The rows
//! are never stored as a matrix: each is a kind and an index, and its product with a vector is read
//! from A·x, so thousands of cell rows cost nothing until they are looked at.

use std::fmt;

use nalgebra::DMatrix;

use super::Task;

/// One constraint of a planning task, named for messages and multipliers.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Constraint {
    /// Configuration `j`'s dwell is not negative: xⱼ ≥ 0.
    Dwell(usize),
    /// Configuration `j`'s dwell limit: xⱼ ≤ uⱼ.
    Limit(usize),
    /// The time budget: Σx ≤ T.
    Budget,
    /// Cell `i`'s hard minimum: aᵢᵀx ≥ floorᵢ (+ the margin, for max-margin).
    Floor(usize),
    /// Cell `i`'s hard maximum: aᵢᵀx ≤ ceilingᵢ (− the margin, for max-margin).
    Ceiling(usize),
    /// The bound the max-margin goal puts on the margin so its start is finite; binding only when
    /// the margin is unbounded, which is refused.
    MarginCap,
}

impl fmt::Display for Constraint {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Constraint::Dwell(j) => write!(f, "configuration {j}'s dwell ≥ 0"),
            Constraint::Limit(j) => write!(f, "configuration {j}'s dwell limit"),
            Constraint::Budget => f.write_str("the time budget"),
            Constraint::Floor(i) => write!(f, "cell {i}'s minimum"),
            Constraint::Ceiling(i) => write!(f, "cell {i}'s maximum"),
            Constraint::MarginCap => f.write_str("the margin's working limit"),
        }
    }
}

/// The rows of one task with their right-hand sides and norms.
pub(crate) struct Rows<'a> {
    pub a: &'a DMatrix<f64>,
    /// Configurations.
    pub n: usize,
    /// Whether z carries the margin s after x.
    pub margin: bool,
    pub list: Vec<Constraint>,
    pub rhs: Vec<f64>,
    /// Euclidean norm of each row's normal.
    pub norm: Vec<f64>,
    /// ‖aᵢ‖ per cell, read once.
    row_norm: Vec<f64>,
}

impl<'a> Rows<'a> {
    /// Every finite constraint of `task`; `margin_cap` is the working bound on s, if the goal has s.
    pub fn new(a: &'a DMatrix<f64>, task: &Task, margin_cap: Option<f64>) -> Self {
        let (m, n) = a.shape();
        let margin = margin_cap.is_some();
        let row_norm: Vec<f64> = (0..m)
            .map(|i| (0..n).map(|j| a[(i, j)] * a[(i, j)]).sum::<f64>().sqrt())
            .collect();
        let mut rows = Rows {
            a,
            n,
            margin,
            list: Vec::new(),
            rhs: Vec::new(),
            norm: Vec::new(),
            row_norm,
        };
        let s2 = if margin { 1.0 } else { 0.0 };
        for j in 0..n {
            rows.push(Constraint::Dwell(j), 0.0, 1.0);
        }
        for (j, &u) in task.upper.iter().enumerate() {
            if u.is_finite() {
                rows.push(Constraint::Limit(j), -u, 1.0);
            }
        }
        if let Some(t) = task.budget {
            rows.push(Constraint::Budget, -t, (n as f64).sqrt());
        }
        for i in 0..m {
            let rn2 = rows.row_norm[i] * rows.row_norm[i];
            if task.floor[i].is_finite() {
                rows.push(Constraint::Floor(i), task.floor[i], (rn2 + s2).sqrt());
            }
            if task.ceiling[i].is_finite() {
                rows.push(Constraint::Ceiling(i), -task.ceiling[i], (rn2 + s2).sqrt());
            }
        }
        if let Some(cap) = margin_cap {
            rows.push(Constraint::MarginCap, -cap, 1.0);
        }
        rows
    }

    fn push(&mut self, c: Constraint, rhs: f64, norm: f64) {
        self.list.push(c);
        self.rhs.push(rhs);
        self.norm.push(norm.max(f64::MIN_POSITIVE));
    }

    /// Length of z.
    pub fn nv(&self) -> usize {
        self.n + usize::from(self.margin)
    }

    fn s(&self, z: &[f64]) -> f64 {
        if self.margin { z[self.n] } else { 0.0 }
    }

    /// Gᵣ·z, with `ax` = A·x already known.
    pub fn value(&self, r: usize, z: &[f64], ax: &[f64]) -> f64 {
        match self.list[r] {
            Constraint::Dwell(j) => z[j],
            Constraint::Limit(j) => -z[j],
            Constraint::Budget => -z[..self.n].iter().sum::<f64>(),
            Constraint::Floor(i) => ax[i] - self.s(z),
            Constraint::Ceiling(i) => -ax[i] - self.s(z),
            Constraint::MarginCap => -self.s(z),
        }
    }

    /// Gᵣ·z computed from z alone (O(n) for a cell's row), for when A·x is not at hand.
    pub fn value_direct(&self, r: usize, z: &[f64]) -> f64 {
        let dot = |i: usize| -> f64 { (0..self.n).map(|j| self.a[(i, j)] * z[j]).sum() };
        match self.list[r] {
            Constraint::Floor(i) => dot(i) - self.s(z),
            Constraint::Ceiling(i) => -dot(i) - self.s(z),
            _ => self.value(r, z, &[]),
        }
    }

    /// Gᵣ as a dense vector of length [`Rows::nv`].
    pub fn dense(&self, r: usize) -> Vec<f64> {
        let mut g = vec![0.0; self.nv()];
        self.add_to(r, 1.0, &mut g);
        g
    }

    /// out += t·Gᵣ.
    pub fn add_to(&self, r: usize, t: f64, out: &mut [f64]) {
        let n = self.n;
        match self.list[r] {
            Constraint::Dwell(j) => out[j] += t,
            Constraint::Limit(j) => out[j] -= t,
            Constraint::Budget => out[..n].iter_mut().for_each(|v| *v -= t),
            Constraint::Floor(i) | Constraint::Ceiling(i) => {
                let sign = if matches!(self.list[r], Constraint::Floor(_)) {
                    t
                } else {
                    -t
                };
                for (j, o) in out[..n].iter_mut().enumerate() {
                    *o += sign * self.a[(i, j)];
                }
                if self.margin {
                    out[n] -= t;
                }
            }
            Constraint::MarginCap => out[n] -= t,
        }
    }

    /// A natural size for row r's value at a point whose largest entry is `zmax` (see
    /// [`largest`]): what a tolerance on it is relative to.
    pub fn scale(&self, r: usize, zmax: f64) -> f64 {
        1.0 + self.rhs[r].abs() + self.norm[r] * zmax
    }
}

/// The largest magnitude in z.
pub(crate) fn largest(z: &[f64]) -> f64 {
    z.iter().fold(0.0f64, |a, v| a.max(v.abs()))
}
