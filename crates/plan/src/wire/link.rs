//! The share link: the plan document as postcard bytes, deflated and URL-safe base64 encoded,
//! behind a version tag; what later versions added rides in a trailer after the document.

use super::doc::{ItemDocV3, PlanDoc};
use super::file::{library_hash, with_hash};
use super::{LINK_TAG, LINK_TAG_V1, LINK_TAG_V2, LINK_TAG_V3, LINK_TAG_V4, LINK_TAG_V5};
use super::{MAX_INFLATED, MAX_LINK};
use crate::error::{Place, PlanError};
use crate::model::{Heating, Objective, Plan, Planning, Variation};
use base64::Engine;
use serde::{Deserialize, Serialize};

/// What a version-6 link carries after the plan document (postcard is positional, so additions go
/// in a trailer: version-1 links lack it, version-2 links have only the hash, version-3 links
/// lack the tray, version-4 links the variation, version-5 links the planning settings).
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct LinkTrailer {
    library_hash: Option<u64>,
    from_below: f64,
    tray_capacity: f64,
    oven_power: f64,
    start_k: f64,
    /// [`Objective::as_str`].
    objective: String,
    placement: bool,
}

/// The version-5 trailer.
#[derive(Serialize, Deserialize, Debug, Clone, PartialEq)]
struct LinkTrailerV5 {
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

/// The share-link payload for the URL fragment.
pub fn to_link(plan: &Plan) -> String {
    let mut bytes = postcard::to_allocvec(&PlanDoc::from(plan)).expect("plans serialise");
    let trailer = LinkTrailer {
        library_hash: library_hash(plan),
        from_below: plan.heating.from_below,
        tray_capacity: plan.heating.tray_capacity,
        oven_power: plan.variation.oven_power,
        start_k: plan.variation.start_k,
        objective: plan.planning.objective.as_str().to_string(),
        placement: plan.planning.placement,
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
    let tagged = [
        LINK_TAG,
        LINK_TAG_V5,
        LINK_TAG_V4,
        LINK_TAG_V3,
        LINK_TAG_V2,
        LINK_TAG_V1,
    ]
    .into_iter()
    .enumerate()
    .find_map(|(k, tag)| link.strip_prefix(tag).map(|body| (body, 6 - k)));
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
        objective: Objective::default().as_str().to_string(),
        placement: false,
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
        5 => {
            let old: LinkTrailerV5 = postcard::from_bytes(rest).map_err(unreadable)?;
            LinkTrailer {
                oven_power: old.oven_power,
                start_k: old.start_k,
                ..older(old.library_hash, old.from_below, old.tray_capacity)
            }
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
    plan.planning = Planning {
        objective: Objective::parse(&trailer.objective, "planning.objective").map_err(in_link)?,
        placement: trailer.placement,
    };
    plan.validate().map_err(in_link)?;
    Ok(with_hash(plan, trailer.library_hash))
}
