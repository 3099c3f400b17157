//! The unsteered baseline: the same tray heated with every configuration alike, for comparison.

use super::maps::PlanMaps;
use super::prepared::Prepared;
use super::problem::{band_distance, rms};
use super::report::Baseline;
use crate::model::Plan;

/// No steering: the average of all configurations (what a turntable-less oven without field
/// control approximates), run until the coldest targeted cell reaches its band minimum.
pub fn baseline(plan: &Plan, maps: &PlanMaps) -> Baseline {
    of(plan, &Prepared::new(plan), maps)
}

/// [`baseline`] from the plan's prepared facts.
pub(super) fn of(plan: &Plan, prep: &Prepared, maps: &PlanMaps) -> Baseline {
    let n = maps.cells;
    let (start, targeted) = (&prep.start, &prep.rows);
    // Mean rate over the configurations, for the targeted cells only, map by map.
    let mut avg = vec![0.0; targeted.len()];
    for c in 0..maps.configs {
        let map = &maps.loaded[c * n..(c + 1) * n];
        for (a, &i) in avg.iter_mut().zip(targeted) {
            *a += map[i];
        }
    }
    avg.iter_mut().for_each(|a| *a /= maps.configs as f64);
    let need = targeted
        .iter()
        .zip(&avg)
        .map(|(&i, &rate)| {
            let rise = prep.band(i).expect("targeted").0 - start[i];
            if rise <= 0.0 {
                0.0
            } else if rate > 0.0 {
                rise / rate
            } else {
                f64::INFINITY
            }
        })
        .fold(0.0f64, f64::max);
    let cap = plan.oven.budget_s.unwrap_or(3600.0);
    let seconds = need.min(cap);
    // Every food cell's temperature under the baseline, for the uniformity figures.
    let mut temps = start.clone();
    for c in 0..maps.configs {
        let map = &maps.loaded[c * n..(c + 1) * n];
        for (t, r) in temps.iter_mut().zip(map) {
            *t += r * seconds / maps.configs as f64;
        }
    }
    let errs: Vec<f64> = targeted
        .iter()
        .zip(&avg)
        .map(|(&i, &rate)| {
            let (a, b) = prep.band(i).expect("targeted");
            band_distance(start[i] + rate * seconds, a, b)
        })
        .collect();
    Baseline {
        seconds,
        temps,
        rms_linear: rms(errs.iter().copied()),
        coverage_linear: if errs.is_empty() {
            f64::NAN
        } else {
            errs.iter().filter(|e| **e == 0.0).count() as f64 / errs.len() as f64
        },
    }
}
