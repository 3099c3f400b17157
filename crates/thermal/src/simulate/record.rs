//! What the simulation reports: per cell its coldest point, mean and surface; per item the
//! coldest point, mean and hottest point over time.

use super::model::Model;
use super::{ItemCurve, View};
use crate::composition::BOILING_POINT;

/// One view of each cell's column, NaN for empty cells.
pub(super) struct Columns {
    /// Coldest node, °C.
    pub coldest: Vec<f64>,
    /// Depth of the coldest node's centre below the top face, m.
    pub coldest_depth: Vec<f64>,
    /// Water evaporated from the coldest node, per kg of that node's starting mass.
    pub coldest_evaporated: Vec<f64>,
    /// Mass-weighted mean, °C.
    pub mean: Vec<f64>,
    /// Top layer, °C.
    pub surface: Vec<f64>,
    /// Hottest node, °C.
    pub hottest: Vec<f64>,
    /// Energy held, kJ (enthalpy zero at −40 °C).
    pub energy: Vec<f64>,
}

impl Columns {
    pub fn of(m: &Model) -> Self {
        let n = m.load.tray.cells();
        let mut v = Columns {
            coldest: vec![f64::NAN; n],
            coldest_depth: vec![f64::NAN; n],
            coldest_evaporated: vec![f64::NAN; n],
            mean: vec![f64::NAN; n],
            surface: vec![f64::NAN; n],
            hottest: vec![f64::NAN; n],
            energy: vec![f64::NAN; n],
        };
        for &i in &m.filled {
            let nodes = m.nodes(i);
            let (mut lo, mut hi, mut at) = (f64::INFINITY, f64::NEG_INFINITY, 0);
            let (mut sum, mut mass) = (0.0, 0.0);
            for (l, node) in nodes.clone().enumerate() {
                let t = m.temp[node];
                if t < lo {
                    lo = t;
                    at = l;
                }
                hi = hi.max(t);
                sum += t * m.mass[node];
                mass += m.mass[node];
            }
            v.coldest[i] = lo;
            v.coldest_depth[i] = (at as f64 + 0.5) * m.dz[nodes.start];
            let node = nodes.start + at;
            v.coldest_evaporated[i] = m.evaporated[node] / m.mass0[node];
            v.hottest[i] = hi;
            v.energy[i] = m.energy[nodes.clone()].iter().sum();
            v.surface[i] = m.temp[nodes.start];
            // A column that boiled away entirely has no mass left: it holds at the boiling point.
            v.mean[i] = if mass > 0.0 {
                sum / mass
            } else {
                BOILING_POINT
            };
        }
        v
    }
}

pub(super) struct Recorder {
    pub times: Vec<f64>,
    pub frames: Vec<Vec<f64>>,
    pub items: Vec<ItemCurve>,
    pub peak: Vec<f64>,
    /// Every step's instant, s, and each cell's coldest layer then (empty for empty cells).
    pub trace_times: Vec<f64>,
    pub coldest_trace: Vec<Vec<f64>>,
    pub next: f64,
    view: View,
}

impl Recorder {
    pub fn new(m: &Model, items: usize, view: View) -> Self {
        Recorder {
            times: vec![],
            frames: vec![],
            items: vec![ItemCurve::default(); items],
            peak: Columns::of(m).hottest,
            trace_times: vec![],
            coldest_trace: vec![Vec::new(); m.load.tray.cells()],
            next: 0.0,
            view,
        }
    }

    /// Records a frame at `t` (outside the step cadence: the end of heating or standing).
    pub fn record(&mut self, t: f64, m: &Model) {
        self.scan(m, None, Some(t));
    }

    /// Follows every step: each cell's peak and coldest layer, and a frame when one is due.
    pub fn track(&mut self, t: f64, m: &Model, every: f64) {
        let due = t + 1e-9 >= self.next;
        self.scan(m, Some(t), due.then_some(t));
        if due {
            while self.next <= t + 1e-9 {
                self.next += every;
            }
        }
    }

    /// One pass over every node: with `step`, each cell's peak and coldest layer at that instant;
    /// with `frame`, the frame's view of each cell and each item's curves.
    fn scan(&mut self, m: &Model, step: Option<f64>, frame: Option<f64>) {
        if let Some(t) = step {
            self.trace_times.push(t);
        }
        let k = self.items.len();
        let mut view = Vec::new();
        let (mut lo_k, mut hi_k) = (Vec::new(), Vec::new());
        let (mut sum_k, mut mass_k) = (Vec::new(), Vec::new());
        if frame.is_some() {
            view = vec![f64::NAN; m.load.tray.cells()];
            (lo_k, hi_k) = (vec![f64::INFINITY; k], vec![f64::NEG_INFINITY; k]);
            (sum_k, mass_k) = (vec![0.0; k], vec![0.0; k]);
        }
        for &i in &m.filled {
            let nodes = m.nodes(i);
            let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
            let (mut sum, mut mass) = (0.0, 0.0);
            for node in nodes.clone() {
                let t = m.temp[node];
                lo = lo.min(t);
                hi = hi.max(t);
                sum += t * m.mass[node];
                mass += m.mass[node];
            }
            if step.is_some() {
                self.peak[i] = self.peak[i].max(hi);
                self.coldest_trace[i].push(lo);
            }
            if frame.is_some() {
                // A column that boiled away entirely holds at the boiling point.
                let mean = if mass > 0.0 {
                    sum / mass
                } else {
                    BOILING_POINT
                };
                view[i] = match self.view {
                    View::Coldest => lo,
                    View::Mean => mean,
                    View::Surface => m.temp[nodes.start],
                };
                let it = m.load.cells[i].expect("filled").item;
                lo_k[it] = lo_k[it].min(lo);
                hi_k[it] = hi_k[it].max(hi);
                sum_k[it] += sum;
                mass_k[it] += mass;
            }
        }
        let Some(t) = frame else { return };
        self.times.push(t);
        self.frames.push(view);
        // An item that boiled away entirely has no mass left: its mean is the boiling point.
        for (it, curve) in self.items.iter_mut().enumerate() {
            if mass_k[it] == 0.0 && lo_k[it].is_finite() {
                sum_k[it] = BOILING_POINT;
                mass_k[it] = 1.0;
            }
            let empty = mass_k[it] == 0.0;
            curve.min.push(if empty { f64::NAN } else { lo_k[it] });
            curve.max.push(if empty { f64::NAN } else { hi_k[it] });
            curve.mean.push(if empty {
                f64::NAN
            } else {
                sum_k[it] / mass_k[it]
            });
        }
    }
}
