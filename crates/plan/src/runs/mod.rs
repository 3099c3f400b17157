//! Recorded heating runs: the CSV a test engineer writes after running each configuration on a
//! load, read against the load's layout and validated with messages that name the line.
//!
//! Format "traycast-runs 1" (long form, our own design): one temperature reading per line.
//!
//! ```text
//! # traycast-runs 1
//! # name: Bench runs on the lunch tray, 2026-11-30
//! run,config,time_s,row,col,temp_c
//! a1,0,0.0,3,4,4.8
//! a1,0,2.0,3,4,5.3
//! ```
//!
//! - `run` names one heating run: one configuration, switched on at time 0 (any text). A
//!   configuration run twice appears under two run names; the two are compared for repeatability.
//! - `config` is the configuration index (0-based), `time_s` seconds since the run started.
//! - The position is either `row,col` (cells, as a thermal camera or a probe grid gives them) or
//!   `x_mm,y_mm` (a probe's position from the tray's top-left corner, mapped to the cell under it).
//! - The temperature column is `temp_c` (°C) or `temp_f` (°F). A °F file is only read when the
//!   caller says so explicitly ([`ReadOptions::fahrenheit`]), so a unit slip cannot pass unnoticed.
//!
//! Readings over cells the layout leaves empty are counted and ignored.

mod invent;

pub use invent::{RunRecipe, heating_runs};

use crate::csvtext::{Sheet, at_line};
use crate::error::PlanError;
use crate::model::Plan;
use std::collections::HashMap;

/// Fewest readings a probe needs in one run for a slope and its standard error.
pub const MIN_SAMPLES: usize = 6;
/// Shortest run, s: shorter runs cannot separate sensor lag from heating.
pub const MIN_RUN_S: f64 = 10.0;
/// Plausible temperature range, °C: outside it the file is in other units or a probe failed.
pub const TEMP_RANGE_C: (f64, f64) = (-60.0, 150.0);
/// A probe reading the same value throughout while the run's median probe rose more than this,
/// K, is stuck (or not in the food).
pub const STUCK_RISE_K: f64 = 1.0;

/// How to read a runs file.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct ReadOptions {
    /// The user confirms that the temperatures are in °F (required for a `temp_f` column).
    pub fahrenheit: bool,
}

/// One temperature reading.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Reading {
    /// Seconds since the run started.
    pub t: f64,
    /// Temperature, °C.
    pub temp_c: f64,
    /// Line in the file.
    pub line: usize,
}

/// One probe's readings during one run.
#[derive(Clone, Debug, PartialEq)]
pub struct Series {
    /// Index into [`HeatingRuns::runs`].
    pub run: usize,
    /// Cell (row-major index into the tray).
    pub cell: usize,
    /// The position as the file gives it, for messages.
    pub position: String,
    /// Readings in time order.
    pub readings: Vec<Reading>,
}

/// One heating run.
#[derive(Clone, Debug, PartialEq)]
pub struct Run {
    /// The run's name in the file.
    pub id: String,
    /// Configuration heated.
    pub config: usize,
    /// First line of the run in the file.
    pub first_line: usize,
    /// Duration, s (last reading − first reading).
    pub duration_s: f64,
}

/// A validated runs file.
#[derive(Clone, Debug, PartialEq)]
pub struct HeatingRuns {
    /// Name from the `# name:` line.
    pub name: String,
    /// Runs in file order.
    pub runs: Vec<Run>,
    /// Probe series, in file order of their first reading.
    pub series: Vec<Series>,
    /// Readings over cells the layout leaves empty (ignored).
    pub ignored: usize,
}

/// Most readings one runs file may hold: about 120 MiB of readings in memory. A 48 × 32 thermal
/// camera at one frame a second for 96 configurations of 20 s is 3 M readings.
pub const MAX_READINGS: usize = 5_000_000;
/// Longest runs file read, bytes (about 30 bytes a reading).
pub const MAX_RUNS_BYTES: usize = 160 << 20;
/// Latest reading time, s (one day): later times are a unit slip, not a heating run.
pub const MAX_TIME_S: f64 = 86_400.0;

/// The cell (0 … `cells` − 1) under a position `mm` from the tray's edge, with cells `pitch` mm
/// wide. A position within a billionth of a cell of a boundary is on it, and a boundary belongs
/// to the cell it starts, however `mm / pitch` rounds (69.3 / 9.9 is 6.999…); a position within
/// rounding of the far edge stays in the last cell.
fn cell_under(mm: f64, pitch: f64, cells: usize) -> usize {
    let q = mm / pitch;
    let nearest = q.round();
    let k = if (q - nearest).abs() < 1e-9 {
        nearest
    } else {
        q.floor()
    };
    (k.max(0.0) as usize).min(cells - 1)
}

/// Where a reading is.
#[derive(Clone, Copy, PartialEq, Eq, Hash)]
enum PositionKey {
    Cell(usize),
    Millimetres(u64, u64),
}

impl HeatingRuns {
    /// Reads `text` against the load `layout` (a plan: its tray, food grid and configurations).
    /// The first problem found is returned, naming the line.
    pub fn parse(text: &str, layout: &Plan, options: ReadOptions) -> Result<Self, PlanError> {
        crate::error::check_length("runs file", text, MAX_RUNS_BYTES)?;
        let sheet = Sheet::parse(text)?;
        sheet.check_format("traycast-runs", "1")?;
        let name = sheet
            .meta("name")
            .map_or_else(|| "heating runs".to_string(), |(_, v)| v.to_string());
        let cols: Vec<&str> = sheet.header.iter().map(String::as_str).collect();
        let hl = sheet.header_line;
        let header_help = "columns should be run,config,time_s,row,col,temp_c (or x_mm,y_mm for probe positions, temp_f for °F)";
        if cols.len() != 6 || cols[..3] != ["run", "config", "time_s"] {
            return Err(at_line(hl.max(1), header_help));
        }
        let by_mm = match (cols[3], cols[4]) {
            ("row", "col") => false,
            ("x_mm", "y_mm") => true,
            _ => return Err(at_line(hl, header_help)),
        };
        let to_c: fn(f64) -> f64 = match (cols[5], options.fahrenheit) {
            ("temp_c", false) => |v| v,
            ("temp_f", true) => |v| (v - 32.0) * 5.0 / 9.0,
            ("temp_f", false) => {
                return Err(at_line(
                    hl,
                    "the temperatures are in °F (column temp_f): confirm °F explicitly (--fahrenheit on the command line, the °F box in the workbench)",
                ));
            }
            ("temp_c", true) => {
                return Err(at_line(
                    hl,
                    "°F was asked for but the header names temp_c (°C); drop the °F option or fix the header",
                ));
            }
            _ => return Err(at_line(hl, header_help)),
        };
        let tray = layout.tray;
        let configs = layout.oven.configs;
        let mut runs: Vec<Run> = Vec::new();
        let mut run_index: HashMap<String, usize> = HashMap::new();
        let mut series: Vec<Series> = Vec::new();
        let mut series_index: HashMap<(usize, PositionKey), usize> = HashMap::new();
        let mut ignored = 0;
        let mut readings = 0usize;
        for record in sheet.records() {
            let (line, rec) = record?;
            let at = |m: String| at_line(line, m);
            readings += 1;
            if readings > MAX_READINGS {
                return Err(at(format!(
                    "more than {MAX_READINGS} readings; split the runs into several files, or thin the readings (a reading every second is plenty)"
                )));
            }
            if rec.len() != 6 {
                return Err(at(format!("has {} fields, expected 6", rec.len())));
            }
            let number = |k: usize| -> Result<f64, PlanError> {
                match rec[k].parse::<f64>() {
                    Ok(v) if v.is_finite() => Ok(v),
                    _ => Err(at(format!("{} '{}' is not a number", cols[k], &rec[k]))),
                }
            };
            let whole = |k: usize, max: usize| -> Result<usize, PlanError> {
                let v: usize = rec[k]
                    .parse()
                    .map_err(|_| at(format!("{} '{}' is not a whole number", cols[k], &rec[k])))?;
                if v >= max {
                    return Err(at(format!(
                        "{} {v} is out of range (0 to {})",
                        cols[k],
                        max - 1
                    )));
                }
                Ok(v)
            };
            if rec[0].is_empty() {
                return Err(at("run name is empty".into()));
            }
            let config = whole(1, configs)?;
            let t = number(2)?;
            if t < 0.0 {
                return Err(at(format!("time {t} s is negative")));
            }
            if t > MAX_TIME_S {
                return Err(at(format!(
                    "time {t} s is past {MAX_TIME_S} s (one day): check the time column's units"
                )));
            }
            let (cell, key, position) = if by_mm {
                let (x, y) = (number(3)?, number(4)?);
                let (w, h) = (
                    tray.width as f64 * tray.cell_mm,
                    tray.height as f64 * tray.cell_mm,
                );
                if !(0.0..w).contains(&x) || !(0.0..h).contains(&y) {
                    return Err(at(format!(
                        "probe at x {x} mm, y {y} mm is off the {w} × {h} mm tray"
                    )));
                }
                let cell = cell_under(y, tray.cell_mm, tray.height) * tray.width
                    + cell_under(x, tray.cell_mm, tray.width);
                (
                    cell,
                    PositionKey::Millimetres(x.to_bits(), y.to_bits()),
                    format!("probe at x {x} mm, y {y} mm"),
                )
            } else {
                let (row, col) = (whole(3, tray.height)?, whole(4, tray.width)?);
                let cell = row * tray.width + col;
                (
                    cell,
                    PositionKey::Cell(cell),
                    format!("row {row}, col {col}"),
                )
            };
            let temp_c = to_c(number(5)?);
            if !(TEMP_RANGE_C.0..=TEMP_RANGE_C.1).contains(&temp_c) {
                return Err(at(format!(
                    "temperature {temp_c:.1} °C is outside {} to {} °C: check the units or the probe",
                    TEMP_RANGE_C.0, TEMP_RANGE_C.1
                )));
            }
            let run = match run_index.get(&rec[0]) {
                Some(&r) => {
                    if runs[r].config != config {
                        return Err(at(format!(
                            "run '{}' heated configuration {} from line {}; one run heats one configuration",
                            &rec[0], runs[r].config, runs[r].first_line
                        )));
                    }
                    r
                }
                None => {
                    run_index.insert(rec[0].to_string(), runs.len());
                    runs.push(Run {
                        id: rec[0].to_string(),
                        config,
                        first_line: line,
                        duration_s: 0.0,
                    });
                    runs.len() - 1
                }
            };
            if layout.food[cell] == 0 {
                ignored += 1;
                continue;
            }
            let s = *series_index.entry((run, key)).or_insert_with(|| {
                series.push(Series {
                    run,
                    cell,
                    position,
                    readings: Vec::new(),
                });
                series.len() - 1
            });
            if let Some(last) = series[s].readings.last() {
                if t == last.t {
                    return Err(at(format!(
                        "duplicated reading: run '{}', {} at {t} s was already given on line {}",
                        &rec[0], series[s].position, last.line
                    )));
                }
                if t < last.t {
                    return Err(at(format!(
                        "time goes backwards: run '{}', {} reads at {t} s after {} s on line {}",
                        &rec[0], series[s].position, last.t, last.line
                    )));
                }
            }
            series[s].readings.push(Reading { t, temp_c, line });
        }
        if series.is_empty() {
            return Err(PlanError::new(
                "runs",
                "no reading falls on a food cell of the layout",
            ));
        }
        let groups = group(runs.len(), &series, |s| s.run);
        let runs = finish_runs(runs, &series, &groups)?;
        check_series(&runs, &series, &groups)?;
        Ok(HeatingRuns {
            name,
            runs,
            series,
            ignored,
        })
    }

    /// Indices into [`HeatingRuns::series`] per run, ascending.
    pub fn series_by_run(&self) -> Vec<Vec<usize>> {
        group(self.runs.len(), &self.series, |s| s.run)
    }

    /// Indices into [`HeatingRuns::series`] per configuration (`configs` of them), ascending.
    pub fn series_by_config(&self, configs: usize) -> Vec<Vec<usize>> {
        group(configs, &self.series, |s| self.runs[s.run].config)
    }
}

/// Series indices grouped by `key` (which must be below `groups`), ascending in each group.
fn group(groups: usize, series: &[Series], key: impl Fn(&Series) -> usize) -> Vec<Vec<usize>> {
    let mut out = vec![Vec::new(); groups];
    for (k, s) in series.iter().enumerate() {
        out[key(s)].push(k);
    }
    out
}

/// Durations and the length check on every run.
fn finish_runs(
    mut runs: Vec<Run>,
    series: &[Series],
    groups: &[Vec<usize>],
) -> Result<Vec<Run>, PlanError> {
    for (run, members) in runs.iter_mut().zip(groups) {
        let times = members
            .iter()
            .flat_map(|&k| series[k].readings.iter().map(|x| x.t));
        let (lo, hi) = times.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), t| {
            (a.min(t), b.max(t))
        });
        run.duration_s = if lo.is_finite() { hi - lo } else { 0.0 };
        if run.duration_s < MIN_RUN_S {
            return Err(at_line(
                run.first_line,
                format!(
                    "run '{}' lasts {:.1} s; at least {MIN_RUN_S} s are needed to separate sensor lag from heating",
                    run.id, run.duration_s
                ),
            ));
        }
    }
    Ok(runs)
}

/// Per-probe checks: enough readings, and not stuck while the run heats.
fn check_series(runs: &[Run], series: &[Series], groups: &[Vec<usize>]) -> Result<(), PlanError> {
    let rise = |s: &Series| {
        let (lo, hi) = s
            .readings
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), r| {
                (a.min(r.temp_c), b.max(r.temp_c))
            });
        hi - lo
    };
    for (run, members) in runs.iter().zip(groups) {
        let mut rises: Vec<f64> = members.iter().map(|&k| rise(&series[k])).collect();
        let median = crate::regression::median(&mut rises);
        for s in members.iter().map(|&k| &series[k]) {
            let (first, last) = (s.readings[0].line, s.readings[s.readings.len() - 1].line);
            if s.readings.len() < MIN_SAMPLES {
                return Err(at_line(
                    first,
                    format!(
                        "run '{}', {}: {} readings (lines {first}–{last}); at least {MIN_SAMPLES} are needed for a slope and its error",
                        run.id,
                        s.position,
                        s.readings.len()
                    ),
                ));
            }
            if rise(s) == 0.0 && median > STUCK_RISE_K {
                return Err(at_line(
                    first,
                    format!(
                        "run '{}', {}: reads {:.1} °C at every reading (lines {first}–{last}) while the run's probes rose {median:.1} K: a stuck probe or one not in the food; remove its lines",
                        run.id, s.position, s.readings[0].temp_c
                    ),
                ));
            }
        }
    }
    Ok(())
}
