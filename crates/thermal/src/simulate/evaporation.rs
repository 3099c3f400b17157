//! Evaporation from an uncovered food surface below boiling.
//!
//! A moist surface loses water vapour to the cavity air at a rate set by the same boundary layer
//! that sets its convective loss. By the Chilton–Colburn analogy between heat and mass transfer
//! (Incropera et al., *Fundamentals of Heat and Mass Transfer*, §6.7) the mass-transfer
//! coefficient is h_m = h / (ρ_air · cp_air · Le^(2/3)), and the vapour flux is
//! m″ = h_m · M_w/(R · T_film) · (p_sat(T_surface) − φ · p_sat(T_air)) kg/(m²·s), with φ the
//! air's relative humidity. It carries away m″ · L(T) of heat. Condensation onto a colder
//! surface is not modelled (the flux is never negative).
//!
//! - p_sat: the Magnus form of Alduchov & Eskridge (1996), 610.94·e^(17.625·t/(t + 243.04)) Pa;
//! - L(t) = 2501 − 2.361·t kJ/kg, the usual linear fit to the steam tables (e.g. Rogers & Yau,
//!   *A Short Course in Cloud Physics*; from memory);
//! - Le = 0.85 for water vapour in air (D ≈ 0.26 cm²/s against α ≈ 0.22 cm²/s near 25 °C,
//!   Incropera Table A.8; from memory); cp_air = 1006 J/(kg·K); air as an ideal gas at 1 atm.

/// Universal gas constant, J/(mol·K) (exact, SI 2019).
const GAS_CONSTANT: f64 = 8.314_462_618;
/// Molar mass of water, kg/mol.
const WATER_MOLAR_MASS: f64 = 0.018_015;
/// Molar mass of dry air, kg/mol.
const AIR_MOLAR_MASS: f64 = 0.028_965;
/// Atmospheric pressure, Pa.
const ATMOSPHERE: f64 = 101_325.0;
/// Specific heat of air, J/(kg·K).
const AIR_CP: f64 = 1006.0;
/// Lewis number of water vapour in air.
const LEWIS: f64 = 0.85;

/// Saturation vapour pressure over liquid water at `t` °C, Pa (Magnus form, Alduchov & Eskridge
/// 1996), never above one atmosphere.
pub fn saturation_pressure(t: f64) -> f64 {
    (610.94 * (17.625 * t / (t + 243.04)).exp()).min(ATMOSPHERE)
}

/// Latent heat of vaporisation at `t` °C, kJ/kg.
pub fn latent_heat(t: f64) -> f64 {
    2501.0 - 2.361 * t
}

/// Vapour flux from a wet surface at `surface` °C into air at `air` °C and relative humidity
/// `humidity`, with convective coefficient `h` W/(m²·K): kg/(m²·s), never negative.
pub fn flux(h: f64, surface: f64, air: f64, humidity: f64) -> f64 {
    let film = 0.5 * (surface + air) + 273.15;
    let rho_air = ATMOSPHERE * AIR_MOLAR_MASS / (GAS_CONSTANT * film);
    let h_m = h / (rho_air * AIR_CP * LEWIS.powf(2.0 / 3.0));
    let drive = saturation_pressure(surface) - humidity * saturation_pressure(air);
    (h_m * WATER_MOLAR_MASS / (GAS_CONSTANT * film) * drive).max(0.0)
}
