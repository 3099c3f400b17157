//! Brush strokes on the tray: the editing logic, kept apart from the DOM so it can be tested.

use traycast_plan::model::Plan;

/// What a stroke paints.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Tool {
    /// Paint food item k.
    Food(usize),
    /// Paint target zone k (only on cells that hold food).
    Zone(usize),
    /// Clear food (and its target).
    EraseFood,
    /// Clear the target only.
    EraseZone,
}

/// Paints `tool` on a square brush (or a rectangle from `a` to `b`) and returns whether anything changed.
pub fn paint(plan: &mut Plan, tool: Tool, a: usize, b: usize, brush: usize) -> bool {
    let w = plan.tray.width as i64;
    let h = plan.tray.height as i64;
    let (ar, ac) = (a as i64 / w, a as i64 % w);
    let (br, bc) = (b as i64 / w, b as i64 % w);
    let r = (brush as i64 - 1) / 2;
    let (r0, r1, c0, c1) = if a == b {
        (
            ar - r,
            ar + r + (brush as i64 - 1) % 2,
            ac - r,
            ac + r + (brush as i64 - 1) % 2,
        )
    } else {
        (ar.min(br), ar.max(br), ac.min(bc), ac.max(bc))
    };
    let mut changed = false;
    for row in r0.max(0)..=r1.min(h - 1) {
        for col in c0.max(0)..=c1.min(w - 1) {
            let i = (row * w + col) as usize;
            let (food, zone) = (plan.food[i], plan.zone[i]);
            match tool {
                Tool::Food(k) => plan.food[i] = k as u8 + 1,
                Tool::Zone(k) => {
                    if plan.food[i] > 0 {
                        plan.zone[i] = k as u8 + 1;
                    }
                }
                Tool::EraseFood => {
                    plan.food[i] = 0;
                    plan.zone[i] = 0;
                }
                Tool::EraseZone => plan.zone[i] = 0,
            }
            changed |= food != plan.food[i] || zone != plan.zone[i];
        }
    }
    changed
}

/// The cell at `at` (CSS pixels inside the tray canvas's content box), for a canvas drawn at
/// `drawn` pixels (cells `px` drawing pixels wide) and shown at `shown` CSS pixels; None outside
/// the tray or for a canvas not shown.
pub fn cell_at_point(
    plan: &Plan,
    px: f64,
    at: (f64, f64),
    shown: (f64, f64),
    drawn: (f64, f64),
) -> Option<usize> {
    if shown.0 <= 0.0 || shown.1 <= 0.0 || px <= 0.0 {
        return None;
    }
    let x = at.0 * drawn.0 / shown.0 / px;
    let y = at.1 * drawn.1 / shown.1 / px;
    if !(x >= 0.0 && y >= 0.0) {
        return None;
    }
    let (c, r) = (x as usize, y as usize);
    (c < plan.tray.width && r < plan.tray.height).then(|| r * plan.tray.width + c)
}

#[cfg(all(test, target_arch = "wasm32"))]
mod tests {
    //! Run in headless Chromium by `cargo xtask test` (wasm-bindgen-test).
    use super::*;
    use crate::units::Unit;
    use traycast_plan::demos;
    use wasm_bindgen_test::*;

    wasm_bindgen_test_configure!(run_in_browser);

    #[wasm_bindgen_test]
    fn brush_paints_a_square_clipped_to_the_tray() {
        let mut p = Plan::blank(6, 4, 10.0);
        p.items.push(traycast_plan::model::FoodItem {
            name: "a".into(),
            food: "rice".into(),
            thickness_mm: 10.0,
            start_c: 4.0,
            covered: false,
        });
        assert!(paint(&mut p, Tool::Food(0), 0, 0, 3));
        // A 3-wide brush at the corner covers the 2 × 2 cells inside the tray.
        assert_eq!(p.food.iter().filter(|&&f| f == 1).count(), 4);
        assert!(
            !paint(&mut p, Tool::Food(0), 0, 0, 3),
            "repainting changes nothing"
        );
    }

    #[wasm_bindgen_test]
    fn targets_go_only_on_food_and_erasing_food_clears_them() {
        let mut p = Plan::blank(4, 4, 10.0);
        p.items.push(traycast_plan::model::FoodItem {
            name: "a".into(),
            food: "rice".into(),
            thickness_mm: 10.0,
            start_c: 4.0,
            covered: false,
        });
        p.zones.push(traycast_plan::model::Zone {
            name: "z".into(),
            min_c: 60.0,
            max_c: 70.0,
            weight: 1.0,
            cap_c: None,
        });
        paint(&mut p, Tool::Zone(0), 5, 5, 1);
        assert_eq!(p.zone[5], 0, "no target on an empty cell");
        paint(&mut p, Tool::Food(0), 0, 15, 1); // rectangle over the whole tray
        paint(&mut p, Tool::Zone(0), 5, 10, 1);
        assert_eq!(p.zone.iter().filter(|&&z| z == 1).count(), 4);
        paint(&mut p, Tool::EraseFood, 5, 5, 1);
        assert_eq!((p.food[5], p.zone[5]), (0, 0));
        assert!(p.validate().is_ok());
    }

    #[wasm_bindgen_test]
    fn fahrenheit_is_only_a_display_conversion() {
        // F = C·9/5 + 32 (common practice); round trip through the input path.
        assert_eq!(Unit::Fahrenheit.temp(100.0), 212.0);
        assert_eq!(Unit::Fahrenheit.temp(-40.0), -40.0);
        assert!((Unit::Fahrenheit.to_celsius(165.0) - 73.888_888).abs() < 1e-5);
        assert_eq!(Unit::Fahrenheit.diff(10.0), 18.0);
    }

    #[wasm_bindgen_test]
    fn autosave_and_fragment_round_trip_in_the_browser() {
        let plan = demos::demo("side-by-side").unwrap();
        crate::storage::save(&plan);
        assert_eq!(crate::storage::saved(), Some(plan.clone()));
        crate::storage::set_fragment(&plan);
        let start = crate::storage::startup();
        assert_eq!(start.plan, plan);
        assert!(start.message.is_none());
        // A damaged fragment leaves the autosaved plan in charge, with a message.
        let w = web_sys::window().unwrap();
        w.history()
            .unwrap()
            .replace_state_with_url(&wasm_bindgen::JsValue::NULL, "", Some("#tc1.AAAA"))
            .unwrap();
        let start = crate::storage::startup();
        assert_eq!(start.plan, plan);
        assert!(start.message.unwrap().contains("could not be opened"));
        w.history()
            .unwrap()
            .replace_state_with_url(&wasm_bindgen::JsValue::NULL, "", Some("#"))
            .unwrap();
    }

    /// A canvas drawn at 560 px but shown at 280 CSS px (a narrow window): the pointer halfway
    /// across lands in the middle column, not a quarter of the way; outside the tray is nothing.
    #[wasm_bindgen_test]
    fn pointing_scales_from_the_shown_size_to_the_drawing() {
        let plan = Plan::blank(28, 18, 10.0);
        let px = 20.0;
        let drawn = (560.0, 360.0);
        let shown = (280.0, 180.0);
        assert_eq!(
            cell_at_point(&plan, px, (140.5, 0.5), shown, drawn),
            Some(14)
        );
        assert_eq!(
            cell_at_point(&plan, px, (279.0, 179.0), shown, drawn),
            Some(17 * 28 + 27)
        );
        assert_eq!(cell_at_point(&plan, px, (-1.0, 5.0), shown, drawn), None);
        assert_eq!(cell_at_point(&plan, px, (281.0, 5.0), shown, drawn), None);
        assert_eq!(
            cell_at_point(&plan, px, (5.0, 5.0), (0.0, 0.0), drawn),
            None
        );
    }
}
