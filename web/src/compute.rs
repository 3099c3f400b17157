//! Keeping the results up with the plan: on every change the fast path (warm solve and linear
//! prediction) runs at once; once the strokes pause the plan is autosaved, the link rewritten and
//! the full evaluation asked of the worker, whose answer is kept only for the revision it belongs
//! to. Leaving the page saves at once.

use crate::state::Workbench;
use crate::storage;
use crate::surface;
use crate::worker::{Evaluations, Outcome};
use leptos::prelude::*;
use traycast_plan::evaluate::Evaluator;

/// Milliseconds of quiet after a change before the full evaluation is asked for.
const PAUSE_MS: u32 = 30;

thread_local! {
    /// An input is waiting for its fast views: only redraws an input caused are timed as such.
    static INPUT_PENDING: std::cell::Cell<bool> = const { std::cell::Cell::new(false) };
}

/// Sets a performance mark (read by `cargo xtask bench-web`).
pub fn mark(name: &str) {
    if let Some(p) = web_sys::window().and_then(|w| w.performance()) {
        let _ = p.mark(name);
    }
}

/// Marks an input (a stroke, a key that paints): the next fast redraw is timed from here.
pub fn mark_input() {
    INPUT_PENDING.with(|p| p.set(true));
    mark("tc-input");
}

/// The input changed nothing: there is no redraw to time.
pub fn cancel_input() {
    INPUT_PENDING.with(|p| p.set(false));
}

/// Times "input → fast views" once the redraw an input caused is done (redraws for other reasons,
/// such as a full evaluation arriving, are not inputs).
pub fn measure_input() {
    if INPUT_PENDING.with(|p| p.replace(false)) {
        measure("tc-input-to-frame", "tc-input");
    }
}

/// Records a span of `ms` milliseconds that ended now, measured elsewhere (the worker's own time).
pub fn record(name: &str, ms: f64) {
    use js_sys::{Function, Object, Reflect};
    use wasm_bindgen::{JsCast, JsValue};
    let Some(p) = web_sys::window().and_then(|w| w.performance()) else {
        return;
    };
    let end = p.now();
    let span = Object::new();
    let _ = Reflect::set(&span, &"start".into(), &JsValue::from_f64(end - ms));
    let _ = Reflect::set(&span, &"end".into(), &JsValue::from_f64(end));
    if let Ok(f) = Reflect::get(&p, &"measure".into()).and_then(|f| f.dyn_into::<Function>()) {
        let _ = f.call2(&p, &JsValue::from_str(name), &span);
    }
}

/// Measures from the last mark `from` to now.
pub fn measure(name: &str, from: &str) {
    if let Some(p) = web_sys::window().and_then(|w| w.performance()) {
        let _ = p.measure_with_start_mark(name, from);
    }
}

/// Starts the effects that keep `wb`'s results current.
pub fn keep_current(wb: Workbench) {
    let evaluator = StoredValue::new_local(Evaluator::new());
    // The library revision the fast path's evaluator holds.
    let held = StoredValue::new(None::<u64>);
    let timer = StoredValue::new_local(None::<gloo::timers::callback::Timeout>);
    // An answer for an earlier revision is dropped: the newest plan is already on its way.
    let evaluations = StoredValue::new_local(Evaluations::start(
        move |(r, result, ms): Outcome| {
            if let Some(ms) = ms {
                record("tc-worker-evaluate", ms);
            }
            if r != wb.rev.get_untracked() {
                return;
            }
            measure("tc-solve-and-simulate", "tc-eval-start");
            surface::publish(&wb.plan.get_untracked(), result.as_ref().ok());
            wb.eval.set(Some((r, result)));
        },
        move || wb.library.get_untracked(),
    ));
    // A page closed mid-stroke still keeps the last edit.
    let hide = window_event_listener(leptos::ev::pagehide, move |_| {
        storage::save(&wb.plan.get_untracked())
    });
    on_cleanup(move || hide.remove());
    Effect::new(move |_| {
        let p = wb.plan.get();
        let lib = wb.library_rev.get();
        let now = wb.rev.get();
        surface::pending();
        mark("tc-quick-start");
        let mut q = None;
        evaluator.update_value(|ev| {
            if held.get_value() != Some(lib) {
                ev.set_library(wb.library.get_untracked());
                held.set_value(Some(lib));
            }
            q = Some(ev.quick(&p));
        });
        measure("tc-quick", "tc-quick-start");
        match q.expect("evaluated") {
            Ok(q) => wb.quick.set(Some((now, q))),
            Err(e) => {
                wb.quick.set(None);
                wb.eval.set(Some((now, Err(e.to_string()))));
            }
        }
        // Autosave, the link and the full evaluation wait for the pause: a stroke pays for none.
        // The first evaluation has no strokes to wait for.
        let pause = if now == 1 { 0 } else { PAUSE_MS };
        let full = gloo::timers::callback::Timeout::new(pause, move || {
            let p = wb.plan.get_untracked();
            storage::save(&p);
            wb.link_len.set(storage::set_fragment(&p));
            mark("tc-eval-start");
            evaluations.with_value(|w| w.request(now, p, lib));
        });
        // Replacing the stored timeout cancels the one still waiting.
        timer.set_value(Some(full));
    });
}
