//! The full evaluation off the page's thread: a Web Worker running this same program.
//!
//! The page starts a module worker (`worker.js`) and sends it the address of its own module script
//! and its compiled WebAssembly module; starting those runs `main` again, which finds itself in a
//! worker and calls [`serve`]. From then on the page sends plans (and the map library whenever it
//! changes, as bytes) and gets evaluations back as bytes ([`Evaluation::to_transfer`]).
//!
//! At most one request is in flight: while the worker is busy only the newest plan waits, so a
//! burst of edits costs the evaluation already running and one more, never a queue of stale ones.
//! Every answer carries the plan revision it belongs to. Where no worker can be started (no module
//! script in the page, an old browser) or the worker fails, the page evaluates on its own thread.

use js_sys::{Array, Object, Reflect, Uint8Array};
use std::cell::RefCell;
use std::rc::Rc;
use traycast_plan::evaluate::{Evaluation, Evaluator, Options};
use traycast_plan::library::MapLibrary;
use traycast_plan::model::Plan;
use traycast_plan::wire;
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;
use web_sys::{DedicatedWorkerGlobalScope, MessageEvent, Worker, WorkerOptions, WorkerType};

/// One evaluation's outcome: the plan revision it belongs to, the evaluation or why there is
/// none, and the worker's own time for it, ms (None when the page evaluated).
pub type Outcome = (u64, Result<Evaluation, String>, Option<f64>);

/// Milliseconds from the global's clock (the page's or the worker's).
fn now_ms() -> f64 {
    let perf = get(&js_sys::global(), "performance");
    Reflect::get(&perf, &"now".into())
        .ok()
        .and_then(|f| f.dyn_into::<js_sys::Function>().ok())
        .and_then(|f| f.call0(&perf).ok())
        .and_then(|v| v.as_f64())
        .unwrap_or(f64::NAN)
}

fn get(obj: &JsValue, key: &str) -> JsValue {
    Reflect::get(obj, &JsValue::from_str(key)).unwrap_or(JsValue::UNDEFINED)
}

fn set(obj: &Object, key: &str, value: &JsValue) {
    let _ = Reflect::set(obj, &JsValue::from_str(key), value);
}

fn bytes(b: &[u8]) -> Uint8Array {
    Uint8Array::from(b)
}

/// In the worker: answers every plan the page sends with its full evaluation.
pub fn serve(scope: DedicatedWorkerGlobalScope) {
    let evaluator = RefCell::new(Evaluator::new());
    let reply_to = scope.clone();
    let on_message = Closure::<dyn FnMut(MessageEvent)>::new(move |ev: MessageEvent| {
        let data = ev.data();
        let reply = Object::new();
        set(&reply, "rev", &get(&data, "rev"));
        let start = now_ms();
        let answer = answer(&mut evaluator.borrow_mut(), &data);
        set(&reply, "ms", &JsValue::from_f64(now_ms() - start));
        match answer {
            Ok(b) => {
                let b = bytes(&b);
                set(&reply, "evaluation", &b);
                let _ = reply_to.post_message_with_transfer(&reply, &Array::of1(&b.buffer()));
            }
            Err(e) => {
                set(&reply, "error", &JsValue::from_str(&e));
                let _ = reply_to.post_message(&reply);
            }
        }
    });
    scope.set_onmessage(Some(on_message.as_ref().unchecked_ref()));
    on_message.forget();
    let ready = Object::new();
    set(&ready, "ready", &JsValue::TRUE);
    let _ = scope.post_message(&ready);
}

fn answer(evaluator: &mut Evaluator, data: &JsValue) -> Result<Vec<u8>, String> {
    let library = get(data, "library");
    if !library.is_undefined() {
        // Never evaluate on the previous library when the new one cannot be read.
        evaluator.set_library(None);
        if !library.is_null() {
            let lib = MapLibrary::from_transfer(&Uint8Array::new(&library).to_vec())
                .map_err(|e| e.to_string())?;
            evaluator.set_library(Some(lib));
        }
    }
    let plan = get(data, "plan")
        .as_string()
        .ok_or("the page sent no plan")?;
    let plan = wire::from_json(&plan).map_err(|e| e.to_string())?;
    let eval = evaluator
        .evaluate(&plan, Options::default())
        .map_err(|e| e.to_string())?;
    eval.to_transfer().map_err(|e| e.to_string())
}

/// A plan waiting to be evaluated.
struct Request {
    rev: u64,
    plan: Plan,
    library_rev: u64,
}

struct State {
    /// None when evaluations run on the page's thread.
    worker: Option<Worker>,
    ready: bool,
    in_flight: Option<Request>,
    waiting: Option<Request>,
    /// The library revision the worker holds.
    library_sent: Option<u64>,
    /// The page's own evaluator, for when there is no worker, and its library's revision.
    local: (Evaluator, Option<u64>),
}

/// The page's side: sends plans to the worker and hands each answer to `deliver`.
#[derive(Clone)]
pub struct Evaluations {
    state: Rc<RefCell<State>>,
    deliver: Rc<dyn Fn(Outcome)>,
    library: Rc<dyn Fn() -> Option<MapLibrary>>,
}

impl Evaluations {
    /// Starts the worker; answers go to `deliver`, and `library` gives the current map library
    /// whenever its revision is not the one the evaluator holds.
    pub fn start(
        deliver: impl Fn(Outcome) + 'static,
        library: impl Fn() -> Option<MapLibrary> + 'static,
    ) -> Self {
        let this = Evaluations {
            state: Rc::new(RefCell::new(State {
                worker: None,
                ready: false,
                in_flight: None,
                waiting: None,
                library_sent: None,
                local: (Evaluator::new(), None),
            })),
            deliver: Rc::new(deliver),
            library: Rc::new(library),
        };
        match EARLY.with(|e| e.borrow_mut().take()).unwrap_or_else(spawn) {
            Ok(worker) => this.listen(worker),
            Err(why) => web_sys::console::warn_1(&format!("evaluating on the page: {why}").into()),
        }
        this
    }

    fn listen(&self, worker: Worker) {
        let me = self.clone();
        let on_message =
            Closure::<dyn FnMut(MessageEvent)>::new(move |ev: MessageEvent| me.answered(ev.data()));
        worker.set_onmessage(Some(on_message.as_ref().unchecked_ref()));
        on_message.forget();
        let me = self.clone();
        let on_error = Closure::<dyn FnMut(web_sys::Event)>::new(move |_| me.failed());
        worker.set_onerror(Some(on_error.as_ref().unchecked_ref()));
        on_error.forget();
        self.state.borrow_mut().worker = Some(worker);
    }

    /// Asks for the evaluation of `plan` at revision `rev` on the library of revision
    /// `library_rev`; the answer goes to `deliver`, at once when there is no worker.
    pub fn request(&self, rev: u64, plan: Plan, library_rev: u64) {
        let mut s = self.state.borrow_mut();
        if s.worker.is_none() {
            let (local, held) = &mut s.local;
            if *held != Some(library_rev) {
                local.set_library((self.library)());
                *held = Some(library_rev);
            }
            let result = local.evaluate(&plan, Options::default());
            drop(s);
            crate::surface::evaluated_in("page");
            (self.deliver)((rev, result.map_err(|e| e.to_string()), None));
            return;
        }
        s.waiting = Some(Request {
            rev,
            plan,
            library_rev,
        });
        drop(s);
        self.send_waiting();
    }

    fn send_waiting(&self) {
        let mut s = self.state.borrow_mut();
        if !s.ready || s.in_flight.is_some() {
            return;
        }
        let (Some(req), Some(worker)) = (s.waiting.take(), s.worker.clone()) else {
            return;
        };
        let msg = Object::new();
        set(&msg, "rev", &JsValue::from_f64(req.rev as f64));
        set(&msg, "plan", &JsValue::from_str(&wire::to_json(&req.plan)));
        if s.library_sent != Some(req.library_rev) {
            let lib = match (self.library)().as_ref().map(MapLibrary::to_transfer) {
                None => JsValue::NULL,
                Some(Ok(b)) => bytes(&b).into(),
                Some(Err(e)) => {
                    drop(s);
                    (self.deliver)((req.rev, Err(e.to_string()), None));
                    return;
                }
            };
            set(&msg, "library", &lib);
            s.library_sent = Some(req.library_rev);
        }
        if worker.post_message(&msg).is_err() {
            drop(s);
            self.failed();
            return;
        }
        s.in_flight = Some(req);
    }

    fn answered(&self, data: JsValue) {
        if get(&data, "ready").is_truthy() {
            self.state.borrow_mut().ready = true;
        } else {
            let rev = get(&data, "rev").as_f64().unwrap_or(-1.0) as u64;
            let evaluation = get(&data, "evaluation");
            let result = if evaluation.is_undefined() {
                Err(get(&data, "error").as_string().unwrap_or_default())
            } else {
                Evaluation::from_transfer(&Uint8Array::new(&evaluation).to_vec())
                    .map_err(|e| e.to_string())
            };
            self.state.borrow_mut().in_flight = None;
            crate::surface::evaluated_in("worker");
            (self.deliver)((rev, result, get(&data, "ms").as_f64()));
        }
        self.send_waiting();
    }

    /// The worker failed (it stopped on an error, or could not be posted to): evaluate here from
    /// now on, starting with what it had not answered.
    fn failed(&self) {
        web_sys::console::warn_1(&"the evaluation worker failed; evaluating on the page".into());
        let left = {
            let mut s = self.state.borrow_mut();
            if let Some(w) = s.worker.take() {
                w.terminate();
            }
            s.waiting.take().or_else(|| s.in_flight.take())
        };
        if let Some(req) = left {
            self.request(req.rev, req.plan, req.library_rev);
        }
    }
}

thread_local! {
    /// The worker started before the page is built ([`start_early`]), for the first
    /// [`Evaluations::start`] to take.
    static EARLY: RefCell<Option<Result<Worker, String>>> = const { RefCell::new(None) };
}

/// Starts the worker at once, so it loads while the page is being built.
pub fn start_early() {
    EARLY.with(|e| *e.borrow_mut() = Some(spawn()));
}

/// Starts `worker.js` as a module worker and sends it this page's module script and compiled
/// module.
fn spawn() -> Result<Worker, String> {
    let doc = web_sys::window()
        .and_then(|w| w.document())
        .ok_or("no document")?;
    let script = doc
        .query_selector("link[rel=modulepreload]")
        .ok()
        .flatten()
        .map(|l| get(&l, "href"))
        .and_then(|h| h.as_string())
        .ok_or("the page names no module script")?;
    let options = WorkerOptions::new();
    options.set_type(WorkerType::Module);
    let worker = Worker::new_with_options("worker.js", &options)
        .map_err(|e| format!("no module worker: {e:?}"))?;
    let start = Object::new();
    set(&start, "script", &JsValue::from_str(&script));
    set(&start, "module", &wasm_bindgen::module());
    worker
        .post_message(&start)
        .map_err(|e| format!("the worker could not be started: {e:?}"))?;
    Ok(worker)
}
