//! What steering buys: two outcomes side by side — maps on one scale, time, each item's verdict
//! and how evenly it heats. Either the plan steered against the same tray heated unsteered, or an
//! outcome pinned earlier (another objective, oven or library) against the current one.

use crate::draw::{self, Scale};
use crate::state::workbench;
use crate::units::Unit;
use leptos::html;
use leptos::prelude::*;
use traycast_plan::evaluate::{Evaluation, Uniformity, verdict_words};
use traycast_plan::model::Plan;

/// Drawing width of each compared map, px.
const MAP_PX: f64 = 260.0;

/// Which two outcomes are compared.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Mode {
    /// The current plan steered against every configuration alike for the baseline's time.
    Unsteered,
    /// An outcome pinned earlier against the current one.
    Pinned,
}

/// An outcome kept for comparison.
#[derive(Clone, Debug)]
struct Pin {
    label: String,
    plan: Plan,
    eval: Evaluation,
}

/// One column of the comparison.
#[derive(Clone, Debug, PartialEq)]
struct Side {
    short: &'static str,
    title: String,
    plan: Plan,
    temps: Vec<f64>,
    seconds: f64,
    rows: Vec<(String, String, Uniformity)>,
}

fn cv(u: &Uniformity) -> String {
    let part = |v: f64, f: &dyn Fn(f64) -> String| if v.is_finite() { f(v) } else { "—".into() };
    format!(
        "CV {} · spread {} · in band {}",
        part(u.cv, &|v| format!("{v:.2}")),
        part(u.spread_k, &|v| format!("{v:.1} K")),
        part(u.in_band, &|v| format!("{:.0} %", 100.0 * v))
    )
}

/// The two sides: (A, B).
fn sides(
    mode: Mode,
    plan: &Plan,
    e: &Evaluation,
    pin: Option<&Pin>,
    u: Unit,
) -> Option<(Side, Side)> {
    let verdicts = |p: &Plan, e: &Evaluation| -> Vec<(String, String, Uniformity)> {
        p.items
            .iter()
            .zip(&e.items)
            .zip(&e.uniformity)
            .map(|((it, s), un)| {
                let words = verdict_words(&s.verdict, e.illustrative());
                (
                    it.name.clone(),
                    format!("{words}; coldest point {}", u.fmt(s.min)),
                    un.steered_simulated,
                )
            })
            .collect()
    };
    match mode {
        Mode::Unsteered => {
            let rows = |steered: bool| -> Vec<(String, String, Uniformity)> {
                plan.items
                    .iter()
                    .zip(&e.uniformity)
                    .map(|(it, un)| {
                        let fig = if steered {
                            un.steered_linear
                        } else {
                            un.unsteered_linear
                        };
                        (it.name.clone(), String::new(), fig)
                    })
                    .collect()
            };
            Some((
                Side {
                    short: "Unsteered",
                    title: format!(
                        "Unsteered: every configuration alike, {:.0} s (linear prediction)",
                        e.baseline.seconds
                    ),
                    plan: plan.clone(),
                    temps: e.baseline.temps.clone(),
                    seconds: e.baseline.seconds,
                    rows: rows(false),
                },
                Side {
                    short: "Steered",
                    title: format!("Steered: this plan, {:.1} s (linear prediction)", e.total_s),
                    plan: plan.clone(),
                    temps: e.linear.clone(),
                    seconds: e.total_s,
                    rows: rows(true),
                },
            ))
        }
        Mode::Pinned => {
            let pin = pin?;
            Some((
                Side {
                    short: "A, pinned",
                    title: format!("A, pinned: {} (coldest point after standing)", pin.label),
                    plan: pin.plan.clone(),
                    temps: pin.eval.course.after_standing.clone(),
                    seconds: pin.eval.total_s,
                    rows: verdicts(&pin.plan, &pin.eval),
                },
                Side {
                    short: "B, now",
                    title: format!("B, now: {} (coldest point after standing)", label_of(plan)),
                    plan: plan.clone(),
                    temps: e.course.after_standing.clone(),
                    seconds: e.total_s,
                    rows: verdicts(plan, e),
                },
            ))
        }
    }
}

fn label_of(p: &Plan) -> String {
    format!("{}, {}", p.name, p.planning.objective.as_str())
}

/// The compare view.
#[component]
pub fn Compare() -> impl IntoView {
    let wb = workbench();
    let mode = RwSignal::new(Mode::Unsteered);
    let pin = RwSignal::new(None::<Pin>);
    let (a_ref, b_ref) = (
        NodeRef::<html::Canvas>::new(),
        NodeRef::<html::Canvas>::new(),
    );
    // The two sides, derived once per change for the maps, the captions and the table.
    let sides = Memo::new(move |_| {
        let (m, u) = (mode.get(), wb.unit.get());
        wb.with_current(|e| {
            wb.plan
                .with_untracked(|p| pin.with(|pin| sides(m, p, e, pin.as_ref(), u)))
        })
        .flatten()
    });
    Effect::new(move |_| {
        let u = wb.unit.get();
        sides.with(|s| {
            let Some((a, b)) = s else { return };
            let scale = Scale::spanning(&[&a.temps, &b.temps]);
            for (side, r) in [(a, a_ref), (b, b_ref)] {
                if let Some(c) = r.get() {
                    draw::heatmap(
                        &c,
                        &side.plan,
                        &side.temps,
                        draw::cell_px(&side.plan, MAP_PX),
                        scale,
                        u,
                        &side.title,
                    );
                }
            }
        });
    });
    let pin_now = move |_| {
        let label = wb.plan.with_untracked(label_of);
        if let Some(eval) = wb.with_current(Clone::clone) {
            pin.set(Some(Pin {
                label,
                plan: wb.plan.get_untracked(),
                eval,
            }));
            mode.set(Mode::Pinned);
        } else {
            wb.notice.set(Some(
                "The plan is still being solved: pin it once its outcome is shown.".into(),
            ));
        }
    };
    let table = move || {
        sides.with(|s| s.as_ref().map(|(a, b)| {
            let rows = a.rows.iter().zip(&b.rows).map(|((name, va, ua), (_, vb, ub))| view! {
                <tr><th scope="row">{name.clone()}</th><td>{va.clone()}<div class="rule">{cv(ua)}</div></td><td>{vb.clone()}<div class="rule">{cv(ub)}</div></td></tr>
            }).collect_view();
            view! {
                <table class="compare-table" id="compare-table" data-testid="compare-table">
                    <thead><tr><th></th><th>{a.short}</th><th>{b.short}</th></tr></thead>
                    <tbody>
                        <tr><th scope="row">"objective"</th><td>{a.plan.planning.objective.as_str()}</td><td>{b.plan.planning.objective.as_str()}</td></tr>
                        <tr><th scope="row">"heating time"</th><td>{format!("{:.1} s", a.seconds)}</td><td>{format!("{:.1} s", b.seconds)}</td></tr>
                        {rows}
                    </tbody>
                </table>
            }
        }))
    };
    let on_mode = move |ev: leptos::ev::Event| {
        mode.set(if event_target_value(&ev) == "pinned" {
            Mode::Pinned
        } else {
            Mode::Unsteered
        })
    };
    view! {
        <section class="compare" id="compare" data-testid="compare">
            <h2>"Compare"</h2>
            <div class="row">
                <select id="compare-mode" data-testid="compare-mode" aria-label="what to compare" on:change=on_mode prop:value=move || if mode.get() == Mode::Pinned { "pinned" } else { "unsteered" }>
                    <option value="unsteered">"Steered against unsteered"</option>
                    <option value="pinned">"Pinned outcome A against now (B)"</option>
                </select>
                <button id="pin" data-testid="pin" on:click=pin_now title="Keep this outcome as A; change the objective, oven or library, and compare">"Pin this outcome as A"</button>
            </div>
            <p class="hint" class:hidden=move || mode.get() != Mode::Pinned || pin.with(Option::is_some)>"Nothing pinned yet: pin an outcome, change the plan, and the two show side by side."</p>
            <div class="maps">
                <figure><figcaption>{move || sides.with(|s| s.as_ref().map(|(a, _)| a.title.clone()))}</figcaption><canvas id="compare-a" node_ref=a_ref></canvas></figure>
                <figure><figcaption>{move || sides.with(|s| s.as_ref().map(|(_, b)| b.title.clone()))}</figcaption><canvas id="compare-b" node_ref=b_ref></canvas></figure>
            </div>
            {table}
            <p class="hint">"CV: coefficient of variation of the rise σ/(T̄ − T₀); spread: warmest − coldest cell; in band: share of targeted cells. Both maps share one temperature scale."</p>
        </section>
    }
}
