//! From warming slopes to absorbed power.
//!
//! A probe's slope on the bench is not the power its cell absorbs. During the run, conduction
//! carries heat to or from the neighbouring cells and between layers, the surface loses heat to
//! the air, and the food's absorption changes with its temperature. A library holds absorbed power
//! (as the column-mean rate at the reference state the time course starts from), so this step
//! removes the run's own physics:
//!
//! 1. simulate every run on the layout with the current map, from the temperatures its probes
//!    first read, recording column means as the probes are read;
//! 2. fit the simulated curve over each probe's own window (the readings its slope was fitted
//!    over), by the same least-squares line;
//! 3. move each measured cell's rate by observed − simulated slope (at most 20 % a pass): a
//!    column's mean warming answers a change of its neighbourhood's rates about one for one, and
//!    additive steps settle where conduction dominates a cell's warming, where scaling would
//!    not. A cell whose gap grows instead of closing (the run boiled it within its window, so
//!    its slope no longer answers its rate) is held at its closest match and its standard error
//!    widened by the remaining gap. A filled
//!    cell moves by the median step of its food's measured cells; rates stay non-negative;
//! 4. repeat until no rate moves by more than [`TOLERANCE`] of its configuration's median rate,
//!    or [`MAX_PASSES`].
//!
//! Otherwise the corrections are deterministic, so the standard errors of the observed slopes
//! carry over.

use super::fit::ProbeFit;
use crate::error::PlanError;
use crate::evaluate::{materials, simulate_load};
use crate::model::Plan;
use crate::regression;
use crate::runs::HeatingRuns;
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::{self, Settings, TimeCourse, View};

/// Most passes per configuration.
pub const MAX_PASSES: usize = 12;
/// A configuration has settled when no rate moves by more than this share of its median rate in
/// a pass.
pub const TOLERANCE: f64 = 0.002;
/// Recording interval of the run simulations, s: short runs are read every second or two. Their
/// time step is the evaluation's own, so the map reproduces the runs under the physics it will be
/// used with.
const RECORD_S: f64 = 1.0;

/// What removing the runs' own losses did to the rates.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LossCorrection {
    /// Most passes any configuration took.
    pub passes: usize,
    /// Whether every configuration settled within [`TOLERANCE`].
    pub converged: bool,
    /// Median |corrected − observed| / observed over measured cells and configurations.
    pub median_change: f64,
    /// Largest |corrected − observed| / observed over measured cells and configurations.
    pub largest_change: f64,
    /// Cells (× configurations) whose simulated slope stopped answering their rate (the run
    /// boiled or saturated them within the fit window): held at their closest match, with the
    /// remaining gap added to their standard error.
    pub saturated: usize,
}

/// Corrects `rates` in place, config-major, from observed slopes to absorbed power (see the
/// module notes). `filled` flags the cells that were not measured; `se` is widened for cells whose
/// simulated slope stopped answering their rate.
pub(super) fn remove_run_losses(
    layout: &Plan,
    runs: &HeatingRuns,
    fits: &[ProbeFit],
    rates: &mut [f64],
    se: &mut [f64],
    filled: &[bool],
) -> Result<LossCorrection, PlanError> {
    let n = layout.tray.cells();
    let mats = materials(layout)?;
    let settings = layout.heating.settings(Settings {
        standing: 0.0,
        record_every: RECORD_S,
        frames: View::Mean,
        ..Settings::default()
    });
    let mut out = LossCorrection {
        passes: 0,
        converged: true,
        median_change: f64::NAN,
        largest_change: 0.0,
        saturated: 0,
    };
    let mut changes = Vec::new();
    for (c, members) in runs
        .series_by_config(layout.oven.configs)
        .iter()
        .enumerate()
    {
        let usable: Vec<usize> = members
            .iter()
            .copied()
            .filter(|&s| fits[s].suspect.is_none() && fits[s].fit.is_some())
            .filter(|&s| fits[s].window.len() >= 2)
            .collect();
        let row = c * n..(c + 1) * n;
        let observed: Vec<f64> = rates[row.clone()].to_vec();
        let mut food_rates: Vec<f64> = (0..n)
            .filter(|&i| layout.food[i] > 0)
            .map(|i| observed[i])
            .collect();
        let floor = TOLERANCE * regression::median(&mut food_rates).max(1e-9);
        let mut cells: Vec<Secant> = observed.iter().map(|&r| Secant::new(r)).collect();
        let mut settled = false;
        for pass in 1..=MAX_PASSES {
            out.passes = out.passes.max(pass);
            let row_rates: Vec<f64> = cells.iter().map(|s| s.rate).collect();
            let (sum, count) = gaps(layout, runs, fits, &usable, &row_rates, &mats, &settings)?;
            let mut steps = vec![f64::NAN; n];
            for i in (0..n).filter(|&i| count[i] > 0 && !filled[c * n + i]) {
                steps[i] = cells[i].step(sum[i] / count[i] as f64, floor);
            }
            let steps = with_filled_steps(layout, &steps);
            let mut largest: f64 = 0.0;
            for (i, cell) in cells.iter_mut().enumerate() {
                if layout.food[i] > 0 && !cell.saturated {
                    cell.rate = (cell.rate + steps[i]).max(0.0);
                    largest = largest.max(steps[i].abs());
                }
            }
            if largest <= floor {
                settled = true;
                break;
            }
        }
        out.converged &= settled;
        for i in (0..n).filter(|&i| layout.food[i] > 0) {
            let cell = &cells[i];
            rates[c * n + i] = if cell.saturated {
                cell.best.0
            } else {
                cell.rate
            };
            if cell.saturated {
                // The slope's error and the gap left, both through the weak sensitivity.
                se[c * n + i] = se[c * n + i].hypot(cell.best.1) / cell.sensitivity.max(0.1);
                out.saturated += 1;
            }
            if !filled[c * n + i] && observed[i] > 0.0 {
                changes.push((rates[c * n + i] - observed[i]).abs() / observed[i]);
            }
        }
    }
    out.largest_change = changes.iter().copied().fold(0.0, f64::max);
    out.median_change = regression::median(&mut changes);
    Ok(out)
}

/// Passes in a row a cell's gap may grow before it is held.
const GROWING_PASSES: u8 = 2;
/// Largest step per pass, as a share of the cell's rate.
const MAX_STEP: f64 = 0.2;
/// Least sensitivity (change of the simulated slope per change of the rate) a cell may show
/// before it is held: below it the run boiled or saturated the cell within its window and its
/// slope barely tells its power.
const MIN_SENSITIVITY: f64 = 0.25;

/// One measured cell's search for the rate whose simulated slope matches the observed one.
#[derive(Clone, Copy, Debug)]
struct Secant {
    rate: f64,
    /// The gap (observed − simulated slope) of the previous pass.
    prev_gap: Option<f64>,
    /// Passes in a row the gap has grown.
    growing: u8,
    /// The previous pass's step.
    prev_step: Option<f64>,
    /// How the simulated slope answers the rate, from how the steps shrink (1 until known).
    sensitivity: f64,
    /// The rate with the smallest |gap| so far, and that |gap|.
    best: (f64, f64),
    /// Held at `best`: its slope stopped answering its rate.
    saturated: bool,
}

impl Secant {
    fn new(rate: f64) -> Self {
        Secant {
            rate,
            prev_gap: None,
            growing: 0,
            prev_step: None,
            sensitivity: 1.0,
            best: (rate, f64::INFINITY),
            saturated: false,
        }
    }

    /// The step for this pass given the gap at the current rate: the gap over the sensitivity
    /// (how the simulated slope answers the rate; 1 at first, as a column's mean warming answers
    /// a change of its neighbourhood's rate about one for one), at most [`MAX_STEP`] of the rate.
    /// After an unclamped step of gain g the gap shrinks by ρ = 1 − s·g, which measures the
    /// sensitivity s = (1 − ρ)/g. Below [`MIN_SENSITIVITY`], or with a gap that grows
    /// [`GROWING_PASSES`] passes in a row, the slope no longer tells the rate and the cell is
    /// held.
    fn step(&mut self, gap: f64, floor: f64) -> f64 {
        if gap.abs() < self.best.1 {
            self.best = (self.rate, gap.abs());
        }
        match (self.prev_gap, self.prev_step) {
            (Some(p), Some(step)) if p.abs() > floor => {
                let gain = step / p;
                // Only an unclamped step (gain exactly 1/s) measures the sensitivity.
                if (gain - 1.0 / self.sensitivity).abs() < 1e-9 {
                    self.sensitivity = (1.0 - gap / p) / gain;
                }
                self.growing = if gap * p > 0.0 && gap.abs() > p.abs() + floor {
                    self.growing + 1
                } else {
                    0
                };
            }
            _ => self.growing = 0,
        }
        self.prev_gap = Some(gap);
        if self.growing >= GROWING_PASSES || self.sensitivity < MIN_SENSITIVITY {
            self.sensitivity = self.sensitivity.min(MIN_SENSITIVITY);
            self.saturated = true;
            return 0.0;
        }
        let limit = MAX_STEP * self.rate.max(floor);
        let step = (gap / self.sensitivity.min(2.0)).clamp(-limit, limit);
        self.prev_step = Some(step);
        step
    }
}

/// Per cell, the summed observed − simulated slopes of the usable probes and their count, with
/// every run of the configuration simulated on `rates`.
fn gaps(
    layout: &Plan,
    runs: &HeatingRuns,
    fits: &[ProbeFit],
    usable: &[usize],
    rates: &[f64],
    mats: &[traycast_thermal::material::Material],
    settings: &Settings,
) -> Result<(Vec<f64>, Vec<usize>), PlanError> {
    let n = layout.tray.cells();
    let mut run_ids: Vec<usize> = usable.iter().map(|&s| runs.series[s].run).collect();
    run_ids.sort_unstable();
    run_ids.dedup();
    let (mut sum, mut count) = (vec![0.0; n], vec![0usize; n]);
    for r in run_ids {
        let course = simulate_run(layout, runs, usable, r, rates, mats, settings)?;
        for &s in usable.iter().filter(|&&s| runs.series[s].run == r) {
            let series = &runs.series[s];
            let observed = fits[s].fit.expect("usable fits exist").slope;
            let (t, y): (Vec<f64>, Vec<f64>) = series.readings[fits[s].window.clone()]
                .iter()
                .map(|reading| (reading.t, column_mean_at(&course, series.cell, reading.t)))
                .unzip();
            if let Some(sim) = regression::line(&t, &y) {
                sum[series.cell] += observed - sim.slope;
                count[series.cell] += 1;
            }
        }
    }
    Ok((sum, count))
}

/// One run simulated with the map `rates` (one configuration, reference state), from the mean
/// of each cell's first readings in that run (other cells from the median of those).
fn simulate_run(
    layout: &Plan,
    runs: &HeatingRuns,
    usable: &[usize],
    run: usize,
    rates: &[f64],
    mats: &[traycast_thermal::material::Material],
    settings: &Settings,
) -> Result<TimeCourse, PlanError> {
    let n = layout.tray.cells();
    let (mut first, mut count) = (vec![0.0; n], vec![0usize; n]);
    let mut all = Vec::new();
    for &s in usable.iter().filter(|&&s| runs.series[s].run == run) {
        let series = &runs.series[s];
        let t0 = series.readings[0].temp_c;
        first[series.cell] += t0;
        count[series.cell] += 1;
        all.push(t0);
    }
    let typical = regression::median(&mut all);
    let start: Vec<f64> = (0..n)
        .map(|i| {
            if count[i] > 0 {
                first[i] / count[i] as f64
            } else {
                typical
            }
        })
        .collect();
    let maps = simulate::Maps { configs: 1, rates };
    let schedule = Schedule::blocks(&[runs.runs[run].duration_s]);
    simulate_load(layout, &start, maps, mats, &schedule, settings)
}

/// The simulated column mean of `cell` at time `t`, interpolated between recorded frames.
fn column_mean_at(course: &TimeCourse, cell: usize, t: f64) -> f64 {
    let times = &course.times;
    let k = times.partition_point(|&x| x <= t);
    if k == 0 {
        return course.frames[0][cell];
    }
    if k >= times.len() {
        return course.frames[times.len() - 1][cell];
    }
    let (t0, t1) = (times[k - 1], times[k]);
    let (y0, y1) = (course.frames[k - 1][cell], course.frames[k][cell]);
    y0 + (y1 - y0) * (t - t0) / (t1 - t0)
}

/// `steps` (NaN where a cell has no measured step of its own) completed for every food cell: the
/// median over its food's measured cells, else over all measured cells, else 0.
fn with_filled_steps(layout: &Plan, steps: &[f64]) -> Vec<f64> {
    let n = steps.len();
    let own = |i: usize| Some(steps[i]).filter(|v| v.is_finite());
    let mut all: Vec<f64> = (0..n).filter_map(own).collect();
    let overall = regression::median(&mut all);
    let by_item: Vec<f64> = (0..layout.items.len())
        .map(|k| {
            let mut v: Vec<f64> = (0..n)
                .filter(|&i| layout.item_at(i) == Some(k))
                .filter_map(own)
                .collect();
            regression::median(&mut v)
        })
        .collect();
    (0..n)
        .map(|i| match (own(i), layout.item_at(i)) {
            (Some(v), _) => v,
            (None, Some(k)) if by_item[k].is_finite() => by_item[k],
            (None, Some(_)) if overall.is_finite() => overall,
            _ => 0.0,
        })
        .collect()
}
