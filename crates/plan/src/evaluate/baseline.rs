//! The unsteered baseline: the same tray heated with every configuration alike, for comparison.

use super::maps::PlanMaps;
use super::problem::{band_distance, bands, rms, start_temps};
use super::report::Baseline;
use crate::model::Plan;

/// No steering: the average of all configurations (what a turntable-less oven without field
/// control approximates), run until the coldest targeted cell reaches its band minimum.
pub fn baseline(plan: &Plan, maps: &PlanMaps) -> Baseline {
    let n = maps.cells;
    let band = bands(plan);
    let start = start_temps(plan);
    let avg: Vec<f64> = (0..n)
        .map(|i| {
            (0..maps.configs)
                .map(|c| maps.loaded[c * n + i])
                .sum::<f64>()
                / maps.configs as f64
        })
        .collect();
    let targeted: Vec<usize> = (0..n).filter(|&i| band[i].is_some()).collect();
    let need = targeted
        .iter()
        .map(|&i| {
            let rise = band[i].expect("targeted").0 - start[i];
            if rise <= 0.0 {
                0.0
            } else if avg[i] > 0.0 {
                rise / avg[i]
            } else {
                f64::INFINITY
            }
        })
        .fold(0.0f64, f64::max);
    let cap = plan.oven.budget_s.unwrap_or(3600.0);
    let seconds = need.min(cap);
    let errs: Vec<f64> = targeted
        .iter()
        .map(|&i| {
            let (a, b) = band[i].expect("targeted");
            band_distance(start[i] + avg[i] * seconds, a, b)
        })
        .collect();
    Baseline {
        seconds,
        rms_linear: rms(errs.iter().copied()),
        coverage_linear: if errs.is_empty() {
            f64::NAN
        } else {
            errs.iter().filter(|e| **e == 0.0).count() as f64 / errs.len() as f64
        },
    }
}
