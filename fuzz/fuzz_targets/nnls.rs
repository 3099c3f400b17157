//! Fuzz target: the low-level dwell problem (`traycast nnls`'s inputs) with arbitrary values —
//! NaN, infinities, subnormals and 1e±300 included — is either refused as a typed error or solved,
//! and a solve that calls itself optimal passes the certificate recomputed from scratch.
#![no_main]

use libfuzzer_sys::fuzz_target;
use traycast_solver::{DwellSolver, Rates, Spec, Status, kkt};

fn number(bytes: &[u8]) -> f64 {
    let mut b = [0u8; 8];
    b[..bytes.len()].copy_from_slice(bytes);
    let raw = f64::from_le_bytes(b);
    // Half the time a tame value, so the solver itself gets exercised, not only the refusals.
    if b[0] & 1 == 0 {
        (b[1] as f64) / 16.0 * if b[2] & 1 == 0 { 1.0 } else { -1.0 }
    } else {
        raw
    }
}

fuzz_target!(|data: &[u8]| {
    if data.len() < 3 {
        return;
    }
    let (m, n) = (1 + data[0] as usize % 12, 1 + data[1] as usize % 6);
    let flags = data[2];
    let mut values = data[3..].chunks(8).map(number);
    let mut take = |k: usize| -> Vec<f64> { (0..k).map(|_| values.next().unwrap_or(0.5)).collect() };
    let Ok(rates) = Rates::from_row_major(m, n, &take(m * n)) else {
        return;
    };
    let lo = take(m);
    let hi: Vec<f64> = if flags & 1 == 0 { lo.clone() } else { take(m).iter().zip(&lo).map(|(w, l)| l + w.abs()).collect() };
    let mut spec = Spec::band(lo, hi, n);
    if flags & 2 != 0 {
        spec.weights = take(m);
    }
    if flags & 4 != 0 {
        spec.upper = take(n);
    }
    if flags & 8 != 0 {
        spec.budget = take(1).first().copied();
    }
    if flags & 16 != 0 {
        spec.time_penalty = take(1)[0];
    }
    let Ok(sol) = DwellSolver::new(rates.clone()).solve(&spec) else {
        return;
    };
    assert!(sol.dwell.iter().all(|v| v.is_finite() && *v >= 0.0));
    if matches!(sol.status, Status::Optimal | Status::BudgetBinding) {
        let k = kkt::check(&rates, &spec, &sol.dwell);
        assert!(k.stationarity < 1e-6, "{:?} claimed with {k:?}", sol.status);
    }
});
