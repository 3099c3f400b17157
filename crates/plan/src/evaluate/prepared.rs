//! What one revision of a plan implies cell by cell — target bands, start temperatures, the
//! targeted cells, each zone's and item's cells — derived once per evaluation and passed to every
//! step that needs it, instead of each step deriving it again.

use crate::model::Plan;
use std::sync::OnceLock;

/// A plan's per-cell facts for one revision.
#[derive(Clone, Debug)]
pub struct Prepared {
    /// Target band per zone code (0, no zone, has none), °C (min, effective max with the cap).
    zone_band: Vec<Option<(f64, f64)>>,
    /// Start temperature per cell, °C (NaN for empty cells).
    pub start: Vec<f64>,
    /// The zoned cells, ascending: the rows of the dwell problem.
    pub rows: Vec<usize>,
    /// The plan's zone grid, for [`Prepared::zone_cells`].
    zone: Vec<u8>,
    /// The plan's food grid, for [`Prepared::item_cells`].
    food: Vec<u8>,
    /// How many zones and items the plan has.
    codes: (usize, usize),
    zone_cells: OnceLock<Vec<Vec<usize>>>,
    item_cells: OnceLock<Vec<Vec<usize>>>,
    /// The dwell problem's rows, in the order of [`Prepared::rows`].
    pub problem: RowTargets,
}

/// Per row of the dwell problem (each zoned cell): its band as a rise over its start temperature,
/// its zone's weight, and its hard cap as a rise if its zone has one.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct RowTargets {
    /// Lowest rise, K.
    pub lo: Vec<f64>,
    /// Highest rise (band maximum, or the cap if lower), K.
    pub hi: Vec<f64>,
    /// The zone's weight.
    pub weight: Vec<f64>,
    /// The zone's hard cap as a rise, K; empty when no zone of the plan has a cap.
    pub cap: Vec<Option<f64>>,
}

impl Prepared {
    /// Derives the facts of `plan` (which must be valid).
    pub fn new(plan: &Plan) -> Self {
        let n = plan.tray.cells();
        let (food, zone) = (&plan.food[..n], &plan.zone[..n]);
        // Per grid code (0 = none), what it stands for: tables indexed by a byte need no bounds
        // checks, and simple passes over the grids beat one loop that pushes to six lists (this
        // runs on every brush stroke).
        let mut start_of = [f64::NAN; 256];
        for (k, it) in plan.items.iter().enumerate() {
            start_of[k + 1] = it.start_c;
        }
        let mut band_of = [None; 256];
        for (k, z) in plan.zones.iter().enumerate() {
            band_of[k + 1] = Some((z.min_c, z.cap_c.map_or(z.max_c, |c| c.min(z.max_c))));
        }
        let start: Vec<f64> = food.iter().map(|&f| start_of[f as usize]).collect();
        let rows: Vec<usize> = (0..n).filter(|&i| zone[i] > 0).collect();
        // A valid plan paints targets on food only, so every row has a start temperature.
        let row_zone = |i: usize| &plan.zones[zone[i] as usize - 1];
        let row_band = |i: usize| band_of[zone[i] as usize].expect("a row is zoned");
        let any_cap = plan.zones.iter().any(|z| z.cap_c.is_some());
        let problem = RowTargets {
            lo: rows.iter().map(|&i| row_band(i).0 - start[i]).collect(),
            hi: rows.iter().map(|&i| row_band(i).1 - start[i]).collect(),
            weight: rows.iter().map(|&i| row_zone(i).weight).collect(),
            cap: if any_cap {
                rows.iter()
                    .map(|&i| row_zone(i).cap_c.map(|c| c - start[i]))
                    .collect()
            } else {
                Vec::new()
            },
        };
        Prepared {
            zone_band: band_of[..=plan.zones.len()].to_vec(),
            start,
            rows,
            zone: zone.to_vec(),
            food: food.to_vec(),
            codes: (plan.zones.len(), plan.items.len()),
            zone_cells: OnceLock::new(),
            item_cells: OnceLock::new(),
            problem,
        }
    }

    /// Target band of cell `i`, °C (min, effective max with the cap), if it is zoned.
    pub fn band(&self, i: usize) -> Option<(f64, f64)> {
        self.zone_band[self.zone[i] as usize]
    }

    /// Each zone's cells, ascending: sorted out the first time a full evaluation asks (the
    /// instant preview never does).
    pub fn zone_cells(&self) -> &[Vec<usize>] {
        self.zone_cells
            .get_or_init(|| cells_by_code(&self.zone, self.codes.0))
    }

    /// Each food item's cells, ascending (see [`Prepared::zone_cells`]).
    pub fn item_cells(&self) -> &[Vec<usize>] {
        self.item_cells
            .get_or_init(|| cells_by_code(&self.food, self.codes.1))
    }

    /// Signed distance outside the band per cell, K, for `temps` (NaN for cells without a target,
    /// and wherever the temperature is not a number).
    pub fn band_errors(&self, temps: &[f64]) -> Vec<f64> {
        self.zone
            .iter()
            .zip(temps)
            .map(|(&z, &t)| {
                self.zone_band[z as usize].map_or(f64::NAN, |(lo, hi)| {
                    traycast_solver::band_distance(t, lo, hi)
                })
            })
            .collect()
    }
}

/// The cells carrying each code 1..=`codes` of `grid`, ascending (code 0, nothing, is left out).
fn cells_by_code(grid: &[u8], codes: usize) -> Vec<Vec<usize>> {
    let mut count = [0usize; 256];
    for &c in grid {
        count[c as usize] += 1;
    }
    let mut out: Vec<Vec<usize>> = (1..=codes).map(|c| Vec::with_capacity(count[c])).collect();
    for (i, &c) in grid.iter().enumerate() {
        if c > 0 {
            out[c as usize - 1].push(i);
        }
    }
    out
}
