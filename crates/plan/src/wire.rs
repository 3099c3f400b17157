//! File and link formats of our own: plan JSON ("traycast-plan" version 5; versions 1 to 4 are
//! read), the share link ("tc5." + URL-safe base64 of deflated postcard bytes, a trailer after
//! the plan carrying the library's content hash, how power and heat cross the tray, and the
//! plan's variation; "tc4." to "tc1." links are read), and the controller schedule CSV.
//!
//! These types are the boundary: versioned, separate from [`crate::model`], and every field is
//! validated on the way in. Untrusted input becomes a [`PlanError`], never a panic.

use crate::error::{Place, PlanError};
use crate::model::{
    FoodItem, Heating, MapSource, Oven, Plan, Sequencing, TraySize, Variation, Zone,
};
use base64::Engine;
use serde::{Deserialize, Serialize};
use traycast_thermal::safety::CAUTIONS;
use traycast_thermal::schedule::Schedule;

const FORMAT: &str = "traycast-plan";
/// The version written. Version 2 added the library's content hash, version 3 how power enters
/// the food (`heating`), version 4 the tray's heat capacity and whether each item is covered,
/// version 5 the plan's variation (oven power, start temperature); older versions are still read
/// (with the defaults for what they lack).
const VERSION: u32 = 5;
/// Versions read.
const READS: [u32; 5] = [1, 2, 3, 4, 5];
/// Prefix of a share link's payload (format tag and version).
pub const LINK_TAG: &str = "tc5.";
/// The fourth link format, still read: a trailer without the variation.
pub const LINK_TAG_V4: &str = "tc4.";
/// The third link format, still read: items without a cover, a trailer without the tray.
pub const LINK_TAG_V3: &str = "tc3.";
/// The second link format, still read: its trailer has only the library hash.
pub const LINK_TAG_V2: &str = "tc2.";
/// The first link format, still read: the same payload without the trailer.
pub const LINK_TAG_V1: &str = "tc1.";
/// Longest link payload accepted, characters.
pub const MAX_LINK: usize = 64 * 1024;
/// Largest decompressed plan accepted, bytes (a bound against decompression bombs).
pub const MAX_INFLATED: usize = 256 * 1024;
/// Longest plan JSON read, bytes (a 128 × 128 plan is well under 1 MiB).
pub const MAX_PLAN_JSON: usize = 16 << 20;

/// The plan document; links before version 4 carry [`ItemDocV3`] items.
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct PlanDoc<I = ItemDoc> {
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

/// What a version-5 link carries after the plan document (postcard is positional, so additions go
/// in a trailer: version-1 links lack it, version-2 links have only the hash, version-3 links
/// lack the tray, version-4 links the variation).
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct LinkTrailer {
    library_hash: Option<u64>,
    from_below: f64,
    tray_capacity: f64,
    oven_power: f64,
    start_k: f64,
}

/// The version-4 trailer.
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct LinkTrailerV4 {
    library_hash: Option<u64>,
    from_below: f64,
    tray_capacity: f64,
}

/// The version-3 trailer.
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct LinkTrailerV3 {
    library_hash: Option<u64>,
    from_below: f64,
}

/// The version-2 trailer.
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq, Default)]
struct LinkTrailerV2 {
    library_hash: Option<u64>,
}

fn library_hash(plan: &Plan) -> Option<u64> {
    match plan.maps {
        MapSource::Library { hash, .. } => hash,
        MapSource::Synthetic { .. } => None,
    }
}

/// Adds the library hash read from a file or link to a plan pointed at a library.
fn with_hash(mut plan: Plan, hash: Option<u64>) -> Plan {
    if let MapSource::Library { hash: h, .. } = &mut plan.maps {
        *h = hash;
    }
    plan
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct TrayDoc {
    width: u32,
    height: u32,
    cell_mm: f64,
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct ItemDoc {
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
struct ItemDocV3 {
    name: String,
    food: String,
    thickness_mm: f64,
    start_c: f64,
}

impl PlanDoc<ItemDocV3> {
    /// The document with its items uncovered, as they were before covers were recorded.
    fn upgrade(self) -> PlanDoc {
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
struct ZoneDoc {
    name: String,
    min_c: f64,
    max_c: f64,
    weight: f64,
    cap_c: Option<f64>,
}

#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct OvenDoc {
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
struct MapsDoc {
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
    plan.validate()?;
    Ok(plan)
}

/// The share-link payload for the URL fragment.
pub fn to_link(plan: &Plan) -> String {
    let mut bytes = postcard::to_allocvec(&PlanDoc::from(plan)).expect("plans serialise");
    let trailer = LinkTrailer {
        library_hash: library_hash(plan),
        from_below: plan.heating.from_below,
        tray_capacity: plan.heating.tray_capacity,
        oven_power: plan.variation.oven_power,
        start_k: plan.variation.start_k,
    };
    bytes.extend(postcard::to_allocvec(&trailer).expect("trailers serialise"));
    let packed = miniz_oxide::deflate::compress_to_vec(&bytes, 9);
    format!(
        "{LINK_TAG}{}",
        base64::engine::general_purpose::URL_SAFE_NO_PAD.encode(packed)
    )
}

/// Decodes a share-link payload (with or without a leading '#'). Bounded and fully validated.
pub fn from_link(link: &str) -> Result<Plan, PlanError> {
    let at = |m: String| PlanError::new(Place::Link(None), m);
    let link = link.trim().trim_start_matches('#');
    if link.len() > MAX_LINK {
        return Err(at(format!(
            "is {} characters long; links longer than {MAX_LINK} are refused",
            link.len()
        )));
    }
    let tagged = [LINK_TAG, LINK_TAG_V4, LINK_TAG_V3, LINK_TAG_V2, LINK_TAG_V1]
        .into_iter()
        .enumerate()
        .find_map(|(k, tag)| link.strip_prefix(tag).map(|body| (body, 5 - k)));
    let (body, version) = match tagged {
        Some(found) => found,
        None => {
            if link.starts_with("tc") && link.contains('.') {
                return Err(at(format!(
                    "uses format '{}', which this version cannot read (it reads '{LINK_TAG}')",
                    link.split('.').next().unwrap_or("")
                )));
            }
            return Err(at(format!(
                "is not a Traycast plan link (it should start with '{LINK_TAG}')"
            )));
        }
    };
    let packed = base64::engine::general_purpose::URL_SAFE_NO_PAD
        .decode(body)
        .map_err(|e| {
            at(format!(
                "is damaged (not URL-safe base64: {e}); it may have been cut off when copied"
            ))
        })?;
    let bytes = miniz_oxide::inflate::decompress_to_vec_with_limit(&packed, MAX_INFLATED).map_err(|e| {
        if matches!(e.status, miniz_oxide::inflate::TINFLStatus::HasMoreOutput) {
            at(format!("expands past {MAX_INFLATED} bytes and was refused"))
        } else {
            at("is damaged (its compressed data is incomplete or corrupt); it may have been cut off when copied".into())
        }
    })?;
    let unreadable = |e: postcard::Error| at(format!("holds data this version cannot read ({e})"));
    let (doc, rest): (PlanDoc, &[u8]) = if version >= 4 {
        postcard::take_from_bytes(&bytes).map_err(unreadable)?
    } else {
        let (old, rest): (PlanDoc<ItemDocV3>, &[u8]) =
            postcard::take_from_bytes(&bytes).map_err(unreadable)?;
        (old.upgrade(), rest)
    };
    let (defaults, spread) = (Heating::default(), Variation::default());
    let older = |library_hash, from_below, tray_capacity| LinkTrailer {
        library_hash,
        from_below,
        tray_capacity,
        oven_power: spread.oven_power,
        start_k: spread.start_k,
    };
    let trailer = match version {
        1 => older(None, defaults.from_below, defaults.tray_capacity),
        2 => {
            let old: LinkTrailerV2 = postcard::from_bytes(rest).map_err(unreadable)?;
            older(
                old.library_hash,
                defaults.from_below,
                defaults.tray_capacity,
            )
        }
        3 => {
            let old: LinkTrailerV3 = postcard::from_bytes(rest).map_err(unreadable)?;
            older(old.library_hash, old.from_below, defaults.tray_capacity)
        }
        4 => {
            let old: LinkTrailerV4 = postcard::from_bytes(rest).map_err(unreadable)?;
            older(old.library_hash, old.from_below, old.tray_capacity)
        }
        _ => postcard::from_bytes(rest).map_err(unreadable)?,
    };
    let in_link = |e: PlanError| PlanError::new(Place::Link(Some(Box::new(e.place))), e.message);
    let mut plan = Plan::try_from(doc).map_err(in_link)?;
    plan.heating.from_below = trailer.from_below;
    plan.heating.tray_capacity = trailer.tray_capacity;
    plan.variation = Variation {
        oven_power: trailer.oven_power,
        start_k: trailer.start_k,
    };
    plan.validate().map_err(in_link)?;
    Ok(with_hash(plan, trailer.library_hash))
}

/// The schedule as CSV a controller can run: step, configuration, start and duration in seconds,
/// preceded by the usual cautions as comment lines.
pub fn schedule_csv(plan: &Plan, schedule: &Schedule) -> String {
    let mut out = format!(
        "# Traycast schedule for '{}'\n",
        plan.name.replace(['\n', '\r'], " ")
    );
    for c in CAUTIONS {
        out.push_str(&format!("# {c}\n"));
    }
    out.push_str("step,configuration,start_s,duration_s\n");
    let mut t = 0.0;
    for (k, s) in schedule.steps.iter().enumerate() {
        out.push_str(&format!(
            "{},{},{:.3},{:.3}\n",
            k + 1,
            s.config,
            t,
            s.seconds
        ));
        t += s.seconds;
    }
    out
}
