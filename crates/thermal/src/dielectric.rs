//! Dielectric loss classes at 2.45 GHz: how strongly a food absorbs when thawed and when frozen.
//!
//! Values (ε′ / ε″) are published measurements, quoted in shared/reference/physics.md §3.3:
//! beef, Bengtsson & Risman (1971) at 2.8 GHz (0 °C 47.8/16.5, −20 °C 4/1), via the review table in
//! J Food Sci Technol 48(4):387–411 (2011); fruits and vegetables, Datta & Ramaswamy (2001) at room
//! temperature; ham at −10 °C, Sipahioglu et al. (2003) 7/3. Fats and oils: ε′ ≈ 2.5, ε″ ≈ 0.15 at
//! 25 °C (Pace, Westphal & Goldblith 1968 — typical values recalled from memory, unconfirmed).
//! Frozen vegetables have no measured value in those sources; we assume the beef ratio (about 1/16).

/// Loss factor ε″ of a food's dry residue once its water has evaporated, at 2.45 GHz.
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

/// How a food absorbs microwave power.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
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

/// Loss factors (ε″) and dielectric constants (ε′) of a class.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LossFactors {
    /// ε″ thawed, near 0–20 °C.
    pub thawed: f64,
    /// ε″ fully frozen (around −20 °C).
    pub frozen: f64,
    /// ε′ thawed.
    pub constant_thawed: f64,
    /// ε′ frozen.
    pub constant_frozen: f64,
}

impl LossClass {
    /// Every class.
    pub const ALL: [LossClass; 4] = [
        LossClass::Meat,
        LossClass::Watery,
        LossClass::Salty,
        LossClass::Fatty,
    ];

    /// The class's loss factors.
    pub fn factors(self) -> LossFactors {
        match self {
            // Beef 0 °C 47.8/16.5, −20 °C 4/1 (Bengtsson & Risman 1971).
            LossClass::Meat => LossFactors {
                thawed: 16.5,
                frozen: 1.0,
                constant_thawed: 47.8,
                constant_frozen: 4.0,
            },
            // Carrot 56/15 (Datta & Ramaswamy 2001); frozen assumed at the beef values' ratios.
            LossClass::Watery => LossFactors {
                thawed: 15.0,
                frozen: 15.0 / 16.5,
                constant_thawed: 56.0,
                constant_frozen: 4.7,
            },
            // Ham −10 °C: 7/3 (Sipahioglu et al. 2003); thawed taken as beef at +5 °C, 52.5/17.5 (To et al. 1974).
            LossClass::Salty => LossFactors {
                thawed: 17.5,
                frozen: 3.0,
                constant_thawed: 52.5,
                constant_frozen: 7.0,
            },
            LossClass::Fatty => LossFactors {
                thawed: 0.15,
                frozen: 0.15,
                constant_thawed: 2.5,
                constant_frozen: 2.5,
            },
        }
    }

    /// Power penetration depth of the thawed food, m ([`penetration_depth`] of the thawed ε′, ε″).
    pub fn penetration_depth(self) -> f64 {
        let f = self.factors();
        penetration_depth(f.constant_thawed, f.thawed)
    }

    /// Absorption relative to the thawed state, for a fraction `unfrozen` (0…1) of the freezable
    /// water liquid: loss interpolated linearly between frozen and thawed.
    pub fn absorption_ratio(self, unfrozen: f64) -> f64 {
        let f = self.factors();
        (f.frozen + (f.thawed - f.frozen) * unfrozen.clamp(0.0, 1.0)) / f.thawed
    }

    /// Absorption of the dry residue a cell of this class leaves once all its water has boiled
    /// off, relative to the thawed food, for a food with `solids` mass fraction of dry matter: the
    /// residue's loss factor ([`DRY_RESIDUE_LOSS`], never above the class's own) over the thawed
    /// one, times the share of the original material that remains.
    pub fn dry_ratio(self, solids: f64) -> f64 {
        let f = self.factors();
        DRY_RESIDUE_LOSS.min(f.thawed) / f.thawed * solids.clamp(0.0, 1.0)
    }

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
