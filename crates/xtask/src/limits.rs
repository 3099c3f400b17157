//! `cargo xtask limits`: the command line's peak memory on inputs at (and just past) every stated
//! input limit, each measured in its own process (getrusage of the one child), against the
//! 512 MiB promise. Part of `cargo xtask test`.

use crate::run::{cargo, root};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::Command;
use traycast_plan::model::{FoodItem, Plan};
use traycast_plan::wire;

/// The promise: no input makes the command line use more than this, MiB.
const PEAK_MIB: f64 = 512.0;

struct Case {
    what: &'static str,
    args: Vec<String>,
    /// Exit code the command must end with (0: done, 2: refused with a message).
    exit: i32,
}

/// A tray of `width` × `height` cells of rice with `configs` configurations.
fn rice_tray(width: usize, height: usize, configs: usize) -> Plan {
    let mut plan = Plan::blank(width, height, 10.0);
    plan.name = "limits: rice everywhere (illustrative)".into();
    plan.items = vec![FoodItem {
        name: "Rice".into(),
        food: "rice".into(),
        thickness_mm: 20.0,
        start_c: 5.0,
        covered: false,
    }];
    plan.food = vec![1; width * height];
    plan.oven.configs = configs;
    plan
}

/// A runs file with `seconds` one-second readings per probe, a probe on every cell, every
/// configuration run once.
fn runs_file(plan: &Plan, seconds: usize) -> String {
    let cells = plan.tray.cells();
    let mut text = String::with_capacity(cells * plan.oven.configs * seconds * 24);
    text.push_str(
        "# traycast-runs 1\n# name: limits (illustrative)\nrun,config,time_s,row,col,temp_c\n",
    );
    for c in 0..plan.oven.configs {
        for i in 0..cells {
            let rate = 0.1 + 0.3 * ((i * 7 + c * 13) % 17) as f64 / 17.0;
            let (r, col) = (i / plan.tray.width, i % plan.tray.width);
            for t in 0..seconds {
                let noise = 0.05 * (((i + t * 31 + c) % 7) as f64 - 3.0);
                let _ = writeln!(
                    text,
                    "c{c},{c},{t},{r},{col},{:.2}",
                    5.0 + rate * t as f64 + noise
                );
            }
        }
    }
    text
}

fn write(dir: &Path, name: &str, text: &str) -> Result<String, String> {
    let path = dir.join(name);
    std::fs::write(&path, text).map_err(|e| format!("{}: {e}", path.display()))?;
    Ok(path.display().to_string())
}

fn cases(dir: &Path) -> Result<Vec<Case>, String> {
    let s = |v: &[&str]| v.iter().map(|x| x.to_string()).collect::<Vec<_>>();
    let mut out = Vec::new();

    // Runs: 48 × 32 probes × 96 configurations × 33 s = 4.87 M readings (the cap is 5 M), then past it.
    let layout = rice_tray(48, 32, 96);
    let layout_path = write(dir, "layout.json", &wire::to_json(&layout))?;
    let at_cap = write(dir, "runs-at-cap.csv", &runs_file(&layout, 33))?;
    let past_cap = write(dir, "runs-past-cap.csv", &runs_file(&layout, 34))?;
    let lib_out = dir.join("calibrated.json").display().to_string();
    out.push(Case {
        what: "calibrate 4.87 M readings (48×32, 96 configurations)",
        args: s(&[
            "calibrate",
            &at_cap,
            "--layout",
            &layout_path,
            "--out",
            &lib_out,
        ]),
        exit: 0,
    });
    out.push(Case {
        what: "calibrate 5.01 M readings (past the 5 M cap)",
        args: s(&[
            "calibrate",
            &past_cap,
            "--layout",
            &layout_path,
            "--out",
            &lib_out,
        ]),
        exit: 2,
    });
    // A runs file past the byte cap, refused before it is read (sparse: no disk used).
    let huge = dir.join("runs-huge.csv");
    std::fs::File::create(&huge)
        .and_then(|f| f.set_len((traycast_plan::runs::MAX_RUNS_BYTES + 1) as u64))
        .map_err(|e| e.to_string())?;
    out.push(Case {
        what: "calibrate a file past the 160 MiB cap",
        args: s(&[
            "calibrate",
            &huge.display().to_string(),
            "--layout",
            &layout_path,
            "--out",
            &lib_out,
        ]),
        exit: 2,
    });

    // Libraries: one line declaring a full 128 × 128 × 512 load (every buffer allocated), and a
    // JSON file just under the 64 MiB cap holding 4× too many rates (parsed, then refused).
    let mut full = String::from(
        "# traycast-maps 1\n# tray: 128 x 128 cells of 10 mm\n# configurations: 512\n# units: K/s\nload,config,row,col,class,rate,rate_se,filled\n",
    );
    for c in 0..512 {
        let _ = writeln!(full, "full,{c},0,0,watery,0.2,0.01,0");
    }
    let full = write(dir, "library-full.csv", &full)?;
    out.push(Case {
        what: "library check, one 128×128×512 load",
        args: s(&["library", "check", &full]),
        exit: 0,
    });
    let mut json = String::from(
        r#"{"format":"traycast-maps","version":1,"name":"limits","width":128,"height":128,"cell_mm":10,"configs":512,"units":"K/s","loads":["#,
    );
    let row = ".".repeat(128);
    let map = format!("[{}0]", "0,".repeat(128 * 128 - 1));
    for k in 0..3 {
        let layout = vec![format!("\"{row}\""); 128].join(",");
        let rates = vec![map.as_str(); 512].join(",");
        let _ = write!(
            json,
            "{}{{\"name\":\"l{k}\",\"layout\":[{layout}],\"rates\":[{rates}]}}",
            if k > 0 { "," } else { "" }
        );
    }
    json.push_str("]}");
    let json = write(dir, "library-overfull.json", &json)?;
    out.push(Case {
        what: "library check, 50 MiB JSON with 25 M rates",
        args: s(&["library", "check", &json]),
        exit: 2,
    });

    // The low-level solve at its size cap: 16 384 cells × 512 configurations.
    let (m, n) = (16_384, 512);
    let mut a = String::with_capacity(m * n * 6);
    for i in 0..m {
        for j in 0..n {
            let v = ((i * 31 + j * 17) % 97) as f64 / 970.0;
            let _ = write!(a, "{}{v:.3}", if j > 0 { "," } else { "" });
        }
        a.push('\n');
    }
    let a = write(dir, "A.csv", &a)?;
    let y = write(dir, "y.csv", &"60\n".repeat(m))?;
    out.push(Case {
        what: "nnls 16 384 × 512",
        args: s(&["nnls", "--rates", &a, "--target", &y]),
        exit: 0,
    });
    let wide = write(dir, "A-wide.csv", &format!("{}1\n", "1,".repeat(15_999)))?;
    let one = write(dir, "y-one.csv", "1\n")?;
    out.push(Case {
        what: "nnls 1 × 16 000 (past the 512-column cap)",
        args: s(&["nnls", "--rates", &wide, "--target", &one]),
        exit: 2,
    });

    // The largest plan: 128 × 128 cells (2.6 mm, to fit the model cavity), 512 configurations,
    // illustrative maps, 300 s + 120 s.
    let mut big = rice_tray(128, 128, 512);
    big.tray.cell_mm = 2.6;
    big.zones = vec![traycast_plan::model::Zone {
        name: "Rice 70–80 °C".into(),
        min_c: 70.0,
        max_c: 80.0,
        weight: 1.0,
        cap_c: None,
    }];
    big.zone = vec![1; 128 * 128];
    let big = write(dir, "plan-largest.json", &wire::to_json(&big))?;
    out.push(Case {
        what: "solve the largest plan (128×128, 512 configurations)",
        args: s(&["solve", &big, "--format", "json"]),
        exit: 0,
    });
    Ok(out)
}

/// Builds the release command line, runs every case in its own measuring process, and fails when
/// a case ends otherwise than stated or peaks above [`PEAK_MIB`].
pub fn run() -> Result<(), String> {
    std::env::set_current_dir(root()).map_err(|e| e.to_string())?;
    cargo(&["build", "--release", "--package", "traycast-cli"])?;
    let dir = root().join("target/limits");
    std::fs::create_dir_all(&dir).map_err(|e| e.to_string())?;
    let cli = root().join("target/release/traycast");
    let me = std::env::current_exe().map_err(|e| e.to_string())?;
    let mut table = String::new();
    let mut failed = Vec::new();
    for case in cases(&dir)? {
        let out = Command::new(&me)
            .arg("limits-child")
            .arg(&cli)
            .args(&case.args)
            .output()
            .map_err(|e| e.to_string())?;
        let report = String::from_utf8_lossy(&out.stdout);
        let (code, kib) = report
            .trim()
            .split_once(' ')
            .and_then(|(c, k)| Some((c.parse::<i32>().ok()?, k.parse::<f64>().ok()?)))
            .ok_or_else(|| format!("{}: no measurement ({report})", case.what))?;
        let mib = kib / 1024.0;
        let ok = code == case.exit && mib < PEAK_MIB;
        let _ = writeln!(
            table,
            "  {:<56} exit {code} (want {})  peak {mib:>6.1} MiB{}",
            case.what,
            case.exit,
            if ok { "" } else { "  ← FAILS" }
        );
        if !ok {
            failed.push(case.what);
        }
    }
    println!(
        "\nxtask limits (peak resident memory of `traycast`, promise < {PEAK_MIB} MiB):\n{table}"
    );
    if failed.is_empty() {
        Ok(())
    } else {
        Err(format!("limits not kept: {}", failed.join("; ")))
    }
}

/// The measuring process: runs `program args…` as its only child and prints "EXIT PEAK_KIB".
pub fn child(program: &Path, args: &[String]) -> Result<(), String> {
    let status = Command::new(program)
        .args(args)
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .status()
        .map_err(|e| format!("cannot start {}: {e}", program.display()))?;
    let usage = nix::sys::resource::getrusage(nix::sys::resource::UsageWho::RUSAGE_CHILDREN)
        .map_err(|e| e.to_string())?;
    // Linux reports ru_maxrss in KiB.
    println!("{} {}", status.code().unwrap_or(-1), usage.max_rss());
    Ok(())
}

/// The measuring process's arguments: the program, then its arguments.
pub fn child_args(args: &[String]) -> Result<(PathBuf, Vec<String>), String> {
    let (program, rest) = args.split_first().ok_or("limits-child needs a program")?;
    Ok((PathBuf::from(program), rest.to_vec()))
}
