//! The composition-based dielectric model against outside values: the Ellison (2007) water table
//! and penetration depths in shared/reference/physics.md §3.2, the Liebe, Hufford & Manabe (1991)
//! water model, the conductivity of standard seawater, IAPWS water viscosity, and measured food
//! permittivities (physics.md §3.3).

use traycast_thermal::catalogue;
use traycast_thermal::composition::Composition;
use traycast_thermal::dielectric::{
    Permittivity, brine_conductivity, food, water, water_viscosity,
};
use traycast_thermal::material::Material;

/// Ellison (2007) at 2.45 GHz, tabulated in shared/reference/physics.md §3.2 (computed by the
/// reference's author from the published coefficients, two decimals): t, ε′, ε″, D_p (cm).
const ELLISON_TABLE: [(f64, f64, f64, f64); 5] = [
    (0.0, 81.88, 21.23, 0.84),
    (20.0, 78.58, 10.80, 1.60),
    (40.0, 72.62, 6.13, 2.71),
    (70.0, 63.69, 3.10, 5.02),
    (100.0, 55.67, 1.80, 8.06),
];

#[test]
fn water_follows_the_published_ellison_table() {
    for (t, eps, loss, dp) in ELLISON_TABLE {
        let w = water(t);
        assert!(
            (w.constant - eps).abs() < 0.01,
            "ε′ at {t} °C: {}",
            w.constant
        );
        assert!((w.loss - loss).abs() < 0.01, "ε″ at {t} °C: {}", w.loss);
        let got = w.penetration_depth() * 100.0;
        assert!((got - dp).abs() < 0.006, "D_p at {t} °C: {got}");
    }
}

/// A second, independent water model: Liebe, Hufford & Manabe (1991), double Debye, valid
/// 270–310 K (its formula as printed in physics.md §3.2 — the other model's coefficients, not
/// ours). The two agree within 3 % on ε″ inside that range.
#[test]
fn water_agrees_with_the_liebe_model() {
    for t in [0.0, 10.0, 20.0, 30.0] {
        let theta = 1.0 - 300.0 / (t + 273.15);
        let e0 = 77.66 - 103.3 * theta;
        let (e1, e2) = (0.0671 * e0, 3.52 + 7.52 * theta);
        let g1 = 20.20 + 146.4 * theta + 316.0 * theta * theta;
        let g2 = 39.8 * g1;
        let f = 2.45;
        let debye = |d: f64, g: f64| {
            let r = f / g;
            (d / (1.0 + r * r), d * r / (1.0 + r * r))
        };
        let (a1, b1) = debye(e1 - e2, g2);
        let (a0, b0) = debye(e0 - e1, g1);
        let (eps, loss) = (e2 + a1 + a0, b1 + b0);
        let w = water(t);
        assert!(
            (w.constant - eps).abs() / eps < 0.01,
            "ε′ at {t}: {} vs {eps}",
            w.constant
        );
        assert!(
            (w.loss - loss).abs() / loss < 0.03,
            "ε″ at {t}: {} vs {loss}",
            w.loss
        );
    }
}

/// Practical Salinity Scale 1978 (UNESCO 1981): standard seawater of salinity 35 at 15 °C has
/// conductivity 4.2914 S/m, the scale's defining value.
#[test]
fn brine_conductivity_matches_standard_seawater() {
    let s = brine_conductivity(35.0, 15.0);
    assert!((s - 4.2914).abs() / 4.2914 < 0.002, "{s}");
    // Salt conducts more when warm: the reason salty foods run away.
    assert!(brine_conductivity(35.0, 80.0) > 2.0 * brine_conductivity(35.0, 20.0));
}

/// Viscosity of water at 0.1 MPa, IAPWS 2008 formulation: 890.0 µPa·s at 25 °C and 281.8 µPa·s
/// at 100 °C (values recalled from memory, unconfirmed; the fit is used only as a ratio).
#[test]
fn water_viscosity_is_close_to_iapws() {
    for (t, want) in [(25.0, 890.0e-6), (100.0, 281.8e-6)] {
        let got = water_viscosity(t);
        assert!((got - want).abs() / want < 0.02, "{t} °C: {got}");
    }
}

/// Fresnel at normal incidence (e.g. Hecht, Optics): a lossless medium of index 2 (ε = 4) reflects
/// ((n − 1)/(n + 1))² = 1/9 of the power.
#[test]
fn transmission_follows_fresnel() {
    let p = Permittivity {
        constant: 4.0,
        loss: 0.0,
    };
    assert!((p.transmission() - 8.0 / 9.0).abs() < 1e-12);
}

/// Measured permittivities at 2.45 GHz (physics.md §3.3), against the model on the measured
/// food's composition. Thawed within 25 % (composition models reach about that; the measured
/// samples' own compositions were not published with them); frozen within a
/// factor of 2.5 on ε″ (the model understates it; see `dielectric` notes) and 25 % on ε′.
#[test]
fn foods_are_close_to_measured_values() {
    // Lean beef, 75 % water / 20 % protein / 4 % fat / 1 % ash (typical; physics.md §1.3(c)),
    // initial freezing point −1.7 °C (physics.md §5.1, lean beef sirloin).
    let beef = Composition::from_percent(75.0, 20.0, 4.0, 0.0, 0.0, 1.0, -1.7).unwrap();
    let carrot = catalogue::find("carrots").unwrap().composition();
    let ham = catalogue::find("ham").unwrap().composition();
    let at = |c: &Composition, t: f64| food(c, t, c.ice_fraction(t));
    // (what, model, measured ε′, measured ε″, source)
    let thawed = [
        ("beef 0 °C", at(&beef, 0.0), 47.8, 16.5), // Bengtsson & Risman 1971 (2.8 GHz)
        ("beef 5 °C", at(&beef, 5.0), 52.5, 17.5), // To et al. 1974
        ("carrot 20 °C", at(&carrot, 20.0), 56.0, 15.0), // Datta & Ramaswamy 2001
    ];
    for (what, p, eps, loss) in thawed {
        assert!(
            (p.constant - eps).abs() / eps < 0.25,
            "{what}: ε′ {}",
            p.constant
        );
        assert!((p.loss - loss).abs() / loss < 0.25, "{what}: ε″ {}", p.loss);
    }
    let frozen = [
        ("beef −10 °C", at(&beef, -10.0), 5.0, 2.0), // Bengtsson & Risman 1971
        ("beef −20 °C", at(&beef, -20.0), 4.0, 1.0), // Bengtsson & Risman 1971
        ("ham −10 °C", at(&ham, -10.0), 7.0, 3.0),   // Sipahioglu et al. 2003
    ];
    for (what, p, eps, loss) in frozen {
        assert!(
            (p.constant - eps).abs() / eps < 0.25,
            "{what}: ε′ {}",
            p.constant
        );
        assert!(
            p.loss > loss / 2.5 && p.loss < loss * 2.5,
            "{what}: ε″ {}",
            p.loss
        );
    }
}

/// Pure water absorbs less as it heats (ε″ falls about 10× from 0 to 100 °C, physics.md §3.2);
/// salty foods absorb more (Sipahioglu & Barringer 2003: the loss factor of ashy foods rises with
/// temperature).
#[test]
fn water_self_limits_and_salty_food_runs_away() {
    assert!(water(100.0).loss < water(0.0).loss / 10.0);
    let ham = catalogue::find("ham").unwrap().composition();
    assert!(food(&ham, 80.0, 0.0).loss > 1.5 * food(&ham, 20.0, 0.0).loss);
}

/// A frozen recording converts to the reference state by what each column lets in and keeps, not
/// by the bare loss-factor ratio, which overstates post-thaw heating several-fold (the frozen food
/// reflects less and has a far longer penetration depth).
#[test]
fn frozen_maps_convert_by_column_absorption() {
    let f = catalogue::find("chicken-breast").unwrap();
    let mat = Material::food(&f.composition()).unwrap();
    let thickness = 0.02;
    let ratio = mat.absorption_ratio(-18.0, thickness);
    let frozen = food(&f.composition(), -18.0, f.composition().ice_fraction(-18.0));
    let bare = frozen.loss / mat.reference.loss;
    assert!(ratio > 3.0 * bare, "column ratio {ratio}, bare {bare}");
    assert!(ratio < 1.0);
    assert!((mat.absorption_ratio(20.0, thickness) - 1.0).abs() < 1e-12);
}
