//! The evaluation pipeline: plan + maps → problem → solve → linear prediction → time course →
//! errors, band coverage, coldest-cell verdicts, baseline, diagnosis.
//!
//! - `maps`: the plan's heating maps (field model or library) and where they come from;
//! - `problem`: bands, start temperatures, the (warm) solve with its hard caps, the quantum, the
//!   linear prediction;
//! - `course`: the simulated time course and its warnings;
//! - `verdicts`: per-cell bounds from the maps' errors and each item's verdict;
//! - `diagnosis`: each zone's outcome and why it misses;
//! - `baseline`: the unsteered comparison;
//! - `refine`: re-solving with the simulation's correction;
//! - `report`: the types all of this returns.

mod baseline;
mod course;
mod diagnosis;
mod maps;
mod problem;
mod refine;
mod report;
mod verdicts;

pub use baseline::baseline;
pub use course::time_course;
pub use diagnosis::Diagnosis;
pub use maps::{PlanMaps, Provenance, maps_for, materials};
pub use problem::linear_prediction;
pub use report::{
    Baseline, CellBounds, Evaluation, ItemSummary, Options, Quick, Refinement, Spread, Z95,
    ZoneSummary,
};
pub use verdicts::cell_bounds;

use crate::error::PlanError;
use crate::library::{MapLibrary, Window};
use crate::model::{Plan, Sequencing};
use course::course_warnings;
use maps::maps_key;
use problem::{band_distance, bands, quantise};
use traycast_solver::DwellSolver;
use traycast_thermal::safety;
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::Settings;

/// Caches maps and the warm solver between evaluations of a plan being edited.
#[derive(Default)]
pub struct Evaluator {
    maps_key: Option<(Plan, Option<MapLibrary>)>,
    maps: Option<PlanMaps>,
    solver: Option<(Vec<usize>, DwellSolver)>,
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
            self.refine(plan, &mut eval)?;
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
        let items = verdicts::item_summaries(plan, &course, &error_simulated, bounds.as_ref());
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
}

/// Evaluates once with a fresh evaluator.
pub fn evaluate(
    plan: &Plan,
    library: Option<&MapLibrary>,
    options: Options,
) -> Result<Evaluation, PlanError> {
    Evaluator::new().evaluate(plan, library, options)
}
