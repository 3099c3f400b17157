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
        let at_limit: Vec<usize> = plan.oven.limit_s.map_or(Vec::new(), |l| {
            (0..dwell.len()).filter(|&j| dwell[j] >= l - 1e-6).collect()
        });
        // Each zone's miss: RMS, mean signed error and the cells below and above its band.
        let misses: Vec<Miss> = (0..plan.zones.len())
            .map(|z| Miss::of(&prep.zone_cells()[z], lin))
            .collect();
        let name = |z: usize| &plan.zones[z].name;
        // Each zone's partner in a conflict: the zone clearly missing the other way that the
        // configurations heat most like it (their profiles at least half alike).
        let partner: Vec<Option<(usize, f64)>> = (0..plan.zones.len())
            .map(|z| {
                let side = misses[z].side()?;
                (0..plan.zones.len())
                    .filter(|&w| w != z && misses[w].side().is_some_and(|o| o != side))
                    .map(|w| (w, cosine(&profiles[z], &profiles[w])))
                    .filter(|&(_, s)| s >= 0.5)
                    .max_by(|a, b| a.1.total_cmp(&b.1))
            })
            .collect();
        (0..plan.zones.len())
            .map(|z| {
                let cells = &prep.zone_cells()[z];
                let share = |e: &[f64]| if cells.is_empty() { f64::NAN } else { cells.iter().filter(|&&i| e[i] == 0.0).count() as f64 / cells.len() as f64 };
                let miss = &misses[z];
                let diagnosis = (miss.rms > 1.0).then(|| {
                    let how = miss.words();
                    if sol.status == Status::BudgetBinding {
                        return Diagnosis::Setting(format!(
                            "'{}' {how}: the time budget of {:.0} s binds (one more second would lower the objective by {:.2}); raise the budget",
                            name(z),
                            plan.oven.budget_s.unwrap_or(0.0),
                            sol.budget_multiplier
                        ));
                    }
                    if !at_limit.is_empty() && miss.side() == Some(Side::Cold) {
                        let list: Vec<String> = at_limit.iter().map(|j| j.to_string()).collect();
                        let held = if list.len() == 1 {
                            format!("configuration {} is", list[0])
                        } else {
                            format!("configurations {} are", list.join(", "))
                        };
                        return Diagnosis::Setting(format!(
                            "'{}' {how}: {held} held at the per-configuration limit of {:.0} s; raise the limit",
                            name(z),
                            plan.oven.limit_s.unwrap_or(0.0)
                        ));
                    }
                    // A conflict is told in full once: on the first zone of a pair that are each
                    // other's partner, or on a zone whose partner's own partner is another.
                    if let Some((w, s)) = partner[z] {
                        let mutual = partner[w].is_some_and(|(v, _)| v == z);
                        return Diagnosis::Physics(if z < w || !mutual {
                            format!(
                                "'{}' {how} while '{}' {}: the configurations that heat one heat the other (profile similarity {s:.2}), so more time warms both; widen one band, lower one weight, or move one food to where the fields differ",
                                name(z), name(w), misses[w].words()
                            )
                        } else {
                            format!(
                                "'{}' {how}: the other side of the conflict with '{}' (see there)",
                                name(z), name(w)
                            )
                        });
                    }
                    let twin = (0..plan.zones.len())
                        .filter(|&w| w != z && (mid_rise(w) - mid_rise(z)).abs() > 5.0)
                        .map(|w| (w, cosine(&profiles[z], &profiles[w])))
                        .max_by(|a, b| a.1.total_cmp(&b.1));
                    match twin {
                        Some((w, s)) if s > 0.97 => Diagnosis::Physics(format!(
                            "'{}' {how}: every configuration heats it almost like '{}' (similarity {s:.3}), so they cannot reach temperatures this different; bring the two bands closer",
                            name(z), name(w)
                        )),
                        _ if miss.side().is_none() => Diagnosis::Physics(format!(
                            "'{}' {how}: the {} configurations leave more spread across it than its band allows; widen the band, or let it stand longer so conduction evens it out (the simulated figures show how far)",
                            name(z), maps.configs
                        )),
                        _ => Diagnosis::Physics(format!(
                            "'{}' {how}: no mixture of the {} configurations reaches its band while meeting the other targets; relax a target or its weight",
                            name(z), maps.configs
                        )),
                    }
                });
                ZoneSummary {
                    coverage_linear: share(lin),
                    coverage_simulated: share(sim),
                    rms_linear: miss.rms,
                    rms_simulated: rms(cells.iter().map(|&i| sim[i])),
                    diagnosis,
                }
            })
            .collect()
    }
}

/// Which way a zone misses.
#[derive(Clone, Copy, PartialEq)]
enum Side {
    Cold,
    Hot,
}

/// How a zone misses its band in the linear prediction.
struct Miss {
    /// RMS distance outside the band, K.
    rms: f64,
    /// Mean signed distance, K: negative too cold, positive too hot.
    mean: f64,
    /// Cells below the band, and above it.
    below: usize,
    above: usize,
    /// Cells of the zone.
    cells: usize,
}

impl Miss {
    fn of(cells: &[usize], err: &[f64]) -> Self {
        let vals: Vec<f64> = cells
            .iter()
            .map(|&i| err[i])
            .filter(|e| e.is_finite())
            .collect();
        Miss {
            rms: rms(cells.iter().map(|&i| err[i])),
            mean: vals.iter().sum::<f64>() / vals.len().max(1) as f64,
            below: vals.iter().filter(|&&e| e < 0.0).count(),
            above: vals.iter().filter(|&&e| e > 0.0).count(),
            cells: cells.len(),
        }
    }

    /// The way it misses, when one way dominates (the mean distance is at least half the RMS);
    /// None when it misses both ways alike.
    fn side(&self) -> Option<Side> {
        if self.rms <= 1.0 || self.mean.abs() < 0.5 * self.rms {
            None
        } else if self.mean < 0.0 {
            Some(Side::Cold)
        } else {
            Some(Side::Hot)
        }
    }

    /// "ends too cold (1.8 K below on average; 41 of 80 cells below the band, 3 above)", or
    /// "misses both ways (…)".
    fn words(&self) -> String {
        let counts = format!(
            "{} of {} cells below the band, {} above",
            self.below, self.cells, self.above
        );
        match self.side() {
            Some(Side::Cold) => format!(
                "ends too cold ({:.1} K below on average; {counts})",
                -self.mean
            ),
            Some(Side::Hot) => format!(
                "ends too hot ({:.1} K above on average; {counts})",
                self.mean
            ),
            None => format!("misses both ways ({counts}; {:.1} K RMS)", self.rms),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::Diagnosis;
    use crate::demos;
    use crate::evaluate::{Evaluator, Options};

    fn diagnoses(plan: &crate::model::Plan) -> Vec<Option<Diagnosis>> {
        let e = Evaluator::new()
            .evaluate(plan, Options::default())
            .expect("evaluates");
        e.zones.into_iter().map(|z| z.diagnosis).collect()
    }

    /// A conflict is told once, in full, naming both zones and which way each misses; the other
    /// zone of the pair points to it.
    #[test]
    fn a_conflict_is_told_once_with_both_directions() {
        let plan = demos::demo("lunch-tray").expect("demo");
        let d = diagnoses(&plan);
        let text: Vec<String> = d
            .iter()
            .map(|d| d.as_ref().map_or(String::new(), ToString::to_string))
            .collect();
        let full: Vec<&String> = text.iter().filter(|t| t.contains(" while '")).collect();
        assert_eq!(full.len(), 1, "{text:#?}");
        assert!(
            full[0].contains("too cold") && full[0].contains("too hot"),
            "{}",
            full[0]
        );
        let pointers = text
            .iter()
            .filter(|t| t.contains("the other side of the conflict"))
            .count();
        assert_eq!(pointers, 1, "{text:#?}");
    }

    /// A budget too short names the budget as the setting that binds, the direction (too cold)
    /// and what to change.
    #[test]
    fn a_short_budget_is_named_as_the_binding_setting() {
        let mut plan = demos::demo("hot-lunch").expect("demo");
        plan.oven.budget_s = Some(30.0);
        let d = diagnoses(&plan);
        let setting = d
            .iter()
            .flatten()
            .find_map(|d| match d {
                Diagnosis::Setting(m) => Some(m.clone()),
                Diagnosis::Physics(_) => None,
            })
            .expect("a setting binds");
        assert!(setting.contains("time budget of 30 s binds"), "{setting}");
        assert!(
            setting.contains("too cold") && setting.contains("raise the budget"),
            "{setting}"
        );
    }
}
