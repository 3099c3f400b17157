//! The CSV form of a map library, "traycast-maps 1": read with line-numbered refusals, written in
//! K/s with the uncertainty columns when any load carries them. The format is described in the
//! [module overview](super).

use super::{
    MAX_LIBRARY_BYTES, MapLibrary, RateBasis, RecordedLoad, Uncertainty, check_shape, check_values,
};
use crate::csvtext::{Sheet, at_line};
use crate::error::PlanError;
use traycast_thermal::dielectric::LossClass;

impl MapLibrary {
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
}
