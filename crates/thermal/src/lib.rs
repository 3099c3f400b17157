//! Thermal model of a tray of food in a microwave oven: what really happens when a schedule runs.
//!
//! The dwell solver predicts temperature as start + A·x, as if every cell were an isolated glass of
//! water. This crate supplies the physics that prediction leaves out, and the rules that judge it:
//!
//! - [`composition`]: food composition → density, specific heat, conductivity, diffusivity
//!   (Choi & Okos 1986 correlations, ASHRAE mixture rules), ice fraction below the freezing point;
//! - [`material`]: enthalpy ↔ temperature with latent heat, continuous and monotonic through
//!   freezing; conductivity and microwave absorption as functions of the state;
//! - [`simulate`]: the time course on the tray grid, each cell resolved through its thickness —
//!   heating steps with Lambert's-law deposition, conduction in three directions, thawing, the
//!   boiling cap with moisture loss, surface loss, standing time; the coldest point, mean and
//!   surface of every cell;
//! - [`schedule`]: dwell totals → ordered steps, in blocks or interleaved rounds;
//! - [`safety`]: USDA FSIS and FDA Food Code temperatures as data, and the coldest-point verdict;
//! - [`catalogue`]: typical foods with sourced compositions, absorption and safety classes.
//!
//! No I/O; builds for `wasm32-unknown-unknown` and natively.
//!
//! # Example
//!
//! ```
//! use traycast_thermal::{catalogue, material::Material, schedule::Schedule, simulate::*};
//!
//! // One 2 cm × 2 cm × 2 cm cell of chicken at 5 °C, heated at 0.5 K/s for 60 s, then standing.
//! let food = catalogue::find("chicken-breast").unwrap();
//! let items = [Material::food(&food.composition()).unwrap()];
//! let cells = [Some(CellFill { item: 0, thickness: 0.02, covered: true })];
//! let load = Load { tray: Tray { width: 1, height: 1, cell_size: 0.02 }, items: &items, cells: &cells, start: &[5.0] };
//! let maps = Maps { configs: 1, rates: &[0.5] };
//! let course = simulate(&load, &maps, &Schedule::blocks(&[60.0]), &Settings::default()).unwrap();
//! // Standing evens it out, but the column's far side is still its coldest point.
//! assert!(course.mean_after_standing[0] > 30.0 && course.mean_after_standing[0] < 36.0);
//! assert!(course.after_standing[0] < course.mean_after_standing[0]);
//! ```
#![deny(missing_docs)]

pub mod catalogue;
pub mod choi_okos;
pub mod composition;
pub mod dielectric;
mod error;
pub mod material;
pub mod safety;
pub mod schedule;
pub mod simulate;

pub use error::ThermalError;
