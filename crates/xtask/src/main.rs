//! `cargo xtask …`: Traycast's development automation (setup, test, benchmarks, serve).
//!
//! Every step a fresh machine needs is installed here, skipping what is already present, so
//! `.ci/run` and a new developer run the same commands.

mod bench;
mod bench_web;
mod fuzz;
mod limits;
mod run;
mod web;

use run::{cargo, ensure_wasm_target, root};
use std::process::ExitCode;

const USAGE: &str = "usage: cargo xtask <command>

commands:
  test           fmt check, clippy (warnings are errors), wasm32 build of the leaf crates, all tests
  bench-solver   criterion benchmarks of the dwell solver, plus SciPy's nnls side by side
                 (--reuse: skip criterion, read its last results)
  serve          build the workbench and serve it on 127.0.0.1 (opens on the built-in demo)
  e2e            build the workbench and run the browser tests only
  bench-web      200 scripted brush strokes in headless Chromium, against native, as a table
  fuzz           every fuzz target for 1 000 000 executions (--runs N to change; nightly)
  limits         peak memory of the command line on inputs at every stated limit";

/// Library crates that must build for wasm32-unknown-unknown (no I/O, no browser knowledge).
pub const WASM_CRATES: &[&str] = &[
    "traycast-rng",
    "traycast-solver",
    "traycast-thermal",
    "traycast-plan",
    "traycast-web",
];

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let result = match args.first().map(String::as_str) {
        Some("test") => test(),
        Some("bench-solver") => bench::solver(args.iter().any(|a| a == "--reuse")),
        Some("serve") => web::serve(),
        Some("e2e") => web::e2e(),
        Some("bench-web") => bench_web::run(),
        Some("fuzz") => match args.iter().position(|a| a == "--runs") {
            None => fuzz::run_all(1_000_000),
            Some(k) => match args.get(k + 1).and_then(|v| v.parse().ok()) {
                Some(n) => fuzz::run_all(n),
                None => Err("--runs takes a whole number".into()),
            },
        },
        Some("limits") => limits::run(),
        Some("limits-child") => limits::child_args(&args[1..])
            .and_then(|(program, rest)| limits::child(&program, &rest)),
        _ => {
            eprintln!("{USAGE}");
            return ExitCode::from(2);
        }
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("xtask: {e}");
            ExitCode::FAILURE
        }
    }
}

fn test() -> Result<(), String> {
    std::env::set_current_dir(root()).map_err(|e| e.to_string())?;
    ensure_wasm_target()?;
    run::ensure_components(&["rustfmt", "clippy"])?;
    cargo(&["fmt", "--all", "--", "--check"])?;
    cargo(&[
        "clippy",
        "--workspace",
        "--all-targets",
        "--",
        "-D",
        "warnings",
    ])?;
    for krate in WASM_CRATES {
        cargo(&[
            "build",
            "--target",
            "wasm32-unknown-unknown",
            "--package",
            krate,
        ])?;
    }
    // The fuzz target lives outside the workspace (cargo fuzz wants nightly); keep it compiling.
    cargo(&["check", "--manifest-path", "fuzz/Cargo.toml"])?;
    cargo(&["test", "--workspace"])?;
    // Peak memory of the command line at every stated input limit (< 512 MiB).
    limits::run()?;
    // UI logic in headless Chromium, then the release bundle and the browser tests (installs
    // Trunk, wasm-bindgen, Chromium and ChromeDriver if missing).
    web::component_tests()?;
    web::e2e()?;
    println!("xtask test: all checks passed");
    Ok(())
}
