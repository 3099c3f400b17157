//! The brush panel: erasers, rectangle mode, brush size, undo and redo.

use crate::form::num;
use crate::paint::Tool;
use crate::state::workbench;
use leptos::prelude::*;

/// Largest brush, cells.
pub const BRUSH_MAX: usize = 9;

/// The brush panel.
#[component]
pub fn Brush() -> impl IntoView {
    let wb = workbench();
    let (tool, rect, brush) = (wb.tool, wb.rect, wb.brush);
    view! {
        <h2>"Brush"</h2>
        <div class="row">
            <button class:active=move || tool.get() == Tool::EraseFood aria-pressed=move || (tool.get() == Tool::EraseFood).to_string() on:click=move |_| tool.set(Tool::EraseFood) title="key Backspace">"Erase food"</button>
            <button class:active=move || tool.get() == Tool::EraseZone aria-pressed=move || (tool.get() == Tool::EraseZone).to_string() on:click=move |_| tool.set(Tool::EraseZone)>"Erase target"</button>
            <button data-testid="tool-rectangle" class:active=move || rect.get() aria-pressed=move || rect.get().to_string() on:click=move |_| rect.update(|r| *r = !*r) title="key R">"Rectangle"</button>
        </div>
        <label title="keys , and . make it smaller and larger">"Size " {move || brush.get()}
            <input type="range" min="1" max=BRUSH_MAX aria-label="brush size (cells)" prop:value=move || brush.get().to_string() on:input=move |ev| if let Some(v) = num(&ev) { brush.set((v as usize).clamp(1, BRUSH_MAX)); } /></label>
        <div class="row">
            <button id="undo" data-testid="undo" on:click=move |_| wb.undo() title="Ctrl+Z">"Undo"</button>
            <button id="redo" data-testid="redo" on:click=move |_| wb.redo() title="Ctrl+Y">"Redo"</button>
        </div>
    }
}
