//! The problem's data: heating rates and the per-solve specification (bands, weights, limits).

use crate::error::{Field, InputError};
use nalgebra::DMatrix;

/// Heating rates A: one row per cell, one column per configuration, in K/s, all finite and ≥ 0.
///
/// Stored column-major, so a configuration's map is contiguous.
#[derive(Clone, Debug, PartialEq)]
pub struct Rates {
    matrix: DMatrix<f64>,
}

impl Rates {
    /// Builds rates from row-major data (`cells` rows of `configs` values).
    pub fn from_row_major(cells: usize, configs: usize, data: &[f64]) -> Result<Self, InputError> {
        check_size(cells, configs)?;
        if data.len() != cells * configs {
            return Err(InputError::Dimension {
                field: Field::Rates,
                expected: cells * configs,
                found: data.len(),
            });
        }
        Self::from_matrix(DMatrix::from_row_slice(cells, configs, data))
    }

    /// Builds rates from one map per configuration (each `cells` long).
    pub fn from_columns(cells: usize, columns: &[Vec<f64>]) -> Result<Self, InputError> {
        check_size(cells, columns.len())?;
        for col in columns {
            if col.len() != cells {
                return Err(InputError::Dimension {
                    field: Field::Rates,
                    expected: cells,
                    found: col.len(),
                });
            }
        }
        let matrix = DMatrix::from_fn(cells, columns.len(), |i, j| columns[j][i]);
        Self::from_matrix(matrix)
    }

    /// Wraps a matrix after checking every entry.
    pub fn from_matrix(matrix: DMatrix<f64>) -> Result<Self, InputError> {
        check_size(matrix.nrows(), matrix.ncols())?;
        for j in 0..matrix.ncols() {
            for i in 0..matrix.nrows() {
                check_rate(i, j, matrix[(i, j)])?;
            }
        }
        Ok(Rates { matrix })
    }

    /// Number of cells (rows).
    pub fn cells(&self) -> usize {
        self.matrix.nrows()
    }

    /// Number of configurations (columns).
    pub fn configs(&self) -> usize {
        self.matrix.ncols()
    }

    /// The rate matrix.
    pub fn matrix(&self) -> &DMatrix<f64> {
        &self.matrix
    }

    /// Rate of `cell` under configuration `config`.
    pub fn get(&self, cell: usize, config: usize) -> f64 {
        self.matrix[(cell, config)]
    }

    /// Replaces one cell's row after checking it; returns the old row.
    pub(crate) fn replace_row(&mut self, cell: usize, row: &[f64]) -> Vec<f64> {
        let old = (0..self.configs())
            .map(|j| self.matrix[(cell, j)])
            .collect();
        for (j, &v) in row.iter().enumerate() {
            self.matrix[(cell, j)] = v;
        }
        old
    }

    /// Linear prediction A·x for every cell. Column by column over the contiguous maps, skipping
    /// the configurations with no dwell: schedules use few of them, so this is several times less
    /// work than the dense product.
    pub fn apply(&self, x: &[f64]) -> Vec<f64> {
        let mut z = vec![0.0; self.cells()];
        self.apply_into(&mut [(x, &mut z)]);
        z
    }

    /// (A·x, A·y) in one pass over the matrix: the memory traffic of one product.
    pub(crate) fn apply_pair(&self, x: &[f64], y: &[f64]) -> (Vec<f64>, Vec<f64>) {
        let m = self.cells();
        let (mut ax, mut ay) = (vec![0.0; m], vec![0.0; m]);
        self.apply_into(&mut [(x, &mut ax), (y, &mut ay)]);
        (ax, ay)
    }

    /// out += A·v for each (v, out), column by column over the configurations some v uses.
    fn apply_into(&self, products: &mut [(&[f64], &mut Vec<f64>)]) {
        let (m, n) = (self.cells(), self.configs());
        let data = self.matrix.as_slice();
        let used: Vec<usize> = (0..n)
            .filter(|&j| products.iter().any(|(v, _)| v[j] != 0.0))
            .collect();
        // Row blocks small enough that the blocks of the outputs stay in the first-level cache
        // while every used column passes over them.
        const BLOCK: usize = 256;
        for start in (0..m).step_by(BLOCK) {
            let end = (start + BLOCK).min(m);
            for &j in &used {
                let col = &data[j * m + start..j * m + end];
                for (v, out) in products.iter_mut() {
                    if v[j] != 0.0 {
                        axpy(&mut out[start..end], v[j], col);
                    }
                }
            }
        }
    }
}

/// z += s·a, the inner loop of every A·x.
fn axpy(z: &mut [f64], s: f64, a: &[f64]) {
    for (zi, ai) in z.iter_mut().zip(a) {
        *zi += ai * s;
    }
}

/// Smallest and largest magnitude of a non-zero number the solver takes (rates, band edges,
/// weights, limits, budget, μ, λ). Inside this range every product the method forms (Gram entries,
/// squared residuals, gradients) stays a normal floating-point number; outside it, a certificate
/// could not be trusted, so such input is refused rather than solved wrongly.
pub const MAGNITUDE_RANGE: (f64, f64) = (1e-100, 1e100);

/// Most configurations (columns) a problem may have: bounds the n×n Gram matrix (2 MiB).
pub const MAX_CONFIGS: usize = 512;
/// Most cells (rows) a problem may have: a 128 × 128 tray, as plans allow. With
/// [`MAX_CONFIGS`] the rate matrix is at most 64 MiB.
pub const MAX_CELLS: usize = 16_384;

/// True when `v` is zero or its magnitude is inside [`MAGNITUDE_RANGE`] (infinities are the
/// caller's business).
pub(crate) fn in_magnitude(v: f64) -> bool {
    let a = v.abs();
    // Non-short-circuit `|`/`&`: no branches in the validation sweep.
    (a == 0.0) | (a == f64::INFINITY) | ((a >= MAGNITUDE_RANGE.0) & (a <= MAGNITUDE_RANGE.1))
}

fn out_of_range(
    field: Field,
    index: Option<usize>,
    config: Option<usize>,
    value: f64,
) -> InputError {
    InputError::Magnitude {
        field,
        index,
        config,
        value,
    }
}

/// Checks the problem's shape against [`MAX_CELLS`] and [`MAX_CONFIGS`] before anything is allocated.
pub fn check_size(cells: usize, configs: usize) -> Result<(), InputError> {
    if cells > MAX_CELLS || configs > MAX_CONFIGS {
        return Err(InputError::TooLarge { cells, configs });
    }
    Ok(())
}

pub(crate) fn check_rate(cell: usize, config: usize, v: f64) -> Result<(), InputError> {
    if !v.is_finite() {
        return Err(InputError::NotFinite {
            field: Field::Rates,
            index: Some(cell),
            config: Some(config),
            value: v,
        });
    }
    if v < 0.0 {
        return Err(InputError::NegativeRate {
            cell,
            config,
            value: v,
        });
    }
    if !in_magnitude(v) {
        return Err(out_of_range(Field::Rates, Some(cell), Some(config), v));
    }
    Ok(())
}

/// What one solve must achieve and respect.
///
/// Objective: Σ wᵢ·dist(aᵢᵀx, [loᵢ, hiᵢ])² + μ·Σx + λ·‖x‖², subject to 0 ≤ x ≤ u and Σx ≤ T.
/// A point target has lo = hi; lo = −∞ means "at most hi", hi = +∞ "at least lo".
#[derive(Clone, Debug, PartialEq)]
pub struct Spec {
    /// Band minimum per cell (temperature rise, K); may be −∞.
    pub lo: Vec<f64>,
    /// Band maximum per cell (K); may be +∞.
    pub hi: Vec<f64>,
    /// Weight per cell, > 0.
    pub weights: Vec<f64>,
    /// Dwell limit per configuration (s), ≥ 0, may be +∞.
    pub upper: Vec<f64>,
    /// Total time budget T (s), if any.
    pub budget: Option<f64>,
    /// μ ≥ 0: cost per second of dwell, preferring shorter schedules.
    pub time_penalty: f64,
    /// λ ≥ 0: small conditioning term on ‖x‖².
    pub ridge: f64,
}

impl Spec {
    /// Point targets (lo = hi = y), unit weights, no limits.
    pub fn point(targets: &[f64], configs: usize) -> Self {
        Self::band(targets.to_vec(), targets.to_vec(), configs)
    }

    /// Band targets, unit weights, no limits.
    pub fn band(lo: Vec<f64>, hi: Vec<f64>, configs: usize) -> Self {
        let m = lo.len();
        Spec {
            lo,
            hi,
            weights: vec![1.0; m],
            upper: vec![f64::INFINITY; configs],
            budget: None,
            time_penalty: 0.0,
            ridge: 0.0,
        }
    }

    /// Checks the specification against the rate matrix's shape.
    pub fn validate(&self, cells: usize, configs: usize) -> Result<(), InputError> {
        self.validate_dims(cells, configs)?;
        self.validate_cells(0..cells)?;
        self.validate_rest()
    }

    /// [`Spec::validate`] for a specification that differs from one already validated (same sizes)
    /// only in `changed` cells, and in the per-configuration and scalar settings: the warm
    /// path, where a brush stroke changes a cell or two of thousands.
    pub(crate) fn validate_changed(
        &self,
        cells: usize,
        configs: usize,
        changed: impl Iterator<Item = usize>,
    ) -> Result<(), InputError> {
        self.validate_dims(cells, configs)?;
        self.validate_cells(changed)?;
        self.validate_rest()
    }

    fn validate_dims(&self, cells: usize, configs: usize) -> Result<(), InputError> {
        let dims = [
            (Field::Lower, self.lo.len(), cells),
            (Field::Upper, self.hi.len(), cells),
            (Field::Weights, self.weights.len(), cells),
            (Field::Limits, self.upper.len(), configs),
        ];
        for (field, found, expected) in dims {
            if found != expected {
                return Err(InputError::Dimension {
                    field,
                    expected,
                    found,
                });
            }
        }
        Ok(())
    }

    fn validate_cells(&self, which: impl Iterator<Item = usize>) -> Result<(), InputError> {
        for i in which {
            let (lo, hi, w) = (self.lo[i], self.hi[i], self.weights[i]);
            if lo.is_nan() || lo == f64::INFINITY {
                return Err(not_finite(Field::Lower, Some(i), lo));
            }
            if hi.is_nan() || hi == f64::NEG_INFINITY {
                return Err(not_finite(Field::Upper, Some(i), hi));
            }
            if lo > hi {
                return Err(InputError::BandInverted { cell: i, lo, hi });
            }
            if !w.is_finite() {
                return Err(not_finite(Field::Weights, Some(i), w));
            }
            if w <= 0.0 {
                return Err(InputError::NonPositiveWeight { cell: i, value: w });
            }
            for (field, v) in [(Field::Lower, lo), (Field::Upper, hi), (Field::Weights, w)] {
                if !in_magnitude(v) {
                    return Err(out_of_range(field, Some(i), None, v));
                }
            }
        }
        Ok(())
    }

    fn validate_rest(&self) -> Result<(), InputError> {
        for (j, &u) in self.upper.iter().enumerate() {
            if u.is_nan() {
                return Err(not_finite(Field::Limits, Some(j), u));
            }
            if u < 0.0 {
                return Err(InputError::Negative {
                    field: Field::Limits,
                    index: Some(j),
                    value: u,
                });
            }
            if !in_magnitude(u) {
                return Err(out_of_range(Field::Limits, Some(j), None, u));
            }
        }
        if let Some(t) = self.budget {
            non_negative_scalar(Field::Budget, t, true)?;
        }
        non_negative_scalar(Field::TimePenalty, self.time_penalty, false)?;
        non_negative_scalar(Field::Ridge, self.ridge, false)?;
        Ok(())
    }

    /// The budget as a number (+∞ when absent).
    pub(crate) fn budget_or_inf(&self) -> f64 {
        self.budget.unwrap_or(f64::INFINITY)
    }
}

fn not_finite(field: Field, index: Option<usize>, value: f64) -> InputError {
    InputError::NotFinite {
        field,
        index,
        config: None,
        value,
    }
}

fn non_negative_scalar(field: Field, v: f64, inf_ok: bool) -> Result<(), InputError> {
    if v.is_nan() || (!inf_ok && v.is_infinite()) {
        return Err(not_finite(field, None, v));
    }
    if v < 0.0 {
        return Err(InputError::Negative {
            field,
            index: None,
            value: v,
        });
    }
    if !in_magnitude(v) {
        return Err(out_of_range(field, None, None, v));
    }
    Ok(())
}

/// Signed distance of `z` outside `[lo, hi]`: negative below, positive above, zero inside; NaN
/// when `z` is not a number (never counted as inside).
pub fn band_distance(z: f64, lo: f64, hi: f64) -> f64 {
    if z.is_nan() {
        f64::NAN
    } else if z < lo {
        z - lo
    } else if z > hi {
        z - hi
    } else {
        0.0
    }
}

/// The true objective for a prediction `z` and dwell `x`.
pub fn objective(spec: &Spec, z: &[f64], x: &[f64]) -> f64 {
    let fit: f64 = z
        .iter()
        .enumerate()
        .map(|(i, &zi)| {
            let d = band_distance(zi, spec.lo[i], spec.hi[i]);
            spec.weights[i] * d * d
        })
        .sum();
    let total: f64 = x.iter().sum();
    let sq: f64 = x.iter().map(|v| v * v).sum();
    fit + spec.time_penalty * total + spec.ridge * sq
}
