//! The tray board: the tray editor canvas (pointer, touch and keyboard painting), the readout of
//! the cell under the pointer, and the three maps.

use crate::draw;
use crate::files::download_url;
use crate::pinch::Zoom;
use crate::simview::SimViewPicker;
use crate::state::{Workbench, workbench};
use crate::views::TRAY_PX;
use leptos::html;
use leptos::prelude::*;
use wasm_bindgen::JsCast;

/// The cell under the pointer, wherever CSS, page zoom, a pinch-zoom or the device's pixel ratio
/// put the canvas: the pointer's place inside the canvas's content box as shown, scaled to its
/// drawing.
fn cell_at(wb: Workbench, ev: &web_sys::PointerEvent) -> Option<usize> {
    let canvas = wb.canvases.tray.get_untracked()?;
    let rect = canvas.get_bounding_client_rect();
    // The transform's magnification: the shown box over the laid-out one.
    let s = rect.width() / (canvas.offset_width() as f64).max(1.0);
    let shown = (
        canvas.client_width() as f64 * s,
        canvas.client_height() as f64 * s,
    );
    let at = (
        ev.client_x() as f64 - rect.left() - canvas.client_left() as f64 * s,
        ev.client_y() as f64 - rect.top() - canvas.client_top() as f64 * s,
    );
    wb.plan.with_untracked(|p| {
        // The drawing's size in units, whatever the device's pixel ratio made its backing store.
        let px = draw::cell_px(p, TRAY_PX);
        let drawn = (p.tray.width as f64 * px, p.tray.height as f64 * px);
        crate::paint::cell_at_point(p, px, at, shown, drawn)
    })
}

/// Arrow keys move the cell cursor; Space or Enter paints at it.
fn on_tray_key(wb: Workbench, ev: web_sys::KeyboardEvent) {
    let (w, h) = wb.plan.with_untracked(|p| (p.tray.width, p.tray.height));
    let at = wb.cursor.get_untracked().filter(|&i| i < w * h);
    let (r, c) = at.map_or((0, 0), |i| (i / w, i % w));
    let moved = match ev.key().as_str() {
        "ArrowLeft" => Some((r, c.saturating_sub(1))),
        "ArrowRight" => Some((r, (c + 1).min(w - 1))),
        "ArrowUp" => Some((r.saturating_sub(1), c)),
        "ArrowDown" => Some(((r + 1).min(h - 1), c)),
        _ => None,
    };
    if let Some((r, c)) = moved {
        ev.prevent_default();
        let i = if at.is_some() { r * w + c } else { 0 };
        wb.cursor.set(Some(i));
        wb.hover.set(Some(i));
    } else if matches!(ev.key().as_str(), " " | "Enter") {
        ev.prevent_default();
        let i = at.unwrap_or(0);
        wb.cursor.set(Some(i));
        wb.paint_cell(i);
    }
}

/// The numbers of the cell under the pointer (the full evaluation's only when it is current).
fn hover_text(wb: Workbench) -> String {
    let idle = "Hover a cell for its numbers.".to_string();
    let Some(i) = wb.hover.get() else { return idle };
    let p = wb.plan.get();
    if i >= p.tray.cells() {
        // The tray changed size under the pointer.
        return idle;
    }
    let u = wb.unit.get();
    let (r, c) = (i / p.tray.width, i % p.tray.width);
    let food = p
        .item_at(i)
        .map_or("empty".to_string(), |k| p.items[k].name.clone());
    let zone = p
        .zone_at(i)
        .map_or("no target".to_string(), |z| p.zones[z].name.clone());
    let place = format!("row {r}, col {c}: {food}, {zone}");
    wb.with_current(|e| {
        let depth = if e.course.coldest_depth[i].is_finite() {
            format!(
                " ({:.0} mm deep; column mean {})",
                e.course.coldest_depth[i] * 1000.0,
                u.fmt(e.course.mean_after_standing[i])
            )
        } else {
            String::new()
        };
        let off = if e.error_simulated[i].is_finite() {
            format!("{:+.1}", u.diff(e.error_simulated[i]))
        } else {
            "—".into()
        };
        format!(
            "{place}; linear {}, simulated coldest point {}{depth}, off band {off}",
            u.fmt(e.linear[i]),
            u.fmt(e.course.after_standing[i]),
        )
    })
    .unwrap_or(place)
}

/// The tray editor, its readout and the maps.
#[component]
pub fn Board() -> impl IntoView {
    let wb = workbench();
    let c = wb.canvases;
    // Two fingers pinch and pan; one finger, a pen or a mouse paints.
    let zoom = RwSignal::new(Zoom::NONE);
    let frame = NodeRef::<html::Div>::new();
    let fingers = StoredValue::new(Vec::<(i32, (f64, f64))>::new());
    let pinch = StoredValue::new(None::<(Zoom, [(f64, f64); 2])>);
    let place = move |ev: &web_sys::PointerEvent| {
        let r = frame.get_untracked().map(|f| f.get_bounding_client_rect());
        let (x0, y0) = r.as_ref().map_or((0.0, 0.0), |r| (r.left(), r.top()));
        (ev.client_x() as f64 - x0, ev.client_y() as f64 - y0)
    };
    let two = move || -> Option<[(f64, f64); 2]> {
        fingers.with_value(|f| (f.len() == 2).then(|| [f[0].1, f[1].1]))
    };
    let on_down = move |ev: web_sys::PointerEvent| {
        if ev.pointer_type() == "touch" {
            fingers.update_value(|f| f.push((ev.pointer_id(), place(&ev))));
            if let Some(points) = two() {
                wb.cancel_stroke();
                pinch.set_value(Some((zoom.get_untracked(), points)));
            }
            if fingers.with_value(|f| f.len() > 1) {
                return;
            }
        }
        let Some(i) = cell_at(wb, &ev) else { return };
        if let Some(t) = ev
            .target()
            .and_then(|t| t.dyn_into::<web_sys::Element>().ok())
        {
            let _ = t.set_pointer_capture(ev.pointer_id());
        }
        wb.begin_stroke(i);
    };
    let on_move = move |ev: web_sys::PointerEvent| {
        if ev.pointer_type() == "touch" {
            let at = place(&ev);
            fingers.update_value(|f| {
                f.iter_mut()
                    .filter(|(id, _)| *id == ev.pointer_id())
                    .for_each(|p| p.1 = at)
            });
            if let (Some((start, from)), Some(now), Some(f)) =
                (pinch.get_value(), two(), frame.get_untracked())
            {
                let size = (f.client_width() as f64, f.client_height() as f64);
                zoom.set(start.pinched(from, now, size));
                return;
            }
            if pinch.get_value().is_some() {
                return;
            }
        }
        let cell = cell_at(wb, &ev);
        wb.hover.set(cell);
        if let Some(i) = cell
            && wb.stroke.get_value().is_some()
        {
            wb.continue_stroke(i);
        }
    };
    let on_up = move |ev: web_sys::PointerEvent| {
        if ev.pointer_type() == "touch" {
            fingers.update_value(|f| f.retain(|(id, _)| *id != ev.pointer_id()));
            if pinch.get_value().is_some() {
                // No painting until every finger of a pinch is lifted.
                if fingers.with_value(Vec::is_empty) {
                    pinch.set_value(None);
                }
                return;
            }
        }
        wb.end_stroke(cell_at(wb, &ev));
    };
    let png = move |r: NodeRef<html::Canvas>, name: &'static str| {
        move |_| {
            if let Some(canvas) = r.get()
                && let Some(url) = draw::with_caution(&canvas)
            {
                download_url(name, &url);
            }
        }
    };
    let (unit, sim_view, sim_depth) = (wb.unit, wb.sim_view, wb.sim_depth);
    view! {
        <section class="board">
            <h2>"Tray " <small>{move || wb.settings.with(|p| format!("{} × {} cells of {} mm", p.tray.width, p.tray.height, p.tray.cell_mm))}</small></h2>
            <div class="tray-frame" node_ref=frame>
            <canvas id="tray" data-testid="tray" node_ref=c.tray style:transform=move || zoom.get().css() tabindex="0" aria-label="Tray: arrow keys move the cell cursor, Space or Enter paints with the current brush"
                on:keydown=move |ev| on_tray_key(wb, ev) on:blur=move |_| wb.cursor.set(None)
                on:pointerdown=on_down on:pointermove=on_move on:pointerup=on_up on:pointercancel=on_up on:pointerleave=move |_| wb.hover.set(None)></canvas>
            </div>
            <button id="reset-zoom" data-testid="reset-zoom" class="small" class:hidden=move || zoom.get() == Zoom::NONE on:click=move |_| zoom.set(Zoom::NONE)>"Reset zoom"</button>
            <p class="hint phone-only">"Phone view: the tray, the maps and the outcome come first, the settings below. One finger paints; two fingers zoom and pan the tray."</p>
            <p class="hint" id="empty-hint" data-testid="empty-hint" class:hidden=move || wb.plan.with(|p| p.food.iter().any(|&f| f > 0))>
                "An empty tray: pick a food on the left (or press 1–9) and paint it here with the mouse, a finger or the keyboard; then pick a target band and paint it over the food."
            </p>
            <p class="hover" id="hover" data-testid="hover" aria-live="polite">{move || hover_text(wb)}</p>
            <label class="check" title="Keep the linear and simulated maps on the scale they show now, to compare edits">
                <input id="lock-scale" data-testid="lock-scale" type="checkbox" prop:checked=move || wb.scale_lock.get().is_some()
                    on:change=move |ev| wb.scale_lock.set(event_target_checked(&ev).then(|| wb.scale.get_untracked())) />
                "Lock the temperature scale of the two temperature maps"
            </label>
            <div class="maps">
                <figure><figcaption>{move || format!("Linear prediction ({})", unit.get().symbol())}</figcaption><canvas id="map-linear" data-testid="map-linear" node_ref=c.linear></canvas><button class="small" on:click=png(c.linear, "linear.png")>"PNG"</button></figure>
                <figure><figcaption>{move || format!("Simulated {} of each cell, after standing ({})", sim_view.get().caption(sim_depth.get()), unit.get().symbol())}</figcaption><SimViewPicker view=sim_view depth_mm=sim_depth /><canvas id="map-simulated" data-testid="map-simulated" node_ref=c.simulated></canvas><button class="small" on:click=png(c.simulated, "simulated.png")>"PNG"</button></figure>
                <figure><figcaption>"Off band (linear prediction): blue too cold, red too hot, white dot in band, hatched no target"</figcaption><canvas id="map-error" data-testid="map-off-band" node_ref=c.off_band></canvas><button class="small" on:click=png(c.off_band, "error.png")>"PNG"</button></figure>
            </div>
        </section>
    }
}
