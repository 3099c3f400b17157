//! The warm stroke: `Evaluator::quick` after one cell's target changes, on the benchmark tray
//! (48 × 32 cells, 96 configurations), against the warm solve alone in the same run.
//! Run: `cargo bench -p traycast-plan --bench quick`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use traycast_plan::demos::benchmark_tray;
use traycast_plan::evaluate::{Evaluator, Options};

fn bench(c: &mut Criterion) {
    let base = benchmark_tray();
    let strokes: Vec<_> = (0..64)
        .map(|k| {
            let mut q = base.clone();
            let i = (k * 37) % q.food.len();
            q.zone[i] = 1 + (q.zone[i] % 2);
            q
        })
        .collect();
    let mut ev = Evaluator::new();
    ev.evaluate(&base, Options::default()).unwrap();
    let mut k = 0;
    c.bench_function("quick/48x32x96 warm stroke", |b| {
        b.iter(|| {
            k = (k + 1) % strokes.len();
            black_box(ev.quick(&strokes[k]).unwrap())
        })
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
