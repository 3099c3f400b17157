//! Never lose work: autosave to local storage (the plan, and the imported or calibrated map
//! library), the plan in the URL fragment, and deciding what to open at start-up (a link, the
//! autosaved plan, or the demo).

use base64::Engine;
use base64::engine::general_purpose::STANDARD;
use traycast_plan::library::MapLibrary;
use traycast_plan::model::Plan;
use traycast_plan::{demos, wire};

const AUTOSAVE_KEY: &str = "traycast.plan.v1";
const LIBRARY_KEY: &str = "traycast.library.v1";
/// Most characters a kept library may take: browsers give a site about 5 M characters of local
/// storage, and the plan needs some of it.
pub const LIBRARY_MAX_CHARS: usize = 4 << 20;

/// The library kept from an earlier visit, if any and readable.
pub fn saved_library() -> Option<MapLibrary> {
    let storage = window()?.local_storage().ok()??;
    let text = storage.get_item(LIBRARY_KEY).ok()??;
    let bytes = STANDARD.decode(text).ok()?;
    MapLibrary::from_transfer(&bytes).ok()
}

/// Keeps `library` for the next visit (None forgets it). Its numbers are kept bit for bit, so it
/// comes back with the same content hash. Says why when it cannot be kept: the library is then
/// used until the page closes, and its file must be imported again next time.
pub fn save_library(library: Option<&MapLibrary>) -> Result<(), String> {
    let Some(storage) = window().and_then(|w| w.local_storage().ok().flatten()) else {
        return Err("this browser keeps nothing between visits".into());
    };
    let Some(library) = library else {
        let _ = storage.remove_item(LIBRARY_KEY);
        return Ok(());
    };
    let text = STANDARD.encode(library.to_transfer().map_err(|e| e.to_string())?);
    let too_big = || {
        let _ = storage.remove_item(LIBRARY_KEY);
        format!(
            "map library '{}' ({:.1} MB kept) is larger than the {:.0} MB this browser keeps between visits: it is used until this page closes; keep its file to import it again",
            library.name,
            text.len() as f64 / 1e6,
            LIBRARY_MAX_CHARS as f64 / 1e6
        )
    };
    if text.len() > LIBRARY_MAX_CHARS {
        return Err(too_big());
    }
    storage.set_item(LIBRARY_KEY, &text).map_err(|_| too_big())
}

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
