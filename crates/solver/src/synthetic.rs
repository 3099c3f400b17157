//! Seeded, illustrative test problems shaped like a tray: smooth standing-wave-like maps and painted targets.
//!
//! For benchmarks, examples and property tests only; the product's field model lives in the plan crate.
//! Invented data: it describes no real oven.

use crate::problem::Rates;
use traycast_rng::SplitMix;

/// A tray-shaped problem: rates for `width × height` cells (row-major cells) and a painted target rise.
#[derive(Clone, Debug)]
pub struct PaintedTray {
    /// Cells across.
    pub width: usize,
    /// Cells down.
    pub height: usize,
    /// Heating rates, K/s.
    pub rates: Rates,
    /// Target rise per cell, K: four painted zones (two hot items, a warm side, a chilled corner).
    pub target: Vec<f64>,
}

/// Builds a [`PaintedTray`] with `configs` configurations from `seed`.
pub fn painted_tray(width: usize, height: usize, configs: usize, seed: u64) -> PaintedTray {
    let mut rng = SplitMix::new(seed);
    let m = width * height;
    let mut columns = Vec::with_capacity(configs);
    for _ in 0..configs {
        let mut col = vec![0.0; m];
        for _ in 0..2 {
            let p = 1.0 + rng.below(6) as f64;
            let q = 1.0 + rng.below(5) as f64;
            let (px, py) = (rng.unit(), rng.unit());
            let amp = 0.05 + 0.25 * rng.unit();
            for r in 0..height {
                for c in 0..width {
                    let u = (c as f64 + 0.5) / width as f64 + px;
                    let v = (r as f64 + 0.5) / height as f64 + py;
                    let s =
                        (p * std::f64::consts::PI * u).sin() * (q * std::f64::consts::PI * v).sin();
                    col[r * width + c] += amp * s * s;
                }
            }
        }
        let floor = 0.01 + 0.02 * rng.unit();
        col.iter_mut().for_each(|v| *v += floor);
        columns.push(col);
    }
    let rates =
        Rates::from_columns(m, &columns).expect("synthetic rates are finite and non-negative");
    let target = (0..m)
        .map(|i| {
            let (r, c) = (i / width.max(1), i % width.max(1));
            let (fx, fy) = (c as f64 / width as f64, r as f64 / height as f64);
            if fx >= 0.75 && fy >= 0.5 {
                4.0
            } else if fx < 0.5 && fy < 0.5 {
                70.0
            } else if fx < 0.5 {
                62.0
            } else {
                55.0
            }
        })
        .collect();
    PaintedTray {
        width,
        height,
        rates,
        target,
    }
}

/// Tray dimensions used for the benchmark sizes 96, 384, 1536 and 2048 cells.
pub fn tray_shape(cells: usize) -> (usize, usize) {
    match cells {
        96 => (12, 8),
        384 => (24, 16),
        1536 => (48, 32),
        2048 => (64, 32),
        n => (n, 1),
    }
}
