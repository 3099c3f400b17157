//! Typed errors for thermal inputs: what is wrong and where.

use std::fmt;

/// A rejected thermal input.
#[derive(Clone, Debug, PartialEq)]
pub enum ThermalError {
    /// A mass fraction is negative or not finite.
    BadFraction {
        /// Which component.
        component: &'static str,
        /// The value given.
        value: f64,
    },
    /// Mass fractions do not add up to 1 within tolerance.
    FractionSum {
        /// Their sum.
        sum: f64,
    },
    /// A numeric setting is out of range or not finite.
    OutOfRange {
        /// What the setting is.
        what: &'static str,
        /// The value given.
        value: f64,
        /// What is allowed.
        allowed: &'static str,
    },
    /// A cell-level input is wrong.
    Cell {
        /// Cell index (row-major).
        cell: usize,
        /// What is wrong.
        problem: String,
    },
    /// A schedule step names a configuration that has no heating map.
    UnknownConfiguration {
        /// Step index in the schedule.
        step: usize,
        /// The configuration it names.
        config: usize,
        /// How many configurations there are.
        configs: usize,
    },
    /// The simulation reached a state that is not a finite number (a model limit was passed).
    Diverged {
        /// Cell index (row-major).
        cell: usize,
        /// Simulated time when it happened, s.
        time_s: f64,
    },
    /// Two inputs disagree in size.
    Dimension {
        /// What has the wrong size.
        what: &'static str,
        /// Expected size.
        expected: usize,
        /// Size given.
        found: usize,
    },
}

impl fmt::Display for ThermalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ThermalError::BadFraction { component, value } => {
                write!(
                    f,
                    "{component} fraction {value} must be a number between 0 and 1"
                )
            }
            ThermalError::FractionSum { sum } => write!(
                f,
                "mass fractions add up to {sum:.4}; they must add up to 1 (±0.02)"
            ),
            ThermalError::OutOfRange {
                what,
                value,
                allowed,
            } => write!(f, "{what} is {value}; allowed: {allowed}"),
            ThermalError::Cell { cell, problem } => write!(f, "cell {cell}: {problem}"),
            ThermalError::UnknownConfiguration {
                step,
                config,
                configs,
            } => write!(
                f,
                "schedule step {step} names configuration {config}, but there are only {configs}"
            ),
            ThermalError::Dimension {
                what,
                expected,
                found,
            } => write!(f, "{what} has {found} entries, expected {expected}"),
            ThermalError::Diverged { cell, time_s } => write!(
                f,
                "cell {cell}: the simulated temperature stopped being a number at {time_s:.1} s; the plan drives the food past what the model covers (reduce the power, the time or the thickness)"
            ),
        }
    }
}

impl std::error::Error for ThermalError {}

/// Checks a finite value lies in [lo, hi].
pub(crate) fn in_range(
    what: &'static str,
    value: f64,
    lo: f64,
    hi: f64,
    allowed: &'static str,
) -> Result<f64, ThermalError> {
    if value.is_finite() && value >= lo && value <= hi {
        Ok(value)
    } else {
        Err(ThermalError::OutOfRange {
            what,
            value,
            allowed,
        })
    }
}
