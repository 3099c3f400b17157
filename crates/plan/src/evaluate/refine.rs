//! Simulation in the loop: solve → simulate → correct → re-solve, until the simulated outcome
//! settles.
//!
//! Each pass scales every food cell's rates by the gain the simulation showed (simulated rise of
//! its coldest point ÷ linear rise at the end of heating) and, for the safe minimum, moves each
//! cell's hard floor (ceiling) by how far its simulated lower (upper) bound after standing missed
//! the safety limit ([`Hard::correct`]) — on the worst of the plan's oven and the ovens the limits
//! must also hold on ([`Evaluator::hold_on`]). It stops when no food cell's simulated temperature after
//! standing moved by more than [`TOLERANCE_K`], or after [`MAX_PASSES`] solves. The plan kept is
//! the best seen, never a worse one: for the safe minimum, fewest items failing, then the smallest
//! safety gap, then the band fit; for the other objectives, the band fit, then the shorter time.

use super::Evaluator;
use super::goal::Hard;
use super::prepared::Prepared;
use super::problem::rms;
use super::report::{Evaluation, Refinement};
use crate::error::PlanError;
use crate::model::{Objective, Plan};

/// The loop stops once the simulated outcome changes by less than this, K. Rounding the dwells to
/// a 0.5 s controller step alone moves the outcome by about 0.3 K, so a tighter tolerance would
/// chase the rounding.
pub const TOLERANCE_K: f64 = 0.5;
/// A cell whose coldest point ends heating at or above this has reached the boiling plateau, °C:
/// its temperature no longer follows its rates.
const PLATEAU_C: f64 = 98.0;

/// Most solves the loop runs, the first included: five corrections.
pub const MAX_PASSES: usize = 6;

impl Evaluator {
    /// Runs the loop from `eval` (the first solve, made with `hard`) and leaves the best plan in
    /// `eval`, with what the loop did in `eval.refinement`.
    pub(super) fn refine(
        &mut self,
        plan: &Plan,
        prep: &Prepared,
        eval: &mut Evaluation,
        hard: Option<Hard>,
    ) -> Result<(), PlanError> {
        let safe = plan.planning.objective == Objective::SafeMinimum;
        let n = plan.tray.cells();
        let initial = hard.clone();
        let mut hard = hard;
        let rms_before = band_rms(eval);
        // The plan's outcome on the other ovens its limits must hold on, beside its own.
        let mut current_others = self.on_other_ovens(plan, &eval.dwell)?;
        let mut best = score(eval, &current_others, safe);
        let mut best_gap = worst_gap(eval, &current_others);
        let mut kept_later = false;
        let mut current = eval.clone();
        let mut gains = vec![1.0; n];
        let (mut passes, mut change, mut converged) = (1, f64::NAN, false);
        let mut stopped = None;
        while passes < MAX_PASSES {
            // The gain is the simulated rise over the linear one; a cell on the boiling plateau
            // says nothing about its rates, and after the first correction each gain moves half
            // way (in ratio) so the loop settles instead of ringing.
            let damp = if passes == 1 { 1.0 } else { 0.5 };
            for (i, g) in gains.iter_mut().enumerate() {
                if let Some(k) = plan.item_at(i) {
                    let s0 = plan.items[k].start_c;
                    let end = current.course.end_of_heating[i];
                    let (sim, lin) = (end - s0, current.linear[i] - s0);
                    if lin > 1.0 && sim > 0.0 && end < PLATEAU_C {
                        *g = (*g * (sim / lin).powf(damp)).clamp(0.05, 20.0);
                    }
                }
            }
            if let (Some(h), Some(first)) = (hard.as_mut(), initial.as_ref()) {
                let (mut lower, mut upper) = judged_bounds(&current);
                // Held on other ovens too: each cell answers for the worst of them.
                for other in &current_others {
                    let (lo, hi) = judged_bounds(other);
                    for i in 0..n {
                        lower[i] = lower[i].min(lo[i]);
                        upper[i] = upper[i].max(hi[i]);
                    }
                }
                let short_kill: Vec<bool> = current
                    .items
                    .iter()
                    .map(|it| {
                        it.verdict.margin >= 0.0
                            && it.verdict.kill.as_ref().is_some_and(|k| !k.met())
                    })
                    .collect();
                h.correct(plan, prep, &lower, &upper, first, &short_kill);
            }
            // A correction no schedule can meet ends the loop; the best plan so far stands.
            let sol = match self.solve(plan, prep, Some(&gains), hard.as_ref()) {
                Ok(sol) => sol,
                Err(e) => {
                    stopped = Some(e.message);
                    break;
                }
            };
            let next = self.finish(plan, prep, &sol, Some(&gains))?;
            let next_others = self.on_other_ovens(plan, &next.dwell)?;
            passes += 1;
            change = current_others
                .iter()
                .zip(&next_others)
                .map(|(a, b)| outcome_change(a, b))
                .fold(outcome_change(&current, &next), f64::max);
            let s = score(&next, &next_others, safe);
            if better(&s, &best) {
                best = s;
                best_gap = worst_gap(&next, &next_others);
                *eval = next.clone();
                kept_later = true;
            }
            current = next;
            current_others = next_others;
            if change < TOLERANCE_K {
                converged = true;
                break;
            }
        }
        eval.refinement = Some(Refinement {
            rms_before,
            rms_after: band_rms(eval),
            kept: kept_later,
            passes,
            change_k: change,
            converged,
            tolerance_k: TOLERANCE_K,
            safety_gap_k: best_gap,
            stopped,
        });
        Ok(())
    }
}

impl Evaluator {
    /// `dwell` on each oven of [`Evaluator::hold_on`] (none when there are none).
    fn on_other_ovens(&self, plan: &Plan, dwell: &[f64]) -> Result<Vec<Evaluation>, PlanError> {
        self.others
            .iter()
            .map(|lib| {
                Evaluator::with_library(Some(lib.clone()))
                    .evaluate_dwell(&super::on_oven(plan, lib), dwell)
            })
            .collect()
    }
}

/// How far the outcome a plan is judged on moved between two passes, K: each item's judged
/// coldest and warmest points (on the bounds when there are any) and each zone's RMS distance
/// outside its band after standing. NaN counts as no convergence.
fn outcome_change(a: &Evaluation, b: &Evaluation) -> f64 {
    let items = a.items.iter().zip(&b.items).flat_map(|(x, y)| {
        [
            x.verdict.coldest - y.verdict.coldest,
            x.verdict.warmest - y.verdict.warmest,
        ]
    });
    let zones = a
        .zones
        .iter()
        .zip(&b.zones)
        .map(|(x, y)| x.rms_simulated - y.rms_simulated);
    items.chain(zones).fold(
        0.0f64,
        |acc, v| {
            if v.is_nan() { acc } else { acc.max(v.abs()) }
        },
    )
}

fn band_rms(e: &Evaluation) -> f64 {
    rms(e.error_simulated.iter().copied().filter(|v| v.is_finite()))
}

/// The per-cell values the verdicts are judged on: the bounds when there are any, else the coldest
/// and hottest points after standing.
fn judged_bounds(e: &Evaluation) -> (Vec<f64>, Vec<f64>) {
    match &e.bounds {
        Some(b) => (b.lower.clone(), b.upper.clone()),
        None => (
            e.course.after_standing.clone(),
            e.course.hottest_after_standing.clone(),
        ),
    }
}

/// The largest distance of an item's judged point beyond its temperature limit, K (0 if none).
fn safety_gap(e: &Evaluation) -> f64 {
    e.items
        .iter()
        .map(|it| (-it.verdict.margin).max(0.0))
        .fold(0.0, |a, v| if v.is_nan() { f64::NAN } else { a.max(v) })
}

/// The largest safety gap on the plan's oven and the others it must hold on.
fn worst_gap(e: &Evaluation, others: &[Evaluation]) -> f64 {
    others.iter().map(safety_gap).fold(
        safety_gap(e),
        |a, v| if v.is_nan() { f64::NAN } else { a.max(v) },
    )
}

/// Lower is better, compared in order. For the safe minimum an item fails if it fails on any of
/// the ovens its limits hold on.
fn score(e: &Evaluation, others: &[Evaluation], safe: bool) -> [f64; 4] {
    if safe {
        let failing = (0..e.items.len())
            .filter(|&k| {
                !e.items[k].verdict.safe || others.iter().any(|o| !o.items[k].verdict.safe)
            })
            .count() as f64;
        let gap = worst_gap(e, others);
        [
            failing,
            if gap.is_nan() { f64::INFINITY } else { gap },
            band_rms(e),
            e.total_s,
        ]
    } else {
        [band_rms(e), e.total_s, 0.0, 0.0]
    }
}

/// `a` beats `b` by more than rounding in the first entry that differs.
fn better(a: &[f64; 4], b: &[f64; 4]) -> bool {
    for (x, y) in a.iter().zip(b) {
        let tol = 1e-9 * (1.0 + y.abs());
        if x.is_nan() {
            return false;
        }
        if *x < y - tol {
            return true;
        }
        if *x > y + tol {
            return false;
        }
    }
    false
}
