//! How evenly each item heats, in the figures heating studies report: the coefficient of
//! variation of the temperature rise σ/(T̄ − T₀), the max–min spread, and the share of the item's
//! targeted cells inside their bands — for the steered plan (linear and simulated) beside the
//! unsteered baseline.
//!
//! σ is the population standard deviation over the item's cells (every cell is measured, none is a
//! sample of others), T̄ their mean and T₀ the item's start temperature. This is the usual
//! definition of the coefficient of variation of heating (common practice; the choice of the
//! population σ is ours and is stated wherever the figure is shown).

use super::prepared::Prepared;
use crate::model::Plan;

/// One set of uniformity figures.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Uniformity {
    /// σ/(T̄ − T₀), dimensionless (NaN without cells or without a rise).
    pub cv: f64,
    /// Warmest minus coldest cell, K.
    pub spread_k: f64,
    /// Share of the item's targeted cells inside their bands (NaN if none is targeted).
    pub in_band: f64,
}

/// An item's figures, steered and not.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct ItemUniformity {
    /// The plan's schedule, linear prediction.
    pub steered_linear: Uniformity,
    /// The plan's schedule, simulated (each cell's coldest point after standing).
    pub steered_simulated: Uniformity,
    /// Every configuration alike for the baseline's time, linear prediction.
    pub unsteered_linear: Uniformity,
}

/// The figures of `temps` (°C per cell) over `cells`, started at `start` °C.
pub fn uniformity(cells: &[usize], start: f64, temps: &[f64], prep: &Prepared) -> Uniformity {
    let vals: Vec<f64> = cells.iter().map(|&i| temps[i]).collect();
    if vals.is_empty() || vals.iter().any(|v| !v.is_finite()) {
        return Uniformity {
            cv: f64::NAN,
            spread_k: f64::NAN,
            in_band: f64::NAN,
        };
    }
    let n = vals.len() as f64;
    let mean = vals.iter().sum::<f64>() / n;
    let var = vals.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / n;
    let rise = mean - start;
    let (lo, hi) = vals
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let errs = prep.band_errors(temps);
    let targeted: Vec<f64> = cells
        .iter()
        .map(|&i| errs[i])
        .filter(|e| !e.is_nan())
        .collect();
    Uniformity {
        cv: if rise > 0.0 {
            var.sqrt() / rise
        } else {
            f64::NAN
        },
        spread_k: hi - lo,
        in_band: if targeted.is_empty() {
            f64::NAN
        } else {
            targeted.iter().filter(|&&e| e == 0.0).count() as f64 / targeted.len() as f64
        },
    }
}

/// Every item's figures.
pub(super) fn of_items(
    plan: &Plan,
    prep: &Prepared,
    linear: &[f64],
    simulated: &[f64],
    baseline: &[f64],
) -> Vec<ItemUniformity> {
    prep.item_cells()
        .iter()
        .enumerate()
        .map(|(k, cells)| {
            let start = plan.items[k].start_c;
            ItemUniformity {
                steered_linear: uniformity(cells, start, linear, prep),
                steered_simulated: uniformity(cells, start, simulated, prep),
                unsteered_linear: uniformity(cells, start, baseline, prep),
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::{FoodItem, Plan, Zone};

    /// Five cells of one item, one row, a zone on the first three (invented values).
    fn plan() -> Plan {
        let mut p = Plan::blank(5, 1, 10.0);
        p.items = vec![FoodItem {
            name: "Test".into(),
            food: "rice".into(),
            thickness_mm: 20.0,
            start_c: 4.0,
            covered: false,
        }];
        p.zones = vec![Zone {
            name: "z".into(),
            min_c: 70.0,
            max_c: 85.0,
            weight: 1.0,
            cap_c: None,
        }];
        p.food = vec![1; 5];
        p.zone = vec![1, 1, 1, 0, 0];
        p
    }

    /// Expected values from NumPy 2.4.6: `np.std(t) / (np.mean(t) - 4.0)` (population σ) =
    /// 0.12624958417654103 and `np.ptp(t)` = 27.5 for t = [71.5, 80.25, 92.0, 76.0, 64.5].
    #[test]
    fn figures_match_numpy() {
        let p = plan();
        let prep = Prepared::new(&p);
        let t = [71.5, 80.25, 92.0, 76.0, 64.5];
        let u = uniformity(&prep.item_cells()[0], 4.0, &t, &prep);
        assert!((u.cv - 0.12624958417654103).abs() < 1e-14, "{}", u.cv);
        assert_eq!(u.spread_k, 27.5);
        // Targeted cells 71.5, 80.25 (in 70–85) and 92.0 (above): two of three.
        assert!((u.in_band - 2.0 / 3.0).abs() < 1e-15);
    }

    #[test]
    fn no_rise_or_no_number_gives_no_figure() {
        let p = plan();
        let prep = Prepared::new(&p);
        let cells = &prep.item_cells()[0];
        assert!(uniformity(cells, 4.0, &[4.0; 5], &prep).cv.is_nan());
        assert!(
            uniformity(cells, 4.0, &[70.0, f64::NAN, 70.0, 70.0, 70.0], &prep)
                .cv
                .is_nan()
        );
    }
}
