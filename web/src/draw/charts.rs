//! The charts: dwell seconds per configuration, and each food over time, with axis titles, units
//! and a legend.

use super::{FOOD_COLOURS, ZONE_COLOURS};
use crate::units::Unit;
use traycast_plan::evaluate::Evaluation;
use traycast_plan::model::Plan;
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

const INK: &str = "#333";
const FAINT: &str = "#ddd";

fn clear(canvas: &HtmlCanvasElement, width: f64, height: f64) -> Option<CanvasRenderingContext2d> {
    let g = super::prepare(canvas, width, height)?;
    g.set_fill_style_str("#ffffff");
    g.fill_rect(0.0, 0.0, width, height);
    g.set_font("11px system-ui, sans-serif");
    Some(g)
}

/// A vertical axis title, read bottom to top, at `x`, centred on `y`.
fn vertical_title(g: &CanvasRenderingContext2d, text: &str, x: f64, y: f64) {
    g.save();
    let _ = g.translate(x, y);
    let _ = g.rotate(-std::f64::consts::FRAC_PI_2);
    g.set_text_align("center");
    let _ = g.fill_text(text, 0.0, 0.0);
    g.restore();
}

/// Dwell bars: seconds per configuration, labelled every few configurations.
pub fn dwell_bars(canvas: &HtmlCanvasElement, dwell: &[f64]) {
    let (width, height) = (420.0, 170.0);
    let Some(g) = clear(canvas, width, height) else {
        return;
    };
    let (left, bottom) = (44.0, 34.0);
    let n = dwell.len().max(1);
    let max = dwell.iter().copied().fold(1.0f64, f64::max);
    let bw = (width - left - 6.0) / n as f64;
    let top = 8.0;
    g.set_fill_style_str("#2f5d8a");
    for (j, d) in dwell.iter().enumerate() {
        let bh = (height - bottom - top) * d / max;
        let x = left + j as f64 * bw;
        g.fill_rect(x, height - bottom - bh, (bw - 1.0).max(1.0), bh);
    }
    g.set_fill_style_str(INK);
    g.set_text_align("right");
    let _ = g.fill_text(&format!("{max:.0}"), left - 4.0, top + 8.0);
    let _ = g.fill_text("0", left - 4.0, height - bottom);
    g.set_text_align("left");
    let every = (n / 8).max(1);
    for j in (0..n).step_by(every) {
        let _ = g.fill_text(&j.to_string(), left + j as f64 * bw, height - bottom + 13.0);
    }
    g.set_text_align("center");
    let _ = g.fill_text("configuration", left + (width - left) / 2.0, height - 4.0);
    vertical_title(&g, "dwell (s)", 12.0, (height - bottom) / 2.0);
    g.set_text_align("left");
}

/// Each food over time: its coldest–hottest band and its coldest point, the zones' target bands
/// dashed, the moment the power goes off, and a legend.
pub fn time_course(canvas: &HtmlCanvasElement, plan: &Plan, eval: &Evaluation, unit: Unit) {
    let items = eval.course.items.len();
    let legend_rows = items.div_ceil(3) + 1;
    let (width, plot_h) = (420.0, 170.0);
    let height = plot_h + 30.0 + 14.0 * legend_rows as f64;
    let Some(g) = clear(canvas, width, height) else {
        return;
    };
    let times = &eval.course.times;
    let t_max = times.last().copied().unwrap_or(1.0).max(1.0);
    let (lo, hi) = (-20.0f64, 105.0f64);
    let left = 46.0;
    let x = |t: f64| left + (width - left - 8.0) * t / t_max;
    let y = |c: f64| 8.0 + (plot_h - 16.0) * (1.0 - (c - lo) / (hi - lo));
    g.set_stroke_style_str(FAINT);
    g.set_fill_style_str("#555");
    for c in [0.0, 25.0, 50.0, 75.0, 100.0] {
        g.begin_path();
        g.move_to(left, y(c));
        g.line_to(width - 8.0, y(c));
        g.stroke();
        g.set_text_align("right");
        let _ = g.fill_text(&format!("{:.0}", unit.temp(c)), left - 4.0, y(c) + 3.0);
        g.set_text_align("left");
    }
    let heating = eval.course.heating_seconds;
    g.set_stroke_style_str("#999");
    g.begin_path();
    g.move_to(x(heating), 8.0);
    g.line_to(x(heating), plot_h - 8.0);
    g.stroke();
    let _ = g.fill_text("power off", x(heating) + 3.0, 18.0);
    g.set_text_align("right");
    let _ = g.fill_text(&format!("{t_max:.0}"), width - 8.0, plot_h + 4.0);
    g.set_text_align("left");
    let _ = g.fill_text("0", left, plot_h + 4.0);
    g.set_text_align("center");
    let _ = g.fill_text(
        "time (s), heating then standing",
        left + (width - left) / 2.0,
        plot_h + 16.0,
    );
    vertical_title(
        &g,
        &format!("temperature ({})", unit.symbol()),
        12.0,
        plot_h / 2.0,
    );
    g.set_text_align("left");
    // Target bands of the zones, dashed, in the zone colours.
    let _ = g.set_line_dash(&js_sys::Array::of2(&4.0.into(), &4.0.into()));
    for (z, zone) in plan.zones.iter().enumerate() {
        g.set_stroke_style_str(ZONE_COLOURS[z % ZONE_COLOURS.len()]);
        for v in [zone.min_c, zone.max_c]
            .into_iter()
            .filter(|v| (lo..=hi).contains(v))
        {
            g.begin_path();
            g.move_to(left, y(v));
            g.line_to(width - 8.0, y(v));
            g.stroke();
        }
    }
    let _ = g.set_line_dash(&js_sys::Array::new());
    for (k, curve) in eval.course.items.iter().enumerate() {
        g.set_fill_style_str(FOOD_COLOURS[k % FOOD_COLOURS.len()]);
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
        g.set_stroke_style_str(INK);
        g.begin_path();
        for (t, v) in times.iter().zip(&curve.min) {
            g.line_to(x(*t), y(*v));
        }
        g.stroke();
    }
    // Legend: the foods' colours, then what the marks mean.
    let top = plot_h + 30.0;
    g.set_fill_style_str(INK);
    for (k, item) in plan.items.iter().enumerate().take(items) {
        let (lx, ly) = (8.0 + (k % 3) as f64 * 136.0, top + (k / 3) as f64 * 14.0);
        g.set_fill_style_str(FOOD_COLOURS[k % FOOD_COLOURS.len()]);
        g.fill_rect(lx, ly - 9.0, 12.0, 10.0);
        g.set_fill_style_str(INK);
        let name: String = item.name.chars().take(18).collect();
        let _ = g.fill_text(&name, lx + 16.0, ly);
    }
    let ly = top + (legend_rows - 1) as f64 * 14.0;
    let _ = g.fill_text(
        "band: coldest to hottest point · line: coldest point · dashed: target bands",
        8.0,
        ly,
    );
}
