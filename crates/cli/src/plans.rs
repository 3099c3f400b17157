//! Files in and out (bounded reads, line-numbered errors), and the plan commands that only move
//! plans around: demo, link, open.

use crate::error::CliError;
use crate::format::{Format, print_json};
use crate::progress;
use std::path::Path;
use traycast_plan::library::MapLibrary;
use traycast_plan::model::Plan;
use traycast_plan::{PlanError, demos, wire};

/// Reads a text file of at most `max` bytes; a longer one is refused before it is read.
pub fn read_at_most(path: &Path, max: usize) -> Result<String, CliError> {
    let len = std::fs::metadata(path)
        .map_err(|e| CliError::at(path, 0, 0, format!("cannot read: {e}")))?
        .len();
    if len > max as u64 {
        return Err(CliError::at(
            path,
            0,
            0,
            format!(
                "is {len} bytes; files of this kind may be at most {max} bytes ({} MiB)",
                max >> 20
            ),
        ));
    }
    std::fs::read_to_string(path).map_err(|e| CliError::at(path, 0, 0, format!("cannot read: {e}")))
}

/// Reads a plan or library file (at most [`traycast_plan::library::MAX_LIBRARY_BYTES`]).
pub fn read(path: &Path) -> Result<String, CliError> {
    read_at_most(path, traycast_plan::library::MAX_LIBRARY_BYTES)
}

/// Writes an output file; failing to is not the input's fault (exit code 1).
pub fn write(path: &Path, text: &str) -> Result<(), CliError> {
    std::fs::write(path, text)
        .map_err(|e| CliError::failure(format!("{}: cannot write: {e}", path.display())))
}

/// Turns a plan-crate error about `path` into one naming the file, and the line and column when
/// the error has them.
pub fn in_file(path: &Path) -> impl Fn(PlanError) -> CliError + '_ {
    move |e| match e.place.line_number() {
        Some((line, column)) => CliError::at(path, line, column.unwrap_or(0), &e.message),
        None => CliError::at(path, 0, 0, &e),
    }
}

/// Reads a plan JSON file.
pub fn load_plan(path: &Path) -> Result<Plan, CliError> {
    wire::from_json(&read(path)?).map_err(in_file(path))
}

/// Reads a map library (CSV or JSON, by content).
pub fn load_library(path: &Path) -> Result<MapLibrary, CliError> {
    MapLibrary::parse(&read(path)?).map_err(in_file(path))
}

/// Writes `text` to `out`, or prints it when there is no `out`.
pub fn write_or_print(out: Option<&Path>, text: &str) -> Result<(), CliError> {
    match out {
        Some(path) => write(path, text),
        None => {
            println!("{text}");
            Ok(())
        }
    }
}

/// `traycast demo [NAME] [--out FILE] [--runs FILE] [--format text|json]`.
pub fn demo(
    name: Option<&str>,
    out: Option<&Path>,
    runs: Option<&Path>,
    format: Format,
) -> Result<(), CliError> {
    let Some(name) = name else {
        match format {
            Format::Text => demos::DEMOS.iter().for_each(|d| println!("{d}")),
            Format::Json => print_json(&serde_json::json!({ "demos": demos::DEMOS })),
        }
        return Ok(());
    };
    let plan = demos::demo(name).ok_or_else(|| {
        CliError::input(format!(
            "no demo named '{name}' (try: {})",
            demos::DEMOS.join(", ")
        ))
    })?;
    if let Some(path) = runs {
        let spinner = progress::spinner("inventing bench runs");
        let text =
            traycast_plan::runs::heating_runs(&plan, &traycast_plan::runs::RunRecipe::default())
                .map_err(CliError::failure)?;
        spinner.finish_and_clear();
        write(path, &text)?;
        eprintln!(
            "wrote illustrative heating runs (invented data) to {}",
            path.display()
        );
    }
    write_or_print(out, &wire::to_json(&plan))
}

/// `traycast link PLAN`.
pub fn link(plan: &Path) -> Result<(), CliError> {
    println!("{}", wire::to_link(&load_plan(plan)?));
    Ok(())
}

/// `traycast open LINK [--out PLAN]`.
pub fn open(link: &str, out: Option<&Path>) -> Result<(), CliError> {
    let fragment = link.rsplit_once('#').map_or(link, |(_, f)| f);
    let plan = wire::from_link(fragment).map_err(CliError::input)?;
    write_or_print(out, &wire::to_json(&plan))
}
