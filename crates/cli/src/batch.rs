//! `traycast batch`: many plans against one or more libraries, evaluated in parallel (rayon), one
//! summary line per evaluation in a JSON-lines or CSV file. A plan that cannot be read or evaluated
//! gets an error line and does not stop the others.

use crate::error::CliError;
use crate::format::exact;
use crate::plans::{load_library, load_plan, write};
use crate::progress;
use rayon::prelude::*;
use std::path::{Path, PathBuf};
use std::time::Instant;
use traycast_plan::evaluate::{self, Evaluation, Options};
use traycast_plan::library::MapLibrary;
use traycast_plan::model::{MapSource, Plan};

/// Arguments of `traycast batch`.
#[derive(clap::Args)]
pub struct Args {
    /// Plan JSON files.
    #[arg(required = true)]
    pub plans: Vec<PathBuf>,
    /// Map libraries: each plan that uses a library is evaluated on every one given (unit-to-unit
    /// comparisons); plans on the illustrative field model are evaluated once.
    #[arg(long = "library")]
    pub libraries: Vec<PathBuf>,
    /// Where to write the summary: `.csv` for one row per food item, anything else for JSON lines.
    #[arg(long)]
    pub out: PathBuf,
    /// Worker threads (default: one per core).
    #[arg(long, value_parser = clap::value_parser!(u16).range(1..=256))]
    pub threads: Option<u16>,
}

/// One evaluation to run.
struct Job<'a> {
    plan_file: &'a Path,
    plan: Result<Plan, String>,
    library: Option<(&'a Path, &'a MapLibrary)>,
}

/// Runs the batch.
pub fn run(args: &Args) -> Result<(), CliError> {
    let libraries: Vec<(PathBuf, MapLibrary)> = args
        .libraries
        .iter()
        .map(|p| load_library(p).map(|l| (p.clone(), l)))
        .collect::<Result<_, _>>()?;
    let mut jobs = Vec::new();
    for path in &args.plans {
        let plan = load_plan(path).map_err(|e| e.message);
        let on_library = matches!(&plan, Ok(p) if matches!(p.maps, MapSource::Library { .. }));
        if on_library && !libraries.is_empty() {
            for (lp, lib) in &libraries {
                jobs.push(Job {
                    plan_file: path,
                    plan: plan.clone(),
                    library: Some((lp.as_path(), lib)),
                });
            }
        } else {
            jobs.push(Job {
                plan_file: path,
                plan,
                library: None,
            });
        }
    }
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(args.threads.map_or(0, usize::from))
        .build()
        .map_err(CliError::failure)?;
    let bar = progress::bar(jobs.len() as u64, "evaluating");
    let start = Instant::now();
    let results: Vec<Result<(Plan, Evaluation), String>> = pool.install(|| {
        jobs.par_iter()
            .map(|job| {
                let out = evaluate_job(job);
                bar.inc(1);
                out
            })
            .collect()
    });
    bar.finish_and_clear();
    let seconds = start.elapsed().as_secs_f64();
    let csv = args
        .out
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"));
    let text = if csv {
        to_csv(&jobs, &results)
    } else {
        to_json_lines(&jobs, &results)
    };
    write(&args.out, &text)?;
    let failed = results.iter().filter(|r| r.is_err()).count();
    eprintln!(
        "{} evaluations in {seconds:.2} s on {} thread{} ({:.1} per second); summary in {}",
        jobs.len(),
        pool.current_num_threads(),
        if pool.current_num_threads() == 1 {
            ""
        } else {
            "s"
        },
        jobs.len() as f64 / seconds.max(1e-9),
        args.out.display()
    );
    if failed > 0 {
        return Err(CliError::input(format!(
            "{failed} of {} evaluations failed; their lines in {} say why",
            jobs.len(),
            args.out.display()
        )));
    }
    Ok(())
}

fn evaluate_job(job: &Job) -> Result<(Plan, Evaluation), String> {
    let mut plan = job.plan.clone()?;
    let library = job.library.map(|(_, lib)| {
        // Evaluated on this library on purpose: the plan is pointed at it.
        plan.maps = MapSource::Library {
            name: lib.name.clone(),
            hash: None,
        };
        lib
    });
    let eval = evaluate::evaluate(&plan, library, Options::default()).map_err(|e| e.to_string())?;
    Ok((plan, eval))
}

fn library_name(job: &Job) -> String {
    job.library.map_or_else(
        || "illustrative field model".into(),
        |(_, l)| l.name.clone(),
    )
}

fn to_json_lines(jobs: &[Job], results: &[Result<(Plan, Evaluation), String>]) -> String {
    let mut out = String::new();
    for (job, result) in jobs.iter().zip(results) {
        let mut line = serde_json::json!({
            "plan_file": job.plan_file.display().to_string(),
            "library_file": job.library.map(|(p, _)| p.display().to_string()),
            "maps": library_name(job),
        });
        match result {
            Ok((plan, eval)) => {
                let mut summary = traycast_plan::summary::to_json(plan, eval);
                if let Some(map) = summary.as_object_mut() {
                    // Per-cell arrays stay out of a one-line summary.
                    map.remove("error_linear");
                    map.remove("cautions");
                }
                line["summary"] = summary;
            }
            Err(e) => line["error"] = serde_json::json!(e),
        }
        out.push_str(&line.to_string());
        out.push('\n');
    }
    out
}

fn to_csv(jobs: &[Job], results: &[Result<(Plan, Evaluation), String>]) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut rows: Vec<Vec<String>> = vec![
        [
            "plan_file",
            "maps",
            "status",
            "total_s",
            "item",
            "coldest_c",
            "mean_c",
            "warmest_c",
            "verdict",
            "margin_k",
            "rule",
            "error",
        ]
        .map(String::from)
        .to_vec(),
    ];
    for (job, result) in jobs.iter().zip(results) {
        let head = vec![job.plan_file.display().to_string(), library_name(job)];
        match result {
            Ok((plan, eval)) => {
                for (item, s) in plan.items.iter().zip(&eval.items) {
                    let mut row = head.clone();
                    row.extend([
                        eval.status.as_str().to_string(),
                        exact(eval.total_s),
                        item.name.clone(),
                        exact(s.min),
                        exact(s.mean),
                        exact(s.max),
                        if s.verdict.safe { "meets" } else { "fails" }.into(),
                        exact(s.verdict.margin),
                        s.verdict.binding.source.to_string(),
                        String::new(),
                    ]);
                    rows.push(row);
                }
            }
            Err(e) => {
                let mut row = head;
                row.extend(std::iter::repeat_n(String::new(), 9));
                row.push(e.clone());
                rows.push(row);
            }
        }
    }
    for row in rows {
        w.write_record(&row).expect("in-memory CSV");
    }
    let mut text = String::from_utf8(w.into_inner().expect("in-memory CSV")).expect("UTF-8 in");
    for c in traycast_thermal::safety::CAUTIONS {
        text.push_str(&format!("# {c}\n"));
    }
    text
}
