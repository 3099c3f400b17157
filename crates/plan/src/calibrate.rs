//! Calibration: from recorded heating runs to a map library with standard errors, and the quality
//! report that says how far to trust it.
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
//! The slope's standard error is the ordinary least-squares one (see [`crate::regression`]).
//! Several estimates of one cell and configuration (a configuration run twice, two probes in one
//! cell) are combined by inverse-variance weighting; when they disagree more than their errors
//! allow, the combined error is widened by the Birge ratio √(χ²/(k − 1)).
//!
//! Cells never measured (or only by suspect probes) are filled from the nearest measured cell of
//! the same food (ties averaged), else of the same absorption class; their standard error adds
//! the food's spatial variation in that configuration, a linear semivariogram γ(d) = γ₁·d fitted
//! from measured pairs at the shortest lag available (1 to 4 cells along rows and columns) and
//! capped at the food's rate variance. Filled cells are flagged.

use crate::error::PlanError;
use crate::evaluate::layout as loss_layout;
use crate::library::{MapLibrary, RateBasis, RecordedLoad, Uncertainty};
use crate::model::Plan;
use crate::regression::{self, LineFit};
use crate::runs::{HeatingRuns, Reading};
use traycast_thermal::dielectric::LossClass;

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
        }
    }
}

/// Below this robust spread, K, residuals are treated as this spread (readings are rarely finer
/// than 0.1 K; an exact synthetic line would otherwise make every reading an outlier).
const SPREAD_FLOOR_K: f64 = 0.02;

/// What the estimation did with one probe series.
#[derive(Clone, Debug, PartialEq)]
pub struct ProbeFit {
    /// Index into [`HeatingRuns::series`].
    pub series: usize,
    /// The fit over the readings kept (None when too few remain).
    pub fit: Option<LineFit>,
    /// Readings kept in the fit.
    pub used: usize,
    /// Dropped as still thawing.
    pub thaw: usize,
    /// Dropped from the start while the curve bent upwards (sensor lag, thaw tail).
    pub lag: usize,
    /// Dropped at or near boiling, or from the end while the curve bent downwards.
    pub late: usize,
    /// Lines of the readings dropped as outliers.
    pub outliers: Vec<usize>,
    /// The curve never became straight within [`Settings::min_fit`] readings.
    pub curved: bool,
    /// Why the probe is suspect, if it is (its cell is then filled unless another probe covers it).
    pub suspect: Option<String>,
}

/// Fits one series (`freeze_c`: the food's initial freezing point; `settle_s`: time skipped at the
/// start of the straight part for the sensor to catch up, see [`sensor_lag`]).
pub fn fit_series(
    readings: &[Reading],
    freeze_c: f64,
    settle_s: f64,
    settings: &Settings,
) -> ProbeFit {
    let n = readings.len();
    let start = readings
        .iter()
        .rposition(|r| r.temp_c < freeze_c + settings.thaw_margin_k)
        .map_or(0, |k| k + 1);
    let end = readings[start..]
        .iter()
        .position(|r| r.temp_c >= settings.boil_guard_c)
        .map_or(n, |k| start + k);
    let settled = readings[start..end]
        .iter()
        .position(|r| r.t >= readings[start.min(n - 1)].t + settle_s)
        .map_or(end, |k| start + k);
    let (mut a, mut b) = (settled, end);
    let mut result = ProbeFit {
        series: 0,
        fit: None,
        used: 0,
        thaw: start,
        lag: 0,
        late: n - end,
        outliers: Vec::new(),
        curved: false,
        suspect: None,
    };
    loop {
        if b - a < settings.min_fit {
            result.suspect = Some(format!(
                "only {} readings between the thaw band and {:.0} °C; run longer or start warmer",
                b - a,
                settings.boil_guard_c
            ));
            result.lag = a - start;
            result.late = n - b;
            return result;
        }
        let window = &readings[a..b];
        let (inliers, outliers, bent_ends) = robust_inliers(window, settings.outlier_sigmas);
        // A first reading far above the line is the knee of sensor lag (the line through the rest
        // extrapolates below the start), a last one far below it the approach to boiling: trim
        // them as such rather than calling them outliers.
        if b - a > settings.min_fit {
            if bent_ends.0 {
                a += 1;
                continue;
            }
            if bent_ends.1 {
                b -= 1;
                continue;
            }
        }
        let (t, y): (Vec<f64>, Vec<f64>) = inliers.iter().map(|r| (r.t, r.temp_c)).unzip();
        let bend = regression::curvature_t(&t, &y).unwrap_or(0.0);
        if b - a > settings.min_fit {
            // The last 3, 6, 12 and 24 readings against the line through the rest: the approach
            // to boiling often bends only the last few, too few for a quadratic term to notice.
            if bends_down_at_the_end(&t, &y, settings) {
                b -= 1;
                continue;
            }
            // Each half on its own as well: a lagging start and a bending end together make an S
            // whose overall quadratic term can vanish.
            let half = t.len() / 2;
            let early = regression::curvature_t(&t[..=half], &y[..=half]).unwrap_or(0.0);
            let late = regression::curvature_t(&t[half..], &y[half..]).unwrap_or(0.0);
            let limit = settings.curvature_t;
            if early > limit || (bend > limit && late >= -limit) {
                a += 1;
                continue;
            }
            if late < -limit || bend < -limit {
                b -= 1;
                continue;
            }
        }
        result.curved = bend.abs() > settings.curvature_t;
        result.fit = regression::line(&t, &y);
        result.used = inliers.len();
        result.outliers = outliers;
        result.lag = a - start;
        result.late = n - b;
        break;
    }
    if result.fit.is_none() {
        result.suspect = Some("no line fits its readings".into());
    }
    if let Some(f) = result.fit {
        if result.curved {
            result.suspect = Some(format!(
                "the curve never straightens (still bent over the last {} readings)",
                result.used
            ));
        } else if f.slope < 0.0 && f.slope < -3.0 * f.slope_se {
            result.suspect = Some(format!(
                "cools at {:.3} K/s while the oven heats: not in the food, or displaced",
                -f.slope
            ));
        } else if result.outliers.len() * 5 > result.used {
            result.suspect = Some(format!(
                "{} of {} readings are outliers",
                result.outliers.len(),
                result.used + result.outliers.len()
            ));
        }
    }
    result
}

/// Whether the last readings lie significantly below the line through the others (mean residual
/// below −[`Settings::tail_t`] standard errors for the last 3, 6, 12 or 24 readings).
fn bends_down_at_the_end(t: &[f64], y: &[f64], settings: &Settings) -> bool {
    [3usize, 6, 12, 24]
        .into_iter()
        .filter(|&m| t.len() >= m + settings.min_fit.max(3))
        .any(|m| {
            let k = t.len() - m;
            regression::line(&t[..k], &y[..k]).is_some_and(|body| {
                let tail = (k..t.len()).map(|j| y[j] - body.at(t[j])).sum::<f64>() / m as f64;
                tail < -settings.tail_t * body.residual_sd.max(SPREAD_FLOOR_K) / (m as f64).sqrt()
            })
        })
}

/// The probes' time constant, s, estimated from series that start on the straight part: a
/// first-order sensor on a ramp reads rate × τ below the true temperature once settled, so
/// τ ≈ (first reading − the fitted line at that time) / slope. Returns the median over `series`
/// (each: readings, freezing point), or 0 when none qualifies.
pub fn sensor_lag<'a>(
    series: impl Iterator<Item = (&'a [Reading], f64)>,
    settings: &Settings,
) -> f64 {
    let mut taus: Vec<f64> = series
        .filter_map(|(r, freeze)| {
            if r.first()?.temp_c < freeze + settings.thaw_margin_k {
                return None;
            }
            let f = fit_series(r, freeze, 0.0, settings).fit?;
            (f.slope > 10.0 * f.slope_se && f.slope > 0.0)
                .then(|| ((r[0].temp_c - f.at(r[0].t)) / f.slope).clamp(0.0, MAX_LAG_S))
        })
        .collect();
    let tau = regression::median(&mut taus);
    if tau.is_finite() { tau } else { 0.0 }
}

/// Largest sensor time constant believed, s (beyond it the probe is not in contact).
pub const MAX_LAG_S: f64 = 30.0;

/// Splits a window into readings within `sigmas` robust standard deviations of its line and the
/// lines of the others; also says whether the first reading is an outlier above the line and the
/// last one an outlier below it.
fn robust_inliers(window: &[Reading], sigmas: f64) -> (Vec<Reading>, Vec<usize>, (bool, bool)) {
    let (t, y): (Vec<f64>, Vec<f64>) = window.iter().map(|r| (r.t, r.temp_c)).unzip();
    let Some(f) = regression::line(&t, &y) else {
        return (window.to_vec(), Vec::new(), (false, false));
    };
    let res: Vec<f64> = window.iter().map(|r| r.temp_c - f.at(r.t)).collect();
    let mut abs: Vec<f64> = res.iter().map(|e| e.abs()).collect();
    let limit = sigmas * (1.4826 * regression::median(&mut abs)).max(SPREAD_FLOOR_K);
    let mut inliers = Vec::with_capacity(window.len());
    let mut outliers = Vec::new();
    for (r, e) in window.iter().zip(&res) {
        if e.abs() > limit {
            outliers.push(r.line);
        } else {
            inliers.push(*r);
        }
    }
    let ends = (res[0] > limit, res[res.len() - 1] < -limit);
    (inliers, outliers, ends)
}

/// What kind of note the report makes about a cell.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NoteKind {
    /// A probe whose estimate was not used (see the detail).
    SuspectProbe,
    /// Repeated runs disagree beyond their standard errors.
    RepeatDisagrees,
    /// Readings dropped as outliers.
    Outliers,
    /// The rate was filled from a neighbour.
    Filled,
}

impl NoteKind {
    /// A short label.
    pub fn as_str(self) -> &'static str {
        match self {
            NoteKind::Outliers => "outliers",
            NoteKind::SuspectProbe => "suspect probe",
            NoteKind::RepeatDisagrees => "repeats disagree",
            NoteKind::Filled => "filled",
        }
    }
}

/// One note of the quality report.
#[derive(Clone, Debug, PartialEq)]
pub struct Note {
    /// Configuration.
    pub config: usize,
    /// Cell (row-major).
    pub cell: usize,
    /// Run concerned, if one.
    pub run: Option<String>,
    /// First line of the probe's readings, if one.
    pub line: Option<usize>,
    /// Kind.
    pub kind: NoteKind,
    /// What happened.
    pub detail: String,
}

/// Repeatability of a configuration run more than once.
#[derive(Clone, Debug, PartialEq)]
pub struct Repeatability {
    /// Cells measured in more than one run.
    pub cells: usize,
    /// Median |difference| between the runs' rates relative to their mean.
    pub median_relative_difference: f64,
    /// Cells whose runs differ by more than 3 combined standard errors.
    pub disagreeing: usize,
}

/// Per-configuration quality.
#[derive(Clone, Debug, PartialEq)]
pub struct ConfigQuality {
    /// Configuration.
    pub config: usize,
    /// Runs that heated it.
    pub runs: Vec<String>,
    /// Probe series fitted.
    pub probes: usize,
    /// Food cells with a measured rate.
    pub measured: usize,
    /// Food cells filled.
    pub filled: usize,
    /// Median r² of the probes' fits.
    pub median_r2: f64,
    /// Median standard error relative to the rate, over measured cells.
    pub median_relative_se: f64,
    /// Readings dropped as outliers.
    pub outliers: usize,
    /// Probes not used.
    pub suspect: usize,
    /// When the configuration was run more than once.
    pub repeat: Option<Repeatability>,
}

/// The quality report of a calibration.
#[derive(Clone, Debug, PartialEq)]
pub struct QualityReport {
    /// Name of the runs file.
    pub name: String,
    /// Name of the layout.
    pub layout: String,
    /// Tray width in cells (to name rows and columns).
    pub width: usize,
    /// Runs read.
    pub runs: usize,
    /// Readings over food cells.
    pub readings: usize,
    /// Readings over empty cells (ignored).
    pub ignored: usize,
    /// Sensor time constant estimated per run, s: (run, τ).
    pub sensor_lag_s: Vec<(String, f64)>,
    /// Per configuration.
    pub configs: Vec<ConfigQuality>,
    /// Notes per cell, most actionable kind first, then by configuration and cell.
    pub notes: Vec<Note>,
    /// The settings used.
    pub settings: Settings,
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
    let classes = loss_layout(layout);
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
            let combined = combine(&est.iter().map(|e| e.0).collect::<Vec<_>>());
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
        },
        fits,
    })
}

/// Inverse-variance combination; returns the estimate and the largest deviation from it in
/// standard errors (0 for one estimate). The error is widened by the Birge ratio when > 1.
fn combine(est: &[Estimate]) -> (Estimate, f64) {
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
fn fill(
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

impl QualityReport {
    /// The report as text for a terminal or a print-out; lists at most `max_notes` notes.
    pub fn to_text(&self, max_notes: usize) -> String {
        let pct = |v: f64| {
            if v.is_finite() {
                format!("{:.1} %", 100.0 * v)
            } else {
                "–".into()
            }
        };
        let s = &self.settings;
        let mut lags: Vec<f64> = self.sensor_lag_s.iter().map(|(_, t)| *t).collect();
        let lag_median = regression::median(&mut lags);
        let mut out = format!(
            "Calibration of '{}' on layout '{}'\n{} runs, {} readings on food ({} over empty cells ignored), {} configurations.\n\
             Method: least-squares slope over the straight part of each probe's curve. Dropped: readings up to the last one below the freezing point + {} K (rates are for thawed food); readings from {} °C up; the first {} sensor time constants of the straight part (τ estimated per run: median {:.1} s, range {:.1}–{:.1} s); leading or trailing readings while a quadratic term is significant (|t| > {}) or the last readings fall below the line (< −{} SE); outliers beyond {} robust σ. Repeats: inverse-variance mean, error widened by the Birge ratio. Unmeasured cells: nearest measured cell of the same food, error widened by the food's spatial variation.\n\n",
            self.name,
            self.layout,
            self.runs,
            self.readings,
            self.ignored,
            self.configs.len(),
            s.thaw_margin_k,
            s.boil_guard_c,
            s.settle_time_constants,
            lag_median,
            lags.first().copied().unwrap_or(f64::NAN),
            lags.last().copied().unwrap_or(f64::NAN),
            s.curvature_t,
            s.tail_t,
            s.outlier_sigmas
        );
        out.push_str("config  runs             probes  measured  filled  median r²  median SE/rate  outliers  suspect  repeatability\n");
        for q in &self.configs {
            let runs = q.runs.join(",");
            let repeat = q.repeat.as_ref().map_or("single run".to_string(), |r| {
                format!(
                    "{} cells, median difference {}, {} beyond 3 SE",
                    r.cells,
                    pct(r.median_relative_difference),
                    r.disagreeing
                )
            });
            out.push_str(&format!(
                "{:<7} {:<16} {:>6}  {:>8}  {:>6}  {:>9}  {:>14}  {:>8}  {:>7}  {repeat}\n",
                q.config,
                if runs.chars().count() > 16 {
                    format!("{}…", runs.chars().take(15).collect::<String>())
                } else {
                    runs
                },
                q.probes,
                q.measured,
                q.filled,
                if q.median_r2.is_finite() {
                    format!("{:.4}", q.median_r2)
                } else {
                    "–".into()
                },
                pct(q.median_relative_se),
                q.outliers,
                q.suspect
            ));
        }
        let count = |k: NoteKind| self.notes.iter().filter(|n| n.kind == k).count();
        out.push_str(&format!(
            "\nNotes: {} filled, {} suspect probes, {} with outliers, {} where repeats disagree.\n",
            count(NoteKind::Filled),
            count(NoteKind::SuspectProbe),
            count(NoteKind::Outliers),
            count(NoteKind::RepeatDisagrees)
        ));
        for note in self.notes.iter().take(max_notes) {
            out.push_str(&format!("  {}\n", self.note_line(note)));
        }
        if self.notes.len() > max_notes {
            out.push_str(&format!(
                "  … and {} more (see the per-probe table)\n",
                self.notes.len() - max_notes
            ));
        }
        out
    }

    /// One note as a line of text.
    pub fn note_line(&self, note: &Note) -> String {
        let w = self.width.max(1);
        let mut place = format!(
            "config {}, row {}, col {}",
            note.config,
            note.cell / w,
            note.cell % w
        );
        if let Some(r) = &note.run {
            place.push_str(&format!(", run '{r}'"));
        }
        if let Some(l) = note.line {
            place.push_str(&format!(", from line {l}"));
        }
        format!("{place} — {}: {}", note.kind.as_str(), note.detail)
    }
}

impl Calibration {
    /// The per-probe table as CSV: what each fit kept and dropped, its rate, error and r².
    pub fn probe_table(&self, runs: &HeatingRuns) -> String {
        let w = self.library.width;
        let mut out = String::from(
            "# traycast per-probe fits (rates in K/s of thawed food)\nrun,config,row,col,position,first_line,readings,used,thaw,lag,late,outliers,rate,rate_se,intercept_c,r2,residual_k,suspect\n",
        );
        let quote = |s: &str| {
            if s.contains([',', '"', '\n']) {
                format!("\"{}\"", s.replace('"', "\"\""))
            } else {
                s.to_string()
            }
        };
        for f in &self.fits {
            let s = &runs.series[f.series];
            let run = &runs.runs[s.run];
            let num = |v: Option<f64>| {
                v.filter(|v| v.is_finite())
                    .map_or(String::new(), |v| format!("{v:.6}"))
            };
            out.push_str(&format!(
                "{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{}\n",
                quote(&run.id),
                run.config,
                s.cell / w,
                s.cell % w,
                quote(&s.position),
                s.readings[0].line,
                s.readings.len(),
                f.used,
                f.thaw,
                f.lag,
                f.late,
                f.outliers.len(),
                num(f.fit.map(|x| x.slope)),
                num(f.fit.map(|x| x.slope_se)),
                num(f.fit.map(|x| x.intercept)),
                num(f.fit.map(|x| x.r_squared())),
                num(f.fit.map(|x| x.residual_sd)),
                quote(f.suspect.as_deref().unwrap_or(""))
            ));
        }
        out
    }
}
