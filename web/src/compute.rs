//! Keeping the results up with the plan: on every change the fast path (warm solve and linear
//! prediction) runs at once, the plan is autosaved and the link rewritten; once the strokes pause
//! the full evaluation is asked of the worker, and its answer is kept only for the revision it
//! belongs to.

use crate::state::Workbench;
use crate::storage;
use crate::surface;
use crate::worker::{Evaluations, Outcome};
use leptos::prelude::*;
use traycast_plan::evaluate::Evaluator;

/// Milliseconds of quiet after a change before the full evaluation is asked for.
const PAUSE_MS: u32 = 30;

/// Sets a performance mark (read by `cargo xtask bench-web`).
pub fn mark(name: &str) {
    if let Some(p) = web_sys::window().and_then(|w| w.performance()) {
        let _ = p.mark(name);
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
        move |(r, result): Outcome| {
            if r != wb.rev.get_untracked() {
                return;
            }
            measure("tc-solve-and-simulate", "tc-eval-start");
            surface::publish(&wb.plan.get_untracked(), result.as_ref().ok());
            wb.eval.set(Some((r, result)));
        },
        move || wb.library.get_untracked(),
    ));
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
        storage::save(&p);
        wb.link_len.set(storage::set_fragment(&p));
        let full = gloo::timers::callback::Timeout::new(PAUSE_MS, move || {
            mark("tc-eval-start");
            evaluations.with_value(|w| w.request(now, wb.plan.get_untracked(), lib));
        });
        // Replacing the stored timeout cancels the one still waiting.
        timer.set_value(Some(full));
    });
}
