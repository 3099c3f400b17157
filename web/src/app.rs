//! The workbench: one screen with the tray editor, live views and the plan's numbers, put
//! together from the panels, which share one [`Workbench`] state through context.

use crate::board::Board;
use crate::brush::Brush;
use crate::cards::SafetyCards;
use crate::compare::Compare;
use crate::files::Files;
use crate::foods::{Foods, Targets};
use crate::header::Header;
use crate::outcome::Outcome;
use crate::oven::Oven;
use crate::planning::{PlanningPanel, PlanningReport};
use crate::quality::CalibrationQuality;
use crate::report::PrintedPlan;
use crate::shortcuts::Shortcuts;
use crate::state::Workbench;
use crate::{compute, storage, views};
use leptos::prelude::*;

/// The workbench component.
#[component]
pub fn App() -> impl IntoView {
    let start = storage::startup();
    let wb = Workbench::new(start.plan, storage::saved_library(), start.message);
    provide_context(wb);
    compute::keep_current(wb);
    views::draw_views(wb);
    let help = RwSignal::new(false);
    let c = wb.canvases;
    view! {
        <Header help=help />
        <Shortcuts help=help />
        <PrintedPlan />
        <main>
            <section class="tools" data-testid="tools">
                <Foods />
                <Targets />
                <Brush />
                <Oven />
                <PlanningPanel />
                <Files />
            </section>
            <Board />
            <section class="results">
                <h2>"Dwell per configuration"</h2>
                <canvas id="dwell-bars" data-testid="dwell-bars" node_ref=c.bars></canvas>
                <h2>"Foods over time"</h2>
                <canvas id="time-course" node_ref=c.course></canvas>
                <h2>"Outcome"</h2>
                <Outcome />
                <PlanningReport />
                <Compare />
                <CalibrationQuality />
                <SafetyCards />
            </section>
        </main>
    }
}
