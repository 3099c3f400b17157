//! The safety cards: one per food item, the same lines the command line prints and the JSON
//! summary carries (the point judged and where, its temperature and bound, the kill, the stand,
//! the rule), in the unit the user picked, with the cautions beside them.

use crate::state::workbench;
use leptos::prelude::*;
use traycast_plan::evaluate::SafetyCard;
use traycast_thermal::safety::CAUTIONS;

/// The cards of the current evaluation, and the cautions.
#[component]
pub fn SafetyCards() -> impl IntoView {
    let wb = workbench();
    let (plan, unit) = (wb.plan, wb.unit);
    let cards = move || {
        wb.with_latest(|e| {
            let Some(Ok(e)) = e else { return Vec::new() };
            let u = unit.get();
            plan.with_untracked(|p| {
                SafetyCard::all(p, e)
                    .into_iter()
                    .map(|card| {
                        let lines = card.lines(&|t| u.fmt(t), &|d| {
                            format!("{:+.1} {}", u.diff(d), u.diff_symbol())
                        });
                        (card.safe, lines)
                    })
                    .collect()
            })
        })
    };
    view! {
        <div class="safety" id="safety-cards" data-testid="safety-cards">
            <h2>"Safety cards"</h2>
            <div class="cards">
                {move || cards().into_iter().map(|(safe, lines)| {
                    let mut lines = lines.into_iter();
                    let head = lines.next().unwrap_or_default();
                    view! {
                        <article class="card" class:unsafe=!safe>
                            <h3>{head}</h3>
                            <ul>{lines.map(|l| view! { <li>{l}</li> }).collect_view()}</ul>
                        </article>
                    }
                }).collect_view()}
            </div>
            <aside class="cautions" id="cautions" data-testid="cautions">
                <h3>"Before you serve"</h3>
                <ul>{CAUTIONS.iter().map(|c| view! { <li>{*c}</li> }).collect_view()}</ul>
            </aside>
        </div>
    }
}
