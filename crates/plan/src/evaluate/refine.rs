//! Refinement: re-solve with each targeted cell's rates scaled by the gain the simulation showed
//! (simulated rise ÷ linear rise at the end of heating), up to three passes, keeping the best.

use super::Evaluator;
use super::prepared::Prepared;
use super::problem::rms;
use super::report::{Evaluation, Refinement};
use crate::error::PlanError;
use crate::model::Plan;

impl Evaluator {
    /// Refines `eval` in place (see the module docs); records what the refinement achieved.
    pub(super) fn refine(
        &mut self,
        plan: &Plan,
        prep: &Prepared,
        eval: &mut Evaluation,
    ) -> Result<(), PlanError> {
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
            let base = &best.1.as_ref().unwrap_or(eval).course;
            let lin = &best.1.as_ref().unwrap_or(eval).linear;
            for i in 0..plan.tray.cells() {
                if let Some(k) = plan.item_at(i) {
                    let s0 = plan.items[k].start_c;
                    let (sim_rise, lin_rise) = (base.end_of_heating[i] - s0, lin[i] - s0);
                    if lin_rise > 1.0 {
                        gains[i] = (gains[i] * sim_rise / lin_rise).clamp(0.05, 20.0);
                    }
                }
            }
            let sol = self.solve(plan, prep, Some(&gains))?;
            let candidate = self.finish(plan, prep, &sol, Some(&gains))?;
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
            *eval = better;
        }
        eval.refinement = Some(Refinement {
            rms_before: before,
            rms_after: best.0,
            kept,
        });
        Ok(())
    }
}
