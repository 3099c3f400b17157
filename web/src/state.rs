//! The workbench's one state, shared with every panel through context: the plan and its history,
//! the map library, the results tagged with the revision of the plan they belong to, the editing
//! choices, and the canvases the views draw on.

use crate::draw::Scale;
use crate::history::History;
use crate::paint::Tool;
use crate::simview::SimView;
use crate::units::Unit;
use crate::views::Canvases;
use leptos::prelude::*;
use traycast_plan::calibrate::QualityReport;
use traycast_plan::evaluate::{Evaluation, Quick};
use traycast_plan::library::MapLibrary;
use traycast_plan::model::{MapSource, Plan};

/// Steps back the history keeps.
const HISTORY_STEPS: usize = 200;

/// A full evaluation, or why there is none, with the revision it belongs to.
pub type Tagged = (u64, Result<Evaluation, String>);

/// Everything the panels share. Copy: every part is a signal or a handle.
#[derive(Clone, Copy)]
pub struct Workbench {
    /// The plan being edited.
    pub plan: RwSignal<Plan>,
    /// The plan without its painted cells: what the forms show. It changes only when a setting
    /// does, so a brush stroke re-renders no form.
    pub settings: Memo<Plan>,
    pub(crate) history: StoredValue<History<Plan>>,
    /// Moves on with every change of the plan or the library; results carry the one they are for.
    pub rev: Memo<u64>,
    /// An imported or calibrated library (None: the illustrative field model).
    pub library: RwSignal<Option<MapLibrary>>,
    /// Moves on whenever `library` is replaced, so nothing compares libraries by value.
    pub library_rev: RwSignal<u64>,
    /// The fast result (warm solve and linear prediction) of a revision.
    pub quick: RwSignal<Option<(u64, Quick)>>,
    /// The full evaluation of a revision (possibly an earlier one while the next is computed).
    pub eval: RwSignal<Option<Tagged>>,
    /// The last calibration's quality report and per-probe table (CSV).
    pub quality: RwSignal<Option<(QualityReport, String)>>,
    /// A message for the user, dismissable.
    pub notice: RwSignal<Option<String>>,
    /// °C or °F.
    pub unit: RwSignal<Unit>,
    /// What the brush paints.
    pub tool: RwSignal<Tool>,
    /// Brush size, cells.
    pub brush: RwSignal<usize>,
    /// Rectangle mode.
    pub rect: RwSignal<bool>,
    /// The cell under the pointer or the keyboard's cursor.
    pub hover: RwSignal<Option<usize>>,
    /// The keyboard's cell cursor on the tray.
    pub cursor: RwSignal<Option<usize>>,
    /// The rectangle being dragged (first and current cell).
    pub rect_preview: RwSignal<Option<(usize, usize)>>,
    /// Where the current stroke started.
    pub stroke: StoredValue<Option<usize>>,
    /// Heating-runs files are in °F.
    pub runs_in_f: RwSignal<bool>,
    /// Which point of each cell the simulated map shows, and the depth for a chosen depth, mm.
    pub sim_view: RwSignal<SimView>,
    /// The depth shown by [`SimView::Depth`], mm.
    pub sim_depth: RwSignal<f64>,
    /// The share link's length, characters.
    pub link_len: RwSignal<usize>,
    /// What the simulated map shows of each cell (the chosen point or depth), for the current
    /// revision's evaluation; None until it arrives.
    pub simulated: Memo<Option<Vec<f64>>>,
    /// The temperature scale the linear and simulated maps share: the locked one, else one
    /// spanning both maps of the current revision.
    pub scale: Memo<Scale>,
    /// A scale held for comparisons across edits.
    pub scale_lock: RwSignal<Option<Scale>>,
    /// The canvases.
    pub canvases: Canvases,
}

impl Workbench {
    /// The state for a plan opened at start-up with the library kept from an earlier visit, and
    /// a message for the user if any.
    pub fn new(plan: Plan, library: Option<MapLibrary>, notice: Option<String>) -> Self {
        let plan = RwSignal::new(plan);
        let library_rev = RwSignal::new(0u64);
        let library = RwSignal::new(library);
        let rev = Memo::new(move |prev: Option<&u64>| {
            plan.track();
            library_rev.track();
            prev.map_or(1, |r| r + 1)
        });
        let quick = RwSignal::new(None::<(u64, Quick)>);
        let eval = RwSignal::new(None::<Tagged>);
        let (sim_view, sim_depth) = (RwSignal::new(SimView::Coldest), RwSignal::new(10.0));
        let scale_lock = RwSignal::new(None);
        let simulated = Memo::new(move |_| {
            let (view, depth) = (sim_view.get(), sim_depth.get());
            eval.with(|e| match e {
                Some((r, Ok(e))) if *r == rev.get() => {
                    Some(plan.with(|p| view.temps(&e.course, depth, &p.food)))
                }
                _ => None,
            })
        });
        let scale = Memo::new(move |_| {
            if let Some(s) = scale_lock.get() {
                return s;
            }
            let now = rev.get();
            let linear = quick.with(|q| match q {
                Some((r, q)) if *r == now => q.linear.clone(),
                _ => Vec::new(),
            });
            simulated.with(|sim| Scale::spanning(&[&linear, sim.as_deref().unwrap_or_default()]))
        });
        let settings = Memo::new(move |_| {
            plan.with(|p| Plan {
                food: Vec::new(),
                zone: Vec::new(),
                ..p.clone()
            })
        });
        Workbench {
            plan,
            settings,
            history: StoredValue::new(History::new(HISTORY_STEPS)),
            rev,
            library,
            library_rev,
            quick,
            eval,
            quality: RwSignal::new(None),
            notice: RwSignal::new(notice),
            unit: RwSignal::new(Unit::Celsius),
            tool: RwSignal::new(Tool::Food(0)),
            brush: RwSignal::new(1),
            rect: RwSignal::new(false),
            hover: RwSignal::new(None),
            cursor: RwSignal::new(None),
            rect_preview: RwSignal::new(None),
            stroke: StoredValue::new(None),
            runs_in_f: RwSignal::new(false),
            sim_view,
            sim_depth,
            link_len: RwSignal::new(0),
            simulated,
            scale,
            scale_lock,
            canvases: Canvases {
                tray: NodeRef::new(),
                linear: NodeRef::new(),
                simulated: NodeRef::new(),
                off_band: NodeRef::new(),
                bars: NodeRef::new(),
                course: NodeRef::new(),
            },
        }
    }

    /// One undoable edit of the plan (nothing is recorded when it changes nothing).
    pub fn edit(&self, change: impl FnOnce(&mut Plan)) {
        let current = self.plan.get_untracked();
        let mut next = None;
        self.history
            .update_value(|h| next = h.edit(&current, change));
        if let Some(p) = next {
            self.plan.set(p);
        }
    }

    /// Back one edit.
    pub fn undo(&self) {
        let mut prev = None;
        self.history
            .update_value(|h| prev = h.undo(self.plan.get_untracked()));
        if let Some(p) = prev {
            self.plan.set(p);
        }
    }

    /// Forward one undone edit.
    pub fn redo(&self) {
        let mut next = None;
        self.history
            .update_value(|h| next = h.redo(self.plan.get_untracked()));
        if let Some(p) = next {
            self.plan.set(p);
        }
    }

    /// Uses `library` from now on (and keeps it for the next visit) and points the plan at it,
    /// as one undoable edit. Returns why it could not be kept, if it could not.
    pub fn use_library(&self, library: MapLibrary, also: impl FnOnce(&mut Plan)) -> Option<String> {
        let kept = crate::storage::save_library(Some(&library)).err();
        let (name, hash) = (library.name.clone(), library.content_hash());
        self.library.set(Some(library));
        self.library_rev.update(|r| *r += 1);
        self.edit(|p| {
            p.maps = MapSource::Library {
                name,
                hash: Some(hash),
            };
            also(p);
        });
        kept
    }

    /// Reads the full evaluation when it belongs to the plan as it is now (tracked).
    pub fn with_current<R>(&self, f: impl FnOnce(&Evaluation) -> R) -> Option<R> {
        let now = self.rev.get();
        self.eval.with(|e| match e {
            Some((r, Ok(e))) if *r == now => Some(f(e)),
            _ => None,
        })
    }

    /// Reads the latest full evaluation, which may describe an earlier revision while the next
    /// is computed (tracked): what the outcome panels show until the new one arrives.
    pub fn with_latest<R>(&self, f: impl FnOnce(Option<&Result<Evaluation, String>>) -> R) -> R {
        self.eval.with(|e| f(e.as_ref().map(|(_, r)| r)))
    }
}

/// The workbench state provided by [`crate::app::App`].
pub fn workbench() -> Workbench {
    expect_context::<Workbench>()
}
