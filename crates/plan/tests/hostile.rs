//! Hostile and extreme input: every case of the hostile-input run is a regression test here, and a
//! property over random plans (extreme power, thickness and temperatures included) checks that no
//! number that is not finite reaches a summary, map, verdict or export.

use proptest::prelude::*;
use traycast_plan::Place;
use traycast_plan::evaluate::{self, Evaluation, Options};
use traycast_plan::library::{MAX_LIBRARY_VALUES, MapLibrary};
use traycast_plan::model::{FoodItem, Plan, Sequencing, Zone};
use traycast_plan::runs::{HeatingRuns, MAX_TIME_S, ReadOptions};
use traycast_plan::{demos, summary};

/// The highest temperature any cell reached, °C.
fn hottest(e: &Evaluation) -> f64 {
    e.course
        .peak
        .iter()
        .copied()
        .filter(|v| v.is_finite())
        .fold(f64::MIN, f64::max)
}

/// Every number a user can see for a plan: finite wherever the plan has food, and every verdict
/// that passes has a finite margin.
fn assert_all_finite(plan: &Plan, e: &Evaluation) {
    assert!(e.dwell.iter().all(|v| v.is_finite()) && e.total_s.is_finite());
    for i in 0..plan.tray.cells() {
        if plan.item_at(i).is_none() {
            continue;
        }
        let values = [
            e.linear[i],
            e.course.end_of_heating[i],
            e.course.after_standing[i],
            e.course.peak[i],
        ];
        assert!(values.iter().all(|v| v.is_finite()), "cell {i}: {values:?}");
        if plan.zone_at(i).is_some() {
            assert!(e.error_linear[i].is_finite() && e.error_simulated[i].is_finite());
        }
        for frame in &e.course.frames {
            assert!(frame[i].is_finite());
        }
    }
    for (k, item) in e.items.iter().enumerate() {
        let has_cells = (0..plan.tray.cells()).any(|i| plan.item_at(i) == Some(k));
        if has_cells {
            assert!(item.min.is_finite() && item.mean.is_finite() && item.max.is_finite());
            assert!(item.verdict.margin.is_finite());
        } else {
            assert!(
                !item.verdict.safe,
                "an item without cells is never judged safe"
            );
        }
    }
    for z in &e.zones {
        for v in [z.coverage_linear, z.coverage_simulated] {
            assert!(v.is_nan() || (0.0..=1.0).contains(&v));
        }
    }
    // The JSON summary never carries NaN or infinity (serde_json would write null for them; check
    // the text as well).
    let json = summary::to_json(plan, e).to_string();
    assert!(!json.contains("NaN") && !json.contains("inf"), "{json}");
    // Past the model's range is never silent.
    let hottest = hottest(e);
    if hottest > traycast_thermal::simulate::MODEL_LIMIT_C {
        assert!(
            e.warnings.iter().any(|w| w.contains("scorch")),
            "{:?}",
            e.warnings
        );
    }
}

/// Case 1: the frozen-portion demo with its food changed to pure water at 20 mm used to boil a cell
/// dry, divide by zero, and report the zone "100 % in band" beside NaN temperatures.
#[test]
fn water_that_boils_is_never_nan_nor_in_band_by_accident() {
    let mut plan = demos::demo("frozen-portion").unwrap();
    plan.items[0].food = "water".into();
    plan.items[0].thickness_mm = 20.0;
    for (power, thickness) in [(1000.0, 20.0), (20_000.0, 1.0), (20_000.0, 20.0)] {
        plan.oven.power_w = power;
        plan.items[0].thickness_mm = thickness;
        let e = evaluate::evaluate(&plan, None, Options::default()).unwrap();
        assert_all_finite(&plan, &e);
        for (z, r) in e.zones.iter().enumerate() {
            let cells: Vec<usize> = (0..plan.tray.cells())
                .filter(|&i| plan.zone_at(i) == Some(z))
                .collect();
            let inside = cells
                .iter()
                .filter(|&&i| e.error_simulated[i] == 0.0)
                .count();
            assert_eq!(r.coverage_simulated, inside as f64 / cells.len() as f64);
        }
    }
}

/// Case 2: dried food kept absorbing at the moist rate and reached 3,440 °C on a 20 kW, 1 mm plan.
/// Now the dried matter absorbs at its own small loss factor and anything past the model's range is
/// warned about.
#[test]
fn dried_food_does_not_run_away_and_scorching_is_warned() {
    let mut plan = demos::demo("lunch-tray").unwrap();
    plan.oven.power_w = 20_000.0;
    plan.oven.budget_s = Some(900.0);
    for item in &mut plan.items {
        item.thickness_mm = 1.0;
    }
    let e = evaluate::evaluate(&plan, None, Options::default()).unwrap();
    assert_all_finite(&plan, &e);
    let hottest = hottest(&e);
    assert!(hottest < 1000.0, "{hottest}");
}

fn grid_layout(cell_mm: f64) -> Plan {
    let mut p = Plan::blank(4, 3, cell_mm);
    p.items = vec![FoodItem {
        name: "Rice".into(),
        food: "rice".into(),
        thickness_mm: 20.0,
        start_c: 5.0,
        covered: false,
    }];
    p.food = vec![1; 12];
    p.oven.configs = 1;
    p
}

/// A runs file of one configuration with a probe at every position given, 12 readings each.
fn runs_at(positions: &[(String, String)]) -> String {
    let mut text = String::from("# traycast-runs 1\nrun,config,time_s,x_mm,y_mm,temp_c\n");
    for (x, y) in positions {
        for k in 0..12 {
            text.push_str(&format!(
                "a,0,{},{x},{y},{:.1}\n",
                2 * k,
                5.0 + 0.4 * k as f64
            ));
        }
    }
    text
}

/// Case 3: a probe at an mm position on a cell boundary or within rounding of the tray's far edge
/// panicked (index out of bounds) or landed in the wrong cell, through the rounding of x / pitch.
/// With 9.9 mm cells, 69.3 / 9.9 rounds to 6.999…: the boundary belongs to the cell it starts.
#[test]
fn probe_positions_on_boundaries_and_edges_land_in_the_right_cell() {
    let plan = grid_layout(9.9);
    let positions: Vec<(String, String)> = vec![
        ("0".into(), "0".into()),
        ("29.7".into(), "19.8".into()), // col 3, row 2 starts (3 × 9.9, 2 × 9.9)
        ("39.599999999999994".into(), "5".into()), // within rounding of the 39.6 mm far edge
        ("9.9".into(), "29.699999999999996".into()),
    ];
    let runs = HeatingRuns::parse(&runs_at(&positions), &plan, ReadOptions::default()).unwrap();
    let cells: Vec<usize> = runs.series.iter().map(|s| s.cell).collect();
    assert_eq!(cells, [0, 2 * 4 + 3, 3, 2 * 4 + 1]);
    let wide = grid_layout(9.9 * 8.0);
    let positions: Vec<(String, String)> = (0..4)
        .map(|c| (format!("{}", 69.3 * c as f64), "0".into()))
        .collect();
    let runs = HeatingRuns::parse(&runs_at(&positions), &wide, ReadOptions::default()).unwrap();
    let cols: Vec<usize> = runs.series.iter().map(|s| s.cell).collect();
    assert_eq!(cols, [0, 0, 1, 2], "69.3 mm steps on 79.2 mm cells");
}

/// Case 8: times near 1e308 failed later as "library: standard error NaN"; they are refused at
/// their line, saying what is wrong.
#[test]
fn absurd_times_are_refused_at_their_line() {
    let plan = grid_layout(20.0);
    let mut text = runs_at(&[("10".into(), "10".into())]);
    text = text.replacen("a,0,4,10,10", "a,0,1e308,10,10", 1);
    let e = HeatingRuns::parse(&text, &plan, ReadOptions::default()).unwrap_err();
    assert_eq!(e.place, Place::line(5));
    assert!(e.message.contains(&format!("{MAX_TIME_S}")), "{e}");
}

/// Case 4: a library JSON declaring a huge tray aborted on allocation before it was validated.
#[test]
fn library_sizes_are_checked_before_anything_is_allocated() {
    for (w, h, c) in [
        (1_000_000_000usize, 1_000_000_000usize, 4usize),
        (usize::MAX, 2, 4),
        (10, 10, 1 << 40),
    ] {
        let json = format!(
            r#"{{"format":"traycast-maps","version":1,"name":"x","width":{w},"height":{h},"cell_mm":20,"configs":{c},"units":"K/s","loads":[]}}"#
        );
        let e = MapLibrary::from_json(&json).unwrap_err();
        assert_eq!(e.place, Place::from("library"), "{e}");
    }
    // Many loads of a full-size tray: refused by the value count, naming the line that passes it.
    let mut csv = String::from(
        "# traycast-maps 1\n# tray: 128 x 128 cells of 10 mm\n# configurations: 512\n# units: K/s\nload,config,row,col,class,rate\n",
    );
    for k in 0..3 {
        csv.push_str(&format!("load{k},0,0,0,meat,0.1\n"));
    }
    let e = MapLibrary::from_csv(&csv).unwrap_err();
    assert_eq!(e.place, Place::line(7), "{e}");
    assert!(e.message.contains(&MAX_LIBRARY_VALUES.to_string()), "{e}");
}

fn random_plan() -> impl Strategy<Value = Plan> {
    let foods = [
        "water",
        "carrots",
        "chicken-breast",
        "ground-beef",
        "ham",
        "rice",
        "lasagne",
        "vanilla-pudding",
        "mashed-potato",
    ];
    (
        (1usize..9, 1usize..7, 5.0..60.0f64),
        proptest::collection::vec((0usize..9, 1.0..200.0f64, -40.0..95.0f64), 1..4),
        proptest::collection::vec(any::<u8>(), 64),
        (50.0..20_000.0f64, 1usize..12, 1.0..7200.0f64, 0.0..600.0f64),
        (-40.0..100.0f64, 0.0..40.0f64, any::<bool>()),
    )
        .prop_map(
            move |(
                (w, h, cell_mm),
                items,
                paint,
                (power, configs, budget, stand),
                (lo, width, rounds),
            )| {
                let mut p = Plan::blank(w, h, cell_mm);
                p.items = items
                    .iter()
                    .enumerate()
                    .map(|(k, &(f, thickness, start))| FoodItem {
                        name: format!("item {k}"),
                        food: foods[f].into(),
                        thickness_mm: thickness,
                        start_c: start,
                        covered: false,
                    })
                    .collect();
                p.zones = vec![Zone {
                    name: "zone".into(),
                    min_c: lo,
                    max_c: (lo + width).min(100.0),
                    weight: 1.0,
                    cap_c: None,
                }];
                for i in 0..w * h {
                    let b = paint[i % paint.len()] as usize;
                    p.food[i] = (b % (items.len() + 1)) as u8;
                    p.zone[i] = u8::from(p.food[i] > 0 && !b.is_multiple_of(3));
                }
                p.oven.power_w = power;
                p.oven.configs = configs;
                p.oven.budget_s = Some(budget);
                p.oven.standing_s = stand;
                p.oven.sequencing = if rounds {
                    Sequencing::Rounds(3)
                } else {
                    Sequencing::Blocks
                };
                p
            },
        )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    /// Whatever the plan, an evaluation is either a clear error or all finite; nothing that is not a
    /// number is counted in band or judged safe.
    #[test]
    fn every_output_of_a_random_plan_is_finite(plan in random_plan()) {
        prop_assume!(plan.validate().is_ok());
        match evaluate::evaluate(&plan, None, Options::default()) {
            Ok(e) => assert_all_finite(&plan, &e),
            Err(e) => prop_assert!(!e.message.is_empty() && !e.place.to_string().is_empty(), "{e}"),
        }
    }
}
