//! File and link formats of our own: plan JSON ("traycast-plan" version 6; versions 1 to 5 are
//! read), the share link ("tc6." + URL-safe base64 of deflated postcard bytes, a trailer after
//! the plan carrying the library's content hash, how power and heat cross the tray, the plan's
//! variation and what it is planned for; "tc5." to "tc1." links are read), and the controller
//! schedule CSV.
//!
//! These types are the boundary: versioned, separate from [`crate::model`], and every field is
//! validated on the way in. Untrusted input becomes a [`PlanError`](crate::PlanError), never a
//! panic.
//!
//! - `doc`: the plan document both forms share (items, grids, zones, oven, maps);
//! - `file`: the JSON file and what later versions added beside the document;
//! - `link`: the share link and its versioned trailers;
//! - `schedule`: the CSV a controller runs.

mod doc;
mod file;
mod link;
mod schedule;

pub use file::{from_json, to_json};
pub use link::{from_link, to_link};
pub use schedule::schedule_csv;

pub(crate) const FORMAT: &str = "traycast-plan";
/// The version written. Version 2 added the library's content hash, version 3 how power enters
/// the food (`heating`), version 4 the tray's heat capacity and whether each item is covered,
/// version 5 the plan's variation (oven power, start temperature), version 6 what the plan is
/// planned for (objective and placement scenarios); older versions are still read
/// (with the defaults for what they lack).
pub(crate) const VERSION: u32 = 6;
/// Versions read.
pub(crate) const READS: [u32; 6] = [1, 2, 3, 4, 5, 6];
/// Prefix of a share link's payload (format tag and version).
pub const LINK_TAG: &str = "tc6.";
/// The fifth link format, still read: a trailer without the planning settings.
pub const LINK_TAG_V5: &str = "tc5.";
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
