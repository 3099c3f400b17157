//! Demo scenarios of our own. All illustrative: invented trays, the synthetic field model, no real
//! product or measurement behind them.

use crate::model::{FoodItem, MapSource, Oven, Plan, Sequencing, Zone};

/// Names of the demos, in the order `traycast demo` lists them.
pub const DEMOS: [&str; 3] = ["lunch-tray", "frozen-portion", "side-by-side"];

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
                // Bands sit above the safe minimum so the coldest cell, not the average, clears it.
                zone("Chicken 85–98 °C", 85.0, 98.0, 3.0, None),
                zone("Rice 82–96 °C", 82.0, 96.0, 1.0, None),
                zone("Broccoli 65–75 °C", 65.0, 75.0, 1.0, None),
                zone("Pudding stays cool", -40.0, 10.0, 0.2, None),
            ];
            paint(&mut p, 1, 1, 1..13, 1..9);
            paint(&mut p, 2, 2, 15..27, 1..9);
            paint(&mut p, 3, 3, 1..13, 10..17);
            paint(&mut p, 4, 4, 19..27, 11..17);
            p
        }
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

/// How to invent bench runs for a demo plan (see [`heating_runs`]).
#[derive(Clone, Debug, PartialEq)]
pub struct RunRecipe {
    /// Heating time per run, s.
    pub seconds: f64,
    /// Reading interval, s.
    pub step: f64,
    /// Probe spacing in cells (1: every food cell, as a thermal camera would give).
    pub probe_every: usize,
    /// First-order sensor time constant, s.
    pub lag_s: f64,
    /// Reading noise, K (1 σ); readings are rounded to 0.1 K as a logger would.
    pub noise_k: f64,
    /// Configurations run a second time (for the repeatability check).
    pub repeat: Vec<usize>,
    /// Seed of the noise.
    pub seed: u64,
}

impl Default for RunRecipe {
    fn default() -> Self {
        RunRecipe {
            seconds: 40.0,
            step: 2.0,
            probe_every: 2,
            lag_s: 3.0,
            noise_k: 0.15,
            repeat: vec![0],
            seed: 1,
        }
    }
}

/// Invented bench runs of a demo plan, as a "traycast-runs 1" CSV: each configuration heated on
/// its own for `recipe.seconds` from the plan's start temperatures (frozen items from 4 °C, as
/// calibration runs are best made), simulated with the illustrative field model and the thermal
/// model, seen through lagging, noisy probes. Illustrative data for trying calibration, not
/// measurements.
pub fn heating_runs(plan: &Plan, recipe: &RunRecipe) -> Result<String, crate::PlanError> {
    use crate::evaluate::{maps_for, materials, time_course};
    use traycast_thermal::schedule::Schedule;
    use traycast_thermal::simulate::Settings;
    // Always the illustrative field model (a plan on a library keeps its layout, seed 1), and
    // frozen items run thawed at 4 °C, as calibration runs are best made: the library's rates are
    // thawed rates, and a short run from frozen spends itself on the thaw plateau.
    let mut plan = plan.clone();
    if !matches!(plan.maps, MapSource::Synthetic { .. }) {
        plan.maps = MapSource::Synthetic { seed: 1 };
    }
    let mut thawed = Vec::new();
    let margin = crate::calibrate::Settings::default().thaw_margin_k;
    for k in 0..plan.items.len() {
        let freeze = plan.catalogue_food(k).map_or(0.0, |f| f.freezing_point);
        if plan.items[k].start_c < freeze + margin {
            plan.items[k].start_c = 4.0;
            thawed.push(plan.items[k].name.clone());
        }
    }
    let plan = &plan;
    let maps = maps_for(plan, None)?;
    let mats = materials(plan)?;
    let (n, w) = (plan.tray.cells(), plan.tray.width);
    let every = recipe.probe_every.max(1);
    let probes: Vec<usize> = (0..n)
        .filter(|&i| plan.food[i] > 0 && (i / w) % every == 0 && (i % w) % every == 0)
        .collect();
    let settings = Settings {
        standing: 0.0,
        record_every: recipe.step,
        ..Settings::default()
    };
    let mut rng = traycast_solver::synthetic::SplitMix::new(recipe.seed);
    let mut out = format!(
        "# traycast-runs 1\n# name: Illustrative bench runs, {} (invented data)\n# each configuration heated alone for {} s, probes every {} cell(s), sensor lag {} s, noise {} K\nrun,config,time_s,row,col,temp_c\n",
        plan.name, recipe.seconds, every, recipe.lag_s, recipe.noise_k
    );
    if !thawed.is_empty() {
        out.insert_str(
            out.find("run,config").expect("header written"),
            &format!("# run thawed from 4 °C: {}\n", thawed.join(", ")),
        );
    }
    let order = (0..plan.oven.configs)
        .map(|c| (c, format!("c{c}")))
        .chain(recipe.repeat.iter().map(|&c| (c, format!("c{c}-again"))));
    for (c, id) in order {
        let mut dwell = vec![0.0; plan.oven.configs];
        dwell[c] = recipe.seconds;
        let course = time_course(plan, &maps, &mats, &Schedule::blocks(&dwell), &settings)?;
        for &i in &probes {
            let mut seen = course.frames[0][i];
            let (mut last_t, mut last_temp) = (course.times[0], course.frames[0][i]);
            for (t, frame) in course.times.iter().zip(&course.frames) {
                // A first-order sensor, dy/dt = (T − y)/τ, stepped exactly for a temperature that
                // runs linearly between recorded frames.
                let (dt, temp) = (t - last_t, frame[i]);
                if dt > 0.0 {
                    let tau = recipe.lag_s.max(1e-9);
                    let slope = (temp - last_temp) / dt;
                    seen =
                        temp - slope * tau + (seen - last_temp + slope * tau) * (-dt / tau).exp();
                }
                (last_t, last_temp) = (*t, temp);
                let reading = ((seen + recipe.noise_k * rng.normal()) * 10.0).round() / 10.0;
                out.push_str(&format!("{id},{c},{t},{},{},{reading:.1}\n", i / w, i % w));
            }
        }
    }
    Ok(out)
}
