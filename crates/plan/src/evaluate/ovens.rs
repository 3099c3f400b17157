//! One schedule on several ovens of the same model: unit-to-unit variation.
//!
//! Each oven is a map library recorded on that unit. A schedule solved on one oven is evaluated on
//! the others' maps unchanged ([`across_ovens`]): every item's verdict on every oven, and the worst
//! per item. With [`Evaluator::hold_on`], the hard limits of a constrained objective must hold on
//! every listed oven's maps as well as the plan's own: one schedule for all of them.

use super::Evaluator;
use super::report::{Evaluation, ItemSummary};
use crate::error::PlanError;
use crate::library::MapLibrary;
use crate::model::{MapSource, Plan};

/// `plan` pointed at `library` (its name and content hash): the same tray on another oven.
pub fn on_oven(plan: &Plan, library: &MapLibrary) -> Plan {
    let mut p = plan.clone();
    p.maps = MapSource::Library {
        name: library.name.clone(),
        hash: Some(library.content_hash()),
    };
    p
}

/// One oven's outcome of a schedule.
#[derive(Clone, Debug, PartialEq)]
pub struct OvenOutcome {
    /// The oven's library name.
    pub library: String,
    /// Each item's summary on that oven (verdicts judged as on the plan's own oven).
    pub items: Vec<ItemSummary>,
}

/// A schedule on several ovens.
#[derive(Clone, Debug, PartialEq)]
pub struct AcrossOvens {
    /// One outcome per oven, in the order given.
    pub ovens: Vec<OvenOutcome>,
    /// Per item, the oven (index into `ovens`) where its verdict's margin is least — a failing
    /// verdict before a passing one.
    pub worst: Vec<usize>,
}

/// Evaluates `dwell` (seconds per configuration) for `plan` on each of `libraries`.
pub fn across_ovens(
    plan: &Plan,
    dwell: &[f64],
    libraries: &[MapLibrary],
) -> Result<AcrossOvens, PlanError> {
    let ovens = libraries
        .iter()
        .map(|lib| {
            let p = on_oven(plan, lib);
            let e = Evaluator::with_library(Some(lib.clone())).evaluate_dwell(&p, dwell)?;
            Ok(OvenOutcome {
                library: lib.name.clone(),
                items: e.items,
            })
        })
        .collect::<Result<Vec<_>, PlanError>>()?;
    let worst = (0..plan.items.len())
        .map(|k| {
            (0..ovens.len())
                .min_by(|&a, &b| {
                    let key = |o: usize| {
                        let v = &ovens[o].items[k].verdict;
                        (
                            v.safe,
                            if v.margin.is_nan() {
                                f64::NEG_INFINITY
                            } else {
                                v.margin
                            },
                        )
                    };
                    let (sa, ma) = key(a);
                    let (sb, mb) = key(b);
                    sa.cmp(&sb).then(ma.total_cmp(&mb))
                })
                .unwrap_or(0)
        })
        .collect();
    Ok(AcrossOvens { ovens, worst })
}

impl Evaluator {
    /// Evaluates `dwell` as the schedule for `plan` on this evaluator's maps, without solving:
    /// the time course, bounds, verdicts and the rest, as [`Evaluator::evaluate`] reports them.
    pub fn evaluate_dwell(&mut self, plan: &Plan, dwell: &[f64]) -> Result<Evaluation, PlanError> {
        plan.validate()?;
        let prep = super::Prepared::new(plan);
        let configs = self.maps(plan)?.configs;
        if dwell.len() != configs {
            return Err(PlanError::new(
                "dwell",
                format!(
                    "has {} entries, the oven has {configs} configurations",
                    dwell.len()
                ),
            ));
        }
        if let Some(j) = dwell.iter().position(|d| !d.is_finite() || *d < 0.0) {
            return Err(PlanError::new(
                format!("dwell[{j}]"),
                format!("{} s is not a dwell (a number of seconds ≥ 0)", dwell[j]),
            ));
        }
        let sol = traycast_solver::Solution {
            dwell: dwell.to_vec(),
            objective: f64::NAN,
            achieved: Vec::new(),
            band_distance: Vec::new(),
            status: traycast_solver::Status::Optimal,
            budget_multiplier: 0.0,
            iterations: Default::default(),
            kkt_residual: 0.0,
        };
        self.finish(plan, &prep, &sol, None)
    }

    /// [`Evaluator::evaluate_dwell`] on this evaluator's maps changed by `perturb` (a scenario:
    /// another power, other rates); the maps are restored afterwards.
    pub fn evaluate_dwell_with(
        &mut self,
        plan: &Plan,
        dwell: &[f64],
        perturb: &mut dyn FnMut(&mut super::PlanMaps),
    ) -> Result<Evaluation, PlanError> {
        self.maps(plan)?;
        let kept = self.maps.clone();
        if let Some(m) = self.maps.as_mut() {
            perturb(m);
        }
        let result = self.evaluate_dwell(plan, dwell);
        self.maps = kept;
        result
    }

    /// Other ovens (their map libraries) on whose maps the hard limits of a constrained objective
    /// must hold as well as on the plan's own; an empty list holds them on the plan's oven only.
    pub fn hold_on(&mut self, others: Vec<MapLibrary>) {
        self.others = others;
        self.maps_key = None;
        self.other_maps.clear();
    }

    /// The maps of the other ovens for `plan`, made when [`Evaluator::maps`] makes the plan's own.
    pub(super) fn refresh_other_maps(&mut self, plan: &Plan) -> Result<(), PlanError> {
        self.other_maps = self
            .others
            .iter()
            .map(|lib| {
                super::maps::maps_with(&on_oven(plan, lib), Some(lib), Some(lib.content_hash()))
            })
            .collect::<Result<_, _>>()?;
        Ok(())
    }
}
