//! Traycast plans: what users edit and share, and the pipeline that evaluates them.
//!
//! - [`model`]: tray, food items, zones with bands, weights and hard caps, oven settings;
//!   validation with messages that name the field.
//! - [`field`]: the illustrative synthetic field model (cavity modes near 2.45 GHz) that makes
//!   heating maps for any layout, scaled by the IEC 60705 water-load method.
//! - [`library`]: measured map libraries — CSV and JSON import/export, validation (units, scale),
//!   load matching and the replay window.
//! - [`runs`]: recorded heating runs (CSV, °C or confirmed °F) read against a load's layout.
//! - [`calibrate`]: runs → map library with standard errors, fill flags and a quality report,
//!   with the least-squares line it fits ([`calibrate::fit_line`]).
//! - [`evaluate`]: plan + maps → dwell solve → linear prediction → simulated time course →
//!   errors, band coverage, coldest-point verdicts with the kill and bounds joint over each item,
//!   safety cards, unsteered baseline, feasibility diagnosis.
//! - [`stats`]: normal and Student's t quantiles (the joint safety bounds, slope errors).
//! - [`robustness`]: the plan's schedule with the foods placed one cell off.
//! - [`wire`]: plan JSON, share links, schedule CSV — versioned boundary formats.
//! - [`summary`]: the evaluation as one JSON object, shared by the command line and the workbench.
//! - [`demos`]: illustrative demo scenarios.
//!
//! Implementation details (the CSV reader, fingerprints, regression helpers, each pipeline step)
//! are private; every public module curates what front ends need with `pub use`.
//!
//! No files, no DOM: everything takes and returns values, strings and bytes.
//!
//! # Example
//!
//! ```
//! use traycast_plan::{demos, evaluate, wire};
//!
//! let plan = demos::demo("side-by-side").unwrap();
//! let eval = evaluate::evaluate(&plan, None, evaluate::Options::default()).unwrap();
//! assert_eq!(eval.dwell.len(), plan.oven.configs);
//! let link = wire::to_link(&plan);
//! assert_eq!(wire::from_link(&link).unwrap(), plan);
//! ```
#![deny(missing_docs)]

pub mod calibrate;
mod csvtext;
pub mod demos;
mod error;
pub mod evaluate;
pub mod field;
mod fingerprint;
pub mod library;
pub mod model;
mod objective;
mod regression;
pub mod robustness;
pub mod runs;
pub mod stats;
pub mod summary;
mod transfer;
pub mod wire;

pub use error::{Place, PlanError};
pub use objective::{Objective, Planning};
