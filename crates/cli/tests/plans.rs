//! Plan commands end to end.

mod common;

use common::{scratch, traycast};

#[test]
fn demo_solve_link_open_round_trip() {
    let dir = scratch("plans");
    let (code, list, _) = traycast(&["demo"]);
    assert_eq!(code, 0);
    assert_eq!(list.lines().count(), 5);
    let plan = dir.join("plan.json");
    let p = plan.to_str().unwrap();
    assert_eq!(traycast(&["demo", "side-by-side", "--out", p]).0, 0);
    let (code, out, err) = traycast(&["solve", p, "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["dwell_s"].as_array().unwrap().len(), 48);
    assert!(v["cautions"].as_array().unwrap().len() >= 5);
    let (code, table, _) = traycast(&["solve", p]);
    assert_eq!(code, 0);
    assert!(table.contains("Cautions") && table.contains("thermometer"));
    let (_, link, _) = traycast(&["link", p]);
    let back = dir.join("back.json");
    let url = format!("http://127.0.0.1:8080/#{}", link.trim());
    assert_eq!(
        traycast(&["open", &url, "--out", back.to_str().unwrap()]).0,
        0
    );
    assert_eq!(
        std::fs::read_to_string(&plan).unwrap(),
        std::fs::read_to_string(&back).unwrap()
    );
    let csv = dir.join("course.csv");
    let sched = dir.join("schedule.csv");
    assert_eq!(
        traycast(&[
            "simulate",
            p,
            "--out",
            csv.to_str().unwrap(),
            "--schedule",
            sched.to_str().unwrap()
        ])
        .0,
        0
    );
    assert!(
        std::fs::read_to_string(&csv)
            .unwrap()
            .contains("time_s,item,min_c,mean_c,max_c")
    );
    assert!(
        std::fs::read_to_string(&sched)
            .unwrap()
            .contains("step,configuration,start_s,duration_s")
    );
}

#[test]
fn bad_plans_and_links_exit_2_with_one_line() {
    let dir = scratch("badplans");
    let bad = dir.join("bad.json");
    std::fs::write(
        &bad,
        "{\n  \"format\": \"traycast-plan\",\n  \"version\": 1,\n  oops\n}",
    )
    .unwrap();
    let (code, _, err) = traycast(&["solve", bad.to_str().unwrap()]);
    assert_eq!(code, 2);
    assert!(err.contains("bad.json:4:"), "{err}");
    let (code, _, err) = traycast(&["open", "tc1.@@@"]);
    assert_eq!(code, 2);
    assert_eq!(err.lines().count(), 1);
    let (code, _, err) = traycast(&["demo", "nope"]);
    assert_eq!(code, 2);
    assert!(err.contains("lunch-tray"));
}

#[test]
fn calibrate_writes_a_library_with_errors_and_a_quality_report() {
    let dir = scratch("calibrate");
    let path = |name: &str| dir.join(name).to_str().unwrap().to_string();
    let (plan, runs, lib, probes) = (
        path("plan.json"),
        path("runs.csv"),
        path("lib.json"),
        path("probes.csv"),
    );
    let (code, _, err) = traycast(&["demo", "side-by-side", "--out", &plan, "--runs", &runs]);
    assert_eq!(code, 0, "{err}");
    let (code, report, err) = traycast(&[
        "calibrate",
        &runs,
        "--layout",
        &plan,
        "--out",
        &lib,
        "--probes",
        &probes,
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(report.contains("median r²") && report.contains("repeatability"));
    assert!(
        report.contains("thermometer"),
        "the usual caution is printed"
    );
    let library = std::fs::read_to_string(&lib).unwrap();
    assert!(library.contains("\"rate_se\"") && library.contains("\"basis\": \"thawed\""));
    let table = std::fs::read_to_string(&probes).unwrap();
    assert!(
        table
            .lines()
            .nth(1)
            .unwrap()
            .starts_with("run,config,row,col")
    );
    // The plan solved on the calibrated library shows intervals.
    let text = std::fs::read_to_string(&plan).unwrap();
    let v: serde_json::Value = serde_json::from_str(&library).unwrap();
    let name = v["name"].as_str().unwrap();
    let mut doc: serde_json::Value = serde_json::from_str(&text).unwrap();
    doc["maps"] = serde_json::json!({ "source": "library", "seed": 0, "library": name });
    let on_lib = path("on-lib.json");
    std::fs::write(&on_lib, serde_json::to_string(&doc).unwrap()).unwrap();
    let (code, table, err) = traycast(&["solve", &on_lib, "--library", &lib]);
    assert_eq!(code, 0, "{err}");
    assert!(
        table.contains("95 % joint bounds: the maps' errors, oven power ±15 %, start ±2 K"),
        "{table}"
    );
    // A malformed file is refused naming the file and line, and writes nothing.
    let mut lines: Vec<String> = std::fs::read_to_string(&runs)
        .unwrap()
        .lines()
        .map(str::to_string)
        .collect();
    lines[9] = "c0,0,NaN,2,2,5.0".into();
    let bad = path("bad.csv");
    std::fs::write(&bad, lines.join("\n")).unwrap();
    let out = path("never.json");
    let (code, _, err) = traycast(&["calibrate", &bad, "--layout", &plan, "--out", &out]);
    assert_eq!(code, 2);
    assert!(
        err.contains("bad.csv:10:") && err.contains("not a number"),
        "{err}"
    );
    assert!(!std::path::Path::new(&out).exists());
    // °F needs the explicit option.
    lines[9] = std::fs::read_to_string(&runs)
        .unwrap()
        .lines()
        .nth(9)
        .unwrap()
        .into();
    lines[3] = "run,config,time_s,row,col,temp_f".into();
    std::fs::write(&bad, lines.join("\n")).unwrap();
    let (code, _, err) = traycast(&["calibrate", &bad, "--layout", &plan, "--out", &out]);
    assert_eq!(code, 2);
    assert!(
        err.contains("bad.csv:4:") && err.contains("--fahrenheit"),
        "{err}"
    );
    std::fs::remove_dir_all(&dir).ok();
}

/// One command line: every command that prints results takes `--format json` and prints one JSON
/// document; dwells are `dwell_s` and statuses are spelled as the solver spells them everywhere.
#[test]
fn every_result_command_speaks_json() {
    let dir = scratch("json");
    let path = |name: &str| dir.join(name).to_str().unwrap().to_string();
    let (plan, runs, lib, curves) = (
        path("plan.json"),
        path("runs.csv"),
        path("lib.csv"),
        path("curves.csv"),
    );
    assert_eq!(
        traycast(&["demo", "side-by-side", "--out", &plan, "--runs", &runs]).0,
        0
    );
    let json = |args: &[&str]| -> serde_json::Value {
        let (code, out, err) = traycast(&[args, &["--format", "json"]].concat());
        assert_eq!(code, 0, "{args:?}: {err}");
        serde_json::from_str(&out).unwrap_or_else(|e| panic!("{args:?}: {e}\n{out}"))
    };
    assert_eq!(json(&["demo"])["demos"].as_array().unwrap().len(), 5);
    let solved = json(&["solve", &plan]);
    assert!(solved["dwell_s"].is_array() && solved["status"].is_string());
    let cal = json(&["calibrate", &runs, "--layout", &plan, "--out", &lib]);
    assert!(
        cal["configurations"].as_array().unwrap().len() == 48,
        "{cal}"
    );
    let checked = json(&["library", "check", &lib]);
    assert_eq!(checked["valid"], true);
    assert_eq!(checked["content_hash"], cal["library"]["content_hash"]);
    let sim = json(&["simulate", &plan, "--out", &curves]);
    assert!(sim["frames"].as_u64().unwrap() > 10);
    // Text output never prints a status in the program's internal spelling.
    let (_, text, _) = traycast(&["solve", &plan]);
    assert!(
        !text.contains("BudgetBinding") && !text.contains("Optimal"),
        "{text}"
    );
}

/// `library export` writes the maps a plan is evaluated on, and they read back as a library.
#[test]
fn library_export_writes_the_plan_maps() {
    let dir = scratch("export");
    let plan = dir.join("plan.json").display().to_string();
    let maps = dir.join("maps.csv").display().to_string();
    assert_eq!(traycast(&["demo", "lunch-tray", "--out", &plan]).0, 0);
    let (code, _, err) = traycast(&["library", "export", &plan, "--out", &maps]);
    assert_eq!(code, 0, "{err}");
    let text = std::fs::read_to_string(&maps).unwrap();
    assert!(text.starts_with("# traycast-maps 1"), "{text:.200}");
    let (code, out, err) = traycast(&["library", "check", &maps]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("valid"));
}

/// `batch` evaluates every plan, on 1 and on 2 threads alike, and a bad plan is a line of its
/// own, not the end of the batch (exit 2 after writing everything).
#[test]
fn batch_evaluates_every_plan_and_reports_failures_in_line() {
    let dir = scratch("batch");
    let path = |name: &str| dir.join(name).display().to_string();
    let mut plans = Vec::new();
    for d in ["lunch-tray", "frozen-portion", "side-by-side"] {
        let p = path(&format!("{d}.json"));
        assert_eq!(traycast(&["demo", d, "--out", &p]).0, 0);
        plans.push(p);
    }
    let mut outputs = Vec::new();
    for threads in ["1", "2"] {
        let out = path(&format!("summary-{threads}.jsonl"));
        let args: Vec<&str> = ["batch"]
            .into_iter()
            .chain(plans.iter().map(String::as_str))
            .chain(["--out", &out, "--threads", threads])
            .collect();
        let (code, _, err) = traycast(&args);
        assert_eq!(code, 0, "{err}");
        assert!(err.contains("3 evaluations"), "{err}");
        outputs.push(std::fs::read_to_string(&out).unwrap());
    }
    assert_eq!(outputs[0], outputs[1], "thread count changes nothing");
    assert_eq!(outputs[0].lines().count(), 3);
    let csv = path("summary.csv");
    let bad = path("bad.json");
    std::fs::write(&bad, "{ not a plan").unwrap();
    let (code, _, err) = traycast(&["batch", &plans[0], &bad, "--out", &csv]);
    assert_eq!(code, 2, "{err}");
    let table = std::fs::read_to_string(&csv).unwrap();
    assert!(
        table.starts_with("plan_file,maps,status,total_s,item"),
        "{table}"
    );
    assert!(
        table
            .lines()
            .any(|l| l.contains("bad.json") && l.contains("line 1")),
        "{table}"
    );
    assert!(
        table.contains("thermometer"),
        "the cautions travel with the summary"
    );
}

/// `solve --objective` plans for another objective; the JSON carries the planning settings, the
/// simulation loop and the uniformity figures; `--other-oven` adds the same schedule on another
/// oven's library; a bad objective or placement with the band fit exits 2 naming the option.
#[test]
fn solve_plans_for_an_objective_and_other_ovens() {
    let dir = scratch("objectives");
    let plan = dir.join("plan.json");
    let p = plan.to_str().unwrap();
    assert_eq!(traycast(&["demo", "hot-lunch", "--out", p]).0, 0);
    let (code, out, err) = traycast(&[
        "solve",
        p,
        "--objective",
        "safe-minimum",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["planning"]["objective"], "safe-minimum");
    assert!(v["loop"]["passes"].as_u64().unwrap() >= 2, "{}", v["loop"]);
    assert!(v["items"][0]["uniformity"]["unsteered_linear"]["cv"].is_number());
    assert!(
        v["items"]
            .as_array()
            .unwrap()
            .iter()
            .all(|i| i["safe"] == true),
        "{}",
        v["items"]
    );

    let lib = dir.join("unit.json");
    let l = lib.to_str().unwrap();
    assert_eq!(traycast(&["library", "export", p, "--out", l]).0, 0);
    let (code, out, err) = traycast(&[
        "solve",
        p,
        "--other-oven",
        l,
        "--scenarios",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["other_ovens"]["ovens"].as_array().unwrap().len(), 1);
    assert_eq!(v["other_ovens"]["worst"].as_array().unwrap().len(), 3);
    // Five placements × three oven powers (the plan's ±15 %).
    assert_eq!(v["scenarios"]["names"].as_array().unwrap().len(), 15);
    let q = v["scenarios"]["items"][0]["quantile_k"].as_f64().unwrap();
    assert!(v["scenarios"]["items"][0]["least_k"].as_f64().unwrap() <= q);
    let least = v["scenarios"]["items"][0]["least_k"].as_f64().unwrap();
    assert!(least <= v["scenarios"]["items"][0]["median_k"].as_f64().unwrap());

    let (code, _, err) = traycast(&["solve", p, "--objective", "fastest"]);
    assert_eq!(code, 2);
    assert!(
        err.contains("--objective") && err.contains("safe-minimum"),
        "{err}"
    );
    let (code, _, err) = traycast(&["solve", p, "--placement"]);
    assert_eq!(code, 2);
    assert!(err.contains("placement"), "{err}");
}
