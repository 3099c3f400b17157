//! `traycast nnls` end to end: files in, numbers out, errors that name the place.

mod common;

use common::scratch;

fn run(args: &[&str]) -> (i32, String, String) {
    common::traycast(&[&["nnls"], args].concat())
}

fn fmt(v: &serde_json::Value) -> String {
    match v {
        serde_json::Value::String(s) => s.clone(),
        other => other.to_string(),
    }
}

/// Writes a fixture case's rate matrix (its `m` × `n` rates) as A.csv in `dir`; returns the path.
fn write_rates(dir: &std::path::Path, case: &serde_json::Value) -> String {
    let (m, n) = (
        case["m"].as_u64().unwrap() as usize,
        case["n"].as_u64().unwrap() as usize,
    );
    let a: Vec<f64> = case["rates_row_major"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect();
    let rows: Vec<String> = (0..m)
        .map(|i| {
            a[i * n..(i + 1) * n]
                .iter()
                .map(|v| format!("{v:e}"))
                .collect::<Vec<_>>()
                .join(",")
        })
        .collect();
    let p = dir.join("A.csv");
    std::fs::write(&p, rows.join("\n") + "\n").unwrap();
    p.to_str().unwrap().to_string()
}

/// Writes the fixture case's array `key` one value per line as `name` in `dir`.
fn write_column(dir: &std::path::Path, name: &str, case: &serde_json::Value, key: &str) -> String {
    let lines: Vec<String> = case[key].as_array().unwrap().iter().map(fmt).collect();
    let p = dir.join(name);
    std::fs::write(&p, lines.join("\n") + "\n").unwrap();
    p.to_str().unwrap().to_string()
}

/// Every SciPy fixture case through the command line (see crates/solver/tests/scipy_reference.rs for
/// the fixture's provenance: SciPy 1.17.1 nnls / lsq_linear bvls, recorded in the file).
#[test]
fn agrees_with_scipy_fixtures() {
    let text = include_str!("../../../tests/fixtures/solver/scipy_reference.json");
    let fixture: serde_json::Value = serde_json::from_str(text).unwrap();
    let dir = scratch("scipy");
    for case in fixture["cases"].as_array().unwrap() {
        let write = |name: &str, key: &str| write_column(&dir, name, case, key);
        let ra = write_rates(&dir, case);
        let n = case["n"].as_u64().unwrap() as usize;
        let lo = write("lo.csv", "lo");
        let hi = write("hi.csv", "hi");
        let w = write("w.csv", "weights");
        let u = write("u.csv", "upper");
        let (code, out, err) = run(&[
            "--rates",
            &ra,
            "--lo",
            &lo,
            "--hi",
            &hi,
            "--weights",
            &w,
            "--upper",
            &u,
            "--format",
            "json",
        ]);
        assert_eq!(code, 0, "{err}");
        let got: serde_json::Value = serde_json::from_str(&out).unwrap();
        let ours = got["objective"].as_f64().unwrap();
        let theirs = case["objective"].as_f64().unwrap();
        let scale = 1.0 + theirs.abs();
        assert!(
            ours <= theirs + 1e-7 * scale,
            "{}: ours {ours} scipy {theirs}",
            case["name"]
        );
        assert!(
            theirs - ours <= 1e-4 * scale,
            "{}: ours {ours} scipy {theirs}",
            case["name"]
        );
        assert_eq!(got["dwell_s"].as_array().unwrap().len(), n);
        assert!(got["kkt_residual"].as_f64().unwrap() < 1e-6);
    }
}

/// Every SciPy `linprog` (HiGHS) fixture case through `--objective shortest|max-margin` (see
/// crates/solver/tests/linprog_reference.rs for the provenance: SciPy 1.17.1, recorded in the file).
/// Infeasible cases exit 3 naming a file and line or the budget.
#[test]
fn objectives_agree_with_scipy_linprog_highs() {
    let text = include_str!("../../../tests/fixtures/solver/linprog_reference.json");
    let fixture: serde_json::Value = serde_json::from_str(text).unwrap();
    let dir = scratch("linprog");
    for case in fixture["cases"].as_array().unwrap() {
        let write = |name: &str, key: &str| write_column(&dir, name, case, key);
        let ra = write_rates(&dir, case);
        let (lo, hi, u) = (
            write("lo.csv", "floor"),
            write("hi.csv", "ceiling"),
            write("u.csv", "upper"),
        );
        let goal = case["goal"].as_str().unwrap().replace('_', "-");
        let budget = case["budget"].as_f64().map(|b| format!("{b:e}"));
        let mut args = vec![
            "--rates",
            &ra,
            "--lo",
            &lo,
            "--hi",
            &hi,
            "--upper",
            &u,
            "--objective",
            &goal,
            "--format",
            "json",
        ];
        if let Some(b) = &budget {
            args.extend(["--budget", b]);
        }
        let (code, out, err) = run(&args);
        if case["status"] == "infeasible" {
            assert_eq!(code, 3, "{}: {err}", case["name"]);
            assert!(err.contains("cannot be met"), "{err}");
            assert!(err.contains(".csv") || err.contains("--budget"), "{err}");
            continue;
        }
        assert_eq!(code, 0, "{}: {err}", case["name"]);
        let got: serde_json::Value = serde_json::from_str(&out).unwrap();
        let ours = got["objective"].as_f64().unwrap();
        let theirs = case["value"].as_f64().unwrap();
        assert!(
            (ours - theirs).abs() <= 1e-6 * (1.0 + theirs.abs()),
            "{}: ours {ours} highs {theirs}",
            case["name"]
        );
        assert_eq!(got["goal"], case["goal"]);
        assert_eq!(got["status"], "optimal");
        assert!(got["certificate"]["residual"].as_f64().unwrap() < 1e-6);
    }
}

#[test]
fn text_output_is_plain_decimals_that_read_back_and_json_has_the_documented_fields() {
    let dir = scratch("format");
    // MathWorks lsqnonneg documentation example (see crates/solver/tests/worked_examples.rs).
    std::fs::write(
        dir.join("A.csv"),
        "0.0372,0.2869\n0.6861,0.7071\n0.6233,0.6245\n0.6344,0.6170\n",
    )
    .unwrap();
    std::fs::write(dir.join("y.csv"), "0.8587\n0.1781\n0.0747\n0.8405\n").unwrap();
    let a = dir.join("A.csv");
    let y = dir.join("y.csv");
    let (code, out, _) = run(&[
        "--rates",
        a.to_str().unwrap(),
        "--target",
        y.to_str().unwrap(),
    ]);
    assert_eq!(code, 0);
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(lines.len(), 2);
    // Plain decimals, never exponent form, with every digit the value has.
    assert!(!lines[1].contains(['e', 'E']), "{}", lines[1]);
    assert!(lines[1].len() >= 12, "{}", lines[1]);
    assert!((lines[1].parse::<f64>().unwrap() - 0.6929344).abs() < 1e-6);
    let (_, out, _) = run(&[
        "--rates",
        a.to_str().unwrap(),
        "--target",
        y.to_str().unwrap(),
        "--format",
        "json",
        "--repeat",
        "3",
    ]);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    for key in [
        "dwell_s",
        "objective",
        "status",
        "iterations",
        "kkt_residual",
        "solve_seconds_median",
    ] {
        assert!(v.get(key).is_some(), "missing {key}");
    }
    assert_eq!(v["status"], "optimal");
}

#[test]
fn bad_files_exit_2_naming_file_line_and_column() {
    let dir = scratch("errors");
    let put = |name: &str, text: &str| {
        let p = dir.join(name);
        std::fs::write(&p, text).unwrap();
        p.to_str().unwrap().to_string()
    };
    let good = put("good.csv", "0.1,0.2\n0.3,0.4\n");
    let y = put("y.csv", "10\n20\n");
    let nan = put("nan.csv", "0.1,0.2\n0.3,NaN\n");
    let neg = put("neg.csv", "0.1,-0.2\n0.3,0.4\n");
    let ragged = put("ragged.csv", "0.1,0.2\n0.3\n");
    let short = put("short.csv", "10\n");
    let lo = put("lo.csv", "5\n30\n");
    let hi = put("hi.csv", "6\n20\n");
    let u = put("u.csv", "1\n-1\n");
    let cases: [(Vec<&str>, &str); 7] = [
        (vec!["--rates", &nan, "--target", &y], "nan.csv:2:2:"),
        (vec!["--rates", &neg, "--target", &y], "neg.csv:1:2:"),
        (vec!["--rates", &ragged, "--target", &y], "ragged.csv:2:"),
        (
            vec!["--rates", &good, "--target", &short],
            "short.csv: has 1 lines",
        ),
        (
            vec!["--rates", &good, "--lo", &lo, "--hi", &hi],
            "lo.csv:2:",
        ),
        (
            vec!["--rates", &good, "--target", &y, "--upper", &u],
            "u.csv:2:",
        ),
        (
            vec!["--rates", &good, "--target", &y, "--budget", "-3"],
            "--budget",
        ),
    ];
    for (args, expect) in cases {
        let (code, out, err) = run(&args);
        assert_eq!(code, 2, "{args:?}");
        assert!(out.is_empty());
        assert_eq!(err.lines().count(), 1, "{err}");
        assert!(err.contains(expect), "{err} should contain {expect}");
    }
}

/// Regressions from the hostile-input run (cases 5, 6 and 7): each exits 2 naming what is wrong,
/// before anything large is allocated.
#[test]
fn hostile_sizes_and_values_exit_2_naming_the_place() {
    let dir = scratch("hostile");
    let write = |name: &str, text: &str| {
        let p = dir.join(name);
        std::fs::write(&p, text).unwrap();
        p.display().to_string()
    };
    let small = write("A.csv", "1,2\n3,1\n");
    let y = write("y.csv", "1\n2\n");
    // Case 5: a huge --repeat used to overflow or abort.
    for n in ["99999999999", "0", "100001"] {
        let (code, _, err) = run(&["--rates", &small, "--target", &y, "--repeat", n]);
        assert_eq!(code, 2, "{n}: {err}");
        assert!(err.contains("--repeat"), "{err}");
    }
    // Case 6: 3 × 16 000 used to build a 2 GB Gram matrix.
    let wide = write("wide.csv", &format!("{}1\n", "1,".repeat(15_999)).repeat(3));
    let y3 = write("y3.csv", "1\n1\n1\n");
    let (code, _, err) = run(&["--rates", &wide, "--target", &y3]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("wide.csv:1:") && err.contains("512"), "{err}");
    // Case 7: values near the float limits used to come back "optimal" and wrong.
    let tiny = write("tiny.csv", "1e-300,2e-300\n3e-300,1e-300\n");
    let (code, _, err) = run(&["--rates", &tiny, "--target", &y]);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("tiny.csv:1:1:") && err.contains("out of range"),
        "{err}"
    );
    let huge_y = write("huge.csv", "1\n1e300\n");
    let (code, _, err) = run(&["--rates", &small, "--target", &huge_y]);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("huge.csv:2:") && err.contains("out of range"),
        "{err}"
    );
}
