//! A material ready for simulation: enthalpy ↔ temperature, conductivity and absorption as functions
//! of the state, tabulated once from the composition.
//!
//! Enthalpy (kJ/kg, zero at −40 °C) is built from the components so that it is continuous and
//! monotonic across the freezing range: H(T) = Σ solids xᵢ·Sᵢ(T) + x_ice(T)·S_ice(T) +
//! (x_w − x_ice(T))·(S_ice(T) + L(T)), with Sᵢ the Choi–Okos sensible enthalpies, x_ice from Tchigeov
//! and L(T) = L₀ − ∫_T^0 (cp_w − cp_ice) the latent heat at T (Kirchhoff's relation). Its slope is
//! positive everywhere because melting ice (dx_ice/dT < 0) absorbs L(T) > 0. Pure water
//! (no solids) melts isothermally at its freezing point: a plateau of L₀·x_w.

use crate::choi_okos::Component;
use crate::composition::{BOILING_POINT, Composition, LATENT_FUSION};
use crate::dielectric::LossClass;
use crate::error::{ThermalError, in_range};

const T_MIN: f64 = -40.0;
const T_STEP: f64 = 0.1;

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
    /// thawed food ([`LossClass::dry_ratio`]); 0 for pure water, which leaves nothing.
    pub dry_absorption: f64,
    /// Power penetration depth of the thawed food at 2.45 GHz, m: how the column's power is
    /// spread through the thickness ([`crate::dielectric::penetration_depth`]). Infinite (power
    /// spread evenly) for [`Material::constant`] unless set with
    /// [`Material::with_penetration_depth`].
    pub penetration_depth: f64,
    /// Enthalpy at the boiling point (kJ/kg); +∞ for materials that do not boil.
    boil_h: f64,
}

#[derive(Clone, Debug, PartialEq)]
enum Curve {
    /// Constant properties: H = cp·(T − T_MIN).
    Linear { cp: f64, k: f64 },
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
    absorb: f64,
}

impl Material {
    /// A food from its composition and loss class.
    pub fn food(comp: &Composition, loss: LossClass) -> Result<Self, ThermalError> {
        comp.validate()?;
        let solids: f64 = comp.solids();
        let sharp = solids < 1e-9;
        let freezable = comp.water - comp.bound_water();
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
        let row = |t: f64, ice: f64| -> (f64, f64, f64, f64) {
            let mut fr = comp.fractions(t);
            fr[0].1 = comp.water - ice;
            fr[1].1 = ice;
            let p = crate::composition::mixture(&fr, t);
            let unfrozen = if freezable > 0.0 {
                1.0 - ice / freezable
            } else {
                1.0
            };
            (
                t,
                raw_h(t, ice) - h0,
                p.conductivity,
                loss.absorption_ratio(unfrozen),
            )
        };
        // A 0.1 K grid, ten times finer in the kelvin below the freezing point where the ice
        // fraction changes fastest.
        let mut grid: Vec<f64> = (0..=((BOILING_POINT - T_MIN) / T_STEP).round() as usize)
            .map(|s| T_MIN + s as f64 * T_STEP)
            .collect();
        if !sharp {
            grid.extend((1..100).map(|s| comp.freezing_point - 1.0 + s as f64 * 0.01));
        }
        // The freezing point gets its own row(s) below; drop grid points within 1 µK of it.
        grid.retain(|&v| (v - comp.freezing_point).abs() > 1e-6);
        grid.sort_by(f64::total_cmp);
        grid.dedup_by(|a, b| (*a - *b).abs() < 1e-6);
        let (mut t, mut h, mut k, mut absorb) = (vec![], vec![], vec![], vec![]);
        let mut push = |r: (f64, f64, f64, f64)| {
            t.push(r.0);
            h.push(r.1);
            k.push(r.2);
            absorb.push(r.3);
        };
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
        let slopes = h
            .windows(2)
            .zip(t.windows(2))
            .filter(|(_, tw)| tw[1] - tw[0] > 1e-6);
        let min_heat_capacity = slopes
            .map(|(hw, tw)| (hw[1] - hw[0]) / (tw[1] - tw[0]))
            .fold(f64::INFINITY, f64::min);
        let thawed = comp.properties(20.0);
        let hot: f64 = solid_parts
            .iter()
            .map(|(c, x)| x * c.specific_heat(BOILING_POINT))
            .sum::<f64>()
            / solids.max(1e-9);
        let mut m = Material {
            curve: Curve::Table {
                rows: (0..t.len())
                    .map(|i| Row {
                        h: h[i],
                        t: t[i],
                        k: k[i],
                        absorb: absorb[i],
                    })
                    .collect(),
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
            dry_absorption: loss.dry_ratio(solids),
            penetration_depth: loss.penetration_depth(),
            boil_h: f64::INFINITY,
        };
        m.boil_h = m.enthalpy(BOILING_POINT);
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
            },
            density,
            reference_cp: cp,
            water: 0.0,
            min_heat_capacity: cp,
            dry_absorption: 1.0,
            penetration_depth: f64::INFINITY,
            boil_h: f64::INFINITY,
        })
    }

    /// The same material with power penetration depth `depth` (m, > 0; infinite spreads the power
    /// evenly through the thickness).
    pub fn with_penetration_depth(mut self, depth: f64) -> Result<Self, ThermalError> {
        if depth.is_nan() || depth <= 0.0 {
            return Err(ThermalError::OutOfRange {
                what: "penetration depth (m)",
                value: depth,
                allowed: "greater than 0",
            });
        }
        self.penetration_depth = depth;
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

    /// Temperature, conductivity and absorption ratio at enthalpy `hv`; `hint` is the row index from
    /// the previous call for the same cell (updated).
    pub fn state(&self, hv: f64, hint: &mut usize) -> (f64, f64, f64) {
        match &self.curve {
            Curve::Linear { cp, k } => (T_MIN + hv / cp, *k, 1.0),
            Curve::Table {
                rows,
                cp_hot,
                cp_cold,
            } => {
                let (first, last) = (rows[0], rows[rows.len() - 1]);
                if hv >= last.h {
                    return (last.t + (hv - last.h) / cp_hot, last.k, last.absorb);
                }
                if hv <= first.h {
                    return (first.t + (hv - first.h) / cp_cold, first.k, first.absorb);
                }
                let top = rows.len() - 2;
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
                let span = b.h - a.h;
                let f = if span > 0.0 {
                    ((hv - a.h) / span).clamp(0.0, 1.0)
                } else {
                    0.0
                };
                (
                    a.t + f * (b.t - a.t),
                    a.k + f * (b.k - a.k),
                    a.absorb + f * (b.absorb - a.absorb),
                )
            }
        }
    }

    /// Temperature at enthalpy `h`.
    pub fn temperature(&self, h: f64) -> f64 {
        self.state(h, &mut 0).0
    }

    /// Absorption factor for the moisture a cell has left: 1 with all its water, falling linearly
    /// (in the water that remains) to [`Material::dry_absorption`] when it has all boiled off. An
    /// assumption of this model: the loss is carried by the water, the dry matter adds its own small
    /// share. Materials without water are unaffected.
    pub fn moisture_factor(&self, water_left_fraction: f64) -> f64 {
        if self.water <= 0.0 {
            return 1.0;
        }
        let w = water_left_fraction.clamp(0.0, 1.0);
        self.dry_absorption + (1.0 - self.dry_absorption) * w
    }

    /// Enthalpy at the boiling point: above it, energy evaporates water.
    pub fn boiling_enthalpy(&self) -> f64 {
        self.boil_h
    }
}
