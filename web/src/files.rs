//! The files panel: import maps, calibrate from heating runs, open and save plans, export the
//! schedule, print. Files are read whole in the browser; each reader checks its own limit, and a
//! refused file leaves the plan as it was.

use crate::state::{Workbench, workbench};
use leptos::prelude::*;
use traycast_plan::calibrate;
use traycast_plan::library::MapLibrary;
use traycast_plan::runs::{self, HeatingRuns, ReadOptions, RunRecipe};
use traycast_plan::wire;
use wasm_bindgen::JsCast;

/// Offers `text` as a download named `name`.
pub fn download(name: &str, mime: &str, text: &str) {
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

/// Offers what `url` points at as a download named `name`.
pub fn download_url(name: &str, url: &str) {
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

/// Reads the file chosen in a file input as text and hands it to `then` (read errors and files
/// too large for any reader go to the notice).
fn read_picked_file(ev: &leptos::ev::Event, wb: Workbench, then: impl FnOnce(String) + 'static) {
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
    let max = runs::MAX_RUNS_BYTES as u64;
    if file.size() > max {
        wb.notice.set(Some(format!(
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
            Err(e) => wb
                .notice
                .set(Some(format!("The file could not be read: {e}"))),
        }
    });
}

fn import_library(wb: Workbench, text: String) {
    match MapLibrary::parse(&text) {
        Ok(lib) => {
            let (name, configs) = (lib.name.clone(), lib.configs);
            let kept = wb.use_library(lib, |p| p.oven.configs = configs);
            let kept = kept.map(|why| format!(" Note: {why}.")).unwrap_or_default();
            wb.notice
                .set(Some(format!("Map library '{name}' imported.{kept}")));
        }
        Err(e) => wb
            .notice
            .set(Some(format!("The map library was refused: {e}"))),
    }
}

fn calibrate_from(wb: Workbench, text: String, fahrenheit: bool) {
    let layout = wb.plan.get_untracked();
    let result = HeatingRuns::parse(&text, &layout, ReadOptions { fahrenheit }).and_then(|runs| {
        calibrate::calibrate(&runs, &layout, &calibrate::Settings::default())
            .map(|c| (c.probe_table(&runs), c))
    });
    match result {
        Ok((table, cal)) => {
            let (name, runs) = (cal.library.name.clone(), cal.report.runs);
            wb.quality.set(Some((cal.report, table)));
            let kept = wb.use_library(cal.library, |_| {});
            let kept = kept.map(|why| format!(" Note: {why}.")).unwrap_or_default();
            wb.notice.set(Some(format!(
                "Calibrated '{name}' from {runs} runs on this tray; the quality report is under the outcome.{kept}"
            )));
        }
        Err(e) => wb.notice.set(Some(format!(
            "The heating runs were refused (the plan is unchanged): {e}"
        ))),
    }
}

fn export_schedule(wb: Workbench) {
    let p = wb.plan.get_untracked();
    let csv = wb.with_current(|e| wire::schedule_csv(&p, &e.schedule));
    match csv {
        Some(csv) => download("schedule.csv", "text/csv", &csv),
        None => wb.notice.set(Some(
            "The plan is still being solved, or has no schedule: export it once its outcome is shown."
                .into(),
        )),
    }
}

fn invent_runs(wb: Workbench) {
    match runs::heating_runs(&wb.plan.get_untracked(), &RunRecipe::default()) {
        Ok(t) => download("illustrative-runs.csv", "text/csv", &t),
        Err(e) => wb.notice.set(Some(format!(
            "No runs could be invented for this tray: {e}"
        ))),
    }
}

/// The files panel.
#[component]
pub fn Files() -> impl IntoView {
    let wb = workbench();
    let on_library =
        move |ev: leptos::ev::Event| read_picked_file(&ev, wb, move |t| import_library(wb, t));
    let on_runs = move |ev: leptos::ev::Event| {
        let fahrenheit = wb.runs_in_f.get_untracked();
        read_picked_file(&ev, wb, move |t| calibrate_from(wb, t, fahrenheit));
    };
    let on_plan = move |ev: leptos::ev::Event| {
        read_picked_file(&ev, wb, move |text| match wire::from_json(&text) {
            Ok(p) => wb.edit(|cur| *cur = p),
            Err(e) => wb
                .notice
                .set(Some(format!("The plan file was refused: {e}"))),
        });
    };
    let save_plan = move |_| {
        download(
            "plan.traycast.json",
            "application/json",
            &wire::to_json(&wb.plan.get_untracked()),
        )
    };
    let print = move |_| {
        if let Some(w) = web_sys::window() {
            let _ = w.print();
        }
    };
    view! {
        <h2>"Files"</h2>
        <label class="file">"Import heating maps (CSV/JSON)"<input id="import-library" data-testid="import-library" type="file" accept=".csv,.json,text/csv,application/json" on:change=on_library /></label>
        <label class="file">"Calibrate from heating runs (CSV)"<input id="import-runs" data-testid="import-runs" type="file" accept=".csv,text/csv" on:change=on_runs /></label>
        <label class="check"><input id="runs-fahrenheit" type="checkbox" prop:checked=move || wb.runs_in_f.get() on:change=move |ev| wb.runs_in_f.set(event_target_checked(&ev)) />"runs are in °F"</label>
        <button on:click=move |_| invent_runs(wb)>"Invent bench runs for this tray (illustrative)"</button>
        <label class="file">"Open plan file"<input id="import-plan" data-testid="import-plan" type="file" accept=".json,application/json" on:change=on_plan /></label>
        <div class="row">
            <button on:click=save_plan>"Save plan"</button>
            <button on:click=move |_| export_schedule(wb)>"Export schedule"</button>
            <button on:click=print>"Print report"</button>
        </div>
    }
}
