//! The verdict on one food item: its temperature at the point judged, the stand and cover its
//! rules ask for, and the kill of its target pathogen at its coldest point.
//!
//! A rule is met only when its procedure is too: the microwave rules ask for the food to be covered
//! and to stand covered for 2 minutes, and a plan that leaves either out is never shown as meeting
//! them ([`Verdict::missing`] says what is missing). A category with a kill target
//! ([`SafetyCategory::kill_target`]) also needs that many log10 at its coldest point; a kill that
//! was not computed is missing, never assumed.

use super::lethality::KillTarget;
use super::rules::{Requirement, SafetyCategory};

/// How an item was heated and stood: what the procedural parts of a rule are checked against.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Handling {
    /// Standing time after heating, s.
    pub stood_seconds: f64,
    /// Covered while heating and standing.
    pub covered: bool,
    /// Log10 reduction of the category's target pathogen reached at the item's coldest point
    /// through heating and standing (see [`super::lethality`]); None when it was not computed,
    /// which a category with a kill target counts as missing.
    pub log_reduction: Option<f64>,
}

/// The kill an item reached against what its category needs.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Kill {
    /// What the category needs.
    pub target: KillTarget,
    /// Log10 reduction reached at the coldest point (NaN when not computed).
    pub achieved: f64,
}

impl Kill {
    /// True when the kill reaches its target.
    pub fn met(&self) -> bool {
        self.achieved >= self.target.logs
    }
}

/// The coldest-point verdict for one food item.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Verdict {
    /// True when every requirement holds: its temperature, and its stand and cover.
    pub safe: bool,
    /// The requirement with the smallest margin.
    pub binding: Requirement,
    /// Margin against it, K: coldest − limit for a minimum, limit − warmest for a maximum.
    pub margin: f64,
    /// Coldest point after standing, °C.
    pub coldest: f64,
    /// Warmest point after standing, °C.
    pub warmest: f64,
    /// What the rules ask for that the plan leaves out, e.g. "stand 2 min covered (plan: 1 min)";
    /// empty when nothing is. A verdict with anything here is never safe.
    pub missing: Vec<String>,
    /// The kill of the category's target pathogen at the coldest point, when it has one.
    pub kill: Option<Kill>,
    /// The longest stand the item's rules ask for, s.
    pub stand_required_s: f64,
    /// The item's rules ask for it to be covered while it heats and stands.
    pub cover_required: bool,
}

/// Judges an item from its cells' temperatures after standing (°C) and how it was handled.
pub fn verdict(category: SafetyCategory, after_standing: &[f64], handling: Handling) -> Verdict {
    verdict_within(category, after_standing, after_standing, handling)
}

/// Judges an item whose cell temperatures are only known within bounds: minimum requirements are
/// checked on the coldest lower bound, maximum requirements on the warmest upper bound; the stand
/// and cover each rule asks for must be in the plan too.
///
/// No temperatures, or any that is not a finite number, can never be judged safe: the verdict then
/// fails with a NaN margin (shown as "no value"), rather than judging the cells that are left.
pub fn verdict_within(
    category: SafetyCategory,
    lower: &[f64],
    upper: &[f64],
    handling: Handling,
) -> Verdict {
    let judgeable =
        !lower.is_empty() && !upper.is_empty() && lower.iter().chain(upper).all(|v| v.is_finite());
    let (coldest, warmest) = if judgeable {
        (
            lower.iter().copied().fold(f64::INFINITY, f64::min),
            upper.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        )
    } else {
        (f64::NAN, f64::NAN)
    };
    let reqs = category.requirements();
    let margin_of = |r: &Requirement| {
        if r.minimum {
            coldest - r.celsius
        } else {
            r.celsius - warmest
        }
    };
    let binding = reqs
        .iter()
        .min_by(|a, b| margin_of(a).total_cmp(&margin_of(b)))
        .expect("every category has a requirement")
        .clone();
    let margin = margin_of(&binding);
    let mut missing = Vec::new();
    let stand = reqs.iter().map(|r| r.stand_seconds).fold(0.0, f64::max);
    let cover = reqs.iter().any(|r| r.covered);
    if cover && !handling.covered {
        missing.push("cover the food while it heats and stands".to_string());
    }
    if stand > handling.stood_seconds {
        missing.push(format!(
            "stand {} (plan: {})",
            stand_words(stand, cover),
            minutes(handling.stood_seconds)
        ));
    }
    let kill = category.kill_target().map(|target| Kill {
        target,
        achieved: handling.log_reduction.unwrap_or(f64::NAN),
    });
    if let Some(k) = kill.filter(|k| k.achieved.is_nan()) {
        missing.push(format!(
            "the {} kill at the coldest point (not computed)",
            k.target.curve.pathogen
        ));
    }
    Verdict {
        safe: margin >= 0.0
            && margin.is_finite()
            && missing.is_empty()
            && kill.is_none_or(|k| k.met()),
        binding,
        margin,
        coldest,
        warmest,
        missing,
        kill,
        stand_required_s: stand,
        cover_required: cover,
    }
}

/// A stand for a person: "2 min covered", "3 min", "none".
pub fn stand_words(seconds: f64, covered: bool) -> String {
    match (seconds > 0.0, covered) {
        (false, false) => "none".into(),
        (false, true) => "covered".into(),
        (true, c) => format!("{}{}", minutes(seconds), if c { " covered" } else { "" }),
    }
}

/// A duration for a person: "2 min", "90 s".
pub fn minutes(seconds: f64) -> String {
    if seconds >= 60.0 && (seconds / 60.0).fract() == 0.0 {
        format!("{} min", seconds / 60.0)
    } else {
        format!("{seconds:.0} s")
    }
}
