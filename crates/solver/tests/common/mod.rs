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
    let p = band_fit_hessian(a, s);
    let mut q = vec![s.time_penalty; n];
    q.extend(std::iter::repeat_n(0.0, m));
    let mut rows = Rows::default();
    rows.dwell(&s.upper, s.budget);
    rows.band(n, &s.lo, &s.hi);
    // Tight tolerances first; Clarabel's defaults (1e-8) if those hit a numerical error.
    let solved =
        |st: &SolverStatus| matches!(st, SolverStatus::Solved | SolverStatus::AlmostSolved);
    let (status, x_c, _) = rows.solve(&p, &q, &[1e-10, 1e-8, 1e-7], solved);
    if !solved(&status) {
        return None;
    }
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

/// A number in a fixture file: JSON has no infinities, so the fixture scripts write them as text.
#[derive(serde::Deserialize)]
#[serde(untagged)]
pub enum Num {
    /// A finite number.
    Value(f64),
    /// "inf" or "-inf".
    Text(String),
}

impl Num {
    /// The number.
    pub fn get(&self) -> f64 {
        match self {
            Num::Value(v) => *v,
            Num::Text(t) if t == "inf" => f64::INFINITY,
            Num::Text(t) if t == "-inf" => f64::NEG_INFINITY,
            Num::Text(t) => panic!("bad number {t}"),
        }
    }
}

/// Inequality rows G·z ≤ h for Clarabel, each row a sparse list of (column, value).
#[derive(Default)]
pub struct Rows {
    g: Vec<Vec<(usize, f64)>>,
    h: Vec<f64>,
}

impl Rows {
    /// One row g·z ≤ h.
    pub fn push(&mut self, g: Vec<(usize, f64)>, h: f64) {
        self.g.push(g);
        self.h.push(h);
    }

    /// 0 ≤ xⱼ ≤ uⱼ and Σx ≤ T on the first `upper.len()` variables.
    pub fn dwell(&mut self, upper: &[f64], budget: Option<f64>) {
        for (j, u) in upper.iter().enumerate() {
            self.push(vec![(j, -1.0)], 0.0);
            if u.is_finite() {
                self.push(vec![(j, 1.0)], *u);
            }
        }
        if let Some(t) = budget {
            self.push((0..upper.len()).map(|j| (j, 1.0)).collect(), t);
        }
    }

    /// loᵢ ≤ tᵢ ≤ hiᵢ for band points tᵢ at columns `offset + i` (infinite edges left out).
    pub fn band(&mut self, offset: usize, lo: &[f64], hi: &[f64]) {
        for (i, (l, u)) in lo.iter().zip(hi).enumerate() {
            if l.is_finite() {
                self.push(vec![(offset + i, -1.0)], -l);
            }
            if u.is_finite() {
                self.push(vec![(offset + i, 1.0)], *u);
            }
        }
    }

    /// Clarabel on min ½zᵀPz + qᵀz subject to these rows, at each tolerance in turn until `done`
    /// accepts the status: the last status, z and objective.
    pub fn solve(
        &self,
        p: &CscMatrix<f64>,
        q: &[f64],
        tolerances: &[f64],
        done: impl Fn(&SolverStatus) -> bool,
    ) -> (SolverStatus, Vec<f64>, f64) {
        let g = dense_csc(self.g.len(), q.len(), false, |r, c| {
            self.g[r]
                .iter()
                .find(|(k, _)| *k == c)
                .map_or(0.0, |(_, v)| *v)
        });
        let cones = [NonnegativeConeT(self.h.len())];
        let mut last = (SolverStatus::Unsolved, Vec::new(), f64::NAN);
        for &tol in tolerances {
            let settings = DefaultSettingsBuilder::default()
                .verbose(false)
                .max_iter(500)
                .tol_gap_abs(tol)
                .tol_gap_rel(tol)
                .tol_feas(tol)
                .build()
                .unwrap();
            let mut solver = DefaultSolver::new(p, q, &g, &self.h, &cones, settings).unwrap();
            solver.solve();
            let sol = &solver.solution;
            last = (sol.status, sol.x.clone(), sol.obj_val);
            if done(&sol.status) {
                break;
            }
        }
        last
    }
}

/// The band fit's quadratic term in (x, t), P = 2·[[AᵀWA + λI, −AᵀW], [−WA, W]] (upper triangle).
pub fn band_fit_hessian(a: &nalgebra::DMatrix<f64>, s: &Spec) -> CscMatrix<f64> {
    let (m, n) = a.shape();
    dense_csc(n + m, n + m, true, |i, j| {
        2.0 * match (i < n, j < n) {
            (true, true) => {
                (0..m)
                    .map(|c| s.weights[c] * a[(c, i)] * a[(c, j)])
                    .sum::<f64>()
                    + if i == j { s.ridge } else { 0.0 }
            }
            (true, false) => -s.weights[j - n] * a[(j - n, i)],
            (false, false) if i == j => s.weights[i - n],
            _ => 0.0,
        }
    })
}
