//! The dwell problem of a plan: per-cell bands and start temperatures, the solve (warm when only
//! targets changed; the constrained objectives and hard caps go to `goal.rs`), the controller's
//! time quantum, and the linear prediction.

use super::Evaluator;
use super::goal::{self, Hard};
use super::maps::PlanMaps;
use super::prepared::Prepared;
use crate::error::PlanError;
use crate::model::Plan;
use traycast_solver::{DwellSolver, Rates, Spec};

pub(super) fn band_distance(v: f64, lo: f64, hi: f64) -> f64 {
    traycast_solver::band_distance(v, lo, hi)
}

pub(super) fn rms(v: impl Iterator<Item = f64>) -> f64 {
    let (mut s, mut n) = (0.0, 0usize);
    for x in v {
        s += x * x;
        n += 1;
    }
    if n == 0 { 0.0 } else { (s / n as f64).sqrt() }
}

pub(super) fn start_temps(plan: &Plan) -> Vec<f64> {
    (0..plan.tray.cells())
        .map(|i| plan.item_at(i).map_or(f64::NAN, |k| plan.items[k].start_c))
        .collect()
}

/// Linear prediction start + Σ_j rate_j·x_j for every food cell (NaN elsewhere).
pub fn linear_prediction(plan: &Plan, maps: &PlanMaps, dwell: &[f64]) -> Vec<f64> {
    predict(&start_temps(plan), maps, dwell)
}

/// [`linear_prediction`] from start temperatures already derived (NaN for empty cells).
pub(super) fn predict(start: &[f64], maps: &PlanMaps, dwell: &[f64]) -> Vec<f64> {
    let n = maps.cells;
    // Configuration by configuration over contiguous maps, skipping the ones not used (most are
    // not): empty cells start at NaN and stay NaN.
    let mut out = start.to_vec();
    for (c, &x) in dwell.iter().enumerate() {
        if x == 0.0 {
            continue;
        }
        for (o, r) in out.iter_mut().zip(&maps.loaded[c * n..(c + 1) * n]) {
            *o += r * x;
        }
    }
    out
}

/// Rounds dwells to the controller quantum without breaking the budget.
pub(super) fn quantise(dwell: &mut [f64], quantum: f64, budget: Option<f64>) {
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
    /// Solves the dwell problem: warm when only targets changed; with `gains`, on rates scaled per
    /// cell (a pass of the simulation loop, solved afresh). Plans with hard rows — a constrained
    /// objective (`hard` holds the safe minimum's limits) or a zone cap — are solved exactly under
    /// them.
    pub(super) fn solve(
        &mut self,
        plan: &Plan,
        prep: &Prepared,
        gains: Option<&[f64]>,
        hard: Option<&Hard>,
    ) -> Result<traycast_solver::Solution, PlanError> {
        let maps = self.maps.as_ref().expect("maps computed first");
        if plan.planning.objective.is_constrained() || prep.problem.cap.iter().any(Option::is_some)
        {
            return goal::solve(
                plan,
                prep,
                maps,
                &self.other_maps,
                gains,
                hard,
                &mut self.planned,
            );
        }
        let n = maps.cells;
        let rows = &prep.rows;
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
                if self.solver.as_ref().map(|(r, _)| r) != Some(rows) {
                    self.solver = Some((rows.clone(), build(None)?));
                }
                &mut self.solver.as_mut().expect("set").1
            }
        };
        let targets = &prep.problem;
        let mut spec = Spec::band(targets.lo.clone(), targets.hi.clone(), maps.configs);
        spec.weights.clone_from(&targets.weight);
        spec.upper = vec![plan.oven.limit_s.unwrap_or(f64::INFINITY); maps.configs];
        spec.budget = plan.oven.budget_s;
        spec.time_penalty = plan.oven.time_penalty;
        spec.ridge = 0.0;
        // Without hard rows the output needs no per-cell predictions: the dwell-only path.
        Ok(solver.solve_dwell(&spec)?)
    }
}
