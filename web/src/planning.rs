//! What the schedule is planned for — the objective and the placement scenarios — and what the
//! planning did: the simulation loop's report and how evenly each item heats, steered against
//! unsteered.

use crate::state::workbench;
use leptos::prelude::*;
use traycast_plan::evaluate::Uniformity;
use traycast_plan::{Objective, Planning};

fn label(o: Objective) -> &'static str {
    match o {
        Objective::BandFit => "Band fit",
        Objective::SafeMinimum => "Safe minimum",
        Objective::Shortest => "Shortest",
        Objective::MaxMargin => "Max margin",
    }
}

/// The objective picker and the placement switch.
#[component]
pub fn PlanningPanel() -> impl IntoView {
    let wb = workbench();
    let current = move || wb.settings.with(|p| p.planning);
    let set = move |planning: Planning| wb.edit(|p| p.planning = planning);
    let on_objective = move |ev: leptos::ev::Event| {
        if let Ok(o) = Objective::parse(&event_target_value(&ev), "objective") {
            let mut next = current();
            next.objective = o;
            // Placement scenarios hold hard limits, which the band fit has none of.
            next.placement &= o.is_constrained();
            set(next);
        }
    };
    let on_placement = move |ev: leptos::ev::Event| {
        let mut next = current();
        next.placement = event_target_checked(&ev);
        set(next);
    };
    view! {
        <h2>"Plan for"</h2>
        <label>"Objective"
            <select id="objective" data-testid="objective" on:change=on_objective prop:value=move || current().objective.as_str()>
                {Objective::ALL.map(|o| view! { <option value=o.as_str() title=o.words()>{label(o)}</option> }).collect_view()}
            </select>
        </label>
        <p class="hint" id="objective-words">{move || current().objective.words()}</p>
        <label class="check" title="Every hard limit must also hold with the food set down one cell left, right, up or down">
            <input id="placement" type="checkbox" prop:disabled=move || !current().objective.is_constrained() prop:checked=move || current().placement on:change=on_placement />
            "Hold the limits with the food one cell off"
        </label>
    }
}

fn figure(u: &Uniformity) -> String {
    let cv = if u.cv.is_finite() {
        format!("{:.2}", u.cv)
    } else {
        "—".into()
    };
    let spread = if u.spread_k.is_finite() {
        format!("{:.1} K", u.spread_k)
    } else {
        "—".into()
    };
    let band = if u.in_band.is_finite() {
        format!("{:.0} %", 100.0 * u.in_band)
    } else {
        "—".into()
    };
    format!("{cv} · {spread} · {band}")
}

/// The simulation loop's report and the uniformity table of the current evaluation.
#[component]
pub fn PlanningReport() -> impl IntoView {
    let wb = workbench();
    let plan = wb.plan;
    let report = move || {
        wb.with_latest(|e| {
            let Some(Ok(e)) = e else { return None };
            let loop_line = e.refinement.as_ref().map(|r| {
                format!(
                    "Simulation in the loop: {} solves, {} (last change {:.2} K; tolerance {} K). Band error after standing {:.2} → {:.2} K RMS.{}",
                    r.passes,
                    if r.converged { "settled" } else { "stopped at its cap, not settled" },
                    r.change_k,
                    r.tolerance_k,
                    r.rms_before,
                    r.rms_after,
                    if r.safety_gap_k > 0.0 {
                        format!(" An item still misses its safety limit by {:.1} K.", r.safety_gap_k)
                    } else {
                        String::new()
                    }
                ) + &r
                    .stopped
                    .as_ref()
                    .map(|w| format!(" Stopped early, keeping the best plan so far: {w}"))
                    .unwrap_or_default()
            });
            let rows = plan.with_untracked(|p| {
                p.items
                    .iter()
                    .zip(&e.uniformity)
                    .map(|(it, u)| {
                        (
                            it.name.clone(),
                            figure(&u.steered_simulated),
                            figure(&u.steered_linear),
                            figure(&u.unsteered_linear),
                        )
                    })
                    .collect::<Vec<_>>()
            });
            Some((loop_line, rows))
        })
    };
    view! {
        <div id="planning-report">
            {move || report().map(|(loop_line, rows)| view! {
                {loop_line.map(|l| view! { <p id="loop-report" data-testid="loop-report">{l}</p> })}
                <table class="uniformity" id="uniformity" data-testid="uniformity">
                    <caption>"How evenly each food heats: CV of the rise σ/(T̄ − T₀) (population σ over the cells) · warmest − coldest cell · share of targeted cells in band"</caption>
                    <thead><tr><th>"food"</th><th>"steered, simulated"</th><th>"steered, linear"</th><th>"unsteered, linear"</th></tr></thead>
                    <tbody>{rows.into_iter().map(|(n, a, b, c)| view! { <tr><td>{n}</td><td>{a}</td><td>{b}</td><td>{c}</td></tr> }).collect_view()}</tbody>
                </table>
            })}
        </div>
    }
}
