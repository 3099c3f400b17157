//! Shared by the command line's end-to-end tests: run the built binary.

use std::path::PathBuf;
use std::process::Command;

/// A fresh scratch folder for one test, named after it and the process.
#[allow(dead_code)] // each test file uses what it needs
pub fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("traycast-{name}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

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
