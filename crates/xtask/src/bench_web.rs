//! `cargo xtask bench-web`: the workbench in headless Chromium through 200 scripted brush strokes on
//! a 48 × 32 tray with 96 configurations, against the same evaluation natively in the same run.

use crate::run::root;
use crate::web;
use std::time::Instant;
use traycast_plan::evaluate::{Evaluator, Options};
use traycast_plan::model::Plan;
use traycast_plan::wire;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

/// Runs the report.
pub fn run() -> Result<(), String> {
    web::build()?;
    let p = traycast_plan::demos::benchmark_tray();
    // Native reference: the same kind of edit (a target change) evaluated warm, 200 times.
    let mut ev = Evaluator::new();
    ev.evaluate(&p, Options::default())
        .map_err(|e| e.to_string())?;
    // The same 200 target edits for both paths; median milliseconds.
    let mut timed =
        |path: &mut dyn FnMut(&mut Evaluator, &Plan) -> Result<(), String>| -> Result<f64, String> {
            let mut times = Vec::new();
            for k in 0..200 {
                let mut q = p.clone();
                let i = (k * 37) % q.food.len();
                q.zone[i] = 1 + (q.zone[i] % 2);
                let t = Instant::now();
                path(&mut ev, &q)?;
                times.push(t.elapsed().as_secs_f64() * 1e3);
            }
            Ok(median(times))
        };
    let native = timed(&mut |ev, q| {
        ev.evaluate(q, Options::default())
            .map(|_| ())
            .map_err(|e| e.to_string())
    })?;
    let native_quick = timed(&mut |ev, q| ev.quick(q).map(|_| ()).map_err(|e| e.to_string()))?;
    let addr = web::serve_background(root().join("dist"), 0)?;
    let url = format!("{addr}#{}", wire::to_link(&p));
    let out = std::process::Command::new("node")
        .arg(root().join("tests/e2e/bench.mjs"))
        .env("TRAYCAST_URL", &url)
        .output()
        .map_err(|e| format!("cannot start node: {e}"))?;
    if !out.status.success() {
        return Err(format!(
            "browser benchmark failed: {}",
            String::from_utf8_lossy(&out.stderr)
        ));
    }
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).map_err(|e| e.to_string())?;
    let wasm = std::fs::read_dir(root().join("dist"))
        .map_err(|e| e.to_string())?
        .flatten()
        .find(|e| e.path().extension().is_some_and(|x| x == "wasm"))
        .ok_or("no wasm in dist/")?
        .path();
    let raw = std::fs::read(&wasm).map_err(|e| e.to_string())?;
    let gz = miniz_oxide::deflate::compress_to_vec(&raw, 9).len();
    let f = |k: &str, s: &str| v[k][s].as_f64().unwrap_or(f64::NAN);
    let frame = 1000.0 / 60.0;
    println!(
        "\n| measure | value | budget | ratio to budget | native, same run | browser ÷ native |\n|---|---|---|---|---|---|"
    );
    println!(
        "| solve + linear prediction alone (warm), median | {:.3} ms | 0.3 ms (solve) | {:.2} | {native_quick:.3} ms | {:.1}× |",
        f("quick", "median_ms"),
        f("quick", "median_ms") / 0.3,
        f("quick", "median_ms") / native_quick
    );
    println!(
        "| input → fast views redrawn (solve, linear maps, dwell bars), median | {:.2} ms | {frame:.1} ms | {:.2} | — | — |",
        f("input_to_frame", "median_ms"),
        f("input_to_frame", "median_ms") / frame
    );
    println!(
        "| input → fast views redrawn, 95th percentile | {:.2} ms | {frame:.1} ms | {:.2} | — | — |",
        f("input_to_frame", "p95_ms"),
        f("input_to_frame", "p95_ms") / frame
    );
    println!(
        "| full update after strokes pause (time course, verdicts, slow views), median / p95 | {:.2} / {:.2} ms | 50 ms (simulation) | {:.2} | — | — |",
        f("full_frame", "median_ms"),
        f("full_frame", "p95_ms"),
        f("full_frame", "median_ms") / 50.0
    );
    println!(
        "| full evaluation (warm solve + time course ≈ the simulation), median | {:.2} ms | 50 ms (simulation) | {:.2} | {native:.2} ms | {:.1}× |",
        f("evaluate", "median_ms"),
        f("evaluate", "median_ms") / 50.0,
        f("evaluate", "median_ms") / native
    );
    println!(
        "| wasm, raw / gzip (deflate -9) | {:.0} KB / {:.0} KB | 500 KB gzip | {:.2} | — | — |",
        raw.len() as f64 / 1e3,
        gz as f64 / 1e3,
        gz as f64 / 500e3
    );
    println!(
        "| first solved view after load | {:.0} ms | — | — | — | — |",
        v["first_solved_view_ms"].as_f64().unwrap_or(f64::NAN)
    );
    println!(
        "\n({} redraws measured over 200 strokes)",
        v["input_to_frame"]["count"]
    );
    Ok(())
}
