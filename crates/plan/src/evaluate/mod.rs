//! The evaluation pipeline: plan + maps → problem → solve → linear prediction → time course →
//! errors, band coverage, coldest-point verdicts, baseline, diagnosis.
//!
//! - `maps`: the plan's heating maps (field model or library) and where they come from;
//! - `problem`: bands, start temperatures, the (warm) solve with its hard caps, the quantum, the
//!   linear prediction;
//! - `course`: the simulated time course and its warnings;
//! - `verdicts`: per-cell bounds from the maps' errors and each item's verdict;
//! - `diagnosis`: each zone's outcome and why it misses;
//! - `baseline`: the unsteered comparison;
//! - `ovens`: one schedule on several ovens (unit-to-unit variation);
//! - `uniformity`: how evenly each item heats, steered and unsteered;
//! - `goal`: the constrained objectives' rows, hard limits and placement scenarios;
//! - `refine`: the simulation in the loop (solve → simulate → correct → re-solve);
//! - `report`: the types all of this returns.

mod baseline;
mod card;
mod course;
mod diagnosis;
mod goal;
mod maps;
mod ovens;
mod prepared;
mod problem;
mod refine;
mod report;
mod uniformity;
mod verdicts;

pub use baseline::baseline;
pub use card::SafetyCard;
pub(crate) use course::simulate_load;
pub use course::time_course;
pub use diagnosis::Diagnosis;
pub use goal::Hard;
pub use maps::{PlanMaps, Provenance, maps_for, materials};
pub use ovens::{AcrossOvens, OvenOutcome, across_ovens, on_oven};
pub use problem::linear_prediction;
pub use refine::{MAX_PASSES, TOLERANCE_K};
pub use report::{
    Baseline, CellBounds, Evaluation, ItemSummary, JudgedPoint, Options, Quick, Refinement, Spread,
    ZoneSummary, logs, verdict_words,
};
pub use uniformity::{ItemUniformity, Uniformity, uniformity};
pub use verdicts::cell_bounds;

pub use prepared::Prepared;

use crate::error::PlanError;
use crate::library::MapLibrary;
use crate::model::{Plan, Sequencing, Variation};
use course::course_warnings;
use maps::maps_hash;
use problem::{predict, quantise};
use traycast_solver::DwellSolver;
use traycast_thermal::material::Material;
use traycast_thermal::safety;
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::Settings;

/// Caches what a plan being edited does not change from stroke to stroke: the map library (owned,
/// its content hashed once), the maps and materials (keyed on a hash of the fields they depend on,
/// never on comparing plans by value), and the warm solver.
#[derive(Default)]
pub struct Evaluator {
    library: Option<MapLibrary>,
    library_hash: u64,
    maps_key: Option<u64>,
    maps: Option<PlanMaps>,
    mats: Vec<Material>,
    solver: Option<(Vec<usize>, DwellSolver)>,
    /// The last constrained answer: the next constrained solve starts from it.
    planned: Option<traycast_solver::Planned>,
    /// Other ovens the hard limits must hold on ([`Evaluator::hold_on`]), and their maps for the
    /// plan whose maps are cached.
    others: Vec<MapLibrary>,
    other_maps: Vec<PlanMaps>,
}

impl Evaluator {
    /// A fresh evaluator on the illustrative field model (no library).
    pub fn new() -> Self {
        Self::default()
    }

    /// A fresh evaluator with `library` loaded.
    pub fn with_library(library: Option<MapLibrary>) -> Self {
        let mut ev = Self::new();
        ev.set_library(library);
        ev
    }

    /// Loads `library` (or none) for the plans evaluated next. Its content is hashed once here;
    /// the caches are dropped only when the content differs from the library held.
    pub fn set_library(&mut self, library: Option<MapLibrary>) {
        let hash = library.as_ref().map_or(0, MapLibrary::content_hash);
        if hash != self.library_hash || library.is_some() != self.library.is_some() {
            self.maps_key = None;
            self.maps = None;
            self.solver = None;
        }
        self.library = library;
        self.library_hash = hash;
    }

    /// The library loaded, if any.
    pub fn library(&self) -> Option<&MapLibrary> {
        self.library.as_ref()
    }

    /// The maps for `plan`, regenerated only when a field they depend on changed.
    pub fn maps(&mut self, plan: &Plan) -> Result<&PlanMaps, PlanError> {
        let key = maps_hash(plan) ^ self.library_hash.rotate_left(1);
        if self.maps_key != Some(key) || self.maps.is_none() {
            self.maps = None;
            self.maps_key = None;
            self.solver = None;
            self.mats = materials(plan)?;
            let hash = self.library.as_ref().map(|_| self.library_hash);
            self.maps = Some(maps::maps_with(plan, self.library.as_ref(), hash)?);
            self.refresh_other_maps(plan)?;
            self.maps_key = Some(key);
        }
        Ok(self.maps.as_ref().expect("just set"))
    }

    /// The fast part of an evaluation, for every brush stroke: solve (warm) and the linear
    /// prediction, without the time course. [`Evaluator::evaluate`] gives everything.
    pub fn quick(&mut self, plan: &Plan) -> Result<Quick, PlanError> {
        plan.validate()?;
        let prep = Prepared::new(plan);
        self.maps(plan)?;
        let hard = first_hard(plan, &prep);
        let sol = self.solve(plan, &prep, None, hard.as_ref())?;
        let maps = self.maps.as_ref().expect("set");
        let mut dwell = sol.dwell;
        quantise(&mut dwell, plan.oven.quantum_s, plan.oven.budget_s);
        let linear = predict(&prep.start, maps, &dwell);
        let error_linear = prep.band_errors(&linear);
        Ok(Quick {
            total_s: dwell.iter().sum(),
            dwell,
            status: sol.status,
            linear,
            error_linear,
        })
    }

    /// Evaluates `plan` end to end.
    pub fn evaluate(&mut self, plan: &Plan, options: Options) -> Result<Evaluation, PlanError> {
        plan.validate()?;
        let prep = Prepared::new(plan);
        self.maps(plan)?;
        let hard = first_hard(plan, &prep);
        let sol = self.solve(plan, &prep, None, hard.as_ref())?;
        let mut eval = self.finish(plan, &prep, &sol, None)?;
        // Hard limits are only as good as the linear model they are written on: the constrained
        // objectives always run the simulation loop (the safe minimum's floors are only right once
        // it has shown the coldest points); the band fit runs it on request.
        if options.refine || plan.planning.objective.is_constrained() {
            self.refine(plan, &prep, &mut eval, hard)?;
        }
        Ok(eval)
    }

    fn finish(
        &self,
        plan: &Plan,
        prep: &Prepared,
        sol: &traycast_solver::Solution,
        gains: Option<&[f64]>,
    ) -> Result<Evaluation, PlanError> {
        let maps = self.maps.as_ref().expect("set");
        let mut dwell = sol.dwell.clone();
        quantise(&mut dwell, plan.oven.quantum_s, plan.oven.budget_s);
        let mut linear = predict(&prep.start, maps, &dwell);
        if let Some(g) = gains {
            // The refined model's own linear prediction.
            for (i, (l, s0)) in linear.iter_mut().zip(&prep.start).enumerate() {
                if s0.is_finite() {
                    *l = s0 + (*l - s0) * g[i];
                }
            }
        }
        let schedule = match plan.oven.sequencing {
            Sequencing::Blocks => Schedule::blocks(&dwell),
            Sequencing::Rounds(r) => Schedule::rounds(&dwell, r as usize),
        };
        let settings = plan.heating.settings(Settings {
            standing: plan.oven.standing_s,
            ..Settings::default()
        });
        let course = time_course(plan, maps, &self.mats, &schedule, &settings)?;
        let error_linear = prep.band_errors(&linear);
        let error_simulated = prep.band_errors(&course.after_standing);
        let mut warnings = course_warnings(plan, prep, &course, &linear);
        let cap_excess = prep
            .rows
            .iter()
            .filter_map(|&i| {
                plan.zone_at(i)
                    .and_then(|z| plan.zones[z].cap_c)
                    .map(|c| linear[i] - c)
            })
            .fold(0.0f64, f64::max);
        if cap_excess > 0.05 {
            warnings.push(format!("a hard cap is exceeded by {cap_excess:.1} K in the linear prediction: no schedule keeps it while heating the rest"));
        }
        warnings.extend(maps.warnings());
        warnings.extend(over_rating(plan, maps, &self.mats));
        // Bounds when the maps carry errors or the plan allows for variation.
        let bounds = (maps.loaded_se.is_some() || plan.variation != Variation::NONE).then(|| {
            cell_bounds(
                plan,
                prep,
                maps,
                maps.loaded_se.as_deref(),
                &dwell,
                &self.mats,
                &course,
            )
        });
        let zones = self.zone_summaries(plan, prep, sol, &dwell, &error_linear, &error_simulated);
        let items =
            verdicts::item_summaries(plan, prep, &course, &error_simulated, bounds.as_ref());
        let baseline = baseline::of(plan, prep, maps);
        let uniformity =
            uniformity::of_items(plan, prep, &linear, &course.after_standing, &baseline.temps);
        Ok(Evaluation {
            uniformity,
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
            bounds_from: bounds
                .is_some()
                .then(|| report::bounds_words(maps.loaded_se.is_some(), &plan.variation)),
            bounds,
            cautions: &safety::CAUTIONS,
        })
    }
}

/// The safe minimum's first hard limits (None for the other objectives).
fn first_hard(plan: &Plan, prep: &Prepared) -> Option<Hard> {
    (plan.planning.objective == crate::model::Objective::SafeMinimum)
        .then(|| Hard::initial(plan, prep))
}

/// Evaluates once with a fresh evaluator.
pub fn evaluate(
    plan: &Plan,
    library: Option<&MapLibrary>,
    options: Options,
) -> Result<Evaluation, PlanError> {
    Evaluator::with_library(library.cloned()).evaluate(plan, options)
}

/// The configurations whose thawed rates imply that the load absorbs more than the oven's rated
/// output (a library recorded on another oven or load, or a calibration gone wrong): one warning
/// naming the worst and how many. The field model never does this ([`crate::field`] caps it).
fn over_rating(
    plan: &Plan,
    maps: &PlanMaps,
    mats: &[traycast_thermal::material::Material],
) -> Option<String> {
    let n = maps.cells;
    let cell = plan.tray.cell_mm / 1000.0;
    let watts_per_rate: Vec<(usize, f64)> = (0..n)
        .filter_map(|i| {
            plan.item_at(i).map(|k| {
                let m = &mats[k];
                let kg = m.density * cell * cell * plan.items[k].thickness_mm / 1000.0;
                (i, kg * m.reference_cp * 1000.0)
            })
        })
        .collect();
    let absorbed: Vec<f64> = (0..maps.configs)
        .map(|c| {
            watts_per_rate
                .iter()
                .map(|&(i, w)| maps.thawed[c * n + i] * w)
                .sum()
        })
        .collect();
    let over: Vec<usize> = (0..maps.configs)
        .filter(|&c| absorbed[c] > plan.oven.power_w * 1.0001)
        .collect();
    let worst = *over
        .iter()
        .max_by(|&&a, &&b| absorbed[a].total_cmp(&absorbed[b]))?;
    Some(format!(
        "the maps imply that the load absorbs more than the oven's rated {:.0} W in {} configuration(s) (worst: configuration {worst}, {:.0} W): an oven cannot put out more than it is rated for; check the library's calibration and the plan's oven power",
        plan.oven.power_w,
        over.len(),
        absorbed[worst]
    ))
}
