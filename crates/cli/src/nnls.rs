//! `traycast nnls`: the low-level solve for measured data in spreadsheets.

use crate::error::CliError;
use crate::format::{Format, exact, print_json};
use crate::numfile::{Allow, read_matrix, read_vector};
use std::path::{Path, PathBuf};
use std::time::Instant;
use traycast_solver::{DwellSolver, Field, InputError, Rates, Solution, Spec, Status};

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
