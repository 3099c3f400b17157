//! The commands that evaluate a plan: `solve` (dwells, zones, verdicts, baseline) and `simulate`
//! (the time course per food item, and the controller schedule).

use crate::error::CliError;
use crate::format::{Format, num, print_json};
use crate::plans::{load_library, load_plan, write};
use crate::progress;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use traycast_plan::Objective;
use traycast_plan::evaluate::{self, Evaluation, Options};
use traycast_plan::model::Plan;
use traycast_plan::wire;

/// Arguments of `traycast solve`.
#[derive(clap::Args)]
pub struct SolveArgs {
    /// Plan JSON file.
    pub plan: PathBuf,
    /// Map library (CSV or JSON) for plans that use one.
    #[arg(long)]
    pub library: Option<PathBuf>,
    /// `text` (a report) or `json` (the evaluation summary).
    #[arg(long, value_enum, default_value_t)]
    pub format: Format,
    /// Run the simulation in the loop (solve → simulate → correct → re-solve) for any objective;
    /// the safe minimum always runs it.
    #[arg(long)]
    pub refine: bool,
    /// Plan for this objective instead of the plan's own: `band-fit`, `safe-minimum`, `shortest`
    /// or `max-margin`.
    #[arg(long, value_name = "NAME")]
    pub objective: Option<String>,
    /// Also hold the hard limits with the food placed one cell off in each direction.
    #[arg(long)]
    pub placement: bool,
    /// Another oven of the same model (its map library, CSV or JSON): the schedule is also
    /// evaluated on it, and the worst outcome per food item reported. Repeatable.
    #[arg(long = "other-oven", value_name = "LIBRARY")]
    pub other_ovens: Vec<PathBuf>,
    /// Also simulate the schedule in every scenario — the food where planned and one cell off in
    /// each direction, the oven at nominal power and at the plan's power variation either way, and
    /// any --scenario-draws — and report each item's safety margin over them (least and where,
    /// the --quantile, median, largest).
    #[arg(long)]
    pub scenarios: bool,
    /// Draws of the rates from their standard errors in each scenario (calibrated maps only).
    #[arg(long, value_name = "N", default_value_t = 0, requires = "scenarios")]
    pub scenario_draws: usize,
    /// The quantile of the margin reported besides the least (0.05: the margin 95 % of the
    /// scenarios reach).
    #[arg(long, value_name = "Q", default_value_t = 0.05, requires = "scenarios")]
    pub quantile: f64,
    /// Solve so the hard limits hold on every --other-oven as well as on the plan's own
    /// (constrained objectives).
    #[arg(long, requires = "other_ovens")]
    pub hold_on_all: bool,
}

/// Arguments of `traycast simulate`.
#[derive(clap::Args)]
pub struct SimulateArgs {
    /// Plan JSON file.
    pub plan: PathBuf,
    /// Map library (CSV or JSON) for plans that use one.
    #[arg(long)]
    pub library: Option<PathBuf>,
    /// Where to write the curves: CSV of min/mean/max per food item over time.
    #[arg(long)]
    pub out: PathBuf,
    /// Also write the controller schedule CSV here.
    #[arg(long)]
    pub schedule: Option<PathBuf>,
    /// What to print when done: `text` or `json`.
    #[arg(long, value_enum, default_value_t)]
    pub format: Format,
}

/// Reads a plan (and its library) and evaluates it; with `hold_on`, the hard limits also hold on
/// those ovens' maps.
pub fn evaluate_file(
    plan_path: &Path,
    library: Option<&Path>,
    refine: bool,
    planning: Option<(Option<&str>, bool)>,
    hold_on: Vec<traycast_plan::library::MapLibrary>,
) -> Result<(Plan, Evaluation), CliError> {
    let mut plan = load_plan(plan_path)?;
    if let Some((objective, placement)) = planning {
        if let Some(name) = objective {
            plan.planning.objective =
                Objective::parse(name, "--objective").map_err(CliError::input)?;
        }
        plan.planning.placement |= placement;
        plan.validate()
            .map_err(|e| CliError::input(format!("--placement: {}", e.message)))?;
    }
    let lib = library.map(load_library).transpose()?;
    let spinner = progress::spinner("evaluating the plan");
    let mut ev = evaluate::Evaluator::with_library(lib);
    ev.hold_on(hold_on);
    let eval = ev
        .evaluate(&plan, Options { refine })
        .map_err(|e| CliError::at(plan_path, 0, 0, e))?;
    spinner.finish_and_clear();
    Ok((plan, eval))
}

/// `traycast solve PLAN [--library FILE] [--format text|json] [--refine]`.
pub fn solve(args: &SolveArgs) -> Result<(), CliError> {
    let others = args
        .other_ovens
        .iter()
        .map(|f| load_library(f))
        .collect::<Result<Vec<_>, _>>()?;
    let hold = if args.hold_on_all {
        others.clone()
    } else {
        Vec::new()
    };
    let (p, e) = evaluate_file(
        &args.plan,
        args.library.as_deref(),
        args.refine,
        Some((args.objective.as_deref(), args.placement)),
        hold,
    )?;
    let lib = args.library.as_deref().map(load_library).transpose()?;
    if !(0.0..=1.0).contains(&args.quantile) {
        return Err(CliError::input(format!(
            "--quantile: {} is not between 0 and 1",
            args.quantile
        )));
    }
    let set = traycast_plan::robustness::ScenarioSet {
        placement: true,
        power: p.variation.oven_power,
        rate_draws: args.scenario_draws,
        seed: 1,
    };
    let spread = args
        .scenarios
        .then(|| traycast_plan::robustness::safety_margins(&p, lib.as_ref(), &e.dwell, &set))
        .transpose()
        .map_err(|err| CliError::input(format!("--scenarios: {err}")))?;
    let across = (!others.is_empty())
        .then(|| evaluate::across_ovens(&p, &e.dwell, &others))
        .transpose()
        .map_err(|err| CliError::input(format!("--other-oven: {err}")))?;
    match args.format {
        Format::Json => {
            let mut v = traycast_plan::summary::to_json(&p, &e);
            if let Some(a) = &across {
                v["other_ovens"] = traycast_plan::summary::across_ovens_json(&p, a);
            }
            if let Some(m) = &spread {
                v["scenarios"] = traycast_plan::summary::scenarios_json(&p, m, args.quantile);
            }
            print_json(&v)
        }
        Format::Text => {
            print!("{}", report(&p, &e));
            if let Some(a) = &across {
                print!("{}", ovens_report(&p, &e, a));
            }
            if let Some(m) = &spread {
                println!(
                    "\nSafety margin over {} scenarios (placement, oven power ±{:.0} %{}; each judged at its own point, no allowance added; K):",
                    m.scenarios.len(),
                    100.0 * set.power,
                    if set.rate_draws > 0 {
                        format!(", {} rate draws", set.rate_draws)
                    } else {
                        String::new()
                    }
                );
                for (k, it) in p.items.iter().enumerate() {
                    let (lo, mid, hi, at) = m.spread(k);
                    println!(
                        "  {:<28} least {} ({at}), {:.0} % quantile {}, median {}, largest {}",
                        it.name,
                        num(lo, 1),
                        100.0 * args.quantile,
                        num(m.quantile(k, args.quantile), 1),
                        num(mid, 1),
                        num(hi, 1)
                    );
                }
            }
        }
    }
    Ok(())
}

/// A number for the simulation CSV: two decimals, or an empty field where there is no value.
fn exact2(v: f64) -> String {
    if v.is_finite() {
        format!("{v:.2}")
    } else {
        String::new()
    }
}

fn report(plan: &Plan, e: &Evaluation) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "{}", plan.name);
    let _ = writeln!(
        s,
        "Planned for: {} ({}){}",
        plan.planning.objective.as_str(),
        plan.planning.objective.words(),
        if plan.planning.placement {
            "; hard limits also held with the food one cell off"
        } else {
            ""
        }
    );
    let _ = writeln!(
        s,
        "Total heating {:.1} s in {} steps, then {:.0} s standing (solver: {})",
        e.total_s,
        e.schedule.steps.len(),
        plan.oven.standing_s,
        e.status.as_str()
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
        "\n{:<28} {:>7} {:>7} {:>7}  {:>8}  rule",
        "food item (°C after standing)", "coldest", "mean", "hottest", "margin K"
    );
    for (k, (it, r)) in plan.items.iter().zip(&e.items).enumerate() {
        let v = &r.verdict;
        let _ = writeln!(
            s,
            "{:<28} {:>7} {:>7} {:>7}  {:>8}  {}",
            it.name,
            num(r.min, 1),
            num(r.mean, 1),
            num(r.max, 1),
            num(v.margin, 1),
            v.binding.source,
        );
        // The item's safety card, the same lines the workbench and the report show.
        let card = traycast_plan::evaluate::SafetyCard::of(plan, e, k);
        for line in card.lines(&|t| format!("{} °C", num(t, 1)), &|d| format!("{d:+.1} K")) {
            let _ = writeln!(s, "    {line}");
        }
        if let Some(sp) = &r.spread {
            let _ = writeln!(
                s,
                "    {}: coldest {:.1}–{:.1}, mean {:.1}–{:.1}, warmest {:.1}–{:.1} °C; verdict judged on these bounds (nominal: {} {:+.1} K)",
                e.bounds_from.as_deref().unwrap_or("bounds"),
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
    let _ = writeln!(
        s,
        "\nUniformity (CV of the rise σ/(T̄ − T₀), population σ over the cells; max–min spread; share in band):"
    );
    let _ = writeln!(
        s,
        "{:<28} {:>22} {:>22} {:>22}",
        "food item", "steered, simulated", "steered, linear", "unsteered, linear"
    );
    for (it, u) in plan.items.iter().zip(&e.uniformity) {
        let cell = |x: &traycast_plan::evaluate::Uniformity| {
            format!(
                "{} {:>5} K {:>4}",
                num(x.cv, 2),
                num(x.spread_k, 1),
                if x.in_band.is_finite() {
                    format!("{:.0}%", 100.0 * x.in_band)
                } else {
                    "—".into()
                }
            )
        };
        let _ = writeln!(
            s,
            "{:<28} {:>22} {:>22} {:>22}",
            it.name,
            cell(&u.steered_simulated),
            cell(&u.steered_linear),
            cell(&u.unsteered_linear)
        );
    }
    if let Some(r) = &e.refinement {
        let _ = writeln!(
            s,
            "Simulation loop: {} solves, {} (last change {} K, tolerance {} K); RMS after standing {:.2} → {:.2} K ({}); safety gap {} K",
            r.passes,
            if r.converged {
                "settled"
            } else {
                "stopped at the cap"
            },
            num(r.change_k, 2),
            r.tolerance_k,
            r.rms_before,
            r.rms_after,
            if r.kept {
                "a later pass kept"
            } else {
                "the first solve kept"
            },
            num(r.safety_gap_k, 1)
        );
        if let Some(why) = &r.stopped {
            let _ = writeln!(
                s,
                "  The loop stopped early, keeping the best plan so far: {why}"
            );
        }
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

/// The schedule on the other ovens: each item's verdict and margin per oven, and the worst.
fn ovens_report(plan: &Plan, e: &Evaluation, a: &evaluate::AcrossOvens) -> String {
    let mut s = String::from(
        "\nThe same schedule on other ovens (margin K at the judged point; the plan's own oven first):\n",
    );
    let _ = write!(s, "{:<28} {:>14}", "food item", "this oven");
    for o in &a.ovens {
        let _ = write!(s, " {:>14}", o.library.chars().take(14).collect::<String>());
    }
    let _ = writeln!(s, "  worst");
    for (k, it) in plan.items.iter().enumerate() {
        let cell = |v: &traycast_thermal::safety::Verdict| {
            format!(
                "{} {}",
                if v.safe { "meets" } else { "fails" },
                num(v.margin, 1)
            )
        };
        let _ = write!(s, "{:<28} {:>14}", it.name, cell(&e.items[k].verdict));
        for o in &a.ovens {
            let _ = write!(s, " {:>14}", cell(&o.items[k].verdict));
        }
        let w = &a.ovens[a.worst[k]];
        let _ = writeln!(s, "  {} ({})", cell(&w.items[k].verdict), w.library);
    }
    s
}

/// `traycast simulate PLAN --out CURVES.csv [--schedule OUT] [--format text|json]`.
pub fn simulate(args: &SimulateArgs) -> Result<(), CliError> {
    let (p, e) = evaluate_file(&args.plan, args.library.as_deref(), false, None, Vec::new())?;
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
            let _ = writeln!(
                out,
                "{time:.1},{name},{},{},{}",
                exact2(c.min[t]),
                exact2(c.mean[t]),
                exact2(c.max[t])
            );
        }
    }
    write(&args.out, &out)?;
    if let Some(path) = &args.schedule {
        write(path, &wire::schedule_csv(&p, &e.schedule))?;
    }
    match args.format {
        Format::Text => println!(
            "wrote {} frames for {} food items to {}",
            e.course.times.len(),
            p.items.len(),
            args.out.display()
        ),
        Format::Json => print_json(&serde_json::json!({
            "frames": e.course.times.len(),
            "items": p.items.len(),
            "heating_s": e.course.heating_seconds,
            "standing_s": e.course.standing_seconds,
            "out": args.out.display().to_string(),
            "cautions": e.cautions,
        })),
    }
    Ok(())
}
