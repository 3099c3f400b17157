//! Food-safety rules as data, with their sources: temperatures, stands, and the kill each category
//! needs.
//!
//! Sources (transcribed in shared/reference/physics.md §2):
//! - USDA FSIS / FoodSafety.gov "Safe Minimum Internal Temperatures" consumer chart; °C by FSIS's
//!   rule °C = (°F − 32)·5/9 to one decimal.
//! - FDA Food Code, 2022 edition: 3-401.11 cooking, 3-401.12 microwave cooking, 3-401.13 plant
//!   foods cooked for hot holding, 3-403.11 reheating, 3-501.16 holding. The section numbers were
//!   confirmed through state adoptions of the 2009–2017 editions; that the 2022 edition keeps them
//!   is recalled from memory.
//!
//! These are planning aids. Local food codes and licensed practice govern; verify with a calibrated
//! thermometer.

use super::lethality::{KillTarget, LISTERIA, SALMONELLA_MEAT, SALMONELLA_POULTRY};

/// A row of the USDA FSIS safe minimum internal temperature chart.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FsisRow {
    /// The food as the chart names it.
    pub food: &'static str,
    /// Minimum internal temperature, °F.
    pub fahrenheit: f64,
    /// The same in °C as FSIS converts it (one decimal).
    pub celsius: f64,
    /// Rest time after cooking, minutes (0 when none is listed).
    pub rest_minutes: f64,
}

/// The FSIS chart rows with a temperature (seafood judged by appearance is not listed).
pub const FSIS_CHART: [FsisRow; 8] = [
    FsisRow {
        food: "Beef, veal, lamb steaks, roasts, chops",
        fahrenheit: 145.0,
        celsius: 62.8,
        rest_minutes: 3.0,
    },
    FsisRow {
        food: "Fresh pork, including fresh ham",
        fahrenheit: 145.0,
        celsius: 62.8,
        rest_minutes: 3.0,
    },
    FsisRow {
        food: "Ground meat and mixtures (beef, pork, veal, lamb)",
        fahrenheit: 160.0,
        celsius: 71.1,
        rest_minutes: 0.0,
    },
    FsisRow {
        food: "All poultry (whole, parts, ground, giblets, stuffing)",
        fahrenheit: 165.0,
        celsius: 73.9,
        rest_minutes: 0.0,
    },
    FsisRow {
        food: "Egg dishes (frittata, quiche)",
        fahrenheit: 160.0,
        celsius: 71.1,
        rest_minutes: 0.0,
    },
    FsisRow {
        food: "Leftovers and casseroles",
        fahrenheit: 165.0,
        celsius: 73.9,
        rest_minutes: 0.0,
    },
    FsisRow {
        food: "Fin fish",
        fahrenheit: 145.0,
        celsius: 62.8,
        rest_minutes: 0.0,
    },
    FsisRow {
        food: "Precooked ham, reheating",
        fahrenheit: 165.0,
        celsius: 73.9,
        rest_minutes: 0.0,
    },
];

/// A rule of the FDA Food Code.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CodeRule {
    /// Section number.
    pub section: &'static str,
    /// What the rule requires, briefly.
    pub summary: &'static str,
    /// Temperature limit, °C.
    pub celsius: f64,
    /// The same, °F.
    pub fahrenheit: f64,
    /// True for a minimum ("at least"), false for a maximum ("at most").
    pub minimum: bool,
    /// Required covered standing time after microwave heating, s (0 when none).
    pub stand_seconds: f64,
    /// The food must be covered while it heats and stands.
    pub covered: bool,
}

/// FDA Food Code: microwave cooking of raw animal foods (all parts 74 °C, stand covered 2 min).
pub const FDA_MICROWAVE_COOKING: CodeRule = CodeRule {
    section: "3-401.12",
    summary: "raw animal foods cooked in a microwave: rotate or stir, cover, reach 74 °C (165 °F) in all parts, stand covered 2 minutes",
    celsius: 74.0,
    fahrenheit: 165.0,
    minimum: true,
    stand_seconds: 120.0,
    covered: true,
};
/// FDA Food Code: reheating for hot holding in a microwave (all parts 74 °C, stand covered 2 min).
pub const FDA_MICROWAVE_REHEATING: CodeRule = CodeRule {
    section: "3-403.11(B)",
    summary: "food reheated in a microwave for hot holding: all parts at least 74 °C (165 °F), rotate or stir, cover, stand covered 2 minutes",
    celsius: 74.0,
    fahrenheit: 165.0,
    minimum: true,
    stand_seconds: 120.0,
    covered: true,
};
/// FDA Food Code: commercially processed ready-to-eat food reheated for hot holding.
pub const FDA_RTE_REHEATING: CodeRule = CodeRule {
    section: "3-403.11(C)",
    summary: "commercially processed, packaged ready-to-eat food reheated for hot holding: at least 57 °C (135 °F)",
    celsius: 57.0,
    fahrenheit: 135.0,
    minimum: true,
    stand_seconds: 0.0,
    covered: false,
};
/// FDA Food Code: fruits and vegetables cooked for hot holding.
pub const FDA_PLANT_FOODS: CodeRule = CodeRule {
    section: "3-401.13",
    summary: "fruits and vegetables cooked for hot holding: at least 57 °C (135 °F)",
    celsius: 57.0,
    fahrenheit: 135.0,
    minimum: true,
    stand_seconds: 0.0,
    covered: false,
};
/// FDA Food Code: hot holding of TCS food.
pub const FDA_HOT_HOLDING: CodeRule = CodeRule {
    section: "3-501.16(A)(1)",
    summary: "hot holding of time/temperature control for safety food: 57 °C (135 °F) or above",
    celsius: 57.0,
    fahrenheit: 135.0,
    minimum: true,
    stand_seconds: 0.0,
    covered: false,
};
/// FDA Food Code: cold holding of TCS food.
pub const FDA_COLD_HOLDING: CodeRule = CodeRule {
    section: "3-501.16(A)(2)",
    summary: "cold holding of time/temperature control for safety food: 5 °C (41 °F) or less",
    celsius: 5.0,
    fahrenheit: 41.0,
    minimum: false,
    stand_seconds: 0.0,
    covered: false,
};

/// What kind of food a safety judgement applies to.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum SafetyCategory {
    /// Poultry (FSIS 165 °F; cooked raw in a microwave, FDA 3-401.12).
    Poultry,
    /// Ground meat and mixtures (FSIS 160 °F; FDA 3-401.12 when raw).
    GroundMeat,
    /// Whole cuts of beef, veal, lamb, fresh pork (FSIS 145 °F + 3 min rest; FDA 3-401.12 when raw).
    WholeMeat,
    /// Fin fish (FSIS 145 °F; FDA 3-401.12 when raw).
    Fish,
    /// Egg dishes (FSIS 160 °F; FDA 3-401.12 when raw).
    EggDish,
    /// Leftovers, casseroles, cooked-and-cooled meals reheated (FSIS 165 °F; FDA 3-403.11(B)).
    Reheated,
    /// Precooked ham reheated (FSIS 165 °F; 140 °F if packaged in a USDA-inspected plant).
    PrecookedHam,
    /// Plant foods and starches cooked for hot holding: 57 °C or above (FDA 3-401.13).
    ServedHot,
    /// Chilled items that must stay cold (FDA 3-501.16 cold holding, a maximum).
    KeepCold,
}

/// One requirement a food item's temperatures are judged against.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Requirement {
    /// Where it comes from (for display).
    pub source: String,
    /// Limit, °C.
    pub celsius: f64,
    /// True: the coldest point must be at least this; false: the warmest point at most this.
    pub minimum: bool,
    /// Standing or rest time the rule requires, s.
    pub stand_seconds: f64,
    /// The rule requires the food covered while it heats and stands.
    pub covered: bool,
}

fn fsis(row: usize) -> Requirement {
    let r = FSIS_CHART[row];
    Requirement {
        source: format!("USDA FSIS chart: {} {} °F", r.food, r.fahrenheit),
        celsius: r.celsius,
        minimum: true,
        stand_seconds: r.rest_minutes * 60.0,
        covered: false,
    }
}

fn code(rule: CodeRule) -> Requirement {
    Requirement {
        source: format!("FDA Food Code 2022 {}", rule.section),
        celsius: rule.celsius,
        minimum: rule.minimum,
        stand_seconds: rule.stand_seconds,
        covered: rule.covered,
    }
}

impl SafetyCategory {
    /// Every category.
    pub const ALL: [SafetyCategory; 9] = [
        SafetyCategory::Poultry,
        SafetyCategory::GroundMeat,
        SafetyCategory::WholeMeat,
        SafetyCategory::Fish,
        SafetyCategory::EggDish,
        SafetyCategory::Reheated,
        SafetyCategory::PrecookedHam,
        SafetyCategory::ServedHot,
        SafetyCategory::KeepCold,
    ];

    /// The requirements for this category when heated in a microwave; the verdict needs all.
    pub fn requirements(self) -> Vec<Requirement> {
        match self {
            SafetyCategory::Poultry => vec![fsis(3), code(FDA_MICROWAVE_COOKING)],
            SafetyCategory::GroundMeat => vec![fsis(2), code(FDA_MICROWAVE_COOKING)],
            SafetyCategory::WholeMeat => vec![fsis(0), code(FDA_MICROWAVE_COOKING)],
            SafetyCategory::Fish => vec![fsis(6), code(FDA_MICROWAVE_COOKING)],
            SafetyCategory::EggDish => vec![fsis(4), code(FDA_MICROWAVE_COOKING)],
            SafetyCategory::Reheated => vec![fsis(5), code(FDA_MICROWAVE_REHEATING)],
            SafetyCategory::PrecookedHam => vec![fsis(7)],
            SafetyCategory::ServedHot => vec![code(FDA_PLANT_FOODS)],
            SafetyCategory::KeepCold => vec![code(FDA_COLD_HOLDING)],
        }
    }

    /// The temperature limits of this category's requirements, °C: the highest minimum its coldest
    /// point must reach, and the lowest maximum its warmest point must stay under (either may be
    /// absent).
    pub fn limits(self) -> (Option<f64>, Option<f64>) {
        let reqs = self.requirements();
        let pick = |minimum: bool, f: fn(f64, f64) -> f64| {
            reqs.iter()
                .filter(|r| r.minimum == minimum)
                .map(|r| r.celsius)
                .reduce(f)
        };
        (pick(true, f64::max), pick(false, f64::min))
    }

    /// The log10 reduction of its target pathogen this category must reach at its coldest point,
    /// through heating and standing; None where no kill step is asked for (plant foods held hot,
    /// chilled items).
    pub fn kill_target(self) -> Option<KillTarget> {
        let salmonella_meat = KillTarget {
            curve: SALMONELLA_MEAT,
            logs: 6.5,
            source: "9 CFR 318.17(a)(1), cooked beef; FSIS Appendix A extends it to other meats",
        };
        // Ready-to-eat and reheated foods: the hazard is recontamination after cooking.
        let listeria = KillTarget {
            curve: LISTERIA,
            logs: 6.0,
            source: "ready-to-eat foods: UK ACMSF 1995 / ECFF (from memory)",
        };
        match self {
            SafetyCategory::Poultry => Some(KillTarget {
                curve: SALMONELLA_POULTRY,
                logs: 7.0,
                source: "9 CFR 381.150(a)(1), ready-to-eat poultry",
            }),
            SafetyCategory::GroundMeat | SafetyCategory::WholeMeat => Some(salmonella_meat),
            SafetyCategory::Fish => Some(KillTarget {
                source: "cooked ready-to-eat fish: FDA Fish and Fishery Products Hazards and Controls Guidance, ch. 16 (from memory)",
                ..listeria
            }),
            // No egg curve here: the poultry curve is far more heat-tolerant than published egg
            // data, so judging eggs on it errs towards the conservative side.
            SafetyCategory::EggDish => Some(KillTarget {
                curve: SALMONELLA_POULTRY,
                logs: 5.0,
                source: "treated shell eggs: 21 CFR 118.3 (from memory), judged on the poultry curve",
            }),
            SafetyCategory::Reheated | SafetyCategory::PrecookedHam => Some(listeria),
            SafetyCategory::ServedHot | SafetyCategory::KeepCold => None,
        }
    }

    /// Short lower-case name, used in files.
    pub fn as_str(self) -> &'static str {
        match self {
            SafetyCategory::Poultry => "poultry",
            SafetyCategory::GroundMeat => "ground-meat",
            SafetyCategory::WholeMeat => "whole-meat",
            SafetyCategory::Fish => "fish",
            SafetyCategory::EggDish => "egg-dish",
            SafetyCategory::Reheated => "reheated",
            SafetyCategory::PrecookedHam => "precooked-ham",
            SafetyCategory::ServedHot => "served-hot",
            SafetyCategory::KeepCold => "keep-cold",
        }
    }

    /// Parses [`SafetyCategory::as_str`].
    pub fn parse(s: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|c| c.as_str() == s)
    }
}

/// A kill target travels as the category it belongs to (its curve and source are static text): two
/// copies of one build, such as the page and its evaluation worker, pass verdicts to each other.
impl serde::Serialize for KillTarget {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let at = SafetyCategory::ALL
            .iter()
            .position(|c| c.kill_target().as_ref() == Some(self))
            .ok_or_else(|| serde::ser::Error::custom("a kill target of no safety category"))?;
        s.serialize_str(SafetyCategory::ALL[at].as_str())
    }
}

impl<'de> serde::Deserialize<'de> for KillTarget {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let name = String::deserialize(d)?;
        SafetyCategory::parse(&name)
            .and_then(SafetyCategory::kill_target)
            .ok_or_else(|| serde::de::Error::custom(format!("'{name}' has no kill target")))
    }
}

/// The usual cautions, shown wherever a plan is shown or exported.
pub const CAUTIONS: [&str; 5] = [
    "Predicted temperatures are estimates from a model, not measurements.",
    "Microwave heating is uneven: cold spots can survive even when the average looks done.",
    "Check the coldest part of each food, usually the thickest or centre, with a calibrated thermometer.",
    "Let food stand covered after heating (the FDA Food Code asks for 2 minutes) before checking and serving.",
    "Follow your local food code and licensed practice; they take precedence over this plan.",
];

/// Converts °F to °C the way the FSIS chart does (one decimal).
pub fn fsis_celsius(fahrenheit: f64) -> f64 {
    ((fahrenheit - 32.0) * 5.0 / 9.0 * 10.0).round() / 10.0
}
