//! The plan a user edits: a tray of cells, the food items placed on it, zones with target bands,
//! oven settings, and where the heating maps come from.

use crate::error::PlanError;
pub use crate::objective::{Objective, Planning};
use traycast_thermal::catalogue::{self, CatalogueFood};
use traycast_thermal::simulate::Settings;

/// Largest tray side, in cells (keeps links and solves bounded).
pub const MAX_SIDE: usize = 128;
/// Most food items or zones in one plan.
pub const MAX_ITEMS: usize = 26;
/// Most oven configurations.
pub const MAX_CONFIGS: usize = 512;

/// The tray grid.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TraySize {
    /// Cells across.
    pub width: usize,
    /// Cells down.
    pub height: usize,
    /// Side of a square cell, mm.
    pub cell_mm: f64,
}

impl TraySize {
    /// Number of cells.
    pub fn cells(&self) -> usize {
        self.width * self.height
    }
}

/// One placed piece of food.
#[derive(Clone, Debug, PartialEq)]
pub struct FoodItem {
    /// Display name (any text; shown as text, never as markup).
    pub name: String,
    /// Catalogue food id.
    pub food: String,
    /// Thickness, mm.
    pub thickness_mm: f64,
    /// Start temperature, °C.
    pub start_c: f64,
    /// Covered while heating: no moisture lost below boiling. The FDA Food Code asks raw animal
    /// foods cooked in a microwave to be covered (3-401.12(B)). Uncovered is the default: its
    /// evaporation cools the food, the cautious side for the coldest point.
    pub covered: bool,
}

/// A set of cells sharing one target band.
#[derive(Clone, Debug, PartialEq)]
pub struct Zone {
    /// Display name.
    pub name: String,
    /// Band minimum, °C.
    pub min_c: f64,
    /// Band maximum, °C.
    pub max_c: f64,
    /// How much this zone's error counts against others (> 0).
    pub weight: f64,
    /// Temperature the zone must not exceed, °C.
    pub cap_c: Option<f64>,
}

/// How dwells become an ordered schedule.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Sequencing {
    /// One block per configuration.
    Blocks,
    /// Dwells split into this many interleaved rounds.
    Rounds(u16),
}

/// How microwave power enters the food on this tray.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Heating {
    /// Share of each cell's power that enters through the tray from below (0 to 1): 0 for a tray
    /// that lets no energy through its base, 0.5 for food heated equally from both faces. The
    /// rest enters through the top face.
    pub from_below: f64,
    /// Heat capacity of the tray under each square metre of food, J/(m²·K); 0 for a bottom that
    /// is insulated and stores no heat ([`Settings::tray_capacity`]).
    pub tray_capacity: f64,
}

impl Default for Heating {
    /// All power from the top: the conservative choice for the coldest point (a thick piece
    /// heated from one face keeps its far side coldest) while the tray's own share is unknown.
    /// Common practice, not a measured value. No tray heat capacity: for a thin plastic tray
    /// (about 1 400 J/(m²·K) against some 75 000 for 20 mm of food) the difference is small.
    fn default() -> Self {
        Heating {
            from_below: 0.0,
            tray_capacity: 0.0,
        }
    }
}

/// How far the real outcome may stray from the nominal plan. The safety bounds take the worst of
/// each range, on top of the maps' own errors.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Variation {
    /// The oven's output may be this fraction lower (or higher) than the maps say, 0 to 0.5.
    pub oven_power: f64,
    /// Each item may start this many kelvin colder (or warmer) than the plan says, 0 to 20.
    pub start_k: f64,
}

impl Default for Variation {
    /// Oven power ±15 %: a published multi-oven study of chilled ready meals saw the mean coldest
    /// point fall from 70.3 to 61.3 °C once the ovens had run for 15 minutes; from a 5 °C start
    /// that is 14 % less rise, rounded up (the study's citation is not at hand). Start ±2 K: a
    /// refrigerator cycling about its set point (common practice, an assumption).
    fn default() -> Self {
        Variation {
            oven_power: 0.15,
            start_k: 2.0,
        }
    }
}

impl Variation {
    /// No variation: bounds from the maps' errors alone.
    pub const NONE: Variation = Variation {
        oven_power: 0.0,
        start_k: 0.0,
    };
}

impl Heating {
    /// `base` with this tray's power entry and bottom.
    pub fn settings(&self, base: Settings) -> Settings {
        Settings {
            bottom_entry: self.from_below,
            tray_capacity: self.tray_capacity,
            ..base
        }
    }
}

/// Oven and controller settings.
#[derive(Clone, Debug, PartialEq)]
pub struct Oven {
    /// Rated output power, W (what a 1 kg water load absorbs).
    pub power_w: f64,
    /// Number of field configurations.
    pub configs: usize,
    /// Total heating time budget, s.
    pub budget_s: Option<f64>,
    /// Longest dwell in any one configuration, s.
    pub limit_s: Option<f64>,
    /// Smallest time step the controller can execute, s (dwells are rounded to it; 0 = exact).
    pub quantum_s: f64,
    /// Preference for shorter schedules (μ, per second; 0 = none).
    pub time_penalty: f64,
    /// Blocks or interleaved rounds.
    pub sequencing: Sequencing,
    /// Standing time after heating, power off, s.
    pub standing_s: f64,
}

/// Where the heating maps come from.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum MapSource {
    /// The illustrative field model, seeded.
    Synthetic {
        /// Seed of the mode mixtures.
        seed: u64,
    },
    /// A named map library (imported by the user).
    Library {
        /// Library name.
        name: String,
        /// The library's content hash ([`crate::library::MapLibrary::content_hash`]) when the plan
        /// was pointed at it; `None` in plans from before it was recorded (then only the name is
        /// checked).
        hash: Option<u64>,
    },
}

/// A whole plan.
#[derive(Clone, Debug, PartialEq)]
pub struct Plan {
    /// Plan name.
    pub name: String,
    /// The grid.
    pub tray: TraySize,
    /// Food items.
    pub items: Vec<FoodItem>,
    /// Per cell (row-major): 0 = empty, k = `items[k − 1]`.
    pub food: Vec<u8>,
    /// Zones.
    pub zones: Vec<Zone>,
    /// Per cell: 0 = no target, k = `zones[k − 1]`.
    pub zone: Vec<u8>,
    /// Oven settings.
    pub oven: Oven,
    /// How power enters the food (top face, tray base).
    pub heating: Heating,
    /// How far the real oven and food may stray from the plan: what the safety bounds allow for.
    pub variation: Variation,
    /// What the schedule is solved for, and the scenarios it must hold in.
    pub planning: Planning,
    /// Map source.
    pub maps: MapSource,
}

/// `Ok` when `ok`, else an error at `place`. A macro so the place and message are only formatted
/// when the check fails: validation runs on every brush stroke.
macro_rules! check {
    ($ok:expr, $place:expr, $msg:expr $(,)?) => {
        if $ok {
            Ok(())
        } else {
            Err(PlanError::new($place, $msg))
        }
    };
}

/// `Ok` when `v` is finite and within `lo..=hi`, else an error at `place` naming `what`.
macro_rules! finite_in {
    ($v:expr, $lo:expr, $hi:expr, $place:expr, $what:expr $(,)?) => {{
        let (v, lo, hi): (f64, f64, f64) = ($v, $lo, $hi);
        check!(
            v.is_finite() && v >= lo && v <= hi,
            $place,
            format!("{} is {v}; it must be between {lo} and {hi}", $what)
        )
    }};
}

impl Plan {
    /// The catalogue food of item `k` (0-based). Valid plans always resolve.
    pub fn catalogue_food(&self, k: usize) -> Option<&'static CatalogueFood> {
        catalogue::find(&self.items[k].food)
    }

    /// Absorption class per cell: the layout a library's recorded loads are matched against.
    pub fn loss_layout(&self) -> Vec<Option<traycast_thermal::dielectric::LossClass>> {
        (0..self.tray.cells())
            .map(|i| {
                self.item_at(i)
                    .and_then(|k| self.catalogue_food(k))
                    .map(|f| f.loss)
            })
            .collect()
    }

    /// Item index (0-based) in cell `i`, if any.
    pub fn item_at(&self, i: usize) -> Option<usize> {
        (self.food[i] > 0).then(|| self.food[i] as usize - 1)
    }

    /// Zone index (0-based) of cell `i`, if any.
    pub fn zone_at(&self, i: usize) -> Option<usize> {
        (self.zone[i] > 0).then(|| self.zone[i] as usize - 1)
    }

    /// Checks everything a solve relies on; the error names the field and what to change.
    pub fn validate(&self) -> Result<(), PlanError> {
        let t = &self.tray;
        check!(
            (1..=MAX_SIDE).contains(&t.width),
            "tray.width",
            format!("tray width {} must be 1 to {MAX_SIDE} cells", t.width),
        )?;
        check!(
            (1..=MAX_SIDE).contains(&t.height),
            "tray.height",
            format!("tray height {} must be 1 to {MAX_SIDE} cells", t.height),
        )?;
        finite_in!(t.cell_mm, 1.0, 100.0, "tray.cell_mm", "cell size (mm)",)?;
        check!(
            self.name.chars().count() <= 200,
            "name",
            "plan name is longer than 200 characters",
        )?;
        let n = t.cells();
        check!(
            self.food.len() == n,
            "food",
            format!("food grid has {} cells, the tray has {n}", self.food.len()),
        )?;
        check!(
            self.zone.len() == n,
            "zone",
            format!("zone grid has {} cells, the tray has {n}", self.zone.len()),
        )?;
        check!(
            self.items.len() <= MAX_ITEMS,
            "items",
            format!("at most {MAX_ITEMS} food items"),
        )?;
        check!(
            self.zones.len() <= MAX_ITEMS,
            "zones",
            format!("at most {MAX_ITEMS} zones"),
        )?;
        for (k, it) in self.items.iter().enumerate() {
            let p = |f: &str| format!("items[{k}].{f}");
            check!(
                it.name.chars().count() <= 100,
                p("name"),
                "name is longer than 100 characters",
            )?;
            check!(
                catalogue::find(&it.food).is_some(),
                p("food"),
                format!("'{}' is not a catalogue food", it.food),
            )?;
            finite_in!(
                it.thickness_mm,
                1.0,
                200.0,
                p("thickness_mm"),
                "thickness (mm)",
            )?;
            finite_in!(
                it.start_c,
                -40.0,
                95.0,
                p("start_c"),
                "start temperature (°C)",
            )?;
        }
        for (k, z) in self.zones.iter().enumerate() {
            let p = |f: &str| format!("zones[{k}].{f}");
            check!(
                z.name.chars().count() <= 100,
                p("name"),
                "name is longer than 100 characters",
            )?;
            finite_in!(z.min_c, -40.0, 100.0, p("min_c"), "band minimum (°C)")?;
            finite_in!(z.max_c, -40.0, 100.0, p("max_c"), "band maximum (°C)")?;
            check!(
                z.min_c <= z.max_c,
                p("max_c"),
                format!("band maximum {} is below its minimum {}", z.max_c, z.min_c),
            )?;
            finite_in!(z.weight, 1e-3, 1e3, p("weight"), "weight")?;
            if let Some(c) = z.cap_c {
                finite_in!(c, -40.0, 100.0, p("cap_c"), "hard cap (°C)")?;
                check!(
                    c >= z.min_c,
                    p("cap_c"),
                    format!("hard cap {c} °C is below the band minimum {} °C", z.min_c),
                )?;
            }
        }
        // Per cell: the place and message are only formatted for the cell that fails.
        for (i, (&f, &z)) in self.food.iter().zip(&self.zone).enumerate() {
            let at = |grid: &str| format!("{grid}[row {}, col {}]", i / t.width, i % t.width);
            if f as usize > self.items.len() {
                return Err(PlanError::new(
                    at("food"),
                    format!("names item {f}, there are {}", self.items.len()),
                ));
            }
            if z as usize > self.zones.len() {
                return Err(PlanError::new(
                    at("zone"),
                    format!("names zone {z}, there are {}", self.zones.len()),
                ));
            }
            if z > 0 && f == 0 {
                return Err(PlanError::new(
                    at("zone"),
                    "a target is painted on an empty cell; paint food there first",
                ));
            }
        }
        let o = &self.oven;
        finite_in!(o.power_w, 50.0, 20_000.0, "oven.power_w", "rated power (W)",)?;
        check!(
            (1..=MAX_CONFIGS).contains(&o.configs),
            "oven.configs",
            format!("configurations must be 1 to {MAX_CONFIGS}"),
        )?;
        if let Some(b) = o.budget_s {
            finite_in!(b, 0.0, 7200.0, "oven.budget_s", "time budget (s)")?;
        }
        if let Some(l) = o.limit_s {
            finite_in!(
                l,
                0.0,
                7200.0,
                "oven.limit_s",
                "per-configuration limit (s)",
            )?;
        }
        finite_in!(
            o.quantum_s,
            0.0,
            60.0,
            "oven.quantum_s",
            "dwell quantum (s)",
        )?;
        finite_in!(
            o.time_penalty,
            0.0,
            1e3,
            "oven.time_penalty",
            "time penalty",
        )?;
        finite_in!(
            o.standing_s,
            0.0,
            3600.0,
            "oven.standing_s",
            "standing time (s)",
        )?;
        if let Sequencing::Rounds(r) = o.sequencing {
            check!(
                (1..=100).contains(&r),
                "oven.sequencing",
                "rounds must be 1 to 100",
            )?;
        }
        finite_in!(
            self.heating.from_below,
            0.0,
            1.0,
            "heating.from_below",
            "share of power entering from below",
        )?;
        finite_in!(
            self.heating.tray_capacity,
            0.0,
            1e6,
            "heating.tray_capacity",
            "tray heat capacity per area, J/(m²·K)",
        )?;
        finite_in!(
            self.variation.oven_power,
            0.0,
            0.5,
            "variation.oven_power",
            "oven power variation (a fraction)",
        )?;
        finite_in!(
            self.variation.start_k,
            0.0,
            20.0,
            "variation.start_k",
            "start temperature variation, K",
        )?;
        self.planning.validate()
    }

    /// A blank tray: no food, no zones, default oven (illustrative values).
    pub fn blank(width: usize, height: usize, cell_mm: f64) -> Self {
        let n = width * height;
        Plan {
            name: "Blank tray".into(),
            tray: TraySize {
                width,
                height,
                cell_mm,
            },
            items: vec![],
            food: vec![0; n],
            zones: vec![],
            zone: vec![0; n],
            oven: Oven::default(),
            heating: Heating::default(),
            variation: Variation::default(),
            planning: Planning::default(),
            maps: MapSource::Synthetic { seed: 1 },
        }
    }
}

impl Default for Oven {
    /// 1000 W, 32 configurations, 300 s budget, no per-configuration limit, 0.5 s quantum,
    /// 4 interleaved rounds, 120 s standing (FDA Food Code 3-401.12).
    fn default() -> Self {
        Oven {
            power_w: 1000.0,
            configs: 32,
            budget_s: Some(300.0),
            limit_s: None,
            quantum_s: 0.5,
            time_penalty: 0.0,
            sequencing: Sequencing::Rounds(4),
            standing_s: 120.0,
        }
    }
}
