//! The state of the tray during a simulation: one node per layer of every filled cell, and the
//! explicit step that moves energy between them.

use super::column::{deposit, layer_count, layer_span, overlap};
use super::evaporation;
use super::{Edge, Load, Maps, Settings};
use crate::composition::{BOILING_POINT, LATENT_VAPORISATION};
use crate::material::{Material, REFERENCE_C, Spot};

/// Two nodes exchanging heat through `area` (m²) across `len_a` of node a and `len_b` of node b
/// (each contributes half its length over its conductivity), plus `contact` (m²K/W) between
/// different food items.
struct Pair {
    a: usize,
    b: usize,
    area: f64,
    len_a: f64,
    len_b: f64,
    contact: f64,
}

pub(super) struct Model<'a> {
    pub load: &'a Load<'a>,
    settings: Settings,
    /// First node and number of layers of each cell (0 layers for empty cells).
    pub first: Vec<usize>,
    pub layers: Vec<usize>,
    /// The filled cells.
    pub filled: Vec<usize>,
    /// Per node: its cell, its food item, thickness (m).
    pub cell: Vec<usize>,
    item: Vec<usize>,
    pub dz: Vec<f64>,
    /// Per node: starting mass, mass, energy (kJ), water left and evaporated (kg).
    pub mass0: Vec<f64>,
    pub mass: Vec<f64>,
    pub energy: Vec<f64>,
    water_left: Vec<f64>,
    pub evaporated: Vec<f64>,
    /// Nodes still taking part (not boiled dry).
    live: Vec<usize>,
    pub boiled_dry: Vec<bool>,
    pub temp: Vec<f64>,
    k: Vec<f64>,
    /// Per node: attenuation 1/D_p now (1/m, scaled by the moisture left), and the share of
    /// incident power its face lets in.
    mu: Vec<f64>,
    transmit: Vec<f64>,
    /// Per node, watts absorbed in the current sub-step.
    power: Vec<f64>,
    hint: Vec<usize>,
    /// Per node: where its state sits in its material's table.
    spot: Vec<Spot>,
    pairs: Vec<Pair>,
    /// The two nodes of each pair, compact: what the flux loop reads every sub-step.
    ends: Vec<[u32; 2]>,
    /// Steps since the conductances were last computed, and whether a node dried out since.
    cond_age: usize,
    dried_since_cond: bool,
    /// Per node: side area (m²) facing a held edge, and that edge's temperature.
    edge_area: Vec<f64>,
    edge_temp: Vec<f64>,
    /// Per node: 1 for the top layer (which loses heat to the cavity air), else 0.
    top: Vec<f64>,
    /// Per node: the top layer of an uncovered cell, which loses water below boiling.
    open: Vec<bool>,
    flux: Vec<f64>,
    cond: Vec<f64>,
    gsum: Vec<f64>,
    /// Per node 1/(2k), m·K/W.
    half_inv_k: Vec<f64>,
    /// Per node min(dH/dT), J/(kg·K).
    capacity: Vec<f64>,
    /// Per cell, the watts incident on the column per K/s of map rate: the map's rate is the
    /// column's mean at the reference state, so a uniform column at that state absorbs exactly
    /// rate × mass × cp.
    incident: Vec<f64>,
    /// Per cell, the map rate averaged over the current step, K/s.
    rate: Vec<f64>,
    /// Per filled cell (in `filled` order) with a tray plate: its heat capacity (J/K),
    /// temperature (°C) and conductance to the bottom layer (W/K).
    tray_cap: Vec<f64>,
    tray_temp: Vec<f64>,
    tray_g: Vec<f64>,
}

impl<'a> Model<'a> {
    pub fn new(load: &'a Load<'a>, settings: Settings) -> Self {
        let tray = load.tray;
        let n = tray.cells();
        let dx = tray.cell_size;
        let filled: Vec<usize> = (0..n).filter(|&i| load.cells[i].is_some()).collect();
        let (mut first, mut layers) = (vec![0; n], vec![0; n]);
        let mut m = Model {
            load,
            settings,
            first: vec![],
            layers: vec![],
            filled: vec![],
            cell: vec![],
            item: vec![],
            dz: vec![],
            mass0: vec![],
            mass: vec![],
            energy: vec![],
            water_left: vec![],
            evaporated: vec![],
            live: vec![],
            boiled_dry: vec![],
            temp: vec![],
            k: vec![],
            mu: vec![],
            transmit: vec![],
            power: vec![],
            hint: vec![],
            pairs: vec![],
            spot: vec![],
            ends: vec![],
            cond_age: 0,
            dried_since_cond: true,
            edge_area: vec![],
            edge_temp: vec![],
            top: vec![],
            open: vec![],
            flux: vec![],
            cond: vec![],
            gsum: vec![],
            half_inv_k: vec![],
            capacity: vec![],
            incident: vec![0.0; n],
            rate: vec![0.0; n],
            tray_cap: vec![],
            tray_temp: vec![],
            tray_g: vec![],
        };
        for &i in &filled {
            let c = load.cells[i].expect("filled");
            let mat = &load.items[c.item];
            let count = layer_count(c.thickness, settings.max_layer, mat.min_penetration_depth);
            first[i] = m.cell.len();
            layers[i] = count;
            let dz = c.thickness / count as f64;
            // What a uniform column at the reference state absorbs per watt incident, by the same
            // deposition the steps use.
            let reference = mat.state(mat.enthalpy(REFERENCE_C), &mut 0).dielectric;
            let mut at_reference = vec![0.0; count];
            let b = settings.bottom_entry;
            deposit(
                (1.0 - b) * reference.transmission,
                b * reference.transmission,
                dz,
                &vec![reference.attenuation; count],
                &mut at_reference,
            );
            let kept: f64 = at_reference.iter().sum();
            m.incident[i] = mat.density * dx * dx * c.thickness * mat.reference_cp * 1000.0 / kept;
            for l in 0..count {
                let mass = mat.density * dx * dx * dz;
                m.cell.push(i);
                m.item.push(c.item);
                m.dz.push(dz);
                m.mass0.push(mass);
                m.energy.push(mat.enthalpy(load.start[i]) * mass);
                m.water_left.push(mat.water * mass);
                m.top.push(if l == 0 { 1.0 } else { 0.0 });
                m.open.push(l == 0 && !c.covered);
                m.capacity.push(mat.min_heat_capacity * 1000.0);
            }
        }
        let nodes = m.cell.len();
        m.first = first;
        m.layers = layers;
        m.mass = m.mass0.clone();
        m.evaporated = vec![0.0; nodes];
        m.live = (0..nodes).collect();
        m.boiled_dry = vec![false; nodes];
        m.temp = vec![f64::NAN; nodes];
        m.k = vec![0.0; nodes];
        m.mu = vec![0.0; nodes];
        m.transmit = vec![0.0; nodes];
        m.spot = vec![Spot::default(); nodes];
        m.power = vec![0.0; nodes];
        m.hint = vec![0; nodes];
        m.edge_area = vec![0.0; nodes];
        m.edge_temp = vec![0.0; nodes];
        m.flux = vec![0.0; nodes];
        m.gsum = vec![0.0; nodes];
        m.half_inv_k = vec![f64::INFINITY; nodes];
        if settings.tray_capacity > 0.0 {
            m.tray_cap = vec![settings.tray_capacity * dx * dx; filled.len()];
            m.tray_temp = filled.iter().map(|&i| load.start[i]).collect();
            m.tray_g = vec![0.0; filled.len()];
        }
        m.filled = filled;
        m.connect();
        m.cond = vec![0.0; m.pairs.len()];
        m.ends = m.pairs.iter().map(|p| [p.a as u32, p.b as u32]).collect();
        m.update_state();
        m
    }

    /// Pairs between the layers of a column (through the horizontal area), between overlapping
    /// layers of side-by-side cells (through the vertical overlap), and the held edges.
    fn connect(&mut self) {
        let load = self.load;
        let tray = load.tray;
        let dx = tray.cell_size;
        let contact = 1.0 / self.settings.contact_conductance;
        for r in 0..tray.height {
            for c in 0..tray.width {
                let i = r * tray.width + c;
                let Some(fi) = load.cells[i] else { continue };
                let (fa, la) = (self.first[i], self.layers[i]);
                for l in 0..la.saturating_sub(1) {
                    let (a, b) = (fa + l, fa + l + 1);
                    self.pairs.push(Pair {
                        a,
                        b,
                        area: dx * dx,
                        len_a: self.dz[a],
                        len_b: self.dz[b],
                        contact: 0.0,
                    });
                }
                let side = |j: usize, pairs: &mut Vec<Pair>| {
                    let Some(fj) = load.cells[j] else { return };
                    let (fb, lb) = (self.first[j], self.layers[j]);
                    for p in 0..la {
                        let span_a = layer_span(fi.thickness, la, p);
                        for q in 0..lb {
                            let shared = overlap(span_a, layer_span(fj.thickness, lb, q));
                            if shared > 0.0 {
                                pairs.push(Pair {
                                    a: fa + p,
                                    b: fb + q,
                                    area: dx * shared,
                                    len_a: dx,
                                    len_b: dx,
                                    contact: if fi.item == fj.item { 0.0 } else { contact },
                                });
                            }
                        }
                    }
                };
                let mut pairs = std::mem::take(&mut self.pairs);
                if c + 1 < tray.width {
                    side(i + 1, &mut pairs);
                }
                if r + 1 < tray.height {
                    side(i + tray.width, &mut pairs);
                }
                self.pairs = pairs;
                let edges = self.settings.edges;
                let borders = [
                    (c == 0, edges.x),
                    (c + 1 == tray.width, edges.x),
                    (r == 0, edges.y),
                    (r + 1 == tray.height, edges.y),
                ];
                for (on, edge) in borders {
                    if let (true, Edge::Fixed(t)) = (on, edge) {
                        // One temperature per node: a corner touching two held edges takes the last.
                        for node in fa..fa + la {
                            self.edge_area[node] += dx * self.dz[node];
                            self.edge_temp[node] = t;
                        }
                    }
                }
            }
        }
    }

    fn material(&self, node: usize) -> &'a Material {
        &self.load.items[self.item[node]]
    }

    fn update_state(&mut self) {
        for idx in 0..self.live.len() {
            let i = self.live[idx];
            self.set_state(i);
        }
    }

    /// Temperature of node `i` from its energy and mass, and where its state sits in its
    /// material's table: the conductivity and the dielectric behaviour are read from there only
    /// when they are needed ([`Self::conductances`], [`Self::dielectric`]).
    fn set_state(&mut self, i: usize) {
        let mat = self.material(i);
        let (t, spot) = mat.locate(self.energy[i] / self.mass[i], &mut self.hint[i]);
        self.temp[i] = t;
        self.spot[i] = spot;
    }

    /// Attenuation and face transmission of the nodes of `cell` from their states and moisture
    /// (what the deposition reads while the power is on).
    fn dielectric(&mut self, cell: usize) {
        for i in self.nodes(cell) {
            if self.boiled_dry[i] {
                continue;
            }
            let mat = self.material(i);
            let d = mat.dielectric_at(self.spot[i]);
            let water0 = mat.water * self.mass0[i];
            // Most nodes never boil: their attenuation is the state's.
            self.mu[i] = if self.water_left[i] < water0 {
                mat.attenuation_with_moisture(d.attenuation, self.water_left[i] / water0)
            } else {
                d.attenuation
            };
            self.transmit[i] = d.transmission;
        }
    }

    /// Takes node `i` out of the physics once nothing is left of it: it holds at the boiling point,
    /// absorbs nothing (power passes through it to the layer below) and exchanges no heat.
    fn dry_out(&mut self, i: usize) {
        self.boiled_dry[i] = true;
        self.temp[i] = BOILING_POINT;
        self.k[i] = 0.0;
        self.half_inv_k[i] = f64::INFINITY;
        self.mu[i] = 0.0;
        self.live.retain(|&j| j != i);
        self.dried_since_cond = true;
    }

    /// Conductance of every pair with the current conductivities, and each node's sum of them.
    fn conductances(&mut self) {
        let dx = self.load.tray.cell_size;
        let top = self.settings.surface_h * dx * dx;
        for idx in 0..self.live.len() {
            let i = self.live[idx];
            self.k[i] = self.material(i).conductivity_at(self.spot[i]);
            self.gsum[i] = top * self.top[i] + self.k[i] * self.edge_area[i] / dx;
            // 1/(2k) once per node, not once per pair side; infinite for a boiled-dry node
            // (k = 0), which cuts its pairs off.
            self.half_inv_k[i] = 0.5 / self.k[i];
        }
        for (p, g) in self.pairs.iter().zip(self.cond.iter_mut()) {
            let r = p.len_a * self.half_inv_k[p.a] + p.len_b * self.half_inv_k[p.b] + p.contact;
            *g = p.area / r;
            self.gsum[p.a] += *g;
            self.gsum[p.b] += *g;
        }
        if !self.tray_cap.is_empty() {
            let contact = 1.0 / self.settings.contact_conductance;
            for (c, &cell) in self.filled.iter().enumerate() {
                let bottom = self.first[cell] + self.layers[cell] - 1;
                let r = contact + self.dz[bottom] * self.half_inv_k[bottom];
                self.tray_g[c] = dx * dx / r;
                self.gsum[bottom] += self.tray_g[c];
            }
        }
    }

    /// Largest stable step of the tray plates, C/G (infinite without a plate).
    fn tray_step(&self) -> f64 {
        self.tray_cap
            .iter()
            .zip(&self.tray_g)
            .filter(|(_, g)| **g > 0.0)
            .map(|(c, g)| c / g)
            .fold(f64::INFINITY, f64::min)
    }

    /// Largest stable step, min over nodes of C/ΣG, with the conductances from [`Self::conductances`].
    fn stable_step(&self) -> f64 {
        let mut best = f64::INFINITY;
        for &i in &self.live {
            if self.gsum[i] > 0.0 {
                best = best.min(self.mass[i] * self.capacity[i] / self.gsum[i]);
            }
        }
        best.min(self.tray_step())
    }

    /// True when a step of `dt` is within 0.9 of every node's limit (multiplications only).
    fn stable_for(&self, dt: f64) -> bool {
        self.live
            .iter()
            .all(|&i| dt * self.gsum[i] <= 0.9 * self.mass[i] * self.capacity[i])
            && dt <= 0.9 * self.tray_step()
    }

    /// Advances by `dt` seconds during which each configuration in `power` runs for its seconds
    /// (empty: power off), in as many equal sub-steps as stability needs. Within the step the
    /// configurations' power is averaged: the oven switches faster than heat moves across a layer.
    /// Returns the sub-step used.
    pub fn advance(&mut self, dt: f64, power: &[(usize, f64)], maps: &Maps) -> f64 {
        let cells = self.load.tray.cells();
        self.rate.iter_mut().for_each(|r| *r = 0.0);
        for &(c, seconds) in power {
            let w = seconds / dt;
            for &i in &self.filled {
                self.rate[i] += w * maps.rates[c * cells + i];
            }
        }
        let heating = !power.is_empty();
        // Conductivities change slowly (a few per cent per 10 K, and a thaw only lowers them):
        // the conductances follow them every other step, and at once when a node dries out.
        if self.cond_age >= 1 || self.dried_since_cond {
            self.conductances();
            self.cond_age = 0;
            self.dried_since_cond = false;
        } else {
            self.cond_age += 1;
        }
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
            self.substep(sub, heating);
        }
        sub
    }

    fn substep(&mut self, dt: f64, heating: bool) {
        let dx = self.load.tray.cell_size;
        self.flux.iter_mut().for_each(|f| *f = 0.0);
        for (&[a, b], g) in self.ends.iter().zip(&self.cond) {
            let (a, b) = (a as usize, b as usize);
            let q = g * (self.temp[b] - self.temp[a]);
            self.flux[a] += q;
            self.flux[b] -= q;
        }
        for (c, &cell) in self.filled.iter().enumerate().take(self.tray_cap.len()) {
            let bottom = self.first[cell] + self.layers[cell] - 1;
            let q = self.tray_g[c] * (self.tray_temp[c] - self.temp[bottom]);
            self.flux[bottom] += q;
            self.tray_temp[c] -= dt * q / self.tray_cap[c];
        }
        if heating {
            let b = self.settings.bottom_entry;
            for idx in 0..self.filled.len() {
                let cell = self.filled[idx];
                self.dielectric(cell);
                let nodes = self.first[cell]..self.first[cell] + self.layers[cell];
                let incident = self.rate[cell] * self.incident[cell];
                // Each face lets in what its outermost remaining layer transmits.
                let face = |n: usize| !self.boiled_dry[n];
                let top = nodes.clone().find(|&n| face(n)).unwrap_or(nodes.start);
                let bottom = nodes
                    .clone()
                    .rev()
                    .find(|&n| face(n))
                    .unwrap_or(nodes.start);
                deposit(
                    incident * (1.0 - b) * self.transmit[top],
                    incident * b * self.transmit[bottom],
                    self.dz[nodes.start],
                    &self.mu[nodes.clone()],
                    &mut self.power[nodes],
                );
            }
        }
        let top = self.settings.surface_h * dx * dx;
        let mut dried = false;
        for idx in 0..self.live.len() {
            let i = self.live[idx];
            let mat = self.material(i);
            let mut q = self.flux[i] - top * self.top[i] * (self.temp[i] - self.settings.air);
            if self.edge_area[i] > 0.0 {
                q += self.k[i] * self.edge_area[i] / dx * (self.edge_temp[i] - self.temp[i]);
            }
            if heating {
                q += self.power[i];
            }
            self.energy[i] += dt * q * 1e-3; // W·s → kJ
            // Evaporation below boiling from an uncovered surface: the water leaves with its
            // enthalpy and takes its latent heat.
            if self.open[i] && self.water_left[i] > 0.0 && self.temp[i] < BOILING_POINT {
                let s = &self.settings;
                let flux = evaporation::flux(s.surface_h, self.temp[i], s.air, s.air_humidity);
                let specific = self.energy[i] / self.mass[i];
                let per_kg = specific + evaporation::latent_heat(self.temp[i]);
                if self.lose_water(i, dt * flux * dx * dx, per_kg) {
                    dried = true;
                    continue;
                }
            }
            // Boiling: the enthalpy above the boiling point leaves as vapour.
            let h_boil = mat.boiling_enthalpy();
            if self.water_left[i] > 0.0 && self.energy[i] > h_boil * self.mass[i] {
                let d = (self.energy[i] - h_boil * self.mass[i]) / LATENT_VAPORISATION;
                if self.lose_water(i, d, h_boil + LATENT_VAPORISATION) {
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

    /// Node `i` loses up to `d` kg of its water as vapour, each kilogram taking `per_kg` kJ (its
    /// enthalpy and latent heat). True when nothing but a trace is left (pure water gone): the
    /// node is then emptied, for [`Self::dry_out`].
    fn lose_water(&mut self, i: usize, d: f64, per_kg: f64) -> bool {
        let d = d.min(self.water_left[i]);
        self.energy[i] -= d * per_kg;
        self.mass[i] -= d;
        self.water_left[i] -= d;
        self.evaporated[i] += d;
        let gone = self.mass[i] <= 1e-9 * self.mass0[i];
        if gone {
            self.mass[i] = 0.0;
            self.energy[i] = 0.0;
        }
        gone
    }

    /// The cell of the first node whose temperature is not a finite number, if any.
    pub fn non_finite(&self) -> Option<usize> {
        self.temp
            .iter()
            .position(|t| !t.is_finite())
            .map(|node| self.cell[node])
    }

    /// The nodes of cell `i`, top layer first.
    pub fn nodes(&self, i: usize) -> std::ops::Range<usize> {
        self.first[i]..self.first[i] + self.layers[i]
    }
}
