//! The synthetic field model: illustrative heating maps for any layout, for sketching and demos.
//!
//! **Illustrative, not a measurement.** A rectangular cavity of our own choosing (36 × 34 × 22 cm)
//! has resonant modes near 2.45 GHz (Pozar, *Microwave Engineering*, §6.3: f = c/2·√((m/a)² + (n/b)² +
//! (ℓ/d)²); TE and TM field shapes as in shared/reference/physics.md §4). Each configuration is a
//! seeded mixture of four modes with random complex amplitudes, plus a steered focus (a Gaussian
//! hot spot of σ = 4 cm at a seeded position: what phase-controlled antennas add). The load detunes the cavity: the
//! more (and the more polar) food, the lower each mode's frequency, weighting it by a Lorentzian of
//! loaded Q = 30 (an assumed value). In food, absorbed power density is P = 2πf·ε₀·ε″·|E|²
//! (Komarov, Wang & Tang 2005), reduced by the surface transmission 1 − |Γ|² (normal incidence) and
//! averaged over the food's depth with Lambert's law exp(−z/D_p), D_p ≈ λ₀√ε′/(2πε″). Rates (K/s) are
//! P/(ρ·cp) with the food's thawed properties at 20 °C. Each configuration is scaled so that the
//! standard load of the IEC 60705 power test — 1 kg of water in a 190 mm vessel at the cavity centre —
//! absorbs the oven's rated power.
//!
//! **Power balance.** No configuration may make the load absorb more than the oven puts out: the
//! total P_c = Σ rate·ρ·cp·volume over the tray is capped at η(M)·P_rated, the coupling
//! efficiency η falling for small loads ([`coupling_efficiency`]); a configuration above the cap
//! is scaled down to it.

use crate::error::PlanError;
use traycast_rng::SplitMix;
use traycast_thermal::dielectric::Permittivity;

const C0: f64 = 299_792_458.0;
const F0: f64 = 2.45e9;
/// 2π·f·ε₀ at 2.45 GHz, W/(m³·(V/m)²) per unit ε″.
const OMEGA_EPS0: f64 = 0.136_30;
const Q_LOADED: f64 = 30.0;
const MODES_PER_CONFIG: usize = 4;

/// Load mass below which coupling falls off, kg: η(M) = 1 − e^(−M/M₀).
const COUPLING_MASS: f64 = 0.2;

/// Share of the oven's rated output a load of `mass` kg can absorb, 0 to 1. An assumption shaped
/// on the oven literature's efficiency-versus-load curves, which fall steeply below about 300 g
/// (shared/reference/physics.md §8.2; recalled from memory, no exact curve confirmed): 0.99 for
/// the 1 kg IEC 60705 water load, 0.78 at 300 g, 0.39 at 100 g.
pub fn coupling_efficiency(mass: f64) -> f64 {
    -(-mass.max(0.0) / COUPLING_MASS).exp_m1()
}

/// Cavity size and tray height, m.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Cavity {
    /// Width (x).
    pub a: f64,
    /// Depth (y).
    pub b: f64,
    /// Height (z).
    pub d: f64,
    /// Height of the tray plane above the floor.
    pub tray_z: f64,
}

/// Our illustrative cavity.
pub const CAVITY: Cavity = Cavity {
    a: 0.36,
    b: 0.34,
    d: 0.22,
    tray_z: 0.03,
};

/// A resonant mode.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Mode {
    /// Indices along x, y, z.
    pub m: u32,
    /// y index.
    pub n: u32,
    /// z index.
    pub l: u32,
    /// TE (true) or TM (false) with respect to z.
    pub te: bool,
    /// Resonant frequency of the empty cavity, Hz.
    pub freq: f64,
}

/// Resonant frequency of mode (m, n, ℓ) of an empty a × b × d cavity (Pozar §6.3).
pub fn resonant_frequency(a: f64, b: f64, d: f64, m: u32, n: u32, l: u32) -> f64 {
    C0 / 2.0 * ((m as f64 / a).powi(2) + (n as f64 / b).powi(2) + (l as f64 / d).powi(2)).sqrt()
}

/// Modes of `cav` resonating between 2.35 and 2.55 GHz (TE needs ℓ ≥ 1 and (m, n) ≠ 0; TM needs m, n ≥ 1).
pub fn modes(cav: &Cavity) -> Vec<Mode> {
    let mut out = Vec::new();
    for m in 0..=10 {
        for n in 0..=10 {
            for l in 0..=8 {
                let freq = resonant_frequency(cav.a, cav.b, cav.d, m, n, l);
                if !(2.35e9..=2.55e9).contains(&freq) {
                    continue;
                }
                if l >= 1 && (m, n) != (0, 0) {
                    out.push(Mode {
                        m,
                        n,
                        l,
                        te: true,
                        freq,
                    });
                }
                if m >= 1 && n >= 1 {
                    out.push(Mode {
                        m,
                        n,
                        l,
                        te: false,
                        freq,
                    });
                }
            }
        }
    }
    out
}

/// Wave numbers (π m/a, π n/b) and the in-plane amplitude coefficients of `mode` at height z:
/// E = (cₓ·cos(kₓx)·sin(k_y y), c_y·sin(kₓx)·cos(k_y y), c_z·sin(kₓx)·sin(k_y y)).
fn coefficients(cav: &Cavity, mode: &Mode, z: f64) -> (f64, f64, [f64; 3]) {
    let (kx, ky, kz) = (
        mode.m as f64 * std::f64::consts::PI / cav.a,
        mode.n as f64 * std::f64::consts::PI / cav.b,
        mode.l as f64 * std::f64::consts::PI / cav.d,
    );
    let sz = (kz * z).sin();
    let c = if mode.te {
        // TE_mnℓ: Ex ∝ (n/b)·cos·sin·sin(kz z), Ey ∝ −(m/a)·sin·cos·sin(kz z), Ez = 0.
        [
            mode.n as f64 / cav.b * sz,
            -(mode.m as f64) / cav.a * sz,
            0.0,
        ]
    } else {
        // TM_mnℓ: Ez ∝ sin·sin·cos(kz z); Ex, Ey ∝ −k·kz/kc²·…·sin(kz z).
        let kc2 = kx * kx + ky * ky;
        [-kx * kz / kc2 * sz, -ky * kz / kc2 * sz, (kz * z).cos()]
    };
    (kx, ky, c)
}

/// E-field shape (x, y, z components) of `mode` at a point (standing-wave amplitudes).
pub fn mode_field(cav: &Cavity, mode: &Mode, x: f64, y: f64, z: f64) -> [f64; 3] {
    let (kx, ky, c) = coefficients(cav, mode, z);
    let (cx, sx, cy, sy) = (
        (kx * x).cos(),
        (kx * x).sin(),
        (ky * y).cos(),
        (ky * y).sin(),
    );
    [c[0] * cx * sy, c[1] * sx * cy, c[2] * sx * sy]
}

/// Fields of `mode` on a grid of points (xs × ys, row-major by y), by separable trigonometry.
fn grid_field(cav: &Cavity, mode: &Mode, xs: &[f64], ys: &[f64]) -> Vec<[f64; 3]> {
    let (kx, ky, c) = coefficients(cav, mode, cav.tray_z);
    let tx: Vec<(f64, f64)> = xs
        .iter()
        .map(|&x| ((kx * x).cos(), (kx * x).sin()))
        .collect();
    let ty: Vec<(f64, f64)> = ys
        .iter()
        .map(|&y| ((ky * y).cos(), (ky * y).sin()))
        .collect();
    let mut out = Vec::with_capacity(xs.len() * ys.len());
    for &(cy, sy) in &ty {
        for &(cx, sx) in &tx {
            out.push([c[0] * cx * sy, c[1] * sx * cy, c[2] * sx * sy]);
        }
    }
    out
}

/// What one cell holds, for the field model.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Absorber {
    /// Permittivity at the maps' reference state (`Material::reference` of the thermal crate).
    pub permittivity: Permittivity,
    /// Thickness, m.
    pub thickness: f64,
    /// Thawed density, kg/m³.
    pub density: f64,
    /// Thawed specific heat at 20 °C, kJ/(kg·K).
    pub cp: f64,
}

/// Generated maps: `thawed[c * cells + i]`, K/s, for the thawed reference state.
#[derive(Clone, Debug, PartialEq)]
pub struct FieldMaps {
    /// Configurations.
    pub configs: usize,
    /// Cells.
    pub cells: usize,
    /// Config-major rates, K/s.
    pub thawed: Vec<f64>,
}

struct Mixture {
    modes: Vec<(usize, f64, f64)>,
    /// Steered focus: centre (x, y) in the cavity, m.
    focus: (f64, f64),
}

/// Width of a configuration's steered focus, m (about λ₀/3; illustrative).
const FOCUS_SIGMA: f64 = 0.035;
/// Peak of the focus relative to the mean modal intensity (illustrative).
const FOCUS_GAIN: f64 = 8.0;

fn mixtures(all: &[Mode], configs: usize, seed: u64) -> Vec<Mixture> {
    (0..configs)
        .map(|c| {
            let mut rng = SplitMix::new(seed ^ (c as u64 + 1).wrapping_mul(0x9E37_79B9_7F4A_7C15));
            let mut picked: Vec<usize> = Vec::new();
            while picked.len() < MODES_PER_CONFIG.min(all.len()) {
                let k = rng.below(all.len() as u64) as usize;
                if !picked.contains(&k) {
                    picked.push(k);
                }
            }
            let focus = (
                CAVITY.a * (0.15 + 0.7 * rng.unit()),
                CAVITY.b * (0.15 + 0.7 * rng.unit()),
            );
            Mixture {
                focus,
                modes: picked
                    .into_iter()
                    .map(|k| {
                        let mag = 0.4 + 0.6 * rng.unit();
                        let phase = 2.0 * std::f64::consts::PI * rng.unit();
                        (k, mag * phase.cos(), mag * phase.sin())
                    })
                    .collect(),
            }
        })
        .collect()
}

/// Detuning weight of each mode for a load with filling `phi` (Σ (ε′ − 1)·V_food / V_cavity).
fn detuning(all: &[Mode], phi: f64) -> Vec<f64> {
    let shift = (1.0 + 2.0 * phi).sqrt();
    all.iter()
        .map(|m| {
            let f = m.freq / shift;
            1.0 / (1.0 + (2.0 * Q_LOADED * (f - F0) / F0).powi(2)).sqrt()
        })
        .collect()
}

/// Power density factor for unit |E|²: ε″·(1 − |Γ|²)·depth average, W/m³ per (V/m)².
fn absorption(eps_r: f64, eps_i: f64, thickness: f64) -> f64 {
    let root = eps_r.sqrt();
    let gamma = (1.0 - root) / (1.0 + root);
    let dp = (C0 / F0) * root / (2.0 * std::f64::consts::PI * eps_i.max(1e-6));
    let depth = if thickness > 0.0 {
        dp / thickness * (1.0 - (-thickness / dp).exp())
    } else {
        1.0
    };
    OMEGA_EPS0 * eps_i * (1.0 - gamma * gamma) * depth
}

/// The reference load, 1 kg of water in a 190 mm disc at the cavity centre, as a masked 24 × 24 grid:
/// (grid xs, grid ys, mask, volume per point, depth).
fn reference_load(cav: &Cavity) -> (Vec<f64>, Vec<f64>, Vec<bool>, f64, f64) {
    let r = 0.095;
    let rho = 998.0;
    let depth = 1.0 / (rho * std::f64::consts::PI * r * r);
    let k = 24;
    let step = 2.0 * r / k as f64;
    let axis = |centre: f64| -> Vec<f64> {
        (0..k)
            .map(|i| centre - r + (i as f64 + 0.5) * step)
            .collect()
    };
    let (xs, ys) = (axis(cav.a / 2.0), axis(cav.b / 2.0));
    let mut mask = Vec::with_capacity(k * k);
    for y in &ys {
        for x in &xs {
            let (dx, dy) = (x - cav.a / 2.0, y - cav.b / 2.0);
            mask.push(dx * dx + dy * dy <= r * r);
        }
    }
    let inside = mask.iter().filter(|&&m| m).count();
    let volume = std::f64::consts::PI * r * r * depth / inside as f64;
    (xs, ys, mask, volume, depth)
}

/// Modal intensities plus the mixture's steered focus scaled to `focus_peak` (on the grid `xs` × `ys`).
fn with_focus(modal: Vec<f64>, mix: &Mixture, xs: &[f64], ys: &[f64], focus_peak: f64) -> Vec<f64> {
    let mut out = modal;
    // The Gaussian separates: exp(−(dx² + dy²)/2σ²) = exp(−dx²/2σ²)·exp(−dy²/2σ²).
    let g = |d: f64| (-d * d / (2.0 * FOCUS_SIGMA * FOCUS_SIGMA)).exp();
    let gx: Vec<f64> = xs.iter().map(|x| g(x - mix.focus.0)).collect();
    for (r, y) in ys.iter().enumerate() {
        let gy = focus_peak * g(y - mix.focus.1);
        for (o, gxc) in out[r * xs.len()..(r + 1) * xs.len()].iter_mut().zip(&gx) {
            *o += gy * gxc;
        }
    }
    out
}

/// |Σ_k w_k·a_k·e_k|² at every grid point for one mixture.
fn modal_intensities(
    fields: &[Option<Vec<[f64; 3]>>],
    mix: &Mixture,
    weights: &[f64],
    points: usize,
) -> Vec<f64> {
    let mut re = vec![[0.0f64; 3]; points];
    let mut im = vec![[0.0f64; 3]; points];
    for &(k, ar, ai) in &mix.modes {
        let e = fields[k]
            .as_ref()
            .expect("fields computed for every mixed mode");
        let (wr, wi) = (weights[k] * ar, weights[k] * ai);
        for p in 0..points {
            for c in 0..3 {
                re[p][c] += wr * e[p][c];
                im[p][c] += wi * e[p][c];
            }
        }
    }
    re.iter()
        .zip(&im)
        .map(|(r, i)| (0..3).map(|c| r[c] * r[c] + i[c] * i[c]).sum())
        .collect()
}

/// Grid fields of every mode some mixture uses.
fn used_fields(
    cav: &Cavity,
    all: &[Mode],
    mix: &[Mixture],
    xs: &[f64],
    ys: &[f64],
) -> Vec<Option<Vec<[f64; 3]>>> {
    let mut fields: Vec<Option<Vec<[f64; 3]>>> = vec![None; all.len()];
    for m in mix {
        for &(k, _, _) in &m.modes {
            if fields[k].is_none() {
                fields[k] = Some(grid_field(cav, &all[k], xs, ys));
            }
        }
    }
    fields
}

/// Heating maps for a layout: `cells[i]` is None for empty cells. The tray is centred in the cavity.
pub fn generate(
    width: usize,
    height: usize,
    cell_m: f64,
    cells: &[Option<Absorber>],
    configs: usize,
    seed: u64,
    rated_power_w: f64,
) -> Result<FieldMaps, PlanError> {
    let cav = CAVITY;
    if width as f64 * cell_m > cav.a + 1e-9 || height as f64 * cell_m > cav.b + 1e-9 {
        return Err(PlanError::new(
            "tray",
            format!(
                "the tray ({:.0} × {:.0} mm) does not fit the model cavity ({:.0} × {:.0} mm); use fewer or smaller cells",
                width as f64 * cell_m * 1e3,
                height as f64 * cell_m * 1e3,
                cav.a * 1e3,
                cav.b * 1e3
            ),
        ));
    }
    let all = modes(&cav);
    let mix = mixtures(&all, configs, seed);
    let n = width * height;
    let (x0, y0) = (
        (cav.a - width as f64 * cell_m) / 2.0,
        (cav.b - height as f64 * cell_m) / 2.0,
    );
    let v_cav = cav.a * cav.b * cav.d;
    let phi: f64 = cells
        .iter()
        .flatten()
        .map(|c| (c.permittivity.constant - 1.0) * cell_m * cell_m * c.thickness)
        .sum::<f64>()
        / v_cav;
    let weights = detuning(&all, phi);
    // Reference water load, for the per-configuration power scale (IEC 60705 water-load method).
    let wf = traycast_thermal::dielectric::water(traycast_thermal::material::REFERENCE_C);
    let (rxs, rys, mask, dv, depth) = reference_load(&cav);
    let inside = mask.iter().filter(|&&m| m).count() as f64;
    let ref_weights = detuning(&all, (wf.constant - 1.0) * dv * inside / v_cav);
    let ref_abs = absorption(wf.constant, wf.loss, depth);
    let ref_fields = used_fields(&cav, &all, &mix, &rxs, &rys);
    // Per-cell absorption factor and heat capacity per volume (thawed).
    let per_cell: Vec<Option<(f64, f64)>> = cells
        .iter()
        .map(|c| {
            c.map(|c| {
                let f = c.permittivity;
                (
                    absorption(f.constant, f.loss, c.thickness),
                    c.density * c.cp * 1000.0,
                )
            })
        })
        .collect();
    let xs: Vec<f64> = (0..width).map(|c| x0 + (c as f64 + 0.5) * cell_m).collect();
    let ys: Vec<f64> = (0..height)
        .map(|r| y0 + (r as f64 + 0.5) * cell_m)
        .collect();
    let tray_fields = used_fields(&cav, &all, &mix, &xs, &ys);
    let mut thawed = vec![0.0; configs * n];
    // Watts per K/s of each cell's rate, and the cap on any configuration's total.
    let watts_per_rate: Vec<f64> = cells
        .iter()
        .zip(&per_cell)
        .map(|(c, pc)| match (c, pc) {
            (Some(c), Some((_, rho_cp))) => rho_cp * cell_m * cell_m * c.thickness,
            _ => 0.0,
        })
        .collect();
    let mass: f64 = cells
        .iter()
        .flatten()
        .map(|c| c.density * cell_m * cell_m * c.thickness)
        .sum();
    let cap = coupling_efficiency(mass) * rated_power_w;
    for (ci, m) in mix.iter().enumerate() {
        // The focus scale comes from the empty-ish reference so it does not depend on the layout.
        let ref_modal = modal_intensities(&ref_fields, m, &ref_weights, mask.len());
        let peak = FOCUS_GAIN * ref_modal.iter().sum::<f64>() / mask.len() as f64;
        let ref_i = with_focus(ref_modal, m, &rxs, &rys, peak);
        let p_ref: f64 = ref_i
            .iter()
            .zip(&mask)
            .filter(|(_, m)| **m)
            .map(|(e2, _)| ref_abs * e2 * dv)
            .sum();
        let scale = rated_power_w / p_ref.max(1e-300);
        let e2 = with_focus(
            modal_intensities(&tray_fields, m, &weights, n),
            m,
            &xs,
            &ys,
            peak,
        );
        for i in 0..n {
            if let Some((abs, rho_cp)) = per_cell[i] {
                thawed[ci * n + i] = scale * abs * e2[i] / rho_cp;
            }
        }
        let rates = &mut thawed[ci * n..(ci + 1) * n];
        let absorbed: f64 = rates.iter().zip(&watts_per_rate).map(|(r, w)| r * w).sum();
        if absorbed > cap {
            let down = cap / absorbed;
            rates.iter_mut().for_each(|r| *r *= down);
        }
    }
    Ok(FieldMaps {
        configs,
        cells: n,
        thawed,
    })
}
