//! Plan commands end to end.

use std::process::Command;

fn traycast(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_traycast"))
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8(out.stdout).unwrap(),
        String::from_utf8(out.stderr).unwrap(),
    )
}

#[test]
fn demo_solve_link_open_round_trip() {
    let dir = std::env::temp_dir().join(format!("traycast-plans-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let (code, list, _) = traycast(&["demo"]);
    assert_eq!(code, 0);
    assert_eq!(list.lines().count(), 3);
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
            "--csv",
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
    let dir = std::env::temp_dir().join(format!("traycast-badplans-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
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
