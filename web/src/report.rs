//! The printed report's own part: the plan it describes (foods, targets, oven settings, what it
//! is planned for) and the schedule, shown only on paper. The maps, the outcome, the safety cards
//! and the cautions print from the page itself.

use crate::state::workbench;
use leptos::prelude::*;
use traycast_plan::model::Sequencing;
use traycast_thermal::catalogue;

/// The plan and schedule, for print only.
#[component]
pub fn PrintedPlan() -> impl IntoView {
    let wb = workbench();
    let plan = move || {
        let u = wb.unit.get();
        wb.settings.with(|p| {
            let foods = p.items.iter().map(|it| {
                let food = catalogue::find(&it.food).map_or(it.food.clone(), |f| f.name.to_string());
                view! { <tr><td>{it.name.clone()}</td><td>{food}</td><td>{format!("{:.0} mm", it.thickness_mm)}</td><td>{u.fmt(it.start_c)}</td><td>{if it.covered { "yes" } else { "no" }}</td></tr> }
            }).collect_view();
            let zones = p.zones.iter().map(|z| {
                let cap = z.cap_c.map_or("—".to_string(), |c| u.fmt(c));
                view! { <tr><td>{z.name.clone()}</td><td>{format!("{} – {}", u.fmt(z.min_c), u.fmt(z.max_c))}</td><td>{z.weight}</td><td>{cap}</td></tr> }
            }).collect_view();
            let o = &p.oven;
            let or_none = |v: Option<f64>| v.map_or("none".to_string(), |v| format!("{v} s"));
            let rounds = match o.sequencing {
                Sequencing::Blocks => "one block per configuration".to_string(),
                Sequencing::Rounds(r) => format!("{r} interleaved rounds"),
            };
            let oven = format!(
                "{} W rated, {} configurations, budget {}, limit per configuration {}, dwell step {} s, {rounds}, standing {} s; power from below {:.2}; tray capacity {} J/(m²·K); judged allowing oven power ±{:.0} % and start ±{:.1} {}; planned for {} ({})",
                o.power_w, o.configs, or_none(o.budget_s), or_none(o.limit_s), o.quantum_s, o.standing_s,
                p.heating.from_below, p.heating.tray_capacity, 100.0 * p.variation.oven_power,
                u.diff(p.variation.start_k), u.diff_symbol(), p.planning.objective.as_str(), p.planning.objective.words()
            );
            view! {
                <h2>{format!("Plan: {}", p.name)}</h2>
                <p>{format!("Tray {} × {} cells of {} mm. {oven}.", p.tray.width, p.tray.height, p.tray.cell_mm)}</p>
                <table class="print-table"><thead><tr><th>"food item"</th><th>"food"</th><th>"thickness"</th><th>"start"</th><th>"covered"</th></tr></thead><tbody>{foods}</tbody></table>
                <table class="print-table"><thead><tr><th>"target"</th><th>"band"</th><th>"weight"</th><th>"cap"</th></tr></thead><tbody>{zones}</tbody></table>
            }
        })
    };
    let schedule = move || {
        wb.with_current(|e| {
            let steps = e.schedule.steps.iter().enumerate().map(|(k, s)| {
                view! { <tr><td>{k + 1}</td><td>{s.config}</td><td>{format!("{:.1}", s.seconds)}</td></tr> }
            }).collect_view();
            view! {
                <h2>{format!("Schedule: {:.1} s of heating in {} steps", e.total_s, e.schedule.steps.len())}</h2>
                <table class="print-table"><thead><tr><th>"step"</th><th>"configuration"</th><th>"seconds"</th></tr></thead><tbody>{steps}</tbody></table>
            }
        })
    };
    view! {
        <section class="print-only" id="printed-plan" data-testid="printed-plan">
            {plan}
            {schedule}
        </section>
    }
}
