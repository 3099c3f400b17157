//! `traycast`: the command line beside the workbench — batch dwell solves for spreadsheet users.
//!
//! Thin glue: argument parsing and file I/O here, every computation in the library crates.

mod calibrate;
mod error;
mod nnls;
mod numfile;
mod plans;
mod progress;

use clap::{Parser, Subcommand};
use std::path::PathBuf;
use std::process::ExitCode;

/// Plan dwell times for field-steered microwave ovens.
#[derive(Parser)]
#[command(name = "traycast", version, about)]
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
    },
    /// Turn recorded heating runs into a map library with standard errors, and report their quality.
    Calibrate(calibrate::Args),
    /// Solve a plan and report dwells, zones, coldest-cell verdicts and the unsteered baseline.
    Solve {
        /// Plan JSON file.
        plan: PathBuf,
        /// Map library (CSV or JSON) for plans that use one.
        #[arg(long)]
        library: Option<PathBuf>,
        /// `table` (default) or `json`.
        #[arg(long, default_value = "table", value_parser = ["table", "json"])]
        format: String,
        /// Re-solve once with the simulation's correction.
        #[arg(long)]
        refine: bool,
    },
    /// Simulate a plan's time course and write per-food curves as CSV.
    Simulate {
        /// Plan JSON file.
        plan: PathBuf,
        /// Map library (CSV or JSON) for plans that use one.
        #[arg(long)]
        library: Option<PathBuf>,
        /// Output CSV of min/mean/max per food item over time.
        #[arg(long)]
        csv: PathBuf,
        /// Also write the controller schedule CSV here.
        #[arg(long)]
        schedule: Option<PathBuf>,
    },
    /// Print the share link of a plan.
    Link {
        /// Plan JSON file.
        plan: PathBuf,
    },
    /// Open a share link (or a full URL ending in #tc1.…) as plan JSON.
    Open {
        /// The link.
        link: String,
        /// Where to write the plan JSON (stdout if omitted).
        #[arg(long)]
        out: Option<PathBuf>,
    },
    /// Check or convert a heating-map library.
    Library {
        /// `check` or `convert`.
        #[arg(value_parser = ["check", "convert"])]
        action: String,
        /// Library file (CSV or JSON).
        file: PathBuf,
        /// Output for convert (.json or .csv).
        #[arg(long)]
        out: Option<PathBuf>,
    },
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Nnls(args) => nnls::run(&args),
        Command::Demo { name, out, runs } => {
            plans::demo(name.as_deref(), out.as_deref(), runs.as_deref())
        }
        Command::Calibrate(args) => calibrate::run(&args),
        Command::Solve {
            plan,
            library,
            format,
            refine,
        } => plans::solve(&plan, library.as_ref(), format == "json", refine),
        Command::Simulate {
            plan,
            library,
            csv,
            schedule,
        } => plans::simulate(&plan, library.as_ref(), &csv, schedule.as_ref()),
        Command::Link { plan } => plans::link(&plan),
        Command::Open { link, out } => plans::open(&link, out.as_deref()),
        Command::Library { action, file, out } => {
            plans::library(action == "convert", &file, out.as_deref())
        }
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("traycast: {e}");
            ExitCode::from(2)
        }
    }
}
