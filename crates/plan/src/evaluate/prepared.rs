//! What one revision of a plan implies cell by cell — target bands, start temperatures, the
//! targeted cells, each zone's and item's cells — derived once per evaluation and passed to every
//! step that needs it, instead of each step deriving it again.

use crate::model::Plan;

/// A plan's per-cell facts for one revision.
#[derive(Clone, Debug, PartialEq)]
pub struct Prepared {
    /// Target band per cell, °C (min, effective max with the cap), for zoned cells.
    pub band: Vec<Option<(f64, f64)>>,
    /// Start temperature per cell, °C (NaN for empty cells).
    pub start: Vec<f64>,
    /// The zoned cells, ascending: the rows of the dwell problem.
    pub rows: Vec<usize>,
    /// Each zone's cells, ascending.
    pub zone_cells: Vec<Vec<usize>>,
    /// Each food item's cells, ascending.
    pub item_cells: Vec<Vec<usize>>,
}

impl Prepared {
    /// Derives the facts of `plan` (which must be valid).
    pub fn new(plan: &Plan) -> Self {
        let n = plan.tray.cells();
        let mut band = vec![None; n];
        let mut start = vec![f64::NAN; n];
        let mut rows = Vec::new();
        let mut zone_cells = vec![Vec::new(); plan.zones.len()];
        let mut item_cells = vec![Vec::new(); plan.items.len()];
        for i in 0..n {
            if let Some(k) = plan.item_at(i) {
                start[i] = plan.items[k].start_c;
                item_cells[k].push(i);
            }
            if let Some(z) = plan.zone_at(i) {
                let zone = &plan.zones[z];
                band[i] = Some((
                    zone.min_c,
                    zone.cap_c.map_or(zone.max_c, |c| c.min(zone.max_c)),
                ));
                rows.push(i);
                zone_cells[z].push(i);
            }
        }
        Prepared {
            band,
            start,
            rows,
            zone_cells,
            item_cells,
        }
    }

    /// Signed distance outside the band per cell, K, for `temps` (NaN for cells without a target,
    /// and wherever the temperature is not a number).
    pub fn band_errors(&self, temps: &[f64]) -> Vec<f64> {
        self.band
            .iter()
            .zip(temps)
            .map(|(b, &t)| {
                b.map_or(f64::NAN, |(lo, hi)| {
                    traycast_solver::band_distance(t, lo, hi)
                })
            })
            .collect()
    }
}
