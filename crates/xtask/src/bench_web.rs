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
    // The hot-lunch demo planned for the safe minimum (the simulation in the loop), after its band
    // fit, as the browser does it: median of 5.
    let lunch = traycast_plan::demos::demo("hot-lunch").ok_or("no hot-lunch demo")?;
    let mut safe = lunch.clone();
    safe.planning.objective = traycast_plan::Objective::SafeMinimum;
    let mut safe_times = Vec::new();
    for _ in 0..5 {
        let mut ev = Evaluator::new();
        ev.evaluate(&lunch, Options::default())
            .map_err(|e| e.to_string())?;
        let t = Instant::now();
        ev.evaluate(&safe, Options::default())
            .map_err(|e| e.to_string())?;
        safe_times.push(t.elapsed().as_secs_f64() * 1e3);
    }
    let native_safe = median(safe_times);
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
    println!(
        "\n| measure | value | budget | ratio to budget | native, same run | browser ÷ native |\n|---|---|---|---|---|---|"
    );
    println!(
        "| solve + linear prediction alone (warm), median | {:.3} ms | 0.3 ms | {:.2} | {native_quick:.3} ms | {:.1}× |",
        f("quick", "median_ms"),
        f("quick", "median_ms") / 0.3,
        f("quick", "median_ms") / native_quick
    );
    for (what, key, budget) in [
        ("median", "median_ms", 4.0),
        ("95th percentile", "p95_ms", 8.0),
    ] {
        println!(
            "| input → fast views redrawn (solve, linear maps, dwell bars), {what} | {:.2} ms | {budget} ms | {:.2} | — | — |",
            f("input_to_frame", key),
            f("input_to_frame", key) / budget
        );
    }
    println!(
        "| of which: tray editor drawn / linear and off-band maps and dwell bars drawn, median | {:.2} / {:.2} ms | — | — | — | — |",
        f("draw_tray", "median_ms"),
        f("draw_maps", "median_ms")
    );
    println!(
        "| full evaluation in the worker, its own time (warm solve, time course, bounds, kills), median | {:.2} ms | — | — | {native:.2} ms | {:.1}× |",
        f("worker", "median_ms"),
        f("worker", "median_ms") / native
    );
    println!(
        "| pause → full evaluation back on the page (queue, worker, transfer), median | {:.2} ms | 100 ms | {:.2} | — | — |",
        f("evaluate", "median_ms"),
        f("evaluate", "median_ms") / 100.0
    );
    println!(
        "| pause → slow views drawn (simulated map, chart), median / p95 | {:.2} / {:.2} ms | 100 ms | {:.2} | — | — |",
        f("full_frame", "median_ms"),
        f("full_frame", "p95_ms"),
        f("full_frame", "median_ms") / 100.0
    );
    println!(
        "| safe minimum with the simulation in the loop (hot-lunch demo, {} solves), in the worker / back on the page | {:.1} / {:.1} ms | 300 ms | {:.2} | {native_safe:.1} ms | {:.1}× |",
        v["safe_minimum"]["passes"],
        v["safe_minimum"]["worker_ms"].as_f64().unwrap_or(f64::NAN),
        v["safe_minimum"]["round_trip_ms"]
            .as_f64()
            .unwrap_or(f64::NAN),
        v["safe_minimum"]["round_trip_ms"]
            .as_f64()
            .unwrap_or(f64::NAN)
            / 300.0,
        v["safe_minimum"]["worker_ms"].as_f64().unwrap_or(f64::NAN) / native_safe
    );
    println!(
        "| wasm, raw / gzip (deflate -9), one module for the page and the worker | {:.0} KB / {:.0} KB | 450 KB gzip | {:.2} | — | — |",
        raw.len() as f64 / 1e3,
        gz as f64 / 1e3,
        gz as f64 / 450e3
    );
    let first = v["first_solved_view_ms"].as_f64().unwrap_or(f64::NAN);
    println!(
        "| first solved view after load | {first:.0} ms | 400 ms | {:.2} | — | — |",
        first / 400.0
    );
    println!(
        "\n({} redraws measured over 200 strokes)",
        v["input_to_frame"]["count"]
    );
    Ok(())
}
