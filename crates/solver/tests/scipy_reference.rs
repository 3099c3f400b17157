//! Agreement with SciPy on problems this solver has never seen.
//!
//! Fixtures: tests/fixtures/solver/scipy_reference.json, written by make_fixtures.py beside it with
//! SciPy 1.17.1 / NumPy 2.4 (versions recorded in the file): `scipy.optimize.nnls` (maxiter = 50n) for
//! point targets, `lsq_linear(method='bvls')` for bounds, and on [A, −I] for weighted bands.
//! Objectives are compared, not x (x need not be unique).

mod common;

use common::Num;
use serde::Deserialize;
use traycast_solver::{DwellSolver, Rates, Spec, kkt};

#[derive(Deserialize)]
struct Case {
    name: String,
    m: usize,
    n: usize,
    rates_row_major: Vec<f64>,
    lo: Vec<Num>,
    hi: Vec<Num>,
    weights: Vec<f64>,
    upper: Vec<Num>,
    objective: f64,
    oracle: String,
}

#[derive(Deserialize)]
struct Fixture {
    scipy: String,
    cases: Vec<Case>,
}

fn nums(v: &[Num]) -> Vec<f64> {
    v.iter().map(Num::get).collect()
}

#[test]
fn objectives_match_scipy() {
    let text = include_str!("../../../tests/fixtures/solver/scipy_reference.json");
    let fixture: Fixture = serde_json::from_str(text).unwrap();
    assert!(
        fixture.scipy.as_str() >= "1.16",
        "fixtures need SciPy ≥ 1.16"
    );
    assert!(fixture.cases.len() >= 20);
    for case in &fixture.cases {
        let rates = Rates::from_row_major(case.m, case.n, &case.rates_row_major).unwrap();
        let mut spec = Spec::band(nums(&case.lo), nums(&case.hi), case.n);
        spec.weights = case.weights.clone();
        spec.upper = nums(&case.upper);
        let sol = DwellSolver::new(rates.clone()).solve(&spec).unwrap();
        let scale: f64 = spec
            .lo
            .iter()
            .zip(&spec.weights)
            .filter(|(v, _)| v.is_finite())
            .map(|(v, w)| w * v * v)
            .sum::<f64>()
            .max(1.0);
        // Never worse than SciPy beyond round-off; SciPy's bvls stops at its own tolerance, so it may be
        // very slightly worse than the exact optimum.
        assert!(
            sol.objective <= case.objective + 1e-9 * scale,
            "{} ({}): ours {} scipy {}",
            case.name,
            case.oracle,
            sol.objective,
            case.objective
        );
        assert!(
            case.objective - sol.objective <= 1e-6 * scale,
            "{}: ours {} far below scipy {}",
            case.name,
            sol.objective,
            case.objective
        );
        let k = kkt::check(&rates, &spec, &sol.dwell);
        assert!(k.stationarity < 1e-7, "{}: {k:?}", case.name);
    }
}
