//! `traycast library check|convert|export`: look at a heating-map library, change its form, or
//! write out the maps a plan is evaluated on.

use crate::error::CliError;
use crate::format::{Format, print_json};
use crate::plans::{load_library, load_plan, write};
use std::path::{Path, PathBuf};
use traycast_plan::evaluate::Evaluator;
use traycast_plan::library::{MapLibrary, RateBasis, RecordedLoad, Uncertainty};

/// The library subcommands.
#[derive(clap::Subcommand)]
pub enum Command {
    /// Check a library (CSV or JSON) and say what it holds.
    Check {
        /// Library file.
        file: PathBuf,
        /// `text` or `json`.
        #[arg(long, value_enum, default_value_t)]
        format: Format,
    },
    /// Convert a library between its CSV and JSON forms (by the output's extension).
    Convert {
        /// Library file.
        file: PathBuf,
        /// Output file, .json or .csv.
        #[arg(long)]
        out: PathBuf,
    },
    /// Write the heating maps a plan is evaluated on (field model or library) as a library CSV.
    Export {
        /// Plan JSON file.
        plan: PathBuf,
        /// Map library the plan uses, if it uses one.
        #[arg(long)]
        library: Option<PathBuf>,
        /// Output file, .csv or .json.
        #[arg(long)]
        out: PathBuf,
    },
}

/// Runs a library subcommand.
pub fn run(command: &Command) -> Result<(), CliError> {
    match command {
        Command::Check { file, format } => check(file, *format),
        Command::Convert { file, out } => {
            let lib = load_library(file)?;
            write(out, &serialise(&lib, out))
        }
        Command::Export { plan, library, out } => export(plan, library.as_deref(), out),
    }
}

fn serialise(lib: &MapLibrary, out: &Path) -> String {
    if out
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("json"))
    {
        lib.to_json()
    } else {
        lib.to_csv()
    }
}

fn check(file: &Path, format: Format) -> Result<(), CliError> {
    let lib = load_library(file)?;
    let with_errors = lib.loads.iter().filter(|l| l.uncertainty.is_some()).count();
    match format {
        Format::Text => println!(
            "{}: {} recorded loads ({with_errors} with standard errors), {} configurations, {} × {} cells of {} mm, {} rates — valid",
            lib.name,
            lib.loads.len(),
            lib.configs,
            lib.width,
            lib.height,
            lib.cell_mm,
            lib.basis.as_str()
        ),
        Format::Json => print_json(&serde_json::json!({
            "name": lib.name,
            "valid": true,
            "loads": lib.loads.iter().map(|l| &l.name).collect::<Vec<_>>(),
            "loads_with_standard_errors": with_errors,
            "configs": lib.configs,
            "width": lib.width,
            "height": lib.height,
            "cell_mm": lib.cell_mm,
            "basis": lib.basis.as_str(),
            "content_hash": format!("{:016x}", lib.content_hash()),
        })),
    }
    Ok(())
}

/// The plan's maps as a one-load library: its layout, the rates in the state its food starts in
/// (as-loaded basis), with the standard errors when the maps carry them.
fn export(plan_path: &Path, library: Option<&Path>, out: &Path) -> Result<(), CliError> {
    let plan = load_plan(plan_path)?;
    plan.validate()
        .map_err(|e| CliError::at(plan_path, 0, 0, e))?;
    let lib = library.map(load_library).transpose()?;
    let mut ev = Evaluator::with_library(lib);
    let maps = ev
        .maps(&plan)
        .map_err(|e| CliError::at(plan_path, 0, 0, e))?;
    let exported = MapLibrary {
        name: format!("maps of {}", plan.name),
        width: plan.tray.width,
        height: plan.tray.height,
        cell_mm: plan.tray.cell_mm,
        configs: maps.configs,
        basis: RateBasis::AsLoaded,
        loads: vec![RecordedLoad {
            name: plan.name.clone(),
            layout: plan.loss_layout(),
            rates: maps.loaded.clone(),
            uncertainty: maps.loaded_se.as_ref().map(|se| Uncertainty {
                se: se.clone(),
                filled: vec![false; se.len()],
            }),
        }],
    };
    exported
        .validate()
        .map_err(|e| CliError::failure(format!("the exported maps do not validate: {e}")))?;
    write(out, &serialise(&exported, out))?;
    eprintln!(
        "wrote {} maps of {} × {} cells to {}",
        maps.configs,
        plan.tray.width,
        plan.tray.height,
        out.display()
    );
    Ok(())
}
