//! `cargo xtask bench-solver`: the solver's criterion benchmarks, and SciPy's `nnls` timed side by
//! side with `traycast nnls --repeat` on the same problems in the same run, printed as ratios.

use crate::run::{cargo, ensure_python_module, output, root};
use std::fmt::Write as _;
use std::path::Path;
use traycast_solver::synthetic::{painted_tray, tray_shape};

const SIZES: [(usize, usize); 4] = [(96, 16), (384, 48), (1536, 96), (2048, 256)];

fn write_csv(
    path: &Path,
    rows: usize,
    cols: usize,
    get: impl Fn(usize, usize) -> f64,
) -> Result<(), String> {
    let mut s = String::new();
    for i in 0..rows {
        let line: Vec<String> = (0..cols).map(|j| format!("{:e}", get(i, j))).collect();
        let _ = writeln!(s, "{}", line.join(","));
    }
    std::fs::write(path, s).map_err(|e| format!("{}: {e}", path.display()))
}

fn field(json: &str, key: &str) -> Result<f64, String> {
    let v: serde_json::Value =
        serde_json::from_str(json).map_err(|e| format!("bad JSON {json}: {e}"))?;
    v[key].as_f64().ok_or_else(|| format!("no {key} in {json}"))
}

/// Criterion's median estimate (ns) for one benchmark id.
fn criterion_median(id: &str) -> Option<f64> {
    let path = root()
        .join("target/criterion/solver")
        .join(id.replace('/', "_"))
        .join("new/estimates.json");
    let text = std::fs::read_to_string(path).ok()?;
    let v: serde_json::Value = serde_json::from_str(&text).ok()?;
    v["median"]["point_estimate"].as_f64()
}

/// Runs everything and prints the table; `reuse` skips criterion and reads its last results.
pub fn solver(reuse: bool) -> Result<(), String> {
    let root = root();
    std::env::set_current_dir(&root).map_err(|e| e.to_string())?;
    ensure_python_module("scipy", "scipy>=1.16")?;
    cargo(&["build", "--release", "--package", "traycast-cli"])?;
    if !reuse {
        cargo(&["bench", "--package", "traycast-solver", "--bench", "solver"])?;
    }
    let exe = root.join("target/release/traycast");
    let dir = root.join("target/bench-solver");
    std::fs::create_dir_all(&dir).map_err(|e| e.to_string())?;

    let mut table = String::from(
        "| cells × configs | traycast cold (Gram included) | SciPy nnls | SciPy ÷ traycast | objective rel. diff | warm stroke, dwell only | warm stroke, with predictions | warm stroke, bands | 10-row rate update | cache rebuild | rebuild ÷ update |\n|---|---|---|---|---|---|---|---|---|---|---|\n",
    );
    for (m, n) in SIZES {
        let (w, h) = tray_shape(m);
        let tray = painted_tray(w, h, n, 42);
        let a = dir.join(format!("A-{m}x{n}.csv"));
        let y = dir.join(format!("y-{m}x{n}.csv"));
        write_csv(&a, m, n, |i, j| tray.rates.get(i, j))?;
        write_csv(&y, m, 1, |i, _| tray.target[i])?;
        let reps = if m * n > 200_000 { "15" } else { "40" };
        let (a_s, y_s) = (a.to_str().unwrap(), y.to_str().unwrap());
        let ours = output(
            exe.to_str().unwrap(),
            &[
                "nnls", "--rates", a_s, "--target", y_s, "--format", "json", "--repeat", reps,
            ],
        )?;
        let theirs = output(
            "python3",
            &[
                root.join("scripts/scipy_nnls_time.py").to_str().unwrap(),
                a_s,
                y_s,
                reps,
            ],
        )?;
        let (t_ours, t_scipy) = (
            field(&ours, "solve_seconds_median")?,
            field(&theirs, "solve_seconds_median")?,
        );
        let (f_ours, f_scipy) = (field(&ours, "objective")?, field(&theirs, "objective")?);
        let label = format!("{m}x{n}");
        let crit = |name: &str| criterion_median(&format!("{name}/{label}"));
        let us = |v: Option<f64>| v.map_or("–".into(), |ns| format!("{:.1} µs", ns / 1e3));
        let ratio = match (crit("cache-rebuild"), crit("rates-update-10")) {
            (Some(r), Some(u)) => format!("{:.0}×", r / u),
            _ => "–".into(),
        };
        let _ = writeln!(
            table,
            "| {m} × {n} | {:.3} ms | {:.3} ms | {:.1}× | {:.1e} | {} | {} | {} | {} | {} | {ratio} |",
            t_ours * 1e3,
            t_scipy * 1e3,
            t_scipy / t_ours,
            (f_ours - f_scipy).abs() / f_scipy.abs().max(1e-300),
            us(crit("warm-stroke-point-dwell-only")),
            us(crit("warm-stroke-point")),
            us(crit("warm-stroke-band")),
            us(crit("rates-update-10")),
            us(crit("cache-rebuild")),
        );
    }
    let versions = output(
        "python3",
        &[
            "-c",
            "import scipy, numpy; print(scipy.__version__, numpy.__version__)",
        ],
    )?;
    println!("\n{table}\nSciPy/NumPy: {}", versions.trim());
    Ok(())
}
