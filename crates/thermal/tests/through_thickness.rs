//! Through the thickness: layered conduction with Lambert's-law deposition against SciPy's
//! method-of-lines solution of the same PDE, the penetration depth against published values, the
//! coldest point of a thick piece, and convergence in the layer count.

use traycast_thermal::catalogue;
use traycast_thermal::dielectric::penetration_depth;
use traycast_thermal::material::Material;
use traycast_thermal::safety;
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::*;

/// One column of food, `thickness` m, alone on a one-cell tray, heated at `rate` K/s (its column
/// mean) for `heat` s and then standing as `settings` say; covered.
fn column(
    mat: &Material,
    thickness: f64,
    start: f64,
    rate: f64,
    heat: f64,
    settings: Settings,
) -> TimeCourse {
    column_of(mat, thickness, start, rate, heat, settings, true)
}

/// [`column`], covered or not.
fn column_of(
    mat: &Material,
    thickness: f64,
    start: f64,
    rate: f64,
    heat: f64,
    settings: Settings,
    covered: bool,
) -> TimeCourse {
    let items = [mat.clone()];
    let cells = [Some(CellFill {
        item: 0,
        thickness,
        covered,
    })];
    let load = Load {
        tray: Tray {
            width: 1,
            height: 1,
            cell_size: 0.02,
        },
        items: &items,
        cells: &cells,
        start: &[start],
    };
    let maps = Maps {
        configs: 1,
        rates: &[rate],
    };
    simulate(&load, &maps, &Schedule::blocks(&[heat]), &settings).unwrap()
}

fn num(v: &serde_json::Value, key: &str) -> f64 {
    v[key].as_f64().unwrap_or_else(|| panic!("{key}"))
}

fn numbers(v: &serde_json::Value, key: &str) -> Vec<f64> {
    v[key]
        .as_array()
        .unwrap_or_else(|| panic!("{key}"))
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

/// SciPy reference: tests/fixtures/thermal/slab_reference.json, written by make_slab.py beside it
/// (scipy.integrate.solve_ivp, BDF, on 400 finite volumes, averaged over our layers). With our
/// default layers (4 mm at most, the smallest penetration depth at most) the coldest point and the
/// mean agree within 0.5 K after heating and after standing. The surface layer is allowed 1.5 K:
/// one 4 mm node stands for the steepest part of the deposition profile (measured 1.2 K); the
/// safety judgement never uses it.
#[test]
fn layered_column_matches_scipy_method_of_lines() {
    let text = include_str!("../../../tests/fixtures/thermal/slab_reference.json");
    let doc: serde_json::Value = serde_json::from_str(text).unwrap();
    for case in doc["cases"].as_array().unwrap() {
        let name = case["name"].as_str().unwrap();
        let mat = Material::constant(num(case, "rho"), num(case, "cp") / 1000.0, num(case, "k"))
            .unwrap()
            .with_penetration_depth(num(case, "dp"))
            .unwrap();
        let settings = Settings {
            surface_h: num(case, "h"),
            air: num(case, "air"),
            standing: num(case, "stand"),
            bottom_entry: num(case, "bottom"),
            ..Settings::default()
        };
        let h = num(case, "thickness");
        let course = column(
            &mat,
            h,
            num(case, "start"),
            num(case, "rate"),
            num(case, "heat"),
            settings,
        );
        let layers = case["layers"].as_u64().unwrap() as usize;
        assert_eq!(course.layers[0], layers, "{name}: layer count");
        let want = numbers(case, "after_standing_layers");
        let coldest = want.iter().copied().fold(f64::INFINITY, f64::min);
        assert!(
            (course.after_standing[0] - coldest).abs() < 0.5,
            "{name}: coldest {} vs SciPy {coldest}",
            course.after_standing[0]
        );
        assert!(
            (course.surface_after_standing[0] - want[0]).abs() < 1.5,
            "{name}: surface {} vs SciPy {}",
            course.surface_after_standing[0],
            want[0]
        );
        let mean = num(case, "after_standing_mean");
        assert!(
            (course.mean_after_standing[0] - mean).abs() < 0.5,
            "{name}: mean {} vs SciPy {mean}",
            course.mean_after_standing[0]
        );
        let coldest_hot = numbers(case, "end_of_heating_layers")
            .into_iter()
            .fold(f64::INFINITY, f64::min);
        assert!(
            (course.end_of_heating[0] - coldest_hot).abs() < 0.5,
            "{name}: coldest at power-off {} vs SciPy {coldest_hot}",
            course.end_of_heating[0]
        );
    }
}

/// Power penetration depth at 2.45 GHz from ε′, ε″ against the values in
/// shared/reference/physics.md §3.2–3.3: water at 20 °C (ELL07 ε′ 78.58, ε″ 10.80) 1.60 cm, at
/// 60 °C (66.58 / 3.82) 4.16 cm; potato (Datta & Ramaswamy 2001, 57 / 17) 0.87 cm; solid milk fat
/// (2.6 / 0.2) 15.7 cm. The reference rounds to 0.01 cm (0.1 cm for fat).
#[test]
fn penetration_depths_match_published_values() {
    for (eps, loss, cm, tol) in [
        (78.58, 10.80, 1.60, 0.006),
        (66.58, 3.82, 4.16, 0.006),
        (57.0, 17.0, 0.87, 0.006),
        (2.6, 0.2, 15.7, 0.06),
    ] {
        let got = penetration_depth(eps, loss) * 100.0;
        assert!(
            (got - cm).abs() < tol,
            "ε′ {eps} ε″ {loss}: {got:.3} cm vs {cm}"
        );
    }
    assert!(penetration_depth(3.0, 0.0).is_infinite());
}

/// The case behind the depth model (physics.md §8.1, an independent 1-D estimate from memory):
/// a 50 mm chicken piece at 0.20 K/s column mean for 360 s from both faces, standing 120 s,
/// ends with its centre near 42–48 °C while its mean is near 75 °C. Here the loss factor also
/// rises with temperature (the ionic term), so the surface takes more and boils off some water,
/// and the centre ends colder still. The coldest point must show that, and the verdict must
/// fail, however warm the column average is.
#[test]
fn a_thick_chicken_breast_is_judged_at_its_cold_centre() {
    let food = catalogue::find("chicken-breast").unwrap();
    let mat = Material::food(&food.composition()).unwrap();
    let settings = Settings {
        bottom_entry: 0.5,
        ..Settings::default()
    };
    let course = column(&mat, 0.05, 5.0, 0.20, 360.0, settings);
    let (coldest, mean) = (course.after_standing[0], course.mean_after_standing[0]);
    assert!(coldest < 55.0, "coldest point {coldest}");
    assert!(
        mean > coldest + 20.0,
        "column mean {mean}, coldest {coldest}"
    );
    let depth = course.coldest_depth[0];
    assert!((0.015..0.035).contains(&depth), "coldest at {depth} m");
    // Its kill: Salmonella along the coldest layer's history falls far short of 7 log10 too.
    let curve = food.safety.kill_target().unwrap().curve;
    let kill = curve.log_reduction(&course.trace_times, &course.coldest_trace[0]);
    let handling = safety::Handling {
        stood_seconds: course.standing_seconds,
        covered: true,
        log_reduction: Some(kill),
    };
    let v = safety::verdict(food.safety, &[coldest], handling);
    assert!(!v.safe && !v.kill.unwrap().met(), "kill {kill}");
}

/// Halving every layer moves a thick piece's coldest point by less than 0.5 K.
#[test]
fn the_coldest_point_converges_in_the_layer_count() {
    let food = catalogue::find("chicken-breast").unwrap();
    let mat = Material::food(&food.composition()).unwrap();
    let run = |max_layer: f64| {
        let s = Settings {
            max_layer,
            bottom_entry: 0.5,
            ..Settings::default()
        };
        column(&mat, 0.05, 5.0, 0.20, 360.0, s)
    };
    let (coarse, fine) = (run(0.004), run(0.001));
    // The default is limited by the smallest penetration depth (hot chicken, about 5 mm).
    assert!(fine.layers[0] >= 2 * coarse.layers[0]);
    let gap = (coarse.after_standing[0] - fine.after_standing[0]).abs();
    assert!(
        gap < 0.5,
        "coarse {} fine {}",
        coarse.after_standing[0],
        fine.after_standing[0]
    );
}

/// With no losses the column keeps every joule the map delivers, however it is layered:
/// Σ m·ΔH = rate × column mass × cp × time (physics.md §5.2 item 4 in layered form).
#[test]
fn layers_conserve_the_column_energy() {
    let mat = Material::constant(1000.0, 4.0, 0.5)
        .unwrap()
        .with_penetration_depth(0.008)
        .unwrap();
    let settings = Settings {
        surface_h: 0.0,
        standing: 0.0,
        ..Settings::default()
    };
    let course = column(&mat, 0.04, 10.0, 0.25, 120.0, settings);
    // Constant cp: the mean rise is exactly rate × time.
    assert!((course.mean_after_standing[0] - (10.0 + 0.25 * 120.0)).abs() < 1e-9);
    assert!(course.surface_after_standing[0] > course.after_standing[0] + 5.0);
}

/// The default step (4 s, the configurations' power averaged within it) against 0.5 s steps: the
/// coldest point of a thick piece, and of a frozen one thawing, moves by less than 0.5 K.
#[test]
fn the_coldest_point_converges_in_the_time_step() {
    for (name, start) in [("chicken-breast", 5.0), ("chicken-breast", -18.0)] {
        let food = catalogue::find(name).unwrap();
        let mat = Material::food(&food.composition()).unwrap();
        let run = |step: f64| {
            let s = Settings {
                step,
                ..Settings::default()
            };
            column(&mat, 0.03, start, 0.30, 300.0, s)
        };
        let (coarse, fine) = (run(Settings::default().step), run(0.5));
        let gap = (coarse.after_standing[0] - fine.after_standing[0]).abs();
        assert!(
            gap < 0.5,
            "start {start}: coarse {} fine {}",
            coarse.after_standing[0],
            fine.after_standing[0]
        );
    }
}

/// Thawing time against Plank's equation (Plank 1913; as given in Singh & Heldman, *Introduction
/// to Food Engineering*, ch. 7): t = ρL/(T_a − T_f) · (P·d/h + R·d²/k), with P = 1/2, R = 1/8 for
/// an infinite slab of thickness d exposed on both faces. A 20 mm layer of ice on an insulated
/// tray, its top face in 20 °C air (h = 10 W/(m²·K)), is half of a 40 mm slab. Plank neglects the
/// sensible heat of the thawed layer, so it is known to underpredict; with a Stefan number of
/// cp·ΔT/L ≈ 0.25 the simulated time should lie from 0 to 30 % above it.
#[test]
fn a_slab_thaws_in_about_planks_time() {
    let water = catalogue::find("water").unwrap();
    let mat = Material::food(&water.composition()).unwrap();
    let thickness = 0.02;
    let (h, air) = (10.0, 20.0);
    let settings = Settings {
        surface_h: h,
        air,
        standing: 60_000.0,
        record_every: 60.0,
        ..Settings::default()
    };
    // No power: the slab thaws from the air alone.
    let course = column(&mat, thickness, -0.01, 0.0, 0.0, settings);
    let thawed_at = course
        .times
        .iter()
        .zip(&course.frames)
        .find(|(_, f)| f[0] > 0.01)
        .map(|(t, _)| *t)
        .expect("thaws within the run");
    // Plank, with the thawed water's conductivity at 10 °C (Choi–Okos 0.589 W/(m·K)) and ice's
    // density (917 kg/m³, physics.md §1.3(a)): the latent heat is what the frozen slab holds.
    let (rho, latent, k, d) = (917.0, 333.6e3, 0.589, 2.0 * thickness);
    let plank = rho * latent / air * (0.5 * d / h + d * d / (8.0 * k));
    let ratio = thawed_at / plank;
    assert!(
        (1.0..1.3).contains(&ratio),
        "thawed at {thawed_at} s, Plank {plank} s"
    );
}

/// A tray plate with a heat capacity shares the energy: after a long stand the column and the
/// plate settle at T₀ + E/(C_food + C_tray) (first law, lumped capacities), where an insulated
/// bottom keeps it all in the food. And the plate cools the bottom of a real piece.
#[test]
fn a_tray_plate_takes_its_share_of_the_heat() {
    let mat = Material::constant(1000.0, 4.0, 0.5)
        .unwrap()
        .with_penetration_depth(f64::INFINITY)
        .unwrap();
    let (thickness, side, rate, heat) = (0.02, 0.02, 0.25, 120.0);
    let plate = 8000.0; // J/(m²·K), about a 4 mm glass plate (2500 kg/m³ × 0.8 kJ/(kg·K))
    let settings = Settings {
        surface_h: 0.0,
        standing: 20_000.0,
        tray_capacity: plate,
        ..Settings::default()
    };
    let course = column(&mat, thickness, 10.0, rate, heat, settings);
    let c_food = 1000.0 * 4000.0 * side * side * thickness;
    let c_tray = plate * side * side;
    let energy = rate * heat * c_food;
    let want = 10.0 + energy / (c_food + c_tray);
    assert!(
        (course.mean_after_standing[0] - want).abs() < 0.01,
        "{} vs {want}",
        course.mean_after_standing[0]
    );

    let chicken = catalogue::find("chicken-breast").unwrap();
    let mat = Material::food(&chicken.composition()).unwrap();
    let run = |tray_capacity: f64| {
        let s = Settings {
            tray_capacity,
            ..Settings::default()
        };
        column(&mat, 0.03, 5.0, 0.25, 240.0, s).after_standing[0]
    };
    assert!(
        run(plate) < run(0.0) - 0.5,
        "{} vs {}",
        run(plate),
        run(0.0)
    );
}

/// Evaporation against psychrometry. Saturation pressure against the steam tables (IAPWS-IF97:
/// 2.339 kPa at 20 °C, 19.946 kPa at 60 °C; values recalled from memory). And an uncovered thin
/// layer of water left in still air at 25 °C and 50 % relative humidity cools to the wet-bulb
/// temperature, 17.9 °C on the psychrometric chart (ASHRAE Fundamentals; recalled from memory),
/// within 1 K; covered, it stays at 25 °C.
#[test]
fn an_uncovered_wet_surface_settles_at_the_wet_bulb_temperature() {
    use traycast_thermal::simulate::evaporation::saturation_pressure;
    for (t, kpa) in [(20.0, 2.339), (60.0, 19.946)] {
        let got = saturation_pressure(t) / 1000.0;
        assert!((got - kpa).abs() / kpa < 0.01, "{t} °C: {got} kPa");
    }
    let water = catalogue::find("water").unwrap();
    let mat = Material::food(&water.composition()).unwrap();
    let settings = Settings {
        air: 25.0,
        air_humidity: 0.5,
        standing: 4.0 * 3600.0,
        record_every: 600.0,
        ..Settings::default()
    };
    let run = |covered: bool| column_of(&mat, 0.004, 25.0, 0.0, 0.0, settings, covered);
    let open = run(false);
    let t = open.after_standing[0];
    assert!((t - 17.9).abs() < 1.0, "uncovered: {t} °C");
    assert!(open.moisture_loss[0] > 0.0);
    let covered = run(true);
    assert!((covered.after_standing[0] - 25.0).abs() < 1e-6);
    assert_eq!(covered.moisture_loss[0], 0.0);
}

/// Any layer can be read back by depth: the top is the surface, the coldest point is the coldest
/// layer, and depths outside the food are not a temperature.
#[test]
fn layers_can_be_read_at_any_depth() {
    let food = catalogue::find("chicken-breast").unwrap();
    let mat = Material::food(&food.composition()).unwrap();
    let course = column(&mat, 0.03, 5.0, 0.2, 200.0, Settings::default());
    let layers = &course.layers_after_standing[0];
    assert_eq!(layers.len(), course.layers[0]);
    assert_eq!(course.at_depth(0, 0.0), course.surface_after_standing[0]);
    let coldest = layers.iter().copied().fold(f64::INFINITY, f64::min);
    assert_eq!(coldest, course.after_standing[0]);
    assert_eq!(course.at_depth(0, course.coldest_depth[0]), coldest);
    assert_eq!(course.at_depth(0, 0.0299), *layers.last().unwrap());
    assert!(course.at_depth(0, 0.031).is_nan() && course.at_depth(0, -0.001).is_nan());
}
