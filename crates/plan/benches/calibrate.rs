//! Calibration benchmark: the lunch-tray demo's invented bench runs (48 configurations, probes on
//! every other cell, one repeat; about 86 000 readings), read and calibrated, against one plain
//! least-squares line per probe measured in the same run.
//! Run: `cargo bench -p traycast-plan --bench calibrate`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use traycast_plan::calibrate::{Settings, calibrate};
use traycast_plan::demos;
use traycast_plan::runs::{HeatingRuns, ReadOptions};

fn bench(c: &mut Criterion) {
    let plan = demos::demo("lunch-tray").unwrap();
    let text = traycast_plan::runs::heating_runs(&plan, &traycast_plan::runs::RunRecipe::default())
        .unwrap();
    let runs = HeatingRuns::parse(&text, &plan, ReadOptions::default()).unwrap();
    let mut group = c.benchmark_group("calibrate/lunch-tray");
    group.sample_size(20);
    group.bench_function("read runs CSV", |b| {
        b.iter(|| black_box(HeatingRuns::parse(&text, &plan, ReadOptions::default()).unwrap()))
    });
    group.bench_function("fit, combine, fill, report", |b| {
        b.iter(|| black_box(calibrate(&runs, &plan, &Settings::default()).unwrap()))
    });
    // Reference in the same run: one plain least-squares line per probe over all its readings.
    group.bench_function("reference: one plain line per probe", |b| {
        b.iter(|| {
            for s in &runs.series {
                let (t, y): (Vec<f64>, Vec<f64>) =
                    s.readings.iter().map(|r| (r.t, r.temp_c)).unzip();
                black_box(traycast_plan::calibrate::fit_line(&t, &y));
            }
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
