//! `traycast nnls`: the low-level solve for measured data in spreadsheets.

use crate::error::CliError;
use crate::format::{Format, exact, print_json};
use crate::numfile::{Allow, read_matrix, read_vector};
use std::path::{Path, PathBuf};
use std::time::Instant;
use traycast_solver::{
    Constraint, DwellSolver, Field, Goal, InputError, Outcome, Planned, Rates, Refusal, Solution,
    Spec, Status, Task, solve_task,
};

/// What `traycast nnls` optimises.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Objective {
    /// Least squares distance of A·x to the bands (--lo/--hi or --target are soft).
    #[default]
    Fit,
    /// Least total time with --lo ≤ A·x ≤ --hi held as hard constraints.
    Shortest,
    /// Largest common margin inside the hard bands --lo/--hi, within --budget.
    MaxMargin,
}

/// Arguments of `traycast nnls`.
#[derive(clap::Args)]
pub struct Args {
    /// Heating rates: m lines of n comma-separated numbers (cells × configurations, K/s), no header.
    #[arg(long, value_name = "A.csv")]
    rates: PathBuf,
    /// Point targets, one per line (shorthand for --lo = --hi).
    #[arg(long, value_name = "y.csv", conflicts_with_all = ["lo", "hi"], required_unless_present_all = ["lo", "hi"])]
    target: Option<PathBuf>,
    /// Band minimum per cell, one per line (`-inf` allowed).
    #[arg(long, value_name = "lo.csv", requires = "hi")]
    lo: Option<PathBuf>,
    /// Band maximum per cell, one per line (`inf` allowed).
    #[arg(long, value_name = "hi.csv", requires = "lo")]
    hi: Option<PathBuf>,
    /// Weight per cell (> 0), one per line.
    #[arg(long, value_name = "w.csv")]
    weights: Option<PathBuf>,
    /// Dwell limit per configuration in seconds, one per line (`inf` allowed).
    #[arg(long, value_name = "u.csv")]
    upper: Option<PathBuf>,
    /// Total time budget in seconds.
    #[arg(long, value_name = "SECONDS", allow_negative_numbers = true)]
    budget: Option<f64>,
    /// Cost per second of dwell (μ ≥ 0), preferring shorter schedules.
    #[arg(
        long,
        value_name = "MU",
        default_value_t = 0.0,
        allow_negative_numbers = true
    )]
    time_penalty: f64,
    /// What to optimise: `fit` (soft bands), `shortest` or `max-margin` (hard bands).
    #[arg(long, value_enum, default_value_t)]
    objective: Objective,
    /// Hard minimum of A·x per cell (K), one per line (`-inf` for none), for `fit`: the bands are
    /// fitted as well as possible while every minimum holds.
    #[arg(long, value_name = "floor.csv")]
    floor: Option<PathBuf>,
    /// Hard maximum of A·x per cell (K), one per line (`inf` for none), for `fit`.
    #[arg(long, value_name = "ceiling.csv")]
    ceiling: Option<PathBuf>,
    /// Output: `text` (one dwell per line, seconds, plain decimals) or `json`.
    #[arg(long, value_enum, default_value_t)]
    format: Format,
    /// Solve N times from cold and report the median time (JSON field solve_seconds_median);
    /// 1 to 100 000.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u32).range(1..=MAX_REPEAT))]
    repeat: Option<u32>,
}

/// Most solves `--repeat` runs.
const MAX_REPEAT: i64 = 100_000;

/// Runs the command.
pub fn run(args: &Args) -> Result<(), CliError> {
    let (n, data) = read_matrix(&args.rates, Allow::Finite)?;
    let m = data.len() / n;
    let rates = Rates::from_row_major(m, n, &data).map_err(|e| locate(args, e))?;
    let vec_for = |path: &Path, allow, len: usize, what: &str| -> Result<Vec<f64>, CliError> {
        let v = read_vector(path, allow)?;
        if v.len() != len {
            return Err(CliError::at(
                path,
                0,
                0,
                format!("has {} lines, expected {len} ({what})", v.len()),
            ));
        }
        Ok(v)
    };
    let (lo, hi) = match (&args.target, &args.lo, &args.hi) {
        (Some(t), _, _) => {
            let y = vec_for(t, Allow::Finite, m, "one per cell of the rates")?;
            (y.clone(), y)
        }
        (None, Some(lo), Some(hi)) => (
            vec_for(lo, Allow::Infinite, m, "one per cell of the rates")?,
            vec_for(hi, Allow::Infinite, m, "one per cell of the rates")?,
        ),
        _ => return Err(CliError::input("give --target, or both --lo and --hi")),
    };
    let mut spec = Spec::band(lo, hi, n);
    if let Some(w) = &args.weights {
        spec.weights = vec_for(w, Allow::Finite, m, "one per cell of the rates")?;
    }
    if let Some(u) = &args.upper {
        spec.upper = vec_for(
            u,
            Allow::Infinite,
            n,
            "one per configuration (column) of the rates",
        )?;
    }
    spec.budget = args.budget;
    spec.time_penalty = args.time_penalty;
    let hard_rows = args.floor.is_some() || args.ceiling.is_some();
    if args.objective != Objective::Fit || hard_rows {
        if args.repeat.is_some() {
            return Err(CliError::input(
                "--repeat times the band fit only; drop it for --objective shortest or max-margin, or with --floor/--ceiling",
            ));
        }
        return constrained(args, &rates, spec, &vec_for);
    }
    spec.validate(m, n).map_err(|e| locate(args, e))?;

    let (solution, median) = match args.repeat {
        None => (solve(&rates, &spec, args)?, None),
        Some(k) => {
            let k = k as usize;
            let mut times = Vec::with_capacity(k);
            let mut last = None;
            for _ in 0..k {
                // A fresh solver each time: the Gram matrix and every factor are rebuilt from A.
                // Only copying A into it (which a caller holding A would not do) is outside the clock.
                let mut solver = DwellSolver::new(rates.clone());
                let start = Instant::now();
                let sol = solver.solve_dwell(&spec).map_err(|e| locate(args, e))?;
                times.push(start.elapsed().as_secs_f64());
                last = Some(sol);
            }
            times.sort_by(f64::total_cmp);
            (last.expect("k ≥ 1"), Some(times[k / 2]))
        }
    };
    print(&solution, args.format, median);
    Ok(())
}

/// Reads a one-per-line vector file of a given length (what it is for goes in the message).
type VecReader = dyn Fn(&Path, Allow, usize, &str) -> Result<Vec<f64>, CliError>;

/// The constrained objectives: the bands (or the floor and ceiling files) are hard.
fn constrained(
    args: &Args,
    rates: &Rates,
    spec: Spec,
    vec_for: &VecReader,
) -> Result<(), CliError> {
    let (m, n) = (rates.cells(), rates.configs());
    if args.objective != Objective::Fit && hard_rows_given(args) {
        return Err(CliError::input(
            "--floor and --ceiling go with --objective fit; for shortest and max-margin, --lo and --hi are the hard bounds",
        ));
    }
    if args.objective == Objective::MaxMargin && args.time_penalty != 0.0 {
        return Err(CliError::input(
            "--time-penalty goes with --objective fit; max-margin breaks ties toward the shorter schedule itself",
        ));
    }
    let mut task = match args.objective {
        Objective::Shortest => Task::new(Goal::Shortest, m, n),
        Objective::MaxMargin => Task::new(Goal::MaxMargin, m, n),
        Objective::Fit => Task::fit(spec.clone()),
    };
    task.upper = spec.upper.clone();
    task.budget = spec.budget;
    if args.objective == Objective::Fit {
        if let Some(f) = &args.floor {
            task.floor = vec_for(f, Allow::Infinite, m, "one per cell of the rates")?;
        }
        if let Some(c) = &args.ceiling {
            task.ceiling = vec_for(c, Allow::Infinite, m, "one per cell of the rates")?;
        }
    } else {
        task.floor = spec.lo.clone();
        task.ceiling = spec.hi.clone();
    }
    let planned = solve_task(rates, &task).map_err(|r| refusal(args, r))?;
    print_planned(&planned, &task, args.format);
    Ok(())
}

fn hard_rows_given(args: &Args) -> bool {
    args.floor.is_some() || args.ceiling.is_some()
}

/// Where a constraint came from, in the user's files (lines are 1-based).
fn place(args: &Args, c: Constraint) -> String {
    let file = |p: Option<&PathBuf>| p.map(|p| p.display().to_string());
    let hard_lo = if args.objective == Objective::Fit {
        file(args.floor.as_ref())
    } else {
        file(args.lo.as_ref().or(args.target.as_ref()))
    };
    let hard_hi = if args.objective == Objective::Fit {
        file(args.ceiling.as_ref())
    } else {
        file(args.hi.as_ref().or(args.target.as_ref()))
    };
    match (c, hard_lo, hard_hi) {
        (Constraint::Floor(i), Some(f), _) => format!("the minimum on line {} of {f}", i + 1),
        (Constraint::Ceiling(i), _, Some(f)) => format!("the maximum on line {} of {f}", i + 1),
        (Constraint::Limit(j), _, _) => match &args.upper {
            Some(u) => format!("the dwell limit on line {} of {}", j + 1, u.display()),
            None => c.to_string(),
        },
        (Constraint::Budget, _, _) => "--budget".to_string(),
        _ => c.to_string(),
    }
}

/// A refusal as a message naming the files and lines involved.
fn refusal(args: &Args, r: Refusal) -> CliError {
    match r {
        Refusal::Input(e) => locate(args, e),
        Refusal::Infeasible(inf) => {
            let with: Vec<String> = inf
                .conflicts
                .iter()
                .take(4)
                .map(|&c| place(args, c))
                .collect();
            let mut msg = format!(
                "infeasible: {} cannot be met (short by {})",
                place(args, inf.constraint),
                exact(inf.shortfall)
            );
            if !with.is_empty() {
                msg.push_str(&format!(" together with {}", with.join(", ")));
            }
            CliError::no_answer(msg)
        }
        other => CliError::no_answer(other),
    }
}

fn print_planned(p: &Planned, task: &Task, format: Format) {
    if p.outcome != Outcome::Optimal {
        eprintln!(
            "traycast: warning: the certificate residual is {} (above the tolerance): the dwells meet the constraints but are not proven optimal",
            exact(p.certificate.residual())
        );
    }
    match format {
        Format::Text => {
            for x in &p.dwell {
                println!("{}", exact(*x));
            }
        }
        Format::Json => {
            let obj = serde_json::json!({
                "goal": task.goal.as_str(),
                "objective": p.objective,
                "dwell_s": p.dwell,
                "total_s": p.total_time(),
                "margin_k": p.margin,
                "status": p.outcome.as_str(),
                "iterations": p.iterations,
                "certificate": {
                    "residual": p.certificate.residual(),
                    "infeasibility": p.certificate.infeasibility,
                    "stationarity": p.certificate.stationarity,
                    "complementarity": p.certificate.complementarity,
                    "duality_gap": p.certificate.gap,
                },
                "multipliers": {
                    "floor": p.multipliers.floor,
                    "ceiling": p.multipliers.ceiling,
                    "dwell_limit": p.multipliers.limit,
                    "budget": p.multipliers.budget,
                },
            });
            print_json(&obj);
        }
    }
}

/// Solves once. The output needs no per-cell predictions, so the dwell-only path is enough.
fn solve(rates: &Rates, spec: &Spec, args: &Args) -> Result<Solution, CliError> {
    DwellSolver::new(rates.clone())
        .solve_dwell(spec)
        .map_err(|e| locate(args, e))
}

fn print(sol: &Solution, format: Format, median: Option<f64>) {
    if !matches!(sol.status, Status::Optimal | Status::BudgetBinding) {
        eprintln!(
            "traycast: warning: the solve ended {} (KKT residual {:e}): the dwells are feasible but not proven optimal",
            sol.status.as_str(),
            sol.kkt_residual
        );
    }
    match format {
        Format::Text => {
            for x in &sol.dwell {
                println!("{}", exact(*x));
            }
        }
        Format::Json => {
            let mut obj = serde_json::json!({
                "goal": "fit",
                "dwell_s": sol.dwell,
                "objective": sol.objective,
                "status": sol.status.as_str(),
                "iterations": sol.iterations.total(),
                "kkt_residual": sol.kkt_residual,
            });
            if let Some(t) = median {
                obj["solve_seconds_median"] = serde_json::json!(t);
            }
            print_json(&obj);
        }
    }
}

/// Turns a solver input error into one naming the file and line the value came from.
fn locate(args: &Args, e: InputError) -> CliError {
    let vector_file = |field: Field| -> Option<&PathBuf> {
        match field {
            Field::Lower => args.lo.as_ref().or(args.target.as_ref()),
            Field::Upper => args.hi.as_ref().or(args.target.as_ref()),
            Field::Weights => args.weights.as_ref(),
            Field::Limits => args.upper.as_ref(),
            _ => None,
        }
    };
    match &e {
        InputError::NotFinite {
            field: Field::Rates,
            index: Some(i),
            config: Some(j),
            ..
        }
        | InputError::Magnitude {
            field: Field::Rates,
            index: Some(i),
            config: Some(j),
            ..
        }
        | InputError::NegativeRate {
            cell: i, config: j, ..
        } => CliError::at(&args.rates, i + 1, j + 1, &e),
        InputError::BandInverted { cell, .. } => {
            let file = args
                .lo
                .as_ref()
                .or(args.target.as_ref())
                .unwrap_or(&args.rates);
            CliError::at(file, cell + 1, 0, &e)
        }
        InputError::NonPositiveWeight { cell, .. } => match &args.weights {
            Some(w) => CliError::at(w, cell + 1, 0, &e),
            None => CliError::input(&e),
        },
        InputError::NotFinite {
            field,
            index: Some(i),
            ..
        }
        | InputError::Magnitude {
            field,
            index: Some(i),
            ..
        }
        | InputError::Negative {
            field,
            index: Some(i),
            ..
        } => match vector_file(*field) {
            Some(f) => CliError::at(f, i + 1, 0, &e),
            None => CliError::input(&e),
        },
        InputError::NotFinite {
            field: Field::Budget,
            ..
        }
        | InputError::Magnitude {
            field: Field::Budget,
            ..
        }
        | InputError::Negative {
            field: Field::Budget,
            ..
        } => CliError::input(format!("--budget: {e}")),
        InputError::NotFinite {
            field: Field::TimePenalty,
            ..
        }
        | InputError::Magnitude {
            field: Field::TimePenalty,
            ..
        }
        | InputError::Negative {
            field: Field::TimePenalty,
            ..
        } => CliError::input(format!("--time-penalty: {e}")),
        _ => CliError::input(&e),
    }
}
