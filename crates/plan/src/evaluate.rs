//! The evaluation pipeline: plan + maps → problem → solve → linear prediction → time course →
//! errors, band coverage, coldest-cell verdicts, baseline, diagnosis.

use crate::error::PlanError;
use crate::field::{self, Absorber};
use crate::library::{MapLibrary, RateBasis, Window};
use crate::model::{MapSource, Plan, Sequencing};
use traycast_solver::{DwellSolver, Rates, Spec, Status};
use traycast_thermal::ThermalError;
use traycast_thermal::composition::LATENT_VAPORISATION;
use traycast_thermal::material::Material;
use traycast_thermal::safety::{self, Verdict};
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::{self, CellFill, Load, Settings, TimeCourse, Tray};

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
#[derive(Clone, Debug, PartialEq)]
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
            Material::food(&f.composition(), f.loss).map_err(PlanError::from)
        })
        .collect()
}

/// Absorption ratio of each food cell at its start temperature (1 thawed, ≪ 1 frozen).
fn start_absorption(plan: &Plan, mats: &[Material]) -> Vec<f64> {
    (0..plan.tray.cells())
        .map(|i| match plan.item_at(i) {
            Some(k) => {
                let m = &mats[k];
                m.state(m.enthalpy(plan.items[k].start_c), &mut 0).2
            }
            None => 1.0,
        })
        .collect()
}

/// Absorption class per cell (the layout a library load is matched against).
pub fn layout(plan: &Plan) -> Vec<Option<traycast_thermal::dielectric::LossClass>> {
    (0..plan.tray.cells())
        .map(|i| {
            plan.item_at(i)
                .and_then(|k| plan.catalogue_food(k))
                .map(|f| f.loss)
        })
        .collect()
}

/// The plan's heating maps: from the field model, or the best-matching load of `library`.
pub fn maps_for(plan: &Plan, library: Option<&MapLibrary>) -> Result<PlanMaps, PlanError> {
    let mats = materials(plan)?;
    let absorb = start_absorption(plan, &mats);
    let n = plan.tray.cells();
    let configs = plan.oven.configs;
    match &plan.maps {
        MapSource::Synthetic { seed } => {
            let cells: Vec<Option<Absorber>> = (0..n)
                .map(|i| {
                    plan.item_at(i).map(|k| Absorber {
                        class: plan.catalogue_food(k).expect("validated").loss,
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
        MapSource::Library { name } => {
            let lib = library.ok_or_else(|| {
                PlanError::new(
                    "maps",
                    format!(
                        "the plan uses map library '{name}', which is not loaded; import it first"
                    ),
                )
            })?;
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
                .best_match(&layout(plan))
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

/// Why a zone misses its band.
#[derive(Clone, Debug, PartialEq)]
pub enum Diagnosis {
    /// The oven's physics: no mixture of configurations separates this zone from another.
    Physics(String),
    /// A setting (budget, per-configuration limit) stops the plan reaching the band.
    Setting(String),
}

/// One zone's outcome.
#[derive(Clone, Debug, PartialEq)]
pub struct ZoneSummary {
    /// Share of the zone's cells inside the band, linear prediction.
    pub coverage_linear: f64,
    /// Share inside the band after the simulated standing time.
    pub coverage_simulated: f64,
    /// RMS distance outside the band, K, linear.
    pub rms_linear: f64,
    /// RMS distance outside the band, K, simulated (after standing).
    pub rms_simulated: f64,
    /// Why it misses, when it does (linear RMS above 1 K).
    pub diagnosis: Option<Diagnosis>,
}

/// One food item's outcome.
#[derive(Clone, Debug, PartialEq)]
pub struct ItemSummary {
    /// Coldest cell after standing, °C.
    pub min: f64,
    /// Mass-weighted mean after standing, °C.
    pub mean: f64,
    /// Warmest cell after standing, °C.
    pub max: f64,
    /// Share of the item's zoned cells inside their band after standing (NaN if none is zoned).
    pub in_band: f64,
    /// The coldest-cell food-safety verdict; with calibrated maps it is judged on the bounds
    /// (the coldest cell's lower bound, the warmest cell's upper bound).
    pub verdict: Verdict,
    /// Water evaporated, g.
    pub moisture_g: f64,
    /// The 95 % spread from the maps' rate uncertainties, when the maps carry them.
    pub spread: Option<Spread>,
}

/// Where an item's temperatures after standing lie given the maps' standard errors: each interval
/// bounds the quantity when every cell is within its own 95 % interval.
#[derive(Clone, Debug, PartialEq)]
pub struct Spread {
    /// Coldest cell, °C (lower, upper).
    pub coldest: (f64, f64),
    /// Mean over the cells, °C (lower, upper).
    pub mean: (f64, f64),
    /// Warmest cell, °C (lower, upper).
    pub warmest: (f64, f64),
    /// The verdict on the nominal temperatures, for comparison.
    pub nominal: Verdict,
}

/// Per-cell 95 % bounds of the temperatures after standing, °C (NaN for empty cells).
#[derive(Clone, Debug, PartialEq)]
pub struct CellBounds {
    /// Lower bounds.
    pub lower: Vec<f64>,
    /// Upper bounds.
    pub upper: Vec<f64>,
}

/// Normal quantile of a two-sided 95 % interval.
pub const Z95: f64 = 1.959_963_984_540_054;

/// The same tray heated without steering.
#[derive(Clone, Debug, PartialEq)]
pub struct Baseline {
    /// Heating time: until the coldest targeted cell reaches its band minimum (capped by the budget).
    pub seconds: f64,
    /// RMS distance outside the bands, K (linear prediction).
    pub rms_linear: f64,
    /// Share of targeted cells inside their bands.
    pub coverage_linear: f64,
}

/// The outcome of a refinement pass.
#[derive(Clone, Debug, PartialEq)]
pub struct Refinement {
    /// RMS band distance after standing before refining, K.
    pub rms_before: f64,
    /// The same after re-solving with the simulation's correction, K.
    pub rms_after: f64,
    /// Whether the refined plan was kept (it is only when it helps).
    pub kept: bool,
}

/// Everything a front end shows.
#[derive(Clone, Debug, PartialEq)]
pub struct Evaluation {
    /// Seconds per configuration (rounded to the controller's quantum).
    pub dwell: Vec<f64>,
    /// Total heating time, s.
    pub total_s: f64,
    /// Solver status.
    pub status: Status,
    /// Solver KKT residual (relative).
    pub kkt_residual: f64,
    /// The schedule run by the simulation.
    pub schedule: Schedule,
    /// Linear prediction per cell, °C (NaN for empty cells).
    pub linear: Vec<f64>,
    /// Signed distance outside the band per cell, linear, K (NaN for cells without a target).
    pub error_linear: Vec<f64>,
    /// The same after the simulated standing time.
    pub error_simulated: Vec<f64>,
    /// The simulated time course.
    pub course: TimeCourse,
    /// Per zone.
    pub zones: Vec<ZoneSummary>,
    /// Per food item.
    pub items: Vec<ItemSummary>,
    /// Unsteered comparison.
    pub baseline: Baseline,
    /// Where the maps came from.
    pub provenance: Provenance,
    /// Things the user should know (replay window, caps, budget).
    pub warnings: Vec<String>,
    /// Largest excess over a hard cap in the linear prediction, K (0 when all caps hold).
    pub cap_excess: f64,
    /// The refinement pass, if requested.
    pub refinement: Option<Refinement>,
    /// Per-cell 95 % bounds after standing, when the maps carry standard errors.
    pub bounds: Option<CellBounds>,
    /// The usual cautions.
    pub cautions: &'static [&'static str],
}

/// The fast part of an evaluation (see [`Evaluator::quick`]).
#[derive(Clone, Debug, PartialEq)]
pub struct Quick {
    /// Seconds per configuration (rounded to the controller's quantum).
    pub dwell: Vec<f64>,
    /// Total heating time, s.
    pub total_s: f64,
    /// Solver status.
    pub status: Status,
    /// Linear prediction per cell, °C (NaN for empty cells).
    pub linear: Vec<f64>,
    /// Signed distance outside the band per cell, linear, K (NaN for cells without a target).
    pub error_linear: Vec<f64>,
}

/// Options of an evaluation.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Options {
    /// Re-solve once with the simulation's correction.
    pub refine: bool,
}

/// Caches maps and the warm solver between evaluations of a plan being edited.
#[derive(Default)]
pub struct Evaluator {
    maps_key: Option<(Plan, Option<MapLibrary>)>,
    maps: Option<PlanMaps>,
    solver: Option<(Vec<usize>, DwellSolver)>,
}

/// Layout fields that change the maps (targets, names and oven timing do not).
fn maps_key(plan: &Plan) -> Plan {
    let mut p = plan.clone();
    p.name.clear();
    p.zones.clear();
    p.zone.iter_mut().for_each(|z| *z = 0);
    p.items.iter_mut().for_each(|i| i.name.clear());
    p.oven.budget_s = None;
    p.oven.limit_s = None;
    p.oven.quantum_s = 0.0;
    p.oven.time_penalty = 0.0;
    p.oven.sequencing = Sequencing::Blocks;
    p.oven.standing_s = 0.0;
    p
}

fn band_distance(v: f64, lo: f64, hi: f64) -> f64 {
    traycast_solver::band_distance(v, lo, hi)
}

fn rms(v: impl Iterator<Item = f64>) -> f64 {
    let (mut s, mut n) = (0.0, 0usize);
    for x in v {
        s += x * x;
        n += 1;
    }
    if n == 0 { 0.0 } else { (s / n as f64).sqrt() }
}

/// Per-cell target band in °C (min, effective max with the cap) for zoned cells.
fn bands(plan: &Plan) -> Vec<Option<(f64, f64)>> {
    (0..plan.tray.cells())
        .map(|i| {
            plan.zone_at(i).map(|z| {
                let zone = &plan.zones[z];
                (
                    zone.min_c,
                    zone.cap_c.map_or(zone.max_c, |c| c.min(zone.max_c)),
                )
            })
        })
        .collect()
}

fn start_temps(plan: &Plan) -> Vec<f64> {
    (0..plan.tray.cells())
        .map(|i| plan.item_at(i).map_or(f64::NAN, |k| plan.items[k].start_c))
        .collect()
}

/// Linear prediction start + Σ_j rate_j·x_j for every food cell (NaN elsewhere).
pub fn linear_prediction(plan: &Plan, maps: &PlanMaps, dwell: &[f64]) -> Vec<f64> {
    let n = maps.cells;
    let start = start_temps(plan);
    (0..n)
        .map(|i| {
            if start[i].is_nan() {
                return f64::NAN;
            }
            start[i]
                + (0..maps.configs)
                    .map(|c| maps.loaded[c * n + i] * dwell[c])
                    .sum::<f64>()
        })
        .collect()
}

/// Rounds dwells to the controller quantum without breaking the budget.
fn quantise(dwell: &mut [f64], quantum: f64, budget: Option<f64>) {
    if quantum <= 0.0 {
        return;
    }
    for d in dwell.iter_mut() {
        *d = (*d / quantum).round() * quantum;
    }
    if let Some(b) = budget {
        while dwell.iter().sum::<f64>() > b + 1e-9 {
            let k = (0..dwell.len())
                .max_by(|&a, &b| dwell[a].total_cmp(&dwell[b]))
                .expect("non-empty");
            dwell[k] = (dwell[k] - quantum).max(0.0);
        }
    }
}

impl Evaluator {
    /// A fresh evaluator.
    pub fn new() -> Self {
        Self::default()
    }

    /// The maps for `plan`, regenerated only when the layout changed.
    pub fn maps(
        &mut self,
        plan: &Plan,
        library: Option<&MapLibrary>,
    ) -> Result<&PlanMaps, PlanError> {
        // Compared in place: the library is only cloned when the maps really change.
        let layout = maps_key(plan);
        let same = self
            .maps_key
            .as_ref()
            .is_some_and(|(p, l)| *p == layout && l.as_ref() == library);
        if !same || self.maps.is_none() {
            self.maps = Some(maps_for(plan, library)?);
            self.maps_key = Some((layout, library.cloned()));
            self.solver = None;
        }
        Ok(self.maps.as_ref().expect("just set"))
    }

    /// Solves the dwell problem: warm when only targets changed; with `gains`, on rates scaled per
    /// cell (a refinement pass, solved afresh).
    fn solve(
        &mut self,
        plan: &Plan,
        gains: Option<&[f64]>,
    ) -> Result<traycast_solver::Solution, PlanError> {
        let maps = self.maps.as_ref().expect("maps computed first");
        let n = maps.cells;
        let band = bands(plan);
        let start = start_temps(plan);
        let rows: Vec<usize> = (0..n).filter(|&i| band[i].is_some()).collect();
        let build = |g: Option<&[f64]>| -> Result<DwellSolver, PlanError> {
            let data: Vec<f64> = rows
                .iter()
                .flat_map(|&i| (0..maps.configs).map(move |c| (i, c)))
                .map(|(i, c)| maps.loaded[c * n + i] * g.map_or(1.0, |g| g[i]))
                .collect();
            Ok(DwellSolver::new(Rates::from_row_major(
                rows.len(),
                maps.configs,
                &data,
            )?))
        };
        let mut scratch;
        let solver = match gains {
            Some(g) => {
                scratch = build(Some(g))?;
                &mut scratch
            }
            None => {
                if self.solver.as_ref().map(|(r, _)| r) != Some(&rows) {
                    self.solver = Some((rows.clone(), build(None)?));
                }
                &mut self.solver.as_mut().expect("set").1
            }
        };
        let (lo, hi): (Vec<f64>, Vec<f64>) = rows
            .iter()
            .map(|&i| {
                let (a, b) = band[i].expect("targeted");
                (a - start[i], b - start[i])
            })
            .unzip();
        let mut spec = Spec::band(lo, hi, maps.configs);
        spec.weights = rows
            .iter()
            .map(|&i| plan.zones[plan.zone_at(i).expect("targeted")].weight)
            .collect();
        spec.upper = vec![plan.oven.limit_s.unwrap_or(f64::INFINITY); maps.configs];
        spec.budget = plan.oven.budget_s;
        spec.time_penalty = plan.oven.time_penalty;
        spec.ridge = 0.0;
        let mut sol = solver.solve(&spec)?;
        // Hard caps: raise the weight of cells above their cap until the linear prediction respects
        // it (to 0.05 K) or the weights reach 10⁶× (then the excess is reported).
        let caps: Vec<Option<f64>> = rows
            .iter()
            .map(|&i| {
                plan.zones[plan.zone_at(i).expect("targeted")]
                    .cap_c
                    .map(|c| c - start[i])
            })
            .collect();
        for _ in 0..6 {
            let mut changed = false;
            for (r, cap) in caps.iter().enumerate() {
                if let Some(c) = cap
                    && sol.achieved[r] > c + 0.05
                {
                    spec.weights[r] *= 10.0;
                    changed = true;
                }
            }
            if !changed {
                break;
            }
            sol = solver.solve(&spec)?;
        }
        Ok(sol)
    }

    /// The fast part of an evaluation, for every brush stroke: solve (warm) and the linear
    /// prediction, without the time course. [`Evaluator::evaluate`] gives everything.
    pub fn quick(&mut self, plan: &Plan, library: Option<&MapLibrary>) -> Result<Quick, PlanError> {
        plan.validate()?;
        self.maps(plan, library)?;
        let sol = self.solve(plan, None)?;
        let maps = self.maps.as_ref().expect("set");
        let mut dwell = sol.dwell.clone();
        quantise(&mut dwell, plan.oven.quantum_s, plan.oven.budget_s);
        let linear = linear_prediction(plan, maps, &dwell);
        let band = bands(plan);
        let error_linear = (0..maps.cells)
            .map(|i| band[i].map_or(f64::NAN, |(a, b)| band_distance(linear[i], a, b)))
            .collect();
        Ok(Quick {
            total_s: dwell.iter().sum(),
            dwell,
            status: sol.status,
            linear,
            error_linear,
        })
    }

    /// Evaluates `plan` end to end.
    pub fn evaluate(
        &mut self,
        plan: &Plan,
        library: Option<&MapLibrary>,
        options: Options,
    ) -> Result<Evaluation, PlanError> {
        plan.validate()?;
        self.maps(plan, library)?;
        let sol = self.solve(plan, None)?;
        let mut eval = self.finish(plan, &sol, None)?;
        if options.refine {
            // Re-solve with each targeted cell's rates scaled by the gain the simulation showed
            // (simulated rise ÷ linear rise at the end of heating), up to three passes; keep the best.
            let before = rms(eval
                .error_simulated
                .iter()
                .copied()
                .filter(|v| v.is_finite()));
            let mut best = (before, None);
            let mut gains = vec![1.0; plan.tray.cells()];
            for _ in 0..3 {
                let base = &best.1.as_ref().unwrap_or(&eval).course;
                let lin = &best.1.as_ref().unwrap_or(&eval).linear;
                for i in 0..plan.tray.cells() {
                    if let Some(k) = plan.item_at(i) {
                        let s0 = plan.items[k].start_c;
                        let (sim_rise, lin_rise) = (base.end_of_heating[i] - s0, lin[i] - s0);
                        if lin_rise > 1.0 {
                            gains[i] = (gains[i] * sim_rise / lin_rise).clamp(0.05, 20.0);
                        }
                    }
                }
                let sol = self.solve(plan, Some(&gains))?;
                let candidate = self.finish(plan, &sol, Some(&gains))?;
                let after = rms(candidate
                    .error_simulated
                    .iter()
                    .copied()
                    .filter(|v| v.is_finite()));
                if after < best.0 {
                    best = (after, Some(candidate));
                } else {
                    break;
                }
            }
            let kept = best.1.is_some();
            if let Some(better) = best.1 {
                eval = better;
            }
            eval.refinement = Some(Refinement {
                rms_before: before,
                rms_after: best.0,
                kept,
            });
        }
        Ok(eval)
    }

    fn finish(
        &self,
        plan: &Plan,
        sol: &traycast_solver::Solution,
        gains: Option<&[f64]>,
    ) -> Result<Evaluation, PlanError> {
        let maps = self.maps.as_ref().expect("set");
        let n = maps.cells;
        let mut dwell = sol.dwell.clone();
        quantise(&mut dwell, plan.oven.quantum_s, plan.oven.budget_s);
        let mut linear = linear_prediction(plan, maps, &dwell);
        if let Some(g) = gains {
            // The refined model's own linear prediction.
            for i in 0..n {
                if let Some(k) = plan.item_at(i) {
                    let s0 = plan.items[k].start_c;
                    linear[i] = s0 + (linear[i] - s0) * g[i];
                }
            }
        }
        let schedule = match plan.oven.sequencing {
            Sequencing::Blocks => Schedule::blocks(&dwell),
            Sequencing::Rounds(r) => Schedule::rounds(&dwell, r as usize),
        };
        let mats = materials(plan)?;
        let settings = Settings {
            standing: plan.oven.standing_s,
            ..Settings::default()
        };
        let course = time_course(plan, maps, &mats, &schedule, &settings)?;
        let band = bands(plan);
        let err = |temps: &[f64]| -> Vec<f64> {
            (0..n)
                .map(|i| band[i].map_or(f64::NAN, |(a, b)| band_distance(temps[i], a, b)))
                .collect()
        };
        let error_linear = err(&linear);
        let error_simulated = err(&course.after_standing);
        let mut warnings = course_warnings(plan, &course);
        let cap_excess = (0..n)
            .filter_map(|i| {
                plan.zone_at(i)
                    .and_then(|z| plan.zones[z].cap_c)
                    .map(|c| linear[i] - c)
            })
            .fold(0.0f64, f64::max);
        if cap_excess > 0.05 {
            warnings.push(format!("a hard cap is exceeded by {cap_excess:.1} K in the linear prediction: no schedule keeps it while heating the rest"));
        }
        if let Provenance::Library {
            library,
            load,
            score,
            window,
        } = &maps.provenance
        {
            match window {
                Window::Inside => {}
                Window::Marginal => warnings.push(format!("maps come from load '{load}' of '{library}', similarity {score:.2}: outside the replay window's core, verify by measurement")),
                Window::Outside => warnings.push(format!("maps come from load '{load}' of '{library}', recorded for a different load (similarity {score:.2}): the predictions are not trustworthy")),
            }
        } else {
            warnings
                .push("maps come from the illustrative field model, not from measurements".into());
        }
        match (&maps.provenance, &maps.loaded_se) {
            (Provenance::Library { library, .. }, None) => warnings.push(format!(
                "library '{library}' carries no rate uncertainties: the predictions have no interval and the verdicts use nominal temperatures"
            )),
            (_, Some(_)) if maps.filled > 0 => warnings.push(format!(
                "{} of the map values on this tray's food were filled from neighbours, not measured; their wider errors are in the intervals",
                maps.filled
            )),
            _ => {}
        }
        let bounds = maps
            .loaded_se
            .as_ref()
            .map(|se| cell_bounds(plan, maps, se, &dwell, &mats, &course));
        let zones = self.zone_summaries(plan, sol, &dwell, &error_linear, &error_simulated);
        let last = course.times.len() - 1;
        let items = (0..plan.items.len())
            .map(|k| {
                let cells_k: Vec<usize> = (0..n).filter(|&i| plan.item_at(i) == Some(k)).collect();
                let temps: Vec<f64> = cells_k.iter().map(|&i| course.after_standing[i]).collect();
                let zoned: Vec<f64> = cells_k
                    .iter()
                    .map(|&i| error_simulated[i])
                    .filter(|v| v.is_finite())
                    .collect();
                let cat = plan.catalogue_food(k).expect("validated");
                let temps = if temps.is_empty() {
                    vec![f64::NAN]
                } else {
                    temps
                };
                let nominal = safety::verdict(cat.safety, &temps, plan.oven.standing_s);
                let (mean, stood) = (course.items[k].mean[last], plan.oven.standing_s);
                let (verdict, spread) = match &bounds {
                    Some(b) if !cells_k.is_empty() => {
                        let lo: Vec<f64> = cells_k.iter().map(|&i| b.lower[i]).collect();
                        let hi: Vec<f64> = cells_k.iter().map(|&i| b.upper[i]).collect();
                        let fold = |v: &[f64], f: fn(f64, f64) -> f64, start| {
                            v.iter().copied().fold(start, f)
                        };
                        let shift = |v: &[f64]| {
                            cells_k
                                .iter()
                                .zip(v)
                                .map(|(&i, x)| x - course.after_standing[i])
                                .sum::<f64>()
                                / cells_k.len() as f64
                        };
                        let spread = Spread {
                            coldest: (
                                fold(&lo, f64::min, f64::INFINITY),
                                fold(&hi, f64::min, f64::INFINITY),
                            ),
                            mean: (mean + shift(&lo), mean + shift(&hi)),
                            warmest: (
                                fold(&lo, f64::max, f64::NEG_INFINITY),
                                fold(&hi, f64::max, f64::NEG_INFINITY),
                            ),
                            nominal,
                        };
                        (
                            safety::verdict_within(cat.safety, &lo, &hi, stood),
                            Some(spread),
                        )
                    }
                    _ => (nominal, None),
                };
                ItemSummary {
                    min: course.items[k].min[last],
                    mean: course.items[k].mean[last],
                    max: course.items[k].max[last],
                    in_band: if zoned.is_empty() {
                        f64::NAN
                    } else {
                        zoned.iter().filter(|v| **v == 0.0).count() as f64 / zoned.len() as f64
                    },
                    verdict,
                    moisture_g: course.item_moisture_loss[k] * 1000.0,
                    spread,
                }
            })
            .collect();
        let baseline = baseline(plan, maps);
        Ok(Evaluation {
            total_s: dwell.iter().sum(),
            dwell,
            status: sol.status,
            kkt_residual: sol.kkt_residual,
            schedule,
            linear,
            error_linear,
            error_simulated,
            course,
            zones,
            items,
            baseline,
            provenance: maps.provenance.clone(),
            warnings,
            cap_excess,
            refinement: None,
            bounds,
            cautions: &safety::CAUTIONS,
        })
    }

    fn zone_summaries(
        &self,
        plan: &Plan,
        sol: &traycast_solver::Solution,
        dwell: &[f64],
        lin: &[f64],
        sim: &[f64],
    ) -> Vec<ZoneSummary> {
        let maps = self.maps.as_ref().expect("set");
        let n = maps.cells;
        let profile = |z: usize| -> Vec<f64> {
            let cells: Vec<usize> = (0..n).filter(|&i| plan.zone_at(i) == Some(z)).collect();
            (0..maps.configs)
                .map(|c| {
                    cells.iter().map(|&i| maps.loaded[c * n + i]).sum::<f64>()
                        / cells.len().max(1) as f64
                })
                .collect()
        };
        let profiles: Vec<Vec<f64>> = (0..plan.zones.len()).map(profile).collect();
        let cosine = |a: &[f64], b: &[f64]| {
            let dot: f64 = a.iter().zip(b).map(|(x, y)| x * y).sum();
            let na: f64 = a.iter().map(|x| x * x).sum::<f64>().sqrt();
            let nb: f64 = b.iter().map(|x| x * x).sum::<f64>().sqrt();
            if na * nb > 0.0 { dot / (na * nb) } else { 0.0 }
        };
        let mid_rise = |z: usize| -> f64 {
            let cells: Vec<usize> = (0..n).filter(|&i| plan.zone_at(i) == Some(z)).collect();
            let zone = &plan.zones[z];
            cells
                .iter()
                .map(|&i| {
                    0.5 * (zone.min_c + zone.max_c)
                        - plan.items[plan.item_at(i).expect("zoned cells hold food")].start_c
                })
                .sum::<f64>()
                / cells.len().max(1) as f64
        };
        let at_limit = plan
            .oven
            .limit_s
            .is_some_and(|l| dwell.iter().any(|d| *d >= l - 1e-6));
        (0..plan.zones.len())
            .map(|z| {
                let cells: Vec<usize> = (0..n).filter(|&i| plan.zone_at(i) == Some(z)).collect();
                let share = |e: &[f64]| if cells.is_empty() { f64::NAN } else { cells.iter().filter(|&&i| e[i] == 0.0).count() as f64 / cells.len() as f64 };
                let rms_l = rms(cells.iter().map(|&i| lin[i]));
                let diagnosis = (rms_l > 1.0).then(|| {
                    if sol.status == Status::BudgetBinding {
                        return Diagnosis::Setting(format!(
                            "the time budget of {:.0} s is binding (each extra second would lower the objective by {:.2})",
                            plan.oven.budget_s.unwrap_or(0.0),
                            sol.budget_multiplier
                        ));
                    }
                    if at_limit {
                        return Diagnosis::Setting(format!("a configuration is held at the per-configuration limit of {:.0} s", plan.oven.limit_s.unwrap_or(0.0)));
                    }
                    let twin = (0..plan.zones.len())
                        .filter(|&w| w != z && (mid_rise(w) - mid_rise(z)).abs() > 5.0)
                        .map(|w| (w, cosine(&profiles[z], &profiles[w])))
                        .max_by(|a, b| a.1.total_cmp(&b.1));
                    match twin {
                        Some((w, s)) if s > 0.97 => Diagnosis::Physics(format!(
                            "every configuration heats '{}' almost like '{}' (similarity {s:.3}), so they cannot reach temperatures this different",
                            plan.zones[z].name, plan.zones[w].name
                        )),
                        _ => Diagnosis::Physics(format!(
                            "no mixture of the {} configurations heats '{}' into its band while meeting the other targets",
                            maps.configs, plan.zones[z].name
                        )),
                    }
                });
                ZoneSummary {
                    coverage_linear: share(lin),
                    coverage_simulated: share(sim),
                    rms_linear: rms_l,
                    rms_simulated: rms(cells.iter().map(|&i| sim[i])),
                    diagnosis,
                }
            })
            .collect()
    }
}

/// Simulates `schedule` on the plan's load with its thawed maps.
pub fn time_course(
    plan: &Plan,
    maps: &PlanMaps,
    mats: &[Material],
    schedule: &Schedule,
    settings: &Settings,
) -> Result<TimeCourse, PlanError> {
    let n = maps.cells;
    let cells: Vec<Option<CellFill>> = (0..n)
        .map(|i| {
            plan.item_at(i).map(|k| CellFill {
                item: k,
                thickness: plan.items[k].thickness_mm / 1000.0,
            })
        })
        .collect();
    let start: Vec<f64> = start_temps(plan)
        .iter()
        .map(|v| if v.is_nan() { 20.0 } else { *v })
        .collect();
    let load = Load {
        tray: Tray {
            width: plan.tray.width,
            height: plan.tray.height,
            cell_size: plan.tray.cell_mm / 1000.0,
        },
        items: mats,
        cells: &cells,
        start: &start,
    };
    let sim_maps = simulate::Maps {
        configs: maps.configs,
        rates: &maps.thawed,
    };
    simulate::simulate(&load, &sim_maps, schedule, settings).map_err(|e| match e {
        ThermalError::Diverged { cell, time_s } => PlanError::new(
            format!(
                "simulation, cell row {}, col {}",
                cell / plan.tray.width,
                cell % plan.tray.width
            ),
            format!(
                "the temperature of '{}' stopped being a number at {time_s:.1} s: the plan drives the food past what the model covers; reduce the power, the time or the thickness",
                plan.item_at(cell)
                    .map_or("an empty cell", |k| plan.items[k].name.as_str())
            ),
        ),
        other => other.into(),
    })
}

/// Warnings about cells the time course drove outside the model: boiled dry, or past
/// [`simulate::MODEL_LIMIT_C`] (dried food scorching). One line per item.
fn course_warnings(plan: &Plan, course: &TimeCourse) -> Vec<String> {
    let mut out = Vec::new();
    for (k, item) in plan.items.iter().enumerate() {
        let cells: Vec<usize> = (0..course.peak.len())
            .filter(|&i| plan.item_at(i) == Some(k))
            .collect();
        let dry = cells.iter().filter(|&&i| course.boiled_dry[i]).count();
        if dry > 0 {
            out.push(format!(
                "{dry} cell(s) of '{}' boiled dry: all their water evaporated and nothing is left there; shorten the heating or lower the power",
                item.name
            ));
        }
        let hottest = cells
            .iter()
            .map(|&i| course.peak[i])
            .fold(f64::NEG_INFINITY, f64::max);
        if hottest > simulate::MODEL_LIMIT_C {
            out.push(format!(
                "'{}' reaches {hottest:.0} °C: it has dried out and would scorch; above {:.0} °C the food property model no longer holds and the predictions are not physical",
                item.name,
                simulate::MODEL_LIMIT_C
            ));
        }
    }
    out
}

/// Per-cell 95 % bounds after standing from the rates' standard errors.
///
/// The linear rise Σ_c r_ic·x_c has the standard deviation √(Σ_c (σ_ic·x_c)²) when the rate errors
/// are independent; its relative size is applied to the energy the cell absorbed over the whole
/// course (its enthalpy gain plus the water it evaporated), and the bounds are read back through
/// the food's enthalpy curve: a cell whose energy may fall short ends its lower bound on the thaw
/// plateau rather than below it, and a boiling cell first loses the energy that only evaporated
/// water. Conduction between cells (which averages errors out) is neglected, which widens the
/// bounds; upper bounds stop at 100 °C.
pub fn cell_bounds(
    plan: &Plan,
    maps: &PlanMaps,
    se: &[f64],
    dwell: &[f64],
    mats: &[Material],
    course: &TimeCourse,
) -> CellBounds {
    let n = maps.cells;
    let cell_m = plan.tray.cell_mm / 1000.0;
    let mut lower = vec![f64::NAN; n];
    let mut upper = vec![f64::NAN; n];
    for i in 0..n {
        let Some(k) = plan.item_at(i) else { continue };
        let (mut rise, mut var) = (0.0, 0.0);
        for (c, x) in dwell.iter().enumerate() {
            rise += maps.loaded[c * n + i] * x;
            var += (se[c * n + i] * x).powi(2);
        }
        let rel = if rise > 0.0 { var.sqrt() / rise } else { 0.0 };
        let m = &mats[k];
        let after = course.after_standing[i];
        let mass = m.density * cell_m * cell_m * plan.items[k].thickness_mm / 1000.0;
        let evaporated = LATENT_VAPORISATION * course.moisture_loss[i] / mass;
        let h = m.enthalpy(after);
        let absorbed = h - m.enthalpy(plan.items[k].start_c) + evaporated;
        let de = Z95 * rel * absorbed.abs();
        lower[i] = m.state((h + evaporated - de).min(h), &mut 0).0.min(after);
        upper[i] = m.state(h + de, &mut 0).0.clamp(after, 100.0f64.max(after));
    }
    CellBounds { lower, upper }
}

/// No steering: the average of all configurations (what a turntable-less oven without field
/// control approximates), run until the coldest targeted cell reaches its band minimum.
pub fn baseline(plan: &Plan, maps: &PlanMaps) -> Baseline {
    let n = maps.cells;
    let band = bands(plan);
    let start = start_temps(plan);
    let avg: Vec<f64> = (0..n)
        .map(|i| {
            (0..maps.configs)
                .map(|c| maps.loaded[c * n + i])
                .sum::<f64>()
                / maps.configs as f64
        })
        .collect();
    let targeted: Vec<usize> = (0..n).filter(|&i| band[i].is_some()).collect();
    let need = targeted
        .iter()
        .map(|&i| {
            let rise = band[i].expect("targeted").0 - start[i];
            if rise <= 0.0 {
                0.0
            } else if avg[i] > 0.0 {
                rise / avg[i]
            } else {
                f64::INFINITY
            }
        })
        .fold(0.0f64, f64::max);
    let cap = plan.oven.budget_s.unwrap_or(3600.0);
    let seconds = need.min(cap);
    let errs: Vec<f64> = targeted
        .iter()
        .map(|&i| {
            let (a, b) = band[i].expect("targeted");
            band_distance(start[i] + avg[i] * seconds, a, b)
        })
        .collect();
    Baseline {
        seconds,
        rms_linear: rms(errs.iter().copied()),
        coverage_linear: if errs.is_empty() {
            f64::NAN
        } else {
            errs.iter().filter(|e| **e == 0.0).count() as f64 / errs.len() as f64
        },
    }
}

/// Evaluates once with a fresh evaluator.
pub fn evaluate(
    plan: &Plan,
    library: Option<&MapLibrary>,
    options: Options,
) -> Result<Evaluation, PlanError> {
    Evaluator::new().evaluate(plan, library, options)
}
