//! Estimates combined per cell and configuration (inverse variance, widened by the Birge ratio),
//! and unmeasured food cells filled from the nearest measured cell of the same food or absorption
//! class, with the spatial variation added to their error.

use super::Estimate;
use super::report::{Note, NoteKind};
use crate::error::PlanError;
use crate::model::Plan;
use traycast_thermal::dielectric::LossClass;

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
        // Unknown spatial variation (a food with one measured cell): assume half the rate, 1 σ.
        let g1 = if same_food { gamma1[k] } else { f64::NAN };
        let cap = if same_food { variance[k] } else { f64::NAN };
        let spatial = if g1.is_nan() {
            (0.5 * rate).powi(2)
        } else {
            (g1 * d).min(if cap.is_nan() { f64::INFINITY } else { cap })
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
