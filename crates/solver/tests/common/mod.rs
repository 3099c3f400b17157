//! Shared test support: random problem strategies and the Clarabel oracle.
#![allow(dead_code)]

use clarabel::algebra::CscMatrix;
use clarabel::solver::{
    DefaultSettingsBuilder, DefaultSolver, IPSolver, NonnegativeConeT, SolverStatus,
};
use proptest::prelude::*;
use traycast_solver::{Rates, Spec, objective};

/// 400 cases per property unless PROPTEST_CASES says otherwise (longer soak runs).
pub fn config() -> ProptestConfig {
    let cases = std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(400);
    ProptestConfig {
        cases,
        ..ProptestConfig::default()
    }
}

/// A random problem, degenerate cases included (zero and duplicate columns, m < n, unreachable targets).
#[derive(Clone, Debug)]
pub struct Case {
    pub rates: Rates,
    pub spec: Spec,
}

fn rate() -> impl Strategy<Value = f64> {
    prop_oneof![2 => Just(0.0), 7 => 0.0..1.0f64, 1 => 1.0..5.0f64]
}

/// (lo, hi): point, finite band, at-least, at-most.
fn band() -> impl Strategy<Value = (f64, f64)> {
    prop_oneof![
        3 => (-5.0..60.0f64).prop_map(|y| (y, y)),
        3 => (-5.0..60.0f64, 0.0..20.0f64).prop_map(|(lo, w)| (lo, lo + w)),
        1 => (0.0..60.0f64).prop_map(|lo| (lo, f64::INFINITY)),
        1 => (-5.0..40.0f64).prop_map(|hi| (f64::NEG_INFINITY, hi)),
    ]
}

pub fn case(with_limits: bool) -> impl Strategy<Value = Case> {
    (1usize..24, 1usize..9).prop_flat_map(move |(m, n)| {
        (
            proptest::collection::vec(rate(), m * n),
            proptest::collection::vec(band(), m),
            proptest::collection::vec(prop_oneof![3 => Just(1.0), 1 => 0.1..10.0f64], m),
            proptest::collection::vec(prop_oneof![3 => Just(f64::INFINITY), 1 => 0.0..80.0f64], n),
            prop_oneof![Just(None), (1.0..300.0f64).prop_map(Some)],
            prop_oneof![2 => Just(0.0), 1 => 0.0..0.5f64],
            prop_oneof![3 => Just(0.0), 1 => 0.0..0.01f64],
            any::<bool>(),
        )
            .prop_map(
                move |(mut a, bands, weights, upper, budget, mu, ridge, dup)| {
                    if dup && n >= 2 {
                        // Duplicate column 0 into column n−1.
                        for i in 0..m {
                            a[i * n + n - 1] = a[i * n];
                        }
                    }
                    let rates = Rates::from_row_major(m, n, &a).unwrap();
                    let (lo, hi): (Vec<f64>, Vec<f64>) = bands.into_iter().unzip();
                    let mut spec = Spec::band(lo, hi, n);
                    spec.weights = weights;
                    if with_limits {
                        spec.upper = upper;
                        spec.budget = budget;
                        spec.time_penalty = mu;
                        spec.ridge = ridge;
                    }
                    Case { rates, spec }
                },
            )
    })
}

/// Objective at x = 0: the natural scale for comparing objectives.
pub fn objective_scale(case: &Case) -> f64 {
    let z = vec![0.0; case.rates.cells()];
    objective(&case.spec, &z, &vec![0.0; case.rates.configs()]).max(1.0)
}

pub fn dense_csc(
    rows: usize,
    cols: usize,
    upper_only: bool,
    f: impl Fn(usize, usize) -> f64,
) -> CscMatrix<f64> {
    let mut colptr = vec![0];
    let (mut rowval, mut nzval) = (vec![], vec![]);
    for j in 0..cols {
        for i in 0..rows {
            if upper_only && i > j {
                continue;
            }
            let v = f(i, j);
            if v != 0.0 {
                rowval.push(i);
                nzval.push(v);
            }
        }
        colptr.push(rowval.len());
    }
    CscMatrix::new(rows, cols, colptr, rowval, nzval)
}

/// Clarabel (interior point, independent of our method) on the joint problem in (x, t):
/// min (Ax − t)ᵀW(Ax − t) + μΣx + λ‖x‖², t ∈ [lo, hi], 0 ≤ x ≤ u, Σx ≤ T.
/// Returns the true objective at Clarabel's x, projected onto the feasible set, or None where Clarabel
/// reports a numerical failure at every tolerance tried (the oracle has nothing to say then).
pub fn clarabel_objective(case: &Case) -> Option<f64> {
    let (m, n) = (case.rates.cells(), case.rates.configs());
    let s = &case.spec;
    let a = case.rates.matrix();
    let nv = n + m;
    // P = 2·[[AᵀWA + λI, −AᵀW], [−WA, W]] (upper triangle).
    let p = dense_csc(nv, nv, true, |i, j| {
        let v = match (i < n, j < n) {
            (true, true) => {
                (0..m)
                    .map(|c| s.weights[c] * a[(c, i)] * a[(c, j)])
                    .sum::<f64>()
                    + if i == j { s.ridge } else { 0.0 }
            }
            (true, false) => -s.weights[j - n] * a[(j - n, i)],
            (false, false) => {
                if i == j {
                    s.weights[i - n]
                } else {
                    0.0
                }
            }
            (false, true) => 0.0,
        };
        2.0 * v
    });
    let mut q = vec![s.time_penalty; n];
    q.extend(std::iter::repeat_n(0.0, m));
    // Constraints G z ≤ h.
    let mut g_rows: Vec<Vec<(usize, f64)>> = vec![];
    let mut h = vec![];
    for j in 0..n {
        g_rows.push(vec![(j, -1.0)]);
        h.push(0.0);
        if s.upper[j].is_finite() {
            g_rows.push(vec![(j, 1.0)]);
            h.push(s.upper[j]);
        }
    }
    if let Some(t) = s.budget {
        g_rows.push((0..n).map(|j| (j, 1.0)).collect());
        h.push(t);
    }
    for i in 0..m {
        if s.lo[i].is_finite() {
            g_rows.push(vec![(n + i, -1.0)]);
            h.push(-s.lo[i]);
        }
        if s.hi[i].is_finite() {
            g_rows.push(vec![(n + i, 1.0)]);
            h.push(s.hi[i]);
        }
    }
    let g = dense_csc(g_rows.len(), nv, false, |r, c| {
        g_rows[r]
            .iter()
            .find(|(k, _)| *k == c)
            .map_or(0.0, |(_, v)| *v)
    });
    let cones = [NonnegativeConeT(h.len())];
    // Tight tolerances first; Clarabel's defaults (1e-8) if those hit a numerical error.
    let mut x_c = None;
    for tol in [1e-10, 1e-8, 1e-7] {
        let settings = DefaultSettingsBuilder::default()
            .verbose(false)
            .max_iter(500)
            .tol_gap_abs(tol)
            .tol_gap_rel(tol)
            .tol_feas(tol)
            .build()
            .unwrap();
        let mut solver = DefaultSolver::new(&p, &q, &g, &h, &cones, settings).unwrap();
        solver.solve();
        if matches!(
            solver.solution.status,
            SolverStatus::Solved | SolverStatus::AlmostSolved
        ) {
            x_c = Some(solver.solution.x.clone());
            break;
        }
    }
    let x_c = x_c?;
    let mut x: Vec<f64> = x_c[..n]
        .iter()
        .zip(&s.upper)
        .map(|(v, u)| v.clamp(0.0, *u))
        .collect();
    if let Some(t) = s.budget {
        let total: f64 = x.iter().sum();
        if total > t {
            x.iter_mut().for_each(|v| *v *= t / total);
        }
    }
    Some(objective(s, &case.rates.apply(&x), &x))
}
