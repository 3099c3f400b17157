//! The command line's one error type: a message that names the place (file, line, column), and
//! the exit code it ends with.

use std::fmt;
use std::path::Path;

/// Exit code for bad input or usage: a file, value or option the user can correct.
pub const EXIT_INPUT: u8 = 2;
/// Exit code for a well-formed task with no answer: infeasible hard constraints, or an unbounded
/// goal. The message names the constraint that cannot be met.
pub const EXIT_NO_ANSWER: u8 = 3;
/// Exit code for anything else: a file that cannot be written, a solve that could not finish.
pub const EXIT_FAILURE: u8 = 1;

/// A failure reported to the user as one line on stderr.
#[derive(Debug)]
pub struct CliError {
    /// The line printed after "traycast: ".
    pub message: String,
    /// [`EXIT_INPUT`], [`EXIT_NO_ANSWER`] or [`EXIT_FAILURE`].
    pub code: u8,
}

impl CliError {
    /// Bad input, described by `message`.
    pub fn input(message: impl fmt::Display) -> Self {
        CliError {
            message: message.to_string(),
            code: EXIT_INPUT,
        }
    }

    /// A task with no answer (see [`EXIT_NO_ANSWER`]).
    pub fn no_answer(message: impl fmt::Display) -> Self {
        CliError {
            message: message.to_string(),
            code: EXIT_NO_ANSWER,
        }
    }

    /// A failure that is not the input's fault (writing a file, say).
    pub fn failure(message: impl fmt::Display) -> Self {
        CliError {
            message: message.to_string(),
            code: EXIT_FAILURE,
        }
    }

    /// Bad input at `path:line:col` (1-based; col 0 means the whole line, line 0 the whole file).
    pub fn at(path: &Path, line: usize, col: usize, msg: impl fmt::Display) -> Self {
        let p = path.display();
        Self::input(match (line, col) {
            (0, _) => format!("{p}: {msg}"),
            (l, 0) => format!("{p}:{l}: {msg}"),
            (l, c) => format!("{p}:{l}:{c}: {msg}"),
        })
    }
}

impl fmt::Display for CliError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}
