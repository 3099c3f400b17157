//! Calibration from heating runs, checked against outside references and known truth:
//! SciPy's `linregress` for the slope and standard-error formulas, synthetic runs from a known map
//! (with sensor lag, a thaw plateau, the approach to boiling, noise and spikes) for the estimator
//! and its stated errors over many seeds, and malformed files for the line-numbered refusals.

use traycast_plan::Place;
use traycast_plan::calibrate::{self, NoteKind, Settings};
use traycast_plan::demos;
use traycast_plan::evaluate::{self, Options};
use traycast_plan::library::RateBasis;
use traycast_plan::model::{FoodItem, MapSource, Plan};
use traycast_plan::runs::{HeatingRuns, ReadOptions};
use traycast_rng::SplitMix;

#[test]
fn line_fits_match_scipy_linregress() {
    // Fixtures from scipy.stats.linregress (SciPy 1.17.1, NumPy 2.4.6), written by
    // tests/fixtures/calibration/make_linregress.py.
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../tests/fixtures/calibration/linregress.json"
    ))
    .unwrap();
    let doc: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(doc["scipy"], "1.17.1");
    let cases = doc["cases"].as_array().unwrap();
    assert!(cases.len() >= 10);
    let v = |c: &serde_json::Value, k: &str| -> Vec<f64> {
        c[k].as_array()
            .unwrap()
            .iter()
            .map(|x| x.as_f64().unwrap())
            .collect()
    };
    for c in cases {
        let (x, y) = (v(c, "x"), v(c, "y"));
        let f = calibrate::fit_line(&x, &y).unwrap();
        let close = |ours: f64, key: &str| {
            let theirs = c[key].as_f64().unwrap();
            assert!(
                (ours - theirs).abs() <= 1e-9 * (1.0 + theirs.abs()),
                "{}: {key} {ours} vs SciPy {theirs}",
                c["name"]
            );
        };
        close(f.slope, "slope");
        close(f.intercept, "intercept");
        close(f.r, "rvalue");
        close(f.slope_se, "stderr");
        close(f.intercept_se, "intercept_stderr");
    }
}

/// A 6 × 4 tray: a frozen lasagne block on the left, chilled carrots on the right, 4
/// configurations. (Invented test load.)
fn layout() -> Plan {
    let mut p = Plan::blank(6, 4, 20.0);
    p.name = "test load".into();
    p.items = vec![
        FoodItem {
            name: "Lasagne".into(),
            food: "lasagne".into(),
            thickness_mm: 30.0,
            start_c: -18.0,
            covered: false,
        },
        FoodItem {
            name: "Carrots".into(),
            food: "carrots".into(),
            thickness_mm: 20.0,
            start_c: 5.0,
            covered: false,
        },
    ];
    for i in 0..24 {
        p.food[i] = if i % 6 < 3 { 1 } else { 2 };
    }
    p.oven.configs = 4;
    p.maps = MapSource::Library {
        name: "calibrated".into(),
        hash: None,
    };
    p
}

struct Truth {
    /// Thawed rate per (config, cell), K/s.
    rates: Vec<f64>,
    text: String,
}

/// The fitting stage alone: [`synthetic_runs`] draws straight lines without any physics, so
/// removing the runs' conduction and surface loss (which simulates physics they were never made
/// with) is switched off.
fn fit_only() -> Settings {
    Settings {
        remove_run_losses: false,
        ..Settings::default()
    }
}

/// Runs generated independently of the estimator: true curve → first-order sensor → noise,
/// 0.1 K rounding and rare +5 K spikes. Frozen cells heat at 1.5 r while frozen, spend 25 s on a
/// plateau from −2 to +0.5 °C, then heat at r; every curve bends smoothly towards 100 °C from a
/// random onset between 75 and 88 °C (slope continuous there).
fn synthetic_runs(plan: &Plan, seed: u64, lag_s: f64, noise_k: f64) -> Truth {
    let mut rng = SplitMix::new(seed);
    let mut noise = SplitMix::new(seed ^ 0x9e37_79b9);
    let n = plan.tray.cells();
    let mut rates = vec![0.0; n * plan.oven.configs];
    let mut text = String::from(
        "# traycast-runs 1\n# name: synthetic test runs (invented)\nrun,config,time_s,row,col,temp_c\n",
    );
    let (duration, step, sub) = (240.0, 2.0, 40);
    for c in 0..plan.oven.configs {
        for i in 0..n {
            let r = 0.12 + 0.38 * rng.unit();
            // Evaporation starts bending the curve somewhere between 75 and 88 °C.
            let bend_c = 75.0 + 13.0 * rng.unit();
            rates[c * n + i] = r;
            let item = plan.food[i] as usize - 1;
            let start = plan.items[item].start_c;
            let truth = |t: f64| -> f64 {
                let mut t = t;
                let mut temp = start;
                if start < -2.0 {
                    let frozen = (-2.0 - start) / (1.5 * r);
                    if t < frozen {
                        return start + 1.5 * r * t;
                    }
                    t -= frozen;
                    if t < 25.0 {
                        return -2.0 + 2.5 * t / 25.0;
                    }
                    t -= 25.0;
                    temp = 0.5;
                }
                let to_bend = (bend_c - temp) / r;
                let gap = 100.0 - bend_c;
                if t < to_bend {
                    temp + r * t
                } else {
                    100.0 - gap * (-(r / gap) * (t - to_bend)).exp()
                }
            };
            let mut seen = start;
            let dt = step / sub as f64;
            let mut t = 0.0;
            for k in 0..=((duration / step) as usize) {
                if k > 0 {
                    for _ in 0..sub {
                        t += dt;
                        seen = truth(t) + (seen - truth(t)) * (-dt / lag_s).exp();
                    }
                }
                let spike = if rng.unit() < 0.01 { 5.0 } else { 0.0 };
                let reading = ((seen + noise_k * noise.normal() + spike) * 10.0).round() / 10.0;
                text.push_str(&format!(
                    "r{c},{c},{},{},{},{reading:.1}\n",
                    k as f64 * step,
                    i / 6,
                    i % 6
                ));
            }
        }
    }
    Truth { rates, text }
}

#[test]
fn synthetic_runs_recover_the_map_within_the_stated_errors() {
    // Over 40 seeds × 96 series the standardised errors z = (estimate − truth)/SE must look like a
    // standard normal: ~95 % within ±1.96, no material bias, unit variance. Tolerances allow for
    // the sampling error of 3840 z values and for residual lag after trimming.
    let plan = layout();
    let mut z = Vec::new();
    let mut trimmed = (0usize, 0usize, 0usize);
    for seed in 0..40 {
        let truth = synthetic_runs(&plan, 1000 + seed, 4.0, 0.2);
        let runs = HeatingRuns::parse(&truth.text, &plan, ReadOptions::default()).unwrap();
        let cal = calibrate::calibrate(&runs, &plan, &fit_only()).unwrap();
        let lib = &cal.library;
        assert_eq!(lib.basis, RateBasis::Thawed);
        let u = lib.loads[0].uncertainty.as_ref().unwrap();
        for (k, r) in truth.rates.iter().enumerate() {
            assert!(!u.filled[k], "every cell was measured");
            z.push((lib.loads[0].rates[k] - r) / u.se[k]);
        }
        for f in &cal.fits {
            trimmed.0 += f.thaw;
            trimmed.1 += f.lag;
            trimmed.2 += f.late;
        }
    }
    // Frozen and chilled cells separately too (a bias in one must not hide in the pooled figure).
    for (food, cols) in [("lasagne", 0..3), ("carrots", 3..6)] {
        let part: Vec<f64> = z
            .iter()
            .enumerate()
            .filter(|(k, _)| cols.contains(&((k % 24) % 6)))
            .map(|(_, v)| *v)
            .collect();
        let m = part.len() as f64;
        let inside = part.iter().filter(|v| v.abs() <= 1.96).count() as f64 / m;
        let mean = part.iter().sum::<f64>() / m;
        assert!(
            (0.90..=0.98).contains(&inside),
            "{food}: {inside} within ±1.96"
        );
        assert!(mean.abs() < 0.2, "{food}: mean z {mean}");
    }
    let m = z.len() as f64;
    let inside = z.iter().filter(|v| v.abs() <= 1.96).count() as f64 / m;
    let mean = z.iter().sum::<f64>() / m;
    let var = z.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (m - 1.0);
    assert!(
        (0.92..=0.98).contains(&inside),
        "{inside} of z within ±1.96"
    );
    assert!(mean.abs() < 0.15, "mean z {mean}");
    assert!((0.8..=1.3).contains(&var), "variance of z {var}");
    // Every mechanism was exercised: thaw plateaus, lag at the start, boiling at the end.
    assert!(
        trimmed.0 > 0 && trimmed.1 > 0 && trimmed.2 > 0,
        "{trimmed:?}"
    );
}

#[test]
fn a_plain_fit_without_the_trimming_would_be_biased() {
    // The same runs fitted over every reading above the thaw band and below 90 °C, with no lag
    // trimming, miss the truth by far more than their errors: the trimming is doing real work.
    let plan = layout();
    let truth = synthetic_runs(&plan, 7, 6.0, 0.05);
    let runs = HeatingRuns::parse(&truth.text, &plan, ReadOptions::default()).unwrap();
    let lazy = Settings {
        curvature_t: f64::INFINITY,
        outlier_sigmas: f64::INFINITY,
        tail_t: f64::INFINITY,
        settle_time_constants: 0.0,
        ..fit_only()
    };
    let z_of = |s: &Settings| {
        let cal = calibrate::calibrate(&runs, &plan, s).unwrap();
        let l = &cal.library.loads[0];
        let u = l.uncertainty.as_ref().unwrap();
        let zs: Vec<f64> = truth
            .rates
            .iter()
            .enumerate()
            .map(|(k, r)| ((l.rates[k] - r) / u.se[k]).abs())
            .collect();
        zs.iter().sum::<f64>() / zs.len() as f64
    };
    let (careful, plain) = (z_of(&fit_only()), z_of(&lazy));
    // For a standard normal E|z| = √(2/π) ≈ 0.80.
    assert!(careful < 1.0, "mean |z| {careful}");
    assert!(plain > 2.0 * careful, "plain {plain} vs careful {careful}");
}

#[test]
fn unmeasured_cells_are_filled_from_the_same_food_and_flagged() {
    let plan = layout();
    let truth = synthetic_runs(&plan, 3, 2.0, 0.1);
    // Drop every reading of row 1, col 1 (lasagne) and row 2, col 4 (carrots).
    let text: String = truth
        .text
        .lines()
        .filter(|l| {
            let f: Vec<&str> = l.split(',').collect();
            !(f.len() == 6 && ((f[3] == "1" && f[4] == "1") || (f[3] == "2" && f[4] == "4")))
        })
        .map(|l| format!("{l}\n"))
        .collect();
    let runs = HeatingRuns::parse(&text, &plan, ReadOptions::default()).unwrap();
    let cal = calibrate::calibrate(&runs, &plan, &fit_only()).unwrap();
    let load = &cal.library.loads[0];
    let u = load.uncertainty.as_ref().unwrap();
    let n = 24;
    for c in 0..4 {
        for (cell, item) in [(6 + 1, 1u8), (12 + 4, 2u8)] {
            let k = c * n + cell;
            assert!(u.filled[k]);
            // Nearest measured cells of the same food are at distance 1: the average of them.
            let w = 6;
            let (r, col) = (cell / w, cell % w);
            let neighbours: Vec<usize> = [
                (r.wrapping_sub(1), col),
                (r + 1, col),
                (r, col.wrapping_sub(1)),
                (r, col + 1),
            ]
            .into_iter()
            .filter(|&(a, b)| a < 4 && b < w && plan.food[a * w + b] == item)
            .map(|(a, b)| a * w + b)
            .collect();
            let mean = neighbours
                .iter()
                .map(|&j| load.rates[c * n + j])
                .sum::<f64>()
                / neighbours.len() as f64;
            assert!((load.rates[k] - mean).abs() < 1e-12);
            // The filled error is wider than any neighbour's own.
            assert!(neighbours.iter().all(|&j| u.se[k] > u.se[c * n + j]));
        }
    }
    let filled = cal
        .report
        .notes
        .iter()
        .filter(|n| n.kind == NoteKind::Filled)
        .count();
    assert_eq!(filled, 8);
    assert_eq!(cal.report.configs[0].filled, 2);
    assert!(cal.report.to_text(10).contains("filled"));
}

#[test]
fn repeated_runs_are_compared_and_disagreement_widens_the_error() {
    let plan = layout();
    let truth = synthetic_runs(&plan, 11, 2.0, 0.1);
    // Configuration 2 again, with every reading of the repeat scaled up 30 % above its start: the
    // oven drifted. The combined error must grow and the report must say so.
    let mut text = truth.text.clone();
    for l in truth.text.lines().filter(|l| l.starts_with("r2,")) {
        let f: Vec<&str> = l.split(',').collect();
        let temp: f64 = f[5].parse().unwrap();
        let start = if f[4].parse::<usize>().unwrap() < 3 {
            -18.0
        } else {
            5.0
        };
        let hotter = start + (temp - start) * 1.3;
        text.push_str(&format!(
            "r2-again,2,{},{},{},{:.1}\n",
            f[2],
            f[3],
            f[4],
            hotter.min(149.0)
        ));
    }
    let runs = HeatingRuns::parse(&text, &plan, ReadOptions::default()).unwrap();
    let cal = calibrate::calibrate(&runs, &plan, &fit_only()).unwrap();
    let rep = cal.report.configs[2].repeat.as_ref().unwrap();
    assert_eq!(rep.cells, 24);
    assert!(rep.median_relative_difference > 0.15, "{rep:?}");
    assert!(rep.disagreeing > 12, "{rep:?}");
    assert!(cal.report.configs[1].repeat.is_none());
    let single = calibrate::calibrate(
        &HeatingRuns::parse(&truth.text, &plan, ReadOptions::default()).unwrap(),
        &plan,
        &fit_only(),
    )
    .unwrap();
    let (u2, u1) = (
        cal.library.loads[0].uncertainty.as_ref().unwrap(),
        single.library.loads[0].uncertainty.as_ref().unwrap(),
    );
    let k = 2 * 24 + 10;
    assert!(u2.se[k] > 3.0 * u1.se[k], "{} vs {}", u2.se[k], u1.se[k]);
    assert!(
        cal.report
            .notes
            .iter()
            .any(|n| n.kind == NoteKind::RepeatDisagrees && n.config == 2)
    );
}

/// Replaces line `k` (1-based) of `text`.
fn with_line(text: &str, k: usize, new: &str) -> String {
    text.lines()
        .enumerate()
        .map(|(j, l)| if j + 1 == k { new } else { l })
        .collect::<Vec<_>>()
        .join("\n")
}

/// The synthetic file with its header (line 3) replaced and every record rewritten by `f`.
fn with_records(text: &str, header: &str, f: impl Fn(&[&str]) -> String) -> String {
    text.lines()
        .enumerate()
        .map(|(j, l)| match j {
            0 | 1 => format!("{l}\n"),
            2 => format!("{header}\n"),
            _ => format!("{}\n", f(&l.split(',').collect::<Vec<_>>())),
        })
        .collect()
}

#[test]
fn malformed_runs_are_refused_naming_the_line() {
    let plan = layout();
    let good = synthetic_runs(&plan, 5, 2.0, 0.1).text;
    // Line 1–3: format, name, header; line 4 is r0 at 0 s for row 0 col 0, line 5 at 2 s, …
    let cases: [(usize, &str, &str); 12] = [
        (6, "r0,0,NaN,0,0,5.0", "not a number"),
        (6, "r0,0,4,0,0,NaN", "not a number"),
        (6, "r0,0,1.0,0,0,5.0", "backwards"),
        (6, "r0,0,2,0,0,5.0", "duplicated"),
        (6, "r0,0,4,9,0,5.0", "out of range"),
        (6, "r0,7,4,0,0,5.0", "out of range"),
        (6, "r0,1,4,0,0,5.0", "one run heats one configuration"),
        (6, "r0,0,4,0,0,500", "outside"),
        (6, "r0,0,4,0", "fields"),
        (3, "run,config,time_s,row,col,temp_f", "°F"),
        (3, "run,config,time,row,col,temp_c", "columns"),
        (1, "# traycast-runs 2", "not supported"),
    ];
    for (line, new, words) in cases {
        let e = HeatingRuns::parse(&with_line(&good, line, new), &plan, ReadOptions::default())
            .unwrap_err();
        assert!(
            e.place == Place::line(line) && e.message.contains(words),
            "{e} should be at line {line} and say '{words}'"
        );
    }
    // A probe that never moves while the run heats.
    let stuck: String = good
        .lines()
        .enumerate()
        .map(|(j, l)| {
            let f: Vec<&str> = l.split(',').collect();
            if j >= 3 && f[0] == "r1" && f[3] == "2" && f[4] == "2" {
                format!("{},{},{},{},{},21.0\n", f[0], f[1], f[2], f[3], f[4])
            } else {
                format!("{l}\n")
            }
        })
        .collect();
    let e = HeatingRuns::parse(&stuck, &plan, ReadOptions::default()).unwrap_err();
    assert!(e.message.contains("stuck"), "{e}");
    let first = stuck
        .lines()
        .position(|l| l.starts_with("r1,1,0,2,2,"))
        .unwrap()
        + 1;
    assert_eq!(e.place, Place::line(first));
    // A run shorter than needed: only the first 3 readings of every series of r3.
    let short: String = good
        .lines()
        .filter(|l| {
            let f: Vec<&str> = l.split(',').collect();
            !(f[0] == "r3" && f[2].parse::<f64>().unwrap() > 4.0)
        })
        .map(|l| format!("{l}\n"))
        .collect();
    let e = HeatingRuns::parse(&short, &plan, ReadOptions::default()).unwrap_err();
    assert!(e.message.contains("lasts 4.0 s"), "{e}");
    // A configuration nobody measured.
    let missing: String = good
        .lines()
        .filter(|l| !l.starts_with("r3,"))
        .map(|l| format!("{l}\n"))
        .collect();
    let runs = HeatingRuns::parse(&missing, &plan, ReadOptions::default()).unwrap();
    let e = calibrate::calibrate(&runs, &plan, &Settings::default()).unwrap_err();
    assert!(e.message.contains("configuration 3 has no run"), "{e}");
}

#[test]
fn fahrenheit_needs_the_explicit_option_and_converts() {
    let plan = layout();
    let good = synthetic_runs(&plan, 9, 2.0, 0.1).text;
    // °F = °C × 9/5 + 32 (the definition of the Fahrenheit scale).
    let f_text = with_records(&good, "run,config,time_s,row,col,temp_f", |f| {
        let c: f64 = f[5].parse().unwrap();
        format!(
            "{},{},{},{},{},{}",
            f[0],
            f[1],
            f[2],
            f[3],
            f[4],
            c * 9.0 / 5.0 + 32.0
        )
    });
    assert!(HeatingRuns::parse(&f_text, &plan, ReadOptions::default()).is_err());
    let yes = ReadOptions { fahrenheit: true };
    assert!(HeatingRuns::parse(&good, &plan, yes).is_err());
    let a = HeatingRuns::parse(&good, &plan, ReadOptions::default()).unwrap();
    let b = HeatingRuns::parse(&f_text, &plan, yes).unwrap();
    for (x, y) in a.series.iter().zip(&b.series) {
        for (p, q) in x.readings.iter().zip(&y.readings) {
            assert!((p.temp_c - q.temp_c).abs() < 1e-9);
        }
    }
}

#[test]
fn probe_positions_in_millimetres_map_to_cells() {
    let plan = layout();
    let good = synthetic_runs(&plan, 13, 2.0, 0.1).text;
    // Cells are 20 mm: row r, col c → centre x = 20c + 10, y = 20r + 10.
    let mm = with_records(&good, "run,config,time_s,x_mm,y_mm,temp_c", |f| {
        let (r, c): (f64, f64) = (f[3].parse().unwrap(), f[4].parse().unwrap());
        let (x, y) = (20.0 * c + 10.0, 20.0 * r + 10.0);
        format!("{},{},{},{x},{y},{}", f[0], f[1], f[2], f[5])
    });
    let a = HeatingRuns::parse(&good, &plan, ReadOptions::default()).unwrap();
    let b = HeatingRuns::parse(&mm, &plan, ReadOptions::default()).unwrap();
    assert_eq!(a.series.len(), b.series.len());
    for (x, y) in a.series.iter().zip(&b.series) {
        assert_eq!(x.cell, y.cell);
    }
    let off = with_line(&mm, 4, "r0,0,0,130,10,5.0");
    let e = HeatingRuns::parse(&off, &plan, ReadOptions::default()).unwrap_err();
    assert!(
        e.place == Place::line(4) && e.message.contains("off the"),
        "{e}"
    );
}

#[test]
fn demo_runs_calibrate_back_to_the_field_model() {
    // The demo's invented runs come from the field model through the thermal model (conduction,
    // surface loss) and lagging noisy probes; calibrating them must land near the field model's
    // own thawed rates.
    let plan = demos::demo("side-by-side").unwrap();
    let text = traycast_plan::runs::heating_runs(&plan, &traycast_plan::runs::RunRecipe::default())
        .unwrap();
    let runs = HeatingRuns::parse(&text, &plan, ReadOptions::default()).unwrap();
    let cal = calibrate::calibrate(&runs, &plan, &Settings::default()).unwrap();
    let maps = evaluate::maps_for(&plan, None).unwrap();
    let load = &cal.library.loads[0];
    let u = load.uncertainty.as_ref().unwrap();
    let mut rel = Vec::new();
    for (k, r) in maps.thawed.iter().enumerate() {
        if plan.food[k % plan.tray.cells()] > 0 && !u.filled[k] {
            rel.push((load.rates[k] - r).abs() / r.max(1e-9));
        }
    }
    rel.sort_by(f64::total_cmp);
    let median = rel[rel.len() / 2];
    assert!(median < 0.05, "median relative difference {median}");
    // The plan evaluated on the calibrated library shows intervals and judges on them.
    let mut on_lib = plan.clone();
    on_lib.maps = MapSource::Library {
        name: cal.library.name.clone(),
        hash: None,
    };
    let e = evaluate::evaluate(&on_lib, Some(&cal.library), Options::default()).unwrap();
    for it in &e.items {
        let s = it.spread.as_ref().unwrap();
        assert!(s.coldest.0 <= it.min && it.min <= s.coldest.1);
        assert!(s.mean.0 <= it.mean && it.mean <= s.mean.1);
        assert!(s.coldest.0 < s.coldest.1, "non-zero spread");
        assert_eq!(it.verdict.coldest, s.coldest.0);
    }
    assert!(e.warnings.iter().any(|w| w.contains("filled")));
}

/// Calibration yields absorbed power, not warming slopes. Runs invented with conduction between
/// cells and layers, surface loss and temperature-dependent absorption (a thermal camera's
/// column means, every cell, light noise) are calibrated with and without removing the runs' own
/// losses. The true absorbed power is the field model's map the runs were made with (outside the
/// calibration's own code: the thermal model simulated it forward). Corrected, the measured
/// cells land on it within their stated errors (95 % within 3 SE, median within 1 %); the plain
/// slopes are biased well beyond theirs.
#[test]
fn calibration_recovers_absorbed_power_where_plain_slopes_are_biased() {
    let plan = demos::demo("side-by-side").unwrap();
    // Short runs read every second by a fast sensor, so no cell's surface boils within its fit
    // window (a run that boils a surface no longer tells that cell's power; see the next test).
    let recipe = traycast_plan::runs::RunRecipe {
        seconds: 20.0,
        step: 1.0,
        lag_s: 0.5,
        probe_every: 1,
        noise_k: 0.05,
        repeat: vec![],
        ..Default::default()
    };
    let text = traycast_plan::runs::heating_runs(&plan, &recipe).unwrap();
    let runs = HeatingRuns::parse(&text, &plan, ReadOptions::default()).unwrap();
    let truth = evaluate::maps_for(&plan, None).unwrap().thawed;
    let n = plan.tray.cells();
    let score = |remove_run_losses: bool| {
        let settings = Settings {
            remove_run_losses,
            ..Settings::default()
        };
        let cal = calibrate::calibrate(&runs, &plan, &settings).unwrap();
        let load = &cal.library.loads[0];
        let u = load.uncertainty.as_ref().unwrap();
        let (mut rel, mut within) = (Vec::new(), 0usize);
        for k in (0..truth.len()).filter(|&k| plan.food[k % n] > 0 && !u.filled[k]) {
            let err = load.rates[k] - truth[k];
            rel.push(err.abs() / truth[k]);
            within += (err.abs() <= 3.0 * u.se[k]) as usize;
        }
        rel.sort_by(f64::total_cmp);
        (
            rel[rel.len() / 2],
            within as f64 / rel.len() as f64,
            cal.report,
        )
    };
    let (median, share, report) = score(true);
    let correction = report.loss_correction.unwrap();
    assert!(correction.converged, "{correction:?}");
    assert!(median < 0.01, "corrected median relative error {median}");
    assert!(share > 0.95, "corrected: {share} within 3 SE");
    let (plain_median, plain_share, _) = score(false);
    assert!(
        plain_share < 0.8,
        "plain slopes: {plain_share} within 3 SE (median {plain_median})"
    );
    assert!(plain_median > 2.0 * median);
}

#[test]
fn interval_propagation_matches_sampling() {
    // The analytic spread of the linear rise √(Σ (σ_c·x_c)²) checked against 4000 random draws
    // of the rates from their stated normal errors, cell by cell, in the energy the bounds stand
    // for (h(bound) − h(nominal) on the food's enthalpy curve).
    let plan = demos::demo("side-by-side").unwrap();
    let (lib, mut p) = calibrated(&plan, &traycast_plan::runs::RunRecipe::default());
    // The maps' errors alone.
    p.variation = traycast_plan::model::Variation::NONE;
    let e = evaluate::evaluate(&p, Some(&lib), Options::default()).unwrap();
    let maps = evaluate::maps_for(&p, Some(&lib)).unwrap();
    let se = maps.loaded_se.as_ref().unwrap();
    let bounds = e.bounds.as_ref().unwrap();
    let mats = evaluate::materials(&p).unwrap();
    let n = maps.cells;
    let mut rng = SplitMix::new(42);
    let mut checked = 0;
    for i in (0..n).filter(|&i| p.food[i] > 0).step_by(7) {
        let draws: Vec<f64> = (0..4000)
            .map(|_| {
                (0..maps.configs)
                    .map(|c| (maps.loaded[c * n + i] + se[c * n + i] * rng.normal()) * e.dwell[c])
                    .sum::<f64>()
            })
            .collect();
        let mean = draws.iter().sum::<f64>() / 4000.0;
        let sd = (draws.iter().map(|d| (d - mean).powi(2)).sum::<f64>() / 3999.0).sqrt();
        let k = p.item_at(i).unwrap();
        let m = &mats[k];
        let after = e.course.after_standing[i];
        if bounds.upper[i] >= 99.9 {
            continue; // clamped at boiling
        }
        // The lower bound belongs to the cell's coldest point, the upper to its hottest.
        let hot = e.course.hottest_after_standing[i];
        let start = m.enthalpy(p.items[k].start_c);
        // Joint over the item's cells: the Bonferroni quantile for its cell count.
        let cells = p.food.iter().filter(|&&f| usize::from(f) == k + 1).count();
        let z = traycast_plan::stats::normal_quantile(1.0 - 0.025 / cells as f64);
        let expected = z * sd / mean * (m.enthalpy(after) - start);
        let expected_hi = z * sd / mean * (m.enthalpy(hot) - start);
        let (lo, hi) = (
            m.enthalpy(after) - m.enthalpy(bounds.lower[i]),
            m.enthalpy(bounds.upper[i]) - m.enthalpy(hot),
        );
        assert!(
            (lo - expected).abs() < 0.05 * expected
                && (hi - expected_hi).abs() < 0.05 * expected_hi,
            "cell {i}: bounds {lo:.3}/{hi:.3} kJ/kg vs sampled {expected:.3}/{expected_hi:.3}"
        );
        checked += 1;
    }
    assert!(checked > 5, "{checked} cells checked");
}

#[test]
fn the_safety_verdict_is_judged_on_the_lower_bound() {
    let plan = demos::demo("side-by-side").unwrap();
    let (mut lib, mut p) = calibrated(&plan, &traycast_plan::runs::RunRecipe::default());
    // The maps' errors alone, so that zero errors mean no spread at all.
    p.variation = traycast_plan::model::Variation::NONE;
    let with = |lib: &traycast_plan::library::MapLibrary| {
        evaluate::evaluate(&p, Some(lib), Options::default()).unwrap()
    };
    // Zero errors: the bounds collapse and the verdict is the nominal one.
    let u = lib.loads[0].uncertainty.as_mut().unwrap();
    let saved = u.se.clone();
    u.se.iter_mut().for_each(|v| *v = 0.0);
    let exact = with(&lib);
    for it in &exact.items {
        assert_eq!(it.verdict, it.spread.as_ref().unwrap().nominal);
    }
    // Errors ten times wider: the verdict's coldest cell is the lower bound, below the nominal.
    let u = lib.loads[0].uncertainty.as_mut().unwrap();
    u.se = saved.iter().map(|v| v * 10.0).collect();
    let wide = with(&lib);
    for (it, ex) in wide.items.iter().zip(&exact.items) {
        let s = it.spread.as_ref().unwrap();
        assert!(
            it.verdict.coldest < it.min - 1.0,
            "{} vs {}",
            it.verdict.coldest,
            it.min
        );
        assert!(it.verdict.margin < ex.verdict.margin);
        assert_eq!(s.nominal.margin, ex.verdict.margin);
        // The kill is judged on the lowered history too: never more than the nominal kill.
        if let (Some(k), Some(n)) = (it.verdict.kill, s.nominal.kill) {
            assert!(k.achieved <= n.achieved, "{} > {}", k.achieved, n.achieved);
        }
    }
    // The summary shows the interval and says what the verdict was judged on.
    let json = traycast_plan::summary::to_json(&p, &wide);
    assert_eq!(json["items"][0]["verdict_on"], "95 % bounds");
    assert!(json["items"][0]["spread"]["coldest_c"][0].is_number());
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(64))]
    /// Any line of a good file replaced by arbitrary text: a line-numbered refusal or a
    /// calibration, never a panic.
    #[test]
    fn hostile_lines_never_panic(line in 0usize..400, junk in "\\PC{0,40}", seed in 0u64..4) {
        let plan = layout();
        let good = synthetic_runs(&plan, seed, 2.0, 0.1).text;
        let text = with_line(&good, line + 1, &junk);
        match HeatingRuns::parse(&text, &plan, ReadOptions::default()) {
            Ok(runs) => {
                let _ = calibrate::calibrate(&runs, &plan, &Settings::default());
            }
            Err(e) => proptest::prop_assert!(!e.message.is_empty()),
        }
    }
}

/// Coverage on synthetic truth: bench runs made with the thermal model from a known map, seen
/// through probes with autocorrelated noise (AR(1), ρ = 0.6) and a 3 s sensor lag, calibrated, and
/// the plan evaluated on the calibrated library. Each item's 95 % lower bound on its coldest point
/// (joint over its cells) must hold the coldest point the true map gives for the same schedule in
/// at least 93 % of the cases (items × seeds). The maps' errors alone: no oven or start variation.
#[test]
fn the_coldest_point_bound_covers_the_truth() {
    let mut plan = demos::demo("side-by-side").unwrap();
    plan.variation = traycast_plan::model::Variation::NONE;
    let truth_maps = evaluate::maps_for(&plan, None).unwrap();
    let mats = evaluate::materials(&plan).unwrap();
    let settings = plan.heating.settings(traycast_thermal::simulate::Settings {
        standing: plan.oven.standing_s,
        ..Default::default()
    });
    let (mut cases, mut covered) = (0usize, 0usize);
    for seed in 1..=SEEDS {
        let recipe = traycast_plan::runs::RunRecipe {
            noise_k: 0.3,
            noise_rho: 0.6,
            lag_s: 3.0,
            step: 1.0,
            repeat: vec![],
            seed,
            ..Default::default()
        };
        let (lib, p) = calibrated(&plan, &recipe);
        let e = evaluate::evaluate(&p, Some(&lib), Options::default()).unwrap();
        let bounds = e.bounds.as_ref().unwrap();
        let truth =
            evaluate::time_course(&plan, &truth_maps, &mats, &e.schedule, &settings).unwrap();
        for k in 0..plan.items.len() {
            let cells: Vec<usize> = (0..plan.tray.cells())
                .filter(|&i| plan.item_at(i) == Some(k))
                .collect();
            let true_coldest = cells
                .iter()
                .map(|&i| truth.after_standing[i])
                .fold(f64::INFINITY, f64::min);
            let bound = cells
                .iter()
                .map(|&i| bounds.lower[i])
                .fold(f64::INFINITY, f64::min);
            cases += 1;
            covered += usize::from(true_coldest >= bound);
        }
    }
    let share = covered as f64 / cases as f64;
    assert!(share >= 0.93, "{covered} of {cases} covered");
}

/// Seeds of the coverage check.
const SEEDS: u64 = 10;

/// The library calibrated from `plan`'s invented bench runs made by `recipe`, and `plan` pointed at
/// it.
fn calibrated(
    plan: &Plan,
    recipe: &traycast_plan::runs::RunRecipe,
) -> (traycast_plan::library::MapLibrary, Plan) {
    let text = traycast_plan::runs::heating_runs(plan, recipe).unwrap();
    let runs = HeatingRuns::parse(&text, plan, ReadOptions::default()).unwrap();
    let lib = calibrate::calibrate(&runs, plan, &Settings::default())
        .unwrap()
        .library;
    let mut p = plan.clone();
    p.maps = MapSource::Library {
        name: lib.name.clone(),
        hash: None,
    };
    (lib, p)
}
