//! The outcome: heating time, each item's temperatures and verdict at the point judged, each
//! zone's coverage and why it misses, the unsteered baseline and the warnings.

use crate::state::workbench;
use leptos::prelude::*;
use traycast_plan::model::MapSource;
use wasm_bindgen::JsCast;

/// The outcome of the latest evaluation (the previous one stays up while the next is computed).
#[component]
pub fn Outcome() -> impl IntoView {
    let wb = workbench();
    let summary = move || {
        wb.with_latest(|e| match e {
            None => view! { <p>"Solving…"</p> }.into_any(),
            Some(Err(msg)) => {
                // A plan pointed at a library this browser does not hold: offer to import it.
                let wanted = wb.plan.with_untracked(|p| match &p.maps {
                    MapSource::Library { name, .. } if wb.library.with_untracked(|l| l.as_ref().is_none_or(|l| l.name != *name)) => Some(name.clone()),
                    _ => None,
                });
                let pick = move |_| {
                    if let Some(input) = web_sys::window().and_then(|w| w.document()).and_then(|d| d.get_element_by_id("import-library")).and_then(|e| e.dyn_into::<web_sys::HtmlElement>().ok()) {
                        input.click();
                    }
                };
                view! {
                    <p class="error" role="alert">{format!("This plan cannot be solved: {msg}")}</p>
                    {wanted.map(|name| view! { <button id="offer-import" data-testid="offer-import" on:click=pick>{format!("Import map library '{name}'…")}</button> })}
                }.into_any()
            }
            Some(Ok(e)) => {
                let p = wb.plan.get_untracked();
                let u = wb.unit.get();
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
                    // Why it misses reads as a sentence: its own full-width row under the numbers.
                    let diag = s.diagnosis.as_ref().map(|d| view! { <tr class="why"><td class="diagnosis" colspan="4">{d.to_string()}</td></tr> });
                    view! {
                        <tr><td>{z.name.clone()}</td><td>{format!("{:.0} %", 100.0 * s.coverage_linear)}</td><td>{format!("{:.0} %", 100.0 * s.coverage_simulated)}</td>
                        <td>{format!("{:.1}", u.diff(s.rms_simulated))}</td></tr>
                        {diag}
                    }
                }).collect_view();
                let budget = p.oven.budget_s.map_or("no budget".to_string(), |b| format!("of {b:.0} s"));
                view! {
                    <p class="total" data-total=format!("{:.3}", e.total_s)>{format!("Heating {:.1} s {budget}, then {:.0} s standing", e.total_s, p.oven.standing_s)}</p>
                    <p class="bounds-from">{e.bounds_from.clone().map(|b| format!("Verdicts are judged on {b}."))}</p>
                    <table class="items"><thead><tr><th>"food item"</th><th>"coldest point"</th><th>"mean"</th><th>"hottest point"</th>{with_spread.then(|| view! { <th>"coldest, 95 % joint"</th><th>"mean, 95 % joint"</th> })}<th>"in band"</th><th>"verdict, point judged, rule"</th><th>"moisture lost"</th></tr></thead><tbody>{items}</tbody></table>
                    <table class="zones"><thead><tr><th>"zone"</th><th>"in band, linear"</th><th>"in band, simulated"</th><th>{format!("RMS off ({})", u.diff_symbol())}</th></tr></thead><tbody>{zones}</tbody></table>
                    <p class="baseline">{format!("Without steering (all configurations alike, {:.0} s): {:.0} % of targeted cells in band, RMS {:.1} off — with steering: see the zones above.", e.baseline.seconds, 100.0 * e.baseline.coverage_linear, u.diff(e.baseline.rms_linear))}</p>
                    <ul class="warnings">{e.warnings.iter().map(|w| view! { <li>{w.clone()}</li> }).collect_view()}</ul>
                }.into_any()
            }
        })
    };
    view! { <div id="summary" data-testid="summary">{summary}</div> }
}
