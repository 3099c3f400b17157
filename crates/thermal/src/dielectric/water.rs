//! Pure liquid water at 2.45 GHz: Ellison (2007), "Permittivity of pure water, at standard
//! atmospheric pressure, over the frequency range 0–25 THz and the temperature range 0–100 °C",
//! J. Phys. Chem. Ref. Data 36(1):1–18 (coefficients as in shared/reference/physics.md §3.2).
//!
//! The model is the static permittivity minus three Debye relaxations:
//! ε′ = ε_s − Σ Δᵢ(ωτᵢ)²/(1 + (ωτᵢ)²), ε″ = Σ Δᵢωτᵢ/(1 + (ωτᵢ)²), with Δᵢ = aᵢe^(−bᵢt) and
//! τᵢ = cᵢe^(dᵢ/(t + 133.1383)). Its two terahertz resonance terms change nothing at 2.45 GHz and are
//! left out. Valid 0–100 °C; colder (supercooled) water is evaluated at 0 °C.

use super::{FREQUENCY_HZ, Permittivity};

const A: [f64; 3] = [79.23882, 3.815866, 1.634967];
const B: [f64; 3] = [0.004300598, 0.01117295, 0.006841548];
const C: [f64; 3] = [1.382264e-13, 3.510354e-16, 6.30035e-15];
const D: [f64; 3] = [652.7648, 1249.533, 405.5169];
const T_OFFSET: f64 = 133.1383;

/// Static (zero-frequency) relative permittivity of water at `t` °C (Ellison 2007).
pub fn static_permittivity(t: f64) -> f64 {
    let t = t.clamp(0.0, 100.0);
    87.9144 - 0.404399 * t + 9.58726e-4 * t * t - 1.32802e-6 * t * t * t
}

/// Relative permittivity ε′ − jε″ of pure water at `t` °C and 2.45 GHz (Ellison 2007).
pub fn water(t: f64) -> Permittivity {
    let t = t.clamp(0.0, 100.0);
    let omega = 2.0 * std::f64::consts::PI * FREQUENCY_HZ;
    let (mut constant, mut loss) = (static_permittivity(t), 0.0);
    for i in 0..3 {
        let delta = A[i] * (-B[i] * t).exp();
        let wt = omega * C[i] * (D[i] / (t + T_OFFSET)).exp();
        let denom = 1.0 + wt * wt;
        constant -= delta * wt * wt / denom;
        loss += delta * wt / denom;
    }
    Permittivity { constant, loss }
}
