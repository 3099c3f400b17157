//! What an evaluation reports: per zone, per item, the baseline, the refinement, and the whole.

use super::diagnosis::Diagnosis;
use super::maps::Provenance;
use traycast_solver::Status;
use traycast_thermal::safety::Verdict;
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::TimeCourse;

/// One zone's outcome.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct ZoneSummary {
    /// Share of the zone's cells inside the band, linear prediction.
    pub coverage_linear: f64,
    /// Share inside the band after the simulated standing time.
    pub coverage_simulated: f64,
    /// RMS distance outside the band, K, linear.
    pub rms_linear: f64,
    /// RMS distance outside the band, K, simulated (after standing).
    pub rms_simulated: f64,
    /// Why it misses, when it does (linear RMS above 1 K).
    pub diagnosis: Option<Diagnosis>,
}

/// One food item's outcome.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct ItemSummary {
    /// Coldest point after standing (the coldest layer of any of its cells), °C.
    pub min: f64,
    /// Mass-weighted mean after standing, °C.
    pub mean: f64,
    /// Warmest point after standing (of the coldest layers' temperatures; see the time course for
    /// the hottest layer), °C.
    pub max: f64,
    /// Share of the item's zoned cells inside their band after standing (NaN if none is zoned).
    pub in_band: f64,
    /// The coldest-point food-safety verdict; with calibrated maps it is judged on the bounds
    /// (the coldest point's lower bound, the warmest point's upper bound).
    pub verdict: Verdict,
    /// Water evaporated, g.
    pub moisture_g: f64,
    /// Where the item's temperatures lie within the bounds (see [`Evaluation::bounds_from`]).
    pub spread: Option<Spread>,
    /// Where the verdict's binding rule was judged (None for an item with no cells).
    pub judged: Option<JudgedPoint>,
}

/// The point of an item a verdict was judged at.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct JudgedPoint {
    /// True for the warmest point (a cold-holding maximum), false for the coldest.
    pub warmest: bool,
    /// The cell (row-major).
    pub cell: usize,
    /// Depth of that layer's centre below the food's top face, m.
    pub depth_m: f64,
}

impl JudgedPoint {
    /// "coldest point" or "warmest point".
    pub fn name(&self) -> &'static str {
        if self.warmest {
            "warmest point"
        } else {
            "coldest point"
        }
    }

    /// Where it is, for people: "row 3, col 7, 12 mm deep".
    pub fn place(&self, width: usize) -> String {
        format!(
            "row {}, col {}, {:.0} mm deep",
            self.cell / width,
            self.cell % width,
            self.depth_m * 1000.0
        )
    }
}

/// Where an item's temperatures after standing lie given the maps' standard errors: each interval
/// bounds the quantity when every cell is within its own 95 % interval.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Spread {
    /// Coldest point, °C (lower, upper).
    pub coldest: (f64, f64),
    /// Mean over the cells, °C (lower, upper).
    pub mean: (f64, f64),
    /// Warmest point, °C (lower, upper).
    pub warmest: (f64, f64),
    /// The verdict on the nominal temperatures, for comparison.
    pub nominal: Verdict,
}

/// Per-cell bounds of the temperatures after standing, joint over each item at 95 %, °C (NaN for
/// empty cells).
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct CellBounds {
    /// Lower bounds.
    pub lower: Vec<f64>,
    /// Upper bounds.
    pub upper: Vec<f64>,
}

/// The same tray heated without steering.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Baseline {
    /// Heating time: until the coldest targeted cell reaches its band minimum (capped by the budget).
    pub seconds: f64,
    /// Each cell's temperature at the end of it, °C (linear prediction; NaN off the food).
    pub temps: Vec<f64>,
    /// RMS distance outside the bands, K (linear prediction).
    pub rms_linear: f64,
    /// Share of targeted cells inside their bands.
    pub coverage_linear: f64,
}

/// What the simulation loop (solve → simulate → correct → re-solve) did.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Refinement {
    /// RMS band distance after standing of the first solve, K.
    pub rms_before: f64,
    /// The same for the plan kept, K.
    pub rms_after: f64,
    /// Whether a later pass was kept (it is only when it is better; see `evaluate::refine`).
    pub kept: bool,
    /// Solves run, the first included.
    pub passes: usize,
    /// Largest change of any food cell's simulated temperature after standing in the last pass, K.
    pub change_k: f64,
    /// The change fell below the loop's tolerance before its cap.
    pub converged: bool,
    /// The tolerance, K.
    pub tolerance_k: f64,
    /// In the plan kept, the largest distance of an item's judged point beyond its safety limit
    /// (K; 0 when every item holds, NaN when an item could not be judged).
    pub safety_gap_k: f64,
    /// Why the loop stopped early, when a corrected problem had no schedule.
    pub stopped: Option<String>,
}

/// Everything a front end shows.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Evaluation {
    /// Seconds per configuration (rounded to the controller's quantum).
    pub dwell: Vec<f64>,
    /// Total heating time, s.
    pub total_s: f64,
    /// Solver status.
    pub status: Status,
    /// Solver KKT residual (relative).
    pub kkt_residual: f64,
    /// The schedule run by the simulation.
    pub schedule: Schedule,
    /// Linear prediction per cell, °C (NaN for empty cells).
    pub linear: Vec<f64>,
    /// Signed distance outside the band per cell, linear, K (NaN for cells without a target).
    pub error_linear: Vec<f64>,
    /// The same after the simulated standing time.
    pub error_simulated: Vec<f64>,
    /// The simulated time course.
    pub course: TimeCourse,
    /// Per zone.
    pub zones: Vec<ZoneSummary>,
    /// Per food item.
    pub items: Vec<ItemSummary>,
    /// Unsteered comparison.
    pub baseline: Baseline,
    /// Per item: how evenly it heats, steered (linear and simulated) and unsteered.
    pub uniformity: Vec<super::uniformity::ItemUniformity>,
    /// Where the maps came from.
    pub provenance: Provenance,
    /// Things the user should know (replay window, caps, budget).
    pub warnings: Vec<String>,
    /// Largest excess over a hard cap in the linear prediction, K (0 when all caps hold).
    pub cap_excess: f64,
    /// The refinement pass, if requested.
    pub refinement: Option<Refinement>,
    /// Per-cell bounds after standing, joint over each item at 95 %, when the maps carry standard
    /// errors or the plan allows for variation.
    pub bounds: Option<CellBounds>,
    /// What the bounds allow for, in words ("95 % joint bounds: the maps' errors, oven power
    /// ±15 %, start ±2 K"); None without bounds.
    pub bounds_from: Option<String>,
    /// The usual cautions.
    #[serde(skip, default = "all_cautions")]
    pub cautions: &'static [&'static str],
}

fn all_cautions() -> &'static [&'static str] {
    &traycast_thermal::safety::CAUTIONS
}

/// The fast part of an evaluation (see [`Evaluator::quick`]).
#[derive(Clone, Debug, PartialEq)]
pub struct Quick {
    /// Seconds per configuration (rounded to the controller's quantum).
    pub dwell: Vec<f64>,
    /// Total heating time, s.
    pub total_s: f64,
    /// Solver status.
    pub status: Status,
    /// Linear prediction per cell, °C (NaN for empty cells).
    pub linear: Vec<f64>,
    /// Signed distance outside the band per cell, linear, K (NaN for cells without a target).
    pub error_linear: Vec<f64>,
}

/// Options of an evaluation.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Options {
    /// Run the simulation loop for a band fit too (the constrained objectives always run it).
    pub refine: bool,
}

impl Evaluation {
    /// True when the maps are the illustrative field model's, not measurements.
    pub fn illustrative(&self) -> bool {
        matches!(self.provenance, Provenance::Synthetic)
    }
}

/// A verdict in words, the same wherever it is shown: "meets", "meets on illustrative maps only"
/// (never a plain "meets" on maps that are not measurements), or why it fails: too cold (or too
/// warm) at the point judged, and what the rule asks for that the plan leaves out.
pub fn verdict_words(v: &Verdict, illustrative: bool) -> String {
    if !v.margin.is_finite() {
        return "fails: no temperature to judge".into();
    }
    if v.safe {
        return if illustrative {
            "meets on illustrative maps only".into()
        } else {
            "meets".into()
        };
    }
    let mut why = Vec::new();
    if v.margin < 0.0 {
        why.push(if v.binding.minimum {
            "too cold at its coldest point".to_string()
        } else {
            "too warm at its warmest point".to_string()
        });
    }
    if let Some(k) = v.kill.filter(|k| !k.met() && !k.achieved.is_nan()) {
        why.push(format!(
            "kills {} of the {} log10 {} it needs at its coldest point",
            logs(k.achieved),
            k.target.logs,
            k.target.curve.pathogen
        ));
    }
    if !v.missing.is_empty() {
        why.push(format!("missing {}", v.missing.join(", ")));
    }
    format!("fails: {}", why.join("; "))
}

/// A log10 reduction for people: one decimal, and "100+" past the point where more says nothing.
pub fn logs(achieved: f64) -> String {
    if achieved >= 100.0 {
        "100+".into()
    } else {
        format!("{achieved:.1}")
    }
}

/// What bounds allow for, in words: the maps' errors (when they carry any), the oven's power and
/// the start temperature (when the plan allows for them).
pub fn bounds_words(maps_have_errors: bool, v: &crate::model::Variation) -> String {
    let mut parts = Vec::new();
    if maps_have_errors {
        parts.push("the maps' errors".to_string());
    }
    if v.oven_power > 0.0 {
        parts.push(format!("oven power ±{:.0} %", 100.0 * v.oven_power));
    }
    if v.start_k > 0.0 {
        parts.push(format!("start ±{} K", v.start_k));
    }
    format!("95 % joint bounds: {}", parts.join(", "))
}
