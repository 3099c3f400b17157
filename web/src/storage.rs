//! Never lose work: autosave to local storage, the plan in the URL fragment, and deciding what to
//! open at start-up (a link, the autosaved plan, or the demo).

use traycast_plan::model::Plan;
use traycast_plan::{demos, wire};

const AUTOSAVE_KEY: &str = "traycast.plan.v1";

fn window() -> Option<web_sys::Window> {
    web_sys::window()
}

/// The autosaved plan, if any and readable.
pub fn saved() -> Option<Plan> {
    let storage = window()?.local_storage().ok()??;
    let text = storage.get_item(AUTOSAVE_KEY).ok()??;
    wire::from_json(&text).ok()
}

/// Saves the plan (once edits pause, and when the page is left).
pub fn save(plan: &Plan) {
    if let Some(Ok(Some(storage))) = window().map(|w| w.local_storage()) {
        let _ = storage.set_item(AUTOSAVE_KEY, &wire::to_json(plan));
    }
}

/// Puts the plan's link in the URL fragment without adding a history entry; returns its length.
pub fn set_fragment(plan: &Plan) -> usize {
    let link = wire::to_link(plan);
    if let Some(w) = window()
        && let Ok(history) = w.history()
    {
        let _ = history.replace_state_with_url(
            &wasm_bindgen::JsValue::NULL,
            "",
            Some(&format!("#{link}")),
        );
    }
    link.len() + 1
}

/// What the workbench opens with, and a message for the user if something was refused.
pub struct Start {
    /// The plan to show.
    pub plan: Plan,
    /// A notice (malformed link, link not opened).
    pub message: Option<String>,
}

/// Decides the start-up plan: a valid link (asking before it replaces different autosaved work),
/// else the autosaved plan, else the lunch-tray demo. A malformed link changes nothing.
pub fn startup() -> Start {
    let saved = saved();
    let fallback = || {
        saved
            .clone()
            .unwrap_or_else(|| demos::demo("lunch-tray").expect("demo exists"))
    };
    let hash = window()
        .and_then(|w| w.location().hash().ok())
        .unwrap_or_default();
    let hash = hash.trim_start_matches('#');
    if hash.is_empty() {
        return Start {
            plan: fallback(),
            message: None,
        };
    }
    match wire::from_link(hash) {
        Ok(linked) => {
            if let Some(current) = &saved
                && *current != linked
            {
                let ok = window()
                        .and_then(|w| w.confirm_with_message("Open the plan from this link? It replaces the plan you were working on in this browser.").ok())
                        .unwrap_or(false);
                if !ok {
                    return Start {
                        plan: current.clone(),
                        message: Some("The link was not opened; your plan is unchanged.".into()),
                    };
                }
            }
            Start {
                plan: linked,
                message: None,
            }
        }
        Err(e) => Start {
            plan: fallback(),
            message: Some(format!(
                "This link could not be opened ({e}). Your plan is unchanged."
            )),
        },
    }
}
