//! The calibration quality report: per configuration, the fit quality, outliers, suspect probes
//! and repeatability, with the notes, and the calibrated library and per-probe table to save.

use crate::files::download;
use crate::state::workbench;
use leptos::prelude::*;

/// The report of the last calibration, when there is one.
#[component]
pub fn CalibrationQuality() -> impl IntoView {
    let wb = workbench();
    move || {
        wb.quality.with(|q| {
            q.as_ref().map(|(r, _)| {
                let pct = |v: f64| if v.is_finite() { format!("{:.1} %", 100.0 * v) } else { "—".into() };
                let rows = r.configs.iter().map(|c| {
                    let repeat = c.repeat.as_ref().map_or("single run".to_string(), |x| format!("{} cells, median Δ {}, {} beyond 3 SE", x.cells, pct(x.median_relative_difference), x.disagreeing));
                    view! {
                        <tr><td>{c.config}</td><td>{c.runs.join(", ")}</td><td>{c.measured}</td><td>{c.filled}</td>
                        <td>{if c.median_r2.is_finite() { format!("{:.4}", c.median_r2) } else { "—".into() }}</td>
                        <td>{pct(c.median_relative_se)}</td><td>{c.outliers}</td><td>{c.suspect}</td><td>{repeat}</td></tr>
                    }
                }).collect_view();
                let notes = r.notes.iter().take(30).map(|n| view! { <li>{r.note_line(n)}</li> }).collect_view();
                let more = r.notes.len().saturating_sub(30);
                view! {
                    <section id="quality" data-testid="quality" class="quality">
                        <h2>"Calibration quality"</h2>
                        <p>{format!("'{}' on layout '{}': {} runs, {} readings on food ({} over empty cells ignored). Rates are least-squares slopes over the straight part of each curve (thaw band, lag, the approach to boiling and outliers dropped); unmeasured cells are filled from the nearest measured cell of the same food and flagged.", r.name, r.layout, r.runs, r.readings, r.ignored)}</p>
                        <details open=r.configs.len() <= 12>
                            <summary>{format!("{} configurations", r.configs.len())}</summary>
                            <table class="quality-table"><thead><tr><th>"config"</th><th>"runs"</th><th>"measured"</th><th>"filled"</th><th>"median r²"</th><th>"median SE/rate"</th><th>"outliers"</th><th>"suspect"</th><th>"repeatability"</th></tr></thead><tbody>{rows}</tbody></table>
                        </details>
                        <details open=r.notes.len() <= 10>
                            <summary>{format!("{} notes: suspect probes, disagreeing repeats, outliers, filled cells", r.notes.len())}</summary>
                            <ul class="notes">{notes}</ul>
                            {(more > 0).then(|| view! { <p>{format!("… and {more} more in the per-probe table.")}</p> })}
                        </details>
                        <div class="row">
                            <button on:click=move |_| { if let Some(l) = wb.library.get_untracked() { download("library.traycast-maps.json", "application/json", &l.to_json()); } }>"Save calibrated library"</button>
                            <button on:click=move |_| { wb.quality.with_untracked(|q| if let Some((_, t)) = q { download("probe-fits.csv", "text/csv", t); }); }>"Save per-probe table"</button>
                        </div>
                    </section>
                }
            })
        })
    }
}
