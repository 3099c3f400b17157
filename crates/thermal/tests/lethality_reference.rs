//! Time at temperature against published time–temperature tables: the kill along a constant hold
//! must give each table's holding time within the table's rounding.

use traycast_thermal::safety::{
    Handling, LISTERIA, SALMONELLA_MEAT, SALMONELLA_POULTRY, SafetyCategory, verdict,
};

/// °F to °C.
fn c(f: f64) -> f64 {
    (f - 32.0) * 5.0 / 9.0
}

/// Seconds a constant hold at `t` °C needs to kill `logs`, found by the kill integral itself (a
/// two-sample history at constant temperature), not by the closed form.
fn hold_for(curve: &traycast_thermal::safety::KillCurve, t: f64, logs: f64) -> f64 {
    let per_second = curve.log_reduction(&[0.0, 1.0], &[t, t]);
    logs / per_second
}

/// USDA FSIS Appendix A (1999 compliance guidelines for cooked beef, roast beef and cooked corned
/// beef), the 6.5-log10 Salmonella column, as printed (reproduced in the Canadian Food Inspection
/// Agency's "Preventive control recommendations for manufacturing cooked ready-to-eat meat
/// products", Table 1): °F, and whole minutes or whole seconds. The table rounds to its unit,
/// sometimes upwards; every row must be within one unit of the model.
#[test]
fn salmonella_in_meat_matches_fsis_appendix_a() {
    let minutes = [
        (130.0, 112.0),
        (131.0, 89.0),
        (132.0, 71.0),
        (133.0, 56.0),
        (134.0, 45.0),
        (135.0, 36.0),
        (136.0, 28.0),
        (137.0, 23.0),
        (138.0, 18.0),
        (139.0, 15.0),
        (140.0, 12.0),
        (141.0, 9.0),
        (142.0, 8.0),
        (143.0, 6.0),
        (144.0, 5.0),
        (145.0, 4.0),
    ];
    let seconds = [
        (146.0, 169.0),
        (147.0, 134.0),
        (148.0, 107.0),
        (149.0, 85.0),
        (150.0, 67.0),
        (151.0, 54.0),
        (152.0, 43.0),
        (153.0, 34.0),
        (154.0, 27.0),
        (155.0, 22.0),
        (156.0, 17.0),
        (157.0, 14.0),
    ];
    for (f, table) in minutes {
        let model = hold_for(&SALMONELLA_MEAT, c(f), 6.5) / 60.0;
        assert!(
            (model - table).abs() < 1.0,
            "{f} °F: model {model:.2} min, table {table} min"
        );
    }
    for (f, table) in seconds {
        let model = hold_for(&SALMONELLA_MEAT, c(f), 6.5);
        assert!(
            (model - table).abs() < 1.0,
            "{f} °F: model {model:.2} s, table {table} s"
        );
    }
}

/// USDA FSIS time–temperature tables for cooking ready-to-eat poultry, 7.0 log10 Salmonella, as
/// reproduced in the CFIA recommendations' Table 2 (poultry other than turkey): at 136 °F (57.8 °C)
/// 63.3 min with 1 % fat and 81.4 min with 12 % fat; at 137 °F (58.3 °C) 50.1 min with 1 % fat.
/// The model follows the 12 % column (the most heat-tolerant chicken) within its 0.1 min rounding,
/// and is never more optimistic than the leaner rows.
#[test]
fn salmonella_in_poultry_matches_the_fsis_poultry_tables_and_errs_long() {
    let at_136 = hold_for(&SALMONELLA_POULTRY, c(136.0), 7.0) / 60.0;
    assert!((at_136 - 81.4).abs() <= 0.05, "{at_136}");
    for (f, lean) in [(136.0, 63.3), (137.0, 50.1)] {
        let model = hold_for(&SALMONELLA_POULTRY, c(f), 7.0) / 60.0;
        assert!(
            model >= lean,
            "{f} °F: model {model:.1} min shorter than 1 % fat {lean} min"
        );
    }
    // The 1 %-fat rows step by Appendix A's z = 10 °F: their ratio is 10^0.1 within 0.5 %.
    assert!(((63.3_f64 / 50.1).log10() - 0.1).abs() < 0.002);
}

/// UK ACMSF (1995) / European Chilled Food Federation equivalents of the 6-log10 Listeria
/// monocytogenes process (70 °C for 2 min, z = 7.5 K), as tabulated: 60 °C 45 min, 65 °C 10 min,
/// 75 °C 30 s, 80 °C 6 s, within the table's rounding (it rounds to "round" times, here within
/// 15 %). Recalled from memory.
#[test]
fn listeria_matches_the_acmsf_equivalent_processes() {
    for (t, table_s) in [
        (60.0, 45.0 * 60.0),
        (65.0, 600.0),
        (70.0, 120.0),
        (75.0, 30.0),
        (80.0, 6.0),
    ] {
        let model = hold_for(&LISTERIA, t, 6.0);
        assert!(
            (model / table_s - 1.0).abs() < 0.15,
            "{t} °C: model {model:.1} s, table {table_s} s"
        );
    }
}

/// The kill along a rising history equals the kill summed over a fine staircase of constant holds
/// (a plain Riemann sum, a method independent of the exact piecewise formula), and a history that
/// never reaches the curve's lowest tabulated temperature kills nothing.
#[test]
fn the_kill_along_a_history_adds_up_its_holds() {
    // 50 → 75 °C in 300 s, then 120 s of standing falling to 70 °C.
    let times = [0.0, 300.0, 420.0];
    let temps = [50.0, 75.0, 70.0];
    let exact = SALMONELLA_POULTRY.log_reduction(&times, &temps);
    let n = 200_000;
    let mut riemann = 0.0;
    for k in 0..n {
        let t = 420.0 * (k as f64 + 0.5) / n as f64;
        let temp = if t < 300.0 {
            50.0 + 25.0 * t / 300.0
        } else {
            75.0 - 5.0 * (t - 300.0) / 120.0
        };
        riemann += 420.0 / n as f64 / SALMONELLA_POULTRY.d_seconds(temp);
    }
    assert!((exact / riemann - 1.0).abs() < 1e-4, "{exact} vs {riemann}");
    assert_eq!(
        SALMONELLA_MEAT.log_reduction(&[0.0, 600.0], &[20.0, 54.0]),
        0.0
    );
    assert!(
        SALMONELLA_MEAT
            .log_reduction(&[0.0, 10.0], &[60.0, f64::NAN])
            .is_nan()
    );
}

/// A chicken piece that reaches 74 °C only for an instant has not had its 7 log10 at the coldest
/// point; the verdict says so even though the temperature rule passes. FDA 3-401.12's 74 °C with
/// its 2-minute covered stand comes with the kill (0.9 s per log10 at 74 °C on this curve).
#[test]
fn a_verdict_needs_the_kill_as_well_as_the_temperature() {
    let handling = |logs| Handling {
        stood_seconds: 120.0,
        covered: true,
        log_reduction: logs,
    };
    let short = verdict(SafetyCategory::Poultry, &[75.0], handling(Some(3.0)));
    assert!(short.margin > 0.0 && !short.safe);
    assert!(!short.kill.unwrap().met());
    let unknown = verdict(SafetyCategory::Poultry, &[75.0], handling(None));
    assert!(!unknown.safe && unknown.missing.iter().any(|m| m.contains("kill")));
    let done = verdict(SafetyCategory::Poultry, &[75.0], handling(Some(7.5)));
    assert!(done.safe);
    // No kill step for vegetables held hot or for chilled items.
    assert!(SafetyCategory::ServedHot.kill_target().is_none());
    assert!(SafetyCategory::KeepCold.kill_target().is_none());
    // 74 °C for the 2-minute stand alone is far past 7 log10 on the poultry curve.
    assert!(SALMONELLA_POULTRY.log_reduction(&[0.0, 120.0], &[74.0, 74.0]) > 7.0);
}
