//! Which point of each cell the simulated map shows: the coldest point (what the verdicts judge),
//! the column mean, the surface, the hottest point, or the layer at a depth the user picks.

use leptos::prelude::*;
use traycast_thermal::simulate::TimeCourse;

/// A point of each cell's column, after standing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SimView {
    /// The coldest layer.
    Coldest,
    /// The mass-weighted mean of the column.
    Mean,
    /// The top layer.
    Surface,
    /// The hottest layer.
    Hottest,
    /// The layer at a chosen depth below the top face.
    Depth,
}

impl SimView {
    const ALL: [SimView; 5] = [
        SimView::Coldest,
        SimView::Mean,
        SimView::Surface,
        SimView::Hottest,
        SimView::Depth,
    ];

    fn key(self) -> &'static str {
        match self {
            SimView::Coldest => "coldest",
            SimView::Mean => "mean",
            SimView::Surface => "surface",
            SimView::Hottest => "hottest",
            SimView::Depth => "depth",
        }
    }

    fn label(self) -> &'static str {
        match self {
            SimView::Coldest => "coldest point",
            SimView::Mean => "column mean",
            SimView::Surface => "surface",
            SimView::Hottest => "hottest point",
            SimView::Depth => "at a depth",
        }
    }

    /// What the map shows, for its caption and the PNG's title.
    pub fn caption(self, depth_mm: f64) -> String {
        match self {
            SimView::Depth => format!("layer {depth_mm:.0} mm below the top"),
            other => other.label().to_string(),
        }
    }

    /// Each cell's temperature for this view (NaN where `food` is empty or the depth is below
    /// the food).
    pub fn temps(self, course: &TimeCourse, depth_mm: f64, food: &[u8]) -> Vec<f64> {
        (0..food.len())
            .map(|i| {
                if food[i] == 0 {
                    return f64::NAN;
                }
                match self {
                    SimView::Coldest => course.after_standing[i],
                    SimView::Mean => course.mean_after_standing[i],
                    SimView::Surface => course.surface_after_standing[i],
                    SimView::Hottest => course.hottest_after_standing[i],
                    SimView::Depth => course.at_depth(i, depth_mm / 1000.0),
                }
            })
            .collect()
    }
}

/// Sets the depth from the text typed, when it is a depth (a finite number, not negative).
fn set_depth(depth_mm: RwSignal<f64>, text: &str) {
    if let Ok(v) = text.trim().parse::<f64>()
        && v.is_finite()
        && v >= 0.0
    {
        depth_mm.set(v);
    }
}

/// The picker: a view, and the depth when the view is a depth.
#[component]
pub fn SimViewPicker(view: RwSignal<SimView>, depth_mm: RwSignal<f64>) -> impl IntoView {
    view! {
        <div class="row sim-view">
            <label>"Show"
                <select id="sim-view" data-testid="sim-view" aria-label="which point of each cell the simulated map shows" on:change=move |ev| {
                    let k = event_target_value(&ev);
                    if let Some(v) = SimView::ALL.into_iter().find(|v| v.key() == k) {
                        view.set(v);
                    }
                }>
                    {SimView::ALL.into_iter().map(|v| view! {
                        <option value=v.key() selected=move || view.get() == v>{v.label()}</option>
                    }).collect_view()}
                </select>
            </label>
            <label class:hidden=move || view.get() != SimView::Depth>"depth (mm)"
                <input id="sim-depth" data-testid="sim-depth" class="short" type="number" min="0" max="200" step="1"
                    prop:value=move || depth_mm.get().to_string()
                    on:change=move |ev| set_depth(depth_mm, &event_target_value(&ev)) />
            </label>
        </div>
    }
}
