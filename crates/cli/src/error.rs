//! The command line's one error type: a message that names the place (file, line, column).

use std::fmt;
use std::path::Path;

/// A failure reported to the user as one line on stderr, exit code 2.
#[derive(Debug)]
pub struct CliError(pub String);

impl CliError {
    /// An error at `path:line:col` (1-based; col 0 means the whole line, line 0 the whole file).
    pub fn at(path: &Path, line: usize, col: usize, msg: impl fmt::Display) -> Self {
        let p = path.display();
        CliError(match (line, col) {
            (0, _) => format!("{p}: {msg}"),
            (l, 0) => format!("{p}:{l}: {msg}"),
            (l, c) => format!("{p}:{l}:{c}: {msg}"),
        })
    }
}

impl fmt::Display for CliError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}
