//! `traycast calibrate`: heating runs + load layout → map library with standard errors, and the
//! quality report on stdout.

use crate::error::CliError;
use crate::format::{Format, print_json};
use crate::plans::{in_file, load_plan, read_at_most, write};
use crate::progress;
use std::path::{Path, PathBuf};
use traycast_plan::calibrate::{self, Settings};
use traycast_plan::runs::{HeatingRuns, ReadOptions};

/// Arguments of `traycast calibrate`.
#[derive(clap::Args)]
pub struct Args {
    /// Heating runs ("traycast-runs 1" CSV).
    pub runs: PathBuf,
    /// The load's layout: a plan JSON file (its tray, food items and configurations; targets are ignored).
    #[arg(long)]
    pub layout: PathBuf,
    /// Where to write the library (.json, or .csv for the CSV form).
    #[arg(long)]
    pub out: PathBuf,
    /// Confirm that the file's temperatures are in °F (its header must name temp_f).
    #[arg(long)]
    pub fahrenheit: bool,
    /// Name of the library (default: the runs file's `# name:`).
    #[arg(long)]
    pub name: Option<String>,
    /// Also write the per-probe fit table (CSV) here.
    #[arg(long)]
    pub probes: Option<PathBuf>,
    /// How many notes the text report lists (the JSON report has them all).
    #[arg(long, default_value_t = 40)]
    pub notes: usize,
    /// The report: `text` or `json`.
    #[arg(long, value_enum, default_value_t)]
    pub format: Format,
}

/// Runs the command.
pub fn run(args: &Args) -> Result<(), CliError> {
    let layout = load_plan(&args.layout)?;
    let text = read_at_most(&args.runs, traycast_plan::runs::MAX_RUNS_BYTES)?;
    let spinner = progress::spinner("calibrating");
    let runs = HeatingRuns::parse(
        &text,
        &layout,
        ReadOptions {
            fahrenheit: args.fahrenheit,
        },
    )
    .map_err(in_file(&args.runs))?;
    let mut cal =
        calibrate::calibrate(&runs, &layout, &Settings::default()).map_err(in_file(&args.runs))?;
    if let Some(name) = &args.name {
        cal.library.name = name.clone();
    }
    spinner.finish_and_clear();
    let library = if is_csv(&args.out) {
        cal.library.to_csv()
    } else {
        cal.library.to_json()
    };
    write(&args.out, &library)?;
    if let Some(path) = &args.probes {
        write(path, &cal.probe_table(&runs))?;
    }
    match args.format {
        Format::Text => {
            print!("{}", cal.report.to_text(args.notes));
            println!(
                "\nWrote library '{}' ({} configurations, rates of thawed food with standard errors) to {}.",
                cal.library.name,
                cal.library.configs,
                args.out.display()
            );
            println!(
                "Predicted temperatures from it are estimates; check the coldest part of each food with a calibrated thermometer and follow your local food code."
            );
        }
        Format::Json => {
            let mut report = cal.report.to_json();
            report["library"] = serde_json::json!({
                "name": cal.library.name,
                "configs": cal.library.configs,
                "out": args.out.display().to_string(),
                "content_hash": format!("{:016x}", cal.library.content_hash()),
            });
            report["cautions"] = serde_json::json!(traycast_thermal::safety::CAUTIONS);
            print_json(&report);
        }
    }
    Ok(())
}

fn is_csv(path: &Path) -> bool {
    path.extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"))
}
