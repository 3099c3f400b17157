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
