//! Constrained planning goals after a 10-cell brush stroke at 384×48 and 1536×96 (cells ×
//! configurations): shortest and max-margin (dual simplex), and the band fit with hard floors on
//! the hot items (the safe minimum's shape; proximal finite Newton over Goldfarb–Idnani pieces).
//! Each is measured cold and warm (started from the answer before the stroke). The unconstrained
//! warm band fit of the same stroke is measured beside them as the same-run reference.
//!
//! Run: `cargo bench -p traycast-solver --bench constrained`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use traycast_solver::synthetic::{painted_tray, tray_shape};
use traycast_solver::{DwellSolver, Goal, Spec, Task, solve_task, solve_task_from};

fn benches(c: &mut Criterion) {
    let mut g = c.benchmark_group("constrained");
    g.warm_up_time(std::time::Duration::from_millis(500));
    g.measurement_time(std::time::Duration::from_secs(3));
    g.sample_size(20);
    for (m, n) in [(384, 48), (1536, 96)] {
        let (w, h) = tray_shape(m);
        let tray = painted_tray(w, h, n, 42);
        let label = format!("{m}x{n}");
        let band = |shift: f64| {
            let mut s = Spec::band(
                tray.target.iter().map(|t| t - 8.0).collect(),
                tray.target.iter().map(|t| t + 8.0).collect(),
                n,
            );
            for i in w + 1..w + 11 {
                s.lo[i] += shift;
                s.hi[i] += shift;
            }
            s.budget = Some(600.0);
            s
        };
        let (a, b) = (band(0.0), band(4.0));
        let task = |spec: &Spec, goal: Goal| {
            let mut t = Task::new(goal, m, n);
            t.budget = spec.budget;
            for i in 0..m {
                // The hottest item: a hard floor at 60 % of its band (the safety minimum's shape);
                // the chilled corner a hard ceiling of 40 K. Feasible on these synthetic maps.
                if tray.target[i] > 65.0 {
                    t.floor[i] = 0.6 * spec.lo[i];
                } else if tray.target[i] < 10.0 {
                    t.ceiling[i] = 40.0;
                }
            }
            t
        };
        let tasks = [
            (
                "shortest",
                task(&a, Goal::Shortest),
                task(&b, Goal::Shortest),
            ),
            (
                "max-margin",
                task(&a, Goal::MaxMargin),
                task(&b, Goal::MaxMargin),
            ),
            (
                "fit-with-floors",
                task(&a, Goal::Fit(a.clone())),
                task(&b, Goal::Fit(b.clone())),
            ),
        ];
        for (name, ta, tb) in &tasks {
            let mut flip = false;
            g.bench_function(format!("{name}-cold/{label}"), |bch| {
                bch.iter(|| {
                    flip = !flip;
                    black_box(solve_task(&tray.rates, if flip { tb } else { ta }).unwrap())
                })
            });
            // Warm: each solve starts from the answer before the stroke.
            let (pa, pb) = (
                solve_task(&tray.rates, ta).unwrap(),
                solve_task(&tray.rates, tb).unwrap(),
            );
            g.bench_function(format!("{name}-warm/{label}"), |bch| {
                bch.iter(|| {
                    flip = !flip;
                    let (task, from) = if flip { (tb, &pa) } else { (ta, &pb) };
                    black_box(solve_task_from(&tray.rates, task, Some(from)).unwrap())
                })
            });
        }
        let mut solver = DwellSolver::new(tray.rates.clone());
        solver.solve(&a).unwrap();
        let mut flip = false;
        g.bench_function(format!("reference-warm-band-fit/{label}"), |bch| {
            bch.iter(|| {
                flip = !flip;
                black_box(solver.solve(if flip { &b } else { &a }).unwrap())
            })
        });
    }
    g.finish();
}

criterion_group!(constrained, benches);
criterion_main!(constrained);
