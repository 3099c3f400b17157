//! The oven panel: power, configurations, budget and limits, the controller's step and sequencing,
//! standing, heating from below, the tray's capacity, and how much a real oven and start may vary.

use crate::form::num;
use crate::state::workbench;
use leptos::prelude::*;
use traycast_plan::model::Sequencing;

/// The oven panel.
#[component]
pub fn Oven() -> impl IntoView {
    let wb = workbench();
    let unit = wb.unit;
    let rounds = move || {
        wb.settings.with(|p| match p.oven.sequencing {
            Sequencing::Blocks => "1".to_string(),
            Sequencing::Rounds(r) => r.to_string(),
        })
    };
    let optional = |v: Option<f64>| v.map(|b| b.to_string()).unwrap_or_default();
    view! {
        <h2>"Oven"</h2>
        <label>"Rated power (W)"<input type="number" prop:value=move || wb.settings.with(|p| p.oven.power_w.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.oven.power_w = v); } /></label>
        <label>"Configurations"<input type="number" prop:value=move || wb.settings.with(|p| p.oven.configs.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.oven.configs = (v as usize).clamp(1, 512)); } /></label>
        <label>"Time budget (s)"<input id="budget" type="number" placeholder="none" prop:value=move || wb.settings.with(|p| optional(p.oven.budget_s)) on:change=move |ev| { let v = num(&ev); wb.edit(|p| p.oven.budget_s = v); } /></label>
        <label>"Limit per configuration (s)"<input type="number" placeholder="none" prop:value=move || wb.settings.with(|p| optional(p.oven.limit_s)) on:change=move |ev| { let v = num(&ev); wb.edit(|p| p.oven.limit_s = v); } /></label>
        <label>"Dwell quantum (s)"<input type="number" step="0.1" prop:value=move || wb.settings.with(|p| p.oven.quantum_s.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.oven.quantum_s = v); } /></label>
        <label>"Rounds (1 = blocks)"<input type="number" min="1" max="100" prop:value=rounds on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.oven.sequencing = if v <= 1.0 { Sequencing::Blocks } else { Sequencing::Rounds(v.min(100.0) as u16) }); } /></label>
        <label>"Standing time (s)"<input type="number" prop:value=move || wb.settings.with(|p| p.oven.standing_s.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.oven.standing_s = v); } /></label>
        <label title="0: the tray lets no energy through its base (the conservative default); 0.5: food heated equally from both faces">"Share of power from below (0–1)"<input type="number" min="0" max="1" step="0.05" prop:value=move || wb.settings.with(|p| p.heating.from_below.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.heating.from_below = v); } /></label>
        <label title="Heat the tray stores under each square metre of food; 0: an insulated bottom that stores none (about 1400 for a thin plastic tray)">"Tray heat capacity (J/(m²·K))"<input type="number" min="0" max="1000000" step="100" prop:value=move || wb.settings.with(|p| p.heating.tray_capacity.to_string()) on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.heating.tray_capacity = v); } /></label>
        <label title="How much weaker (or stronger) a real oven may heat than the maps say; the verdicts are judged on the worst (default 15 %: warm ovens lose output)">"Oven power varies by ± (%)"<input id="variation-power" type="number" min="0" max="50" step="1" prop:value=move || wb.settings.with(|p| (100.0 * p.variation.oven_power).round().to_string()) on:change=move |ev| if let Some(v) = num(&ev) { wb.edit(|p| p.variation.oven_power = v / 100.0); } /></label>
        <label title="How much colder (or warmer) the food may start than planned; the verdicts are judged on the worst">{move || format!("Start varies by ± ({})", unit.get().diff_symbol())}<input id="variation-start" type="number" min="0" step="0.5" prop:value=move || wb.settings.with(|p| unit.get().diff(p.variation.start_k).to_string()) on:change=move |ev| if let Some(v) = num(&ev) { let k = v / unit.get_untracked().diff(1.0); wb.edit(|p| p.variation.start_k = k); } /></label>
    }
}
