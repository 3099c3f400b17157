//! The predictions z = A·x, kept exact at a reference point and brought up to date only where it
//! matters.
//!
//! Between refreshes, cell i's prediction can move by at most max_j |a_ij| · ‖x − x_ref‖₁ (each
//! term of a_i·(x − x_ref) is bounded by the largest rate times the change in that dwell). A cell
//! further than that from both band edges cannot change class, and the Gram matrix already holds
//! what it contributes; only the cells within reach of an edge are computed, one row each. A
//! Newton pass whose step is small (the usual clean-up pass after a brush stroke) then costs a
//! few rows instead of a product over every cell. When too many cells are within reach, the full
//! product is cheaper and the reference moves to the current x.

use super::DwellSolver;
use crate::problem::{Rates, Spec};

/// Beyond this share of the cells within reach of an edge, the full product is cheaper than row
/// by row (a row costs about as much as a column of the product, and the pass needs two per cell).
const MAX_SHARE: usize = 8;

/// max_j |a_ij|: how fast cell i's prediction can move per second of dwell.
pub(super) fn row_max(rates: &Rates, i: usize) -> f64 {
    (0..rates.configs()).fold(0.0, |m: f64, j| m.max(rates.get(i, j).abs()))
}

impl DwellSolver {
    /// ‖x − x_ref‖₁: how far `x` is from where z is exact.
    pub(super) fn drift(&self, x: &[f64]) -> f64 {
        x.iter().zip(&self.z_x).map(|(a, b)| (a - b).abs()).sum()
    }

    /// Cell i's prediction at `x`: z_i + Σ_j a_ij·(x_j − x_ref,j) over the dwells that moved.
    pub(super) fn z_at(&self, i: usize, x: &[f64]) -> f64 {
        let mut z = self.z[i];
        for (j, (&xj, &rj)) in x.iter().zip(&self.z_x).enumerate() {
            if xj != rj {
                z += self.rates.get(i, j) * (xj - rj);
            }
        }
        z
    }

    /// Cell i's change of prediction along `d`, summed over the entries of `d` that are not zero.
    pub(super) fn row_times(&self, i: usize, d: &[f64]) -> f64 {
        d.iter()
            .enumerate()
            .filter(|&(_, &dj)| dj != 0.0)
            .map(|(j, &dj)| self.rates.get(i, j) * dj)
            .sum()
    }

    /// Makes z exact at `x` (one product over the configurations in use).
    pub(super) fn set_z(&mut self, x: &[f64]) {
        self.z = self.rates.apply(x);
        self.z_x.copy_from_slice(x);
    }

    /// Makes z exact at the current x if it is not.
    pub(super) fn ensure_z(&mut self) {
        if self.z_x != self.vars.x {
            let x = self.vars.x.clone();
            self.set_z(&x);
        }
    }

    /// The band cells that could reach an edge while x stays within `reach` (‖·‖₁) of the point
    /// where z is exact, ascending; `None` when so many could that the full product is cheaper.
    /// Point targets never change class and are never listed.
    pub(super) fn near_edges(&self, spec: &Spec, reach: f64) -> Option<Vec<usize>> {
        let m = self.rates.cells();
        let limit = m / MAX_SHARE;
        let mut near = Vec::new();
        for i in 0..m {
            let (lo, hi, z) = (spec.lo[i], spec.hi[i], self.z[i]);
            if lo == hi {
                continue;
            }
            let distance = (z - lo).abs().min((z - hi).abs());
            // The bound, widened for the rounding of the distance and of the bound itself.
            let bound = (self.row_max[i] * reach + 4.0 * f64::EPSILON * z.abs()) * (1.0 + 1e-9);
            // Not provably far (a NaN distance counts as near).
            let far = distance > bound;
            if !far {
                near.push(i);
                if near.len() > limit {
                    return None;
                }
            }
        }
        Some(near)
    }
}
