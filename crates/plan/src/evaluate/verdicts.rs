//! The food-safety side of an evaluation: per-cell bounds, joint over each item, from the maps'
//! standard errors and the plan's variation, and each item's summary with its verdict (judged on
//! the bounds when there are any).

use super::maps::PlanMaps;
use super::prepared::Prepared;
use super::report::{CellBounds, ItemSummary, JudgedPoint, Spread};
use crate::model::Plan;
use crate::stats;
use traycast_thermal::composition::{BOILING_POINT, LATENT_VAPORISATION};
use traycast_thermal::material::Material;
use traycast_thermal::safety;
use traycast_thermal::simulate::TimeCourse;

/// Per-cell bounds after standing, joint over each item: with 95 % confidence every cell of an item
/// (and so its coldest and its warmest point) lies within its bounds.
///
/// The rates' errors: the linear rise Σ_c r_ic·x_c has the standard deviation √(Σ_c (σ_ic·x_c)²)
/// when the rate errors are independent (`se`; none for maps without errors). Its relative size,
/// at the Bonferroni quantile z = Φ⁻¹(1 − 0.025/n) over the item's n cells (valid whatever the
/// cells' correlation: the least over the cells of per-cell 97.5 % bounds is not a bound on the
/// coldest point), plus the plan's oven-power variation, is taken off (or added to) the energy the
/// cell's coldest point absorbed over the whole course (its enthalpy gain plus the water that layer
/// evaporated). The start-temperature variation takes the enthalpy between the start and the start
/// ± the variation off (or adds it). The bounds are read back through the food's enthalpy curve: a
/// cell whose energy may fall short ends its lower bound on the thaw plateau rather than below it,
/// and a cell that boiled first loses the energy that only evaporated water (water evaporated below
/// boiling buffers nothing). Conduction between cells (which averages errors out) is neglected,
/// which widens the bounds; upper bounds stop at 100 °C. Lower bounds belong to each cell's coldest
/// point, upper bounds to its hottest point (what a cold-holding rule is judged on); the hottest
/// point's energy leaves out what it evaporated, which only matters above the boiling point, where
/// the bound is clamped anyway.
pub fn cell_bounds(
    plan: &Plan,
    prep: &Prepared,
    maps: &PlanMaps,
    se: Option<&[f64]>,
    dwell: &[f64],
    mats: &[Material],
    course: &TimeCourse,
) -> CellBounds {
    let n = maps.cells;
    let z: Vec<f64> = prep
        .item_cells()
        .iter()
        .map(|cells| stats::normal_quantile(1.0 - 0.025 / cells.len().max(1) as f64))
        .collect();
    let (power, start_k) = (plan.variation.oven_power, plan.variation.start_k);
    let mut lower = vec![f64::NAN; n];
    let mut upper = vec![f64::NAN; n];
    for i in 0..n {
        let Some(k) = plan.item_at(i) else { continue };
        let rel = match se {
            Some(se) => {
                let (mut rise, mut var) = (0.0, 0.0);
                for (c, x) in dwell.iter().enumerate() {
                    rise += maps.loaded[c * n + i] * x;
                    var += (se[c * n + i] * x).powi(2);
                }
                if rise > 0.0 { var.sqrt() / rise } else { 0.0 }
            }
            None => 0.0,
        };
        let off = z[k] * rel + power;
        let m = &mats[k];
        let start = plan.items[k].start_c;
        let after = course.after_standing[i];
        // Water boiled off is energy a weaker oven takes away first; water that evaporated from a
        // surface below boiling would have left anyway, so it buffers nothing.
        let evaporated = if course.peak[i] >= BOILING_POINT - 0.5 {
            LATENT_VAPORISATION * course.coldest_evaporated[i]
        } else {
            0.0
        };
        let h = m.enthalpy(after);
        let h_start = m.enthalpy(start);
        let absorbed = h - h_start + evaporated;
        let colder_start = h_start - m.enthalpy(start - start_k);
        let de = off * absorbed.abs() + colder_start;
        lower[i] = m.state((h + evaporated - de).min(h), &mut 0).t.min(after);
        let hot = course.hottest_after_standing[i];
        let h_hot = m.enthalpy(hot);
        let warmer_start = m.enthalpy(start + start_k) - h_start;
        let de_hot = off * (h_hot - h_start).abs() + warmer_start;
        upper[i] = m
            .state(h_hot + de_hot, &mut 0)
            .t
            .clamp(hot, 100.0f64.max(hot));
    }
    CellBounds { lower, upper }
}

/// Each item's outcome after standing: its coldest, mean and warmest temperatures, the share of its
/// zoned cells in band, and the verdict (judged on `bounds` when the maps carry errors).
pub(super) fn item_summaries(
    plan: &Plan,
    prep: &Prepared,
    course: &TimeCourse,
    error_simulated: &[f64],
    bounds: Option<&CellBounds>,
) -> Vec<ItemSummary> {
    let last = course.times.len() - 1;
    (0..plan.items.len())
        .map(|k| {
            let cells_k = &prep.item_cells()[k];
            // Hot rules judge each cell's coldest point, cold-holding rules its hottest.
            let temps: Vec<f64> = cells_k.iter().map(|&i| course.after_standing[i]).collect();
            let hot: Vec<f64> = cells_k
                .iter()
                .map(|&i| course.hottest_after_standing[i])
                .collect();
            let zoned: Vec<f64> = cells_k
                .iter()
                .map(|&i| error_simulated[i])
                .filter(|v| v.is_finite())
                .collect();
            let cat = plan.catalogue_food(k).expect("validated");
            let (temps, hot) = if temps.is_empty() {
                (vec![f64::NAN], vec![f64::NAN])
            } else {
                (temps, hot)
            };
            let handling = safety::Handling {
                stood_seconds: plan.oven.standing_s,
                covered: plan.items[k].covered,
                log_reduction: kill_at_coldest(course, cells_k, cat.safety, None),
            };
            let nominal = safety::verdict_within(cat.safety, &temps, &hot, handling);
            let mean = course.items[k].mean[last];
            // The verdict, the spread, and the per-cell values the verdict was judged on.
            let (verdict, spread, (lo, hi)) = match bounds {
                Some(b) if !cells_k.is_empty() => {
                    let lo: Vec<f64> = cells_k.iter().map(|&i| b.lower[i]).collect();
                    let hi: Vec<f64> = cells_k.iter().map(|&i| b.upper[i]).collect();
                    let fold =
                        |v: &[f64], f: fn(f64, f64) -> f64, start| v.iter().copied().fold(start, f);
                    // How far a bound sits from the point it bounds, averaged over the cells.
                    let shift = |v: &[f64], base: &[f64]| {
                        cells_k
                            .iter()
                            .zip(v)
                            .map(|(&i, x)| x - base[i])
                            .sum::<f64>()
                            / cells_k.len() as f64
                    };
                    let spread = Spread {
                        coldest: (
                            fold(&lo, f64::min, f64::INFINITY),
                            fold(&hi, f64::min, f64::INFINITY),
                        ),
                        mean: (
                            mean + shift(&lo, &course.after_standing),
                            mean + shift(&hi, &course.hottest_after_standing),
                        ),
                        warmest: (
                            fold(&lo, f64::max, f64::NEG_INFINITY),
                            fold(&hi, f64::max, f64::NEG_INFINITY),
                        ),
                        nominal,
                    };
                    let handling = safety::Handling {
                        log_reduction: kill_at_coldest(course, cells_k, cat.safety, Some(b)),
                        ..handling
                    };
                    (
                        safety::verdict_within(cat.safety, &lo, &hi, handling),
                        Some(spread),
                        (lo, hi),
                    )
                }
                _ => (nominal, None, (temps, hot)),
            };
            ItemSummary {
                min: course.items[k].min[last],
                mean: course.items[k].mean[last],
                max: course.items[k].max[last],
                in_band: if zoned.is_empty() {
                    f64::NAN
                } else {
                    zoned.iter().filter(|v| **v == 0.0).count() as f64 / zoned.len() as f64
                },
                judged: judged_point(course, cells_k, &verdict, &lo, &hi),
                verdict,
                moisture_g: course.item_moisture_loss[k] * 1000.0,
                spread,
            }
        })
        .collect()
}

/// The kill of `category`'s target pathogen at the item's coldest point: the least, over its
/// `cells`, of the kill along each cell's coldest-layer history through heating and standing (None
/// for a category without a kill target, or an item without cells). With `bounds`, each history
/// is lowered by the distance from the cell's coldest point to its lower bound after standing: the
/// whole history takes the final shortfall, which is the largest (the energy's uncertainty grows as
/// it is absorbed), so this errs towards less kill.
fn kill_at_coldest(
    course: &TimeCourse,
    cells: &[usize],
    category: safety::SafetyCategory,
    bounds: Option<&CellBounds>,
) -> Option<f64> {
    let curve = category.kill_target()?.curve;
    let mut least: Option<f64> = None;
    let mut lowered = Vec::new();
    for &i in cells {
        let shift = bounds.map_or(0.0, |b| (b.lower[i] - course.after_standing[i]).min(0.0));
        lowered.clear();
        lowered.extend(course.coldest_trace[i].iter().map(|t| t + shift));
        let logs = curve.log_reduction(&course.trace_times, &lowered);
        // NaN (a history that is not a finite number) can vouch for nothing: it is the answer.
        if logs.is_nan() {
            return Some(f64::NAN);
        }
        least = Some(least.map_or(logs, |l| l.min(logs)));
    }
    least
}

/// Where `verdict` was judged among `cells`, given the values it was judged on (`lower` for
/// minimum rules, `upper` for maximum rules, one per cell): the cell holding its coldest point or
/// its warmest point, and the depth of that layer.
fn judged_point(
    course: &TimeCourse,
    cells: &[usize],
    verdict: &safety::Verdict,
    lower: &[f64],
    upper: &[f64],
) -> Option<JudgedPoint> {
    let warmest = !verdict.binding.minimum;
    let judged = cells.iter().zip(if warmest { upper } else { lower });
    let (&cell, _) = if warmest {
        judged.max_by(|a, b| a.1.total_cmp(b.1))
    } else {
        judged.min_by(|a, b| a.1.total_cmp(b.1))
    }?;
    let depth_m = if warmest {
        // The hottest layer's centre.
        let layers = &course.layers_after_standing[cell];
        let at = (0..layers.len())
            .max_by(|&a, &b| layers[a].total_cmp(&layers[b]))
            .unwrap_or(0);
        (at as f64 + 0.5) * course.layer_thickness[cell]
    } else {
        course.coldest_depth[cell]
    };
    Some(JudgedPoint {
        warmest,
        cell,
        depth_m,
    })
}
