//! How far a plan survives food placed a little off: the schedule is kept, the foods (and their
//! targets) move by one cell, the maps follow the new layout, and the band error is recomputed.

use crate::error::PlanError;
use crate::evaluate::{Evaluator, linear_prediction};
use crate::library::MapLibrary;
use crate::model::Plan;

/// Band error under small placement errors.
#[derive(Clone, Debug, PartialEq)]
pub struct Robustness {
    /// RMS distance outside the bands with the food where planned, K (linear prediction).
    pub nominal_rms: f64,
    /// (dx, dy, RMS) for each one-cell shift.
    pub shifted: Vec<(i32, i32, f64)>,
    /// Largest RMS over the shifts, K.
    pub worst_rms: f64,
    /// Median RMS over the shifts, K.
    pub typical_rms: f64,
}

fn shifted(plan: &Plan, dx: i32, dy: i32) -> Plan {
    let (w, h) = (plan.tray.width as i32, plan.tray.height as i32);
    let mut p = plan.clone();
    p.food.iter_mut().for_each(|v| *v = 0);
    p.zone.iter_mut().for_each(|v| *v = 0);
    for r in 0..h {
        for c in 0..w {
            let (nr, nc) = (r + dy, c + dx);
            if (0..h).contains(&nr) && (0..w).contains(&nc) {
                let (from, to) = ((r * w + c) as usize, (nr * w + nc) as usize);
                p.food[to] = plan.food[from];
                p.zone[to] = plan.zone[from];
            }
        }
    }
    p
}

fn band_rms(plan: &Plan, temps: &[f64]) -> f64 {
    let errs: Vec<f64> = (0..plan.tray.cells())
        .filter_map(|i| {
            plan.zone_at(i).map(|z| {
                let zone = &plan.zones[z];
                let hi = zone.cap_c.map_or(zone.max_c, |c| c.min(zone.max_c));
                traycast_solver::band_distance(temps[i], zone.min_c, hi)
            })
        })
        .collect();
    if errs.is_empty() {
        0.0
    } else {
        (errs.iter().map(|e| e * e).sum::<f64>() / errs.len() as f64).sqrt()
    }
}

/// Re-evaluates `dwell` with the foods shifted one cell left, right, up and down.
pub fn robustness(
    plan: &Plan,
    library: Option<&MapLibrary>,
    dwell: &[f64],
) -> Result<Robustness, PlanError> {
    let mut ev = Evaluator::with_library(library.cloned());
    let maps = ev.maps(plan)?.clone();
    let nominal_rms = band_rms(plan, &linear_prediction(plan, &maps, dwell));
    let mut shifts = Vec::new();
    for (dx, dy) in [(1, 0), (-1, 0), (0, 1), (0, -1)] {
        let p = shifted(plan, dx, dy);
        let maps = ev.maps(&p)?.clone();
        shifts.push((dx, dy, band_rms(&p, &linear_prediction(&p, &maps, dwell))));
    }
    let mut sorted: Vec<f64> = shifts.iter().map(|s| s.2).collect();
    sorted.sort_by(f64::total_cmp);
    Ok(Robustness {
        nominal_rms,
        worst_rms: *sorted.last().expect("four shifts"),
        typical_rms: 0.5 * (sorted[1] + sorted[2]),
        shifted: shifts,
    })
}
