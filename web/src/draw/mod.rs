//! Canvas drawing: the tray editor here, heatmaps with numeric legends (`heatmap.rs`), the dwell
//! bars and the time-course chart (`charts.rs`). Only pixels here; every number comes from the plan
//! crate's evaluation.

mod charts;
mod heatmap;

pub use charts::{dwell_bars, time_course};
pub use heatmap::{Scale, heatmap};

use traycast_plan::model::Plan;
use wasm_bindgen::JsCast;
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

/// Pixels per cell in the editor and heatmaps (kept readable on a projector).
pub fn cell_px(plan: &Plan, target_width: f64) -> f64 {
    (target_width / plan.tray.width as f64)
        .clamp(6.0, 28.0)
        .floor()
}

pub(crate) fn ctx(canvas: &HtmlCanvasElement) -> Option<CanvasRenderingContext2d> {
    canvas
        .get_context("2d")
        .ok()??
        .dyn_into::<CanvasRenderingContext2d>()
        .ok()
}

/// Food item colours: our own picks, light enough to show zone marks on top.
pub const FOOD_COLOURS: [&str; 8] = [
    "#e3c878", "#9fcfd6", "#eeb0a6", "#b9d98f", "#c9b8d9", "#f2cf9c", "#a9c8ea", "#d8cbb4",
];
/// Zone mark colours: our own dark picks.
pub const ZONE_COLOURS: [&str; 8] = [
    "#1f3a5c", "#7a3328", "#2e6b50", "#55247f", "#7f5a12", "#17688c", "#66556f", "#43465e",
];
/// Zone mark shapes, so zones are told apart without their colours; the glyphs name them in the
/// target list.
pub const ZONE_GLYPHS: [&str; 8] = ["■", "●", "▲", "◆", "✚", "✖", "▬", "○"];

/// True for the marks drawn as lines (the cross and the ring); the others are filled.
fn stroked(z: usize) -> bool {
    matches!(z % ZONE_GLYPHS.len(), 5 | 7)
}

/// Adds zone `z`'s mark to the current path: its shape, centred at (`cx`, `cy`), `s` pixels across.
fn zone_mark(g: &CanvasRenderingContext2d, z: usize, cx: f64, cy: f64, s: f64) {
    let r = s / 2.0;
    match z % ZONE_GLYPHS.len() {
        0 => g.rect(cx - r, cy - r, s, s),
        1 => {
            g.move_to(cx + r, cy);
            let _ = g.arc(cx, cy, r, 0.0, std::f64::consts::TAU);
        }
        2 => {
            g.move_to(cx, cy - r);
            g.line_to(cx + r, cy + r);
            g.line_to(cx - r, cy + r);
            g.close_path();
        }
        3 => {
            g.move_to(cx, cy - r);
            g.line_to(cx + r, cy);
            g.line_to(cx, cy + r);
            g.line_to(cx - r, cy);
            g.close_path();
        }
        4 => {
            g.rect(cx - r, cy - r / 3.0, s, s / 1.5);
            g.rect(cx - r / 3.0, cy - r, s / 1.5, s);
        }
        5 => {
            g.move_to(cx - r, cy - r);
            g.line_to(cx + r, cy + r);
            g.move_to(cx + r, cy - r);
            g.line_to(cx - r, cy + r);
        }
        6 => g.rect(cx - r, cy - r / 3.0, s, s / 1.5),
        _ => {
            g.move_to(cx + r * 0.8, cy);
            let _ = g.arc(cx, cy, r * 0.8, 0.0, std::f64::consts::TAU);
        }
    }
}

/// Device pixels per CSS pixel (1 to 3): canvases keep that many pixels per drawing unit, so
/// they stay crisp on dense screens.
pub fn pixel_ratio() -> f64 {
    web_sys::window()
        .map_or(1.0, |w| w.device_pixel_ratio())
        .clamp(1.0, 3.0)
}

/// Readies a canvas for a drawing `width` × `height` units (CSS pixels at full size): a backing
/// store of that many device pixels (changed only when it must be: changing it clears and
/// reallocates), a CSS width of `width` (CSS may shrink it, keeping the aspect), and a transform
/// so drawing code works in units.
pub(crate) fn prepare(
    canvas: &HtmlCanvasElement,
    width: f64,
    height: f64,
) -> Option<CanvasRenderingContext2d> {
    let ratio = pixel_ratio();
    let (w, h) = (
        (width * ratio).round() as u32,
        (height * ratio).round() as u32,
    );
    if canvas.width() != w || canvas.height() != h {
        canvas.set_width(w);
        canvas.set_height(h);
        let _ = canvas.style().set_property("width", &format!("{width}px"));
    }
    let g = ctx(canvas)?;
    let _ = g.set_transform(ratio, 0.0, 0.0, ratio, 0.0, 0.0);
    Some(g)
}

/// The editor: food colours, zone marks, grid lines; one path per colour.
pub fn editor(canvas: &HtmlCanvasElement, plan: &Plan, px: f64) {
    let (w, h) = (plan.tray.width, plan.tray.height);
    let (wd, ht) = (w as f64 * px, h as f64 * px);
    let Some(g) = prepare(canvas, wd, ht) else {
        return;
    };
    g.set_fill_style_str("#fbfaf7");
    g.fill_rect(0.0, 0.0, wd, ht);
    let at = |i: usize| ((i % w) as f64 * px, (i / w) as f64 * px);
    for k in 0..plan.items.len() {
        g.set_fill_style_str(FOOD_COLOURS[k % FOOD_COLOURS.len()]);
        g.begin_path();
        for i in (0..w * h).filter(|&i| plan.item_at(i) == Some(k)) {
            let (x, y) = at(i);
            g.rect(x, y, px, px);
        }
        g.fill();
    }
    let s = (px * 0.5).max(3.0);
    for z in 0..plan.zones.len() {
        let colour = ZONE_COLOURS[z % ZONE_COLOURS.len()];
        g.begin_path();
        for i in (0..w * h).filter(|&i| plan.zone_at(i) == Some(z)) {
            let (x, y) = at(i);
            zone_mark(&g, z, x + px / 2.0, y + px / 2.0, s);
        }
        if stroked(z) {
            g.set_line_width((s / 4.0).max(1.0));
            g.set_stroke_style_str(colour);
            g.stroke();
            g.set_line_width(1.0);
        } else {
            g.set_fill_style_str(colour);
            g.fill();
        }
    }
    g.set_stroke_style_str("rgba(0,0,0,0.08)");
    g.begin_path();
    for c in 0..=w {
        g.move_to(c as f64 * px, 0.0);
        g.line_to(c as f64 * px, ht);
    }
    for r in 0..=h {
        g.move_to(0.0, r as f64 * px);
        g.line_to(wd, r as f64 * px);
    }
    g.stroke();
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
