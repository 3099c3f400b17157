//! Field-model benchmark: heating maps for a 48 × 32 tray and 96 configurations (the size the
//! workbench regenerates on every food stroke). Run: `cargo bench -p traycast-plan --bench field`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use traycast_plan::field::{Absorber, generate};
use traycast_thermal::dielectric::Permittivity;

fn bench(c: &mut Criterion) {
    let (w, h) = (48, 32);
    let cells: Vec<Option<Absorber>> = (0..w * h)
        .map(|i| {
            // Thawed meat and a watery vegetable, near the composition model's 20 °C values.
            let permittivity = if i % w < w / 2 {
                Permittivity {
                    constant: 49.0,
                    loss: 15.5,
                }
            } else {
                Permittivity {
                    constant: 64.0,
                    loss: 18.0,
                }
            };
            Some(Absorber {
                permittivity,
                thickness: 0.02,
                density: 1050.0,
                cp: 3.6,
            })
        })
        .collect();
    c.bench_function("field-model/48x32x96", |b| {
        b.iter(|| black_box(generate(w, h, 0.007, &cells, 96, 42, 1000.0).unwrap()))
    });
}

criterion_group!(field, bench);
criterion_main!(field);
