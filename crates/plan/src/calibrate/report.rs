//! What a calibration reports: per-configuration quality, notes about cells and probes, the text
//! report and the per-probe table.

use super::{Calibration, LossCorrection, Settings};
use crate::regression;
use crate::runs::HeatingRuns;

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
    /// What removing the runs' own conduction and surface loss did (None when switched off).
    pub loss_correction: Option<LossCorrection>,
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
             Method: least-squares slope over the straight part of each probe's curve, then the run's own conduction, surface loss and warming absorption removed by simulating each run and moving every rate by observed − simulated slope until they agree. Dropped: readings up to the last one below the freezing point + {} K (rates are for thawed food); readings from {} °C up; the first {} sensor time constants of the straight part (τ estimated per run: median {:.1} s, range {:.1}–{:.1} s); leading or trailing readings while a quadratic term is significant (|t| > {}) or the last readings fall below the line (< −{} SE); outliers beyond {} robust σ. Repeats: inverse-variance mean, error widened by the Birge ratio. Unmeasured cells: nearest measured cell of the same food, error widened by the food's spatial variation.\n\n",
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
        match &self.loss_correction {
            Some(l) => out.push_str(&format!(
                "Absorbed power: rates moved by a median {} (largest {}) from the observed slopes, {} pass(es); {} cell-configuration(s) boiled within their window, held at their closest match with wider errors{}.\n\n",
                pct(l.median_change),
                pct(l.largest_change),
                l.passes,
                l.saturated,
                if l.converged {
                    ""
                } else {
                    "; did NOT settle: the rates are approximate"
                }
            )),
            None => out.push_str(
                "Absorbed power: not corrected; the rates are the observed slopes, which include the runs' conduction and surface loss.\n\n",
            ),
        }
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

impl QualityReport {
    /// The report as JSON: the same facts as [`QualityReport::to_text`], by name (no value: null).
    pub fn to_json(&self) -> serde_json::Value {
        let num = |v: f64| {
            if v.is_finite() {
                serde_json::json!(v)
            } else {
                serde_json::Value::Null
            }
        };
        serde_json::json!({
            "runs_file": self.name,
            "layout": self.layout,
            "runs": self.runs,
            "readings": self.readings,
            "ignored_readings": self.ignored,
            "loss_correction": self.loss_correction.map(|l| serde_json::json!({
                "passes": l.passes,
                "converged": l.converged,
                "median_change": num(l.median_change),
                "largest_change": num(l.largest_change),
                "saturated": l.saturated,
            })),
            "sensor_lag_s": self.sensor_lag_s.iter().map(|(run, tau)| serde_json::json!({"run": run, "tau_s": num(*tau)})).collect::<Vec<_>>(),
            "configurations": self.configs.iter().map(|q| serde_json::json!({
                "config": q.config,
                "runs": q.runs,
                "probes": q.probes,
                "measured_cells": q.measured,
                "filled_cells": q.filled,
                "median_r2": num(q.median_r2),
                "median_relative_se": num(q.median_relative_se),
                "outliers": q.outliers,
                "suspect_probes": q.suspect,
                "repeat": q.repeat.as_ref().map(|r| serde_json::json!({
                    "cells": r.cells,
                    "median_relative_difference": num(r.median_relative_difference),
                    "disagreeing": r.disagreeing,
                })),
            })).collect::<Vec<_>>(),
            "notes": self.notes.iter().map(|n| serde_json::json!({
                "config": n.config,
                "row": n.cell / self.width.max(1),
                "col": n.cell % self.width.max(1),
                "run": n.run,
                "line": n.line,
                "kind": n.kind.as_str(),
                "detail": n.detail,
            })).collect::<Vec<_>>(),
        })
    }
}
