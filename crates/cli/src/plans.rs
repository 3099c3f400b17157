//! Plan commands: demo, solve, simulate, link, open, library.

use crate::error::CliError;
use crate::progress::Progress;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use traycast_plan::evaluate::{self, Evaluation, Options};
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

/// Reads a plan or library file (at most [`library::MAX_LIBRARY_BYTES`]).
pub fn read(path: &Path) -> Result<String, CliError> {
    read_at_most(path, traycast_plan::library::MAX_LIBRARY_BYTES)
}

/// A number for the text tables: one decimal, or "—" where there is no value (never NaN or inf).
fn num(v: f64) -> String {
    if v.is_finite() {
        format!("{v:.1}")
    } else {
        "—".into()
    }
}

pub fn write(path: &Path, text: &str) -> Result<(), CliError> {
    std::fs::write(path, text).map_err(|e| CliError::at(path, 0, 0, format!("cannot write: {e}")))
}

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

/// `traycast demo [NAME --out FILE --runs FILE]`.
pub fn demo(name: Option<&str>, out: Option<&Path>, runs: Option<&Path>) -> Result<(), CliError> {
    let Some(name) = name else {
        for d in demos::DEMOS {
            println!("{d}");
        }
        return Ok(());
    };
    let plan = demos::demo(name).ok_or_else(|| {
        CliError(format!(
            "no demo named '{name}' (try: {})",
            demos::DEMOS.join(", ")
        ))
    })?;
    if let Some(path) = runs {
        let _progress = Progress::after_a_second("inventing bench runs");
        let text =
            traycast_plan::runs::heating_runs(&plan, &traycast_plan::runs::RunRecipe::default())
                .map_err(|e| CliError(e.to_string()))?;
        write(path, &text)?;
        eprintln!(
            "wrote illustrative heating runs (invented data) to {}",
            path.display()
        );
        if out.is_none() {
            return Ok(());
        }
    }
    match out {
        Some(path) => write(path, &wire::to_json(&plan)),
        None => {
            println!("{}", wire::to_json(&plan));
            Ok(())
        }
    }
}

fn evaluate_file(
    plan_path: &Path,
    library: Option<&PathBuf>,
    refine: bool,
) -> Result<(Plan, Evaluation), CliError> {
    let plan = load_plan(plan_path)?;
    let lib = library.map(|p| load_library(p)).transpose()?;
    let _progress = Progress::after_a_second("evaluating the plan");
    let eval = evaluate::evaluate(&plan, lib.as_ref(), Options { refine })
        .map_err(|e| CliError::at(plan_path, 0, 0, e))?;
    Ok((plan, eval))
}

fn report(plan: &Plan, e: &Evaluation) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "{}", plan.name);
    let _ = writeln!(
        s,
        "Total heating {:.1} s in {} steps, then {:.0} s standing ({:?})",
        e.total_s,
        e.schedule.steps.len(),
        plan.oven.standing_s,
        e.status
    );
    let _ = writeln!(s, "\nDwell per configuration (s):");
    for (j, d) in e.dwell.iter().enumerate().filter(|(_, d)| **d > 0.0) {
        let _ = writeln!(s, "  {j:>4}  {d:>8.1}");
    }
    let _ = writeln!(
        s,
        "\n{:<28} {:>9} {:>9} {:>9} {:>9}",
        "zone", "in band", "in band", "RMS off", "RMS off"
    );
    let _ = writeln!(
        s,
        "{:<28} {:>9} {:>9} {:>9} {:>9}",
        "", "linear", "simul.", "linear K", "simul. K"
    );
    for (z, r) in plan.zones.iter().zip(&e.zones) {
        let _ = writeln!(
            s,
            "{:<28} {:>8.0}% {:>8.0}% {:>9.1} {:>9.1}",
            z.name,
            100.0 * r.coverage_linear,
            100.0 * r.coverage_simulated,
            r.rms_linear,
            r.rms_simulated
        );
        if let Some(d) = &r.diagnosis {
            let _ = writeln!(s, "    {d}");
        }
    }
    let _ = writeln!(
        s,
        "\n{:<28} {:>7} {:>7} {:>7}  {:<8} {:>8}  rule",
        "food item (after standing)", "min °C", "mean", "max", "verdict", "margin K"
    );
    for (it, r) in plan.items.iter().zip(&e.items) {
        let v = &r.verdict;
        let _ = writeln!(
            s,
            "{:<28} {:>7} {:>7} {:>7}  {:<8} {:>8}  {}{}",
            it.name,
            num(r.min),
            num(r.mean),
            num(r.max),
            if v.safe { "meets" } else { "FAILS" },
            num(v.margin),
            v.binding.source,
            if v.short_stand {
                " (standing shorter than the rule assumes)"
            } else {
                ""
            }
        );
        if let Some(sp) = &r.spread {
            let _ = writeln!(
                s,
                "    95 % from the maps' errors: coldest {:.1}–{:.1}, mean {:.1}–{:.1}, warmest {:.1}–{:.1} °C; verdict judged on these bounds (nominal: {} {:+.1} K)",
                sp.coldest.0,
                sp.coldest.1,
                sp.mean.0,
                sp.mean.1,
                sp.warmest.0,
                sp.warmest.1,
                if sp.nominal.safe { "meets" } else { "fails" },
                sp.nominal.margin
            );
        }
    }
    let _ = writeln!(
        s,
        "\nUnsteered baseline: {:.0} s, {:.0}% of targeted cells in band, RMS {:.1} K off (linear)",
        e.baseline.seconds,
        100.0 * e.baseline.coverage_linear,
        e.baseline.rms_linear
    );
    if let Some(r) = &e.refinement {
        let _ = writeln!(
            s,
            "Refinement: RMS after standing {:.2} → {:.2} K ({})",
            r.rms_before,
            r.rms_after,
            if r.kept { "kept" } else { "no gain, not kept" }
        );
    }
    for w in &e.warnings {
        let _ = writeln!(s, "Note: {w}");
    }
    let _ = writeln!(s, "\nCautions:");
    for c in e.cautions {
        let _ = writeln!(s, "  - {c}");
    }
    s
}

/// `traycast solve PLAN [--library FILE] [--format table|json] [--refine]`.
pub fn solve(
    plan: &Path,
    library: Option<&PathBuf>,
    as_json: bool,
    refine: bool,
) -> Result<(), CliError> {
    let (p, e) = evaluate_file(plan, library, refine)?;
    if as_json {
        println!(
            "{}",
            serde_json::to_string_pretty(&traycast_plan::summary::to_json(&p, &e))
                .expect("serialises")
        );
    } else {
        print!("{}", report(&p, &e));
    }
    Ok(())
}

/// `traycast simulate PLAN --csv OUT [--schedule OUT]`: time course per food item, and the schedule.
pub fn simulate(
    plan: &Path,
    library: Option<&PathBuf>,
    csv: &Path,
    schedule: Option<&PathBuf>,
) -> Result<(), CliError> {
    let (p, e) = evaluate_file(plan, library, false)?;
    let mut out = String::new();
    for c in e.cautions {
        let _ = writeln!(out, "# {c}");
    }
    out.push_str("time_s,item,min_c,mean_c,max_c\n");
    for (t, time) in e.course.times.iter().enumerate() {
        for (k, it) in p.items.iter().enumerate() {
            let c = &e.course.items[k];
            let name = if it.name.contains([',', '"']) {
                format!("\"{}\"", it.name.replace('"', "\"\""))
            } else {
                it.name.clone()
            };
            // An item with no cells has no temperature: an empty field, never NaN.
            let cell = |v: f64| {
                if v.is_finite() {
                    format!("{v:.2}")
                } else {
                    String::new()
                }
            };
            let _ = writeln!(
                out,
                "{time:.1},{name},{},{},{}",
                cell(c.min[t]),
                cell(c.mean[t]),
                cell(c.max[t])
            );
        }
    }
    write(csv, &out)?;
    if let Some(path) = schedule {
        write(path, &wire::schedule_csv(&p, &e.schedule))?;
    }
    eprintln!(
        "wrote {} frames for {} food items to {}",
        e.course.times.len(),
        p.items.len(),
        csv.display()
    );
    Ok(())
}

/// `traycast link PLAN`.
pub fn link(plan: &Path) -> Result<(), CliError> {
    println!("{}", wire::to_link(&load_plan(plan)?));
    Ok(())
}

/// `traycast open LINK --out PLAN`.
pub fn open(link: &str, out: Option<&Path>) -> Result<(), CliError> {
    let fragment = link.rsplit_once('#').map_or(link, |(_, f)| f);
    let plan = wire::from_link(fragment).map_err(|e| CliError(e.to_string()))?;
    match out {
        Some(path) => write(path, &wire::to_json(&plan)),
        None => {
            println!("{}", wire::to_json(&plan));
            Ok(())
        }
    }
}

/// `traycast library check FILE` and `traycast library convert FILE --out OUT`.
pub fn library(convert: bool, file: &Path, out: Option<&Path>) -> Result<(), CliError> {
    let lib = load_library(file)?;
    if !convert {
        let with_errors = lib.loads.iter().filter(|l| l.uncertainty.is_some()).count();
        println!(
            "{}: {} recorded loads ({with_errors} with standard errors), {} configurations, {} × {} cells of {} mm, {} rates — valid",
            lib.name,
            lib.loads.len(),
            lib.configs,
            lib.width,
            lib.height,
            lib.cell_mm,
            lib.basis.as_str()
        );
        return Ok(());
    }
    let out =
        out.ok_or_else(|| CliError("library convert needs --out FILE (.json or .csv)".into()))?;
    let text = if out.extension().is_some_and(|e| e == "csv") {
        lib.to_csv()
    } else {
        lib.to_json()
    };
    write(out, &text)
}
