//! The Traycast browser workbench: paint a tray, watch the plan redraw live, share it as a link.
//!
//! A Leptos client-side app on the plan crate compiled to wasm; no server. The numbers it shows come
//! from `traycast-plan`; this crate only edits, draws and stores.

use wasm_bindgen::JsCast;

mod app;
mod board;
mod brush;
mod cards;
mod compare;
mod compute;
mod draw;
mod files;
mod foods;
mod form;
mod header;
mod history;
mod outcome;
mod oven;
mod paint;
mod pinch;
mod planning;
mod quality;
mod report;
mod shortcuts;
mod simview;
mod state;
mod storage;
mod strokes;
mod surface;
mod units;
mod views;
mod worker;

fn main() {
    // The same program runs in the evaluation worker: there it only answers plans.
    if let Ok(scope) = js_sys::global().dyn_into::<web_sys::DedicatedWorkerGlobalScope>() {
        console_error_panic_hook::set_once();
        worker::serve(scope);
        return;
    }
    std::panic::set_hook(Box::new(|info| {
        console_error_panic_hook::hook(info);
        // Recoverable message instead of a dead page.
        if let Some(el) = web_sys::window()
            .and_then(|w| w.document())
            .and_then(|d| d.get_element_by_id("panic"))
        {
            el.set_text_content(Some("Something went wrong inside the workbench. Your plan is autosaved: reload the page to continue."));
            let _ = el.set_attribute("style", "display:block");
        }
    }));
    surface::install();
    if let Some(sw) = web_sys::window().map(|w| w.navigator().service_worker()) {
        let _ = sw.register("sw.js");
    }
    worker::start_early();
    leptos::mount::mount_to_body(app::App);
}
