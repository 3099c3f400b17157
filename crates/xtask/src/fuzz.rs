//! `cargo xtask fuzz [--runs N]`: every cargo-fuzz target for N executions (default 1 000 000).
//!
//! Needs the nightly toolchain (present on these machines for cargo-fuzz; the stable build never
//! needs it) and installs cargo-fuzz from crates.io when missing. Not part of `cargo xtask test`:
//! a full run takes tens of minutes; the figures it printed last are in DEVELOPERS.md.

use crate::run::{cargo, root, run};
use std::time::Instant;

/// The fuzz targets (fuzz/fuzz_targets/*.rs).
pub const TARGETS: &[&str] = &["plan", "library", "runs", "nnls"];

/// Runs every target for `runs` executions; fails on the first crash.
pub fn run_all(runs: u64) -> Result<(), String> {
    std::env::set_current_dir(root()).map_err(|e| e.to_string())?;
    let has_fuzz = std::process::Command::new("cargo")
        .args(["fuzz", "--version"])
        .output()
        .is_ok_and(|o| o.status.success());
    if !has_fuzz {
        cargo(&["install", "cargo-fuzz", "--locked"])?;
    }
    let mut lines = Vec::new();
    for target in TARGETS {
        let start = Instant::now();
        run(
            "cargo",
            &[
                "+nightly",
                "fuzz",
                "run",
                target,
                "--",
                &format!("-runs={runs}"),
                "-max_len=4096",
                "-rss_limit_mb=1024",
            ],
        )?;
        lines.push(format!(
            "{target:<8} {runs} executions, no crash, {:.0} s",
            start.elapsed().as_secs_f64()
        ));
    }
    println!("\nxtask fuzz:");
    for l in lines {
        println!("  {l}");
    }
    Ok(())
}
