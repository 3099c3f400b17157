//! The time course against analytic heat-conduction solutions and energy balances
//! (Carslaw & Jaeger 1959; Incropera, Fundamentals of Heat and Mass Transfer, ch. 3 and 5; check
//! values in shared/reference/physics.md §5.2, recomputed here where they are derived).

use std::f64::consts::PI;
use traycast_thermal::catalogue;
use traycast_thermal::composition::LATENT_VAPORISATION;
use traycast_thermal::material::Material;
use traycast_thermal::schedule::{Schedule, Step};
use traycast_thermal::simulate::*;

const ALPHA: f64 = 1.4e-7;

/// A constant material with ρ = 1000 kg/m³, cp = 4 kJ/(kg·K) and diffusivity `alpha`.
fn constant(alpha: f64) -> Material {
    Material::constant(1000.0, 4.0, alpha * 1000.0 * 4000.0).unwrap()
}

fn quiet(step: f64, edges: Edges) -> Settings {
    Settings {
        surface_h: 0.0,
        standing: 0.0,
        step,
        record_every: 1e6,
        edges,
        ..Settings::default()
    }
}

fn run_rod(
    cells: usize,
    dx: f64,
    start: &[f64],
    seconds: f64,
    step: f64,
    rate: f64,
    mat: &Material,
) -> TimeCourse {
    let items = [mat.clone()];
    let fill = vec![
        Some(CellFill {
            item: 0,
            thickness: dx,
            covered: true,
        });
        cells
    ];
    let load = Load {
        tray: Tray {
            width: cells,
            height: 1,
            cell_size: dx,
        },
        items: &items,
        cells: &fill,
        start,
    };
    let rates = vec![rate; cells];
    let maps = Maps {
        configs: 1,
        rates: &rates,
    };
    let schedule = Schedule {
        steps: vec![Step { config: 0, seconds }],
    };
    let edges = Edges {
        x: Edge::Fixed(0.0),
        y: Edge::Insulated,
    };
    simulate(&load, &maps, &schedule, &quiet(step, edges)).unwrap()
}

/// §5.2 item 1, discrete-exact: the sampled sine mode is an eigenvector of the explicit scheme, so
/// after 100 steps T = g¹⁰⁰·T⁰ with g = 1 − αΔt·(4/Δx²)·sin²(πΔx/2L); check value 0.5392988042.
#[test]
fn single_mode_decays_exactly_as_the_discrete_scheme_predicts() {
    let (l, dx) = (0.02, 0.001);
    let dt = 0.25 * dx * dx / ALPHA;
    let start: Vec<f64> = (1..20).map(|i| (PI * i as f64 * dx / l).sin()).collect();
    let course = run_rod(19, dx, &start, 100.0 * dt, dt, 0.0, &constant(ALPHA));
    let lambda = 4.0 / (dx * dx) * (PI * dx / (2.0 * l)).sin().powi(2);
    let g: f64 = 1.0 - ALPHA * dt * lambda;
    assert!((g - 0.99384417).abs() < 1e-8);
    assert!((g.powi(100) - 0.5392988042).abs() < 1e-9);
    for (i, s) in start.iter().enumerate() {
        let got = course.end_of_heating[i];
        assert!(
            (got - s * g.powi(100)).abs() < 1e-9,
            "cell {i}: {got} vs {}",
            s * g.powi(100)
        );
    }
}

/// §5.2 item 2: slab of thickness 2 cm, uniform start, walls at 0: centre T/T0 from the Fourier series
/// (4/π) Σ_odd (1/n) sin(nπ/2) exp(−n²π²αt/L²) = 0.970605 (60 s), 0.451659 (300 s), 0.160245 (600 s).
#[test]
fn uniform_slab_cools_like_the_fourier_series() {
    let (l, dx) = (0.02, 0.0001);
    let cells = 199;
    let dt = 0.25 * dx * dx / ALPHA;
    let series = |t: f64| -> f64 {
        (0..200)
            .map(|k| {
                let n = (2 * k + 1) as f64;
                4.0 / PI / n * (n * PI / 2.0).sin() * (-(n * PI / l).powi(2) * ALPHA * t).exp()
            })
            .sum()
    };
    for (t, check) in [(60.0, 0.970605), (300.0, 0.451659), (600.0, 0.160245)] {
        assert!((series(t) - check).abs() < 2e-6, "series {t}");
        let course = run_rod(cells, dx, &vec![1.0; cells], t, dt, 0.0, &constant(ALPHA));
        let centre = course.end_of_heating[cells / 2];
        assert!(
            (centre - check).abs() < 3e-4,
            "t = {t}: {centre} vs {check}"
        );
    }
}

/// §5.2 item 6 (Incropera §3.5): steady wall with uniform generation q̇ between faces at Ts:
/// T_max − Ts = q̇L²/(2k) = 100 K for q̇ = 1e6 W/m³, k = 0.5 W/(m·K), L = 1 cm. The finite-difference
/// scheme is exact for this quadratic profile, so the steady node value is too.
#[test]
fn steady_wall_with_generation() {
    let (dx, k, qdot) = (0.001, 0.5, 1e6);
    let mat = Material::constant(1000.0, 4.0, k).unwrap();
    let alpha = k / 4e6;
    let rate = qdot / (1000.0 * 4000.0); // K/s: power = rate·m·cp
    let dt = 0.2 * dx * dx / alpha;
    let course = run_rod(19, dx, &[0.0; 19], 6000.0, dt, rate, &mat);
    let centre = course.end_of_heating[9];
    assert!((centre - 100.0).abs() < 1e-4, "{centre}");
}

fn single_cell(
    mat: Material,
    side: f64,
    start: f64,
    rate: f64,
    seconds: f64,
    standing: f64,
) -> TimeCourse {
    let items = [mat];
    let cells = [Some(CellFill {
        item: 0,
        thickness: side,
        covered: true,
    })];
    let load = Load {
        tray: Tray {
            width: 1,
            height: 1,
            cell_size: side,
        },
        items: &items,
        cells: &cells,
        start: &[start],
    };
    let maps = Maps {
        configs: 1,
        rates: &[rate],
    };
    // 1 s steps: the boiling check's closed form counts them.
    let settings = Settings {
        surface_h: 0.0,
        standing,
        step: 1.0,
        record_every: 1.0,
        ..Settings::default()
    };
    simulate(&load, &maps, &Schedule::blocks(&[seconds]), &settings).unwrap()
}

fn water() -> Material {
    let w = catalogue::find("water").unwrap();
    Material::food(&w.composition()).unwrap()
}

/// §5.2 item 4: 1000 W into 1 kg of water for 60 s gives ΔT = 60 000 J / (1 kg · 4180 J/(kg·K)) =
/// 14.354 K; our water has the Choi–Okos cp (4.1766 at 20 °C), 0.08 % below 4.18.
#[test]
fn kilowatt_into_a_kilogram_of_water() {
    // Power spread evenly through the 10 cm cube (a stirred water load, as the IEC 60705 method
    // assumes): with Lambert's law the top layer would boil and take energy away as vapour.
    let mat = water().with_penetration_depth(f64::INFINITY).unwrap();
    let side = (1.0 / mat.density).cbrt();
    let rate = 1000.0 / (1.0 * mat.reference_cp * 1000.0);
    let course = single_cell(mat, side, 20.0, rate, 60.0, 0.0);
    // The column's mean: power is deposited by depth, but none of it is lost.
    let rise = course.mean_after_standing[0] - 20.0;
    assert!((rise - 14.354).abs() < 0.02, "{rise}");
}

/// §5.2 item 9: 1 kg of ice at 0 °C absorbs 333.6 kJ (ASHRAE's L0) with no temperature change.
#[test]
fn melting_ice_takes_the_latent_heat_at_constant_temperature() {
    let mat = water();
    let solid = mat.enthalpy(-1e-9);
    let liquid = mat.enthalpy(0.0);
    assert!((liquid - solid - 333.6).abs() < 0.01, "{}", liquid - solid);
    for f in [0.01, 0.5, 0.99] {
        assert_eq!(mat.temperature(solid + f * 333.6), 0.0);
    }
    assert!(mat.temperature(liquid + 1.0) > 0.2);
}

/// §5.2 item 3: with no source and insulated edges, total energy Σ m·H(T) is conserved.
#[test]
fn energy_is_conserved_without_sources() {
    let beef = catalogue::find("ground-beef").unwrap();
    let carrot = catalogue::find("carrots").unwrap();
    let items = [
        Material::food(&beef.composition()).unwrap(),
        Material::food(&carrot.composition()).unwrap(),
    ];
    let (w, h, dx) = (6, 4, 0.01);
    let cells: Vec<Option<CellFill>> = (0..w * h)
        .map(|i| {
            if i % 7 == 3 {
                None
            } else {
                Some(CellFill {
                    item: (i % w < 3) as usize,
                    thickness: 0.01 + 0.002 * (i % 3) as f64,
                    covered: true,
                })
            }
        })
        .collect();
    let start: Vec<f64> = (0..w * h).map(|i| -15.0 + 7.0 * (i % 11) as f64).collect();
    let load = Load {
        tray: Tray {
            width: w,
            height: h,
            cell_size: dx,
        },
        items: &items,
        cells: &cells,
        start: &start,
    };
    let maps = Maps {
        configs: 1,
        rates: &vec![0.0; w * h],
    };
    let settings = Settings {
        surface_h: 0.0,
        standing: 600.0,
        ..Settings::default()
    };
    let course = simulate(&load, &maps, &Schedule::default(), &settings).unwrap();
    let energy = |temps: &[f64]| -> f64 {
        (0..w * h)
            .filter_map(|i| cells[i].map(|c| (i, c)))
            .map(|(i, c)| {
                let mat = &items[c.item];
                mat.density * dx * dx * c.thickness * mat.enthalpy(temps[i])
            })
            .sum()
    };
    let before = energy(&start);
    let after: f64 = course
        .energy_after_standing
        .iter()
        .filter(|e| e.is_finite())
        .sum::<f64>();
    assert!((after - before).abs() < 1e-9 * before, "{before} → {after}");
    // And it did spread: the range shrank.
    let spread = |t: &[f64]| {
        let v: Vec<f64> = t.iter().copied().filter(|x| x.is_finite()).collect();
        v.iter().copied().fold(f64::MIN, f64::max) - v.iter().copied().fold(f64::MAX, f64::min)
    };
    assert!(spread(&course.after_standing) < 0.8 * spread(&start));
}

/// Boiling cap: a water cell driven past 100 °C stays at 100 °C and loses water at
/// L_v = 2257 kJ/kg (steam tables 2256.4). Starting at 100 °C, every joule absorbed evaporates
/// water, and absorption follows the water left (this model's stated drying assumption), so each
/// 1 s step evaporates the fraction k = rate·cp/L_v of the water left: after N steps
/// m_w·(1 − (1 − k)^N) is gone — the energy balance with L_v, step by step.
#[test]
fn boiling_water_stays_at_100_and_loses_mass() {
    // Power spread evenly through the thickness, so every layer boils alike (the balance under
    // test is the boiling one, not the deposition profile).
    let mat = water().with_penetration_depth(f64::INFINITY).unwrap();
    let side: f64 = 0.05;
    let m = mat.density * side.powi(3);
    let rate = 2.0;
    let seconds = 120.0;
    let course = single_cell(mat.clone(), side, 100.0, rate, seconds, 0.0);
    let k = rate * mat.reference_cp / LATENT_VAPORISATION;
    let expected = m * mat.water * (1.0 - (1.0 - k).powf(seconds));
    assert!(expected > 0.05 * m, "{expected}");
    assert!(
        (course.end_of_heating[0] - 100.0).abs() < 1e-9,
        "{}",
        course.end_of_heating[0]
    );
    assert!(
        (course.moisture_loss[0] - expected).abs() < 1e-9 * expected,
        "{} vs {expected}",
        course.moisture_loss[0]
    );
    assert!(course.peak[0] <= 100.0 + 1e-9);
    assert_eq!(course.item_moisture_loss[0], course.moisture_loss[0]);
    assert!(!course.boiled_dry[0]);
}

/// Regression (hostile-input run, case 1): pure water driven hard enough to evaporate in one step
/// used to reach mass 0 and temperature 0/0 = NaN. It now boils dry: flagged, held at 100 °C, finite.
#[test]
fn water_that_boils_away_is_flagged_not_nan() {
    let course = single_cell(water(), 0.002, 20.0, 1000.0, 10.0, 30.0);
    assert!(course.boiled_dry[0]);
    assert_eq!(course.after_standing[0], 100.0);
    for frame in &course.frames {
        assert!(frame[0].is_finite());
    }
    for curve in &course.items {
        assert!(
            curve
                .min
                .iter()
                .chain(&curve.mean)
                .chain(&curve.max)
                .all(|v| v.is_finite())
        );
    }
}

/// Regression (hostile-input run, case 2): dried food used to keep absorbing at the moist rate and
/// reached thousands of °C. Its dry residue now absorbs at the residue's own loss factor
/// (ε″ 0.2 against the thawed 16.5 for meat: about 1 %), so a 1 mm slice heated at 20 K/s for
/// 10 minutes dries and then warms only slowly; it still passes the model's limit, which the
/// time course reports through its peak for callers to warn about.
#[test]
fn dried_food_absorbs_like_dry_matter() {
    let f = catalogue::find("chicken-breast").unwrap();
    let mat = Material::food(&f.composition()).unwrap();
    let course = single_cell(mat.clone(), 0.001, 5.0, 20.0, 600.0, 0.0);
    let peak = course.peak[0];
    assert!(peak.is_finite());
    // Moist absorption on the dry matter would add about 20 K/s × cp_moist/cp_dry for every
    // second left after drying: well over a thousand kelvin.
    assert!(peak < 400.0, "{peak}");
    assert!(!course.boiled_dry[0]);
    let evaporated = course.moisture_loss[0];
    let water = mat.water * mat.density * 0.001f64.powi(3);
    assert!(evaporated > 0.99 * water, "{evaporated} of {water}");
}

/// Frozen food under the same map keeps less energy: it lets more power in (it reflects less)
/// but holds less of it (a penetration depth of centimetres), as its column absorption says —
/// not the bare loss-factor ratio, which would have it absorb a few per cent.
#[test]
fn frozen_food_keeps_what_its_column_absorbs() {
    let f = catalogue::find("chicken-breast").unwrap();
    let mat = Material::food(&f.composition()).unwrap();
    let cold = single_cell(mat.clone(), 0.02, 4.0, 0.2, 30.0, 0.0);
    let frozen = single_cell(mat.clone(), 0.02, -18.0, 0.2, 30.0, 0.0);
    let m = mat.density * 0.02f64.powi(3);
    let gain = |c: &TimeCourse, t0: f64| c.energy_after_standing[0] - mat.enthalpy(t0) * m;
    let ratio = gain(&frozen, -18.0) / gain(&cold, 4.0);
    let want = mat.column_absorption(-18.0, 0.02) / mat.column_absorption(4.0, 0.02);
    assert!(ratio < 0.9 && ratio > 0.2, "{ratio}");
    assert!((ratio - want).abs() < 0.1 * want, "{ratio} vs {want}");
    // Its temperature rises less: the same energy meets ice still melting.
    assert!(frozen.mean_after_standing[0] + 18.0 < cold.mean_after_standing[0] - 4.0);
}

#[test]
fn rounds_spread_heat_more_evenly_than_blocks() {
    // Two configurations heating opposite halves of a water-filled strip.
    let mat = water();
    let (w, dx) = (8, 0.01);
    let items = [mat];
    let cells = vec![
        Some(CellFill {
            item: 0,
            thickness: 0.01,
            covered: true,
        });
        w
    ];
    let start = vec![5.0; w];
    let load = Load {
        tray: Tray {
            width: w,
            height: 1,
            cell_size: dx,
        },
        items: &items,
        cells: &cells,
        start: &start,
    };
    let mut rates = vec![0.0; 2 * w];
    for i in 0..w {
        rates[if i < w / 2 { i } else { w + i }] = 0.5;
    }
    let maps = Maps {
        configs: 2,
        rates: &rates,
    };
    let settings = Settings {
        standing: 0.0,
        ..Settings::default()
    };
    let blocks = simulate(&load, &maps, &Schedule::blocks(&[60.0, 60.0]), &settings).unwrap();
    let rounds = simulate(&load, &maps, &Schedule::rounds(&[60.0, 60.0], 6), &settings).unwrap();
    let peak = |c: &TimeCourse| c.peak.iter().copied().fold(f64::MIN, f64::max);
    assert!(
        peak(&rounds) < peak(&blocks),
        "{} vs {}",
        peak(&rounds),
        peak(&blocks)
    );
    assert_eq!(Schedule::rounds(&[60.0, 0.0, 30.0], 3).steps.len(), 6);
    assert!((Schedule::rounds(&[60.0, 0.0, 30.0], 3).total() - 90.0).abs() < 1e-12);
}

#[test]
fn bad_inputs_are_typed_errors() {
    use traycast_thermal::ThermalError;
    let items = [water()];
    let cells = [Some(CellFill {
        item: 0,
        thickness: 0.0,
        covered: true,
    })];
    let load = Load {
        tray: Tray {
            width: 1,
            height: 1,
            cell_size: 0.01,
        },
        items: &items,
        cells: &cells,
        start: &[5.0],
    };
    let maps = Maps {
        configs: 1,
        rates: &[0.1],
    };
    let s = Settings::default();
    assert!(matches!(
        simulate(&load, &maps, &Schedule::blocks(&[1.0]), &s),
        Err(ThermalError::Cell { cell: 0, .. })
    ));
    let cells = [Some(CellFill {
        item: 0,
        thickness: 0.01,
        covered: true,
    })];
    let load = Load {
        cells: &cells,
        ..load
    };
    let bad = Schedule {
        steps: vec![Step {
            config: 3,
            seconds: 1.0,
        }],
    };
    assert!(matches!(
        simulate(&load, &maps, &bad, &s),
        Err(ThermalError::UnknownConfiguration {
            step: 0,
            config: 3,
            ..
        })
    ));
    let nan = Maps {
        configs: 1,
        rates: &[f64::NAN],
    };
    assert!(simulate(&load, &nan, &Schedule::blocks(&[1.0]), &s).is_err());
    let load2 = Load {
        start: &[f64::NAN],
        ..load.clone()
    };
    assert!(simulate(&load2, &maps, &Schedule::blocks(&[1.0]), &s).is_err());
}
