//! Reading plain numeric CSV files (no header) with errors that point at line and column.

use crate::error::CliError;
use std::path::Path;

/// What a number in a file may be.
#[derive(Clone, Copy)]
pub enum Allow {
    /// Finite values only.
    Finite,
    /// Finite or ±inf (written `inf`, `-inf`).
    Infinite,
}

/// Reads `path` as rows of comma-separated numbers; every row must have the same length.
pub fn read_matrix(path: &Path, allow: Allow) -> Result<(usize, Vec<f64>), CliError> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| CliError::at(path, 0, 0, format!("cannot read: {e}")))?;
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
