//! Dielectric properties at 2.45 GHz: how strongly a food absorbs, from its composition and
//! temperature, and what that means for power entering it.
//!
//! - [`water`](water()): pure water, Ellison (2007);
//! - `brine`: the ionic loss of dissolved salts, Klein & Swift (1977) and Walden's rule;
//! - `mixture`: a food as liquid, ice, fat and solids mixed by Looyenga (1965) — [`food`];
//! - this module: [`Permittivity`], its penetration depth and surface transmission, and
//!   [`LossClass`], the coarse tag recorded loads are matched by.
//!
//! Measured food values the model is checked against (shared/reference/physics.md §3.3): beef,
//! Bengtsson & Risman (1971) at 2.8 GHz and To et al. (1974) at 2.45 GHz; fruits and vegetables,
//! Datta & Ramaswamy (2001); ham at −10 °C, Sipahioglu et al. (2003).

mod brine;
mod mixture;
mod water;

pub use brine::{
    VACUUM_PERMITTIVITY, conductivity as brine_conductivity, viscosity as water_viscosity,
};
pub use mixture::{brine_permittivity, food, ice, looyenga, salinity};
pub use water::{static_permittivity as water_static_permittivity, water};

/// Loss factor ε″ of a food's dry solids at 2.45 GHz, and so of the residue a cell leaves once
/// its water has evaporated.
///
/// An assumption: dried food solids are low-loss dielectrics, taken at the value Datta & Ramaswamy
/// (2001) give for solid milk fat at 2.45 GHz (ε′ 2.6, ε″ 0.2; shared/reference/physics.md §3.3),
/// the same order as the fats-and-oils value (ε″ ≈ 0.15). No measured value for dried mixed food
/// solids was found; the point is that a dried cell absorbs one to two orders of magnitude less
/// than the moist food, not the exact figure.
pub const DRY_RESIDUE_LOSS: f64 = 0.2;

/// Oven frequency, Hz (the 2.45 GHz ISM band every value here is quoted at).
pub const FREQUENCY_HZ: f64 = 2.45e9;

/// Speed of light in vacuum, m/s (exact, SI).
const LIGHT_SPEED: f64 = 299_792_458.0;

/// A relative permittivity ε′ − jε″.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Permittivity {
    /// Dielectric constant ε′.
    pub constant: f64,
    /// Loss factor ε″ (≥ 0).
    pub loss: f64,
}

impl Permittivity {
    /// Power penetration depth, m ([`penetration_depth`]).
    pub fn penetration_depth(self) -> f64 {
        penetration_depth(self.constant, self.loss)
    }

    /// Share of a plane wave's power that enters the material from air at normal incidence,
    /// 1 − |Γ|² with Γ = (1 − √ε)/(1 + √ε) (Fresnel; e.g. von Hippel 1954).
    pub fn transmission(self) -> f64 {
        let root = num_complex::Complex64::new(self.constant, -self.loss).sqrt();
        let gamma = (1.0 - root) / (1.0 + root);
        1.0 - gamma.norm_sqr()
    }
}

/// Power penetration depth D_p (m): the depth at which the power of a plane wave entering a thick
/// layer of material with relative permittivity ε′ − jε″ has fallen to 1/e, at [`FREQUENCY_HZ`].
///
/// The exact expression from the attenuation constant (von Hippel 1954; Metaxas & Meredith 1983;
/// shared/reference/physics.md §3.1): α = (2π/λ₀)·√((ε′/2)·(√(1 + (ε″/ε′)²) − 1)), D_p = 1/(2α).
/// Infinite for a lossless material (ε″ = 0).
pub fn penetration_depth(constant: f64, loss: f64) -> f64 {
    let lambda0 = LIGHT_SPEED / FREQUENCY_HZ;
    let tan = loss / constant;
    let alpha = 2.0 * std::f64::consts::PI / lambda0
        * (constant / 2.0 * ((1.0 + tan * tan).sqrt() - 1.0)).sqrt();
    if alpha > 0.0 {
        1.0 / (2.0 * alpha)
    } else {
        f64::INFINITY
    }
}

/// A coarse tag for how a food absorbs: what recorded loads' layouts are matched by. The physics
/// itself comes from the composition ([`food`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum LossClass {
    /// Meat, poultry, fish: high loss thawed, brine-dominated when frozen.
    Meat,
    /// Vegetables, fruit, cooked starches: watery.
    Watery,
    /// Cured or salted foods: ionic loss, higher when frozen than meat.
    Salty,
    /// Fat-dominated foods: low loss.
    Fatty,
}

impl LossClass {
    /// Every class.
    pub const ALL: [LossClass; 4] = [
        LossClass::Meat,
        LossClass::Watery,
        LossClass::Salty,
        LossClass::Fatty,
    ];

    /// Short lower-case name, used in files.
    pub fn as_str(self) -> &'static str {
        match self {
            LossClass::Meat => "meat",
            LossClass::Watery => "watery",
            LossClass::Salty => "salty",
            LossClass::Fatty => "fatty",
        }
    }

    /// Parses [`LossClass::as_str`].
    pub fn parse(s: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|c| c.as_str() == s)
    }
}
