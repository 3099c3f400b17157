//! What a solve returns: dwell seconds, achieved values, status and diagnostics.

/// How a solve ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Status {
    /// The exact optimum; the budget (if any) is slack.
    Optimal,
    /// The exact optimum with the time budget binding: more time would lower the objective.
    BudgetBinding,
    /// The iteration limit was reached; `dwell` is the best feasible point found.
    IterationLimit,
    /// The solve ended, but its optimality certificate (the KKT residual) is above
    /// [`crate::CERTIFY_TOL`]: `dwell` is feasible but not proven optimal. Rounding on badly scaled
    /// data is the usual cause.
    Uncertified,
}

impl Status {
    /// Lower-case name used in machine-readable output.
    pub fn as_str(self) -> &'static str {
        match self {
            Status::Optimal => "optimal",
            Status::BudgetBinding => "budget_binding",
            Status::IterationLimit => "iteration_limit",
            Status::Uncertified => "uncertified",
        }
    }
}

/// Iteration counts of the nested methods.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Iterations {
    /// Active-set changes (variables freed or bound) in the box-constrained inner solves.
    pub active_set: usize,
    /// Finite-Newton passes re-classifying cells against their bands.
    pub newton: usize,
    /// Budget-multiplier evaluations.
    pub budget: usize,
}

impl Iterations {
    /// All iterations together.
    pub fn total(&self) -> usize {
        self.active_set + self.newton + self.budget
    }
}

/// The answer of one solve.
#[derive(Clone, Debug, PartialEq)]
pub struct Solution {
    /// Seconds per configuration, 0 ≤ xⱼ ≤ uⱼ.
    pub dwell: Vec<f64>,
    /// The objective Σ wᵢ·dist² + μ·Σx + λ·‖x‖².
    pub objective: f64,
    /// Achieved value per cell, A·x (K of rise).
    pub achieved: Vec<f64>,
    /// Signed distance outside the band per cell (negative below, positive above, 0 inside).
    pub band_distance: Vec<f64>,
    /// How the solve ended.
    pub status: Status,
    /// Objective decrease per extra second of budget (0 if the budget is slack or absent).
    pub budget_multiplier: f64,
    /// Iteration counts.
    pub iterations: Iterations,
    /// Relative KKT residual (0 at the exact optimum; see [`crate::kkt`]).
    pub kkt_residual: f64,
}

impl Solution {
    /// Total dwell time Σx (s).
    pub fn total_time(&self) -> f64 {
        self.dwell.iter().sum()
    }
}
