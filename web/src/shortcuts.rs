//! Keyboard shortcuts: one table says which key does what, and both the handler and the `?`
//! overlay that lists them read it. Shortcuts never fire while a form control has focus.

use crate::brush::BRUSH_MAX;
use crate::paint::Tool;
use crate::state::{Workbench, workbench};
use leptos::prelude::*;
use wasm_bindgen::JsCast;

/// What a shortcut does.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Action {
    /// Back one edit.
    Undo,
    /// Forward one undone edit.
    Redo,
    /// Brush one cell smaller.
    Smaller,
    /// Brush one cell larger.
    Larger,
    /// The food eraser.
    EraseFood,
    /// Rectangle mode on or off.
    Rectangle,
    /// Paint food item k (0-based).
    Food(usize),
    /// Show or hide the list of shortcuts.
    Help,
    /// Close the list of shortcuts.
    Close,
}

/// The keys as people read them, with what they do: the overlay's list.
pub const TABLE: [(&str, &str); 10] = [
    ("1 … 9", "paint that food item"),
    ("Backspace", "erase food"),
    ("R", "rectangle mode on or off"),
    (", and .", "brush smaller and larger"),
    ("Ctrl+Z", "undo"),
    ("Ctrl+Y or Ctrl+Shift+Z", "redo"),
    ("arrows (tray focused)", "move the cell cursor"),
    ("Space or Enter (tray focused)", "paint at the cell cursor"),
    ("?", "show or hide this list"),
    ("Esc", "close this list"),
];

/// The action of `key` (as `KeyboardEvent.key` names it) with Ctrl (or ⌘) and Shift as given.
pub fn action(key: &str, ctrl: bool, shift: bool) -> Option<Action> {
    Some(match key {
        "z" | "Z" if ctrl && shift => Action::Redo,
        "z" | "Z" if ctrl => Action::Undo,
        "y" | "Y" if ctrl => Action::Redo,
        _ if ctrl => return None,
        "," => Action::Smaller,
        "." => Action::Larger,
        "Backspace" => Action::EraseFood,
        "r" | "R" => Action::Rectangle,
        "?" => Action::Help,
        "Escape" => Action::Close,
        k if k.len() == 1 && matches!(k.as_bytes()[0], b'1'..=b'9') => {
            Action::Food((k.as_bytes()[0] - b'1') as usize)
        }
        _ => return None,
    })
}

/// True when the event comes from a form control or editable text, where keys are typing.
fn typing(ev: &web_sys::KeyboardEvent) -> bool {
    let Some(el) = ev
        .target()
        .and_then(|t| t.dyn_into::<web_sys::HtmlElement>().ok())
    else {
        return false;
    };
    matches!(el.tag_name().as_str(), "INPUT" | "SELECT" | "TEXTAREA") || el.is_content_editable()
}

fn run(wb: Workbench, help: RwSignal<bool>, a: Action) {
    match a {
        Action::Undo => wb.undo(),
        Action::Redo => wb.redo(),
        Action::Smaller => wb.brush.update(|b| *b = b.saturating_sub(1).max(1)),
        Action::Larger => wb.brush.update(|b| *b = (*b + 1).min(BRUSH_MAX)),
        Action::EraseFood => wb.tool.set(Tool::EraseFood),
        Action::Rectangle => wb.rect.update(|r| *r = !*r),
        Action::Food(n) => {
            if n < wb.plan.with_untracked(|p| p.items.len()) {
                wb.tool.set(Tool::Food(n));
            }
        }
        Action::Help => help.update(|h| *h = !*h),
        Action::Close => help.set(false),
    }
}

/// Listens for shortcuts on the whole page, and shows the `?` list when asked.
#[component]
pub fn Shortcuts(help: RwSignal<bool>) -> impl IntoView {
    let wb = workbench();
    let keys = window_event_listener(leptos::ev::keydown, move |ev: web_sys::KeyboardEvent| {
        if typing(&ev) {
            return;
        }
        if let Some(a) = action(&ev.key(), ev.ctrl_key() || ev.meta_key(), ev.shift_key()) {
            if matches!(a, Action::Undo | Action::Redo | Action::EraseFood) {
                ev.prevent_default();
            }
            run(wb, help, a);
        }
    });
    on_cleanup(move || keys.remove());
    view! {
        <div id="shortcuts" data-testid="shortcuts" class="overlay" role="dialog" aria-modal="false" aria-label="Keyboard shortcuts" class:hidden=move || !help.get()>
            <h2>"Keyboard shortcuts"</h2>
            <table>{TABLE.iter().map(|(k, what)| view! { <tr><th scope="row"><kbd>{*k}</kbd></th><td>{*what}</td></tr> }).collect_view()}</table>
            <button on:click=move |_| help.set(false)>"Close"</button>
        </div>
    }
}

#[cfg(test)]
mod tests {
    use super::{Action, action};

    #[test]
    fn keys_map_to_their_actions() {
        assert_eq!(action("z", true, false), Some(Action::Undo));
        assert_eq!(action("Z", true, true), Some(Action::Redo));
        assert_eq!(action("y", true, false), Some(Action::Redo));
        assert_eq!(action("3", false, false), Some(Action::Food(2)));
        assert_eq!(action("r", false, false), Some(Action::Rectangle));
        assert_eq!(action("?", false, true), Some(Action::Help));
    }

    #[test]
    fn other_keys_and_browser_chords_are_left_alone() {
        assert_eq!(action("0", false, false), None);
        assert_eq!(action("r", true, false), None, "Ctrl+R reloads the page");
        assert_eq!(action("1", true, false), None, "Ctrl+1 switches tabs");
        assert_eq!(action("a", false, false), None);
    }
}
