//! One cell's column of food through its thickness: how many layers it is cut into, where each
//! layer sits, and what share of the column's absorbed power each layer takes.
//!
//! **Deposition.** Inside a lossy food, power falls off as exp(−d/D_p) with depth d below the
//! face it enters (Lambert's law; shared/reference/physics.md §3.1 and §8.1), D_p the power
//! penetration depth ([`crate::dielectric::penetration_depth`]). A heating map gives the column's
//! total, so the profile is normalised over the thickness: a layer from depth d₁ to d₂ takes
//! (e^(−d₁/D_p) − e^(−d₂/D_p)) / (1 − e^(−H/D_p)) of the power entering through that face. Power
//! enters from the top face, and the share `bottom` of it from below where the tray lets energy
//! through. Lambert's law ignores standing waves inside slabs thinner than about 2.7 D_p (Ayappa
//! et al. 1991); it is the usual engineering approximation.

/// Most layers a column is cut into.
pub const MAX_LAYERS: usize = 32;

/// How many layers a column of `thickness` (m) is cut into: each at most `max_layer` thick and at
/// most half the penetration depth `depth`, so the deposition profile is resolved; at least one.
pub fn layer_count(thickness: f64, max_layer: f64, depth: f64) -> usize {
    let target = max_layer.min(depth / 2.0);
    let n = (thickness / target).ceil();
    if n.is_finite() {
        (n as usize).clamp(1, MAX_LAYERS)
    } else {
        1
    }
}

/// The share of the column's power each of `layers` equal layers takes, top layer first, for
/// penetration depth `depth` (m, infinite: even) and the share `bottom` entering from below. The
/// shares sum to one.
pub fn power_shares(thickness: f64, layers: usize, depth: f64, bottom: f64) -> Vec<f64> {
    let from_top = lambert(thickness, layers, depth);
    let from_below: Vec<f64> = from_top.iter().rev().copied().collect();
    from_top
        .iter()
        .zip(&from_below)
        .map(|(t, b)| (1.0 - bottom) * t + bottom * b)
        .collect()
}

/// Lambert's-law shares of power entering through the top face, normalised over the thickness.
fn lambert(thickness: f64, layers: usize, depth: f64) -> Vec<f64> {
    let even = vec![1.0 / layers as f64; layers];
    if !depth.is_finite() {
        return even;
    }
    let dz = thickness / layers as f64;
    // exp_m1 keeps the thin-layer and deep-penetration cases accurate.
    let total = -(-thickness / depth).exp_m1();
    if total <= 0.0 {
        return even;
    }
    (0..layers)
        .map(|l| {
            let (d1, d2) = (l as f64 * dz, (l + 1) as f64 * dz);
            (-d1 / depth).exp() * -(-(d2 - d1) / depth).exp_m1() / total
        })
        .collect()
}

/// Height above the tray of layer `l` (0 = top) of a column of `layers` equal layers: (bottom, top), m.
pub fn layer_span(thickness: f64, layers: usize, l: usize) -> (f64, f64) {
    let dz = thickness / layers as f64;
    (thickness - (l + 1) as f64 * dz, thickness - l as f64 * dz)
}

/// Length of the overlap of two height intervals, m (0 when they do not overlap).
pub fn overlap(a: (f64, f64), b: (f64, f64)) -> f64 {
    (a.1.min(b.1) - a.0.max(b.0)).max(0.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Lambert's law for a slab (textbook form, e.g. Metaxas & Meredith 1983, ch. 5): the power
    /// absorbed above depth d is P₀·(1 − e^(−d/D_p)). Against that, the cumulative shares of a
    /// very thick slab (where the normalisation is 1 to 1e-13).
    #[test]
    fn cumulative_shares_follow_lambert_law() {
        let (dp, h, n) = (0.01, 0.30, 30);
        let shares = power_shares(h, n, dp, 0.0);
        let mut above = 0.0;
        for (l, s) in shares.iter().enumerate() {
            above += s;
            let d = (l + 1) as f64 * h / n as f64;
            assert!((above - (1.0 - (-d / dp).exp())).abs() < 1e-12, "layer {l}");
        }
    }

    /// Any profile, any split between the faces: the column keeps exactly the map's power.
    #[test]
    fn shares_sum_to_one_and_mirror_with_the_bottom_share() {
        for (h, n, dp, b) in [
            (0.05, 13, 0.0082, 0.0),
            (0.05, 13, 0.0082, 0.5),
            (0.002, 1, 0.0082, 0.3),
            (0.04, 8, f64::INFINITY, 0.0),
        ] {
            let s = power_shares(h, n, dp, b);
            assert!((s.iter().sum::<f64>() - 1.0).abs() < 1e-12);
            if b == 0.5 {
                for l in 0..n {
                    assert!((s[l] - s[n - 1 - l]).abs() < 1e-12);
                }
            }
        }
    }

    #[test]
    fn layer_counts_resolve_the_penetration_depth() {
        assert_eq!(layer_count(0.05, 0.004, 0.0082), 13);
        assert_eq!(layer_count(0.002, 0.004, 0.0082), 1);
        assert_eq!(layer_count(0.05, 0.004, f64::INFINITY), 13);
        assert_eq!(layer_count(10.0, 0.004, 0.01), MAX_LAYERS);
        assert_eq!(overlap((0.0, 0.02), (0.01, 0.05)), 0.01);
        let (bottom, top) = layer_span(0.03, 3, 0);
        assert!((bottom - 0.02).abs() < 1e-15 && top == 0.03);
    }
}
