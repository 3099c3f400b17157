//! The constrained goals (shortest, max-margin, band fit under hard rows) against Clarabel 0.11, an
//! interior-point solver from crates.io that shares nothing with our simplex or dual active-set
//! methods: on random problems, degenerate and infeasible ones included, our optimum must match its
//! objective, our certificate must hold, and what Clarabel proves infeasible we must refuse.
//! (The committed SciPy `linprog`/HiGHS fixtures are checked in `linprog_reference.rs`.)

mod common;

use clarabel::solver::SolverStatus;
use common::{Rows, band_fit_hessian, dense_csc};
use proptest::prelude::*;
use traycast_solver::{
    CERTIFY_TOL, Goal, MARGIN_TIME_PRICE, Outcome, Planned, Rates, Refusal, Spec, Task, certify,
    solve_task, solve_task_from,
};

/// What Clarabel says about a task.
#[derive(Debug)]
enum Oracle {
    Optimum(f64),
    Infeasible,
    Unsure,
}

/// Clarabel on the task. Variables (x, s, t): s is the margin (max-margin only), t the band
/// points of the fit (min (Ax − t)ᵀW(Ax − t) + μΣx + λ‖x‖², lo ≤ t ≤ hi).
fn clarabel(rates: &Rates, task: &Task) -> Oracle {
    let a = rates.matrix();
    let (m, n) = a.shape();
    let margin = task.goal == Goal::MaxMargin;
    let fit = match &task.goal {
        Goal::Fit(spec) => Some(spec),
        _ => None,
    };
    let ns = usize::from(margin);
    let nt = if fit.is_some() { m } else { 0 };
    let nv = n + ns + nt;
    let p = match fit {
        Some(s) => band_fit_hessian(a, s),
        None => dense_csc(nv, nv, true, |_, _| 0.0),
    };
    let mut q = vec![0.0; nv];
    match &task.goal {
        Goal::Shortest => q[..n].iter_mut().for_each(|v| *v = 1.0),
        Goal::MaxMargin => {
            q[..n].iter_mut().for_each(|v| *v = MARGIN_TIME_PRICE);
            q[n] = -1.0;
        }
        Goal::Fit(s) => q[..n].iter_mut().for_each(|v| *v = s.time_penalty),
    }
    let mut rows = Rows::default();
    rows.dwell(&task.upper, task.budget);
    for i in 0..m {
        let row: Vec<(usize, f64)> = (0..n).map(|j| (j, a[(i, j)])).collect();
        let with_margin = |mut g: Vec<(usize, f64)>| {
            if margin {
                g.push((n, 1.0));
            }
            g
        };
        if task.floor[i].is_finite() {
            rows.push(
                with_margin(row.iter().map(|&(j, v)| (j, -v)).collect()),
                -task.floor[i],
            );
        }
        if task.ceiling[i].is_finite() {
            rows.push(with_margin(row), task.ceiling[i]);
        }
    }
    if let Some(s) = fit {
        rows.band(n, &s.lo, &s.hi);
    }
    let decided =
        |st: &SolverStatus| matches!(st, SolverStatus::Solved | SolverStatus::PrimalInfeasible);
    match rows.solve(&p, &q, &[1e-10, 1e-8], decided) {
        (SolverStatus::Solved, v, obj) => Oracle::Optimum(match &task.goal {
            Goal::MaxMargin => v[n],
            Goal::Shortest => v[..n].iter().sum(),
            Goal::Fit(_) => obj,
        }),
        (SolverStatus::PrimalInfeasible, _, _) => Oracle::Infeasible,
        _ => Oracle::Unsure,
    }
}

fn rate() -> impl Strategy<Value = f64> {
    prop_oneof![2 => Just(0.0), 7 => 0.0..1.0f64, 1 => 1.0..5.0f64]
}

/// A random task: rates with zero and duplicate columns, hard minima and maxima on some cells,
/// limits and a budget on some, and the goal chosen by `goal`.
fn task(goal: u8) -> impl Strategy<Value = (Rates, Task)> {
    (1usize..20, 1usize..8).prop_flat_map(move |(m, n)| {
        (
            proptest::collection::vec(rate(), m * n),
            proptest::collection::vec(
                prop_oneof![
                    3 => Just((f64::NEG_INFINITY, f64::INFINITY)),
                    2 => (0.0..40.0f64).prop_map(|lo| (lo, f64::INFINITY)),
                    1 => (5.0..80.0f64).prop_map(|hi| (f64::NEG_INFINITY, hi)),
                    2 => (0.0..40.0f64, 0.0..25.0f64).prop_map(|(lo, w)| (lo, lo + w)),
                ],
                m,
            ),
            proptest::collection::vec(prop_oneof![3 => Just(f64::INFINITY), 1 => 0.0..80.0f64], n),
            prop_oneof![Just(None), (5.0..300.0f64).prop_map(Some)],
            proptest::collection::vec((-5.0..60.0f64, 0.0..20.0f64), m),
            any::<bool>(),
        )
            .prop_map(move |(mut a, hard, upper, budget, soft, dup)| {
                if dup && n >= 2 {
                    for i in 0..m {
                        a[i * n + n - 1] = a[i * n];
                    }
                }
                let rates = Rates::from_row_major(m, n, &a).unwrap();
                let g = match goal {
                    0 => Goal::Shortest,
                    1 => Goal::MaxMargin,
                    _ => {
                        let (lo, w): (Vec<f64>, Vec<f64>) = soft.into_iter().unzip();
                        let hi = lo.iter().zip(&w).map(|(l, w)| l + w).collect();
                        let mut s = Spec::band(lo, hi, n);
                        s.ridge = 0.0;
                        Goal::Fit(s)
                    }
                };
                let mut t = Task::new(g, m, n);
                for (i, (lo, hi)) in hard.into_iter().enumerate() {
                    t.floor[i] = lo;
                    t.ceiling[i] = hi;
                }
                t.upper = upper;
                t.budget = budget;
                if goal == 1 && t.budget.is_none() && t.ceiling.iter().all(|c| c.is_infinite()) {
                    t.budget = Some(120.0);
                }
                (rates, t)
            })
    })
}

/// Our answer against Clarabel's: same optimum (to Clarabel's 1e-8-ish accuracy, scaled), a
/// A warm start's answer is the cold start's: both certified to the same optimum, or both refused
/// as infeasible.
fn same_answer(
    cold: Result<Planned, Refusal>,
    warm: Result<Planned, Refusal>,
) -> Result<(), TestCaseError> {
    match (cold, warm) {
        (Ok(c), Ok(w)) => {
            prop_assert_eq!(w.outcome, Outcome::Optimal);
            let scale = 1.0 + c.objective.abs();
            // Both are certified to CERTIFY_TOL; their objectives agree to the same order.
            prop_assert!(
                (c.objective - w.objective).abs() <= 2e-6 * scale,
                "cold {} warm {}",
                c.objective,
                w.objective
            );
        }
        (Err(Refusal::Infeasible(_)), Err(Refusal::Infeasible(_))) => {}
        (c, w) => prop_assert!(false, "cold {c:?} warm {w:?}"),
    }
    Ok(())
}

/// certificate that holds when recomputed, and a refusal exactly when Clarabel proves infeasibility.
fn agree(rates: &Rates, task: &Task) -> Result<(), TestCaseError> {
    let ours = solve_task(rates, task);
    let theirs = clarabel(rates, task);
    match (&ours, &theirs) {
        (Ok(p), Oracle::Optimum(v)) => {
            let recheck = certify(rates, task, &p.dwell, p.margin, &p.multipliers);
            // The outcome says whether the certificate holds, and says it truthfully; a rare
            // badly scaled fit may end uncertified (its objective is still checked below).
            prop_assert_eq!(
                recheck.residual() <= CERTIFY_TOL,
                p.outcome == Outcome::Optimal,
                "certificate {:?}",
                recheck
            );
            prop_assert!(
                recheck.infeasibility <= CERTIFY_TOL,
                "certificate {recheck:?}"
            );
            if task.goal.as_str() != "fit" {
                prop_assert_eq!(p.outcome, Outcome::Optimal);
            }
            let scale = 1.0 + v.abs() + p.objective.abs();
            // Certified: Clarabel's accuracy. Uncertified (it says so): feasible, never below the
            // optimum, and near it.
            let tol = if p.outcome == Outcome::Optimal {
                2e-6
            } else {
                1e-3
            };
            prop_assert!(p.objective >= v - 2e-6 * scale);
            prop_assert!(
                (p.objective - v).abs() <= tol * scale,
                "{}: ours {} ({:?}, {:?}) clarabel {}",
                task.goal.as_str(),
                p.objective,
                p.outcome,
                recheck,
                v
            );
        }
        (Err(Refusal::Infeasible(inf)), Oracle::Infeasible) => {
            prop_assert!(inf.shortfall > 0.0, "{inf:?}");
        }
        // Clarabel's infeasibility test can misfire on badly scaled data (dwells of thousands of
        // seconds): our schedule is then a witness, checked here directly against the task.
        (Ok(p), Oracle::Infeasible) => {
            let z = rates.apply(&p.dwell);
            let tol = |v: f64| 1e-9 * (1.0 + v.abs());
            for (i, &zi) in z.iter().enumerate() {
                prop_assert!(
                    zi >= task.floor[i] - tol(zi) && zi <= task.ceiling[i] + tol(zi),
                    "cell {i}: {zi} outside [{}, {}]",
                    task.floor[i],
                    task.ceiling[i]
                );
            }
            for (j, &x) in p.dwell.iter().enumerate() {
                prop_assert!(x >= 0.0 && x <= task.upper[j] + tol(x));
            }
            if let Some(t) = task.budget {
                prop_assert!(p.total_time() <= t + tol(t));
            }
        }
        (_, Oracle::Unsure) => {}
        (o, t) => prop_assert!(false, "ours {o:?}, clarabel {t:?}"),
    }
    Ok(())
}

proptest! {
    #![proptest_config(common::config())]

    /// Oracle: Clarabel 0.11 (crates.io), linear programme.
    #[test]
    fn shortest_matches_clarabel((rates, task) in task(0)) {
        agree(&rates, &task)?;
    }

    /// Oracle: Clarabel 0.11 (crates.io), linear programme with the margin variable.
    #[test]
    fn max_margin_matches_clarabel((rates, task) in task(1)) {
        agree(&rates, &task)?;
    }

    /// Oracle: Clarabel 0.11 (crates.io), quadratic programme in (x, t) with the hard rows.
    #[test]
    fn fit_under_hard_rows_matches_clarabel((rates, task) in task(2)) {
        agree(&rates, &task)?;
    }

    /// Started from the answer before a brush stroke (one cell's hard limits and bands moved), a
    /// solve reaches the cold start's optimum (metamorphic: the work differs, never the answer).
    #[test]
    fn warm_start_equals_cold_start((rates, task) in prop_oneof![task(0), task(1), task(2)],
                                    pick in 0usize..20, shift in -6.0..6.0f64) {
        let Ok(before) = solve_task(&rates, &task) else { return Ok(()) };
        let mut after = task.clone();
        let i = pick % after.floor.len();
        after.floor[i] += shift;
        after.ceiling[i] += shift.abs();
        if let Goal::Fit(s) = &mut after.goal {
            s.lo[i] += shift;
            s.hi[i] += shift.abs();
        }
        let cold = solve_task(&rates, &after);
        let warm = solve_task_from(&rates, &after, Some(&before));
        same_answer(cold, warm)?;
    }

    /// Started from an answer on other rates (a stroke that moved food changes the maps), a solve
    /// still reaches the cold start's optimum: a kept basis inverse that no longer inverts the
    /// basis is never used.
    #[test]
    fn warm_start_on_changed_rates_equals_cold_start((rates, task) in prop_oneof![task(0), task(1)],
                                                     pick in 0usize..20, factor in 0.5..1.5f64) {
        let Ok(before) = solve_task(&rates, &task) else { return Ok(()) };
        let mut a = rates.matrix().clone();
        let j = pick % a.ncols();
        for i in 0..a.nrows() {
            a[(i, j)] *= factor;
        }
        let changed = traycast_solver::Rates::from_matrix(a).unwrap();
        let cold = solve_task(&changed, &task);
        let warm = solve_task_from(&changed, &task, Some(&before));
        same_answer(cold, warm)?;
    }
}
