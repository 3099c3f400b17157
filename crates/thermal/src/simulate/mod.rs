//! The time course on the tray grid: heating steps, conduction, thawing, boiling, then standing.
//!
//! Model (a cell holds one food item of a given thickness, cut into layers through its thickness;
//! one node per layer, see [`column`]):
//! - **Power.** A heating map gives, per configuration, the rate (K/s) at which the cell's food,
//!   thawed at 20 °C ([`crate::material::REFERENCE_C`]), would warm on average over its column.
//!   That fixes the power falling on the column: what a uniform column at the reference state
//!   absorbs is rate × mass × cp(20 °C). Every sub-step, that incident power enters through the top
//!   face (and the share [`Settings::bottom_entry`] through the bottom), each face letting in what
//!   its surface layer transmits, and each layer keeps its Lambert's-law share at its own
//!   penetration depth ([`column::deposit`]). The dielectric properties follow each layer's
//!   temperature, ice fraction and moisture ([`crate::dielectric`]): frozen layers let power
//!   through, thawed ones keep it, salty ones take more as they warm. The column never absorbs more
//!   than falls on it.
//! - **Layers.** Each at most [`Settings::max_layer`] thick and at most the food's smallest
//!   penetration depth over its states, so a thick piece's centre is resolved; its coldest point is
//!   its coldest node.
//! - **Enthalpy.** Energy goes into specific enthalpy; temperature follows from the food's curve
//!   (latent heat of fusion included, see [`crate::material`]).
//! - **Boiling.** Above 100 °C the excess evaporates water at L_v = 2257 kJ/kg; the cell stays at
//!   100 °C until its water is gone. The thermal curve keeps the original composition (moisture loss
//!   of a few per cent changes it little) — a stated simplification.
//! - **Drying.** Absorption falls with the water that has boiled off, down to the dry residue's own
//!   small share ([`Material::attenuation_with_moisture`]), so a dried cell no longer heats as if it were
//!   moist. A cell with no dry matter (pure water) that boils away entirely is *boiled dry*: it holds
//!   at the boiling point and takes no further part ([`TimeCourse::boiled_dry`]). Cells that pass
//!   [`MODEL_LIMIT_C`] are outside the property model and scorch; callers warn about them.
//! - **Finite.** A state that stops being a finite number is an error naming the cell and the time,
//!   never a result.
//! - **Conduction** in all three directions: between the layers of a column (area Δx², half-layer
//!   resistances Δz/(2k)), and between layers of side-by-side cells that overlap in height (area
//!   Δx × overlap, half-cell resistances Δx/(2k), plus 1/h_c between different food items).
//! - **Surface loss.** The top layer loses h·(T − T_air) (h ≈ 10 W/(m²·K): air nearly still, an
//!   assumption; no citable in-oven value exists), and, where the food is not covered, the latent
//!   heat of the water that evaporates from it below boiling ([`evaporation`]).
//! - **Tray bottom.** Insulated, or a plate with a heat capacity per area
//!   ([`Settings::tray_capacity`]) under each cell, exchanging heat with the bottom layer through
//!   the contact conductance; the plate takes no microwave power and does not spread heat
//!   sideways (a simplification).
//! - **Tray edges** are insulated, or held at a temperature through a ghost cell one pitch outside.
//!
//! **Stability.** The explicit step is stable and positivity-preserving when, for every node,
//! Δt ≤ C/ΣG with C = m·min(dH/dT) and ΣG the sum of its conductances (including surface and edge):
//! the lumped form of α·Δt/Δx² ≤ 1/6 in 3-D. [`simulate`] splits each requested step into as many
//! equal sub-steps as needed to stay under 0.9× that limit. The conductances follow the nodes'
//! conductivities every other step (and at once when a node dries out): conductivity changes by
//! a few per cent per 10 K and a thaw only lowers it, well inside the 10 % margin.

mod check;
pub mod column;
pub mod evaporation;
mod model;
mod record;

use crate::error::ThermalError;
use crate::material::Material;
use crate::schedule::Schedule;
use model::Model;
use record::{Columns, Recorder};

/// Highest temperature the property model covers, °C: the top of the Choi & Okos (1986)
/// correlations' stated range (−40 to 150 °C; ASHRAE Handbook – Refrigeration 2006, ch. 9). A dried
/// cell past it is scorching, and its predicted temperature is outside the model.
pub const MODEL_LIMIT_C: f64 = 150.0;

/// The tray grid.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Tray {
    /// Cells across.
    pub width: usize,
    /// Cells down.
    pub height: usize,
    /// Side of a square cell, m.
    pub cell_size: f64,
}

impl Tray {
    /// Number of cells.
    pub fn cells(&self) -> usize {
        self.width * self.height
    }
}

/// What one cell holds.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CellFill {
    /// Index of the food item (into the item materials).
    pub item: usize,
    /// Food thickness in this cell, m.
    pub thickness: f64,
    /// A cover over the food: it keeps the moisture in (no evaporation below boiling), as the
    /// FDA Food Code asks for microwave cooking (3-401.12(B)).
    pub covered: bool,
}

/// The tray's outer edges: left/right (`x`) and top/bottom (`y`) of the grid.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Edges {
    /// Left and right edges.
    pub x: Edge,
    /// Top and bottom edges (in the grid's row direction).
    pub y: Edge,
}

impl Edges {
    /// All four edges insulated.
    pub const INSULATED: Edges = Edges {
        x: Edge::Insulated,
        y: Edge::Insulated,
    };
}

/// How one tray edge exchanges heat.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Edge {
    /// No flux across the edge.
    Insulated,
    /// Held at this temperature (°C) one cell pitch outside the edge.
    Fixed(f64),
}

/// Simulation settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Settings {
    /// Surface heat-transfer coefficient to cavity air, W/(m²·K).
    pub surface_h: f64,
    /// Contact conductance between touching food items, W/(m²·K).
    pub contact_conductance: f64,
    /// Cavity air temperature, °C.
    pub air: f64,
    /// Standing time after heating, power off, s.
    pub standing: f64,
    /// Requested time step, s (split automatically if unstable).
    pub step: f64,
    /// Interval between recorded frames, s.
    pub record_every: f64,
    /// The tray edge conditions.
    pub edges: Edges,
    /// Thickest layer a food column is cut into, m (thinner where the penetration depth asks).
    pub max_layer: f64,
    /// Which point of each column [`TimeCourse::frames`] records.
    pub frames: View,
    /// Share of each column's power that enters through its bottom face (0 to 1): 0 for a tray
    /// that lets no energy through from below, 0.5 for food heated equally from both faces.
    pub bottom_entry: f64,
    /// Heat capacity of the tray under each square metre of food, J/(m²·K): it starts at the
    /// food's start temperature and exchanges heat with the bottom layer through the contact
    /// conductance. 0 for a bottom that is insulated and stores no heat. A 0.8 mm polypropylene
    /// tray is about 1 400 (900 kg/m³ × 1.9 kJ/(kg·K) × 0.8 mm, typical handbook values recalled
    /// from memory).
    pub tray_capacity: f64,
    /// Relative humidity of the cavity air (0 to 1): drives evaporation from uncovered food.
    pub air_humidity: f64,
}

impl Default for Settings {
    /// h = 10 W/(m²·K), contact 200 W/(m²·K) (assumed), air 25 °C, standing 120 s (FDA Food Code
    /// 3-401.12), 4 s steps (the configurations' power averaged within each; split where stability
    /// asks), a frame every 5 s, insulated edges, layers at most 4 mm, all power entering from
    /// the top, an insulated tray bottom that stores no heat, and cavity air at 50 % relative
    /// humidity (an assumption: room air; steam from the food raises it during heating, which
    /// would slow evaporation, so 50 % errs towards a cooler surface). Top-only entry is the conservative assumption for the coldest point
    /// (heated from one face, a thick piece's far side stays coldest); a common-practice default
    /// until the tray's share is known, not a measured value.
    fn default() -> Self {
        Settings {
            surface_h: 10.0,
            contact_conductance: 200.0,
            air: 25.0,
            standing: 120.0,
            step: 4.0,
            record_every: 5.0,
            edges: Edges::INSULATED,
            frames: View::Coldest,
            max_layer: 0.004,
            bottom_entry: 0.0,
            tray_capacity: 0.0,
            air_humidity: 0.5,
        }
    }
}

/// Which point of a cell's column a per-cell map shows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum View {
    /// The coldest layer (what food safety is judged on).
    Coldest,
    /// The mass-weighted mean of the column.
    Mean,
    /// The top layer.
    Surface,
}

/// Everything about the load: grid, per-cell contents and start temperatures, item materials.
#[derive(Clone, Debug)]
pub struct Load<'a> {
    /// The grid.
    pub tray: Tray,
    /// Material of each food item.
    pub items: &'a [Material],
    /// Per cell (row-major): contents, or None for an empty cell.
    pub cells: &'a [Option<CellFill>],
    /// Start temperature per cell, °C (ignored for empty cells).
    pub start: &'a [f64],
}

/// Heating maps: `rates[c * cells + i]` is the rate of cell i under configuration c, K/s.
#[derive(Clone, Copy, Debug)]
pub struct Maps<'a> {
    /// Number of configurations.
    pub configs: usize,
    /// Config-major rates.
    pub rates: &'a [f64],
}

/// Coldest point / mass-weighted mean / hottest point of one item (over every layer of every
/// cell), per recorded frame.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct ItemCurve {
    /// Coldest point, °C.
    pub min: Vec<f64>,
    /// Mass-weighted mean, °C.
    pub mean: Vec<f64>,
    /// Hottest point, °C.
    pub max: Vec<f64>,
}

/// The simulated prediction.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct TimeCourse {
    /// Recorded instants, s from the start.
    pub times: Vec<f64>,
    /// Each cell's [`Settings::frames`] point (by default its coldest layer) at each recorded
    /// instant (NaN for empty cells), °C.
    pub frames: Vec<Vec<f64>>,
    /// Per item curves over the recorded instants.
    pub items: Vec<ItemCurve>,
    /// Highest temperature any layer of each cell reached, °C.
    pub peak: Vec<f64>,
    /// Every step's instant through heating and standing, s.
    pub trace_times: Vec<f64>,
    /// Each cell's coldest layer at every instant of [`TimeCourse::trace_times`], °C (empty for
    /// empty cells). Its kill is a lower bound on the kill of every layer of the cell (the kill
    /// rate rises with temperature), so it is what time at temperature is judged on.
    pub coldest_trace: Vec<Vec<f64>>,
    /// Coldest point of each cell when the power goes off, °C.
    pub end_of_heating: Vec<f64>,
    /// Coldest point of each cell after the standing time, °C.
    pub after_standing: Vec<f64>,
    /// Hottest point of each cell (its hottest layer) after the standing time, °C.
    pub hottest_after_standing: Vec<f64>,
    /// Depth of each cell's coldest point below its top face after the standing time, m.
    pub coldest_depth: Vec<f64>,
    /// Water evaporated from each cell's coldest point (its coldest layer) by the end of the
    /// standing time, per kg of that layer's starting mass.
    pub coldest_evaporated: Vec<f64>,
    /// Mass-weighted mean of each cell's column after the standing time, °C.
    pub mean_after_standing: Vec<f64>,
    /// Top layer of each cell after the standing time, °C.
    pub surface_after_standing: Vec<f64>,
    /// Energy each cell holds after the standing time, kJ (enthalpy zero at −40 °C; NaN for empty
    /// cells).
    pub energy_after_standing: Vec<f64>,
    /// Layers each cell was cut into (0 for empty cells).
    pub layers: Vec<usize>,
    /// Each cell's layers after the standing time, top first, °C (empty for empty cells).
    pub layers_after_standing: Vec<Vec<f64>>,
    /// Thickness of each cell's layers, m (NaN for empty cells).
    pub layer_thickness: Vec<f64>,
    /// Water evaporated per cell, kg.
    pub moisture_loss: Vec<f64>,
    /// Water evaporated per item, kg.
    pub item_moisture_loss: Vec<f64>,
    /// Cells whose whole content evaporated (pure water boiled away in every layer): held at the
    /// boiling point.
    pub boiled_dry: Vec<bool>,
    /// Time step actually used, s.
    pub step: f64,
    /// Heating time, s.
    pub heating_seconds: f64,
    /// Standing time, s.
    pub standing_seconds: f64,
}

impl TimeCourse {
    /// Temperature after the standing time at `depth` (m) below the top face of `cell`: the layer
    /// holding that depth. NaN for an empty cell or a depth outside the food.
    pub fn at_depth(&self, cell: usize, depth: f64) -> f64 {
        let (layers, dz) = (
            &self.layers_after_standing[cell],
            self.layer_thickness[cell],
        );
        if layers.is_empty() || depth.is_nan() || depth < 0.0 || depth > dz * layers.len() as f64 {
            return f64::NAN;
        }
        layers[((depth / dz) as usize).min(layers.len() - 1)]
    }
}

/// Simulates `schedule` then the standing time on `load` heated by `maps`.
pub fn simulate(
    load: &Load,
    maps: &Maps,
    schedule: &Schedule,
    settings: &Settings,
) -> Result<TimeCourse, ThermalError> {
    check::validate(load, maps, schedule, settings)?;
    let mut model = Model::new(load, *settings);
    let mut rec = Recorder::new(&model, load.items.len(), settings.frames);
    let mut now = 0.0;
    rec.track(now, &model, settings.record_every);
    let mut used_step = settings.step;
    // Fixed steps of `settings.step` through the heating (the schedule's own steps are often a
    // second or two in interleaved rounds), each with the seconds every configuration runs in it,
    // then through the standing time with the power off.
    let mut run = |model: &mut Model,
                   duration: f64,
                   mut power: Box<dyn FnMut(f64) -> Vec<(usize, f64)> + '_>,
                   now: &mut f64,
                   rec: &mut Recorder|
     -> Result<(), ThermalError> {
        let mut left = duration;
        while left > 1e-12 {
            let dt = settings.step.min(left);
            used_step = used_step.min(model.advance(dt, &power(dt), maps));
            left -= dt;
            *now += dt;
            if let Some(cell) = model.non_finite() {
                return Err(ThermalError::Diverged { cell, time_s: *now });
            }
            rec.track(*now, model, settings.record_every);
        }
        Ok(())
    };
    let mut cursor = ScheduleCursor::new(schedule);
    let heating = schedule.total();
    run(
        &mut model,
        heating,
        Box::new(move |dt| cursor.take(dt)),
        &mut now,
        &mut rec,
    )?;
    let end_of_heating = Columns::of(&model).coldest;
    let heating_seconds = now;
    if rec.times.last() != Some(&now) {
        rec.record(now, &model);
    }
    run(
        &mut model,
        settings.standing,
        Box::new(|_| Vec::new()),
        &mut now,
        &mut rec,
    )?;
    if rec.times.last() != Some(&now) {
        rec.record(now, &model);
    }
    let n = load.tray.cells();
    let mut item_moisture_loss = vec![0.0; load.items.len()];
    let (mut moisture_loss, mut boiled_dry) = (vec![0.0; n], vec![false; n]);
    let mut layers_after_standing = vec![Vec::new(); n];
    let mut layer_thickness = vec![f64::NAN; n];
    for &i in &model.filled {
        let nodes = model.nodes(i);
        layers_after_standing[i] = model.temp[nodes.clone()].to_vec();
        layer_thickness[i] = model.dz[nodes.start];
        moisture_loss[i] = model.evaporated[nodes.clone()].iter().sum();
        boiled_dry[i] = model.boiled_dry[nodes].iter().all(|&b| b);
        item_moisture_loss[load.cells[i].expect("filled").item] += moisture_loss[i];
    }
    let last = Columns::of(&model);
    Ok(TimeCourse {
        times: rec.times,
        frames: rec.frames,
        items: rec.items,
        peak: rec.peak,
        trace_times: rec.trace_times,
        coldest_trace: rec.coldest_trace,
        end_of_heating,
        after_standing: last.coldest,
        hottest_after_standing: last.hottest,
        coldest_depth: last.coldest_depth,
        coldest_evaporated: last.coldest_evaporated,
        mean_after_standing: last.mean,
        surface_after_standing: last.surface,
        energy_after_standing: last.energy,
        layers: model.layers.clone(),
        layers_after_standing,
        layer_thickness,
        moisture_loss,
        item_moisture_loss,
        boiled_dry,
        step: used_step,
        heating_seconds,
        standing_seconds: settings.standing,
    })
}

/// Walks a schedule in slices of time: which configurations run, for how long, in the next slice.
struct ScheduleCursor<'s> {
    steps: &'s [crate::schedule::Step],
    /// The step being walked, and the seconds of it already used.
    at: usize,
    used: f64,
}

impl<'s> ScheduleCursor<'s> {
    fn new(schedule: &'s Schedule) -> Self {
        ScheduleCursor {
            steps: &schedule.steps,
            at: 0,
            used: 0.0,
        }
    }

    /// The (configuration, seconds) run in the next `dt` seconds.
    fn take(&mut self, dt: f64) -> Vec<(usize, f64)> {
        let mut out = Vec::new();
        let mut need = dt;
        while need > 1e-12 && self.at < self.steps.len() {
            let step = &self.steps[self.at];
            let take = (step.seconds - self.used).min(need);
            if take > 0.0 {
                out.push((step.config, take));
            }
            self.used += take;
            need -= take;
            if step.seconds - self.used <= 1e-12 {
                self.at += 1;
                self.used = 0.0;
            }
        }
        out
    }
}
