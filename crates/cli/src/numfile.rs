//! Reading plain numeric CSV files (no header) with errors that point at line and column.

use crate::error::CliError;
use std::path::Path;
use traycast_solver::{MAX_CELLS, MAX_CONFIGS};

/// What a number in a file may be.
#[derive(Clone, Copy)]
pub enum Allow {
    /// Finite values only.
    Finite,
    /// Finite or ±inf (written `inf`, `-inf`).
    Infinite,
}

/// Longest numeric file read, bytes.
pub const MAX_BYTES: usize = 64 << 20;

/// Reads `path` as rows of comma-separated numbers; every row must have the same length. At most
/// [`MAX_CELLS`] rows of [`MAX_CONFIGS`] numbers: the solver's limits, checked while reading so a
/// hostile file never makes the matrix.
pub fn read_matrix(path: &Path, allow: Allow) -> Result<(usize, Vec<f64>), CliError> {
    let text = crate::plans::read_at_most(path, MAX_BYTES)?;
    let mut rows = 0usize;
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let mut width: Option<usize> = None;
    let mut data = Vec::new();
    for record in reader.records() {
        let record = record.map_err(|e| {
            let line = e.position().map_or(0, |p| p.line() as usize);
            CliError::at(path, line, 0, format!("not valid CSV: {e}"))
        })?;
        let line = record.position().map_or(0, |p| p.line() as usize);
        if record.iter().all(|f| f.is_empty()) {
            continue;
        }
        rows += 1;
        if record.len() > MAX_CONFIGS {
            return Err(CliError::at(
                path,
                line,
                0,
                format!(
                    "has {} values; at most {MAX_CONFIGS} (configurations) are allowed",
                    record.len()
                ),
            ));
        }
        if rows > MAX_CELLS {
            return Err(CliError::at(
                path,
                line,
                0,
                format!("more than {MAX_CELLS} lines (cells) are not allowed"),
            ));
        }
        match width {
            None => width = Some(record.len()),
            Some(w) if w != record.len() => {
                return Err(CliError::at(
                    path,
                    line,
                    0,
                    format!("has {} values, earlier lines have {w}", record.len()),
                ));
            }
            _ => {}
        }
        for (c, field) in record.iter().enumerate() {
            data.push(parse(field, allow).map_err(|m| CliError::at(path, line, c + 1, m))?);
        }
    }
    let width = width.ok_or_else(|| CliError::at(path, 0, 0, "is empty"))?;
    Ok((width, data))
}

/// Reads `path` as one number per line.
pub fn read_vector(path: &Path, allow: Allow) -> Result<Vec<f64>, CliError> {
    let (width, data) = read_matrix(path, allow)?;
    if width != 1 {
        return Err(CliError::at(
            path,
            1,
            0,
            format!("should hold one number per line, found {width}"),
        ));
    }
    Ok(data)
}

fn parse(field: &str, allow: Allow) -> Result<f64, String> {
    let v: f64 = match field.to_ascii_lowercase().as_str() {
        "inf" | "+inf" | "infinity" => f64::INFINITY,
        "-inf" | "-infinity" => f64::NEG_INFINITY,
        s => s
            .parse()
            .map_err(|_| format!("'{field}' is not a number"))?,
    };
    if v.is_nan() {
        return Err(format!("'{field}' is not a number"));
    }
    if v.is_infinite() && matches!(allow, Allow::Finite) {
        return Err(format!("'{field}' must be finite here"));
    }
    Ok(v)
}
