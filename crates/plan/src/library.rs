//! Heating-map libraries: recorded loads with one map per configuration; import, export,
//! validation, and load matching (the replay window).
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

use crate::csvtext::{Sheet, at_line};
use crate::error::PlanError;
use serde::{Deserialize, Serialize};
use traycast_thermal::dielectric::LossClass;

/// One recorded load: its layout and one rate map per configuration.
#[derive(Clone, Debug, PartialEq)]
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
#[derive(Clone, Debug, PartialEq)]
pub struct Uncertainty {
    /// Standard error of each rate, config-major, K/s (0 for empty cells).
    pub se: Vec<f64>,
    /// True where the cell was not measured in that configuration and its rate was filled in.
    pub filled: Vec<bool>,
}

/// The state of the food the rates describe.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
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
#[derive(Clone, Debug, PartialEq)]
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

/// Where a plan stands relative to a library's recorded loads.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Window {
    /// Score ≥ 0.90: the layout is close enough to replay the maps.
    Inside,
    /// 0.75 ≤ score < 0.90: similar load; expect deviations, verify by measurement.
    Marginal,
    /// Score < 0.75: the maps were recorded for a different load and should not be trusted.
    Outside,
}

/// Replay-window thresholds (Traycast's own product choice, not a standard): inside ≥ 0.90,
/// marginal ≥ 0.75.
pub const WINDOW_INSIDE: f64 = 0.90;
/// See [`WINDOW_INSIDE`].
pub const WINDOW_MARGINAL: f64 = 0.75;

/// The best-matching recorded load.
#[derive(Clone, Debug, PartialEq)]
pub struct LoadMatch {
    /// Index into `loads`.
    pub load: usize,
    /// Similarity 0…1: 1 − (mismatch over the cells that hold food in either layout), where food
    /// against empty counts 1 and food of another absorption class counts 0.5.
    pub score: f64,
    /// Window the score falls in.
    pub window: Window,
}

/// Similarity of two layouts (see [`LoadMatch::score`]).
pub fn similarity(a: &[Option<LossClass>], b: &[Option<LossClass>]) -> f64 {
    let (mut used, mut miss) = (0.0, 0.0);
    for (x, y) in a.iter().zip(b) {
        match (x, y) {
            (None, None) => {}
            (Some(p), Some(q)) => {
                used += 1.0;
                if p != q {
                    miss += 0.5;
                }
            }
            _ => {
                used += 1.0;
                miss += 1.0;
            }
        }
    }
    if used == 0.0 { 1.0 } else { 1.0 - miss / used }
}

impl MapLibrary {
    /// Scores `layout` against every recorded load and returns the best.
    pub fn best_match(&self, layout: &[Option<LossClass>]) -> Option<LoadMatch> {
        self.loads
            .iter()
            .enumerate()
            .map(|(k, l)| (k, similarity(layout, &l.layout)))
            .max_by(|a, b| a.1.total_cmp(&b.1))
            .map(|(load, score)| LoadMatch {
                load,
                score,
                window: if score >= WINDOW_INSIDE {
                    Window::Inside
                } else if score >= WINDOW_MARGINAL {
                    Window::Marginal
                } else {
                    Window::Outside
                },
            })
    }

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

    /// Parses the CSV format (see the module docs). Errors name the line.
    pub fn from_csv(text: &str) -> Result<Self, PlanError> {
        crate::error::check_length("map library", text, MAX_LIBRARY_BYTES)?;
        let sheet = Sheet::parse(text)?;
        sheet.check_format("traycast-maps", "1")?;
        let name = sheet
            .meta("name")
            .map_or("imported library".to_string(), |(_, v)| v.to_string());
        let size = match sheet.meta("tray") {
            None => None,
            Some((line, value)) => {
                // "W x H cells of S mm"
                let parts: Vec<&str> = value.split_whitespace().collect();
                let parsed = (|| {
                    Some((
                        parts.first()?.parse::<usize>().ok()?,
                        parts.get(2)?.parse::<usize>().ok()?,
                        parts.get(5)?.parse::<f64>().ok()?,
                    ))
                })();
                Some(parsed.ok_or_else(|| {
                    at_line(
                        line,
                        format!("tray should read like '12 x 8 cells of 25 mm', not '{value}'"),
                    )
                })?)
            }
        };
        let configs = match sheet.meta("configurations") {
            None => None,
            Some((line, value)) => Some(value.parse::<usize>().map_err(|_| {
                at_line(
                    line,
                    format!("configurations '{value}' is not a whole number"),
                )
            })?),
        };
        let factor = match sheet.meta("units") {
            None => None,
            Some((line, value)) => Some(match value {
                "K/s" => 1.0,
                "K/min" => 1.0 / 60.0,
                "degF/s" | "°F/s" => 5.0 / 9.0,
                other => {
                    return Err(at_line(
                        line,
                        format!("units '{other}' not understood: use K/s, K/min or degF/s"),
                    ));
                }
            }),
        };
        let basis = match sheet.meta("basis") {
            None => RateBasis::AsLoaded,
            Some((line, value)) => RateBasis::parse(value).ok_or_else(|| {
                at_line(
                    line,
                    format!("basis '{value}' not understood: use as-loaded or thawed"),
                )
            })?,
        };
        let head = |m: &str| PlanError::new("header", m.to_string());
        let (width, height, cell_mm) =
            size.ok_or_else(|| head("missing '# tray: W x H cells of S mm'"))?;
        let configs = configs.ok_or_else(|| head("missing '# configurations: N'"))?;
        let factor = factor.ok_or_else(|| head("missing '# units: K/s' (or K/min, degF/s)"))?;
        check_shape("header", width, height, configs)?;
        let n = width * height;
        let want = ["load", "config", "row", "col", "class", "rate"];
        let with_se = [&want[..], &["rate_se", "filled"]].concat();
        let columns: Vec<&str> = sheet.header.iter().map(String::as_str).collect();
        let has_se = columns == with_se;
        if columns != want && !has_se {
            return Err(at_line(
                sheet.header_line,
                format!(
                    "columns should be {} (optionally followed by rate_se,filled)",
                    want.join(",")
                ),
            ));
        }
        let mut loads: Vec<RecordedLoad> = Vec::new();
        let mut seen: Vec<Vec<bool>> = Vec::new();
        for record in sheet.records() {
            let (lineno, rec) = record?;
            let at = |m: String| at_line(lineno, m);
            if rec.len() != columns.len() {
                return Err(at(format!(
                    "has {} fields, expected {}",
                    rec.len(),
                    columns.len()
                )));
            }
            let int = |k: usize, what: &str, max: usize| -> Result<usize, PlanError> {
                let v: usize = rec[k]
                    .parse()
                    .map_err(|_| at(format!("{what} '{}' is not a whole number", &rec[k])))?;
                if v >= max {
                    return Err(at(format!("{what} {v} is out of range (0 to {})", max - 1)));
                }
                Ok(v)
            };
            let config = int(1, "config", configs)?;
            let row = int(2, "row", height)?;
            let col = int(3, "col", width)?;
            let class = LossClass::parse(&rec[4]).ok_or_else(|| {
                at(format!(
                    "class '{}' is not one of meat, watery, salty, fatty",
                    &rec[4]
                ))
            })?;
            let number = |k: usize, what: &str| -> Result<f64, PlanError> {
                match rec[k].parse::<f64>() {
                    Ok(v) if v.is_finite() => Ok(v),
                    _ => Err(at(format!("{what} '{}' is not a number", &rec[k]))),
                }
            };
            let rate = number(5, "rate")?;
            if rate < 0.0 {
                return Err(at(format!(
                    "rate {rate} is negative; heating rates are ≥ 0"
                )));
            }
            let se = if has_se && !(rec[6].is_empty() && rec[7].is_empty()) {
                let se = number(6, "rate_se")?;
                if se < 0.0 {
                    return Err(at(format!("rate_se {se} is negative")));
                }
                let filled = match &rec[7] {
                    "0" | "no" | "false" => false,
                    "1" | "yes" | "true" => true,
                    other => return Err(at(format!("filled '{other}' should be 0 or 1"))),
                };
                Some((se, filled))
            } else {
                None
            };
            let li = match loads.iter().position(|l| l.name == rec[0]) {
                Some(k) => k,
                None => {
                    check_values(loads.len() + 1, n, configs).map_err(|e| at(e.message))?;
                    loads.push(RecordedLoad {
                        name: rec[0].to_string(),
                        layout: vec![None; n],
                        rates: vec![0.0; n * configs],
                        uncertainty: se.is_some().then(|| Uncertainty {
                            se: vec![0.0; n * configs],
                            filled: vec![false; n * configs],
                        }),
                    });
                    seen.push(vec![false; n * configs]);
                    loads.len() - 1
                }
            };
            let i = row * width + col;
            let load = &mut loads[li];
            if seen[li][config * n + i] {
                return Err(at(format!(
                    "duplicate sample for load '{}', configuration {config}, row {row}, col {col}",
                    load.name
                )));
            }
            if let Some(existing) = load.layout[i]
                && existing != class
            {
                return Err(at(format!(
                    "row {row}, col {col} was '{}' earlier in load '{}'",
                    existing.as_str(),
                    load.name
                )));
            }
            load.layout[i] = Some(class);
            seen[li][config * n + i] = true;
            load.rates[config * n + i] = rate * factor;
            match (se, load.uncertainty.as_mut()) {
                (Some((se, filled)), Some(u)) => {
                    u.se[config * n + i] = se * factor;
                    u.filled[config * n + i] = filled;
                }
                (None, None) => {}
                _ => {
                    return Err(at(format!(
                        "rate_se and filled must be given on every row of load '{}' or on none",
                        load.name
                    )));
                }
            }
        }
        for (l, s) in loads.iter().zip(&seen) {
            for i in (0..n).filter(|&i| l.layout[i].is_some()) {
                if let Some(c) = (0..configs).find(|&c| !s[c * n + i]) {
                    return Err(PlanError::new(
                        format!("load '{}'", l.name),
                        format!(
                            "no rate for configuration {c} at row {}, col {}",
                            i / width,
                            i % width
                        ),
                    ));
                }
            }
        }
        let lib = MapLibrary {
            name,
            width,
            height,
            cell_mm,
            configs,
            basis,
            loads,
        };
        lib.validate()?;
        Ok(lib)
    }

    /// Writes the CSV format (K/s), with the uncertainty columns when any load carries them.
    pub fn to_csv(&self) -> String {
        let n = self.width * self.height;
        let with_se = self.loads.iter().any(|l| l.uncertainty.is_some());
        let mut out = format!(
            "# traycast-maps 1\n# name: {}\n# tray: {} x {} cells of {} mm\n# configurations: {}\n# units: K/s\n",
            self.name.replace('\n', " "),
            self.width,
            self.height,
            self.cell_mm,
            self.configs
        );
        if self.basis != RateBasis::AsLoaded {
            out.push_str(&format!("# basis: {}\n", self.basis.as_str()));
        }
        out.push_str("load,config,row,col,class,rate");
        out.push_str(if with_se { ",rate_se,filled\n" } else { "\n" });
        for l in &self.loads {
            let name = if l.name.contains([',', '"', '\n']) {
                format!("\"{}\"", l.name.replace('"', "\"\""))
            } else {
                l.name.clone()
            };
            for c in 0..self.configs {
                for i in 0..n {
                    if let Some(class) = l.layout[i] {
                        let k = c * n + i;
                        out.push_str(&format!(
                            "{name},{c},{},{},{},{}",
                            i / self.width,
                            i % self.width,
                            class.as_str(),
                            l.rates[k]
                        ));
                        match (&l.uncertainty, with_se) {
                            (Some(u), _) => {
                                out.push_str(&format!(",{},{}\n", u.se[k], u8::from(u.filled[k])))
                            }
                            (None, true) => out.push_str(",,\n"),
                            (None, false) => out.push('\n'),
                        }
                    }
                }
            }
        }
        out
    }

    /// JSON form.
    pub fn to_json(&self) -> String {
        let doc = LibraryDoc {
            format: FORMAT.into(),
            version: 1,
            name: self.name.clone(),
            width: self.width,
            height: self.height,
            cell_mm: self.cell_mm,
            configs: self.configs,
            units: "K/s".into(),
            basis: self.basis.as_str().into(),
            loads: self
                .loads
                .iter()
                .map(|l| LoadDoc {
                    name: l.name.clone(),
                    layout: l
                        .layout
                        .chunks(self.width)
                        .map(|r| r.iter().map(|&c| class_letter(c)).collect())
                        .collect(),
                    rates: l
                        .rates
                        .chunks(self.width * self.height)
                        .map(|c| c.to_vec())
                        .collect(),
                    rate_se: l.uncertainty.as_ref().map(|u| {
                        u.se.chunks(self.width * self.height)
                            .map(|c| c.to_vec())
                            .collect()
                    }),
                    filled: l.uncertainty.as_ref().map(|u| {
                        u.filled
                            .chunks(self.width * self.height)
                            .map(|c| c.iter().map(|&f| if f { '1' } else { '0' }).collect())
                            .collect()
                    }),
                })
                .collect(),
        };
        serde_json::to_string_pretty(&doc).expect("library serialises")
    }

    /// Parses the JSON form.
    pub fn from_json(text: &str) -> Result<Self, PlanError> {
        crate::error::check_length("map library", text, MAX_LIBRARY_BYTES)?;
        let doc: LibraryDoc = serde_json::from_str(text)
            .map_err(|e| PlanError::new(format!("line {}", e.line()), e.to_string()))?;
        if doc.format != FORMAT || doc.version != 1 {
            return Err(PlanError::new(
                "format",
                format!(
                    "'{}' version {} is not a map library this version reads",
                    doc.format, doc.version
                ),
            ));
        }
        if doc.units != "K/s" {
            return Err(PlanError::new("units", "JSON libraries are stored in K/s"));
        }
        let basis = RateBasis::parse(&doc.basis).ok_or_else(|| {
            PlanError::new(
                "basis",
                format!("'{}' is not as-loaded or thawed", doc.basis),
            )
        })?;
        // Sizes first: nothing is allocated for a tray the library may not have.
        check_shape("library", doc.width, doc.height, doc.configs)?;
        let n = doc.width * doc.height;
        check_values(doc.loads.len(), n, doc.configs)?;
        let mut loads = Vec::new();
        for l in doc.loads {
            let mut layout = Vec::with_capacity(n);
            for (r, row) in l.layout.iter().enumerate() {
                if row.chars().count() != doc.width {
                    return Err(PlanError::new(
                        format!("load '{}' layout row {r}", l.name),
                        format!("has {} cells, expected {}", row.chars().count(), doc.width),
                    ));
                }
                for ch in row.chars() {
                    layout.push(letter_class(ch).ok_or_else(|| {
                        PlanError::new(
                            format!("load '{}' layout row {r}", l.name),
                            format!("'{ch}' is not one of . m w s f"),
                        )
                    })?);
                }
            }
            if layout.len() != n
                || l.rates.len() != doc.configs
                || l.rates.iter().any(|m| m.len() != n)
            {
                return Err(PlanError::new(
                    format!("load '{}'", l.name),
                    "layout or maps do not match the tray size",
                ));
            }
            let uncertainty = match (l.rate_se, l.filled) {
                (None, None) => None,
                (Some(se), Some(filled)) => {
                    if se.len() != doc.configs
                        || se.iter().any(|m| m.len() != n)
                        || filled.len() != doc.configs
                        || filled.iter().any(|m| m.chars().count() != n)
                    {
                        return Err(PlanError::new(
                            format!("load '{}'", l.name),
                            "rate_se or filled do not match the tray size",
                        ));
                    }
                    let mut flags = Vec::with_capacity(n * doc.configs);
                    for (c, m) in filled.iter().enumerate() {
                        for ch in m.chars() {
                            flags.push(match ch {
                                '0' => false,
                                '1' => true,
                                _ => {
                                    return Err(PlanError::new(
                                        format!("load '{}' filled[{c}]", l.name),
                                        format!("'{ch}' is not 0 or 1"),
                                    ));
                                }
                            });
                        }
                    }
                    Some(Uncertainty {
                        se: se.concat(),
                        filled: flags,
                    })
                }
                _ => {
                    return Err(PlanError::new(
                        format!("load '{}'", l.name),
                        "rate_se and filled come together",
                    ));
                }
            };
            loads.push(RecordedLoad {
                name: l.name,
                layout,
                rates: l.rates.concat(),
                uncertainty,
            });
        }
        let lib = MapLibrary {
            name: doc.name,
            width: doc.width,
            height: doc.height,
            cell_mm: doc.cell_mm,
            configs: doc.configs,
            basis,
            loads,
        };
        lib.validate()?;
        Ok(lib)
    }
}

const FORMAT: &str = "traycast-maps";

#[derive(Serialize, Deserialize)]
struct LibraryDoc {
    format: String,
    version: u32,
    name: String,
    width: usize,
    height: usize,
    cell_mm: f64,
    configs: usize,
    units: String,
    #[serde(default = "as_loaded")]
    basis: String,
    loads: Vec<LoadDoc>,
}

fn as_loaded() -> String {
    RateBasis::AsLoaded.as_str().into()
}

#[derive(Serialize, Deserialize)]
struct LoadDoc {
    name: String,
    layout: Vec<String>,
    rates: Vec<Vec<f64>>,
    /// Per configuration, per cell standard error, K/s.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    rate_se: Option<Vec<Vec<f64>>>,
    /// Per configuration, one '0'/'1' per cell (row-major).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    filled: Option<Vec<String>>,
}
