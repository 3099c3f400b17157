//! Estimates combined per cell and configuration (inverse variance, widened by the Birge ratio),
//! and unmeasured food cells filled from the nearest measured cell of the same food or absorption
//! class, with the prediction error of that fill (twice the semivariogram at its distance) added
//! to their error. Probes in one cell during one run share the run's errors (the oven's power, the
//! load's placement), so they count as one measurement, not as independent ones.

use super::Estimate;
use super::report::{Note, NoteKind};
use crate::error::PlanError;
use crate::model::Plan;
use traycast_thermal::dielectric::LossClass;

/// One estimate per run from `(estimate, run)` pairs of one cell: probes in the same run share its
/// errors, so their mean keeps the root-mean-square of their errors (what perfectly correlated
/// errors give), widened to their own spread's standard error when they disagree more.
pub(super) fn one_per_run(est: &[(Estimate, usize)]) -> Vec<Estimate> {
    let mut runs: Vec<usize> = est.iter().map(|e| e.1).collect();
    runs.sort_unstable();
    runs.dedup();
    runs.into_iter()
        .map(|run| {
            let same: Vec<Estimate> = est.iter().filter(|e| e.1 == run).map(|e| e.0).collect();
            let m = same.len() as f64;
            let rate = same.iter().map(|e| e.rate).sum::<f64>() / m;
            let rms = (same.iter().map(|e| e.se * e.se).sum::<f64>() / m).sqrt();
            let spread = if same.len() > 1 {
                (same.iter().map(|e| (e.rate - rate).powi(2)).sum::<f64>() / (m - 1.0) / m).sqrt()
            } else {
                0.0
            };
            Estimate {
                rate,
                se: rms.max(spread),
            }
        })
        .collect()
}

/// Inverse-variance combination; returns the estimate and the largest deviation from it in
/// standard errors (0 for one estimate). The error is widened by the Birge ratio when > 1.
pub(super) fn combine(est: &[Estimate]) -> (Estimate, f64) {
    if est.len() == 1 {
        return (est[0], 0.0);
    }
    // A zero standard error (a noiseless series) would take all the weight: floor it at 1e-9 K/s.
    let w: Vec<f64> = est.iter().map(|e| 1.0 / e.se.max(1e-9).powi(2)).collect();
    let sw: f64 = w.iter().sum();
    let mean = est.iter().zip(&w).map(|(e, w)| e.rate * w).sum::<f64>() / sw;
    let chi2: f64 = est
        .iter()
        .zip(&w)
        .map(|(e, w)| w * (e.rate - mean).powi(2))
        .sum();
    let birge = (chi2 / (est.len() - 1) as f64).sqrt();
    let worst = est
        .iter()
        .map(|e| (e.rate - mean).abs() / e.se.max(1e-9))
        .fold(0.0f64, f64::max);
    (
        Estimate {
            rate: mean,
            se: sw.sqrt().recip() * birge.max(1.0),
        },
        worst,
    )
}

/// Fills unmeasured food cells of configuration `c` (see the module docs; `classes` is the
/// layout's absorption class per cell); returns which cells were filled.
pub(super) fn fill(
    layout: &Plan,
    classes: &[Option<LossClass>],
    measured: &mut [Option<Estimate>],
    c: usize,
    notes: &mut Vec<Note>,
) -> Result<Vec<bool>, PlanError> {
    let n = measured.len();
    let w = layout.tray.width;
    let source = measured.to_vec();
    // Spatial variation per item: γ₁ per cell of distance, capped at the rate variance.
    let items = layout.items.len();
    let mut gamma1 = vec![f64::NAN; items];
    let mut variance = vec![f64::NAN; items];
    for (k, (g1, var)) in gamma1.iter_mut().zip(variance.iter_mut()).enumerate() {
        let cells: Vec<usize> = (0..n)
            .filter(|&i| layout.item_at(i) == Some(k) && source[i].is_some())
            .collect();
        let r: Vec<f64> = cells
            .iter()
            .map(|&i| source[i].expect("measured").rate)
            .collect();
        if r.len() >= 2 {
            let m = r.iter().sum::<f64>() / r.len() as f64;
            *var = r.iter().map(|v| (v - m).powi(2)).sum::<f64>() / (r.len() - 1) as f64;
        }
        // The semivariogram at the shortest lag along rows and columns (1 to 4 cells) with at
        // least three measured pairs, scaled to one cell: γ₁ = γ(L)/L.
        let cap = if var.is_nan() { f64::INFINITY } else { *var };
        *g1 = (1..=4usize)
            .find_map(|lag| {
                let (mut sum, mut pairs) = (0.0, 0usize);
                for &i in &cells {
                    let (r, c) = (i / w, i % w);
                    for j in [
                        (c + lag < w).then(|| i + lag),
                        (r + lag < n / w).then(|| i + lag * w),
                    ]
                    .into_iter()
                    .flatten()
                    {
                        if layout.item_at(j) == Some(k)
                            && let (Some(a), Some(b)) = (source[i], source[j])
                        {
                            sum += 0.5 * (a.rate - b.rate).powi(2);
                            pairs += 1;
                        }
                    }
                }
                (pairs >= 3).then(|| (sum / pairs as f64 / lag as f64).min(cap))
            })
            .unwrap_or(*var);
    }
    let mut filled = vec![false; n];
    for i in 0..n {
        let Some(k) = layout.item_at(i) else { continue };
        if source[i].is_some() {
            continue;
        }
        let (r0, c0) = ((i / w) as f64, (i % w) as f64);
        let dist = |j: usize| ((j / w) as f64 - r0).hypot((j % w) as f64 - c0);
        let nearest = |same: &dyn Fn(usize) -> bool| -> Option<(f64, Vec<usize>)> {
            let mut best: Option<(f64, Vec<usize>)> = None;
            for j in (0..n).filter(|&j| source[j].is_some() && same(j)) {
                let d = dist(j);
                match &mut best {
                    Some((bd, v)) if (d - *bd).abs() < 1e-9 => v.push(j),
                    Some((bd, _)) if d > *bd => {}
                    _ => best = Some((d, vec![j])),
                }
            }
            best
        };
        let (d, from, same_food) = match nearest(&|j| layout.item_at(j) == Some(k)) {
            Some((d, v)) => (d, v, true),
            None => match nearest(&|j| classes[j] == classes[i]) {
                Some((d, v)) => (d, v, false),
                None => {
                    return Err(PlanError::new(
                        "runs",
                        format!(
                            "configuration {c}: '{}' has no usable measurement, and no food of its absorption class has one either; add probes in it{}",
                            layout.items[k].name,
                            if layout.items[k].start_c < 0.0 {
                                " (a frozen food needs runs long enough to leave the thaw band)"
                            } else {
                                ""
                            }
                        ),
                    ));
                }
            },
        };
        let m = from.len() as f64;
        let rate = from
            .iter()
            .map(|&j| source[j].expect("measured").rate)
            .sum::<f64>()
            / m;
        let se2 = from
            .iter()
            .map(|&j| source[j].expect("measured").se.powi(2))
            .sum::<f64>()
            / m;
        // The prediction error of taking a neighbour's value: Var(z(x₀) − z(x₁)) = 2γ(d), not
        // γ(d), capped at twice the rates' variance (two independent draws). Unknown spatial
        // variation (a food with one measured cell): assume half the rate, 1 σ.
        let g1 = if same_food { gamma1[k] } else { f64::NAN };
        let cap = if same_food {
            2.0 * variance[k]
        } else {
            f64::NAN
        };
        let spatial = if g1.is_nan() {
            (0.5 * rate).powi(2)
        } else {
            (2.0 * g1 * d).min(if cap.is_nan() { f64::INFINITY } else { cap })
        };
        measured[i] = Some(Estimate {
            rate,
            se: (se2 + spatial).sqrt(),
        });
        filled[i] = true;
        let at = from
            .iter()
            .map(|&j| format!("row {}, col {}", j / w, j % w))
            .collect::<Vec<_>>()
            .join("; ");
        notes.push(Note {
            config: c,
            cell: i,
            run: None,
            line: None,
            kind: NoteKind::Filled,
            detail: if same_food {
                format!("not measured: filled from {at} ({d:.1} cells away, same food)")
            } else {
                format!(
                    "not measured: filled from {at} ({d:.1} cells away, another food of the same absorption class)"
                )
            },
        });
    }
    Ok(filled)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn e(rate: f64, se: f64) -> Estimate {
        Estimate { rate, se }
    }

    /// Two probes in one cell during one run share that run's errors: together they are one
    /// measurement with the same error, not √2 better; two runs are independent and combine by
    /// inverse variance (σ/√2).
    #[test]
    fn probes_in_one_run_are_not_independent() {
        let same_run = one_per_run(&[(e(0.20, 0.01), 0), (e(0.20, 0.01), 0)]);
        assert_eq!(same_run.len(), 1);
        assert!((combine(&same_run).0.se - 0.01).abs() < 1e-12);
        let two_runs = one_per_run(&[(e(0.20, 0.01), 0), (e(0.20, 0.01), 1)]);
        assert!((combine(&two_runs).0.se - 0.01 / 2f64.sqrt()).abs() < 1e-12);
        // Probes that disagree more than their errors say: the spread's error wins.
        let apart = one_per_run(&[(e(0.10, 0.001), 0), (e(0.30, 0.001), 0)]);
        assert!((apart[0].rate - 0.2).abs() < 1e-12 && (apart[0].se - 0.1).abs() < 1e-12);
    }
}
