//! Invented bench runs, as a "traycast-runs 1" CSV the reader beside this module takes: the
//! illustrative field model and the thermal model seen through lagging, noisy probes. For trying
//! calibration on any tray; illustrative data, not measurements.

use crate::model::{MapSource, Plan};

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
    /// Correlation of the noise between successive readings (AR(1), 0 for white noise): a
    /// probe's drift and the food's own fluctuations make real traces persistent.
    pub noise_rho: f64,
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
            noise_rho: 0.0,
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
    // The probes read each column's mean: calibration fits column-mean warming rates (a probe at
    // one depth of a thick piece would read its own layer, which calibration does not yet model).
    let settings = plan.heating.settings(Settings {
        standing: 0.0,
        record_every: recipe.step,
        frames: traycast_thermal::simulate::View::Mean,
        ..Settings::default()
    });
    let mut rng = traycast_rng::SplitMix::new(recipe.seed);
    let mut out = format!(
        "# traycast-runs 1\n# name: Illustrative bench runs, {} (invented data)\n# each configuration heated alone for {} s, probes every {} cell(s), sensor lag {} s, noise {} K (reading-to-reading correlation {})\nrun,config,time_s,row,col,temp_c\n",
        plan.name, recipe.seconds, every, recipe.lag_s, recipe.noise_k, recipe.noise_rho
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
        let rho = recipe.noise_rho.clamp(0.0, 0.99);
        for &i in &probes {
            // White noise draws exactly what it always drew: one normal per reading.
            let mut noise = if rho > 0.0 {
                recipe.noise_k * rng.normal()
            } else {
                0.0
            };
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
                noise = rho * noise + (1.0 - rho * rho).sqrt() * recipe.noise_k * rng.normal();
                let reading = ((seen + noise) * 10.0).round() / 10.0;
                out.push_str(&format!("{id},{c},{t},{},{},{reading:.1}\n", i / w, i % w));
            }
        }
    }
    Ok(out)
}
