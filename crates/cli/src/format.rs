//! How every command prints results: `--format text` (for people) or `--format json` (for
//! machines), the same key names everywhere (`dwell_s`, `status` as the solver spells it), and
//! numbers as plain decimals.

use std::fmt::Write as _;

/// The output format of a command that prints results.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Format {
    /// Tables and sentences for a terminal.
    #[default]
    Text,
    /// One JSON document on stdout.
    Json,
}

/// A number for text output: `digits` decimals, or "—" where there is no value (never NaN or inf).
pub fn num(v: f64, digits: usize) -> String {
    if v.is_finite() {
        format!("{v:.digits$}")
    } else {
        "—".into()
    }
}

/// A number for machines: the shortest plain decimal that reads back exactly (never exponent
/// form), or an empty string where there is no value.
pub fn exact(v: f64) -> String {
    if v.is_finite() {
        let mut s = String::new();
        let _ = write!(s, "{v}");
        s
    } else {
        String::new()
    }
}

/// Prints `value` as pretty JSON on stdout.
pub fn print_json(value: &serde_json::Value) {
    println!(
        "{}",
        serde_json::to_string_pretty(value).expect("JSON values serialise")
    );
}
