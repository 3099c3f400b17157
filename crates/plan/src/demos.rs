//! Demo scenarios of our own. All illustrative: invented trays, the synthetic field model, no real
//! product or measurement behind them.

use crate::model::{FoodItem, MapSource, Objective, Oven, Plan, Sequencing, Zone};

/// Names of the demos, in the order `traycast demo` lists them.
pub const DEMOS: [&str; 5] = [
    "lunch-tray",
    "hot-lunch",
    "hot-lunch-safe",
    "frozen-portion",
    "side-by-side",
];

fn paint(
    plan: &mut Plan,
    item: u8,
    zone: u8,
    cols: std::ops::Range<usize>,
    rows: std::ops::Range<usize>,
) {
    let w = plan.tray.width;
    for r in rows {
        for c in cols.clone() {
            plan.food[r * w + c] = item;
            plan.zone[r * w + c] = zone;
        }
    }
}

fn base(name: &str, width: usize, height: usize, cell_mm: f64, seed: u64) -> Plan {
    let mut p = Plan::blank(width, height, cell_mm);
    p.name = name.into();
    p.oven = Oven {
        configs: 48,
        budget_s: Some(360.0),
        sequencing: Sequencing::Rounds(4),
        ..Oven::default()
    };
    p.maps = MapSource::Synthetic { seed };
    p
}

fn item(name: &str, food: &str, thickness_mm: f64, start_c: f64) -> FoodItem {
    FoodItem {
        name: name.into(),
        food: food.into(),
        thickness_mm,
        start_c,
        covered: false,
    }
}

fn zone(name: &str, min_c: f64, max_c: f64, weight: f64, cap_c: Option<f64>) -> Zone {
    Zone {
        name: name.into(),
        min_c,
        max_c,
        weight,
        cap_c,
    }
}

/// A demo plan by name.
pub fn demo(name: &str) -> Option<Plan> {
    let mut p = demo_plan(name)?;
    cover_where_the_rules_ask(&mut p);
    Some(p)
}

/// Covers every item whose safety rules ask for a cover (the microwave rules of the FDA Food
/// Code), as a careful practitioner would.
fn cover_where_the_rules_ask(p: &mut Plan) {
    for k in 0..p.items.len() {
        if let Some(f) = p.catalogue_food(k) {
            p.items[k].covered = f.safety.requirements().iter().any(|r| r.covered);
        }
    }
}

fn demo_plan(name: &str) -> Option<Plan> {
    Some(match name {
        "lunch-tray" => {
            // Four compartments on a 28 × 18 cm tray: chicken that must reach its safe minimum,
            // rice, broccoli, and a chilled pudding that must stay cold.
            let mut p = base("Lunch tray (illustrative)", 28, 18, 10.0, 7);
            p.items = vec![
                item("Chicken breast", "chicken-breast", 20.0, 4.0),
                item("Rice", "rice", 25.0, 4.0),
                item("Broccoli", "broccoli", 20.0, 4.0),
                item("Vanilla pudding", "vanilla-pudding", 25.0, 4.0),
            ];
            p.zones = vec![
                // Bands sit above the safe minimum so the coldest point, not the average, clears it.
                zone("Chicken 85–98 °C", 85.0, 98.0, 3.0, None),
                zone("Rice 82–96 °C", 82.0, 96.0, 1.0, None),
                zone("Broccoli 65–75 °C", 65.0, 75.0, 1.0, None),
                // Cold holding asks for 5 °C or less (FDA Food Code 3-501.16(A)(2)).
                zone("Pudding stays at most 5 °C", -40.0, 5.0, 0.2, None),
            ];
            paint(&mut p, 1, 1, 1..13, 1..9);
            paint(&mut p, 2, 2, 15..27, 1..9);
            paint(&mut p, 3, 3, 1..13, 10..17);
            paint(&mut p, 4, 4, 19..27, 11..17);
            // An illustrative tray that lets microwaves through its base (glass, ceramic or
            // plastic): half of each cell's power enters from below.
            p.heating.from_below = 0.5;
            p
        }
        "hot-lunch" => hot_lunch(Objective::BandFit),
        "hot-lunch-safe" => hot_lunch(Objective::SafeMinimum),
        "frozen-portion" => {
            // A frozen lasagne portion reheated to the reheating minimum.
            let mut p = base("Frozen lasagne portion (illustrative)", 20, 14, 10.0, 11);
            p.items = vec![item("Lasagne, frozen", "lasagne", 35.0, -18.0)];
            p.zones = vec![zone("Lasagne 75–90 °C", 75.0, 90.0, 1.0, None)];
            p.oven.budget_s = Some(600.0);
            p.oven.sequencing = Sequencing::Rounds(8);
            paint(&mut p, 1, 1, 4..16, 3..11);
            p
        }
        "side-by-side" => {
            // Two foods side by side that must end at different temperatures.
            let mut p = base(
                "Two temperatures side by side (illustrative)",
                24,
                12,
                10.0,
                5,
            );
            p.items = vec![
                item("Mashed potato", "mashed-potato", 25.0, 5.0),
                item("Carrots", "carrots", 20.0, 5.0),
            ];
            p.zones = vec![
                zone("Potato hot, 75–85 °C", 75.0, 85.0, 1.0, None),
                zone("Carrots warm, 40–50 °C", 40.0, 50.0, 1.0, None),
            ];
            paint(&mut p, 1, 1, 2..11, 2..10);
            paint(&mut p, 2, 2, 13..22, 2..10);
            p
        }
        _ => return None,
    })
}

/// Three hot compartments (the lunch tray without its chilled pudding), planned for `objective`:
/// the band fit and the safe minimum of the same tray, to set side by side.
fn hot_lunch(objective: Objective) -> Plan {
    let name = match objective {
        Objective::SafeMinimum => "Hot lunch, safe minimum (illustrative)",
        _ => "Hot lunch, band fit (illustrative)",
    };
    let mut p = base(name, 28, 18, 10.0, 7);
    p.items = vec![
        item("Chicken breast", "chicken-breast", 20.0, 4.0),
        item("Rice", "rice", 25.0, 4.0),
        item("Broccoli", "broccoli", 20.0, 4.0),
    ];
    p.zones = vec![
        zone("Chicken 85–98 °C", 85.0, 98.0, 3.0, None),
        zone("Rice 82–96 °C", 82.0, 96.0, 1.0, None),
        zone("Broccoli 65–75 °C", 65.0, 75.0, 1.0, None),
    ];
    paint(&mut p, 1, 1, 1..13, 1..9);
    paint(&mut p, 2, 2, 15..27, 1..9);
    paint(&mut p, 3, 3, 1..13, 10..17);
    p.heating.from_below = 0.5;
    p.planning.objective = objective;
    p
}

/// The benchmark tray (illustrative): 48 × 32 cells of 7 mm, four foods in quadrants, two
/// targets in a checkerboard, 96 configurations. What `cargo xtask bench-web` and the plan
/// crate's benchmarks measure.
pub fn benchmark_tray() -> Plan {
    let (w, h) = (48, 32);
    let mut p = Plan::blank(w, h, 7.0);
    p.name = "Benchmark tray 48 × 32, 96 configurations (illustrative)".into();
    p.oven.configs = 96;
    // An illustrative 2 kW commercial oven: the tray holds about 1.6 kg of food, and the power
    // balance caps a 1 kW oven at about 0.16 K/s on it, too little to reach 60–85 °C within the
    // 300 s budget. The benchmark measures a plan that can succeed.
    p.oven.power_w = 2000.0;
    p.items = ["chicken-breast", "rice", "broccoli", "mashed-potato"]
        .iter()
        .map(|f| FoodItem {
            name: f.to_string(),
            food: f.to_string(),
            thickness_mm: 20.0,
            start_c: 4.0,
            covered: false,
        })
        .collect();
    p.zones = vec![
        Zone {
            name: "hot".into(),
            min_c: 75.0,
            max_c: 85.0,
            weight: 1.0,
            cap_c: None,
        },
        Zone {
            name: "warm".into(),
            min_c: 60.0,
            max_c: 70.0,
            weight: 1.0,
            cap_c: None,
        },
    ];
    for i in 0..w * h {
        let (r, c) = (i / w, i % w);
        p.food[i] = 1 + (c >= w / 2) as u8 + 2 * (r >= h / 2) as u8;
        p.zone[i] = 1 + ((r + c) % 2) as u8;
    }
    p
}
