//! The time course on the tray grid: heating steps, conduction, thawing, boiling, then standing.
//!
//! Model (lumped cells, one node per cell; a cell holds one food item of a given thickness):
//! - **Power.** A heating map gives, per configuration, the rate (K/s) at which the cell's food,
//!   thawed at 20 °C, would warm. Absorbed power = rate × mass × cp(20 °C) × absorption ratio, the
//!   ratio falling with the ice fraction (frozen food absorbs an order of magnitude less).
//! - **Enthalpy.** Energy goes into specific enthalpy; temperature follows from the food's curve
//!   (latent heat of fusion included, see [`crate::material`]).
//! - **Boiling.** Above 100 °C the excess evaporates water at L_v = 2257 kJ/kg; the cell stays at
//!   100 °C until its water is gone. The thermal curve keeps the original composition (moisture loss
//!   of a few per cent changes it little) — a stated simplification.
//! - **Drying.** Absorption falls with the water that has boiled off, down to the dry residue's own
//!   small share ([`Material::moisture_factor`]), so a dried cell no longer heats as if it were
//!   moist. A cell with no dry matter (pure water) that boils away entirely is *boiled dry*: it holds
//!   at the boiling point and takes no further part ([`TimeCourse::boiled_dry`]). Cells that pass
//!   [`MODEL_LIMIT_C`] are outside the property model and scorch; callers warn about them.
//! - **Finite.** A state that stops being a finite number is an error naming the cell and the time,
//!   never a result.
//! - **Conduction.** Between side-by-side cells: contact area = cell size × the thinner thickness;
//!   half-cell resistances Δx/(2k) on each side, plus 1/h_c between different food items.
//! - **Surface loss.** The top face loses h·(T − T_air) (h ≈ 10 W/(m²·K): air nearly still, an
//!   assumption; no citable in-oven value exists). The tray bottom is insulated.
//! - **Tray edges** are insulated, or held at a temperature through a ghost cell one pitch outside.
//!
//! **Stability.** The explicit step is stable and positivity-preserving when, for every cell,
//! Δt ≤ C/ΣG with C = m·min(dH/dT) and ΣG the sum of its conductances (including surface and edge):
//! the lumped form of α·Δt/Δx² ≤ 1/4 in 2-D. [`simulate`] splits each requested step into as many
//! equal sub-steps as needed to stay under 0.9× that limit.

use crate::composition::{BOILING_POINT, LATENT_VAPORISATION};
use crate::error::{ThermalError, in_range};
use crate::material::Material;
use crate::schedule::Schedule;

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
}

impl Default for Settings {
    /// h = 10 W/(m²·K), contact 200 W/(m²·K) (assumed), air 25 °C, standing 120 s (FDA Food Code
    /// 3-401.12), 1 s steps, a frame every 5 s, insulated edges.
    fn default() -> Self {
        Settings {
            surface_h: 10.0,
            contact_conductance: 200.0,
            air: 25.0,
            standing: 120.0,
            step: 1.0,
            record_every: 5.0,
            edges: Edges::INSULATED,
        }
    }
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

/// Min / mass-weighted mean / max of one item's cells, per recorded frame.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ItemCurve {
    /// Coldest cell, °C.
    pub min: Vec<f64>,
    /// Mass-weighted mean, °C.
    pub mean: Vec<f64>,
    /// Warmest cell, °C.
    pub max: Vec<f64>,
}

/// The simulated prediction.
#[derive(Clone, Debug, PartialEq)]
pub struct TimeCourse {
    /// Recorded instants, s from the start.
    pub times: Vec<f64>,
    /// Temperature of every cell at each recorded instant (NaN for empty cells), °C.
    pub frames: Vec<Vec<f64>>,
    /// Per item curves over the recorded instants.
    pub items: Vec<ItemCurve>,
    /// Highest temperature each cell reached, °C.
    pub peak: Vec<f64>,
    /// Temperatures when the power goes off, °C.
    pub end_of_heating: Vec<f64>,
    /// Temperatures after the standing time, °C.
    pub after_standing: Vec<f64>,
    /// Water evaporated per cell, kg.
    pub moisture_loss: Vec<f64>,
    /// Water evaporated per item, kg.
    pub item_moisture_loss: Vec<f64>,
    /// Cells whose whole content evaporated (pure water boiled away): held at the boiling point.
    pub boiled_dry: Vec<bool>,
    /// Time step actually used, s.
    pub step: f64,
    /// Heating time, s.
    pub heating_seconds: f64,
    /// Standing time, s.
    pub standing_seconds: f64,
}

struct Pair {
    a: usize,
    b: usize,
    /// Contact area, m².
    area: f64,
    /// Extra resistance per area between different items, m²K/W (0 within an item).
    contact: f64,
}

struct Model<'a> {
    load: &'a Load<'a>,
    settings: Settings,
    filled: Vec<usize>,
    mass0: Vec<f64>,
    mass: Vec<f64>,
    energy: Vec<f64>,
    water_left: Vec<f64>,
    evaporated: Vec<f64>,
    /// Filled cells still taking part (not boiled dry), the subset of `filled` the physics loops use.
    live: Vec<usize>,
    boiled_dry: Vec<bool>,
    temp: Vec<f64>,
    k: Vec<f64>,
    absorb: Vec<f64>,
    hint: Vec<usize>,
    pairs: Vec<Pair>,
    /// Per cell: side area (m²) facing a held edge, and that edge's temperature.
    edge_area: Vec<f64>,
    edge_temp: Vec<f64>,
    flux: Vec<f64>,
    /// Per pair conductance (W/K), per cell sum of conductances, per cell min(dH/dT) (J/(kg·K)).
    cond: Vec<f64>,
    gsum: Vec<f64>,
    capacity: Vec<f64>,
    half_r: Vec<f64>,
    /// Item index per cell (0 for empty cells, never read for them).
    item: Vec<usize>,
}

fn validate(
    load: &Load,
    maps: &Maps,
    schedule: &Schedule,
    settings: &Settings,
) -> Result<(), ThermalError> {
    let n = load.tray.cells();
    in_range(
        "cell size (m)",
        load.tray.cell_size,
        1e-5,
        10.0,
        "0.00001 to 10 m",
    )?;
    if load.cells.len() != n {
        return Err(ThermalError::Dimension {
            what: "cell contents",
            expected: n,
            found: load.cells.len(),
        });
    }
    if load.start.len() != n {
        return Err(ThermalError::Dimension {
            what: "start temperatures",
            expected: n,
            found: load.start.len(),
        });
    }
    if maps.rates.len() != maps.configs * n {
        return Err(ThermalError::Dimension {
            what: "heating maps",
            expected: maps.configs * n,
            found: maps.rates.len(),
        });
    }
    for (i, c) in load.cells.iter().enumerate() {
        let Some(c) = c else { continue };
        let bad = |problem: String| ThermalError::Cell { cell: i, problem };
        if c.item >= load.items.len() {
            return Err(bad(format!(
                "names food item {}, but there are {}",
                c.item,
                load.items.len()
            )));
        }
        if !(c.thickness.is_finite() && c.thickness > 0.0) {
            return Err(bad(format!(
                "thickness {} m must be greater than 0",
                c.thickness
            )));
        }
        let t = load.start[i];
        if !(t.is_finite() && (-60.0..=100.0).contains(&t)) {
            return Err(bad(format!(
                "start temperature {t} °C must be between −60 and 100 °C"
            )));
        }
        for cfg in 0..maps.configs {
            let r = maps.rates[cfg * n + i];
            if !(r.is_finite() && r >= 0.0) {
                return Err(bad(format!(
                    "heating rate {r} K/s under configuration {cfg} must be a number ≥ 0"
                )));
            }
        }
    }
    schedule.validate(maps.configs)?;
    in_range(
        "surface heat-transfer coefficient (W/(m²·K))",
        settings.surface_h,
        0.0,
        1e4,
        "0 to 10 000",
    )?;
    in_range(
        "contact conductance (W/(m²·K))",
        settings.contact_conductance,
        1e-6,
        1e7,
        "greater than 0",
    )?;
    in_range(
        "air temperature (°C)",
        settings.air,
        -60.0,
        300.0,
        "−60 to 300 °C",
    )?;
    in_range(
        "standing time (s)",
        settings.standing,
        0.0,
        86_400.0,
        "0 to 86 400 s",
    )?;
    in_range(
        "time step (s)",
        settings.step,
        1e-6,
        600.0,
        "greater than 0, at most 600 s",
    )?;
    in_range(
        "recording interval (s)",
        settings.record_every,
        1e-6,
        1e6,
        "greater than 0",
    )?;
    for edge in [settings.edges.x, settings.edges.y] {
        if let Edge::Fixed(t) = edge {
            in_range("edge temperature (°C)", t, -60.0, 300.0, "−60 to 300 °C")?;
        }
    }
    Ok(())
}

impl<'a> Model<'a> {
    fn new(load: &'a Load<'a>, settings: Settings) -> Self {
        let tray = load.tray;
        let n = tray.cells();
        let dx = tray.cell_size;
        let filled: Vec<usize> = (0..n).filter(|&i| load.cells[i].is_some()).collect();
        let mut mass0 = vec![0.0; n];
        let mut energy = vec![0.0; n];
        let mut water_left = vec![0.0; n];
        for &i in &filled {
            let c = load.cells[i].expect("filled");
            let mat = &load.items[c.item];
            mass0[i] = mat.density * dx * dx * c.thickness;
            energy[i] = mat.enthalpy(load.start[i]) * mass0[i];
            water_left[i] = mat.water * mass0[i];
        }
        let mut pairs = Vec::new();
        let mut edge_area = vec![0.0; n];
        let mut edge_temp = vec![0.0; n];
        for r in 0..tray.height {
            for c in 0..tray.width {
                let i = r * tray.width + c;
                let Some(fi) = load.cells[i] else { continue };
                let mut neighbour = |j: usize| {
                    if let Some(fj) = load.cells[j] {
                        pairs.push(Pair {
                            a: i,
                            b: j,
                            area: dx * fi.thickness.min(fj.thickness),
                            contact: if fi.item == fj.item {
                                0.0
                            } else {
                                1.0 / settings.contact_conductance
                            },
                        });
                    }
                };
                if c + 1 < tray.width {
                    neighbour(i + 1);
                }
                if r + 1 < tray.height {
                    neighbour(i + tray.width);
                }
                let borders = [
                    (c == 0, settings.edges.x),
                    (c + 1 == tray.width, settings.edges.x),
                    (r == 0, settings.edges.y),
                    (r + 1 == tray.height, settings.edges.y),
                ];
                for (on, edge) in borders {
                    if let (true, Edge::Fixed(t)) = (on, edge) {
                        // One temperature per cell: a corner touching two held edges takes the last.
                        edge_area[i] += dx * fi.thickness;
                        edge_temp[i] = t;
                    }
                }
            }
        }
        let mut m = Model {
            load,
            settings,
            live: filled.clone(),
            filled,
            mass: mass0.clone(),
            mass0,
            energy,
            water_left,
            evaporated: vec![0.0; n],
            boiled_dry: vec![false; n],
            temp: vec![f64::NAN; n],
            k: vec![0.0; n],
            absorb: vec![0.0; n],
            hint: vec![0; n],
            pairs,
            edge_area,
            edge_temp,
            flux: vec![0.0; n],
            cond: vec![],
            gsum: vec![0.0; n],
            capacity: vec![0.0; n],
            half_r: vec![0.0; n],
            item: load.cells.iter().map(|c| c.map_or(0, |c| c.item)).collect(),
        };
        m.cond = vec![0.0; m.pairs.len()];
        for &i in &m.filled {
            m.capacity[i] = m.material(i).min_heat_capacity * 1000.0;
        }
        m.update_state();
        m
    }

    fn material(&self, i: usize) -> &Material {
        &self.load.items[self.load.cells[i].expect("filled").item]
    }

    fn update_state(&mut self) {
        for idx in 0..self.live.len() {
            let i = self.live[idx];
            self.set_state(i);
        }
    }

    /// Temperature, conductivity and absorption of cell `i` from its energy, mass and moisture.
    fn set_state(&mut self, i: usize) {
        let mat = &self.load.items[self.item[i]];
        let (t, k, a) = mat.state(self.energy[i] / self.mass[i], &mut self.hint[i]);
        let water0 = mat.water * self.mass0[i];
        let moisture = if water0 > 0.0 {
            self.water_left[i] / water0
        } else {
            1.0
        };
        self.temp[i] = t;
        self.k[i] = k;
        self.absorb[i] = a * mat.moisture_factor(moisture);
    }

    /// Takes cell `i` out of the physics once nothing is left of it: it holds at the boiling point,
    /// absorbs nothing and exchanges no heat.
    fn dry_out(&mut self, i: usize) {
        self.boiled_dry[i] = true;
        self.temp[i] = BOILING_POINT;
        self.k[i] = 0.0;
        self.absorb[i] = 0.0;
        self.live.retain(|&j| j != i);
    }

    /// Conductance of every pair with the current conductivities, and each cell's sum of them.
    fn conductances(&mut self) {
        let dx = self.load.tray.cell_size;
        let top = self.settings.surface_h * dx * dx;
        for &i in &self.live {
            self.gsum[i] = top + self.k[i] * self.edge_area[i] / dx;
            // Half-cell resistance per area, Δx/(2k).
            self.half_r[i] = dx / (2.0 * self.k[i]);
        }
        for (p, g) in self.pairs.iter().zip(self.cond.iter_mut()) {
            if self.boiled_dry[p.a] || self.boiled_dry[p.b] {
                *g = 0.0;
                continue;
            }
            *g = p.area / (self.half_r[p.a] + self.half_r[p.b] + p.contact);
            self.gsum[p.a] += *g;
            self.gsum[p.b] += *g;
        }
    }

    /// Largest stable step, min over cells of C/ΣG, with the conductances from [`Self::conductances`].
    fn stable_step(&self) -> f64 {
        let mut best = f64::INFINITY;
        for &i in &self.live {
            if self.gsum[i] > 0.0 {
                best = best.min(self.mass[i] * self.capacity[i] / self.gsum[i]);
            }
        }
        best
    }

    /// True when a step of `dt` is within 0.9 of every cell's limit (multiplications only).
    fn stable_for(&self, dt: f64) -> bool {
        self.live
            .iter()
            .all(|&i| dt * self.gsum[i] <= 0.9 * self.mass[i] * self.capacity[i])
    }

    /// Advances by `dt` seconds with configuration `config` (None: power off), in as many equal
    /// sub-steps as stability needs.
    fn advance(&mut self, dt: f64, config: Option<usize>, maps: &Maps) -> f64 {
        self.conductances();
        // (A limit below 1 ms would mean a degenerate material; the floor keeps the loop finite.)
        let parts = if self.stable_for(dt) {
            1
        } else {
            (dt / (0.9 * self.stable_step()).max(1e-3)).ceil() as usize
        };
        let sub = dt / parts as f64;
        for part in 0..parts {
            if part > 0 {
                self.conductances();
            }
            self.substep(sub, config, maps);
        }
        sub
    }

    fn substep(&mut self, dt: f64, config: Option<usize>, maps: &Maps) {
        let dx = self.load.tray.cell_size;
        let n = self.temp.len();
        self.flux.iter_mut().for_each(|f| *f = 0.0);
        for (p, g) in self.pairs.iter().zip(&self.cond) {
            let q = g * (self.temp[p.b] - self.temp[p.a]);
            self.flux[p.a] += q;
            self.flux[p.b] -= q;
        }
        let top = self.settings.surface_h * dx * dx;
        let mut dried = false;
        for idx in 0..self.live.len() {
            let i = self.live[idx];
            let mat = &self.load.items[self.item[i]];
            let mut q = self.flux[i] - top * (self.temp[i] - self.settings.air);
            if self.edge_area[i] > 0.0 {
                q += self.k[i] * self.edge_area[i] / dx * (self.edge_temp[i] - self.temp[i]);
            }
            if let Some(c) = config {
                q += maps.rates[c * n + i]
                    * self.mass0[i]
                    * mat.reference_cp
                    * 1000.0
                    * self.absorb[i];
            }
            self.energy[i] += dt * q / 1000.0;
            // Boiling: the enthalpy above the boiling point leaves as vapour.
            let h_boil = mat.boiling_enthalpy();
            if self.water_left[i] > 0.0 && self.energy[i] > h_boil * self.mass[i] {
                let d = ((self.energy[i] - h_boil * self.mass[i]) / LATENT_VAPORISATION)
                    .min(self.water_left[i]);
                self.energy[i] -= d * (h_boil + LATENT_VAPORISATION);
                self.mass[i] -= d;
                self.water_left[i] -= d;
                self.evaporated[i] += d;
                // Nothing left but a trace (pure water boiled away): the cell is gone.
                if self.mass[i] <= 1e-9 * self.mass0[i] {
                    self.mass[i] = 0.0;
                    self.energy[i] = 0.0;
                    dried = true;
                    continue;
                }
            }
            self.set_state(i);
        }
        if dried {
            let gone: Vec<usize> = self
                .live
                .iter()
                .copied()
                .filter(|&i| self.mass[i] == 0.0)
                .collect();
            for i in gone {
                self.dry_out(i);
            }
        }
    }

    /// The first filled cell whose temperature is not a finite number, if any.
    fn non_finite(&self) -> Option<usize> {
        self.filled
            .iter()
            .copied()
            .find(|&i| !self.temp[i].is_finite())
    }
}

struct Recorder {
    times: Vec<f64>,
    frames: Vec<Vec<f64>>,
    items: Vec<ItemCurve>,
    peak: Vec<f64>,
    next: f64,
}

impl Recorder {
    fn record(&mut self, t: f64, m: &Model) {
        self.times.push(t);
        self.frames.push(m.temp.clone());
        let k = self.items.len();
        let (mut lo, mut hi) = (vec![f64::INFINITY; k], vec![f64::NEG_INFINITY; k]);
        let (mut sum, mut mass) = (vec![0.0; k], vec![0.0; k]);
        for &i in &m.filled {
            let it = m.load.cells[i].expect("filled").item;
            lo[it] = lo[it].min(m.temp[i]);
            hi[it] = hi[it].max(m.temp[i]);
            sum[it] += m.temp[i] * m.mass[i];
            mass[it] += m.mass[i];
        }
        // An item whose every cell boiled dry has no mass left: its mean is the boiling point.
        for it in 0..k {
            if mass[it] == 0.0 && lo[it].is_finite() {
                sum[it] = BOILING_POINT;
                mass[it] = 1.0;
            }
        }
        for (it, curve) in self.items.iter_mut().enumerate() {
            let empty = mass[it] == 0.0;
            curve.min.push(if empty { f64::NAN } else { lo[it] });
            curve.max.push(if empty { f64::NAN } else { hi[it] });
            curve
                .mean
                .push(if empty { f64::NAN } else { sum[it] / mass[it] });
        }
    }

    fn track(&mut self, t: f64, m: &Model, every: f64) {
        for &i in &m.filled {
            self.peak[i] = self.peak[i].max(m.temp[i]);
        }
        if t + 1e-9 >= self.next {
            self.record(t, m);
            while self.next <= t + 1e-9 {
                self.next += every;
            }
        }
    }
}

/// Simulates `schedule` then the standing time on `load` heated by `maps`.
pub fn simulate(
    load: &Load,
    maps: &Maps,
    schedule: &Schedule,
    settings: &Settings,
) -> Result<TimeCourse, ThermalError> {
    validate(load, maps, schedule, settings)?;
    let mut model = Model::new(load, *settings);
    let mut rec = Recorder {
        times: vec![],
        frames: vec![],
        items: vec![ItemCurve::default(); load.items.len()],
        peak: model.temp.clone(),
        next: 0.0,
    };
    let mut now = 0.0;
    rec.track(now, &model, settings.record_every);
    let mut used_step = settings.step;
    let mut run = |model: &mut Model,
                   duration: f64,
                   config: Option<usize>,
                   now: &mut f64,
                   rec: &mut Recorder|
     -> Result<(), ThermalError> {
        let mut left = duration;
        while left > 1e-12 {
            let dt = settings.step.min(left);
            used_step = used_step.min(model.advance(dt, config, maps));
            left -= dt;
            *now += dt;
            if let Some(cell) = model.non_finite() {
                return Err(ThermalError::Diverged { cell, time_s: *now });
            }
            rec.track(*now, model, settings.record_every);
        }
        Ok(())
    };
    for step in &schedule.steps {
        run(
            &mut model,
            step.seconds,
            Some(step.config),
            &mut now,
            &mut rec,
        )?;
    }
    let end_of_heating = model.temp.clone();
    let heating_seconds = now;
    if rec.times.last() != Some(&now) {
        rec.record(now, &model);
    }
    run(&mut model, settings.standing, None, &mut now, &mut rec)?;
    if rec.times.last() != Some(&now) {
        rec.record(now, &model);
    }
    let mut item_moisture_loss = vec![0.0; load.items.len()];
    for &i in &model.filled {
        item_moisture_loss[load.cells[i].expect("filled").item] += model.evaporated[i];
    }
    Ok(TimeCourse {
        times: rec.times,
        frames: rec.frames,
        items: rec.items,
        peak: rec.peak,
        end_of_heating,
        after_standing: model.temp.clone(),
        moisture_loss: model.evaporated.clone(),
        item_moisture_loss,
        boiled_dry: model.boiled_dry.clone(),
        step: used_step,
        heating_seconds,
        standing_seconds: settings.standing,
    })
}
