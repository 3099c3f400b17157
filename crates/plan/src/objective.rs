//! What a plan's schedule is solved for: the objective and the scenarios it must hold in.
//!
//! - [`Objective::BandFit`] fits every zone's band in the least-squares sense (the first version's
//!   objective, and the default).
//! - [`Objective::SafeMinimum`] holds every cell of each hot item at its food-safety minimum after
//!   standing — at the lower bound when the maps carry errors or the plan allows for variation —
//!   and each chilled item at its maximum, as hard constraints, while the bands are fitted as well
//!   as possible. The simulation is in the loop: what it shows about each cell's coldest point
//!   moves that cell's floor until the outcome settles.
//! - [`Objective::Shortest`] is the least total time that holds every band as a hard constraint.
//! - [`Objective::MaxMargin`] is the largest common margin inside every band within the budget.
//!
//! With [`Planning::placement`], the hard rows must also hold with the food placed one cell off in
//! each direction (the maps read at the shifted cell): a schedule robust to how the tray is set
//! down. Oven power and start temperature variation and the maps' errors are already in the
//! bounds the safety floors are judged on.

use crate::error::PlanError;

/// What a plan's schedule optimises.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum Objective {
    /// Least-squares fit of the bands.
    #[default]
    BandFit,
    /// Every point of each item at its safety limit after standing, bands fitted as well as possible.
    SafeMinimum,
    /// Least total time holding every band.
    Shortest,
    /// Largest worst-case margin inside the bands within the budget.
    MaxMargin,
}

impl Objective {
    /// Every objective, in the order menus list them.
    pub const ALL: [Objective; 4] = [
        Objective::BandFit,
        Objective::SafeMinimum,
        Objective::Shortest,
        Objective::MaxMargin,
    ];

    /// The name used in files, links, JSON and the command line.
    pub fn as_str(self) -> &'static str {
        match self {
            Objective::BandFit => "band-fit",
            Objective::SafeMinimum => "safe-minimum",
            Objective::Shortest => "shortest",
            Objective::MaxMargin => "max-margin",
        }
    }

    /// A short description for menus and reports.
    pub fn words(self) -> &'static str {
        match self {
            Objective::BandFit => "fit the bands as well as possible",
            Objective::SafeMinimum => {
                "every point safe after standing (at the lower bound), bands fitted as well as possible"
            }
            Objective::Shortest => "shortest schedule that holds every band",
            Objective::MaxMargin => "largest margin inside every band within the budget",
        }
    }

    /// Reads [`Objective::as_str`]'s name; the error names `place`.
    pub fn parse(name: &str, place: &str) -> Result<Self, PlanError> {
        Objective::ALL
            .into_iter()
            .find(|o| o.as_str() == name)
            .ok_or_else(|| {
                let names: Vec<&str> = Objective::ALL.iter().map(|o| o.as_str()).collect();
                PlanError::new(
                    place,
                    format!("'{name}' is not an objective (one of {})", names.join(", ")),
                )
            })
    }

    /// Whether the objective has hard rows (every one but the band fit).
    pub fn is_constrained(self) -> bool {
        self != Objective::BandFit
    }
}

/// The objective and the scenarios its hard rows must hold in.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Planning {
    /// What the schedule optimises.
    pub objective: Objective,
    /// Hold the hard rows with the food placed one cell off in each direction as well.
    pub placement: bool,
}

impl Planning {
    /// Checks the combination: placement scenarios need hard rows to hold.
    pub fn validate(&self) -> Result<(), PlanError> {
        if self.placement && !self.objective.is_constrained() {
            return Err(PlanError::new(
                "planning.placement",
                "placement scenarios hold hard constraints, and the band fit has none: choose safe-minimum, shortest or max-margin",
            ));
        }
        Ok(())
    }
}
