//! Food safety: the rules with their sources, the kill of a target pathogen along a temperature
//! history, and the verdict on an item that puts them together.
//!
//! These are planning aids. Local food codes and licensed practice govern; verify with a calibrated
//! thermometer.

pub mod lethality;
mod rules;
mod verdict;

pub use lethality::{KillCurve, KillTarget, LISTERIA, SALMONELLA_MEAT, SALMONELLA_POULTRY};
pub use rules::{
    CAUTIONS, CodeRule, FDA_COLD_HOLDING, FDA_HOT_HOLDING, FDA_MICROWAVE_COOKING,
    FDA_MICROWAVE_REHEATING, FDA_PLANT_FOODS, FDA_RTE_REHEATING, FSIS_CHART, FsisRow, Requirement,
    SafetyCategory, fsis_celsius,
};
pub use verdict::{Handling, Kill, Verdict, minutes, stand_words, verdict, verdict_within};
