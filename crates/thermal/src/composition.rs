//! Food composition and the mixture rules that turn it into properties (ASHRAE Handbook –
//! Refrigeration 2006, ch. 9; Choi & Okos 1986), including ice below the initial freezing point.

use crate::choi_okos::Component;
use crate::error::{ThermalError, in_range};

/// Latent heat of fusion of water, kJ/kg (ASHRAE's L0).
pub const LATENT_FUSION: f64 = 333.6;
/// Latent heat of vaporisation of water at 100 °C and 1 atm, kJ/kg (steam tables give 2256.4).
pub const LATENT_VAPORISATION: f64 = 2257.0;
/// Boiling point at 1 atm, °C.
pub const BOILING_POINT: f64 = 100.0;

/// Mass fractions of a food (each 0…1, summing to 1 within ±0.02), and its initial freezing point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Composition {
    /// Water.
    pub water: f64,
    /// Protein.
    pub protein: f64,
    /// Fat.
    pub fat: f64,
    /// Carbohydrate, excluding fiber.
    pub carbohydrate: f64,
    /// Fiber.
    pub fiber: f64,
    /// Ash.
    pub ash: f64,
    /// Initial freezing point, °C (≤ 0).
    pub freezing_point: f64,
}

/// Thermal properties at one temperature.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Properties {
    /// Density, kg/m³.
    pub density: f64,
    /// Specific heat (sensible, no latent part), kJ/(kg·K).
    pub specific_heat: f64,
    /// Thermal conductivity (parallel model), W/(m·K).
    pub conductivity: f64,
    /// Thermal diffusivity k/(ρ·cp), m²/s.
    pub diffusivity: f64,
    /// Mass fraction of ice.
    pub ice: f64,
}

impl Composition {
    /// Builds and validates a composition from mass percentages (as food tables print them).
    /// `carbohydrate` is the carbohydrate excluding fiber.
    pub fn from_percent(
        water: f64,
        protein: f64,
        fat: f64,
        carbohydrate: f64,
        fiber: f64,
        ash: f64,
        freezing_point: f64,
    ) -> Result<Self, ThermalError> {
        let c = Composition {
            water: water / 100.0,
            protein: protein / 100.0,
            fat: fat / 100.0,
            carbohydrate: carbohydrate / 100.0,
            fiber: fiber / 100.0,
            ash: ash / 100.0,
            freezing_point,
        };
        c.validate()?;
        Ok(c)
    }

    /// Checks fractions are in [0, 1], sum to 1 ± 0.02, and the freezing point is in [−40, 0] °C.
    pub fn validate(&self) -> Result<(), ThermalError> {
        let named = [
            ("water", self.water),
            ("protein", self.protein),
            ("fat", self.fat),
            ("carbohydrate", self.carbohydrate),
            ("fiber", self.fiber),
            ("ash", self.ash),
        ];
        for (component, value) in named {
            if !value.is_finite() || !(0.0..=1.0).contains(&value) {
                return Err(ThermalError::BadFraction { component, value });
            }
        }
        let sum: f64 = named.iter().map(|(_, v)| v).sum();
        if (sum - 1.0).abs() > 0.02 {
            return Err(ThermalError::FractionSum { sum });
        }
        in_range(
            "initial freezing point (°C)",
            self.freezing_point,
            -40.0,
            0.0,
            "−40 to 0 °C",
        )?;
        Ok(())
    }

    /// Solids fraction 1 − x_w.
    pub fn solids(&self) -> f64 {
        1.0 - self.water
    }

    /// Bound (non-freezable) water, x_b ≈ 0.4·x_protein (Schwartzberg 1976; ASHRAE Eq. 3).
    pub fn bound_water(&self) -> f64 {
        (0.4 * self.protein).min(self.water)
    }

    /// Ice mass fraction at `t` °C: Tchigeov (1979), ASHRAE Eq. 5, capped at the freezable water.
    /// Pure water (no solids) freezes sharply at its freezing point and is not covered by this rule.
    pub fn ice_fraction(&self, t: f64) -> f64 {
        if t >= self.freezing_point {
            return 0.0;
        }
        let ice = 1.105 * self.water / (1.0 + 0.7138 / (self.freezing_point - t + 1.0).ln());
        ice.min(self.water - self.bound_water()).max(0.0)
    }

    /// Component fractions at `t` °C with water split into liquid and ice.
    pub fn fractions(&self, t: f64) -> [(Component, f64); 7] {
        let ice = self.ice_fraction(t);
        [
            (Component::Water, self.water - ice),
            (Component::Ice, ice),
            (Component::Protein, self.protein),
            (Component::Fat, self.fat),
            (Component::Carbohydrate, self.carbohydrate),
            (Component::Fiber, self.fiber),
            (Component::Ash, self.ash),
        ]
    }

    /// Density, specific heat, conductivity and diffusivity at `t` °C.
    pub fn properties(&self, t: f64) -> Properties {
        let mut p = mixture(&self.fractions(t), t);
        p.ice = self.ice_fraction(t);
        p
    }

    /// Latent heat as ASHRAE Table 3 tabulates it: 334·x_w kJ/kg.
    pub fn latent_heat_table3(&self) -> f64 {
        334.0 * self.water
    }
}

/// Mixture rules for arbitrary component fractions at `t` °C (ASHRAE 2006 ch. 9): mass-weighted cp,
/// volume-additive density, parallel-model conductivity, α = k/(ρ·cp). The fractions are used as
/// given (ASHRAE's Table 3 recipe counts fiber twice, so its fractions sum slightly above 1).
pub fn mixture(fractions: &[(Component, f64)], t: f64) -> Properties {
    let cp: f64 = fractions.iter().map(|(c, x)| x * c.specific_heat(t)).sum();
    let spec_vol: f64 = fractions.iter().map(|(c, x)| x / c.density(t)).sum();
    let density = 1.0 / spec_vol;
    let conductivity: f64 = fractions
        .iter()
        .map(|(c, x)| (x / c.density(t)) / spec_vol * c.conductivity(t))
        .sum();
    Properties {
        density,
        specific_heat: cp,
        conductivity,
        diffusivity: conductivity / (density * cp * 1000.0),
        ice: fractions
            .iter()
            .filter(|(c, _)| *c == Component::Ice)
            .map(|(_, x)| *x)
            .sum(),
    }
}
