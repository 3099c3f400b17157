//! Dwell-solver benchmarks at tray sizes 96×16, 384×48, 1536×96 and 2048×256 (cells × configurations):
//! cold solve (Gram included), warm re-solve after a 10-cell brush stroke (point and band targets;
//! with per-cell predictions and dwell-only),
//! and the cache update after 10 cells' rates change versus rebuilding the cache.
//!
//! Run: `cargo bench -p traycast-solver --bench solver` (or `cargo xtask bench-solver`, which adds SciPy).

use criterion::{BatchSize, Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use traycast_solver::synthetic::{painted_tray, tray_shape};
use traycast_solver::{DwellSolver, Spec};

const SIZES: [(usize, usize); 4] = [(96, 16), (384, 48), (1536, 96), (2048, 256)];

/// A 10-cell brush stroke: the same 10 cells (a short horizontal run) get +8 K.
fn stroke(spec: &Spec, width: usize) -> Spec {
    let mut s = spec.clone();
    let start = width + 1;
    for i in start..start + 10 {
        s.lo[i] += 8.0;
        s.hi[i] += 8.0;
    }
    s
}

fn benches(c: &mut Criterion) {
    let mut g = c.benchmark_group("solver");
    g.warm_up_time(std::time::Duration::from_millis(500));
    g.measurement_time(std::time::Duration::from_secs(2));
    g.sample_size(20);
    for (m, n) in SIZES {
        let (w, h) = tray_shape(m);
        let tray = painted_tray(w, h, n, 42);
        let point = Spec::point(&tray.target, n);
        let band = Spec::band(
            tray.target.iter().map(|t| t - 3.0).collect(),
            tray.target.iter().map(|t| t + 3.0).collect(),
            n,
        );
        let label = format!("{m}x{n}");

        g.bench_function(format!("cold/{label}"), |b| {
            b.iter_batched(
                || DwellSolver::new(tray.rates.clone()),
                |mut s| black_box(s.solve(&point).unwrap()),
                BatchSize::LargeInput,
            )
        });

        for (kind, base) in [("point", &point), ("band", &band)] {
            let other = stroke(base, w);
            let mut solver = DwellSolver::new(tray.rates.clone());
            solver.solve(base).unwrap();
            let mut flip = false;
            g.bench_function(format!("warm-stroke-{kind}/{label}"), |b| {
                b.iter(|| {
                    flip = !flip;
                    black_box(solver.solve(if flip { &other } else { base }).unwrap())
                })
            });
            g.bench_function(format!("warm-stroke-{kind}-dwell-only/{label}"), |b| {
                b.iter(|| {
                    flip = !flip;
                    black_box(
                        solver
                            .solve_dwell(if flip { &other } else { base })
                            .unwrap(),
                    )
                })
            });
        }

        let cells: Vec<usize> = (w + 1..w + 11).collect();
        let rates = &tray.rates;
        let rows_a: Vec<f64> = cells
            .iter()
            .flat_map(|&i| (0..n).map(move |j| rates.get(i, j)))
            .collect();
        let rows_b: Vec<f64> = rows_a.iter().map(|v| v * 1.1).collect();
        let mut solver = DwellSolver::new(tray.rates.clone());
        solver.solve(&point).unwrap();
        let mut flip = false;
        g.bench_function(format!("rates-update-10/{label}"), |b| {
            b.iter(|| {
                flip = !flip;
                solver
                    .update_rates(&cells, if flip { &rows_b } else { &rows_a })
                    .unwrap();
            })
        });
        g.bench_function(format!("cache-rebuild/{label}"), |b| {
            b.iter(|| {
                solver.reset();
                solver.prepare(&point).unwrap();
            })
        });
    }
    g.finish();
}

criterion_group!(solver, benches);
criterion_main!(solver);
