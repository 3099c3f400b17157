//! The plan document both the file and the link carry: tray, items, the food and zone grids as
//! rows of letters, zones, oven and maps. Later additions live beside it (`file.rs`, `link.rs`).

use super::{FORMAT, READS, VERSION};
use crate::error::PlanError;
use crate::model::{
    FoodItem, Heating, MapSource, Oven, Plan, Planning, Sequencing, TraySize, Variation, Zone,
};
use serde::{Deserialize, Serialize};

/// The plan document; links before version 4 carry [`ItemDocV3`] items.
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
pub(super) struct PlanDoc<I = ItemDoc> {
    format: String,
    version: u32,
    name: String,
    tray: TrayDoc,
    items: Vec<I>,
    /// Rows of the food grid: '.' empty, 'A'… the items in order.
    food: Vec<String>,
    zones: Vec<ZoneDoc>,
    /// Rows of the zone grid: '.' none, 'a'… the zones in order.
    zone: Vec<String>,
    oven: OvenDoc,
    maps: MapsDoc,
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
pub(super) struct TrayDoc {
    width: u32,
    height: u32,
    cell_mm: f64,
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
pub(super) struct ItemDoc {
    name: String,
    food: String,
    thickness_mm: f64,
    start_c: f64,
    /// Since version 4; absent (false) in older files.
    #[serde(default)]
    covered: bool,
}

/// An item as links before version 4 carry it (postcard is positional).
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
pub(super) struct ItemDocV3 {
    name: String,
    food: String,
    thickness_mm: f64,
    start_c: f64,
}

impl PlanDoc<ItemDocV3> {
    /// The document with its items uncovered, as they were before covers were recorded.
    pub(super) fn upgrade(self) -> PlanDoc {
        PlanDoc {
            format: self.format,
            version: self.version,
            name: self.name,
            tray: self.tray,
            items: self
                .items
                .into_iter()
                .map(|i| ItemDoc {
                    name: i.name,
                    food: i.food,
                    thickness_mm: i.thickness_mm,
                    start_c: i.start_c,
                    covered: false,
                })
                .collect(),
            food: self.food,
            zones: self.zones,
            zone: self.zone,
            oven: self.oven,
            maps: self.maps,
        }
    }
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
pub(super) struct ZoneDoc {
    name: String,
    min_c: f64,
    max_c: f64,
    weight: f64,
    cap_c: Option<f64>,
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
pub(super) struct OvenDoc {
    power_w: f64,
    configs: u32,
    budget_s: Option<f64>,
    limit_s: Option<f64>,
    quantum_s: f64,
    time_penalty: f64,
    /// 1 = one block per configuration, more = interleaved rounds.
    rounds: u16,
    standing_s: f64,
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
pub(super) struct MapsDoc {
    /// "field-model" or "library".
    source: String,
    seed: u64,
    library: Option<String>,
}

fn grid_rows(cells: &[u8], width: usize, base: u8) -> Vec<String> {
    cells
        .chunks(width)
        .map(|r| {
            r.iter()
                .map(|&v| if v == 0 { '.' } else { (base + v - 1) as char })
                .collect()
        })
        .collect()
}

fn parse_grid(
    rows: &[String],
    width: usize,
    height: usize,
    base: u8,
    count: usize,
    what: &str,
) -> Result<Vec<u8>, PlanError> {
    if rows.len() != height {
        return Err(PlanError::new(
            what,
            format!("has {} rows, the tray has {height}", rows.len()),
        ));
    }
    let mut out = Vec::with_capacity(width * height);
    for (r, row) in rows.iter().enumerate() {
        let chars: Vec<char> = row.chars().collect();
        if chars.len() != width {
            return Err(PlanError::new(
                format!("{what} row {r}"),
                format!("has {} cells, the tray has {width}", chars.len()),
            ));
        }
        for (c, ch) in chars.into_iter().enumerate() {
            let v = if ch == '.' {
                0
            } else {
                let k = (ch as u32).wrapping_sub(base as u32);
                if k >= count as u32 {
                    return Err(PlanError::new(
                        format!("{what} row {r}, col {c}"),
                        format!(
                            "'{ch}' names no {}",
                            if base == b'A' { "food item" } else { "zone" }
                        ),
                    ));
                }
                k as u8 + 1
            };
            out.push(v);
        }
    }
    Ok(out)
}

impl From<&Plan> for PlanDoc {
    fn from(p: &Plan) -> Self {
        PlanDoc {
            format: FORMAT.into(),
            version: VERSION,
            name: p.name.clone(),
            tray: TrayDoc {
                width: p.tray.width as u32,
                height: p.tray.height as u32,
                cell_mm: p.tray.cell_mm,
            },
            items: p
                .items
                .iter()
                .map(|i| ItemDoc {
                    name: i.name.clone(),
                    food: i.food.clone(),
                    thickness_mm: i.thickness_mm,
                    start_c: i.start_c,
                    covered: i.covered,
                })
                .collect(),
            food: grid_rows(&p.food, p.tray.width, b'A'),
            zones: p
                .zones
                .iter()
                .map(|z| ZoneDoc {
                    name: z.name.clone(),
                    min_c: z.min_c,
                    max_c: z.max_c,
                    weight: z.weight,
                    cap_c: z.cap_c,
                })
                .collect(),
            zone: grid_rows(&p.zone, p.tray.width, b'a'),
            oven: OvenDoc {
                power_w: p.oven.power_w,
                configs: p.oven.configs as u32,
                budget_s: p.oven.budget_s,
                limit_s: p.oven.limit_s,
                quantum_s: p.oven.quantum_s,
                time_penalty: p.oven.time_penalty,
                rounds: match p.oven.sequencing {
                    Sequencing::Blocks => 1,
                    Sequencing::Rounds(r) => r,
                },
                standing_s: p.oven.standing_s,
            },
            maps: match &p.maps {
                MapSource::Synthetic { seed } => MapsDoc {
                    source: "field-model".into(),
                    seed: *seed,
                    library: None,
                },
                MapSource::Library { name, .. } => MapsDoc {
                    source: "library".into(),
                    seed: 0,
                    library: Some(name.clone()),
                },
            },
        }
    }
}

impl TryFrom<PlanDoc> for Plan {
    type Error = PlanError;

    fn try_from(d: PlanDoc) -> Result<Self, PlanError> {
        if d.format != FORMAT {
            return Err(PlanError::new(
                "format",
                format!("'{}' is not a Traycast plan", d.format),
            ));
        }
        if !READS.contains(&d.version) {
            return Err(PlanError::new(
                "version",
                format!(
                    "plan format version {} is not supported (this version reads {} to {VERSION})",
                    d.version, READS[0]
                ),
            ));
        }
        let (w, h) = (d.tray.width as usize, d.tray.height as usize);
        if !(1..=crate::model::MAX_SIDE).contains(&w) || !(1..=crate::model::MAX_SIDE).contains(&h)
        {
            return Err(PlanError::new(
                "tray",
                format!(
                    "a {w} × {h} tray is not allowed (1 to {} cells a side)",
                    crate::model::MAX_SIDE
                ),
            ));
        }
        if d.items.len() > crate::model::MAX_ITEMS || d.zones.len() > crate::model::MAX_ITEMS {
            return Err(PlanError::new(
                "items",
                format!("at most {} food items and zones", crate::model::MAX_ITEMS),
            ));
        }
        let food = parse_grid(&d.food, w, h, b'A', d.items.len(), "food")?;
        let zone = parse_grid(&d.zone, w, h, b'a', d.zones.len(), "zone")?;
        let maps = match d.maps.source.as_str() {
            "field-model" => MapSource::Synthetic { seed: d.maps.seed },
            "library" => MapSource::Library {
                name: d
                    .maps
                    .library
                    .ok_or_else(|| PlanError::new("maps.library", "missing library name"))?,
                hash: None,
            },
            other => {
                return Err(PlanError::new(
                    "maps.source",
                    format!("'{other}' is not field-model or library"),
                ));
            }
        };
        let plan = Plan {
            name: d.name,
            tray: TraySize {
                width: w,
                height: h,
                cell_mm: d.tray.cell_mm,
            },
            items: d
                .items
                .into_iter()
                .map(|i| FoodItem {
                    name: i.name,
                    food: i.food,
                    thickness_mm: i.thickness_mm,
                    start_c: i.start_c,
                    covered: i.covered,
                })
                .collect(),
            food,
            zones: d
                .zones
                .into_iter()
                .map(|z| Zone {
                    name: z.name,
                    min_c: z.min_c,
                    max_c: z.max_c,
                    weight: z.weight,
                    cap_c: z.cap_c,
                })
                .collect(),
            zone,
            heating: Heating::default(),
            variation: Variation::default(),
            planning: Planning::default(),
            oven: Oven {
                power_w: d.oven.power_w,
                configs: d.oven.configs as usize,
                budget_s: d.oven.budget_s,
                limit_s: d.oven.limit_s,
                quantum_s: d.oven.quantum_s,
                time_penalty: d.oven.time_penalty,
                sequencing: if d.oven.rounds <= 1 {
                    Sequencing::Blocks
                } else {
                    Sequencing::Rounds(d.oven.rounds)
                },
                standing_s: d.oven.standing_s,
            },
            maps,
        };
        plan.validate()?;
        Ok(plan)
    }
}
