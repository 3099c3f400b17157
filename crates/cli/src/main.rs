//! `traycast`: the command line beside the workbench — plan, solve, simulate, calibrate and batch
//! evaluations for spreadsheet users and scripts.
//!
//! Thin glue: argument parsing and file I/O here, every computation in the library crates.
//! Conventions shared by every command: `--format text|json` where a command prints results,
//! `--out FILE` for every file it writes, plain decimal numbers, the exit codes below.

mod batch;
mod calibrate;
mod error;
mod format;
mod library;
mod nnls;
mod numfile;
mod plans;
mod progress;
mod solve;

use clap::{Parser, Subcommand};
use format::Format;
use std::path::PathBuf;
use std::process::ExitCode;

/// Plan dwell times for field-steered microwave ovens.
#[derive(Parser)]
#[command(
    name = "traycast",
    version,
    about,
    after_help = "Exit codes: 0 done; 2 bad input or usage (the message names the file and line, or the option); 3 no answer: hard constraints that cannot all be met, or a goal with no limit (the message names the constraint); 1 anything else (a file that cannot be written).\n\nPredicted temperatures are estimates: check the coldest part of each food with a calibrated thermometer and follow your local food code."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Solve a low-level dwell problem from CSV files: rates A (cells × configurations, K/s) and targets.
    Nnls(nnls::Args),
    /// List the demo plans, or write one out.
    Demo {
        /// Demo name (omit to list them).
        name: Option<String>,
        /// Where to write the plan JSON (stdout if omitted).
        #[arg(long)]
        out: Option<PathBuf>,
        /// Also write invented bench runs of the demo here (a heating-runs CSV to try `calibrate` on).
        #[arg(long)]
        runs: Option<PathBuf>,
        /// Output of the list: `text` or `json`.
        #[arg(long, value_enum, default_value_t)]
        format: Format,
    },
    /// Turn recorded heating runs into a map library with standard errors, and report their quality.
    Calibrate(calibrate::Args),
    /// Solve a plan and report dwells, zones, coldest-point verdicts and the unsteered baseline.
    Solve(solve::SolveArgs),
    /// Simulate a plan's time course and write per-food curves as CSV.
    Simulate(solve::SimulateArgs),
    /// Evaluate many plans against one or more libraries in parallel; one summary line each.
    Batch(batch::Args),
    /// Print the share link of a plan.
    Link {
        /// Plan JSON file.
        plan: PathBuf,
    },
    /// Open a share link (or a full URL ending in #tc6.…) as plan JSON.
    Open {
        /// The link.
        link: String,
        /// Where to write the plan JSON (stdout if omitted).
        #[arg(long)]
        out: Option<PathBuf>,
    },
    /// Check, convert or export heating-map libraries.
    #[command(subcommand)]
    Library(library::Command),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Nnls(args) => nnls::run(&args),
        Command::Demo {
            name,
            out,
            runs,
            format,
        } => plans::demo(name.as_deref(), out.as_deref(), runs.as_deref(), format),
        Command::Calibrate(args) => calibrate::run(&args),
        Command::Solve(args) => solve::solve(&args),
        Command::Simulate(args) => solve::simulate(&args),
        Command::Batch(args) => batch::run(&args),
        Command::Link { plan } => plans::link(&plan),
        Command::Open { link, out } => plans::open(&link, out.as_deref()),
        Command::Library(command) => library::run(&command),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("traycast: {e}");
            ExitCode::from(e.code)
        }
    }
}
