//! A plan's heating maps: from the illustrative field model or the best-matching recorded load of a
//! library, in the food's starting state (what the solver uses) and thawed (what the time course
//! scales by absorption).

use crate::error::PlanError;
use crate::field::{self, Absorber};
use crate::library::{MapLibrary, RateBasis, Window};
use crate::model::{MapSource, Plan};
use traycast_thermal::material::Material;

/// Heating maps for a plan, in both forms the pipeline needs.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanMaps {
    /// Configurations.
    pub configs: usize,
    /// Cells.
    pub cells: usize,
    /// As loaded (the state the food starts in), config-major, K/s: what the solver uses.
    pub loaded: Vec<f64>,
    /// Thawed reference state, config-major, K/s: what the time course scales by absorption.
    pub thawed: Vec<f64>,
    /// Standard errors of `loaded`, config-major, K/s, when the maps were calibrated.
    pub loaded_se: Option<Vec<f64>>,
    /// Map values (cell × configuration, food cells of the plan) filled in rather than measured.
    pub filled: usize,
    /// Where they come from.
    pub provenance: Provenance,
}

/// Where a plan's maps come from.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub enum Provenance {
    /// The illustrative field model.
    Synthetic,
    /// A recorded load of a library.
    Library {
        /// Library name.
        library: String,
        /// Recorded load used.
        load: String,
        /// Similarity to the plan's layout.
        score: f64,
        /// Replay window.
        window: Window,
    },
}

/// Materials of the plan's items.
pub fn materials(plan: &Plan) -> Result<Vec<Material>, PlanError> {
    (0..plan.items.len())
        .map(|k| {
            let f = plan.catalogue_food(k).ok_or_else(|| {
                PlanError::new(format!("items[{k}].food"), "not a catalogue food")
            })?;
            Material::food(&f.composition()).map_err(PlanError::from)
        })
        .collect()
}

/// What each food cell's column absorbs at its start temperature relative to the reference state
/// (thawed, 20 °C): converts maps between the two ([`Material::absorption_ratio`]; a frozen column
/// lets more power in but keeps less of it).
fn start_absorption(plan: &Plan, mats: &[Material]) -> Vec<f64> {
    let ratios: Vec<f64> = plan
        .items
        .iter()
        .zip(mats)
        .map(|(it, m)| m.absorption_ratio(it.start_c, it.thickness_mm / 1000.0))
        .collect();
    (0..plan.tray.cells())
        .map(|i| plan.item_at(i).map_or(1.0, |k| ratios[k]))
        .collect()
}

/// The plan's heating maps: from the field model, or the best-matching load of `library`.
pub fn maps_for(plan: &Plan, library: Option<&MapLibrary>) -> Result<PlanMaps, PlanError> {
    maps_with(plan, library, None)
}

/// [`maps_for`], with the library's content hash when the caller already knows it.
pub(super) fn maps_with(
    plan: &Plan,
    library: Option<&MapLibrary>,
    library_hash: Option<u64>,
) -> Result<PlanMaps, PlanError> {
    let mats = materials(plan)?;
    let absorb = start_absorption(plan, &mats);
    let n = plan.tray.cells();
    let configs = plan.oven.configs;
    match &plan.maps {
        MapSource::Synthetic { seed } => {
            let cells: Vec<Option<Absorber>> = (0..n)
                .map(|i| {
                    plan.item_at(i).map(|k| Absorber {
                        permittivity: mats[k].reference,
                        thickness: plan.items[k].thickness_mm / 1000.0,
                        density: mats[k].density,
                        cp: mats[k].reference_cp,
                    })
                })
                .collect();
            let t = plan.tray;
            let fm = field::generate(
                t.width,
                t.height,
                t.cell_mm / 1000.0,
                &cells,
                configs,
                *seed,
                plan.oven.power_w,
            )?;
            let loaded = fm
                .thawed
                .iter()
                .enumerate()
                .map(|(k, r)| r * absorb[k % n])
                .collect();
            Ok(PlanMaps {
                configs,
                cells: n,
                loaded,
                thawed: fm.thawed,
                loaded_se: None,
                filled: 0,
                provenance: Provenance::Synthetic,
            })
        }
        MapSource::Library { name, hash } => {
            let lib = library.ok_or_else(|| {
                PlanError::new(
                    "maps",
                    format!(
                        "the plan uses map library '{name}', which is not loaded; import it first"
                    ),
                )
            })?;
            if lib.name != *name {
                return Err(PlanError::new(
                    "maps.library",
                    format!(
                        "the plan uses map library '{name}', but the library loaded is '{}': load '{name}', or switch the plan to '{}' on purpose",
                        lib.name, lib.name
                    ),
                ));
            }
            if let Some(want) = hash {
                let loaded = library_hash.unwrap_or_else(|| lib.content_hash());
                if loaded != *want {
                    return Err(PlanError::new(
                        "maps.library",
                        format!(
                            "the plan was made with other maps under the name '{name}' (content {want:016x}; the library loaded holds {loaded:016x}): load the library the plan was made with, or point the plan at this one on purpose (import it in the workbench)"
                        ),
                    ));
                }
            }
            if lib.width != plan.tray.width || lib.height != plan.tray.height {
                return Err(PlanError::new(
                    "maps",
                    format!(
                        "library '{}' is for a {} × {} tray, the plan's is {} × {}",
                        lib.name, lib.width, lib.height, plan.tray.width, plan.tray.height
                    ),
                ));
            }
            if lib.configs != configs {
                return Err(PlanError::new(
                    "oven.configs",
                    format!(
                        "library '{}' has {} configurations, the plan says {configs}",
                        lib.name, lib.configs
                    ),
                ));
            }
            let m = lib
                .best_match(&plan.loss_layout())
                .ok_or_else(|| PlanError::new("maps", "library holds no load"))?;
            let rec = &lib.loads[m.load];
            // Rates (and their errors) in the state the plan's food starts in, and thawed.
            let to_loaded = |k: usize| match lib.basis {
                RateBasis::AsLoaded => 1.0,
                RateBasis::Thawed => absorb[k % n],
            };
            let to_thawed = |k: usize| to_loaded(k) / absorb[k % n].max(1e-6);
            let scaled = |v: &[f64], f: &dyn Fn(usize) -> f64| -> Vec<f64> {
                v.iter().enumerate().map(|(k, r)| r * f(k)).collect()
            };
            let loaded = scaled(&rec.rates, &to_loaded);
            let thawed = scaled(&rec.rates, &to_thawed);
            let loaded_se = rec.uncertainty.as_ref().map(|u| scaled(&u.se, &to_loaded));
            let filled = rec.uncertainty.as_ref().map_or(0, |u| {
                u.filled
                    .iter()
                    .enumerate()
                    .filter(|(k, f)| **f && plan.food[k % n] > 0)
                    .count()
            });
            Ok(PlanMaps {
                configs,
                cells: n,
                loaded,
                thawed,
                loaded_se,
                filled,
                provenance: Provenance::Library {
                    library: lib.name.clone(),
                    load: rec.name.clone(),
                    score: m.score,
                    window: m.window,
                },
            })
        }
    }
}

/// A hash of the fields the maps and materials depend on: the tray, the food grid, each item's
/// food, thickness and start temperature, the configurations, the power and the map source.
/// Targets, names and oven timing do not enter. (FNV-1a, 64-bit: an identity for caching, not a
/// security hash.)
pub(super) fn maps_hash(plan: &Plan) -> u64 {
    let mut h = crate::fingerprint::Fnv::new();
    let t = &plan.tray;
    h.word(t.width as u64);
    h.word(t.height as u64);
    h.word(t.cell_mm.to_bits());
    h.bytes_wide(&plan.food);
    h.word(plan.items.len() as u64);
    for it in &plan.items {
        h.bytes(it.food.as_bytes());
        h.word(it.thickness_mm.to_bits());
        h.word(it.start_c.to_bits());
    }
    h.word(plan.oven.configs as u64);
    h.word(plan.oven.power_w.to_bits());
    match &plan.maps {
        MapSource::Synthetic { seed } => {
            h.word(1);
            h.word(*seed);
        }
        MapSource::Library { name, hash } => {
            h.word(2);
            h.bytes(name.as_bytes());
            match hash {
                None => h.word(0),
                Some(v) => {
                    h.word(1);
                    h.word(*v);
                }
            }
        }
    }
    h.finish()
}

impl PlanMaps {
    /// What a reader of the results must know about where the maps come from: illustrative,
    /// outside the replay window, without uncertainties, or partly filled.
    pub fn warnings(&self) -> Vec<String> {
        let mut warnings = Vec::new();
        match &self.provenance {
            Provenance::Library {
                library,
                load,
                score,
                window,
            } => match window {
                Window::Inside => {}
                Window::Marginal => warnings.push(format!("maps come from load '{load}' of '{library}', similarity {score:.2}: outside the replay window's core, verify by measurement")),
                Window::Outside => warnings.push(format!("maps come from load '{load}' of '{library}', recorded for a different load (similarity {score:.2}): the predictions are not trustworthy")),
            },
            Provenance::Synthetic => warnings
                .push("maps come from the illustrative field model, not from measurements".into()),
        }
        match (&self.provenance, &self.loaded_se) {
            (Provenance::Library { library, .. }, None) => warnings.push(format!(
                "library '{library}' carries no rate uncertainties: the predictions have no interval and the verdicts use nominal temperatures"
            )),
            (_, Some(_)) if self.filled > 0 => warnings.push(format!(
                "{} of the map values on this tray's food were filled from neighbours, not measured; their wider errors are in the intervals",
                self.filled
            )),
            _ => {}
        }
        warnings
    }
}
