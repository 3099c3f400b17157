//! Canvas drawing: the tray editor, heatmaps with numeric legends, dwell bars, time-course chart.
//! Only pixels here; every number comes from the plan crate's evaluation.

use crate::units::Unit;
use traycast_plan::evaluate::Evaluation;
use traycast_plan::model::Plan;
use wasm_bindgen::JsCast;
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

/// Pixels per cell in the editor and heatmaps (kept readable on a projector).
pub fn cell_px(plan: &Plan, target_width: f64) -> f64 {
    (target_width / plan.tray.width as f64)
        .clamp(6.0, 28.0)
        .floor()
}

fn ctx(canvas: &HtmlCanvasElement) -> Option<CanvasRenderingContext2d> {
    canvas
        .get_context("2d")
        .ok()??
        .dyn_into::<CanvasRenderingContext2d>()
        .ok()
}

/// Food item colours (a palette of our own, light enough to show zone marks on top).
pub const FOOD_COLOURS: [&str; 8] = [
    "#e9c46a", "#a8dadc", "#f4a3a8", "#b5e48c", "#cdb4db", "#ffd6a5", "#9bd0f5", "#d4c7b0",
];
/// Zone mark colours.
pub const ZONE_COLOURS: [&str; 8] = [
    "#1d3557", "#7b2d26", "#2a6f4e", "#5a189a", "#8a5a00", "#0b6e99", "#6d597a", "#3d405b",
];

fn css(c: colorous::Color) -> String {
    format!("rgb({},{},{})", c.r, c.g, c.b)
}

/// The editor: food colours, zone marks, grid lines.
pub fn editor(canvas: &HtmlCanvasElement, plan: &Plan, px: f64) {
    let Some(g) = ctx(canvas) else { return };
    let (w, h) = (plan.tray.width, plan.tray.height);
    canvas.set_width((w as f64 * px) as u32);
    canvas.set_height((h as f64 * px) as u32);
    g.set_fill_style_str("#fbfaf7");
    g.fill_rect(0.0, 0.0, w as f64 * px, h as f64 * px);
    for i in 0..w * h {
        let (x, y) = ((i % w) as f64 * px, (i / w) as f64 * px);
        if let Some(k) = plan.item_at(i) {
            g.set_fill_style_str(FOOD_COLOURS[k % FOOD_COLOURS.len()]);
            g.fill_rect(x, y, px, px);
        }
        if let Some(z) = plan.zone_at(i) {
            g.set_fill_style_str(ZONE_COLOURS[z % ZONE_COLOURS.len()]);
            let s = (px * 0.32).max(2.0);
            g.fill_rect(x + (px - s) / 2.0, y + (px - s) / 2.0, s, s);
        }
    }
    g.set_stroke_style_str("rgba(0,0,0,0.08)");
    for c in 0..=w {
        g.begin_path();
        g.move_to(c as f64 * px, 0.0);
        g.line_to(c as f64 * px, h as f64 * px);
        g.stroke();
    }
    for r in 0..=h {
        g.begin_path();
        g.move_to(0.0, r as f64 * px);
        g.line_to(w as f64 * px, r as f64 * px);
        g.stroke();
    }
}

/// The keyboard's cell cursor: a two-tone outline that shows on every food colour.
pub fn cursor(canvas: &HtmlCanvasElement, plan: &Plan, px: f64, cell: usize) {
    let Some(g) = ctx(canvas) else { return };
    let w = plan.tray.width;
    let (x, y) = ((cell % w) as f64 * px, (cell / w) as f64 * px);
    g.set_line_width(3.0);
    g.set_stroke_style_str("#fbfaf7");
    g.stroke_rect(x + 1.5, y + 1.5, px - 3.0, px - 3.0);
    g.set_line_width(1.5);
    g.set_stroke_style_str("#1f2933");
    g.stroke_rect(x + 1.5, y + 1.5, px - 3.0, px - 3.0);
    g.set_line_width(1.0);
}

/// The rectangle a drag would paint, from cell `a` to cell `b`: a dashed two-tone outline.
pub fn selection(canvas: &HtmlCanvasElement, plan: &Plan, px: f64, a: usize, b: usize) {
    let Some(g) = ctx(canvas) else { return };
    let w = plan.tray.width;
    let (c0, c1) = ((a % w).min(b % w), (a % w).max(b % w));
    let (r0, r1) = ((a / w).min(b / w), (a / w).max(b / w));
    let (x, y) = (c0 as f64 * px, r0 as f64 * px);
    let (wd, ht) = ((c1 - c0 + 1) as f64 * px, (r1 - r0 + 1) as f64 * px);
    g.set_line_width(3.0);
    g.set_stroke_style_str("#fbfaf7");
    g.stroke_rect(x + 1.5, y + 1.5, wd - 3.0, ht - 3.0);
    let dash = js_sys::Array::of2(&5.0.into(), &4.0.into());
    let _ = g.set_line_dash(&dash);
    g.set_line_width(1.5);
    g.set_stroke_style_str("#1f2933");
    g.stroke_rect(x + 1.5, y + 1.5, wd - 3.0, ht - 3.0);
    let _ = g.set_line_dash(&js_sys::Array::new());
    g.set_line_width(1.0);
}

/// A heatmap of per-cell values with a legend strip below it: `diverging` centres the scale on 0.
pub fn heatmap(
    canvas: &HtmlCanvasElement,
    plan: &Plan,
    values: &[f64],
    px: f64,
    diverging: bool,
    unit: Unit,
    label: &str,
) {
    let Some(g) = ctx(canvas) else { return };
    let (w, h) = (plan.tray.width, plan.tray.height);
    let legend = 34.0;
    let width = (w as f64 * px).max(220.0);
    canvas.set_width(width as u32);
    canvas.set_height((h as f64 * px + legend) as u32);
    g.set_fill_style_str("#ffffff");
    g.fill_rect(0.0, 0.0, width, h as f64 * px + legend);
    let finite: Vec<f64> = values.iter().copied().filter(|v| v.is_finite()).collect();
    let (lo, hi) = if diverging {
        let m = finite.iter().fold(1.0f64, |m, v| m.max(v.abs()));
        (-m, m)
    } else {
        let lo = finite.iter().copied().fold(f64::INFINITY, f64::min);
        let hi = finite.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        if lo.is_finite() {
            (lo, hi.max(lo + 1.0))
        } else {
            (0.0, 1.0)
        }
    };
    let colour = |v: f64| {
        let t = ((v - lo) / (hi - lo)).clamp(0.0, 1.0);
        if diverging {
            // Blue below the band, red above, white inside (ColorBrewer RdBu, colour-blind safe).
            css(colorous::RED_BLUE.eval_continuous(1.0 - t))
        } else {
            css(colorous::CIVIDIS.eval_continuous(t))
        }
    };
    for i in 0..w * h {
        let v = values[i];
        let (x, y) = ((i % w) as f64 * px, (i / w) as f64 * px);
        if v.is_finite() {
            g.set_fill_style_str(&colour(v));
        } else {
            g.set_fill_style_str("#eeeeee");
        }
        g.fill_rect(x, y, px, px);
    }
    // Legend: a strip with its end and middle values.
    let y0 = h as f64 * px + 6.0;
    let steps = 60;
    for s in 0..steps {
        let v = lo + (hi - lo) * s as f64 / (steps - 1) as f64;
        g.set_fill_style_str(&colour(v));
        g.fill_rect(
            s as f64 * width / steps as f64,
            y0,
            width / steps as f64 + 1.0,
            10.0,
        );
    }
    g.set_fill_style_str("#333");
    g.set_font("11px system-ui, sans-serif");
    let fmt = |v: f64| {
        if diverging {
            format!("{:+.1}", unit.diff(v))
        } else {
            format!("{:.0}", unit.temp(v))
        }
    };
    let _ = g.fill_text(&fmt(lo), 0.0, y0 + 24.0);
    let mid = fmt(0.5 * (lo + hi));
    let _ = g.fill_text(&mid, width / 2.0 - 10.0, y0 + 24.0);
    let end = format!(
        "{} {}",
        fmt(hi),
        if diverging {
            format!("{} off band", unit_deg(unit))
        } else {
            unit.symbol().to_string()
        }
    );
    let _ = g.fill_text(
        &end,
        (width - 8.0 * end.len() as f64).max(width / 2.0 + 30.0),
        y0 + 24.0,
    );
    canvas.set_title(label);
}

fn unit_deg(unit: Unit) -> &'static str {
    match unit {
        Unit::Celsius => "K",
        Unit::Fahrenheit => "°F",
    }
}

/// Dwell bars: seconds per configuration, labelled every few configurations.
pub fn dwell_bars(canvas: &HtmlCanvasElement, dwell: &[f64]) {
    let Some(g) = ctx(canvas) else { return };
    let (width, height) = (420.0, 150.0);
    canvas.set_width(width as u32);
    canvas.set_height(height as u32);
    g.set_fill_style_str("#ffffff");
    g.fill_rect(0.0, 0.0, width, height);
    let n = dwell.len().max(1);
    let max = dwell.iter().copied().fold(1.0f64, f64::max);
    let bw = (width - 40.0) / n as f64;
    g.set_fill_style_str("#2f5d8a");
    for (j, d) in dwell.iter().enumerate() {
        let bh = (height - 30.0) * d / max;
        g.fill_rect(
            34.0 + j as f64 * bw,
            height - 18.0 - bh,
            (bw - 1.0).max(1.0),
            bh,
        );
    }
    g.set_fill_style_str("#333");
    g.set_font("11px system-ui, sans-serif");
    let _ = g.fill_text(&format!("{max:.0} s"), 0.0, 14.0);
    let _ = g.fill_text("0", 20.0, height - 18.0);
    let every = (n / 8).max(1);
    for j in (0..n).step_by(every) {
        let _ = g.fill_text(&j.to_string(), 34.0 + j as f64 * bw, height - 4.0);
    }
}

/// Time course per food item: the min–max band over time, and the item's target band.
pub fn time_course(canvas: &HtmlCanvasElement, plan: &Plan, eval: &Evaluation, unit: Unit) {
    let Some(g) = ctx(canvas) else { return };
    let (width, height) = (420.0, 190.0);
    canvas.set_width(width as u32);
    canvas.set_height(height as u32);
    g.set_fill_style_str("#ffffff");
    g.fill_rect(0.0, 0.0, width, height);
    let times = &eval.course.times;
    let t_max = times.last().copied().unwrap_or(1.0).max(1.0);
    let (lo, hi) = (-20.0f64, 105.0f64);
    let x = |t: f64| 36.0 + (width - 44.0) * t / t_max;
    let y = |c: f64| 8.0 + (height - 30.0) * (1.0 - (c - lo) / (hi - lo));
    g.set_stroke_style_str("#ddd");
    g.set_fill_style_str("#555");
    g.set_font("10px system-ui, sans-serif");
    for c in [0.0, 25.0, 50.0, 75.0, 100.0] {
        g.begin_path();
        g.move_to(36.0, y(c));
        g.line_to(width - 8.0, y(c));
        g.stroke();
        let _ = g.fill_text(&format!("{:.0}", unit.temp(c)), 2.0, y(c) + 3.0);
    }
    let heating = eval.course.heating_seconds;
    g.set_stroke_style_str("#999");
    g.begin_path();
    g.move_to(x(heating), 8.0);
    g.line_to(x(heating), height - 22.0);
    g.stroke();
    let _ = g.fill_text("power off", x(heating) + 3.0, 18.0);
    let _ = g.fill_text(&format!("{t_max:.0} s"), width - 40.0, height - 6.0);
    // Target bands of the zones, dashed, in the zone colours.
    g.set_line_dash(&js_sys::Array::of2(&4.0.into(), &4.0.into()))
        .ok();
    for (z, zone) in plan.zones.iter().enumerate() {
        g.set_stroke_style_str(ZONE_COLOURS[z % ZONE_COLOURS.len()]);
        for v in [zone.min_c, zone.max_c] {
            if (lo..=hi).contains(&v) {
                g.begin_path();
                g.move_to(36.0, y(v));
                g.line_to(width - 8.0, y(v));
                g.stroke();
            }
        }
    }
    g.set_line_dash(&js_sys::Array::new()).ok();
    for (k, curve) in eval.course.items.iter().enumerate() {
        let colour = FOOD_COLOURS[k % FOOD_COLOURS.len()];
        g.set_fill_style_str(colour);
        g.set_global_alpha(0.55);
        g.begin_path();
        for (t, v) in times.iter().zip(&curve.max) {
            g.line_to(x(*t), y(*v));
        }
        for (t, v) in times.iter().zip(&curve.min).rev() {
            g.line_to(x(*t), y(*v));
        }
        g.close_path();
        g.fill();
        g.set_global_alpha(1.0);
        g.set_stroke_style_str("#333");
        g.begin_path();
        for (t, v) in times.iter().zip(&curve.min) {
            g.line_to(x(*t), y(*v));
        }
        g.stroke();
    }
}

/// A PNG data URL of `canvas` with the usual caution printed under it (every export carries it).
pub fn with_caution(canvas: &HtmlCanvasElement) -> Option<String> {
    let doc = web_sys::window()?.document()?;
    let out: HtmlCanvasElement = doc.create_element("canvas").ok()?.dyn_into().ok()?;
    let (w, h) = (canvas.width().max(420), canvas.height());
    out.set_width(w);
    out.set_height(h + 36);
    let g = ctx(&out)?;
    g.set_fill_style_str("#ffffff");
    g.fill_rect(0.0, 0.0, w as f64, (h + 36) as f64);
    g.draw_image_with_html_canvas_element(canvas, 0.0, 0.0)
        .ok()?;
    g.set_fill_style_str("#7a4b00");
    g.set_font("10px system-ui, sans-serif");
    let _ = g.fill_text(
        "Illustrative prediction, not a measurement. Check the coldest part with a calibrated",
        4.0,
        h as f64 + 14.0,
    );
    let _ = g.fill_text(
        "thermometer, let food stand covered, and follow your local food code.",
        4.0,
        h as f64 + 28.0,
    );
    out.to_data_url().ok()
}
