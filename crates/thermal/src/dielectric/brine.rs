//! The ionic part of a food's loss: dissolved salts conduct, and a conductivity σ adds
//! σ/(2πfε₀) to ε″ (Komarov, Wang & Tang 2005; shared/reference/physics.md §3.1). Salty foods
//! therefore absorb *more* as they warm, where pure water absorbs less.
//!
//! - Conductivity at 25 °C against salinity S (g of salt per kg of solution): Klein & Swift (1977),
//!   "An improved model for the dielectric constant of sea water at microwave frequencies", IEEE
//!   Trans. Antennas Propag. AP-25(1):104–111, after Stogryn (1971). Their polynomial holds to
//!   about 100 g/kg; saltier brine (deep in the freezing range) is taken at 100 g/kg, which
//!   understates its loss — the frozen part then warms more slowly, the cautious side for a
//!   coldest-point verdict.
//! - Temperature up to 35 °C: Klein & Swift's factor e^(−Δβ), Δ = 25 − t.
//! - Above 35 °C, where their fit runs away: Walden's rule (ionic conductivity × solvent viscosity
//!   is constant), σ(t) = σ(35 °C)·η(35 °C)/η(t), with the water viscosity of [`viscosity`].
//! - The static permittivity falls with salt: Klein & Swift's factor a(S, t), applied to at most
//!   40 g/kg, the range it was fitted over.

/// Permittivity of vacuum, F/m (CODATA 2018).
pub const VACUUM_PERMITTIVITY: f64 = 8.854_187_812_8e-12;

/// Highest salinity the conductivity polynomial is used at, g/kg.
const MAX_SALINITY: f64 = 100.0;
/// Highest salinity the permittivity factor is used at, g/kg.
const MAX_SALINITY_FACTOR: f64 = 40.0;
/// Top of Klein & Swift's temperature fit, °C.
const TOP_OF_FIT: f64 = 35.0;

/// Viscosity of liquid water at `t` °C, Pa·s: the Vogel-type fit η = 2.414e-5·10^(247.8/(T − 140)),
/// T in kelvin, common in engineering texts (recalled from memory; checked against IAPWS values in
/// the tests). Evaluated no colder than −30 °C.
pub fn viscosity(t: f64) -> f64 {
    let kelvin = t.max(-30.0) + 273.15;
    2.414e-5 * 10f64.powf(247.8 / (kelvin - 140.0))
}

/// Conductivity of a sodium-chloride brine of `salinity` g/kg at `t` °C, S/m (see the module notes).
pub fn conductivity(salinity: f64, t: f64) -> f64 {
    let s = salinity.clamp(0.0, MAX_SALINITY);
    let at_25 = s * (0.182521 - 1.46192e-3 * s + 2.09324e-5 * s * s - 1.28205e-7 * s * s * s);
    let klein_swift = |t: f64| {
        let delta = 25.0 - t;
        let beta = 2.0333e-2 + 1.266e-4 * delta + 2.464e-6 * delta * delta
            - s * (1.849e-5 - 2.551e-7 * delta + 2.551e-8 * delta * delta);
        at_25 * (-delta * beta).exp()
    };
    if t <= TOP_OF_FIT {
        klein_swift(t)
    } else {
        klein_swift(TOP_OF_FIT) * viscosity(TOP_OF_FIT) / viscosity(t)
    }
}

/// Factor by which salt lowers water's static permittivity, Klein & Swift (1977):
/// a = 1 + 1.613e-5·S·t − 3.656e-3·S + 3.210e-5·S² − 4.232e-7·S³.
pub fn permittivity_factor(salinity: f64, t: f64) -> f64 {
    let s = salinity.clamp(0.0, MAX_SALINITY_FACTOR);
    1.0 + 1.613e-5 * s * t.clamp(0.0, 100.0) - 3.656e-3 * s + 3.210e-5 * s * s
        - 4.232e-7 * s * s * s
}

/// Loss factor ε″ a conductivity `sigma` (S/m) adds at frequency `f` (Hz): σ/(2πfε₀).
pub fn ionic_loss(sigma: f64, f: f64) -> f64 {
    sigma / (2.0 * std::f64::consts::PI * f * VACUUM_PERMITTIVITY)
}
