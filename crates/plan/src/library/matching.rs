//! Load matching: how similar a plan's layout is to each recorded load, and the replay window
//! that says whether a load's maps may be replayed for it.

use super::MapLibrary;
use traycast_thermal::dielectric::LossClass;

/// Where a plan stands relative to a library's recorded loads.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Window {
    /// Score ≥ 0.90: the layout is close enough to replay the maps.
    Inside,
    /// 0.75 ≤ score < 0.90: similar load; expect deviations, verify by measurement.
    Marginal,
    /// Score < 0.75: the maps were recorded for a different load and should not be trusted.
    Outside,
}

/// Replay-window thresholds (Traycast's own product choice, not a standard): inside ≥ 0.90,
/// marginal ≥ 0.75.
pub const WINDOW_INSIDE: f64 = 0.90;
/// See [`WINDOW_INSIDE`].
pub const WINDOW_MARGINAL: f64 = 0.75;

/// The best-matching recorded load.
#[derive(Clone, Debug, PartialEq)]
pub struct LoadMatch {
    /// Index into `loads`.
    pub load: usize,
    /// Similarity 0…1: 1 − (mismatch over the cells that hold food in either layout), where food
    /// against empty counts 1 and food of another absorption class counts 0.5.
    pub score: f64,
    /// Window the score falls in.
    pub window: Window,
}

/// Similarity of two layouts (see [`LoadMatch::score`]).
pub fn similarity(a: &[Option<LossClass>], b: &[Option<LossClass>]) -> f64 {
    let (mut used, mut miss) = (0.0, 0.0);
    for (x, y) in a.iter().zip(b) {
        match (x, y) {
            (None, None) => {}
            (Some(p), Some(q)) => {
                used += 1.0;
                if p != q {
                    miss += 0.5;
                }
            }
            _ => {
                used += 1.0;
                miss += 1.0;
            }
        }
    }
    if used == 0.0 { 1.0 } else { 1.0 - miss / used }
}

impl MapLibrary {
    /// Scores `layout` against every recorded load and returns the best.
    pub fn best_match(&self, layout: &[Option<LossClass>]) -> Option<LoadMatch> {
        self.loads
            .iter()
            .enumerate()
            .map(|(k, l)| (k, similarity(layout, &l.layout)))
            .max_by(|a, b| a.1.total_cmp(&b.1))
            .map(|(load, score)| LoadMatch {
                load,
                score,
                window: if score >= WINDOW_INSIDE {
                    Window::Inside
                } else if score >= WINDOW_MARGINAL {
                    Window::Marginal
                } else {
                    Window::Outside
                },
            })
    }
}
