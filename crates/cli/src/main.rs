//! `traycast`: the command line beside the workbench — batch dwell solves for spreadsheet users.
//!
//! Thin glue: argument parsing and file I/O here, every computation in the library crates.

mod error;
mod nnls;
mod numfile;

use clap::{Parser, Subcommand};
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
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Nnls(args) => nnls::run(&args),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("traycast: {e}");
            ExitCode::from(2)
        }
    }
}
