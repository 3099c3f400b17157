//! How far a plan survives what it cannot control: food placed a cell off, an oven weaker or
//! stronger than rated, rates anywhere within their standard errors. The schedule is kept and each
//! scenario recomputed: the band error ([`robustness`], linear, placement) or each item's safety
//! margin ([`safety_margins`], simulated, over a [`ScenarioSet`]), whose distribution
//! [`SafetyMargins`] summarises (least and where, a chosen quantile, median, largest).

use crate::error::PlanError;
use crate::evaluate::{Evaluator, PlanMaps, linear_prediction};
use crate::library::MapLibrary;
use crate::model::Plan;
use traycast_rng::SplitMix;

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

/// Which scenarios a margin distribution covers: every combination of a placement, an oven power
/// and a draw of the rates.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ScenarioSet {
    /// The food one cell off in each direction as well as where planned.
    pub placement: bool,
    /// Oven power this fraction weaker and stronger as well as nominal (0: nominal only).
    pub power: f64,
    /// Draws of the rates from their standard errors, besides the rates as mapped (0: none).
    pub rate_draws: usize,
    /// Seed of the draws.
    pub seed: u64,
}

/// Most scenarios one distribution simulates (each is a full time course).
pub const MAX_SCENARIOS: usize = 400;

impl ScenarioSet {
    /// Placement only: as planned and one cell off each way.
    pub fn placement() -> Self {
        ScenarioSet {
            placement: true,
            power: 0.0,
            rate_draws: 0,
            seed: 1,
        }
    }

    /// How many scenarios the set holds, or what is wrong with it (naming the field).
    pub fn count(&self) -> Result<usize, PlanError> {
        if !(0.0..=0.5).contains(&self.power) {
            return Err(PlanError::new(
                "scenarios.power",
                format!(
                    "{} is not a share of the rated power between 0 and 0.5",
                    self.power
                ),
            ));
        }
        let n = if self.placement { 5 } else { 1 }
            * if self.power > 0.0 { 3 } else { 1 }
            * (1 + self.rate_draws);
        if n > MAX_SCENARIOS {
            return Err(PlanError::new(
                "scenarios.rate_draws",
                format!(
                    "{n} scenarios are too many to simulate (at most {MAX_SCENARIOS}): draw fewer rates or leave out placement or power"
                ),
            ));
        }
        Ok(n)
    }
}

/// Each item's safety margin in each scenario: the margin of its own verdict rule at its own
/// coldest (or, for a cold-holding rule, warmest) point in that scenario's simulation, with no
/// allowance added: the scenarios are the allowance. The plan's verdict itself stays judged on
/// its bounds.
#[derive(Clone, Debug, PartialEq)]
pub struct SafetyMargins {
    /// Scenario names, "as planned" first.
    pub scenarios: Vec<String>,
    /// Margin per scenario and item, K (NaN where it cannot be judged).
    pub margins: Vec<Vec<f64>>,
}

impl SafetyMargins {
    /// Item `k`'s margins, ascending, each with its scenario (NaN, which cannot be judged, first).
    fn sorted(&self, k: usize) -> Vec<(f64, usize)> {
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
        v
    }

    /// Item `k`'s least, median and largest margin over the scenarios, and the scenario of the
    /// least (NaN margins count as least).
    pub fn spread(&self, k: usize) -> (f64, f64, f64, &str) {
        let v = self.sorted(k);
        let median = if v.len() % 2 == 1 {
            v[v.len() / 2].0
        } else {
            0.5 * (v[v.len() / 2 - 1].0 + v[v.len() / 2].0)
        };
        (v[0].0, median, v[v.len() - 1].0, &self.scenarios[v[0].1])
    }

    /// Item `k`'s lower `q` quantile of the margin (0 ≤ q ≤ 1): the order statistic at or below
    /// it, never interpolated upwards, so it errs towards the smaller margin.
    pub fn quantile(&self, k: usize, q: f64) -> f64 {
        let v = self.sorted(k);
        let at = (q.clamp(0.0, 1.0) * (v.len() - 1) as f64).floor() as usize;
        v[at].0
    }
}

/// Simulates `dwell` in every scenario of `set` and judges every item in each.
pub fn safety_margins(
    plan: &Plan,
    library: Option<&MapLibrary>,
    dwell: &[f64],
    set: &ScenarioSet,
) -> Result<SafetyMargins, PlanError> {
    set.count()?;
    let places: &[(&str, i32, i32)] = if set.placement {
        &[
            ("as planned", 0, 0),
            ("one cell right", 1, 0),
            ("one cell left", -1, 0),
            ("one cell down", 0, 1),
            ("one cell up", 0, -1),
        ]
    } else {
        &[("as planned", 0, 0)]
    };
    let powers: Vec<f64> = if set.power > 0.0 {
        vec![1.0, 1.0 - set.power, 1.0 + set.power]
    } else {
        vec![1.0]
    };
    let mut ev = Evaluator::with_library(library.cloned());
    if set.rate_draws > 0 && ev.maps(plan)?.loaded_se.is_none() {
        return Err(PlanError::new(
            "scenarios.rate_draws",
            "these maps carry no standard errors, so there is no rate uncertainty to draw from: calibrate from bench runs, or draw none",
        ));
    }
    let mut rng = SplitMix::new(set.seed);
    let (mut names, mut margins) = (Vec::new(), Vec::new());
    for &(place, dx, dy) in places {
        let p = if (dx, dy) == (0, 0) {
            plan.clone()
        } else {
            shifted(plan, dx, dy)
        };
        for &power in &powers {
            for draw in 0..=set.rate_draws {
                // One relative factor per rate: the oven's power, and a draw of the rate within
                // its standard error (never below zero).
                let mut factor = |maps: &mut PlanMaps| {
                    let se = maps.loaded_se.clone();
                    for (j, (l, t)) in maps
                        .loaded
                        .iter_mut()
                        .zip(maps.thawed.iter_mut())
                        .enumerate()
                    {
                        let drawn = match (&se, draw) {
                            (Some(se), 1..) if *l > 0.0 => {
                                (1.0 + se[j] / *l * rng.normal()).max(0.0)
                            }
                            _ => 1.0,
                        };
                        *l *= power * drawn;
                        *t *= power * drawn;
                    }
                };
                let e = ev.evaluate_dwell_with(&p, dwell, &mut factor)?;
                margins.push(
                    e.items
                        .iter()
                        .map(|it| {
                            it.spread
                                .as_ref()
                                .map_or(it.verdict.margin, |s| s.nominal.margin)
                        })
                        .collect(),
                );
                let mut name = place.to_string();
                if power != 1.0 {
                    name += &format!(", power {:+.0} %", 100.0 * (power - 1.0));
                }
                if draw > 0 {
                    name += &format!(", rates drawn #{draw}");
                }
                names.push(name);
            }
        }
    }
    Ok(SafetyMargins {
        scenarios: names,
        margins,
    })
}

#[cfg(test)]
mod tests {
    use super::{ScenarioSet, safety_margins};
    use crate::demos;
    use crate::evaluate::{Evaluator, Options};

    /// A weaker oven leaves every heated item a smaller margin than a stronger one (common
    /// practice: less energy in, colder food), and the quantile sits between the least and the
    /// median.
    #[test]
    fn power_scenarios_order_the_margins_and_the_quantile_sits_inside() {
        let plan = demos::demo("hot-lunch").expect("demo");
        let e = Evaluator::new()
            .evaluate(&plan, Options::default())
            .expect("evaluates");
        let set = ScenarioSet {
            placement: false,
            power: 0.15,
            rate_draws: 0,
            seed: 1,
        };
        let m = safety_margins(&plan, None, &e.dwell, &set).expect("scenarios");
        assert_eq!(m.scenarios.len(), 3);
        assert!(m.scenarios[1].contains("-15 %") && m.scenarios[2].contains("+15 %"));
        for k in 0..plan.items.len() {
            let (weak, strong) = (m.margins[1][k], m.margins[2][k]);
            assert!(weak < strong, "item {k}: weak {weak} strong {strong}");
            let (least, median, _, _) = m.spread(k);
            let q = m.quantile(k, 0.05);
            assert!(least <= q && q <= median);
        }
    }

    #[test]
    fn impossible_or_oversized_scenario_sets_name_their_field() {
        let plan = demos::demo("hot-lunch").expect("demo");
        let dwell = vec![1.0; plan.oven.configs];
        let draws = ScenarioSet {
            rate_draws: 3,
            ..ScenarioSet::placement()
        };
        let e = safety_margins(&plan, None, &dwell, &draws).unwrap_err();
        assert!(e.to_string().contains("scenarios.rate_draws"), "{e}");
        assert!(e.to_string().contains("no standard errors"), "{e}");
        let huge = ScenarioSet {
            rate_draws: 1000,
            ..ScenarioSet::placement()
        };
        assert!(huge.count().unwrap_err().to_string().contains("too many"));
        let power = ScenarioSet {
            power: 0.9,
            ..ScenarioSet::placement()
        };
        assert!(
            power
                .count()
                .unwrap_err()
                .to_string()
                .contains("scenarios.power")
        );
    }
}
