//! Planning for the outcome: the safe-minimum, shortest and max-margin objectives on whole plans,
//! with the simulation in the loop. The safety limits judged here are the FSIS and FDA Food Code
//! values held in `traycast_thermal::safety` (sourced there); the demos are illustrative.

use traycast_plan::evaluate::{self, MAX_PASSES, Options, TOLERANCE_K, linear_prediction};
use traycast_plan::model::Zone;
use traycast_plan::{Objective, Place, demos};

fn evaluated(name: &str) -> (traycast_plan::model::Plan, evaluate::Evaluation) {
    let plan = demos::demo(name).unwrap();
    let e = evaluate::evaluate(&plan, None, Options::default()).unwrap();
    (plan, e)
}

/// The same tray: the band fit leaves the chicken's coldest point below 74 °C at its lower bound
/// (FDA Food Code 2022 3-401.12, poultry cooked in a microwave), the safe minimum brings every
/// item to its limit at the bound, with its kill, and says how the loop went.
#[test]
fn the_safe_minimum_meets_where_the_band_fit_fails() {
    let (_, fit) = evaluated("hot-lunch");
    assert!(!fit.items[0].verdict.safe, "the band fit's chicken fails");
    let (plan, safe) = evaluated("hot-lunch-safe");
    assert_eq!(plan.planning.objective, Objective::SafeMinimum);
    for (item, s) in plan.items.iter().zip(&safe.items) {
        assert!(s.verdict.safe, "{}: {:?}", item.name, s.verdict);
        assert!(s.spread.is_some(), "{} is judged on its bounds", item.name);
        if let Some(k) = &s.verdict.kill {
            assert!(k.met(), "{}: kill {k:?}", item.name);
        }
    }
    let r = safe.refinement.as_ref().expect("the loop ran");
    assert!(r.converged && r.passes <= MAX_PASSES, "{r:?}");
    assert_eq!(r.safety_gap_k, 0.0);
}

/// The loop settles within its cap (five corrections) and keeps no plan worse than its first on
/// every demo, for every objective that is feasible there.
#[test]
fn the_simulation_loop_settles_on_the_demos() {
    for name in demos::DEMOS {
        for objective in Objective::ALL {
            let mut plan = demos::demo(name).unwrap();
            plan.planning.objective = objective;
            let Ok(e) = evaluate::evaluate(&plan, None, Options { refine: true }) else {
                continue; // an infeasible objective is refused (tested below)
            };
            let r = e.refinement.as_ref().expect("the loop ran");
            if let Some(why) = &r.stopped {
                // A correction no schedule can meet (the frozen lasagne cannot be made safe in
                // its budget) ends the loop honestly, keeping the best plan so far.
                assert!(why.contains("no schedule"), "{name}: {why}");
                continue;
            }
            assert!(
                r.converged,
                "{name} {}: last change {} K after {} solves",
                objective.as_str(),
                r.change_k,
                r.passes
            );
            assert!(r.change_k < TOLERANCE_K && r.passes <= MAX_PASSES);
            if objective != Objective::SafeMinimum {
                assert!(r.rms_after <= r.rms_before + 1e-9, "{name}: {r:?}");
            }
        }
    }
}

/// Shortest and max-margin hold every band as a hard constraint in the linear prediction they
/// were solved on (the first solve; later passes rescale the rates), and max-margin's common
/// margin is never below the shortest schedule's.
#[test]
fn shortest_and_max_margin_hold_the_bands() {
    let mut plan = demos::demo("side-by-side").unwrap();
    // Bands the field model can hold at once (invented for the test).
    plan.zones[0] = Zone {
        name: "Potato 60–95 °C".into(),
        min_c: 60.0,
        max_c: 95.0,
        weight: 1.0,
        cap_c: None,
    };
    plan.zones[1].min_c = 20.0;
    plan.zones[1].max_c = 90.0;
    let mut margins = vec![];
    for objective in [Objective::Shortest, Objective::MaxMargin] {
        plan.planning.objective = objective;
        let q = evaluate::Evaluator::new().quick(&plan).unwrap();
        let mut ev = evaluate::Evaluator::new();
        let maps = ev.maps(&plan).unwrap().clone();
        let lin = linear_prediction(&plan, &maps, &q.dwell);
        let mut margin = f64::INFINITY;
        for i in 0..plan.tray.cells() {
            if let Some(z) = plan.zone_at(i) {
                let (lo, hi) = (plan.zones[z].min_c, plan.zones[z].max_c);
                // The controller's 0.5 s rounding may move a cell by a fraction of a kelvin.
                assert!(lin[i] >= lo - 0.5 && lin[i] <= hi + 0.5, "{i}: {}", lin[i]);
                margin = margin.min(lin[i] - lo).min(hi - lin[i]);
            }
        }
        margins.push((margin, q.total_s));
    }
    assert!(margins[1].0 >= margins[0].0 - 0.5, "{margins:?}");
    assert!(
        margins[0].1 <= margins[1].1 + 0.5,
        "shortest is shortest: {margins:?}"
    );
}

/// Bands no schedule can hold are refused, naming a cell, the item and what it conflicts with —
/// never answered with a schedule that breaks them.
#[test]
fn impossible_bands_are_refused_naming_the_cell() {
    let mut plan = demos::demo("side-by-side").unwrap();
    plan.planning.objective = Objective::Shortest;
    let e = evaluate::evaluate(&plan, None, Options::default()).unwrap_err();
    assert!(matches!(e.place, Place::Cell { .. }), "{e}");
    assert!(e.message.contains("no schedule meets"), "{e}");
    assert!(
        e.message.contains("Carrots") || e.message.contains("Mashed potato"),
        "{e}"
    );
}

/// A zone's cap is a hard limit on the linear prediction, held exactly (it was a weight raised
/// until the excess fell under 0.05 K).
#[test]
fn a_cap_holds_exactly() {
    let mut plan = demos::demo("side-by-side").unwrap();
    plan.zones[1].cap_c = Some(45.0);
    plan.oven.quantum_s = 0.0;
    let e = evaluate::evaluate(&plan, None, Options::default()).unwrap();
    for i in 0..plan.tray.cells() {
        if plan.zone_at(i) == Some(1) {
            assert!(e.linear[i] <= 45.0 + 1e-6, "{i}: {}", e.linear[i]);
        }
    }
    assert!(e.cap_excess <= 1e-6, "{}", e.cap_excess);
}

/// A chilled item that may already be above its limit before heating is the plan's problem, and
/// the safe minimum says so at the item's start temperature.
#[test]
fn a_chilled_item_too_warm_to_start_is_named() {
    let mut plan = demos::demo("lunch-tray").unwrap();
    plan.planning.objective = Objective::SafeMinimum;
    let e = evaluate::evaluate(&plan, None, Options::default()).unwrap_err();
    assert_eq!(e.place.to_string(), "items[3].start_c", "{e}");
    assert!(e.message.contains("Vanilla pudding"), "{e}");
}

/// The hot-lunch tray's maps as a library named `name`, every rate scaled by `scale`: an invented
/// unit of the same oven model (illustrative, not a measurement).
fn unit(name: &str, scale: f64) -> traycast_plan::library::MapLibrary {
    use traycast_plan::library::{MapLibrary, RateBasis, RecordedLoad};
    let plan = demos::demo("hot-lunch-safe").unwrap();
    let maps = evaluate::Evaluator::new().maps(&plan).unwrap().clone();
    MapLibrary {
        name: name.into(),
        width: plan.tray.width,
        height: plan.tray.height,
        cell_mm: plan.tray.cell_mm,
        configs: maps.configs,
        basis: RateBasis::AsLoaded,
        loads: vec![RecordedLoad {
            name: plan.name.clone(),
            layout: plan.loss_layout(),
            rates: maps.loaded.iter().map(|r| r * scale).collect(),
            uncertainty: None,
        }],
    }
}

/// One schedule on two units of an oven model: planned on unit A alone it falls short on a unit
/// a quarter weaker; held on both, its worst margin over the items on the weak unit rises, and
/// the schedule takes longer. Verdicts are the FDA Food Code / FSIS limits held in the thermal
/// crate; the units are invented.
#[test]
fn a_schedule_can_be_held_on_several_ovens() {
    let (a, b) = (
        unit("unit A (illustrative)", 1.0),
        unit("unit B (illustrative)", 0.75),
    );
    let plan = evaluate::on_oven(&demos::demo("hot-lunch-safe").unwrap(), &a);
    let mut ev = evaluate::Evaluator::with_library(Some(a.clone()));
    let alone = ev.evaluate(&plan, Options::default()).unwrap();
    let worst_margin = |e: &evaluate::Evaluation| -> f64 {
        let on_b = evaluate::across_ovens(&plan, &e.dwell, std::slice::from_ref(&b)).unwrap();
        on_b.ovens[0]
            .items
            .iter()
            .map(|it| it.verdict.margin)
            .fold(f64::INFINITY, f64::min)
    };
    let before = worst_margin(&alone);
    assert!(
        before < 0.0,
        "planned on A alone, something fails on B ({before} K)"
    );
    ev.hold_on(vec![b.clone()]);
    let held = ev.evaluate(&plan, Options::default()).unwrap();
    let after = worst_margin(&held);
    assert!(after > before + 5.0, "held on both: {before} → {after} K");
    assert!(held.total_s > alone.total_s);
    // The report says which oven is worst for each item.
    let both = evaluate::across_ovens(&plan, &held.dwell, &[a, b]).unwrap();
    assert_eq!(both.worst.len(), plan.items.len());
    for (k, &w) in both.worst.iter().enumerate() {
        for o in &both.ovens {
            assert!(both.ovens[w].items[k].verdict.margin <= o.items[k].verdict.margin);
        }
    }
}
