//! Typed input errors: every rejection names what is wrong and where.

use std::fmt;

/// Which input a [`InputError`] is about.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Field {
    /// The heating-rate matrix (cells × configurations, K/s).
    Rates,
    /// Lower band edges, one per cell.
    Lower,
    /// Upper band edges, one per cell.
    Upper,
    /// Weights, one per cell.
    Weights,
    /// Per-configuration dwell limits (seconds).
    Limits,
    /// The total time budget (seconds).
    Budget,
    /// The preference for shorter schedules (μ).
    TimePenalty,
    /// The conditioning term (λ).
    Ridge,
    /// Cell indices given to an update.
    CellIndex,
}

impl fmt::Display for Field {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Field::Rates => "heating rates",
            Field::Lower => "band minimum",
            Field::Upper => "band maximum",
            Field::Weights => "weight",
            Field::Limits => "dwell limit",
            Field::Budget => "time budget",
            Field::TimePenalty => "time penalty",
            Field::Ridge => "ridge",
            Field::CellIndex => "cell index",
        })
    }
}

/// A rejected input. Positions are zero-based cell (row) and configuration (column) indices.
#[derive(Clone, Debug, PartialEq)]
pub enum InputError {
    /// A value is NaN, or infinite where infinity has no meaning.
    NotFinite {
        /// The input holding the value.
        field: Field,
        /// Cell index (or configuration index for limits), if the field is a vector or matrix.
        index: Option<usize>,
        /// Configuration index, for the rate matrix.
        config: Option<usize>,
        /// The offending value.
        value: f64,
    },
    /// A heating rate below zero.
    NegativeRate {
        /// Cell index.
        cell: usize,
        /// Configuration index.
        config: usize,
        /// The offending value (K/s).
        value: f64,
    },
    /// A band whose minimum exceeds its maximum.
    BandInverted {
        /// Cell index.
        cell: usize,
        /// Band minimum.
        lo: f64,
        /// Band maximum.
        hi: f64,
    },
    /// A weight that is zero or negative.
    NonPositiveWeight {
        /// Cell index.
        cell: usize,
        /// The offending value.
        value: f64,
    },
    /// A quantity that must be at least zero is negative.
    Negative {
        /// The input holding the value.
        field: Field,
        /// Index, if the field is a vector.
        index: Option<usize>,
        /// The offending value.
        value: f64,
    },
    /// Two inputs disagree in size.
    Dimension {
        /// The input with the wrong length.
        field: Field,
        /// The length it should have.
        expected: usize,
        /// The length it has.
        found: usize,
    },
    /// A non-zero value whose magnitude is outside [`crate::MAGNITUDE_RANGE`].
    Magnitude {
        /// The input holding the value.
        field: Field,
        /// Cell index (or configuration index for limits), if the field is a vector or matrix.
        index: Option<usize>,
        /// Configuration index, for the rate matrix.
        config: Option<usize>,
        /// The offending value.
        value: f64,
    },
    /// A problem with more cells or configurations than [`crate::MAX_CELLS`] and
    /// [`crate::MAX_CONFIGS`] allow.
    TooLarge {
        /// Cells (rows) given.
        cells: usize,
        /// Configurations (columns) given.
        configs: usize,
    },
    /// A cell index past the end of the tray.
    OutOfRange {
        /// The input holding the index.
        field: Field,
        /// The index given.
        index: usize,
        /// The number of cells.
        len: usize,
    },
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            InputError::NotFinite {
                field,
                index,
                config,
                value,
            } => {
                write!(f, "{field} is {value}, which is not allowed")?;
                if let Some(i) = index {
                    write!(f, " (at index {i}")?;
                    if let Some(j) = config {
                        write!(f, ", configuration {j}")?;
                    }
                    f.write_str(")")?;
                }
                Ok(())
            }
            InputError::NegativeRate {
                cell,
                config,
                value,
            } => write!(
                f,
                "heating rate {value} K/s at cell {cell}, configuration {config} is negative; rates must be ≥ 0"
            ),
            InputError::BandInverted { cell, lo, hi } => {
                write!(f, "band at cell {cell} has minimum {lo} above maximum {hi}")
            }
            InputError::NonPositiveWeight { cell, value } => {
                write!(f, "weight {value} at cell {cell} must be greater than 0")
            }
            InputError::Negative {
                field,
                index,
                value,
            } => match index {
                Some(i) => write!(f, "{field} {value} at index {i} must be ≥ 0"),
                None => write!(f, "{field} {value} must be ≥ 0"),
            },
            InputError::Dimension {
                field,
                expected,
                found,
            } => write!(f, "{field} has {found} entries, expected {expected}"),
            InputError::Magnitude {
                field,
                index,
                config,
                value,
            } => {
                let (lo, hi) = crate::MAGNITUDE_RANGE;
                write!(f, "{field} {value:e}")?;
                if let Some(i) = index {
                    write!(f, " at index {i}")?;
                    if let Some(j) = config {
                        write!(f, ", configuration {j}")?;
                    }
                }
                write!(
                    f,
                    " is out of range: non-zero values must lie between {lo:e} and {hi:e} in magnitude (rescale the units)"
                )
            }
            InputError::TooLarge { cells, configs } => write!(
                f,
                "{cells} cells × {configs} configurations is too large: at most {} cells and {} configurations",
                crate::MAX_CELLS,
                crate::MAX_CONFIGS
            ),
            InputError::OutOfRange { field, index, len } => {
                write!(f, "{field} {index} is out of range (there are {len})")
            }
        }
    }
}

impl std::error::Error for InputError {}
