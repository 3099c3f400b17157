//! The plan file: the plan document as JSON, with what later versions added beside it.

use super::MAX_PLAN_JSON;
use super::doc::PlanDoc;
use crate::error::PlanError;
use crate::model::{MapSource, Objective, Plan, Planning, Variation};
use serde::{Deserialize, Serialize};

/// The plan file: the plan document and, since version 2, the library's content hash (hex); since
/// version 3, how power enters the food.
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct PlanFile {
    #[serde(flatten)]
    doc: PlanDoc,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    library_hash: Option<String>,
    /// Since version 3; absent in older files, which get the default.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    heating: Option<HeatingDoc>,
    /// Since version 5; absent in older files, which get the default.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    variation: Option<VariationDoc>,
    /// Since version 6; absent in older files, which are band fits.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    planning: Option<PlanningDoc>,
}

/// How far the oven and the food may stray from the plan (version 5).
#[derive(Serialize, Deserialize, Debug, Clone, Copy, PartialEq)]
struct VariationDoc {
    /// Oven power, ± fraction.
    oven_power: f64,
    /// Start temperature, ± K.
    start_k: f64,
}

/// How power and heat cross the tray (version 3; the tray's heat capacity since version 4).
#[derive(Serialize, Deserialize, Debug, Clone, Copy, PartialEq)]
struct HeatingDoc {
    /// Share of each cell's power entering through the tray from below, 0 to 1.
    from_below: f64,
    /// Tray heat capacity per area, J/(m²·K); absent (0) in version-3 files.
    #[serde(default)]
    tray_capacity: f64,
}

/// What the plan is planned for (version 6).
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct PlanningDoc {
    /// `band-fit`, `safe-minimum`, `shortest` or `max-margin`.
    objective: String,
    /// Hold the hard rows with the food one cell off as well.
    #[serde(default)]
    placement: bool,
}

pub(super) fn library_hash(plan: &Plan) -> Option<u64> {
    match plan.maps {
        MapSource::Library { hash, .. } => hash,
        MapSource::Synthetic { .. } => None,
    }
}

/// Adds the library hash read from a file or link to a plan pointed at a library.
pub(super) fn with_hash(mut plan: Plan, hash: Option<u64>) -> Plan {
    if let MapSource::Library { hash: h, .. } = &mut plan.maps {
        *h = hash;
    }
    plan
}

/// The plan as JSON (pretty-printed, stable field order).
pub fn to_json(plan: &Plan) -> String {
    let file = PlanFile {
        doc: PlanDoc::from(plan),
        library_hash: library_hash(plan).map(|h| format!("{h:016x}")),
        heating: Some(HeatingDoc {
            from_below: plan.heating.from_below,
            tray_capacity: plan.heating.tray_capacity,
        }),
        variation: Some(VariationDoc {
            oven_power: plan.variation.oven_power,
            start_k: plan.variation.start_k,
        }),
        planning: Some(PlanningDoc {
            objective: plan.planning.objective.as_str().to_string(),
            placement: plan.planning.placement,
        }),
    };
    serde_json::to_string_pretty(&file).expect("plans serialise")
}

/// Reads a plan JSON file; the error names the line or the field.
pub fn from_json(text: &str) -> Result<Plan, PlanError> {
    crate::error::check_length("plan file", text, MAX_PLAN_JSON)?;
    let file: PlanFile = serde_json::from_str(text).map_err(PlanError::json)?;
    let hash = match &file.library_hash {
        None => None,
        Some(hex) => Some(u64::from_str_radix(hex, 16).map_err(|_| {
            PlanError::new(
                "library_hash",
                format!("'{hex}' is not a library content hash (16 hexadecimal digits)"),
            )
        })?),
    };
    let mut plan = with_hash(Plan::try_from(file.doc)?, hash);
    if let Some(h) = file.heating {
        plan.heating.from_below = h.from_below;
        plan.heating.tray_capacity = h.tray_capacity;
    }
    if let Some(v) = file.variation {
        plan.variation = Variation {
            oven_power: v.oven_power,
            start_k: v.start_k,
        };
    }
    if let Some(p) = file.planning {
        plan.planning = Planning {
            objective: Objective::parse(&p.objective, "planning.objective")?,
            placement: p.placement,
        };
    }
    plan.validate()?;
    Ok(plan)
}
