//! The plan crate's error: a message a person can act on, and where the problem is.

use std::fmt;

/// A rejected plan, library, link or file, with the place it concerns.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanError {
    /// Where: a field path ("zones[1].min_c"), a line ("line 14"), or "link".
    pub place: String,
    /// What is wrong and, where possible, what to do.
    pub message: String,
}

impl PlanError {
    /// An error at `place`.
    pub fn new(place: impl Into<String>, message: impl Into<String>) -> Self {
        PlanError {
            place: place.into(),
            message: message.into(),
        }
    }
}

/// Refuses a text longer than `max` bytes before anything is parsed from it.
pub(crate) fn check_length(what: &str, text: &str, max: usize) -> Result<(), PlanError> {
    if text.len() > max {
        return Err(PlanError::new(
            "size",
            format!(
                "the text is {} bytes; a {what} may be at most {max} bytes ({} MiB)",
                text.len(),
                max >> 20
            ),
        ));
    }
    Ok(())
}

impl fmt::Display for PlanError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.place, self.message)
    }
}

impl std::error::Error for PlanError {}

impl From<traycast_thermal::ThermalError> for PlanError {
    fn from(e: traycast_thermal::ThermalError) -> Self {
        PlanError::new("thermal model", e.to_string())
    }
}

impl From<traycast_solver::InputError> for PlanError {
    fn from(e: traycast_solver::InputError) -> Self {
        PlanError::new("solver", e.to_string())
    }
}
