//! Our CSV files' shared shape: `# key: value` comment lines (anywhere), a header row, records;
//! every record carries the line number it came from in the original text.

use crate::error::PlanError;

/// A CSV text split into its comment metadata and its table.
pub(crate) struct Sheet {
    /// `# key: value` lines: (line number, key, value), in order.
    pub meta: Vec<(usize, String, String)>,
    /// Comment lines without a colon: (line number, text after '#', trimmed).
    pub tags: Vec<(usize, String)>,
    /// Line number of the header row (0 when there is none).
    pub header_line: usize,
    /// The header row's fields, trimmed.
    pub header: Vec<String>,
    /// Records: (line number, trimmed fields).
    pub records: Vec<(usize, Vec<String>)>,
}

impl Sheet {
    /// Splits `text`; the error names the line of a malformed record.
    pub fn parse(text: &str) -> Result<Sheet, PlanError> {
        let mut meta = Vec::new();
        let mut tags = Vec::new();
        let mut body = String::new();
        let mut origin = Vec::new();
        for (k, line) in text.lines().enumerate() {
            let lineno = k + 1;
            if let Some(rest) = line.trim_start().strip_prefix('#') {
                let rest = rest.trim();
                match rest.split_once(':') {
                    Some((key, value)) => {
                        meta.push((lineno, key.trim().to_string(), value.trim().to_string()))
                    }
                    None => tags.push((lineno, rest.to_string())),
                }
                continue;
            }
            if line.trim().is_empty() {
                continue;
            }
            body.push_str(line);
            body.push('\n');
            origin.push(lineno);
        }
        let at = |body_line: u64| {
            origin
                .get((body_line as usize).saturating_sub(1))
                .copied()
                .unwrap_or(0)
        };
        let mut reader = csv::ReaderBuilder::new()
            .trim(csv::Trim::All)
            .has_headers(false)
            .flexible(true)
            .from_reader(body.as_bytes());
        let mut rows = Vec::new();
        for rec in reader.records() {
            let rec = rec.map_err(|e| {
                PlanError::new(
                    format!("line {}", e.position().map_or(0, |p| at(p.line()))),
                    e.to_string(),
                )
            })?;
            let line = rec.position().map_or(0, |p| at(p.line()));
            rows.push((line, rec.iter().map(str::to_string).collect::<Vec<_>>()));
        }
        let mut rows = rows.into_iter();
        let (header_line, header) = rows.next().unwrap_or((0, Vec::new()));
        Ok(Sheet {
            meta,
            tags,
            header_line,
            header,
            records: rows.collect(),
        })
    }

    /// The value of `# key: …` and its line, if present (the last one wins).
    pub fn meta(&self, key: &str) -> Option<(usize, &str)> {
        self.meta
            .iter()
            .rev()
            .find(|(_, k, _)| k == key)
            .map(|(l, _, v)| (*l, v.as_str()))
    }

    /// Checks the `# <format> N` tag: absent is accepted, another version is refused.
    pub fn check_format(&self, format: &str, version: &str) -> Result<(), PlanError> {
        for (line, tag) in &self.tags {
            if let Some(rest) = tag.strip_prefix(format)
                && rest.trim() != version
            {
                return Err(PlanError::new(
                    format!("line {line}"),
                    format!(
                        "format '{tag}' is not supported (this version reads '{format} {version}')"
                    ),
                ));
            }
        }
        Ok(())
    }
}

/// "line N" as an error place.
pub(crate) fn at_line(line: usize, message: impl Into<String>) -> PlanError {
    PlanError::new(format!("line {line}"), message)
}
