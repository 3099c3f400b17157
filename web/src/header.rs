//! The header: the plan's name, demos, a new blank tray, the unit and the share link.

use crate::form::num;
use crate::state::workbench;
use crate::units::Unit;
use leptos::prelude::*;
use traycast_plan::demos;
use traycast_plan::model::Plan;

/// The header bar; `help` shows the list of shortcuts.
#[component]
pub fn Header(help: RwSignal<bool>) -> impl IntoView {
    let wb = workbench();
    let unit = wb.unit;
    // A new tray starts from the size of the one shown.
    let (w0, h0, mm0) = wb
        .plan
        .with_untracked(|p| (p.tray.width, p.tray.height, p.tray.cell_mm));
    let blank_w = RwSignal::new(w0);
    let blank_h = RwSignal::new(h0);
    let blank_mm = RwSignal::new(mm0);
    let copied = RwSignal::new(false);
    let open_demo = move |ev: leptos::ev::Event| {
        if let Some(d) = demos::demo(&event_target_value(&ev)) {
            wb.edit(|p| *p = d);
        }
    };
    let new_blank = move |_| {
        let (w, h, mm) = (
            blank_w.get_untracked(),
            blank_h.get_untracked(),
            blank_mm.get_untracked(),
        );
        wb.edit(|p| *p = Plan::blank(w, h, mm));
    };
    let share = move |_| {
        if let Some(w) = web_sys::window() {
            let href = w.location().href().unwrap_or_default();
            let _ = w.navigator().clipboard().write_text(&href);
            copied.set(true);
        }
    };
    let flip_unit = move |_| {
        unit.update(|u| {
            *u = if *u == Unit::Celsius {
                Unit::Fahrenheit
            } else {
                Unit::Celsius
            }
        })
    };
    view! {
        <header>
            <h1>"Traycast"</h1>
            <input class="plan-name" data-testid="plan-name" aria-label="plan name" prop:value=move || wb.settings.with(|p| p.name.clone())
                on:change=move |ev| { let v = event_target_value(&ev); wb.edit(|p| p.name = v); } />
            <select aria-label="open a demo" data-testid="demo-picker" on:change=open_demo>
                <option value="">"Open a demo (illustrative)…"</option>
                {demos::DEMOS.iter().map(|d| view! { <option value=*d>{*d}</option> }).collect_view()}
            </select>
            <label title="The size of a new blank tray (the tray shown is described above it)">"New tray: cells"<input id="blank-w" aria-label="new tray width (cells)" class="short" type="number" min="1" max="128" prop:value=move || blank_w.get().to_string() on:change=move |ev| if let Some(v) = num(&ev) { blank_w.set((v as usize).clamp(1, 128)); } />
                "×"<input id="blank-h" aria-label="new tray height (cells)" class="short" type="number" min="1" max="128" prop:value=move || blank_h.get().to_string() on:change=move |ev| if let Some(v) = num(&ev) { blank_h.set((v as usize).clamp(1, 128)); } />
                "of"<input id="blank-mm" aria-label="new tray cell size (mm)" class="short" type="number" min="1" max="100" prop:value=move || blank_mm.get().to_string() on:change=move |ev| if let Some(v) = num(&ev) { blank_mm.set(v.clamp(1.0, 100.0)); } />"mm"</label>
            <button id="new-blank" on:click=new_blank>"New blank tray"</button>
            <span class="spacer"></span>
            <button id="unit" data-testid="unit" on:click=flip_unit>{move || format!("Show {}", if unit.get() == Unit::Celsius { "°F" } else { "°C" })}</button>
            <button id="share" on:click=share>"Copy share link"</button>
            <button id="show-shortcuts" data-testid="show-shortcuts" title="Keyboard shortcuts (key ?)" aria-label="keyboard shortcuts" aria-expanded=move || help.get().to_string() on:click=move |_| help.update(|h| *h = !*h)>"?"</button>
            <span class="link-len" id="link-len">{move || format!("{} {} characters", if copied.get() { "copied," } else { "link" }, wb.link_len.get())}</span>
        </header>
        <div id="notice" data-testid="notice" role="status" class:hidden=move || wb.notice.get().is_none()>
            <span>{move || wb.notice.get().unwrap_or_default()}</span>
            <button on:click=move |_| wb.notice.set(None)>"Dismiss"</button>
        </div>
    }
}
