//! The linear planning goals (shortest, max-margin) against SciPy's `linprog` with HiGHS.
//!
//! Fixtures: tests/fixtures/solver/linprog_reference.json, written by make_linprog_fixtures.py
//! beside it with SciPy 1.17.1 (`scipy.optimize.linprog(method='highs')`; versions recorded in the
//! file). Invented random problems, degenerate ones (duplicate and zero columns, floors met
//! exactly) and infeasible ones included. Objective values are compared, not x (x need not be
//! unique); what HiGHS proves infeasible must be refused, naming a constraint.

mod common;

use common::Num;
use serde::Deserialize;
use traycast_solver::{CERTIFY_TOL, Goal, Outcome, Rates, Refusal, Task, certify, solve_task};

#[derive(Deserialize)]
struct Case {
    name: String,
    goal: String,
    m: usize,
    n: usize,
    rates_row_major: Vec<f64>,
    floor: Vec<Num>,
    ceiling: Vec<Num>,
    upper: Vec<Num>,
    budget: Option<f64>,
    status: String,
    value: Option<f64>,
}

#[derive(Deserialize)]
struct Fixture {
    cases: Vec<Case>,
}

#[test]
fn linear_goals_match_scipy_linprog_highs() {
    let text = include_str!("../../../tests/fixtures/solver/linprog_reference.json");
    let fixture: Fixture = serde_json::from_str(text).unwrap();
    assert!(fixture.cases.len() >= 30);
    let mut infeasible = 0;
    for case in &fixture.cases {
        let rates = Rates::from_row_major(case.m, case.n, &case.rates_row_major).unwrap();
        let goal = match case.goal.as_str() {
            "shortest" => Goal::Shortest,
            _ => Goal::MaxMargin,
        };
        let mut task = Task::new(goal, case.m, case.n);
        task.floor = case.floor.iter().map(Num::get).collect();
        task.ceiling = case.ceiling.iter().map(Num::get).collect();
        task.upper = case.upper.iter().map(Num::get).collect();
        task.budget = case.budget;
        let ours = solve_task(&rates, &task);
        match (case.status.as_str(), &ours) {
            ("optimal", Ok(p)) => {
                let v = case.value.unwrap();
                assert_eq!(p.outcome, Outcome::Optimal, "{}", case.name);
                let c = certify(&rates, &task, &p.dwell, p.margin, &p.multipliers);
                assert!(c.residual() <= CERTIFY_TOL, "{}: {c:?}", case.name);
                // HiGHS's default tolerances are 1e-7 relative.
                assert!(
                    (p.objective - v).abs() <= 1e-6 * (1.0 + v.abs()),
                    "{}: ours {} highs {v}",
                    case.name,
                    p.objective
                );
            }
            ("infeasible", Err(Refusal::Infeasible(inf))) => {
                infeasible += 1;
                assert!(inf.shortfall > 0.0, "{}: {inf:?}", case.name);
                let words = ours.as_ref().unwrap_err().to_string();
                assert!(words.contains("cannot be met"), "{words}");
            }
            (status, o) => panic!("{}: highs {status}, ours {o:?}", case.name),
        }
    }
    assert!(infeasible >= 2, "the fixtures must hold infeasible cases");
}
