//! Small problems with published or hand-derivable answers.

use traycast_solver::{DwellSolver, Rates, Spec, Status, kkt};

/// MathWorks documentation, `lsqnonneg`, example "Nonnegative Linear Least Squares":
/// C (4×2) and d as printed there; the documented answer is x = [0; 0.6929] with residual norm² 0.8315.
/// (Values recalled from memory; SciPy 1.17 `nnls` on the same data gives x = [0, 0.6929344],
/// ‖Cx − d‖² = 0.8314560, which confirms them.)
#[test]
#[allow(clippy::approx_constant)] // 0.7071 is data from the example, not 1/√2
fn lsqnonneg_documentation_example() {
    let c = [
        0.0372, 0.2869, 0.6861, 0.7071, 0.6233, 0.6245, 0.6344, 0.6170,
    ];
    let d = [0.8587, 0.1781, 0.0747, 0.8405];
    let rates = Rates::from_row_major(4, 2, &c).unwrap();
    let sol = DwellSolver::new(rates).solve(&Spec::point(&d, 2)).unwrap();
    assert_eq!(sol.status, Status::Optimal);
    assert_eq!(sol.dwell[0], 0.0);
    assert!((sol.dwell[1] - 0.6929344).abs() < 1e-6, "{:?}", sol.dwell);
    assert!(
        (sol.objective - 0.8314560).abs() < 1e-6,
        "{}",
        sol.objective
    );
}

/// Hand-derived: one cell, one configuration, band [lo, hi]; the optimum lands on the nearer edge's
/// reachable side, and a budget below that caps it.
#[test]
fn single_cell_band_and_budget() {
    let rates = Rates::from_row_major(1, 1, &[0.5]).unwrap();
    let mut solver = DwellSolver::new(rates);
    let mut spec = Spec::band(vec![40.0], vec![50.0], 1);
    let sol = solver.solve(&spec).unwrap();
    assert_eq!(sol.band_distance[0], 0.0);
    assert!(sol.dwell[0] >= 80.0 - 1e-9 && sol.dwell[0] <= 100.0 + 1e-9);
    spec.budget = Some(60.0);
    let sol = solver.solve(&spec).unwrap();
    assert_eq!(sol.status, Status::BudgetBinding);
    assert!((sol.dwell[0] - 60.0).abs() < 1e-9);
    assert!((sol.band_distance[0] + 10.0).abs() < 1e-9);
    // d/dT of 0.25·(0.5T − 40)²·... : objective (0.5T − 40)², derivative −0.5·2·(0.5·60 − 40) = 10 per second.
    assert!(
        (sol.budget_multiplier - 10.0).abs() < 1e-6,
        "{}",
        sol.budget_multiplier
    );
}

/// Degenerate inputs that must simply work: zero columns, duplicate columns, m < n, zero targets.
#[test]
fn degenerate_inputs_are_solved() {
    let rows = [0.0, 1.0, 1.0, 0.2, 0.0, 2.0, 2.0, 0.1];
    let rates = Rates::from_row_major(2, 4, &rows).unwrap();
    let mut solver = DwellSolver::new(rates.clone());
    for target in [[10.0, 20.0], [0.0, 0.0], [-5.0, 3.0]] {
        let spec = Spec::point(&target, 4);
        let sol = solver.solve(&spec).unwrap();
        let k = kkt::check(&rates, &spec, &sol.dwell);
        assert!(k.stationarity < 1e-8, "{target:?}: {k:?}");
        assert_eq!(sol.dwell[0], 0.0, "zero column stays at zero");
        assert!(sol.dwell.iter().all(|v| v.is_finite() && *v >= 0.0));
    }
    let empty = Rates::from_row_major(0, 3, &[]).unwrap();
    let sol = DwellSolver::new(empty).solve(&Spec::point(&[], 3)).unwrap();
    assert_eq!(sol.dwell, vec![0.0; 3]);
}

#[test]
fn bad_input_is_a_typed_error() {
    use traycast_solver::{Field, InputError};
    assert!(matches!(
        Rates::from_row_major(1, 2, &[0.1, f64::NAN]),
        Err(InputError::NotFinite {
            field: Field::Rates,
            index: Some(0),
            config: Some(1),
            ..
        })
    ));
    assert!(matches!(
        Rates::from_row_major(1, 2, &[0.1, -0.2]),
        Err(InputError::NegativeRate {
            cell: 0,
            config: 1,
            ..
        })
    ));
    let rates = Rates::from_row_major(2, 1, &[0.1, 0.2]).unwrap();
    let mut s = DwellSolver::new(rates);
    let mut spec = Spec::band(vec![1.0, 5.0], vec![2.0, 4.0], 1);
    assert!(matches!(
        s.solve(&spec),
        Err(InputError::BandInverted { cell: 1, .. })
    ));
    spec.hi[1] = 6.0;
    spec.weights[0] = 0.0;
    assert!(matches!(
        s.solve(&spec),
        Err(InputError::NonPositiveWeight { cell: 0, .. })
    ));
    spec.weights[0] = 1.0;
    spec.upper[0] = -1.0;
    assert!(matches!(
        s.solve(&spec),
        Err(InputError::Negative {
            field: Field::Limits,
            ..
        })
    ));
    spec.upper[0] = f64::INFINITY;
    spec.budget = Some(f64::NAN);
    assert!(matches!(
        s.solve(&spec),
        Err(InputError::NotFinite {
            field: Field::Budget,
            ..
        })
    ));
    spec.budget = None;
    spec.lo.pop();
    assert!(matches!(
        s.solve(&spec),
        Err(InputError::Dimension {
            field: Field::Lower,
            ..
        })
    ));
}

/// Regression (hostile-input run, case 7): rates or targets near 1e±300 used to come back
/// "optimal" at x = 0 (norms overflowed) or with a KKT residual of 1.6e11. They are refused, naming
/// the value, before any arithmetic.
#[test]
fn values_near_the_float_limits_are_refused() {
    use traycast_solver::{DwellSolver, Field, InputError, Rates, Spec};
    for v in [1e-300, 1e300] {
        let err = Rates::from_row_major(2, 2, &[v, 2.0 * v, 3.0 * v, v]).unwrap_err();
        assert!(
            matches!(
                err,
                InputError::Magnitude {
                    field: Field::Rates,
                    index: Some(0),
                    config: Some(0),
                    ..
                }
            ),
            "{err:?}"
        );
        let rates = Rates::from_row_major(2, 2, &[1.0, 2.0, 3.0, 1.0]).unwrap();
        let err = DwellSolver::new(rates)
            .solve(&Spec::point(&[v, 2.0 * v], 2))
            .unwrap_err();
        assert!(
            matches!(
                err,
                InputError::Magnitude {
                    field: Field::Lower,
                    ..
                }
            ),
            "{err:?}"
        );
    }
    // The size cap comes before any allocation.
    let err = Rates::from_row_major(3, 16_000, &[]).unwrap_err();
    assert!(matches!(err, InputError::TooLarge { .. }), "{err:?}");
}

/// Found by the `nnls` fuzz target: one column's rate is 7.6e78 times the others', so the
/// gradients span 80 orders of magnitude. The solve was right (budget binding, ν = 1.125), but the
/// certificate's search for the budget multiplier stopped after a fixed number of steps far from
/// it and reported a violation of 0.17. It now searches until its bracket stops shrinking.
#[test]
fn certificate_finds_the_budget_multiplier_across_80_orders_of_magnitude() {
    use traycast_solver::{DwellSolver, Rates, Spec, Status, kkt};
    let mut a = vec![0.0, 7.55600144553228e78, 1.125, 5.0, 0.0, 0.5];
    a.extend([0.5; 18]);
    let rates = Rates::from_row_major(12, 2, &a).unwrap();
    let mut spec = Spec::band(vec![0.5; 12], vec![1.0; 12], 2);
    spec.budget = Some(0.5);
    let sol = DwellSolver::new(rates.clone()).solve(&spec).unwrap();
    assert_eq!(sol.status, Status::BudgetBinding);
    let k = kkt::check(&rates, &spec, &sol.dwell);
    assert!(k.stationarity < 1e-12, "{k:?}");
    assert!((k.budget_multiplier - 1.125).abs() < 1e-9, "{k:?}");
}

/// Found by the warm-start property (seed kept in `properties.proptest-regressions`): with a small
/// ridge the total time is steep in the budget multiplier, and the probe the budget search starts
/// with already fitted the budget while the multiplier-free optimum did not. The search returned
/// the probe's point, 0.013 s under the budget and not optimal (KKT 4e-6), and called it optimal.
/// It now searches between 0 and the probe and lands on Σx = T with a true certificate.
#[test]
fn budget_search_does_not_stop_at_its_probe() {
    use traycast_solver::{DwellSolver, Rates, Spec, Status, kkt};
    let a = [
        0.4693161229017248,
        0.9602046436371423,
        0.09076371759790489,
        0.023624327553285362,
    ];
    let rates = Rates::from_row_major(1, 4, &a).unwrap();
    let mut spec = Spec::band(vec![53.88961636879949], vec![60.27330803750949], 4);
    spec.weights = vec![7.242349403068463];
    spec.budget = Some(80.26461095278191 * 0.9);
    spec.ridge = 0.0020364847234940597;
    let sol = DwellSolver::new(rates.clone()).solve(&spec).unwrap();
    assert_eq!(sol.status, Status::BudgetBinding);
    let total: f64 = sol.dwell.iter().sum();
    assert!((total - spec.budget.unwrap()).abs() < 1e-9, "{total}");
    let k = kkt::check(&rates, &spec, &sol.dwell);
    assert!(k.stationarity < 1e-12 && k.budget_multiplier > 0.0, "{k:?}");
}
