//! Drawing the canvases: the fast views (tray editor, linear and off-band maps, dwell bars) on
//! every change, the slow ones (simulated map, foods over time) when a full evaluation of the
//! current revision arrives. Each draws only results of the revision it is showing.

use crate::compute::{mark, measure, measure_input};
use crate::draw::{self, Scale};
use crate::state::Workbench;
use leptos::html;
use leptos::prelude::*;

/// The canvases, so the drawing effects and the panels that show them meet in one place.
#[derive(Clone, Copy)]
pub struct Canvases {
    /// The tray editor.
    pub tray: NodeRef<html::Canvas>,
    /// The linear prediction.
    pub linear: NodeRef<html::Canvas>,
    /// The simulated map.
    pub simulated: NodeRef<html::Canvas>,
    /// The off-band map.
    pub off_band: NodeRef<html::Canvas>,
    /// The dwell bars.
    pub bars: NodeRef<html::Canvas>,
    /// The foods-over-time chart.
    pub course: NodeRef<html::Canvas>,
}

/// Drawing width of the tray editor, px.
pub const TRAY_PX: f64 = 560.0;
/// Drawing width of each map, px.
const MAP_PX: f64 = 300.0;

/// Starts the drawing effects.
pub fn draw_views(wb: Workbench) {
    let c = wb.canvases;
    // The tray: on every change of the plan, the cursor or the rectangle being dragged.
    Effect::new(move |_| {
        let p = wb.plan.get();
        let px = draw::cell_px(&p, TRAY_PX);
        mark("tc-draw-tray-start");
        if let Some(canvas) = c.tray.get() {
            draw::editor(&canvas, &p, px);
            if let Some(i) = wb.cursor.get() {
                draw::cursor(&canvas, &p, px, i);
            }
            if let Some((a, b)) = wb.rect_preview.get() {
                draw::selection(&canvas, &p, px, a, b);
            }
        }
        measure("tc-draw-tray", "tc-draw-tray-start");
    });
    // The linear maps and the dwell bars: when the fast result of the current revision arrives
    // (or the unit or the shared scale changes). An input's redraw ends here.
    Effect::new(move |_| {
        let u = wb.unit.get();
        let scale = wb.scale.get();
        wb.quick.with(|q| {
            let Some((_, q)) = q.as_ref().filter(|(r, _)| *r == wb.rev.get_untracked()) else {
                return;
            };
            mark("tc-draw-maps-start");
            wb.plan.with_untracked(|p| {
                let hp = draw::cell_px(p, MAP_PX);
                if let Some(canvas) = c.linear.get() {
                    draw::heatmap(&canvas, p, &q.linear, hp, scale, u, "linear prediction");
                }
                if let Some(canvas) = c.off_band.get() {
                    let title = "distance outside the band, linear prediction";
                    draw::heatmap(&canvas, p, &q.error_linear, hp, Scale::OffBand, u, title);
                }
            });
            if let Some(canvas) = c.bars.get() {
                draw::dwell_bars(&canvas, &q.dwell);
            }
            measure("tc-draw-maps", "tc-draw-maps-start");
            measure_input();
        });
    });
    // The simulated map and the chart: when the current revision's evaluation arrives (or the
    // unit, the point shown or the shared scale changes).
    Effect::new(move |_| {
        let u = wb.unit.get();
        let scale = wb.scale.get();
        wb.simulated.with(|temps| {
            let Some(temps) = temps else { return };
            let (view, depth) = (wb.sim_view.get_untracked(), wb.sim_depth.get_untracked());
            let p = wb.plan.get_untracked();
            if let Some(canvas) = c.simulated.get() {
                let title = format!("simulated {} after standing", view.caption(depth));
                draw::heatmap(
                    &canvas,
                    &p,
                    temps,
                    draw::cell_px(&p, MAP_PX),
                    scale,
                    u,
                    &title,
                );
            }
            // `simulated` is Some only while the evaluation is the current revision's.
            wb.eval.with_untracked(|e| {
                if let (Some((_, Ok(e))), Some(canvas)) = (e, c.course.get()) {
                    draw::time_course(&canvas, &p, e, u);
                }
            });
            measure("tc-full-frame", "tc-eval-start");
        });
    });
}
