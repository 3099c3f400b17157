//! How far a plan survives food placed a little off: the schedule is kept, the foods (and their
//! targets) move by one cell, the maps follow the new layout, and the band error
//! ([`robustness`], linear) or each item's safety margin ([`safety_margins`], simulated, judged
//! as the plan's own verdicts are — on the bounds, which already allow for oven power, start
//! temperature and the maps' errors) is recomputed.

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

/// Each item's safety margin over the placement scenarios: as planned and one cell off in each
/// direction.
#[derive(Clone, Debug, PartialEq)]
pub struct SafetyMargins {
    /// Scenario names, "as planned" first.
    pub scenarios: Vec<String>,
    /// Margin per scenario and item, K (the verdict's margin: NaN where it cannot be judged).
    pub margins: Vec<Vec<f64>>,
}

impl SafetyMargins {
    /// Item `k`'s least, median and largest margin over the scenarios, and the scenario of the
    /// least (NaN margins count as least).
    pub fn spread(&self, k: usize) -> (f64, f64, f64, &str) {
        let mut v: Vec<(f64, usize)> = self
            .margins
            .iter()
            .enumerate()
            .map(|(s, m)| {
                (
                    if m[k].is_nan() {
                        f64::NEG_INFINITY
                    } else {
                        m[k]
                    },
                    s,
                )
            })
            .collect();
        v.sort_by(|a, b| a.0.total_cmp(&b.0));
        let median = if v.len() % 2 == 1 {
            v[v.len() / 2].0
        } else {
            0.5 * (v[v.len() / 2 - 1].0 + v[v.len() / 2].0)
        };
        (v[0].0, median, v[v.len() - 1].0, &self.scenarios[v[0].1])
    }
}

/// Simulates `dwell` with the foods where planned and one cell off each way, and judges every
/// item in each.
pub fn safety_margins(
    plan: &Plan,
    library: Option<&MapLibrary>,
    dwell: &[f64],
) -> Result<SafetyMargins, PlanError> {
    let cases = [
        ("as planned", 0, 0),
        ("one cell right", 1, 0),
        ("one cell left", -1, 0),
        ("one cell down", 0, 1),
        ("one cell up", 0, -1),
    ];
    let mut ev = Evaluator::with_library(library.cloned());
    let mut margins = Vec::new();
    for (_, dx, dy) in cases {
        let p = if (dx, dy) == (0, 0) {
            plan.clone()
        } else {
            shifted(plan, dx, dy)
        };
        let e = ev.evaluate_dwell(&p, dwell)?;
        margins.push(e.items.iter().map(|it| it.verdict.margin).collect());
    }
    Ok(SafetyMargins {
        scenarios: cases.iter().map(|c| c.0.to_string()).collect(),
        margins,
    })
}
