//! Why a zone misses its band, and each zone's outcome: coverage and RMS distance, linear and
//! simulated, with the diagnosis that names the physics or the setting that stops it.

use super::Evaluator;
use super::prepared::Prepared;
use super::problem::rms;
use super::report::ZoneSummary;
use crate::model::Plan;
use traycast_solver::Status;

/// Why a zone misses its band.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub enum Diagnosis {
    /// The oven's physics: no mixture of configurations separates this zone from another.
    Physics(String),
    /// A setting (budget, per-configuration limit) stops the plan reaching the band.
    Setting(String),
}

impl std::fmt::Display for Diagnosis {
    /// "physics: …" or "setting: …", as every front end prints it.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Diagnosis::Physics(m) => write!(f, "physics: {m}"),
            Diagnosis::Setting(m) => write!(f, "setting: {m}"),
        }
    }
}

impl Evaluator {
    pub(super) fn zone_summaries(
        &self,
        plan: &Plan,
        prep: &Prepared,
        sol: &traycast_solver::Solution,
        dwell: &[f64],
        lin: &[f64],
        sim: &[f64],
    ) -> Vec<ZoneSummary> {
        let maps = self.maps.as_ref().expect("set");
        let n = maps.cells;
        let profile = |z: usize| -> Vec<f64> {
            let cells = &prep.zone_cells()[z];
            (0..maps.configs)
                .map(|c| {
                    cells.iter().map(|&i| maps.loaded[c * n + i]).sum::<f64>()
                        / cells.len().max(1) as f64
                })
                .collect()
        };
        let profiles: Vec<Vec<f64>> = (0..plan.zones.len()).map(profile).collect();
        let cosine = |a: &[f64], b: &[f64]| {
            let dot: f64 = a.iter().zip(b).map(|(x, y)| x * y).sum();
            let na: f64 = a.iter().map(|x| x * x).sum::<f64>().sqrt();
            let nb: f64 = b.iter().map(|x| x * x).sum::<f64>().sqrt();
            if na * nb > 0.0 { dot / (na * nb) } else { 0.0 }
        };
        let mid_rise = |z: usize| -> f64 {
            let cells = &prep.zone_cells()[z];
            let zone = &plan.zones[z];
            cells
                .iter()
                .map(|&i| 0.5 * (zone.min_c + zone.max_c) - prep.start[i])
                .sum::<f64>()
                / cells.len().max(1) as f64
        };
        let at_limit = plan
            .oven
            .limit_s
            .is_some_and(|l| dwell.iter().any(|d| *d >= l - 1e-6));
        (0..plan.zones.len())
            .map(|z| {
                let cells = &prep.zone_cells()[z];
                let share = |e: &[f64]| if cells.is_empty() { f64::NAN } else { cells.iter().filter(|&&i| e[i] == 0.0).count() as f64 / cells.len() as f64 };
                let rms_l = rms(cells.iter().map(|&i| lin[i]));
                let diagnosis = (rms_l > 1.0).then(|| {
                    if sol.status == Status::BudgetBinding {
                        return Diagnosis::Setting(format!(
                            "the time budget of {:.0} s is binding (each extra second would lower the objective by {:.2})",
                            plan.oven.budget_s.unwrap_or(0.0),
                            sol.budget_multiplier
                        ));
                    }
                    if at_limit {
                        return Diagnosis::Setting(format!("a configuration is held at the per-configuration limit of {:.0} s", plan.oven.limit_s.unwrap_or(0.0)));
                    }
                    let twin = (0..plan.zones.len())
                        .filter(|&w| w != z && (mid_rise(w) - mid_rise(z)).abs() > 5.0)
                        .map(|w| (w, cosine(&profiles[z], &profiles[w])))
                        .max_by(|a, b| a.1.total_cmp(&b.1));
                    match twin {
                        Some((w, s)) if s > 0.97 => Diagnosis::Physics(format!(
                            "every configuration heats '{}' almost like '{}' (similarity {s:.3}), so they cannot reach temperatures this different",
                            plan.zones[z].name, plan.zones[w].name
                        )),
                        _ => Diagnosis::Physics(format!(
                            "no mixture of the {} configurations heats '{}' into its band while meeting the other targets",
                            maps.configs, plan.zones[z].name
                        )),
                    }
                });
                ZoneSummary {
                    coverage_linear: share(lin),
                    coverage_simulated: share(sim),
                    rms_linear: rms_l,
                    rms_simulated: rms(cells.iter().map(|&i| sim[i])),
                    diagnosis,
                }
            })
            .collect()
    }
}
