//! The JSON form of a map library: one document, rates in K/s, layouts as letter rows, sizes
//! checked before anything is allocated.

use super::{
    MAX_LIBRARY_BYTES, MapLibrary, RateBasis, RecordedLoad, Uncertainty, check_shape, check_values,
    class_letter, letter_class,
};
use crate::error::PlanError;
use serde::{Deserialize, Serialize};

impl MapLibrary {
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
        let doc: LibraryDoc = serde_json::from_str(text).map_err(PlanError::json)?;
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
