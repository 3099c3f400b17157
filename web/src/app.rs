//! The workbench: one screen with the tray editor, live views and the plan's numbers.

use crate::cards::SafetyCards;
use crate::draw;
use crate::paint::{Tool, paint};
use crate::planning::{PlanningPanel, PlanningReport};
use crate::simview::{SimView, SimViewPicker};
use crate::storage;
use crate::surface;
use crate::units::Unit;
use leptos::html;
use leptos::prelude::*;
use traycast_plan::calibrate::{self, QualityReport};
use traycast_plan::evaluate::{Evaluation, Evaluator, Options, Quick};
use traycast_plan::library::MapLibrary;
use traycast_plan::model::{FoodItem, MapSource, Plan, Sequencing, Zone};
use traycast_plan::runs::{HeatingRuns, ReadOptions};
use traycast_plan::{Planning, demos, wire};
use traycast_thermal::catalogue::CATALOGUE;
use wasm_bindgen::JsCast;

fn mark(name: &str) {
    if let Some(p) = web_sys::window().and_then(|w| w.performance()) {
        let _ = p.mark(name);
    }
}

fn measure(name: &str, from: &str) {
    if let Some(p) = web_sys::window().and_then(|w| w.performance()) {
        let _ = p.measure_with_start_mark(name, from);
    }
}

fn download(name: &str, mime: &str, text: &str) {
    let parts = js_sys::Array::of1(&wasm_bindgen::JsValue::from_str(text));
    let props = web_sys::BlobPropertyBag::new();
    props.set_type(mime);
    if let Ok(blob) = web_sys::Blob::new_with_str_sequence_and_options(&parts, &props)
        && let Ok(url) = web_sys::Url::create_object_url_with_blob(&blob)
    {
        download_url(name, &url);
        let _ = web_sys::Url::revoke_object_url(&url);
    }
}

fn download_url(name: &str, url: &str) {
    let Some(doc) = web_sys::window().and_then(|w| w.document()) else {
        return;
    };
    if let Ok(a) = doc.create_element("a") {
        let a: web_sys::HtmlAnchorElement = a.unchecked_into();
        a.set_href(url);
        a.set_download(name);
        a.click();
    }
}

/// Reads the file chosen in a file input as text and hands it to `then` (read errors go to `notice`).
fn read_picked_file(
    ev: &leptos::ev::Event,
    notice: RwSignal<Option<String>>,
    then: impl FnOnce(String) + 'static,
) {
    let Some(input) = ev
        .target()
        .and_then(|t| t.dyn_into::<web_sys::HtmlInputElement>().ok())
    else {
        return;
    };
    let Some(file) = input.files().and_then(|f| f.get(0)) else {
        return;
    };
    let file = gloo::file::File::from(file);
    // The largest file any reader takes (a runs file); each parser then checks its own limit.
    let max = traycast_plan::runs::MAX_RUNS_BYTES as u64;
    if file.size() > max {
        notice.set(Some(format!(
            "'{}' is {} MiB; files of at most {} MiB are read. Nothing was changed.",
            file.name(),
            file.size() >> 20,
            max >> 20
        )));
        return;
    }
    leptos::task::spawn_local(async move {
        match gloo::file::futures::read_as_text(&file).await {
            Ok(text) => then(text),
            Err(e) => notice.set(Some(format!("The file could not be read: {e}"))),
        }
    });
}

fn num(ev: &leptos::ev::Event) -> Option<f64> {
    event_target_value(ev)
        .trim()
        .parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
}

/// The workbench component.
#[component]
pub fn App() -> impl IntoView {
    let start = storage::startup();
    let plan = RwSignal::new(start.plan);
    let notice = RwSignal::new(start.message);
    let unit = RwSignal::new(Unit::Celsius);
    let sim_view = RwSignal::new(SimView::Coldest);
    let sim_depth = RwSignal::new(10.0f64);
    let tool = RwSignal::new(Tool::Food(0));
    let brush = RwSignal::new(1usize);
    let rect = RwSignal::new(false);
    let library: RwSignal<Option<MapLibrary>> = RwSignal::new(None);
    // Bumped whenever `library` is replaced: the evaluator takes the new one (and hashes it) once,
    // instead of being handed, and comparing, the library on every stroke.
    let library_rev = RwSignal::new(0u64);
    let evaluator_rev = StoredValue::new(0u64);
    // The last calibration: its quality report and per-probe table (CSV).
    let quality: RwSignal<Option<(QualityReport, String)>> = RwSignal::new(None);
    let runs_in_f = RwSignal::new(false);
    let eval: RwSignal<Option<Result<Evaluation, String>>> = RwSignal::new(None);
    let hover = RwSignal::new(None::<usize>);
    // The keyboard's cell cursor on the tray (arrows move it, Space or Enter paints there).
    let cursor = RwSignal::new(None::<usize>);
    // The rectangle being dragged (first and current cell), outlined until it is let go.
    let rect_preview = RwSignal::new(None::<(usize, usize)>);
    let link_len = RwSignal::new(0usize);
    let copied = RwSignal::new(false);
    let blank_w = RwSignal::new(24usize);
    let blank_h = RwSignal::new(16usize);
    let blank_mm = RwSignal::new(12.0f64);
    let undo = StoredValue::new(Vec::<Plan>::new());
    let redo = StoredValue::new(Vec::<Plan>::new());
    let stroke = StoredValue::new(None::<usize>);
    let evaluator = StoredValue::new_local(Evaluator::new());

    let tray_ref = NodeRef::<html::Canvas>::new();
    let lin_ref = NodeRef::<html::Canvas>::new();
    let sim_ref = NodeRef::<html::Canvas>::new();
    let err_ref = NodeRef::<html::Canvas>::new();
    let bars_ref = NodeRef::<html::Canvas>::new();
    let course_ref = NodeRef::<html::Canvas>::new();

    let quick: RwSignal<Option<Quick>> = RwSignal::new(None);
    let timer = StoredValue::new_local(None::<gloo::timers::callback::Timeout>);

    // Every edit: the fast path (warm solve + linear prediction) at once, autosave, the link; the
    // time course and verdicts as soon as the strokes pause (its own, larger budget).
    Effect::new(move |_| {
        let p = plan.get();
        let rev = library_rev.get();
        surface::pending();
        mark("tc-quick-start");
        let mut q = None;
        evaluator.update_value(|ev| {
            if evaluator_rev.get_value() != rev {
                ev.set_library(library.get_untracked());
                evaluator_rev.set_value(rev);
            }
            q = Some(ev.quick(&p));
        });
        measure("tc-quick", "tc-quick-start");
        match q.expect("evaluated") {
            Ok(q) => quick.set(Some(q)),
            Err(e) => {
                quick.set(None);
                eval.set(Some(Err(e.to_string())));
            }
        }
        storage::save(&p);
        link_len.set(storage::set_fragment(&p));
        let full = gloo::timers::callback::Timeout::new(30, move || {
            let p = plan.get_untracked();
            mark("tc-eval-start");
            let mut result = None;
            evaluator.update_value(|ev| result = Some(ev.evaluate(&p, Options::default())));
            let result = result.expect("evaluated").map_err(|e| e.to_string());
            measure("tc-solve-and-simulate", "tc-eval-start");
            surface::publish(&p, result.as_ref().ok());
            eval.set(Some(result));
        });
        // Replacing the stored timeout cancels the one still waiting.
        timer.set_value(Some(full));
    });
    // Fast views: editor, linear prediction, off-band map, dwell bars.
    Effect::new(move |_| {
        let p = plan.get();
        let u = unit.get();
        let px = draw::cell_px(&p, 560.0);
        if let Some(c) = tray_ref.get() {
            draw::editor(&c, &p, px);
            if let Some(i) = cursor.get() {
                draw::cursor(&c, &p, px, i);
            }
            if let Some((a, b)) = rect_preview.get() {
                draw::selection(&c, &p, px, a, b);
            }
        }
        quick.with(|q| {
            if let Some(q) = q.as_ref().filter(|q| q.linear.len() == p.tray.cells()) {
                let hp = draw::cell_px(&p, 300.0);
                if let Some(c) = lin_ref.get() {
                    draw::heatmap(&c, &p, &q.linear, hp, false, u, "linear prediction");
                }
                if let Some(c) = err_ref.get() {
                    draw::heatmap(
                        &c,
                        &p,
                        &q.error_linear,
                        hp,
                        true,
                        u,
                        "distance outside the band, linear prediction",
                    );
                }
                if let Some(c) = bars_ref.get() {
                    draw::dwell_bars(&c, &q.dwell);
                }
            }
        });
        measure("tc-input-to-frame", "tc-input");
    });
    // Slow views: the simulated map and the time course.
    Effect::new(move |_| {
        let p = plan.get_untracked();
        let u = unit.get();
        let (view, depth) = (sim_view.get(), sim_depth.get());
        eval.with(|e| {
            // The evaluation may still describe an earlier plan (another tray size): skip it then.
            if let Some(Ok(e)) = e
                .as_ref()
                .filter(|e| e.as_ref().is_ok_and(|e| e.linear.len() == p.tray.cells()))
            {
                let hp = draw::cell_px(&p, 300.0);
                if let Some(c) = sim_ref.get() {
                    let temps = view.temps(&e.course, depth, &p.food);
                    let title = format!("simulated {} after standing", view.caption(depth));
                    draw::heatmap(&c, &p, &temps, hp, false, u, &title);
                }
                if let Some(c) = course_ref.get() {
                    draw::time_course(&c, &p, e, u);
                }
            }
        });
        measure("tc-full-frame", "tc-eval-start");
    });

    let edit = move |f: &dyn Fn(&mut Plan)| {
        let before = plan.get_untracked();
        let mut after = before.clone();
        f(&mut after);
        if after != before {
            undo.update_value(|u| u.push(before));
            redo.update_value(|r| r.clear());
            plan.set(after);
        }
    };
    let do_undo = move || {
        let mut prev = None;
        undo.update_value(|u| prev = u.pop());
        if let Some(prev) = prev {
            redo.update_value(|r| r.push(plan.get_untracked()));
            plan.set(prev);
        }
    };
    let do_redo = move || {
        let mut next = None;
        redo.update_value(|r| next = r.pop());
        if let Some(next) = next {
            undo.update_value(|u| u.push(plan.get_untracked()));
            plan.set(next);
        }
    };

    // The cell under the pointer, wherever CSS, page zoom or the device's pixel ratio put the
    // canvas: the pointer's place inside the canvas's content box, scaled to its drawing.
    let cell_at = move |ev: &web_sys::PointerEvent| -> Option<usize> {
        let p = plan.get_untracked();
        let canvas = tray_ref.get_untracked()?;
        let rect = canvas.get_bounding_client_rect();
        let shown = (canvas.client_width() as f64, canvas.client_height() as f64);
        let drawn = (canvas.width() as f64, canvas.height() as f64);
        let at = (
            ev.client_x() as f64 - rect.left() - canvas.client_left() as f64,
            ev.client_y() as f64 - rect.top() - canvas.client_top() as f64,
        );
        crate::paint::cell_at_point(&p, draw::cell_px(&p, 560.0), at, shown, drawn)
    };
    let on_down = move |ev: web_sys::PointerEvent| {
        let Some(i) = cell_at(&ev) else { return };
        mark("tc-input");
        if let Some(t) = ev
            .target()
            .and_then(|t| t.dyn_into::<web_sys::Element>().ok())
        {
            let _ = t.set_pointer_capture(ev.pointer_id());
        }
        undo.update_value(|u| u.push(plan.get_untracked()));
        redo.update_value(|r| r.clear());
        stroke.set_value(Some(i));
        if !rect.get_untracked() {
            let (t, b) = (tool.get_untracked(), brush.get_untracked());
            plan.update(|p| {
                paint(p, t, i, i, b);
            });
        }
    };
    let on_move = move |ev: web_sys::PointerEvent| {
        let cell = cell_at(&ev);
        hover.set(cell);
        let (Some(i), Some(a)) = (cell, stroke.get_value()) else {
            return;
        };
        if rect.get_untracked() {
            if rect_preview.get_untracked() != Some((a, i)) {
                rect_preview.set(Some((a, i)));
            }
            return;
        }
        mark("tc-input");
        let (t, b) = (tool.get_untracked(), brush.get_untracked());
        let mut p = plan.get_untracked();
        if paint(&mut p, t, i, i, b) {
            plan.set(p);
        }
    };
    let on_up = move |ev: web_sys::PointerEvent| {
        if let (Some(a), true) = (stroke.get_value(), rect.get_untracked())
            && let Some(b) = cell_at(&ev)
        {
            mark("tc-input");
            let t = tool.get_untracked();
            plan.update(|p| {
                paint(p, t, a, b, 1);
            });
        }
        stroke.set_value(None);
        rect_preview.set(None);
    };

    // Painting from the keyboard, while the tray has focus.
    let on_tray_key = move |ev: web_sys::KeyboardEvent| {
        let (w, h) = plan.with_untracked(|p| (p.tray.width, p.tray.height));
        let at = cursor.get_untracked().filter(|&i| i < w * h);
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
            cursor.set(Some(i));
            hover.set(Some(i));
            return;
        }
        if matches!(ev.key().as_str(), " " | "Enter") {
            ev.prevent_default();
            let i = at.unwrap_or(0);
            cursor.set(Some(i));
            mark("tc-input");
            let (t, b) = (tool.get_untracked(), brush.get_untracked());
            let mut p = plan.get_untracked();
            if paint(&mut p, t, i, i, b) {
                undo.update_value(|u| u.push(plan.get_untracked()));
                redo.update_value(|r| r.clear());
                plan.set(p);
            }
        }
    };

    // Keyboard shortcuts.
    let keys = window_event_listener(leptos::ev::keydown, move |ev: web_sys::KeyboardEvent| {
        let target_is_input = ev
            .target()
            .and_then(|t| t.dyn_into::<web_sys::HtmlInputElement>().ok())
            .is_some();
        if target_is_input {
            return;
        }
        let ctrl = ev.ctrl_key() || ev.meta_key();
        match ev.key().as_str() {
            "z" if ctrl && ev.shift_key() => do_redo(),
            "z" | "Z" if ctrl => do_undo(),
            "y" if ctrl => do_redo(),
            "," => brush.update(|b| *b = (*b).saturating_sub(1).max(1)),
            "." => brush.update(|b| *b = (*b + 1).min(9)),
            "Backspace" => tool.set(Tool::EraseFood),
            "r" => rect.update(|r| *r = !*r),
            k if k.len() == 1 && k.as_bytes()[0].is_ascii_digit() && k != "0" => {
                let n = (k.as_bytes()[0] - b'1') as usize;
                if n < plan.with_untracked(|p| p.items.len()) {
                    tool.set(Tool::Food(n));
                }
            }
            _ => {}
        }
    });
    on_cleanup(move || keys.remove());

    let n_items = Memo::new(move |_| plan.with(|p| p.items.len()));
    let n_zones = Memo::new(move |_| plan.with(|p| p.zones.len()));

    let item_rows = move || {
        (0..n_items.get())
            .map(|k| {
                let colour = draw::FOOD_COLOURS[k % draw::FOOD_COLOURS.len()];
                view! {
                    <div class="row item" class:active=move || tool.get() == Tool::Food(k)>
                        <button class="swatch" style=format!("background:{colour}") title="Paint this food (key 1–9)" on:click=move |_| tool.set(Tool::Food(k))></button>
                        <input class="name" aria-label="food item name" prop:value=move || plan.with(|p| p.items.get(k).map(|i| i.name.clone()).unwrap_or_default())
                            on:change=move |ev| { let v = event_target_value(&ev); edit(&|p| if let Some(i) = p.items.get_mut(k) { i.name = v.clone(); }); } />
                        <select aria-label="catalogue food" on:change=move |ev| { let v = event_target_value(&ev); edit(&|p| if let Some(i) = p.items.get_mut(k) { i.food = v.clone(); }); }>
                            {CATALOGUE.iter().map(|f| { let id = f.id; view! { <option value=id selected=move || plan.with(|p| p.items.get(k).is_some_and(|i| i.food == id))>{f.name}</option> } }).collect_view()}
                        </select>
                        <label>"mm"<input class="short" type="number" step="1" prop:value=move || plan.with(|p| p.items.get(k).map(|i| i.thickness_mm.to_string()).unwrap_or_default())
                            on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| if let Some(i) = p.items.get_mut(k) { i.thickness_mm = v; }); } /></label>
                        <label>{move || format!("start {}", unit.get().symbol())}<input class="short" type="number" step="1" prop:value=move || plan.with(|p| p.items.get(k).map(|i| format!("{:.1}", unit.get().temp(i.start_c))).unwrap_or_default())
                            on:change=move |ev| if let Some(v) = num(&ev) { let c = unit.get_untracked().to_celsius(v); edit(&|p| if let Some(i) = p.items.get_mut(k) { i.start_c = c; }); } /></label>
                        <label title="A cover keeps the moisture in; the Food Code asks for one when cooking raw animal foods">"covered"<input type="checkbox" prop:checked=move || plan.with(|p| p.items.get(k).is_some_and(|i| i.covered))
                            on:change=move |ev| { let on = event_target_checked(&ev); edit(&|p| if let Some(i) = p.items.get_mut(k) { i.covered = on; }); } /></label>
                    </div>
                }
            })
            .collect_view()
    };
    let zone_rows = move || {
        (0..n_zones.get())
            .map(|k| {
                let colour = draw::ZONE_COLOURS[k % draw::ZONE_COLOURS.len()];
                let field = move |get: fn(&Zone) -> f64| move || plan.with(|p| p.zones.get(k).map(|z| format!("{:.1}", unit.get().temp(get(z)))).unwrap_or_default());
                view! {
                    <div class="row zone" class:active=move || tool.get() == Tool::Zone(k)>
                        <button class="swatch" style=format!("background:{colour}") title="Paint this target" on:click=move |_| tool.set(Tool::Zone(k))></button>
                        <input class="name" aria-label="zone name" prop:value=move || plan.with(|p| p.zones.get(k).map(|z| z.name.clone()).unwrap_or_default())
                            on:change=move |ev| { let v = event_target_value(&ev); edit(&|p| if let Some(z) = p.zones.get_mut(k) { z.name = v.clone(); }); } />
                        <label>"min"<input class="short" type="number" data-zone-min=k prop:value=field(|z| z.min_c)
                            on:change=move |ev| if let Some(v) = num(&ev) { let c = unit.get_untracked().to_celsius(v); edit(&|p| if let Some(z) = p.zones.get_mut(k) { z.min_c = c; z.max_c = z.max_c.max(c); }); } /></label>
                        <label>"max"<input class="short" type="number" data-zone-max=k prop:value=field(|z| z.max_c)
                            on:change=move |ev| if let Some(v) = num(&ev) { let c = unit.get_untracked().to_celsius(v); edit(&|p| if let Some(z) = p.zones.get_mut(k) { z.max_c = c; z.min_c = z.min_c.min(c); }); } /></label>
                        <label>"weight"<input class="short" type="number" step="0.5" prop:value=move || plan.with(|p| p.zones.get(k).map(|z| z.weight.to_string()).unwrap_or_default())
                            on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| if let Some(z) = p.zones.get_mut(k) { z.weight = v.clamp(0.001, 1000.0); }); } /></label>
                        <label>"cap"<input class="short" type="number" placeholder="none" prop:value=move || plan.with(|p| p.zones.get(k).and_then(|z| z.cap_c).map(|c| format!("{:.1}", unit.get().temp(c))).unwrap_or_default())
                            on:change=move |ev| { let v = num(&ev).map(|v| unit.get_untracked().to_celsius(v)); edit(&|p| if let Some(z) = p.zones.get_mut(k) { z.cap_c = v; }); } /></label>
                    </div>
                }
            })
            .collect_view()
    };

    let summary = move || {
        eval.with(|e| match e {
            None => view! { <p>"Solving…"</p> }.into_any(),
            Some(Err(msg)) => view! { <p class="error" role="alert">{format!("This plan cannot be solved: {msg}")}</p> }.into_any(),
            Some(Ok(e)) => {
                let p = plan.get();
                let u = unit.get();
                let with_spread = e.items.iter().any(|s| s.spread.is_some());
                let items = p.items.iter().zip(&e.items).map(|(it, s)| {
                    let v = &s.verdict;
                    let on = if s.spread.is_some() { " at the lower bound" } else { "" };
                    let words = traycast_plan::evaluate::verdict_words(v, e.illustrative());
                    let judged = s.judged.map_or(String::new(), |j| format!("at its {} ({}); ", j.name(), j.place(p.tray.width)));
                    // The reasons are on the item's safety card: the table keeps to the outcome.
                    let words = if v.safe { words } else { "fails (see its safety card)".to_string() };
                    let verdict = if v.margin.is_finite() { format!("{words}{on} ({:+.1} {})", u.diff(v.margin), u.diff_symbol()) } else { words };
                    let range = |r: (f64, f64)| format!("{:.1}–{:.1} {}", u.temp(r.0), u.temp(r.1), u.symbol());
                    let basis = e.bounds_from.clone().unwrap_or_default();
                    let spread = s.spread.as_ref().map(|sp| view! {
                        <td class="spread" title=basis.clone()>{range(sp.coldest)}</td>
                        <td class="spread" title=basis>{range(sp.mean)}</td>
                    });
                    view! {
                        <tr class:unsafe=!v.safe>
                            <td>{it.name.clone()}</td><td>{u.fmt(s.min)}</td><td>{u.fmt(s.mean)}</td><td>{u.fmt(s.max)}</td>{spread}
                            <td>{if s.in_band.is_finite() { format!("{:.0} %", 100.0 * s.in_band) } else { "—".into() }}</td>
                            <td class="verdict">{verdict}<div class="rule">{judged}{v.binding.source.clone()}</div></td>
                            <td>{format!("{:.1} g", s.moisture_g)}</td>
                        </tr>
                    }
                }).collect_view();
                let zones = p.zones.iter().zip(&e.zones).map(|(z, s)| {
                    let diag = s.diagnosis.as_ref().map(ToString::to_string).unwrap_or_default();
                    view! {
                        <tr><td>{z.name.clone()}</td><td>{format!("{:.0} %", 100.0 * s.coverage_linear)}</td><td>{format!("{:.0} %", 100.0 * s.coverage_simulated)}</td>
                        <td>{format!("{:.1}", u.diff(s.rms_simulated))}</td><td class="diagnosis">{diag}</td></tr>
                    }
                }).collect_view();
                let budget = p.oven.budget_s.map_or("no budget".to_string(), |b| format!("of {b:.0} s"));
                view! {
                    <p class="total" data-total=format!("{:.3}", e.total_s)>{format!("Heating {:.1} s {budget}, then {:.0} s standing", e.total_s, p.oven.standing_s)}</p>
                    <p class="bounds-from">{e.bounds_from.clone().map(|b| format!("Verdicts are judged on {b}."))}</p>
                    <table class="items"><thead><tr><th>"food item"</th><th>"coldest point"</th><th>"mean"</th><th>"hottest point"</th>{with_spread.then(|| view! { <th>"coldest, 95 % joint"</th><th>"mean, 95 % joint"</th> })}<th>"in band"</th><th>"verdict, point judged, rule"</th><th>"moisture lost"</th></tr></thead><tbody>{items}</tbody></table>
                    <table class="zones"><thead><tr><th>"zone"</th><th>"in band, linear"</th><th>"in band, simulated"</th><th>{format!("RMS off ({})", u.diff_symbol())}</th><th>"why it misses"</th></tr></thead><tbody>{zones}</tbody></table>
                    <p class="baseline">{format!("Without steering (all configurations alike, {:.0} s): {:.0} % of targeted cells in band, RMS {:.1} off — with steering: see the zones above.", e.baseline.seconds, 100.0 * e.baseline.coverage_linear, u.diff(e.baseline.rms_linear))}</p>
                    <ul class="warnings">{e.warnings.iter().map(|w| view! { <li>{w.clone()}</li> }).collect_view()}</ul>
                }.into_any()
            }
        })
    };

    let hover_text = move || {
        let Some(i) = hover.get() else {
            return "Hover a cell for its numbers.".to_string();
        };
        let p = plan.get();
        if i >= p.tray.cells() {
            // The tray changed size under the pointer.
            return "Hover a cell for its numbers.".to_string();
        }
        let u = unit.get();
        let (r, c) = (i / p.tray.width, i % p.tray.width);
        let food = p
            .item_at(i)
            .map_or("empty".to_string(), |k| p.items[k].name.clone());
        let zone = p
            .zone_at(i)
            .map_or("no target".to_string(), |z| p.zones[z].name.clone());
        eval.with(|e| match e {
            Some(Ok(e)) if i < e.linear.len() => format!(
                "row {r}, col {c}: {food}, {zone}; linear {}, simulated coldest point {}{}, off band {}",
                u.fmt(e.linear[i]),
                u.fmt(e.course.after_standing[i]),
                if e.course.coldest_depth[i].is_finite() {
                    format!(
                        " ({:.0} mm deep; column mean {})",
                        e.course.coldest_depth[i] * 1000.0,
                        u.fmt(e.course.mean_after_standing[i])
                    )
                } else {
                    String::new()
                },
                if e.error_simulated[i].is_finite() {
                    format!("{:+.1}", u.diff(e.error_simulated[i]))
                } else {
                    "—".into()
                }
            ),
            _ => format!("row {r}, col {c}: {food}, {zone}"),
        })
    };

    let on_import_library = move |ev: leptos::ev::Event| {
        read_picked_file(&ev, notice, move |text| match MapLibrary::parse(&text) {
            Ok(lib) => {
                let (name, configs, hash) = (lib.name.clone(), lib.configs, lib.content_hash());
                library.set(Some(lib));
                library_rev.update(|r| *r += 1);
                edit(&|p| {
                    p.maps = MapSource::Library {
                        name: name.clone(),
                        hash: Some(hash),
                    };
                    p.oven.configs = configs;
                });
                notice.set(Some(format!("Map library '{name}' imported.")));
            }
            Err(e) => notice.set(Some(format!("The map library was refused: {e}"))),
        });
    };
    let on_import_runs = move |ev: leptos::ev::Event| {
        let fahrenheit = runs_in_f.get_untracked();
        read_picked_file(&ev, notice, move |text| {
            let layout = plan.get_untracked();
            let result =
                HeatingRuns::parse(&text, &layout, ReadOptions { fahrenheit }).and_then(|runs| {
                    calibrate::calibrate(&runs, &layout, &calibrate::Settings::default())
                        .map(|c| (c.probe_table(&runs), c))
                });
            match result {
                Ok((table, cal)) => {
                    let (name, hash) = (cal.library.name.clone(), cal.library.content_hash());
                    let runs = cal.report.runs;
                    library.set(Some(cal.library));
                    library_rev.update(|r| *r += 1);
                    quality.set(Some((cal.report, table)));
                    edit(&|p| {
                        p.maps = MapSource::Library {
                            name: name.clone(),
                            hash: Some(hash),
                        }
                    });
                    notice.set(Some(format!("Calibrated '{name}' from {runs} runs on this tray; the quality report is under the outcome.")));
                }
                Err(e) => notice.set(Some(format!(
                    "The heating runs were refused (the plan is unchanged): {e}"
                ))),
            }
        });
    };
    let quality_view = move || {
        quality.with(|q| {
            q.as_ref().map(|(r, _)| {
                let pct = |v: f64| if v.is_finite() { format!("{:.1} %", 100.0 * v) } else { "—".into() };
                let rows = r.configs.iter().map(|c| {
                    let repeat = c.repeat.as_ref().map_or("single run".to_string(), |x| format!("{} cells, median Δ {}, {} beyond 3 SE", x.cells, pct(x.median_relative_difference), x.disagreeing));
                    view! {
                        <tr><td>{c.config}</td><td>{c.runs.join(", ")}</td><td>{c.measured}</td><td>{c.filled}</td>
                        <td>{if c.median_r2.is_finite() { format!("{:.4}", c.median_r2) } else { "—".into() }}</td>
                        <td>{pct(c.median_relative_se)}</td><td>{c.outliers}</td><td>{c.suspect}</td><td>{repeat}</td></tr>
                    }
                }).collect_view();
                let notes = r.notes.iter().take(30).map(|n| view! { <li>{r.note_line(n)}</li> }).collect_view();
                let more = r.notes.len().saturating_sub(30);
                view! {
                    <section id="quality" class="quality">
                        <h2>"Calibration quality"</h2>
                        <p>{format!("'{}' on layout '{}': {} runs, {} readings on food ({} over empty cells ignored). Rates are least-squares slopes over the straight part of each curve (thaw band, lag, the approach to boiling and outliers dropped); unmeasured cells are filled from the nearest measured cell of the same food and flagged.", r.name, r.layout, r.runs, r.readings, r.ignored)}</p>
                        <details open=r.configs.len() <= 12>
                            <summary>{format!("{} configurations", r.configs.len())}</summary>
                            <table class="quality-table"><thead><tr><th>"config"</th><th>"runs"</th><th>"measured"</th><th>"filled"</th><th>"median r²"</th><th>"median SE/rate"</th><th>"outliers"</th><th>"suspect"</th><th>"repeatability"</th></tr></thead><tbody>{rows}</tbody></table>
                        </details>
                        <details open=r.notes.len() <= 10>
                            <summary>{format!("{} notes: suspect probes, disagreeing repeats, outliers, filled cells", r.notes.len())}</summary>
                            <ul class="notes">{notes}</ul>
                            {(more > 0).then(|| view! { <p>{format!("… and {more} more in the per-probe table.")}</p> })}
                        </details>
                        <div class="row">
                            <button on:click=move |_| { if let Some(l) = library.get_untracked() { download("library.traycast-maps.json", "application/json", &l.to_json()); } }>"Save calibrated library"</button>
                            <button on:click=move |_| { quality.with_untracked(|q| if let Some((_, t)) = q { download("probe-fits.csv", "text/csv", t); }); }>"Save per-probe table"</button>
                        </div>
                    </section>
                }
            })
        })
    };
    let on_import_plan = move |ev: leptos::ev::Event| {
        read_picked_file(&ev, notice, move |text| match wire::from_json(&text) {
            Ok(p) => edit(&|cur| *cur = p.clone()),
            Err(e) => notice.set(Some(format!("The plan file was refused: {e}"))),
        });
    };

    let png = move |r: NodeRef<html::Canvas>, name: &'static str| {
        move |_| {
            if let Some(c) = r.get()
                && let Some(url) = draw::with_caution(&c)
            {
                download_url(name, &url);
            }
        }
    };

    view! {
        <header>
            <h1>"Traycast"</h1>
            <input class="plan-name" aria-label="plan name" prop:value=move || plan.with(|p| p.name.clone()) on:change=move |ev| { let v = event_target_value(&ev); edit(&|p| p.name = v.clone()); } />
            <select aria-label="open a demo" on:change=move |ev| { let v = event_target_value(&ev); if let Some(d) = demos::demo(&v) { edit(&|p| *p = d.clone()); } }>
                <option value="">"Open a demo (illustrative)…"</option>
                {demos::DEMOS.iter().map(|d| view! { <option value=*d>{*d}</option> }).collect_view()}
            </select>
            <label>"cells"<input id="blank-w" class="short" type="number" min="1" max="128" prop:value=move || blank_w.get().to_string() on:change=move |ev| if let Some(v) = num(&ev) { blank_w.set((v as usize).clamp(1, 128)); } />
                "×"<input id="blank-h" class="short" type="number" min="1" max="128" prop:value=move || blank_h.get().to_string() on:change=move |ev| if let Some(v) = num(&ev) { blank_h.set((v as usize).clamp(1, 128)); } />
                "of"<input id="blank-mm" class="short" type="number" min="1" max="100" prop:value=move || blank_mm.get().to_string() on:change=move |ev| if let Some(v) = num(&ev) { blank_mm.set(v.clamp(1.0, 100.0)); } />"mm"</label>
            <button id="new-blank" on:click=move |_| { let (w, h, mm) = (blank_w.get_untracked(), blank_h.get_untracked(), blank_mm.get_untracked()); edit(&|p| *p = Plan::blank(w, h, mm)); }>"New blank tray"</button>
            <span class="spacer"></span>
            <button id="unit" on:click=move |_| unit.update(|u| *u = if *u == Unit::Celsius { Unit::Fahrenheit } else { Unit::Celsius })>{move || format!("Show {}", if unit.get() == Unit::Celsius { "°F" } else { "°C" })}</button>
            <button id="share" on:click=move |_| {
                if let Some(w) = web_sys::window() {
                    let href = w.location().href().unwrap_or_default();
                    let _ = w.navigator().clipboard().write_text(&href);
                    copied.set(true);
                }
            }>"Copy share link"</button>
            <span class="link-len" id="link-len">{move || format!("{} {} characters", if copied.get() { "copied," } else { "link" }, link_len.get())}</span>
        </header>
        <div id="notice" role="status" class:hidden=move || notice.get().is_none()>
            <span>{move || notice.get().unwrap_or_default()}</span>
            <button on:click=move |_| notice.set(None)>"Dismiss"</button>
        </div>
        <main>
            <section class="tools">
                <h2>"Foods"</h2>
                {item_rows}
                <button on:click=move |_| edit(&|p| if p.items.len() < 26 { p.items.push(FoodItem { name: format!("Food {}", p.items.len() + 1), food: "rice".into(), thickness_mm: 20.0, start_c: 4.0, covered: false }); })>"Add food item"</button>
                <h2>"Targets"</h2>
                {zone_rows}
                <button on:click=move |_| edit(&|p| if p.zones.len() < 26 { p.zones.push(Zone { name: format!("Target {}", p.zones.len() + 1), min_c: 70.0, max_c: 80.0, weight: 1.0, cap_c: None }); })>"Add target"</button>
                <h2>"Brush"</h2>
                <div class="row">
                    <button class:active=move || tool.get() == Tool::EraseFood on:click=move |_| tool.set(Tool::EraseFood) title="key Backspace">"Erase food"</button>
                    <button class:active=move || tool.get() == Tool::EraseZone on:click=move |_| tool.set(Tool::EraseZone)>"Erase target"</button>
                    <button class:active=move || rect.get() on:click=move |_| rect.update(|r| *r = !*r) title="key R">"Rectangle"</button>
                </div>
                <label title="keys , and . make it smaller and larger">"Size " {move || brush.get()}<input type="range" min="1" max="9" prop:value=move || brush.get().to_string() on:input=move |ev| if let Some(v) = num(&ev) { brush.set(v as usize); } /></label>
                <div class="row">
                    <button id="undo" on:click=move |_| do_undo() title="Ctrl+Z">"Undo"</button>
                    <button id="redo" on:click=move |_| do_redo() title="Ctrl+Y">"Redo"</button>
                </div>
                <h2>"Oven"</h2>
                <label>"Rated power (W)"<input type="number" prop:value=move || plan.with(|p| p.oven.power_w.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.oven.power_w = v); } /></label>
                <label>"Configurations"<input type="number" prop:value=move || plan.with(|p| p.oven.configs.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.oven.configs = (v as usize).clamp(1, 512)); } /></label>
                <label>"Time budget (s)"<input id="budget" type="number" placeholder="none" prop:value=move || plan.with(|p| p.oven.budget_s.map(|b| b.to_string()).unwrap_or_default()) on:change=move |ev| { let v = num(&ev); edit(&|p| p.oven.budget_s = v); } /></label>
                <label>"Limit per configuration (s)"<input type="number" placeholder="none" prop:value=move || plan.with(|p| p.oven.limit_s.map(|b| b.to_string()).unwrap_or_default()) on:change=move |ev| { let v = num(&ev); edit(&|p| p.oven.limit_s = v); } /></label>
                <label>"Dwell quantum (s)"<input type="number" step="0.1" prop:value=move || plan.with(|p| p.oven.quantum_s.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.oven.quantum_s = v); } /></label>
                <label>"Rounds (1 = blocks)"<input type="number" min="1" max="100" prop:value=move || plan.with(|p| match p.oven.sequencing { Sequencing::Blocks => "1".to_string(), Sequencing::Rounds(r) => r.to_string() }) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.oven.sequencing = if v <= 1.0 { Sequencing::Blocks } else { Sequencing::Rounds(v.min(100.0) as u16) }); } /></label>
                <label>"Standing time (s)"<input type="number" prop:value=move || plan.with(|p| p.oven.standing_s.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.oven.standing_s = v); } /></label>
                <label title="0: the tray lets no energy through its base (the conservative default); 0.5: food heated equally from both faces">"Share of power from below (0–1)"<input type="number" min="0" max="1" step="0.05" prop:value=move || plan.with(|p| p.heating.from_below.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.heating.from_below = v); } /></label>
                <label title="Heat the tray stores under each square metre of food; 0: an insulated bottom that stores none (about 1400 for a thin plastic tray)">"Tray heat capacity (J/(m²·K))"<input type="number" min="0" max="1000000" step="100" prop:value=move || plan.with(|p| p.heating.tray_capacity.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.heating.tray_capacity = v); } /></label>
                <label title="How much weaker (or stronger) a real oven may heat than the maps say; the verdicts are judged on the worst (default 15 %: warm ovens lose output)">"Oven power varies by ± (%)"<input id="variation-power" type="number" min="0" max="50" step="1" prop:value=move || plan.with(|p| (100.0 * p.variation.oven_power).round().to_string()) on:change=move |ev| if let Some(v) = num(&ev) { edit(&|p| p.variation.oven_power = v / 100.0); } /></label>
                <label title="How much colder (or warmer) the food may start than planned; the verdicts are judged on the worst">{move || format!("Start varies by ± ({})", unit.get().diff_symbol())}<input id="variation-start" type="number" min="0" step="0.5" prop:value=move || plan.with(|p| unit.get().diff(p.variation.start_k).to_string()) on:change=move |ev| if let Some(v) = num(&ev) { let k = v / unit.get_untracked().diff(1.0); edit(&|p| p.variation.start_k = k); } /></label>
                <PlanningPanel plan=plan set=Callback::new(move |planning: Planning| edit(&|p| p.planning = planning)) />
                <h2>"Files"</h2>
                <label class="file">"Import heating maps (CSV/JSON)"<input id="import-library" type="file" accept=".csv,.json,text/csv,application/json" on:change=on_import_library /></label>
                <label class="file">"Calibrate from heating runs (CSV)"<input id="import-runs" type="file" accept=".csv,text/csv" on:change=on_import_runs /></label>
                <label class="check"><input id="runs-fahrenheit" type="checkbox" prop:checked=move || runs_in_f.get() on:change=move |ev| runs_in_f.set(event_target_checked(&ev)) />"runs are in °F"</label>
                <button on:click=move |_| { match traycast_plan::runs::heating_runs(&plan.get_untracked(), &traycast_plan::runs::RunRecipe::default()) { Ok(t) => download("illustrative-runs.csv", "text/csv", &t), Err(e) => notice.set(Some(format!("No runs could be invented for this tray: {e}"))) } }>"Invent bench runs for this tray (illustrative)"</button>
                <label class="file">"Open plan file"<input id="import-plan" type="file" accept=".json,application/json" on:change=on_import_plan /></label>
                <div class="row">
                    <button on:click=move |_| download("plan.traycast.json", "application/json", &wire::to_json(&plan.get_untracked()))>"Save plan"</button>
                    <button on:click=move |_| { if let Some(Ok(e)) = eval.get_untracked() { let p = plan.get_untracked(); download("schedule.csv", "text/csv", &wire::schedule_csv(&p, &e.schedule)); } }>"Export schedule"</button>
                    <button on:click=move |_| { if let Some(w) = web_sys::window() { let _ = w.print(); } }>"Print report"</button>
                </div>
            </section>
            <section class="board">
                <h2>"Tray " <small>{move || plan.with(|p| format!("{} × {} cells of {} mm", p.tray.width, p.tray.height, p.tray.cell_mm))}</small></h2>
                <canvas id="tray" node_ref=tray_ref tabindex="0" aria-label="Tray: arrow keys move the cell cursor, Space or Enter paints with the current brush" on:keydown=on_tray_key on:blur=move |_| cursor.set(None) on:pointerdown=on_down on:pointermove=on_move on:pointerup=on_up on:pointerleave=move |_| hover.set(None)></canvas>
                <p class="hover" id="hover">{hover_text}</p>
                <div class="maps">
                    <figure><figcaption>{move || format!("Linear prediction ({})", unit.get().symbol())}</figcaption><canvas id="map-linear" node_ref=lin_ref></canvas><button class="small" on:click=png(lin_ref, "linear.png")>"PNG"</button></figure>
                    <figure><figcaption>{move || format!("Simulated {} of each cell, after standing ({})", sim_view.get().caption(sim_depth.get()), unit.get().symbol())}</figcaption><SimViewPicker view=sim_view depth_mm=sim_depth /><canvas id="map-simulated" node_ref=sim_ref></canvas><button class="small" on:click=png(sim_ref, "simulated.png")>"PNG"</button></figure>
                    <figure><figcaption>"Off band (linear prediction): blue too cold, red too hot"</figcaption><canvas id="map-error" node_ref=err_ref></canvas><button class="small" on:click=png(err_ref, "error.png")>"PNG"</button></figure>
                </div>
            </section>
            <section class="results">
                <h2>"Dwell per configuration"</h2>
                <canvas id="dwell-bars" node_ref=bars_ref></canvas>
                <h2>"Foods over time"</h2>
                <canvas id="time-course" node_ref=course_ref></canvas>
                <h2>"Outcome"</h2>
                <div id="summary">{summary}</div>
                <PlanningReport plan=plan eval=eval />
                {quality_view}
                <SafetyCards plan=plan eval=eval unit=unit />
            </section>
        </main>
    }
}
