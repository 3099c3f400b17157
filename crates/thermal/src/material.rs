//! A material ready for simulation: enthalpy ↔ temperature, conductivity and dielectric behaviour as
//! functions of the state, tabulated once from the composition.
//!
//! Enthalpy (kJ/kg, zero at −40 °C) is built from the components so that it is continuous and
//! monotonic across the freezing range: H(T) = Σ solids xᵢ·Sᵢ(T) + x_ice(T)·S_ice(T) +
//! (x_w − x_ice(T))·(S_ice(T) + L(T)), with Sᵢ the Choi–Okos sensible enthalpies, x_ice from Tchigeov
//! and L(T) = L₀ − ∫_T^0 (cp_w − cp_ice) the latent heat at T (Kirchhoff's relation). Its slope is
//! positive everywhere because melting ice (dx_ice/dT < 0) absorbs L(T) > 0. Pure water
//! (no solids) melts isothermally at its freezing point: a plateau of L₀·x_w.
//!
//! Each row also carries what the food does to microwave power at that state, from the
//! composition-based permittivity ([`dielectric::food`]): the attenuation 1/D_p and the share of
//! incident power that enters through a face ([`Permittivity::transmission`]).

use crate::choi_okos::Component;
use crate::composition::{BOILING_POINT, Composition, LATENT_FUSION};
use crate::dielectric::{self, DRY_RESIDUE_LOSS, Permittivity};
use crate::error::{ThermalError, in_range};

const T_MIN: f64 = -40.0;
/// Temperature of a heating map's reference state, °C: thawed, at room temperature (the state the
/// reference specific heat is taken at too).
pub const REFERENCE_C: f64 = 20.0;
/// Smallest attenuation used, 1/m: keeps a nearly lossless material's deposition finite (even).
const MIN_ATTENUATION: f64 = 1e-9;
const T_STEP: f64 = 0.1;
const COARSE_STEP: f64 = 0.5;

/// Thermal behaviour of one food (or a test material with constant properties).
#[derive(Clone, Debug, PartialEq)]
pub struct Material {
    curve: Curve,
    /// Density used for the cell's mass (at 20 °C), kg/m³.
    pub density: f64,
    /// Specific heat of the thawed material at 20 °C: converts a heating map's K/s into watts.
    pub reference_cp: f64,
    /// Mass fraction of water that can boil off.
    pub water: f64,
    /// Smallest dH/dT over the table (kJ/(kg·K)): sets the explicit time-step limit.
    pub min_heat_capacity: f64,
    /// Absorption of the dry residue left when all the water has boiled off, relative to the
    /// thawed food: the solids' loss factor ([`DRY_RESIDUE_LOSS`], never above the food's own)
    /// over the food's, times the share of the material that remains; 0 for pure water.
    pub dry_absorption: f64,
    /// Attenuation of the dry residue, 1/m: [`Material::dry_absorption`] over the reference
    /// penetration depth.
    dry_attenuation: f64,
    /// Permittivity at the reference state ([`REFERENCE_C`], thawed).
    pub reference: Permittivity,
    /// Power penetration depth at the reference state, m ([`Permittivity::penetration_depth`]).
    /// Infinite (power spread evenly) for [`Material::constant`] unless set with
    /// [`Material::with_penetration_depth`].
    pub penetration_depth: f64,
    /// Smallest penetration depth over every state, m: what the layers must resolve.
    pub min_penetration_depth: f64,
    /// Enthalpy at the boiling point (kJ/kg); +∞ for materials that do not boil.
    boil_h: f64,
}

#[derive(Clone, Debug, PartialEq)]
enum Curve {
    /// Constant properties: H = cp·(T − T_MIN); attenuation `mu` (1/m), full transmission.
    Linear { cp: f64, k: f64, mu: f64 },
    /// Tabulated rows, T and H non-decreasing.
    Table {
        rows: Vec<Row>,
        /// cp just above the table (for dry cells past boiling) and below it.
        cp_hot: f64,
        cp_cold: f64,
    },
}

/// One table row; kept together so a lookup touches one cache line.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Row {
    h: f64,
    t: f64,
    k: f64,
    /// Attenuation 1/D_p, 1/m.
    mu: f64,
    /// Share of incident power entering through a face.
    transmit: f64,
    /// 1 / (next row's h − h): interpolation by a multiplication (0 on a plateau and at the end).
    inv_span: f64,
}

/// What the food does to microwave power at one state.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Dielectric {
    /// Attenuation 1/D_p, 1/m.
    pub attenuation: f64,
    /// Share of incident power entering through a face ([`Permittivity::transmission`]).
    pub transmission: f64,
}

/// Where an enthalpy falls in a material's table: the row below it and the fraction of the way to
/// the next ([`Material::locate`]).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Spot {
    row: usize,
    f: f64,
}

/// A node's state read from its enthalpy ([`Material::state`]).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct State {
    /// Temperature, °C.
    pub t: f64,
    /// Conductivity, W/(m·K).
    pub k: f64,
    /// Dielectric behaviour.
    pub dielectric: Dielectric,
}

impl Material {
    /// A food from its composition.
    pub fn food(comp: &Composition) -> Result<Self, ThermalError> {
        comp.validate()?;
        let solids: f64 = comp.solids();
        let sharp = solids < 1e-9;
        let solid_parts = [
            (Component::Protein, comp.protein),
            (Component::Fat, comp.fat),
            (Component::Carbohydrate, comp.carbohydrate),
            (Component::Fiber, comp.fiber),
            (Component::Ash, comp.ash),
        ];
        let ice_at = |t: f64| -> f64 {
            if sharp {
                if t < comp.freezing_point {
                    comp.water
                } else {
                    0.0
                }
            } else {
                comp.ice_fraction(t)
            }
        };
        // Liquid water at T carries the latent heat at T (Kirchhoff): L(T) = L0 − ∫_T^0 (cp_w − cp_ice),
        // so liquid − ice is exactly L0 at 0 °C.
        let latent_offset = LATENT_FUSION + Component::Ice.sensible_enthalpy(0.0)
            - Component::Water.sensible_enthalpy(0.0);
        let raw_h = |t: f64, ice: f64| -> f64 {
            let s: f64 = solid_parts
                .iter()
                .map(|(c, x)| x * c.sensible_enthalpy(t))
                .sum();
            s + ice * Component::Ice.sensible_enthalpy(t)
                + (comp.water - ice) * (latent_offset + Component::Water.sensible_enthalpy(t))
        };
        let h0 = raw_h(T_MIN, ice_at(T_MIN));
        let row = |t: f64, ice: f64| -> Row {
            let mut fr = comp.fractions(t);
            fr[0].1 = comp.water - ice;
            fr[1].1 = ice;
            let p = crate::composition::mixture(&fr, t);
            let e = dielectric::food(comp, t, ice);
            Row {
                h: raw_h(t, ice) - h0,
                t,
                k: p.conductivity,
                mu: (1.0 / e.penetration_depth()).max(MIN_ATTENUATION),
                transmit: e.transmission(),
                inv_span: 0.0,
            }
        };
        // A 0.5 K grid where the properties are smooth (deep frozen, and thawed), 0.1 K in the
        // ten kelvin below the freezing point where the ice fraction bends, and 0.01 K in the
        // last kelvin where it changes fastest. Fewer rows keep the per-step lookup short.
        let mut grid: Vec<f64> = (0..=((BOILING_POINT - T_MIN) / COARSE_STEP).round() as usize)
            .map(|s| T_MIN + s as f64 * COARSE_STEP)
            .collect();
        grid.extend(
            (0..=(10.0 / T_STEP).round() as usize)
                .map(|s| comp.freezing_point - 10.0 + s as f64 * T_STEP)
                .filter(|&v| v > T_MIN),
        );
        if !sharp {
            grid.extend((1..100).map(|s| comp.freezing_point - 1.0 + s as f64 * 0.01));
        }
        // The freezing point gets its own row(s) below; drop grid points within 1 µK of it.
        grid.retain(|&v| (v - comp.freezing_point).abs() > 1e-6);
        grid.sort_by(f64::total_cmp);
        grid.dedup_by(|a, b| (*a - *b).abs() < 1e-6);
        let mut rows: Vec<Row> = Vec::with_capacity(grid.len() + 2);
        let mut push = |r: Row| rows.push(r);
        let mut prev = f64::NEG_INFINITY;
        for &tt in &grid {
            let crossing = prev < comp.freezing_point && tt >= comp.freezing_point;
            prev = tt;
            if crossing {
                // The freezing point itself: both sides of a sharp front, or the curve's kink.
                if sharp {
                    push(row(comp.freezing_point, comp.water));
                }
                push(row(comp.freezing_point, 0.0));
            }
            push(row(tt, ice_at(tt)));
        }
        for j in 0..rows.len().saturating_sub(1) {
            let span = rows[j + 1].h - rows[j].h;
            rows[j].inv_span = if span > 0.0 { 1.0 / span } else { 0.0 };
        }
        let min_heat_capacity = rows
            .windows(2)
            .filter(|w| w[1].t - w[0].t > 1e-6)
            .map(|w| (w[1].h - w[0].h) / (w[1].t - w[0].t))
            .fold(f64::INFINITY, f64::min);
        let max_mu = rows.iter().map(|r| r.mu).fold(MIN_ATTENUATION, f64::max);
        let reference = dielectric::food(comp, REFERENCE_C, 0.0);
        let thawed = comp.properties(20.0);
        let hot: f64 = solid_parts
            .iter()
            .map(|(c, x)| x * c.specific_heat(BOILING_POINT))
            .sum::<f64>()
            / solids.max(1e-9);
        let mut m = Material {
            curve: Curve::Table {
                rows,
                cp_hot: if sharp {
                    Component::Water.specific_heat(BOILING_POINT)
                } else {
                    hot
                },
                cp_cold: min_heat_capacity,
            },
            density: thawed.density,
            reference_cp: thawed.specific_heat,
            water: comp.water,
            min_heat_capacity,
            dry_absorption: DRY_RESIDUE_LOSS.min(reference.loss) / reference.loss.max(1e-12)
                * solids,
            dry_attenuation: 0.0,
            reference,
            penetration_depth: reference.penetration_depth(),
            min_penetration_depth: 1.0 / max_mu,
            boil_h: f64::INFINITY,
        };
        m.boil_h = m.enthalpy(BOILING_POINT);
        m.dry_attenuation = m.dry_absorption / m.penetration_depth;
        Ok(m)
    }

    /// A material with constant properties (no phase change, no boiling): for checks against
    /// analytic conduction solutions.
    pub fn constant(density: f64, cp: f64, conductivity: f64) -> Result<Self, ThermalError> {
        in_range("density (kg/m³)", density, 1.0, 1e5, "1 to 100 000")?;
        in_range("specific heat (kJ/(kg·K))", cp, 1e-3, 100.0, "0.001 to 100")?;
        in_range(
            "conductivity (W/(m·K))",
            conductivity,
            0.0,
            1e4,
            "0 to 10 000",
        )?;
        Ok(Material {
            curve: Curve::Linear {
                cp,
                k: conductivity,
                mu: MIN_ATTENUATION,
            },
            density,
            reference_cp: cp,
            water: 0.0,
            min_heat_capacity: cp,
            dry_absorption: 1.0,
            dry_attenuation: 0.0,
            reference: Permittivity {
                constant: 1.0,
                loss: 0.0,
            },
            penetration_depth: f64::INFINITY,
            min_penetration_depth: f64::INFINITY,
            boil_h: f64::INFINITY,
        })
    }

    /// The same material with a fixed dielectric behaviour: power penetration depth `depth` (m,
    /// positive; infinite spreads the power evenly through the thickness) and full transmission at
    /// every state. For checks that isolate conduction, calorimetry or boiling from the dielectric model.
    pub fn with_penetration_depth(mut self, depth: f64) -> Result<Self, ThermalError> {
        if depth.is_nan() || depth <= 0.0 {
            return Err(ThermalError::OutOfRange {
                what: "penetration depth (m)",
                value: depth,
                allowed: "greater than 0",
            });
        }
        let mu = (1.0 / depth).max(MIN_ATTENUATION);
        match &mut self.curve {
            Curve::Linear { mu: m, .. } => *m = mu,
            Curve::Table { rows, .. } => rows.iter_mut().for_each(|r| {
                r.mu = mu;
                r.transmit = 1.0;
            }),
        }
        self.penetration_depth = depth;
        self.min_penetration_depth = depth;
        self.dry_attenuation = self.dry_absorption * mu;
        Ok(self)
    }

    /// Specific enthalpy at `t` °C (kJ/kg, zero at −40 °C). At a sharp melting point, the liquid side.
    pub fn enthalpy(&self, t: f64) -> f64 {
        match &self.curve {
            Curve::Linear { cp, .. } => cp * (t - T_MIN),
            Curve::Table {
                rows,
                cp_hot,
                cp_cold,
            } => {
                let (first, last) = (rows[0], rows[rows.len() - 1]);
                if t <= first.t {
                    return first.h + (t - first.t) * cp_cold;
                }
                if t >= last.t {
                    return last.h + (t - last.t) * cp_hot;
                }
                // Last row with T ≤ t (the liquid side of a plateau).
                let i = rows.partition_point(|r| r.t <= t) - 1;
                let (a, b) = (rows[i], rows[i + 1]);
                a.h + (t - a.t) / (b.t - a.t) * (b.h - a.h)
            }
        }
    }

    /// The state at enthalpy `hv`; `hint` is the row index from the previous call for the same
    /// node (updated).
    pub fn state(&self, hv: f64, hint: &mut usize) -> State {
        let (t, spot) = self.locate(hv, hint);
        State {
            t,
            k: self.conductivity_at(spot),
            dielectric: self.dielectric_at(spot),
        }
    }

    /// The temperature at enthalpy `hv`, and where `hv` falls in the table, from which the other
    /// properties are read when they are needed ([`Material::conductivity_at`],
    /// [`Material::dielectric_at`]). `hint` as for [`Material::state`].
    pub fn locate(&self, hv: f64, hint: &mut usize) -> (f64, Spot) {
        match &self.curve {
            Curve::Linear { cp, .. } => (T_MIN + hv / cp, Spot::default()),
            Curve::Table {
                rows,
                cp_hot,
                cp_cold,
            } => {
                let (first, last) = (rows[0], rows[rows.len() - 1]);
                let top = rows.len() - 2;
                if hv >= last.h {
                    let spot = Spot { row: top, f: 1.0 };
                    return (last.t + (hv - last.h) / cp_hot, spot);
                }
                if hv <= first.h {
                    return (first.t + (hv - first.h) / cp_cold, Spot::default());
                }
                // Temperatures move some rows per step: gallop from the hint (1, 2, 4 … rows) to
                // bracket the row, then bisect the bracket.
                let start = (*hint).min(top);
                let below = |j: usize| rows[j].h <= hv;
                let (mut lo, mut hi) = if below(start) {
                    let (mut lo, mut gap) = (start, 1);
                    while lo + gap <= top && below(lo + gap) {
                        lo += gap;
                        gap *= 2;
                    }
                    (lo, (lo + gap).min(top + 1))
                } else {
                    let (mut hi, mut gap) = (start, 1);
                    while hi >= gap && !below(hi - gap) {
                        hi -= gap;
                        gap *= 2;
                    }
                    (hi.saturating_sub(gap), hi)
                };
                // Invariant: rows[lo].h <= hv (or lo = 0) and hv < rows[hi].h (or hi = top + 1).
                while hi - lo > 1 {
                    let mid = (lo + hi) / 2;
                    if below(mid) {
                        lo = mid;
                    } else {
                        hi = mid;
                    }
                }
                let i = lo.min(top);
                *hint = i;
                let (a, b) = (rows[i], rows[i + 1]);
                let f = ((hv - a.h) * a.inv_span).clamp(0.0, 1.0);
                (a.t + f * (b.t - a.t), Spot { row: i, f })
            }
        }
    }

    /// Conductivity, W/(m·K), where [`Material::locate`] found the state.
    pub fn conductivity_at(&self, spot: Spot) -> f64 {
        match &self.curve {
            Curve::Linear { k, .. } => *k,
            Curve::Table { rows, .. } => {
                let (a, b) = (rows[spot.row], rows[spot.row + 1]);
                a.k + spot.f * (b.k - a.k)
            }
        }
    }

    /// Dielectric behaviour where [`Material::locate`] found the state.
    pub fn dielectric_at(&self, spot: Spot) -> Dielectric {
        match &self.curve {
            Curve::Linear { mu, .. } => Dielectric {
                attenuation: *mu,
                transmission: 1.0,
            },
            Curve::Table { rows, .. } => {
                let (a, b) = (rows[spot.row], rows[spot.row + 1]);
                Dielectric {
                    attenuation: a.mu + spot.f * (b.mu - a.mu),
                    transmission: a.transmit + spot.f * (b.transmit - a.transmit),
                }
            }
        }
    }

    /// Temperature at enthalpy `h`.
    pub fn temperature(&self, h: f64) -> f64 {
        self.state(h, &mut 0).t
    }

    /// Share of the power incident on one face that a uniform column of `thickness` (m) at `t` °C
    /// absorbs: transmission × (1 − e^(−thickness/D_p)) (Lambert's law, the same picture the time
    /// course deposits power by). The ratio of this at two states converts a heating map between
    /// them, for instance from a frozen recording to the reference state: a frozen food lets more
    /// power in (it reflects less) but holds little of it, so the conversion is far from the bare
    /// loss-factor ratio.
    pub fn column_absorption(&self, t: f64, thickness: f64) -> f64 {
        let d = self.state(self.enthalpy(t), &mut 0).dielectric;
        d.transmission * -(-thickness * d.attenuation).exp_m1()
    }

    /// [`Material::column_absorption`] at `t` over that at the reference state.
    pub fn absorption_ratio(&self, t: f64, thickness: f64) -> f64 {
        self.column_absorption(t, thickness) / self.column_absorption(REFERENCE_C, thickness)
    }

    /// Attenuation (1/m) of a node whose state gives `attenuation` and which has
    /// `water_left_fraction` of its water: falling linearly in the water that remains to the dry
    /// residue's ([`Material::dry_absorption`] × the reference attenuation) once it has all boiled
    /// off. An assumption of this model: the loss is carried by the water with its salts, the dry
    /// matter adds its own small share. Materials without water are unaffected.
    pub fn attenuation_with_moisture(&self, attenuation: f64, water_left_fraction: f64) -> f64 {
        if self.water <= 0.0 {
            return attenuation;
        }
        let w = water_left_fraction.clamp(0.0, 1.0);
        self.dry_attenuation + (attenuation - self.dry_attenuation) * w
    }

    /// Enthalpy at the boiling point: above it, energy evaporates water.
    pub fn boiling_enthalpy(&self) -> f64 {
        self.boil_h
    }
}
