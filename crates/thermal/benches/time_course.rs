//! Time-course benchmark: a 300 s schedule plus 2 minutes standing on a 48×32 tray (96
//! configurations, four foods 20 mm thick, one of them frozen), every cell in layers. The default
//! layering (at most 4 mm, at most the smallest penetration depth) is measured against, in the same
//! run, coarser and finer layering: the cost curve against the layer count.
//! Run: `cargo bench -p traycast-thermal`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use traycast_thermal::catalogue;
use traycast_thermal::material::Material;
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::*;

fn bench(c: &mut Criterion) {
    let (w, h, configs) = (48, 32, 96);
    let n = w * h;
    let ids = ["chicken-breast", "rice", "broccoli", "vanilla-pudding"];
    let items: Vec<Material> = ids
        .iter()
        .map(|id| {
            let f = catalogue::find(id).unwrap();
            Material::food(&f.composition()).unwrap()
        })
        .collect();
    let cells: Vec<Option<CellFill>> = (0..n)
        .map(|i| {
            let (r, col) = (i / w, i % w);
            let item = (col >= w / 2) as usize + 2 * (r >= h / 2) as usize;
            Some(CellFill {
                item,
                thickness: 0.02,
                covered: true,
            })
        })
        .collect();
    let start: Vec<f64> = (0..n)
        .map(|i| {
            if cells[i].unwrap().item == 0 {
                -18.0
            } else {
                4.0
            }
        })
        .collect();
    let rates: Vec<f64> = (0..configs * n)
        .map(|k| {
            let (cfg, i) = (k / n, k % n);
            let (x, y) = ((i % w) as f64 / w as f64, (i / w) as f64 / h as f64);
            0.05 + 0.3
                * ((cfg as f64 * 0.7 + 3.0 * x).sin() * (cfg as f64 * 0.3 + 2.0 * y).cos()).powi(2)
        })
        .collect();
    let dwell: Vec<f64> = (0..configs)
        .map(|j| if j % 4 == 0 { 300.0 / 24.0 } else { 0.0 })
        .collect();
    let schedule = Schedule::blocks(&dwell);
    let load = Load {
        tray: Tray {
            width: w,
            height: h,
            cell_size: 0.006,
        },
        items: &items,
        cells: &cells,
        start: &start,
    };
    let maps = Maps {
        configs,
        rates: &rates,
    };
    for (label, max_layer) in [("default, 4 mm", 0.004), ("10 mm", 0.010), ("2 mm", 0.002)] {
        let settings = Settings {
            max_layer,
            ..Settings::default()
        };
        let layers: usize = simulate(&load, &maps, &Schedule::default(), &settings)
            .unwrap()
            .layers
            .iter()
            .sum();
        let name = format!("time-course/48x32/300s+120s/layers {label} ({layers} nodes)");
        c.bench_function(&name, |b| {
            b.iter(|| black_box(simulate(&load, &maps, &schedule, &settings).unwrap()))
        });
    }
}

criterion_group!(time_course, bench);
criterion_main!(time_course);
