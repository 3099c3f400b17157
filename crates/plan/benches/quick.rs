//! The warm stroke: `Evaluator::quick` after one cell's target changes, on the benchmark tray
//! (48 × 32 cells, 96 configurations, ±5 K bands), and in the same run the reference it wraps: the
//! solver's own warm dwell-only re-solve of the same problem. Then the same strokes planned for
//! the constrained objectives (max-margin; the safe minimum with a 600 s budget, which it needs
//! on this tray), each started from the stroke before, and one full evaluation of each objective
//! (the constrained ones with the simulation in the loop) against the band fit's.
//! Run: `cargo bench -p traycast-plan --bench quick`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use traycast_plan::Objective;
use traycast_plan::demos::benchmark_tray;
use traycast_plan::evaluate::{Evaluator, Options, Prepared};
use traycast_solver::{DwellSolver, Rates, Spec};

/// 64 strokes on `base`: one cell's target switched between the first two zones each.
fn strokes(base: &traycast_plan::model::Plan) -> Vec<traycast_plan::model::Plan> {
    (0..64)
        .map(|k| {
            let mut q = base.clone();
            let i = (k * 37) % q.food.len();
            q.zone[i] = 1 + (q.zone[i] % 2);
            q
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let base = benchmark_tray();
    let strokes = strokes(&base);
    let mut ev = Evaluator::new();
    ev.evaluate(&base, Options::default()).unwrap();
    let mut k = 0;
    c.bench_function("quick/48x32x96 warm stroke", |b| {
        b.iter(|| {
            k = (k + 1) % strokes.len();
            black_box(ev.quick(&strokes[k]).unwrap())
        })
    });
    // The reference: the same strokes as band specifications for a warm solver, prepared outside
    // the clock (every cell of the benchmark tray is zoned, so the rows never change).
    let maps = ev.maps(&base).unwrap().clone();
    let n = maps.cells;
    let data: Vec<f64> = (0..n)
        .flat_map(|i| (0..maps.configs).map(move |c| (i, c)))
        .map(|(i, c)| maps.loaded[c * n + i])
        .collect();
    let mut solver = DwellSolver::new(Rates::from_row_major(n, maps.configs, &data).unwrap());
    let specs: Vec<Spec> = strokes
        .iter()
        .map(|p| {
            let prep = Prepared::new(p);
            let (lo, hi) = prep
                .rows
                .iter()
                .map(|&i| {
                    let (a, b) = prep.band(i).unwrap();
                    (a - prep.start[i], b - prep.start[i])
                })
                .unzip();
            let mut spec = Spec::band(lo, hi, maps.configs);
            spec.budget = p.oven.budget_s;
            spec
        })
        .collect();
    let mut k = 0;
    c.bench_function("quick/48x32x96 reference: the warm solve alone", |b| {
        b.iter(|| {
            k = (k + 1) % specs.len();
            black_box(solver.solve_dwell(&specs[k]).unwrap())
        })
    });
}

fn constrained(c: &mut Criterion) {
    let mut g = c.benchmark_group("objectives");
    g.sample_size(10);
    g.measurement_time(std::time::Duration::from_secs(4));
    for objective in [
        Objective::BandFit,
        Objective::MaxMargin,
        Objective::SafeMinimum,
    ] {
        let mut base = benchmark_tray();
        base.planning.objective = objective;
        base.oven.budget_s = Some(600.0);
        let strokes = strokes(&base);
        let mut ev = Evaluator::new();
        ev.quick(&base).unwrap();
        let mut k = 0;
        g.bench_function(format!("warm stroke/{}", objective.as_str()), |b| {
            b.iter(|| {
                k = (k + 1) % strokes.len();
                black_box(ev.quick(&strokes[k]).unwrap())
            })
        });
        g.bench_function(format!("full evaluation/{}", objective.as_str()), |b| {
            b.iter(|| {
                k = (k + 1) % strokes.len();
                black_box(ev.evaluate(&strokes[k], Options::default()).unwrap())
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench, constrained);
criterion_main!(benches);
