//! Shared by the command line's end-to-end tests: run the built binary.

use std::process::Command;

/// Runs `traycast ARGS…`; returns the exit code, stdout and stderr.
pub fn traycast(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_traycast"))
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8(out.stdout).unwrap(),
        String::from_utf8(out.stderr).unwrap(),
    )
}
