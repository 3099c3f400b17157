//! Food properties against published check values (shared/reference/physics.md §1.3).

use traycast_thermal::catalogue::CATALOGUE;
use traycast_thermal::choi_okos::Component;
use traycast_thermal::composition::{Composition, mixture};
use traycast_thermal::material::Material;

fn close(a: f64, b: f64, tol: f64, what: &str) {
    assert!((a - b).abs() <= tol, "{what}: {a} vs {b} (tol {tol})");
}

/// Choi & Okos (1986) component polynomials, as reprinted in ASHRAE Refrigeration (2006) ch. 9
/// Table 1; values recomputed from the table (physics.md §1.3 (a)).
#[test]
fn pure_components_match_choi_okos_check_values() {
    let water = [
        (0.0, 4.1762, 997.18, 0.5711),
        (20.0, 4.1766, 995.74, 0.6037),
        (25.0, 4.1773, 994.91, 0.6110),
        (50.0, 4.1853, 987.94, 0.6425),
        (100.0, 4.2218, 959.92, 0.6803),
    ];
    for (t, cp, rho, k) in water {
        close(Component::Water.specific_heat(t), cp, 6e-5, "water cp");
        close(Component::Water.density(t), rho, 6e-3, "water ρ");
        close(Component::Water.conductivity(t), k, 6e-5, "water k");
    }
    close(Component::Ice.specific_heat(0.0), 2.0623, 1e-4, "ice cp 0");
    close(Component::Ice.conductivity(0.0), 2.2196, 1e-4, "ice k 0");
    close(
        Component::Ice.specific_heat(-10.0),
        2.0015,
        1e-4,
        "ice cp −10",
    );
    close(
        Component::Ice.conductivity(-10.0),
        2.2922,
        1e-4,
        "ice k −10",
    );
    close(Component::Ice.density(0.0), 916.89, 0.01, "ice ρ");
    for (c, cp, k, rho) in [
        (Component::Protein, 2.0319, 0.2016, 1319.5),
        (Component::Fat, 2.0117, 0.1751, 917.2),
        (Component::Carbohydrate, 1.5857, 0.2274, 1592.9),
    ] {
        close(c.specific_heat(20.0), cp, 1e-4, "cp 20 °C");
        close(c.conductivity(20.0), k, 1e-4, "k 20 °C");
        close(c.density(20.0), rho, 0.06, "ρ 20 °C");
    }
}

/// ASHRAE Handbook – Refrigeration (2006) ch. 9 Table 3, "specific heat above freezing" and "latent
/// heat" columns, reproduced by Choi–Okos cp at 20 °C with the table's total carbohydrate plus its
/// fiber counted again (the recipe in physics.md §1.3 (b)) to ±0.01 kJ/(kg·K); latent = 334·x_w.
#[test]
fn ashrae_table3_specific_heats_and_latent_heats() {
    // water, protein, fat, carb total, fiber, ash, cp above, latent
    let rows = [
        (
            "Artichoke, globe",
            [84.94, 3.27, 0.15, 10.51, 5.40, 1.13],
            3.90,
            284.0,
        ),
        (
            "Asparagus",
            [92.40, 2.28, 0.20, 4.54, 2.10, 0.57],
            4.03,
            309.0,
        ),
        (
            "Beans, snap",
            [90.27, 1.82, 0.12, 7.14, 3.40, 0.66],
            3.99,
            302.0,
        ),
        (
            "Beans, lima",
            [70.24, 6.84, 0.86, 20.16, 4.90, 1.89],
            3.52,
            235.0,
        ),
        ("Beets", [87.58, 1.61, 0.17, 9.56, 2.80, 1.08], 3.91, 293.0),
        (
            "Broccoli",
            [90.69, 2.98, 0.35, 5.24, 3.00, 0.92],
            4.01,
            303.0,
        ),
        (
            "Carrots",
            [87.79, 1.03, 0.19, 10.14, 3.00, 0.87],
            3.92,
            293.0,
        ),
        (
            "Cucumbers",
            [96.01, 0.69, 0.13, 2.76, 0.80, 0.41],
            4.09,
            321.0,
        ),
        (
            "Garlic",
            [58.58, 6.36, 0.50, 33.07, 2.10, 1.50],
            3.17,
            196.0,
        ),
        (
            "Corn, sweet yellow",
            [75.96, 3.22, 1.18, 19.02, 2.70, 0.62],
            3.62,
            254.0,
        ),
        (
            "Lettuce, iceberg",
            [95.89, 1.01, 0.19, 2.09, 1.40, 0.48],
            4.09,
            320.0,
        ),
    ];
    for (name, p, cp_table, latent) in rows {
        let fr = [
            (Component::Water, p[0] / 100.0),
            (Component::Protein, p[1] / 100.0),
            (Component::Fat, p[2] / 100.0),
            (Component::Carbohydrate, p[3] / 100.0),
            (Component::Fiber, p[4] / 100.0),
            (Component::Ash, p[5] / 100.0),
        ];
        let cp = mixture(&fr, 20.0).specific_heat;
        close(cp, cp_table, 0.0101, name);
        let comp = Composition {
            water: p[0] / 100.0,
            protein: 0.0,
            fat: 0.0,
            carbohydrate: 0.0,
            fiber: 0.0,
            ash: 0.0,
            freezing_point: -1.0,
        };
        close(comp.latent_heat_table3().round(), latent, 0.0, name);
    }
}

/// Mixture values with carbohydrate split into (total − fiber) + fiber and the parallel k model
/// (physics.md §1.3 (c), derived from the Choi–Okos table).
#[test]
fn mixture_properties_match_derived_values() {
    let carrots = Composition::from_percent(87.79, 1.03, 0.19, 7.14, 3.00, 0.87, -1.4).unwrap();
    let cucumbers = Composition::from_percent(96.01, 0.69, 0.13, 1.96, 0.80, 0.41, -0.5).unwrap();
    let meat = Composition::from_percent(75.0, 20.0, 4.0, 0.0, 0.0, 1.0, -1.7).unwrap();
    let starch = Composition::from_percent(70.0, 0.0, 0.0, 30.0, 0.0, 0.0, -1.0).unwrap();
    let cases = [
        (carrots, 0.0, 3.8662, 1040.26, 0.5398, 1.342e-7),
        (carrots, 20.0, 3.8708, 1038.47, 0.5716, 1.422e-7),
        (cucumbers, 20.0, 4.0773, 1009.09, 0.5934, 1.442e-7),
        (meat, 20.0, 3.6306, 1049.84, 0.5190, 1.362e-7),
        (starch, 20.0, 3.3993, 1121.92, 0.5242, 1.374e-7),
    ];
    for (c, t, cp, rho, k, alpha) in cases {
        let p = c.properties(t);
        close(p.specific_heat, cp, 2e-4, "cp");
        close(p.density, rho, 0.02, "ρ");
        close(p.conductivity, k, 2e-4, "k");
        close(p.diffusivity, alpha, 1e-10, "α");
    }
}

/// Tchigeov (1979) ice fraction, ASHRAE Eq. 5, for carrots (physics.md §1.3 (d)).
#[test]
fn ice_fraction_of_carrots() {
    let carrots = Composition::from_percent(87.79, 1.03, 0.19, 7.14, 3.00, 0.87, -1.4).unwrap();
    for (t, ice) in [
        (-2.0, 0.3851),
        (-5.0, 0.6609),
        (-10.0, 0.7374),
        (-20.0, 0.7824),
    ] {
        close(carrots.ice_fraction(t), ice, 1e-4, "ice fraction");
    }
    assert_eq!(carrots.ice_fraction(-1.0), 0.0);
}

/// ASHRAE 2006 frozen-food enthalpy (Schwartzberg form, reference −40 °C) and Chang & Tao (1981) at
/// the freezing point, as published formulas; checked against the derived values for carrots in
/// physics.md §1.3 (d).
fn schwartzberg(xw: f64, xp: f64, tf: f64, t: f64) -> f64 {
    let (tr, l0) = (-40.0, 333.6);
    let xs = 1.0 - xw;
    let xb = 0.4 * xp;
    (t - tr) * (1.55 + 1.26 * xs - (xw - xb) * l0 * tf / (tr * t))
}

#[test]
fn ashrae_enthalpy_formulas_reproduce_their_check_values() {
    let (xw, xp, tf) = (0.8779, 0.0103, -1.4);
    close(schwartzberg(xw, xp, tf, -5.0), 131.05, 0.01, "H(−5)");
    close(schwartzberg(xw, xp, tf, -10.0), 81.72, 0.01, "H(−10)");
    close(schwartzberg(xw, xp, tf, -20.0), 44.28, 0.01, "H(−20)");
    close(9.79246 + 405.096 * xw, 365.43, 0.01, "Chang–Tao H(t_f)");
}

/// Our enthalpy is built from the components (so it is continuous through freezing, with Kirchhoff's
/// latent heat). Both it and ASHRAE's correlations are zero at −40 °C; ASHRAE's are empirical fits
/// (Schwartzberg frozen form; Chang & Tao at t_f; Chen's cp above), so agreement is to a tolerance:
/// 13 % in the frozen range, 5 % at and above the freezing point.
#[test]
fn enthalpy_model_is_continuous_monotonic_and_close_to_ashrae() {
    let carrots = Composition::from_percent(87.79, 1.03, 0.19, 7.14, 3.00, 0.87, -1.4).unwrap();
    let mat = Material::food(&carrots).unwrap();
    for t in [-20.0, -10.0, -5.0] {
        let (ours, theirs) = (mat.enthalpy(t), schwartzberg(0.8779, 0.0103, -1.4, t));
        assert!(
            (ours / theirs - 1.0).abs() < 0.13,
            "H({t}): ours {ours} ASHRAE {theirs}"
        );
    }
    // Chang–Tao H_f = 365.43 and the unfrozen H(20 °C) = 449.06 (physics.md §1.3 (d)).
    for (t, theirs) in [(-1.4, 365.43), (20.0, 449.06)] {
        let ours = mat.enthalpy(t);
        assert!(
            (ours / theirs - 1.0).abs() < 0.05,
            "H({t}): ours {ours} ASHRAE {theirs}"
        );
    }
    let mut prev = mat.enthalpy(-40.0);
    let mut t = -39.998;
    while t < 99.9 {
        let h = mat.enthalpy(t);
        assert!(h > prev, "not increasing at {t}: {prev} then {h}");
        // No jump: the steepest part (just below t_f, where Tchigeov's dx_ice/dT ≈ 1.36 /K gives an
        // apparent cp ≈ 570 kJ/(kg·K)) moves less than 2 kJ/kg per 2 mK.
        assert!(h - prev < 2.0, "jump at {t}: {prev} then {h}");
        // The inverse returns the temperature.
        close(mat.temperature(h), t, 1e-6, "T(H(t))");
        prev = h;
        t += 0.002;
    }
}

#[test]
fn catalogue_compositions_are_valid_and_sourced() {
    for f in &CATALOGUE {
        let c = f.composition();
        assert!(!f.source.is_empty());
        Material::food(&c).unwrap();
    }
}

#[test]
fn bad_compositions_are_refused_with_a_reason() {
    use traycast_thermal::ThermalError;
    assert!(matches!(
        Composition::from_percent(80.0, -1.0, 0.0, 21.0, 0.0, 0.0, -1.0),
        Err(ThermalError::BadFraction {
            component: "protein",
            ..
        })
    ));
    assert!(matches!(
        Composition::from_percent(50.0, 10.0, 0.0, 10.0, 0.0, 0.0, -1.0),
        Err(ThermalError::FractionSum { .. })
    ));
    assert!(Composition::from_percent(f64::NAN, 0.0, 0.0, 100.0, 0.0, 0.0, -1.0).is_err());
    assert!(Composition::from_percent(100.0, 0.0, 0.0, 0.0, 0.0, 0.0, 3.0).is_err());
}
