//! One cell's column of food through its thickness: how many layers it is cut into, where each
//! layer sits, and what share of the column's absorbed power each layer takes.
//!
//! **Deposition.** Inside a lossy food, power falls off as exp(−d/D_p) with depth d below the
//! face it enters (Lambert's law; shared/reference/physics.md §3.1 and §8.1), D_p the power
//! penetration depth ([`crate::dielectric::penetration_depth`]), which each layer takes at its own
//! state: a thawed surface layer keeps most of the power and shields a frozen core, as observed in
//! microwave thawing (Chamchong & Datta 1999). Power enters from the top face, and a share of it
//! from below where the tray lets energy through; each face lets in the share its surface layer
//! transmits. Lambert's law ignores standing waves inside slabs thinner than about 2.7 D_p (Ayappa
//! et al. 1991); it is the usual engineering approximation.

/// Most layers a column is cut into.
pub const MAX_LAYERS: usize = 64;

/// How many layers a column of `thickness` (m) is cut into: each at most `max_layer` thick and at
/// most the smallest penetration depth `depth`, so the temperature profile the deposition makes is
/// resolved (each layer takes its exact Lambert's-law share, whatever its thickness); at least one.
pub fn layer_count(thickness: f64, max_layer: f64, depth: f64) -> usize {
    let target = max_layer.min(depth);
    let n = (thickness / target).ceil();
    if n.is_finite() {
        (n as usize).clamp(1, MAX_LAYERS)
    } else {
        1
    }
}

/// What a layer of optical thickness `x` = dz/D_p does to the power reaching it: (share
/// absorbed, share passed on), 1 − e^(−x) and e^(−x). Up to x = 1 — every layer, since layers are
/// at most the smallest penetration depth — the (2, 2) Padé form, whose absorbed share
/// x/(1 + x/2 + x²/12) has no cancellation and is within 1e-3 of the exponential (3e-5 up to
/// x = 0.5); beyond, the exponential.
pub fn slab(x: f64) -> (f64, f64) {
    if x <= 1.0 {
        let q = 1.0 + x * (0.5 + x / 12.0);
        (x / q, (q - x) / q)
    } else {
        (-(-x).exp_m1(), (-x).exp())
    }
}

/// Deposits power in one column of equal layers `dz` (m) thick with attenuations `mu` (1/m, top
/// layer first): `top` watts enter through the top face and `bottom` through the bottom one, and
/// each layer keeps [`slab`]'s share of what reaches it (Lambert's law). Writes each layer's watts
/// to `power`; what passes through both faces is lost, so the column never holds more than enters.
pub fn deposit(top: f64, bottom: f64, dz: f64, mu: &[f64], power: &mut [f64]) {
    let mut flux = top;
    for (p, &m) in power.iter_mut().zip(mu) {
        let (kept, passed) = slab(dz * m);
        *p = flux * kept;
        flux *= passed;
    }
    if bottom > 0.0 {
        let mut flux = bottom;
        for (p, &m) in power.iter_mut().zip(mu).rev() {
            let (kept, passed) = slab(dz * m);
            *p += flux * kept;
            flux *= passed;
        }
    }
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
    /// absorbed above depth d is P₀·(1 − e^(−d/D_p)). Against that, the cumulative deposition in
    /// a thick slab of 2 mm layers (each 0.2 D_p, inside the Padé form's range).
    #[test]
    fn cumulative_deposition_follows_lambert_law() {
        let (dp, h, n) = (0.01, 0.30, 150);
        let mut power = vec![0.0; n];
        deposit(1.0, 0.0, h / n as f64, &vec![1.0 / dp; n], &mut power);
        let mut above = 0.0;
        for (l, p) in power.iter().enumerate() {
            above += p;
            let d = (l + 1) as f64 * h / n as f64;
            assert!((above - (1.0 - (-d / dp).exp())).abs() < 3e-5, "layer {l}");
        }
    }

    /// Whatever the layers' states, a column keeps what enters less what leaves through the far
    /// faces, and power from both faces mirrors.
    #[test]
    fn deposition_conserves_and_mirrors() {
        let mu = [120.0, 80.0, 300.0, 0.5, 90.0];
        let (dz, top, bottom) = (0.002, 7.0, 3.0);
        let mut power = [0.0; 5];
        deposit(top, bottom, dz, &mu, &mut power);
        let through: f64 = mu.iter().map(|m| slab(dz * m).1).product();
        let kept: f64 = power.iter().sum();
        assert!((kept - (top + bottom) * (1.0 - through)).abs() < 1e-12);
        let (mut a, mut b) = ([0.0; 5], [0.0; 5]);
        deposit(1.0, 1.0, dz, &[100.0; 5], &mut a);
        deposit(1.0, 0.0, dz, &[100.0; 5], &mut b);
        for l in 0..5 {
            assert!((a[l] - a[4 - l]).abs() < 1e-15);
            assert!(b[l] > b.get(l + 1).copied().unwrap_or(0.0));
        }
        // The Padé form meets the exponential where it hands over.
        let (kept, passed) = slab(1.0);
        assert!((kept - (1.0 - (-1.0f64).exp())).abs() < 1e-3);
        assert!((kept + passed - 1.0).abs() < 1e-15);
    }

    #[test]
    fn layer_counts_resolve_the_penetration_depth() {
        assert_eq!(layer_count(0.05, 0.004, 0.0082), 13);
        assert_eq!(layer_count(0.05, 0.004, 0.0025), 20);
        assert_eq!(layer_count(0.002, 0.004, 0.0082), 1);
        assert_eq!(layer_count(0.05, 0.004, f64::INFINITY), 13);
        assert_eq!(layer_count(10.0, 0.004, 0.01), MAX_LAYERS);
        assert_eq!(overlap((0.0, 0.02), (0.01, 0.05)), 0.01);
        let (bottom, top) = layer_span(0.03, 3, 0);
        assert!((bottom - 0.02).abs() < 1e-15 && top == 0.03);
    }
}
