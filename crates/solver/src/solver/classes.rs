//! A cell's class at the current prediction (below, inside or above its band, or a point target),
//! what it contributes to the Gram matrix in that class, and the branch-free forms the hot loops use.

use crate::problem::Spec;

#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) enum Class {
    Inside,
    Below,
    Above,
    Point,
}

pub(super) fn classify(z: f64, lo: f64, hi: f64) -> Class {
    // Branch-free: every cell is classified on every Newton pass, and the classes mix unpredictably.
    let code = u8::from(z < lo) | (u8::from(z > hi) << 1) | (u8::from(lo == hi) << 2);
    match code {
        0 => Class::Inside,
        1 => Class::Below,
        2 => Class::Above,
        _ => Class::Point,
    }
}

/// What a cell contributes in a class: (w to the Gram, w·t to b, w·t² to the constant).
pub(super) fn contribution(class: Class, w: f64, lo: f64, hi: f64) -> (f64, f64, f64) {
    match class_target(class, lo, hi) {
        None => (0.0, 0.0, 0.0),
        Some(t) => (w, w * t, w * t * t),
    }
}

/// A cell whose contribution to the Gram (`dg`), to b (`db`) and to Σ w·t² (`dyy`) changes.
pub(super) struct Change {
    pub cell: usize,
    pub dg: f64,
    pub db: f64,
    pub dyy: f64,
}

impl Change {
    pub(super) fn between(cell: usize, before: (f64, f64, f64), after: (f64, f64, f64)) -> Self {
        Change {
            cell,
            dg: after.0 - before.0,
            db: after.1 - before.1,
            dyy: after.2 - before.2,
        }
    }
}

/// Candidates for cells whose band or weight differs between `old` and `new` (same lengths): the
/// cells of every block of 64 whose bits differ anywhere. A brush stroke changes a cell or two, so
/// a bitwise sweep (which vectorises) finds them without comparing every cell one by one.
pub(super) fn changed_cells<'a>(old: &'a Spec, new: &'a Spec) -> impl Iterator<Item = usize> + 'a {
    const BLOCK: usize = 64;
    let m = new.lo.len();
    let differs = |a: &[f64], b: &[f64]| {
        a.iter()
            .zip(b)
            .fold(0u64, |acc, (x, y)| acc | (x.to_bits() ^ y.to_bits()))
            != 0
    };
    (0..m.div_ceil(BLOCK))
        .filter(move |&k| {
            let r = k * BLOCK..((k + 1) * BLOCK).min(m);
            differs(&old.lo[r.clone()], &new.lo[r.clone()])
                || differs(&old.hi[r.clone()], &new.hi[r.clone()])
                || differs(&old.weights[r.clone()], &new.weights[r])
        })
        .flat_map(move |k| k * BLOCK..((k + 1) * BLOCK).min(m))
}

pub(super) fn class_target(class: Class, lo: f64, hi: f64) -> Option<f64> {
    match class {
        Class::Inside => None,
        Class::Below | Class::Point => Some(lo),
        Class::Above => Some(hi),
    }
}

/// One cell's share of the line search's slope at t = 0, (w·(z − t)·dz, w·dz²), where t is the
/// edge the cell is outside of (its class by [`band_class_at`]); zero for a cell inside its band.
/// Branch-free: cells in and out of their bands mix unpredictably.
pub(super) fn slope_terms(z: f64, dz: f64, lo: f64, hi: f64, w: f64) -> (f64, f64) {
    let point = lo == hi;
    let below = (z < lo) | ((z == lo) & (dz < 0.0));
    let above = !below & ((z > hi) | ((z == hi) & (dz > 0.0)));
    let target = if above { hi } else { lo };
    let on = below | above | point;
    let gap = if on { z - target } else { 0.0 };
    let weight = if on { w } else { 0.0 };
    (weight * gap * dz, weight * dz * dz)
}

#[cfg(test)]
/// Class of a band cell at value `z` moving in direction `dz` (ties resolved by the direction of motion).
pub(super) fn band_class_at(z: f64, lo: f64, hi: f64, dz: f64) -> Class {
    if z < lo || (z == lo && dz < 0.0) {
        Class::Below
    } else if z > hi || (z == hi && dz > 0.0) {
        Class::Above
    } else {
        Class::Inside
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The branch-free forms agree with the plain definitions on every tie and infinite edge.
    #[test]
    fn branch_free_classes_match_their_definitions() {
        let values = [f64::NEG_INFINITY, -2.0, -1.0, 0.0, 1.0, 2.0, f64::INFINITY];
        let finite = [-2.0, -1.0, 0.0, 1.0, 2.0];
        for &lo in &values[..6] {
            for &hi in &values[1..] {
                if lo > hi {
                    continue;
                }
                for &z in &finite {
                    let plain = if lo == hi {
                        Class::Point
                    } else if z < lo {
                        Class::Below
                    } else if z > hi {
                        Class::Above
                    } else {
                        Class::Inside
                    };
                    assert_eq!(classify(z, lo, hi), plain, "z {z} in [{lo}, {hi}]");
                    for &dz in &[-1.5, 0.0, 1.5] {
                        let class = if lo == hi {
                            Class::Point
                        } else {
                            band_class_at(z, lo, hi, dz)
                        };
                        let want = class_target(class, lo, hi)
                            .map_or((0.0, 0.0), |t| (3.0 * (z - t) * dz, 3.0 * dz * dz));
                        assert_eq!(
                            slope_terms(z, dz, lo, hi, 3.0),
                            want,
                            "z {z} dz {dz} in [{lo}, {hi}]"
                        );
                    }
                }
            }
        }
    }
}
