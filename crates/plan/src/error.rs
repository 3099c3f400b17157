//! The plan crate's error: a message a person can act on, and a typed place it concerns.

use std::fmt;

/// Where a problem is: what a front end needs to point at it (a field to highlight, a line to show).
#[derive(Clone, Debug, PartialEq)]
pub enum Place {
    /// A field of a plan or library by its path ("zones[1].max_c", "oven.configs", "maps",
    /// "load 'lunch' layout row 3").
    Field(String),
    /// A line of a text file, 1-based, with the column when known (1-based).
    Line {
        /// Line number.
        line: usize,
        /// Column, when known.
        column: Option<usize>,
    },
    /// A share link, with the place inside the decoded plan when the problem is there.
    Link(Option<Box<Place>>),
    /// A cell of the tray.
    Cell {
        /// Row, 0-based.
        row: usize,
        /// Column, 0-based.
        col: usize,
    },
    /// The dwell solver's input.
    Solver {
        /// Which input.
        field: traycast_solver::Field,
        /// The cell (row of the problem) or configuration index, when one is concerned.
        index: Option<usize>,
    },
    /// The thermal model's input, with the cell index when one is concerned.
    Thermal(Option<usize>),
    /// The size of the whole text.
    Size,
}

impl Place {
    /// Line `line` of a text (no column).
    pub fn line(line: usize) -> Self {
        Place::Line { line, column: None }
    }

    /// The line this place is on, if it is a line of a file.
    pub fn line_number(&self) -> Option<(usize, Option<usize>)> {
        match self {
            Place::Line { line, column } => Some((*line, *column)),
            _ => None,
        }
    }
}

impl From<&str> for Place {
    fn from(path: &str) -> Self {
        Place::Field(path.to_string())
    }
}

impl From<String> for Place {
    fn from(path: String) -> Self {
        Place::Field(path)
    }
}

impl fmt::Display for Place {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Place::Field(path) => f.write_str(path),
            Place::Line { line, column: None } => write!(f, "line {line}"),
            Place::Line {
                line,
                column: Some(c),
            } => write!(f, "line {line}, column {c}"),
            Place::Link(None) => f.write_str("link"),
            Place::Link(Some(inner)) => write!(f, "link: {inner}"),
            Place::Cell { row, col } => write!(f, "cell row {row}, col {col}"),
            Place::Solver { field, index: None } => write!(f, "solver: {field}"),
            Place::Solver {
                field,
                index: Some(i),
            } => write!(f, "solver: {field} [{i}]"),
            Place::Thermal(None) => f.write_str("thermal model"),
            Place::Thermal(Some(cell)) => write!(f, "thermal model, cell {cell}"),
            Place::Size => f.write_str("size"),
        }
    }
}

/// A rejected plan, library, link or file, with the place it concerns.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanError {
    /// Where the problem is.
    pub place: Place,
    /// What is wrong and, where possible, what to do.
    pub message: String,
}

impl PlanError {
    /// An error at `place` (a field path converts from text).
    pub fn new(place: impl Into<Place>, message: impl Into<String>) -> Self {
        PlanError {
            place: place.into(),
            message: message.into(),
        }
    }

    /// A JSON text that does not parse, at the line and column the parser names.
    pub(crate) fn json(e: serde_json::Error) -> Self {
        let place = Place::Line {
            line: e.line(),
            column: Some(e.column()),
        };
        PlanError::new(place, e.to_string())
    }
}

/// Refuses a text longer than `max` bytes before anything is parsed from it.
pub(crate) fn check_length(what: &str, text: &str, max: usize) -> Result<(), PlanError> {
    if text.len() > max {
        return Err(PlanError::new(
            Place::Size,
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
        use traycast_thermal::ThermalError;
        let cell = match &e {
            ThermalError::Cell { cell, .. } | ThermalError::Diverged { cell, .. } => Some(*cell),
            _ => None,
        };
        PlanError::new(Place::Thermal(cell), e.to_string())
    }
}

impl From<traycast_solver::InputError> for PlanError {
    fn from(e: traycast_solver::InputError) -> Self {
        use traycast_solver::{Field, InputError};
        let (field, index) = match &e {
            InputError::NotFinite { field, index, .. }
            | InputError::Magnitude { field, index, .. }
            | InputError::Negative { field, index, .. } => (*field, *index),
            InputError::NegativeRate { cell, .. } => (Field::Rates, Some(*cell)),
            InputError::BandInverted { cell, .. } => (Field::Lower, Some(*cell)),
            InputError::NonPositiveWeight { cell, .. } => (Field::Weights, Some(*cell)),
            InputError::Dimension { field, .. } => (*field, None),
            InputError::OutOfRange { field, index, .. } => (*field, Some(*index)),
            InputError::TooLarge { .. } => (Field::Rates, None),
        };
        PlanError::new(Place::Solver { field, index }, e.to_string())
    }
}
