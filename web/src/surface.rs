//! A small JavaScript-facing surface: `window.traycast.plan()` and `window.traycast.evaluation()`
//! return plain objects (`settled()` says whether the evaluation is current, `evaluatedIn()` where
//! it ran), so tests read numbers instead of pixels and a host page can embed us.

use std::cell::RefCell;
use traycast_plan::evaluate::Evaluation;
use traycast_plan::model::Plan;
use traycast_plan::wire;
use wasm_bindgen::JsValue;
use wasm_bindgen::prelude::Closure;

thread_local! {
    static CURRENT: RefCell<(Option<Plan>, Option<serde_json::Value>)> = const { RefCell::new((None, None)) };
    /// False while an edit's full evaluation is still pending.
    static SETTLED: RefCell<bool> = const { RefCell::new(false) };
    /// Where the last full evaluation ran: "worker", "page", or "none" yet.
    static EVALUATED_IN: RefCell<&'static str> = const { RefCell::new("none") };
}

/// Records where the last full evaluation ran ("worker" or "page").
pub fn evaluated_in(place: &'static str) {
    EVALUATED_IN.with(|e| *e.borrow_mut() = place);
}

/// Marks the published evaluation as out of date (an edit is being evaluated).
pub fn pending() {
    SETTLED.with(|s| *s.borrow_mut() = false);
}

/// Records the current plan and evaluation for the JS surface.
pub fn publish(plan: &Plan, eval: Option<&Evaluation>) {
    let e = eval.map(|e| traycast_plan::summary::to_json(plan, e));
    CURRENT.with(|c| *c.borrow_mut() = (Some(plan.clone()), e));
    SETTLED.with(|s| *s.borrow_mut() = true);
}

fn to_js(v: &serde_json::Value) -> JsValue {
    use serde::Serialize;
    v.serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .unwrap_or(JsValue::NULL)
}

/// Installs `window.traycast`.
pub fn install() {
    let Some(window) = web_sys::window() else {
        return;
    };
    let api = js_sys::Object::new();
    let plan = Closure::<dyn Fn() -> JsValue>::new(|| {
        CURRENT.with(|c| match &c.borrow().0 {
            Some(p) => serde_json::from_str::<serde_json::Value>(&wire::to_json(p))
                .map(|v| to_js(&v))
                .unwrap_or(JsValue::NULL),
            None => JsValue::NULL,
        })
    });
    let evaluation = Closure::<dyn Fn() -> JsValue>::new(|| {
        CURRENT.with(|c| c.borrow().1.as_ref().map_or(JsValue::NULL, to_js))
    });
    let link = Closure::<dyn Fn() -> JsValue>::new(|| {
        CURRENT.with(|c| {
            c.borrow()
                .0
                .as_ref()
                .map_or(JsValue::NULL, |p| JsValue::from_str(&wire::to_link(p)))
        })
    });
    let _ = js_sys::Reflect::set(&api, &"plan".into(), plan.as_ref());
    let _ = js_sys::Reflect::set(&api, &"evaluation".into(), evaluation.as_ref());
    let _ = js_sys::Reflect::set(&api, &"link".into(), link.as_ref());
    let settled =
        Closure::<dyn Fn() -> JsValue>::new(|| JsValue::from_bool(SETTLED.with(|s| *s.borrow())));
    let _ = js_sys::Reflect::set(&api, &"settled".into(), settled.as_ref());
    settled.forget();
    let place = Closure::<dyn Fn() -> JsValue>::new(|| {
        JsValue::from_str(EVALUATED_IN.with(|e| *e.borrow()))
    });
    let _ = js_sys::Reflect::set(&api, &"evaluatedIn".into(), place.as_ref());
    place.forget();
    let _ = js_sys::Reflect::set(&window, &"traycast".into(), &api);
    plan.forget();
    evaluation.forget();
    link.forget();
}
