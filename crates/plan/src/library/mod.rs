//! Heating-map libraries: recorded loads with one map per configuration; import, export,
//! validation, and load matching (the replay window).
//!
//! - this module: the model ([`MapLibrary`], [`RecordedLoad`], [`Uncertainty`], [`RateBasis`]),
//!   its limits and validation, and [`MapLibrary::parse`] (either form, by content);
//! - `matching`: similarity of layouts and the replay window;
//! - `csv` and `json`: the two file forms.
//!
//! CSV format "traycast-maps 1" (long form, our own design):
//!
//! ```text
//! # traycast-maps 1
//! # name: Test kitchen oven, run 3
//! # tray: 12 x 8 cells of 25 mm
//! # configurations: 4
//! # units: K/s
//! load,config,row,col,class,rate
//! lunch-a,0,0,0,meat,0.182
//! ```
//!
//! `class` is meat, watery, salty or fatty (empty cells are simply absent). `units` may be K/s,
//! K/min or degF/s; rates are converted to K/s on import. Two optional columns carry a calibrated
//! library's uncertainties: `rate_se` (standard error, same units as `rate`) and `filled` (1 when
//! the cell was never measured and its rate was filled in; see [`crate::calibrate`]). An optional
//! `# basis: thawed` line says the rates are those of thawed food (calibrated libraries);
//! the default, `as-loaded`, means the state the food was in when it was recorded.

mod csv;
mod json;
mod matching;

pub use matching::{LoadMatch, WINDOW_INSIDE, WINDOW_MARGINAL, Window, similarity};

use crate::error::PlanError;
use traycast_thermal::dielectric::LossClass;

/// One recorded load: its layout and one rate map per configuration.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RecordedLoad {
    /// Name of the load.
    pub name: String,
    /// Absorption class per cell, None for empty cells.
    pub layout: Vec<Option<LossClass>>,
    /// Config-major rates, K/s (0 for empty cells).
    pub rates: Vec<f64>,
    /// Standard errors and fill flags, when the library was calibrated from heating runs.
    pub uncertainty: Option<Uncertainty>,
}

/// How well a recorded load's rates are known.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Uncertainty {
    /// Standard error of each rate, config-major, K/s (0 for empty cells).
    pub se: Vec<f64>,
    /// True where the cell was not measured in that configuration and its rate was filled in.
    pub filled: Vec<bool>,
}

/// The state of the food the rates describe.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
pub enum RateBasis {
    /// The state the food was in when recorded (frozen food: frozen rates).
    #[default]
    AsLoaded,
    /// Thawed food: rates fitted above the thaw band, as calibration produces them.
    Thawed,
}

impl RateBasis {
    /// The name used in files.
    pub fn as_str(self) -> &'static str {
        match self {
            RateBasis::AsLoaded => "as-loaded",
            RateBasis::Thawed => "thawed",
        }
    }

    /// Parses [`RateBasis::as_str`].
    pub fn parse(s: &str) -> Option<Self> {
        [RateBasis::AsLoaded, RateBasis::Thawed]
            .into_iter()
            .find(|b| b.as_str() == s)
    }
}

/// A library of recorded loads for one oven and tray grid.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct MapLibrary {
    /// Library name.
    pub name: String,
    /// Cells across.
    pub width: usize,
    /// Cells down.
    pub height: usize,
    /// Cell size, mm.
    pub cell_mm: f64,
    /// Number of configurations.
    pub configs: usize,
    /// What state of the food the rates describe.
    pub basis: RateBasis,
    /// Recorded loads.
    pub loads: Vec<RecordedLoad>,
}

/// Most rate values (loads × cells × configurations) one library may hold: 8 Mi values, about
/// 150 MiB with their standard errors and fill flags (one full 128 × 128 × 512 load, or 57 loads
/// of 48 × 32 × 96).
pub const MAX_LIBRARY_VALUES: usize = 8 << 20;

/// Longest library text read, bytes: bounds what parsing the JSON form can allocate.
pub const MAX_LIBRARY_BYTES: usize = 64 << 20;

/// Checks a library's tray and configuration count against the plan limits, before allocating.
fn check_shape(place: &str, width: usize, height: usize, configs: usize) -> Result<(), PlanError> {
    use crate::model::{MAX_CONFIGS, MAX_SIDE};
    if !(1..=MAX_SIDE).contains(&width) || !(1..=MAX_SIDE).contains(&height) {
        return Err(PlanError::new(
            place,
            format!("tray {width} × {height} is not allowed: 1 to {MAX_SIDE} cells a side"),
        ));
    }
    if !(1..=MAX_CONFIGS).contains(&configs) {
        return Err(PlanError::new(
            place,
            format!("{configs} configurations is not allowed: 1 to {MAX_CONFIGS}"),
        ));
    }
    Ok(())
}

/// Checks that `loads` loads of `cells` × `configs` stay within [`MAX_LIBRARY_VALUES`].
fn check_values(loads: usize, cells: usize, configs: usize) -> Result<(), PlanError> {
    let values = loads.saturating_mul(cells).saturating_mul(configs);
    if values > MAX_LIBRARY_VALUES {
        return Err(PlanError::new(
            "library",
            format!(
                "{loads} loads of {cells} cells × {configs} configurations is {values} rates; a library holds at most {MAX_LIBRARY_VALUES}: split it"
            ),
        ));
    }
    Ok(())
}

/// Above this median rate (K/s over food cells) a file is probably not in K/s.
pub const IMPLAUSIBLY_FAST: f64 = 10.0;
/// Below this median rate (K/s) a file is probably not in K/s either.
pub const IMPLAUSIBLY_SLOW: f64 = 1e-4;

fn class_letter(c: Option<LossClass>) -> char {
    match c {
        None => '.',
        Some(LossClass::Meat) => 'm',
        Some(LossClass::Watery) => 'w',
        Some(LossClass::Salty) => 's',
        Some(LossClass::Fatty) => 'f',
    }
}

fn letter_class(ch: char) -> Option<Option<LossClass>> {
    Some(match ch {
        '.' => None,
        'm' => Some(LossClass::Meat),
        'w' => Some(LossClass::Watery),
        's' => Some(LossClass::Salty),
        'f' => Some(LossClass::Fatty),
        _ => return None,
    })
}

impl MapLibrary {
    /// A hash of the library's content (tray, configurations, basis and every load's name, layout,
    /// rates, errors and fill flags; not the library's name): two libraries with the same hash
    /// hold the same maps. FNV-1a, 64-bit: an identity, not a security hash.
    pub fn content_hash(&self) -> u64 {
        let mut h = crate::fingerprint::Fnv::new();
        h.word(self.width as u64);
        h.word(self.height as u64);
        h.word(self.cell_mm.to_bits());
        h.word(self.configs as u64);
        h.bytes(self.basis.as_str().as_bytes());
        h.word(self.loads.len() as u64);
        for l in &self.loads {
            h.bytes(l.name.as_bytes());
            h.bytes(
                &l.layout
                    .iter()
                    .map(|c| class_letter(*c) as u8)
                    .collect::<Vec<u8>>(),
            );
            h.word(l.rates.len() as u64);
            for r in &l.rates {
                h.word(r.to_bits());
            }
            match &l.uncertainty {
                None => h.word(0),
                Some(u) => {
                    h.word(1);
                    for v in &u.se {
                        h.word(v.to_bits());
                    }
                    h.bytes(&u.filled.iter().map(|&f| f as u8).collect::<Vec<u8>>());
                }
            }
        }
        h.finish()
    }
}

impl MapLibrary {
    /// Structural and plausibility checks; the error names the load, configuration and cell.
    pub fn validate(&self) -> Result<(), PlanError> {
        check_shape("library", self.width, self.height, self.configs)?;
        let n = self.width * self.height;
        check_values(self.loads.len(), n, self.configs)?;
        if !(self.cell_mm.is_finite() && self.cell_mm > 0.0) {
            return Err(PlanError::new(
                "library",
                format!("cell size {} mm is not allowed", self.cell_mm),
            ));
        }
        if self.loads.is_empty() {
            return Err(PlanError::new("library", "holds no recorded load"));
        }
        let mut food_rates = Vec::new();
        for l in &self.loads {
            if l.layout.len() != n || l.rates.len() != n * self.configs {
                return Err(PlanError::new(
                    format!("load '{}'", l.name),
                    "layout or maps do not match the tray size",
                ));
            }
            if let Some(u) = &l.uncertainty {
                if u.se.len() != n * self.configs || u.filled.len() != n * self.configs {
                    return Err(PlanError::new(
                        format!("load '{}'", l.name),
                        "uncertainties do not match the tray size",
                    ));
                }
                if let Some(k) = u.se.iter().position(|v| !(v.is_finite() && *v >= 0.0)) {
                    return Err(PlanError::new(
                        format!(
                            "load '{}', configuration {}, row {}, col {}",
                            l.name,
                            k / n,
                            (k % n) / self.width,
                            k % self.width
                        ),
                        format!("standard error {} is not a non-negative number", u.se[k]),
                    ));
                }
            }
            for c in 0..self.configs {
                for i in 0..n {
                    let r = l.rates[c * n + i];
                    let place = || {
                        format!(
                            "load '{}', configuration {c}, row {}, col {}",
                            l.name,
                            i / self.width,
                            i % self.width
                        )
                    };
                    if !r.is_finite() {
                        return Err(PlanError::new(place(), format!("rate {r} is not a number")));
                    }
                    if r < 0.0 {
                        return Err(PlanError::new(place(), format!("rate {r} K/s is negative")));
                    }
                    if l.layout[i].is_some() {
                        food_rates.push(r);
                    }
                }
            }
        }
        food_rates.sort_by(f64::total_cmp);
        if let Some(&median) = food_rates.get(food_rates.len() / 2) {
            if median > IMPLAUSIBLY_FAST {
                return Err(PlanError::new(
                    "library",
                    format!(
                        "median rate {median:.3} K/s is implausibly fast for a microwave oven (above {IMPLAUSIBLY_FAST} K/s); if the file is per minute say 'units: K/min'"
                    ),
                ));
            }
            if median < IMPLAUSIBLY_SLOW {
                return Err(PlanError::new(
                    "library",
                    format!(
                        "median rate {median:e} K/s is implausibly slow (below {IMPLAUSIBLY_SLOW} K/s); check the units"
                    ),
                ));
            }
        }
        Ok(())
    }

    /// Parses either form, telling them apart by content (JSON starts with `{`).
    pub fn parse(text: &str) -> Result<Self, PlanError> {
        crate::error::check_length("map library", text, MAX_LIBRARY_BYTES)?;
        if text.trim_start().starts_with('{') {
            Self::from_json(text)
        } else {
            Self::from_csv(text)
        }
    }
}
