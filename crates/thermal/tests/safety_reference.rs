//! Food-safety tables reproduced from their sources (shared/reference/physics.md §2), and verdicts.

use traycast_thermal::safety::*;

/// USDA FSIS safe minimum internal temperature chart: °F as printed, °C by FSIS's own conversion
/// (°F − 32)·5/9 to one decimal; rest times as printed (3 min for whole cuts and fresh pork).
#[test]
fn fsis_chart_matches_the_source() {
    let expected = [
        ("Beef, veal, lamb steaks, roasts, chops", 145.0, 62.8, 3.0),
        ("Fresh pork, including fresh ham", 145.0, 62.8, 3.0),
        (
            "Ground meat and mixtures (beef, pork, veal, lamb)",
            160.0,
            71.1,
            0.0,
        ),
        (
            "All poultry (whole, parts, ground, giblets, stuffing)",
            165.0,
            73.9,
            0.0,
        ),
        ("Egg dishes (frittata, quiche)", 160.0, 71.1, 0.0),
        ("Leftovers and casseroles", 165.0, 73.9, 0.0),
        ("Fin fish", 145.0, 62.8, 0.0),
        ("Precooked ham, reheating", 165.0, 73.9, 0.0),
    ];
    assert_eq!(FSIS_CHART.len(), expected.len());
    for (row, (food, f, c, rest)) in FSIS_CHART.iter().zip(expected) {
        assert_eq!(row.food, food);
        assert_eq!(row.fahrenheit, f);
        assert_eq!(row.celsius, c);
        assert_eq!(row.rest_minutes, rest);
        assert_eq!(fsis_celsius(row.fahrenheit), row.celsius, "{food}");
    }
}

/// FDA Food Code (2022) sections 3-401.12, 3-401.13, 3-403.11(B)/(C), 3-501.16(A): the °C values
/// as the code prints them (whole degrees) match their °F within half a degree; the microwave rules
/// require the food covered and a 2-minute covered stand (3-401.12(B) and (D), 3-403.11(B)).
#[test]
fn food_code_rules_match_the_source() {
    let rules = [
        (
            FDA_MICROWAVE_COOKING,
            "3-401.12",
            74.0,
            165.0,
            true,
            120.0,
            true,
        ),
        (
            FDA_MICROWAVE_REHEATING,
            "3-403.11(B)",
            74.0,
            165.0,
            true,
            120.0,
            true,
        ),
        (FDA_PLANT_FOODS, "3-401.13", 57.0, 135.0, true, 0.0, false),
        (
            FDA_RTE_REHEATING,
            "3-403.11(C)",
            57.0,
            135.0,
            true,
            0.0,
            false,
        ),
        (
            FDA_HOT_HOLDING,
            "3-501.16(A)(1)",
            57.0,
            135.0,
            true,
            0.0,
            false,
        ),
        (
            FDA_COLD_HOLDING,
            "3-501.16(A)(2)",
            5.0,
            41.0,
            false,
            0.0,
            false,
        ),
    ];
    for (rule, section, c, f, minimum, stand, covered) in rules {
        assert_eq!(rule.covered, covered, "{section}");
        assert_eq!(rule.section, section);
        assert_eq!(
            (
                rule.celsius,
                rule.fahrenheit,
                rule.minimum,
                rule.stand_seconds
            ),
            (c, f, minimum, stand)
        );
        assert!(
            ((rule.fahrenheit - 32.0) * 5.0 / 9.0 - rule.celsius).abs() < 0.5,
            "{section}"
        );
    }
}

/// A kill far past every category's target, for checks of the other parts of a verdict.
const KILLED: f64 = 100.0;

/// Covered, with the 2-minute covered stand the microwave rules ask for (FDA 3-401.12(D)).
const DONE_RIGHT: Handling = Handling {
    stood_seconds: 120.0,
    covered: true,
    log_reduction: Some(KILLED),
};

#[test]
fn verdict_is_judged_on_the_coldest_cell_with_its_margin() {
    // Poultry in a microwave: FSIS 73.9 °C and FDA 3-401.12 74 °C; the stricter binds.
    let v = verdict(SafetyCategory::Poultry, &[80.0, 75.0, 90.0], DONE_RIGHT);
    assert!(v.safe);
    assert_eq!(v.coldest, 75.0);
    assert!((v.margin - 1.0).abs() < 1e-12);
    assert!(v.binding.source.contains("3-401.12") && v.binding.source.contains("2022"));
    assert!(v.missing.is_empty());
    let v = verdict(SafetyCategory::Poultry, &[80.0, 73.0], DONE_RIGHT);
    assert!(!v.safe);
    assert!((v.margin + 1.0).abs() < 1e-12);
    // A chilled dessert is judged on its warmest cell against cold holding, 5 °C.
    let v = verdict(SafetyCategory::KeepCold, &[3.0, 6.0], DONE_RIGHT);
    assert!(!v.safe);
    assert!((v.margin + 1.0).abs() < 1e-12);
    // Whole meat: FSIS 62.8 °C, but microwave-cooked raw animal food needs 74 °C (FDA 3-401.12).
    let v = verdict(SafetyCategory::WholeMeat, &[70.0], DONE_RIGHT);
    assert!(!v.safe);
    // Vegetables cooked for hot holding: FDA 3-401.13, 57 °C, no stand or cover asked.
    let v = verdict(
        SafetyCategory::ServedHot,
        &[60.0],
        Handling {
            stood_seconds: 0.0,
            covered: false,
            log_reduction: Some(KILLED),
        },
    );
    assert!(v.safe && v.binding.source.contains("3-401.13"));
    for c in SafetyCategory::ALL {
        assert_eq!(SafetyCategory::parse(c.as_str()), Some(c));
    }
    assert!(CAUTIONS.iter().any(|c| c.contains("thermometer")));
}

/// FDA 3-401.12 and 3-403.11(B): hot enough is not enough. Without the 2-minute covered stand, or
/// uncovered, the rule is not met, and the verdict says what is missing.
#[test]
fn the_stand_and_the_cover_are_part_of_the_rule() {
    let hot = [85.0, 90.0];
    let short = verdict(
        SafetyCategory::Poultry,
        &hot,
        Handling {
            stood_seconds: 60.0,
            covered: true,
            log_reduction: Some(KILLED),
        },
    );
    assert!(!short.safe && short.margin > 0.0);
    assert_eq!(
        short.missing,
        vec!["stand 2 min covered (plan: 1 min)".to_string()]
    );
    let open = verdict(
        SafetyCategory::Reheated,
        &hot,
        Handling {
            stood_seconds: 120.0,
            covered: false,
            log_reduction: Some(KILLED),
        },
    );
    assert!(!open.safe);
    assert!(open.missing[0].contains("cover"));
    let none = verdict(
        SafetyCategory::Reheated,
        &hot,
        Handling {
            stood_seconds: 0.0,
            covered: false,
            log_reduction: Some(KILLED),
        },
    );
    assert_eq!(none.missing.len(), 2);
    // Whole cuts: FSIS asks for a 3-minute rest as well.
    let rest = verdict(SafetyCategory::WholeMeat, &[80.0], DONE_RIGHT);
    assert!(!rest.safe && rest.missing[0].starts_with("stand 3 min covered"));
}

#[test]
fn bounded_verdict_judges_minimums_on_lower_and_maximums_on_upper_bounds() {
    // FDA 3-401.12 (74 °C for microwave-cooked poultry): nominally 76 °C passes, but a lower bound
    // of 72 °C does not.
    let v = verdict_within(
        SafetyCategory::Poultry,
        &[72.0, 80.0],
        &[80.0, 88.0],
        DONE_RIGHT,
    );
    assert!(!v.safe);
    assert!((v.margin + 2.0).abs() < 1e-12 && v.coldest == 72.0);
    // FDA 3-501.16 cold holding at 5 °C is judged on the warmest upper bound.
    let v = verdict_within(
        SafetyCategory::KeepCold,
        &[2.0, 3.0],
        &[4.0, 5.5],
        DONE_RIGHT,
    );
    assert!(!v.safe && (v.margin + 0.5).abs() < 1e-12);
    assert_eq!(
        verdict_within(SafetyCategory::Poultry, &[75.0], &[75.0], DONE_RIGHT),
        verdict(SafetyCategory::Poultry, &[75.0], DONE_RIGHT)
    );
}

/// Regression (hostile-input run, case 1): a NaN among an item's temperatures used to be skipped by
/// the minimum, so the verdict judged the cells that were left. Nothing non-finite is ever judged
/// safe, and no temperatures at all is not a pass either.
#[test]
fn non_finite_temperatures_never_pass() {
    for temps in [&[80.0, f64::NAN, 90.0][..], &[f64::INFINITY], &[]] {
        let v = verdict(SafetyCategory::Poultry, temps, DONE_RIGHT);
        assert!(!v.safe, "{temps:?}");
        assert!(v.margin.is_nan(), "{temps:?}: {}", v.margin);
    }
}
