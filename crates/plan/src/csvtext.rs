//! Our CSV files' shared shape: `# key: value` comment lines (anywhere), a header row, records;
//! every record carries the line number it came from in the original text.
//!
//! Records are streamed, never collected: reading a file costs memory for its metadata and one
//! record at a time, whatever its length, so a caller can bound what it keeps ([`MAX_COMMENTS`]
//! bounds the metadata).

use crate::error::{Place, PlanError};
use std::io::Read;

/// Most comment lines a file may carry (metadata is kept in memory; records are not).
pub const MAX_COMMENTS: usize = 10_000;

/// A CSV text split into its comment metadata and its header; records come from [`Sheet::records`].
pub(crate) struct Sheet<'a> {
    /// `# key: value` lines: (line number, key, value), in order.
    pub meta: Vec<(usize, String, String)>,
    /// Comment lines without a colon: (line number, text after '#', trimmed).
    pub tags: Vec<(usize, String)>,
    /// Line number of the header row (0 when there is none).
    pub header_line: usize,
    /// The header row's fields, trimmed.
    pub header: Vec<String>,
    text: &'a str,
}

/// Comment and blank lines are passed on as a lone comma (a record of empty fields, which
/// [`Sheet::records`] drops; the CSV reader does not count a bare blank line), so the reader's line
/// numbers stay those of the original text.
struct Records<'a> {
    lines: std::str::SplitInclusive<'a, char>,
    pending: &'a [u8],
}

fn is_skipped(line: &str) -> bool {
    let t = line.trim_start();
    t.is_empty() || t.starts_with('#')
}

impl Read for Records<'_> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        while self.pending.is_empty() {
            match self.lines.next() {
                None => return Ok(0),
                Some(line) if is_skipped(line) => {
                    self.pending = if line.ends_with('\n') { b",\n" } else { b"" };
                    if self.pending.is_empty() {
                        return Ok(0);
                    }
                }
                Some(line) => self.pending = line.as_bytes(),
            }
        }
        let k = self.pending.len().min(buf.len());
        buf[..k].copy_from_slice(&self.pending[..k]);
        self.pending = &self.pending[k..];
        Ok(k)
    }
}

fn reader(text: &str) -> csv::Reader<Records<'_>> {
    csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .has_headers(false)
        .flexible(true)
        .from_reader(Records {
            lines: text.split_inclusive('\n'),
            pending: b"",
        })
}

fn csv_error(e: csv::Error) -> PlanError {
    PlanError::new(
        Place::line(e.position().map_or(0, |p| p.line() as usize)),
        e.to_string(),
    )
}

/// One record with its line number, or the error naming the line.
pub(crate) type Record = Result<(usize, csv::StringRecord), PlanError>;

impl<'a> Sheet<'a> {
    /// Reads the metadata and the header of `text`; the error names the line of a malformed one.
    pub fn parse(text: &'a str) -> Result<Sheet<'a>, PlanError> {
        let mut meta = Vec::new();
        let mut tags = Vec::new();
        for (k, line) in text.lines().enumerate() {
            let Some(rest) = line.trim_start().strip_prefix('#') else {
                continue;
            };
            if meta.len() + tags.len() >= MAX_COMMENTS {
                return Err(PlanError::new(
                    Place::line(k + 1),
                    format!("more than {MAX_COMMENTS} comment lines; this is not one of our files"),
                ));
            }
            let rest = rest.trim();
            match rest.split_once(':') {
                Some((key, value)) => {
                    meta.push((k + 1, key.trim().to_string(), value.trim().to_string()))
                }
                None => tags.push((k + 1, rest.to_string())),
            }
        }
        let mut sheet = Sheet {
            meta,
            tags,
            header_line: 0,
            header: Vec::new(),
            text,
        };
        if let Some(first) = sheet.all_records().next() {
            let (line, rec) = first?;
            sheet.header_line = line;
            sheet.header = rec.iter().map(str::to_string).collect();
        }
        Ok(sheet)
    }

    /// Every non-empty record, the header included.
    fn all_records(&self) -> impl Iterator<Item = Record> + 'a {
        reader(self.text).into_records().filter_map(|r| match r {
            Err(e) => Some(Err(csv_error(e))),
            Ok(rec) if rec.iter().all(str::is_empty) => None,
            Ok(rec) => Some(Ok((rec.position().map_or(0, |p| p.line() as usize), rec))),
        })
    }

    /// The records after the header, one at a time: (line number, trimmed fields).
    pub fn records(&self) -> impl Iterator<Item = Record> + 'a {
        self.all_records().skip(1)
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
                    Place::line(*line),
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
    PlanError::new(Place::line(line), message)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn records_keep_their_original_line_numbers() {
        let text = "# fmt 1\n# name: x\n\na,b\n  # aside\n1,2\n\n3,4";
        let sheet = Sheet::parse(text).unwrap();
        assert_eq!(sheet.header_line, 4);
        assert_eq!(sheet.header, ["a", "b"]);
        let recs: Vec<(usize, Vec<String>)> = sheet
            .records()
            .map(|r| {
                let (l, rec) = r.unwrap();
                (l, rec.iter().map(str::to_string).collect())
            })
            .collect();
        assert_eq!(
            recs,
            [
                (6, vec!["1".into(), "2".into()]),
                (8, vec!["3".into(), "4".into()])
            ]
        );
        assert_eq!(sheet.meta("name"), Some((2, "x")));
    }

    #[test]
    fn crlf_and_bad_quotes() {
        let sheet = Sheet::parse("a,b\r\n1,2\r\n").unwrap();
        let recs: Vec<_> = sheet.records().collect::<Result<_, _>>().unwrap();
        assert_eq!(recs.len(), 1);
        assert_eq!(&recs[0].1[1], "2");
        let sheet = Sheet::parse("a,b\n1,\"2\n").unwrap();
        assert!(sheet.records().any(|r| r.is_err()) || sheet.records().count() == 1);
    }

    #[test]
    fn too_many_comments_are_refused() {
        let text = "# c\n".repeat(MAX_COMMENTS + 1);
        let err = Sheet::parse(&text).err().unwrap();
        assert_eq!(err.place, Place::line(MAX_COMMENTS + 1));
    }
}
