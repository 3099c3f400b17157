//! Calibration: from recorded heating runs to a map library with standard errors, and the quality
//! report that says how far to trust it.
//!
//! - this module: [`Settings`] and [`calibrate`], which runs the steps below in order;
//! - `fit`: one probe series → a rate over the straight part of its curve ([`fit_series`]);
//! - `fill`: estimates combined per cell, unmeasured cells filled from neighbours;
//! - `absorbed`: from observed slopes to absorbed power, removing each run's own conduction,
//!   surface loss and warming absorption by simulating it ([`LossCorrection`]);
//! - `report`: the quality report and the per-probe table.
//!
//! For every probe series the heating rate is the least-squares slope over the straight part of
//! its curve:
//!
//! 1. readings that are still in or below the thaw band (below the food's initial freezing point
//!    plus [`Settings::thaw_margin_k`]) are dropped up to the last one, so a frozen start's
//!    plateau never enters the fit; the rate is therefore that of **thawed** food;
//! 2. readings from [`Settings::boil_guard_c`] up are dropped (evaporation bends the curve
//!    towards 100 °C);
//! 3. while a quadratic term is significant (|t| > [`Settings::curvature_t`]) over the window or
//!    over either half of it, the window loses its first reading when the curve bends upwards
//!    there (sensor lag, thaw tail) or its last when it bends downwards (the approach to boiling,
//!    surface losses);
//! 4. the first [`Settings::settle_time_constants`] sensor time constants of the straight part
//!    are skipped; the time constant is estimated per run from the probes that start on the
//!    straight part (see [`sensor_lag`]); the last reading is dropped while the last 3, 6, 12 or
//!    24 lie significantly below the line through the rest (mean residual below
//!    −[`Settings::tail_t`] standard errors);
//! 5. readings more than [`Settings::outlier_sigmas`] robust standard deviations
//!    (1.4826 × median absolute residual) off the line are dropped as outliers at each step.
//!
//! The slope's standard error is the ordinary least-squares one (see [`fit_line`]).
//! Several estimates of one cell and configuration (a configuration run twice, two probes in one
//! cell) are combined by inverse-variance weighting; when they disagree more than their errors
//! allow, the combined error is widened by the Birge ratio √(χ²/(k − 1)).
//!
//! Cells never measured (or only by suspect probes) are filled from the nearest measured cell of
//! the same food (ties averaged), else of the same absorption class; their standard error adds
//! the food's spatial variation in that configuration, a linear semivariogram γ(d) = γ₁·d fitted
//! from measured pairs at the shortest lag available (1 to 4 cells along rows and columns) and

mod absorbed;
mod fill;
mod fit;
mod report;

pub use crate::regression::{LineFit, line as fit_line};
pub use absorbed::{LossCorrection, MAX_PASSES, TOLERANCE};
pub use fit::{MAX_LAG_S, ProbeFit, fit_series, sensor_lag};
pub use report::{ConfigQuality, Note, NoteKind, QualityReport, Repeatability};

use crate::error::PlanError;
use crate::library::{MapLibrary, RateBasis, RecordedLoad, Uncertainty};
use crate::model::Plan;
use crate::regression;
use crate::runs::HeatingRuns;
use fill::{combine, fill};

/// Thresholds of the rate estimation (defaults are Traycast's choices, stated in the report).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Settings {
    /// Readings below freezing point + this, K, count as thawing.
    pub thaw_margin_k: f64,
    /// Readings at or above this, °C, are near boiling and dropped.
    pub boil_guard_c: f64,
    /// |t| of the quadratic term above which the window is still bent.
    pub curvature_t: f64,
    /// Residuals beyond this many robust standard deviations are outliers.
    pub outlier_sigmas: f64,
    /// Fewest readings a fit may keep.
    pub min_fit: usize,
    /// Mean residual of the last readings, in standard errors below the line through the rest,
    /// beyond which the end is bending down.
    pub tail_t: f64,
    /// Sensor time constants skipped at the start of the straight part (the lag transient decays
    /// as e^(−t/τ): 4 leave 2 %).
    pub settle_time_constants: f64,
    /// Remove each run's own conduction, surface loss and warming absorption from the slopes
    /// (see `absorbed`); off leaves the observed slopes, which are biased.
    pub remove_run_losses: bool,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            thaw_margin_k: 3.0,
            boil_guard_c: 80.0,
            curvature_t: 3.0,
            outlier_sigmas: 4.0,
            min_fit: 5,
            settle_time_constants: 4.0,
            tail_t: 2.5,
            remove_run_losses: true,
        }
    }
}

/// A calibrated library with its report and the per-probe fits.
#[derive(Clone, Debug, PartialEq)]
pub struct Calibration {
    /// The library: one load (the layout), thawed-basis rates with standard errors.
    pub library: MapLibrary,
    /// The quality report.
    pub report: QualityReport,
    /// One per probe series, in the order of [`HeatingRuns::series`].
    pub fits: Vec<ProbeFit>,
}

/// An estimate of one cell in one configuration.
#[derive(Clone, Copy, Debug)]
struct Estimate {
    rate: f64,
    se: f64,
}

/// Calibrates a library from `runs` recorded on the load `layout`.
pub fn calibrate(
    runs: &HeatingRuns,
    layout: &Plan,
    settings: &Settings,
) -> Result<Calibration, PlanError> {
    layout.validate()?;
    let n = layout.tray.cells();
    let configs = layout.oven.configs;
    if let Some(c) = (0..configs).find(|&c| !runs.runs.iter().any(|r| r.config == c)) {
        return Err(PlanError::new(
            "runs",
            format!(
                "configuration {c} has no run; the layout's oven has {configs} configurations and every one must be measured"
            ),
        ));
    }
    if let Some(s) = runs
        .series
        .iter()
        .find(|s| s.cell >= n || layout.food[s.cell] == 0 || s.readings.is_empty())
    {
        return Err(PlanError::new(
            "runs",
            format!(
                "{} is not on food in layout '{}': read the runs against the same layout",
                s.position, layout.name
            ),
        ));
    }
    if let Some(r) = runs.runs.iter().find(|r| r.config >= configs) {
        return Err(PlanError::new(
            "runs",
            format!(
                "run '{}' heats configuration {}, the layout's oven has {configs}",
                r.id, r.config
            ),
        ));
    }
    let freeze: Vec<f64> = (0..layout.items.len())
        .map(|k| layout.catalogue_food(k).map_or(0.0, |f| f.freezing_point))
        .collect();
    let freeze_of = |cell: usize| freeze[layout.item_at(cell).expect("series lie on food")];
    // Sensor lag per run (probes of one run are usually of one kind).
    let lags: Vec<f64> = runs
        .series_by_run()
        .iter()
        .map(|members| {
            sensor_lag(
                members.iter().map(|&k| {
                    let s = &runs.series[k];
                    (s.readings.as_slice(), freeze_of(s.cell))
                }),
                settings,
            )
        })
        .collect();
    let fits: Vec<ProbeFit> = runs
        .series
        .iter()
        .enumerate()
        .map(|(s, series)| {
            let settle = settings.settle_time_constants * lags[series.run];
            let mut f = fit_series(&series.readings, freeze_of(series.cell), settle, settings);
            f.series = s;
            f
        })
        .collect();
    let mut notes = Vec::new();
    let mut rates = vec![0.0; n * configs];
    let mut se = vec![0.0; n * configs];
    let mut filled = vec![false; n * configs];
    let mut qualities = Vec::with_capacity(configs);
    let classes = layout.loss_layout();
    let food_cells = (0..n).filter(|&i| layout.food[i] > 0).count();
    for (c, members) in runs.series_by_config(configs).iter().enumerate() {
        let mut per_cell: Vec<Vec<(Estimate, usize)>> = vec![Vec::new(); n];
        let mut r2 = Vec::new();
        let (mut outliers, mut suspect) = (0, 0);
        let probes = members.len();
        for &s in members {
            let (f, series) = (&fits[s], &runs.series[s]);
            let run = &runs.runs[series.run];
            let note = |kind, detail| Note {
                config: c,
                cell: series.cell,
                run: Some(run.id.clone()),
                line: Some(series.readings[0].line),
                kind,
                detail,
            };
            if !f.outliers.is_empty() {
                outliers += f.outliers.len();
                let lines: Vec<String> = f.outliers.iter().map(usize::to_string).collect();
                notes.push(note(
                    NoteKind::Outliers,
                    format!(
                        "{} reading(s) dropped as outliers (line {})",
                        f.outliers.len(),
                        lines.join(", ")
                    ),
                ));
            }
            if let Some(why) = &f.suspect {
                suspect += 1;
                notes.push(note(
                    NoteKind::SuspectProbe,
                    format!("{}: {why}", series.position),
                ));
                continue;
            }
            let fit = f.fit.expect("unsuspected probes have a fit");
            if fit.r.is_finite() {
                r2.push(fit.r_squared());
            }
            per_cell[series.cell].push((
                Estimate {
                    rate: fit.slope.max(0.0),
                    se: fit.slope_se,
                },
                s,
            ));
        }
        let mut measured: Vec<Option<Estimate>> = vec![None; n];
        let mut diffs = Vec::new();
        let (mut repeated, mut disagreeing) = (0, 0);
        for i in 0..n {
            let est = &per_cell[i];
            if est.is_empty() {
                continue;
            }
            let by_run: Vec<(Estimate, usize)> =
                est.iter().map(|e| (e.0, runs.series[e.1].run)).collect();
            let combined = combine(&fill::one_per_run(&by_run));
            let distinct_runs = {
                let mut r: Vec<usize> = est.iter().map(|e| runs.series[e.1].run).collect();
                r.sort_unstable();
                r.dedup();
                r.len()
            };
            if distinct_runs > 1 {
                repeated += 1;
                let lo = est.iter().map(|e| e.0.rate).fold(f64::INFINITY, f64::min);
                let hi = est
                    .iter()
                    .map(|e| e.0.rate)
                    .fold(f64::NEG_INFINITY, f64::max);
                if combined.0.rate > 0.0 {
                    diffs.push((hi - lo) / combined.0.rate);
                }
            }
            if combined.1 > 3.0 && est.len() > 1 {
                if distinct_runs > 1 {
                    disagreeing += 1;
                }
                notes.push(Note {
                    config: c,
                    cell: i,
                    run: None,
                    line: Some(runs.series[est[0].1].readings[0].line),
                    kind: NoteKind::RepeatDisagrees,
                    detail: format!(
                        "{} estimates ({}) differ by {:.1} combined standard errors; the error is widened to {:.4} K/s",
                        est.len(),
                        est.iter()
                            .map(|e| format!("{:.4}", e.0.rate))
                            .collect::<Vec<_>>()
                            .join(", "),
                        combined.1,
                        combined.0.se
                    ),
                });
            }
            measured[i] = Some(combined.0);
        }
        let filled_here = fill(layout, &classes, &mut measured, c, &mut notes)?;
        let mut rel = Vec::new();
        for i in 0..n {
            if let Some(e) = measured[i] {
                rates[c * n + i] = e.rate;
                se[c * n + i] = e.se;
                filled[c * n + i] = filled_here[i];
                if !filled_here[i] && e.rate > 0.0 {
                    rel.push(e.se / e.rate);
                }
            }
        }
        let filled_count = filled_here.iter().filter(|f| **f).count();
        qualities.push(ConfigQuality {
            config: c,
            runs: runs
                .runs
                .iter()
                .filter(|r| r.config == c)
                .map(|r| r.id.clone())
                .collect(),
            probes,
            measured: food_cells - filled_count,
            filled: filled_count,
            median_r2: regression::median(&mut r2),
            median_relative_se: regression::median(&mut rel),
            outliers,
            suspect,
            repeat: (repeated > 0).then(|| Repeatability {
                cells: repeated,
                median_relative_difference: regression::median(&mut diffs),
                disagreeing,
            }),
        });
    }
    let loss_correction = if settings.remove_run_losses {
        Some(absorbed::remove_run_losses(
            layout, runs, &fits, &mut rates, &mut se, &filled,
        )?)
    } else {
        None
    };
    // Most actionable first: suspect probes, disagreeing repeats, outliers, then filled cells.
    notes.sort_by_key(|x| (x.kind as u8, x.config, x.cell));
    let library = MapLibrary {
        name: runs.name.clone(),
        width: layout.tray.width,
        height: layout.tray.height,
        cell_mm: layout.tray.cell_mm,
        configs,
        basis: RateBasis::Thawed,
        loads: vec![RecordedLoad {
            name: layout.name.clone(),
            layout: classes,
            rates,
            uncertainty: Some(Uncertainty { se, filled }),
        }],
    };
    library.validate()?;
    Ok(Calibration {
        library,
        report: QualityReport {
            name: runs.name.clone(),
            layout: layout.name.clone(),
            width: layout.tray.width,
            runs: runs.runs.len(),
            readings: runs.series.iter().map(|s| s.readings.len()).sum(),
            ignored: runs.ignored,
            sensor_lag_s: runs
                .runs
                .iter()
                .zip(&lags)
                .map(|(r, t)| (r.id.clone(), *t))
                .collect(),
            configs: qualities,
            notes,
            settings: *settings,
            loss_correction,
        },
        fits,
    })
}
