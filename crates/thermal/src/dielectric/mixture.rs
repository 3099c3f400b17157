//! A food's permittivity from its composition and temperature: the food is a mixture of a liquid
//! phase (its unfrozen water with the dissolved salts), ice, fat and the other dry solids, combined by the Looyenga (1965) rule, ε^(1/3) = Σ vᵢ·εᵢ^(1/3) over volume fractions
//! vᵢ (Looyenga, "Dielectric constants of heterogeneous mixtures", Physica 31:401–406).
//!
//! The phases, after Mudgett's (1986) water-plus-ions picture of food dielectrics:
//! - **liquid:** all water not frozen, including the unfreezable (bound) water, by Ellison (2007)
//!   ([`super::water`]), its ash taken as dissolved sodium chloride at the salinity it has in that
//!   water ([`super::brine`]). Ash as NaCl is an
//!   assumption of this model: real ash is a mix of potassium, sodium and other salts of similar
//!   molar conductivity. Freezing concentrates the brine, which is why frozen foods absorb far
//!   more than pure ice (shared/reference/physics.md §3.3);
//! - **ice:** ε′ = 3.1884 + 9.1e-4·t (Mätzler & Wegmüller 1987) and ε″ = 3e-4 (Mätzler 2006
//!   gives 2–5e-4 between −20 and −1 °C);
//! - **fat:** ε′ 2.5, ε″ 0.15 (Pace, Westphal & Goldblith 1968; typical values recalled from
//!   memory);
//! - **other solids** (protein, carbohydrate, fibre): ε′ 2.6, ε″ [`DRY_RESIDUE_LOSS`], the solid
//!   milk-fat value of Datta & Ramaswamy (2001) — an assumption, no measured value for dried mixed
//!   food solids having been found.
//!
//! Volumes use the Choi–Okos densities at the same temperature. Against measured foods (tests):
//! thawed meat and vegetables within about 25 %; frozen foods' loss is understated by up to about
//! half, so a frozen core is predicted to warm more slowly than it does — the cautious side for a
//! coldest-point verdict.

use num_complex::Complex64;

use super::{DRY_RESIDUE_LOSS, FREQUENCY_HZ, Permittivity, brine, water};
use crate::choi_okos::Component;
use crate::composition::Composition;

/// Fat at 2.45 GHz (Pace, Westphal & Goldblith 1968, typical values; from memory).
const FAT: Permittivity = Permittivity {
    constant: 2.5,
    loss: 0.15,
};
/// Protein, carbohydrate and fibre (see the module notes).
const SOLIDS: Permittivity = Permittivity {
    constant: 2.6,
    loss: DRY_RESIDUE_LOSS,
};

/// Ice at 2.45 GHz and `t` °C (Mätzler & Wegmüller 1987 for ε′; ε″ see the module notes).
pub fn ice(t: f64) -> Permittivity {
    Permittivity {
        constant: 3.1884 + 9.1e-4 * t.min(0.0),
        loss: 3e-4,
    }
}

/// Salinity of the free water, g of salt per kg of brine, when the ash dissolves in `liquid`
/// (mass fractions).
pub fn salinity(ash: f64, liquid: f64) -> f64 {
    if ash <= 0.0 {
        0.0
    } else {
        1000.0 * ash / (liquid + ash)
    }
}

/// The liquid phase: water at `t` °C with salt at `salinity` g/kg.
pub fn brine_permittivity(salinity: f64, t: f64) -> Permittivity {
    let w = water::water(t);
    Permittivity {
        constant: w.constant * brine::permittivity_factor(salinity, t),
        loss: w.loss + brine::ionic_loss(brine::conductivity(salinity, t), FREQUENCY_HZ),
    }
}

/// Permittivity of a food of composition `comp` at `t` °C with `ice` mass fraction frozen.
pub fn food(comp: &Composition, t: f64, ice: f64) -> Permittivity {
    let ice = ice.clamp(0.0, comp.water);
    let liquid = comp.water - ice;
    let vol = |c: Component, x: f64| x / c.density(t);
    let mut phases: Vec<(f64, Permittivity)> = vec![
        (vol(Component::Ice, ice), self::ice(t)),
        (vol(Component::Fat, comp.fat), FAT),
        (
            vol(Component::Protein, comp.protein)
                + vol(Component::Carbohydrate, comp.carbohydrate)
                + vol(Component::Fiber, comp.fiber),
            SOLIDS,
        ),
    ];
    if liquid > 0.0 {
        phases.push((
            vol(Component::Water, liquid) + vol(Component::Ash, comp.ash),
            brine_permittivity(salinity(comp.ash, liquid), t),
        ));
    } else {
        phases.push((vol(Component::Ash, comp.ash), SOLIDS));
    }
    looyenga(&phases)
}

/// The Looyenga (1965) mixture of `phases` (volume, permittivity); volumes need not be normalised.
pub fn looyenga(phases: &[(f64, Permittivity)]) -> Permittivity {
    let total: f64 = phases.iter().map(|(v, _)| v).sum();
    let root: Complex64 = phases
        .iter()
        .filter(|(v, _)| *v > 0.0)
        .map(|(v, p)| Complex64::new(p.constant, -p.loss).cbrt() * (v / total))
        .sum();
    let mix = root * root * root;
    Permittivity {
        constant: mix.re,
        loss: -mix.im,
    }
}
