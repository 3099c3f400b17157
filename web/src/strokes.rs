//! Painting on the tray: a stroke from pointer down to up is one undo step however many cells it
//! covers; a rectangle paints when let go; a second finger turns the stroke into a pinch and undoes
//! it; the keyboard's brush paints one cell as its own step. Only paints that change the plan are
//! timed as inputs.

use crate::compute;
use crate::paint::{Tool, paint};
use crate::state::Workbench;
use leptos::prelude::*;

/// Why painting a target on an empty cell does nothing.
pub const NO_FOOD_HERE: &str = "Targets go on food: these cells hold none. Pick a food (keys 1–9) and paint it here first, then paint the target over it.";

impl Workbench {
    /// A stroke starts at `cell`: the plan before it is one undo step, however many cells it
    /// paints; outside rectangle mode the brush paints there at once.
    pub fn begin_stroke(&self, cell: usize) {
        let before = self.plan.get_untracked();
        self.history.update_value(|h| h.record(before));
        self.stroke.set_value(Some(cell));
        if !self.rect.get_untracked() {
            self.paint_at(cell, cell, self.brush.get_untracked());
        }
    }

    /// The stroke reaches `cell`: the brush paints there, or the rectangle follows it.
    pub fn continue_stroke(&self, cell: usize) {
        let Some(start) = self.stroke.get_value() else {
            return;
        };
        if self.rect.get_untracked() {
            if self.rect_preview.get_untracked() != Some((start, cell)) {
                self.rect_preview.set(Some((start, cell)));
            }
        } else {
            self.paint_at(cell, cell, self.brush.get_untracked());
        }
    }

    /// The stroke ends (at `cell`, when over the tray): a rectangle is painted now; a stroke that
    /// changed nothing leaves no undo step.
    pub fn end_stroke(&self, cell: Option<usize>) {
        if let (Some(start), Some(end), true) =
            (self.stroke.get_value(), cell, self.rect.get_untracked())
        {
            self.paint_at(start, end, 1);
        }
        if self.stroke.get_value().is_some() {
            self.plan
                .with_untracked(|p| self.history.update_value(|h| h.settle(p)));
        }
        self.stroke.set_value(None);
        self.rect_preview.set(None);
    }

    /// Abandons the stroke under way (two fingers went down: a pinch, not a stroke): the plan is
    /// as it was before it.
    pub fn cancel_stroke(&self) {
        if self.stroke.get_value().is_some() {
            let mut before = None;
            self.history.update_value(|h| before = h.revert());
            if let Some(p) = before {
                self.plan.set(p);
            }
        }
        self.stroke.set_value(None);
        self.rect_preview.set(None);
    }

    /// Paints, timing the redraw it causes as an input (when it changes anything).
    fn paint_at(&self, a: usize, b: usize, brush: usize) {
        compute::mark_input();
        let tool = self.tool.get_untracked();
        let mut p = self.plan.get_untracked();
        if paint(&mut p, tool, a, b, brush) {
            self.plan.set(p);
        } else {
            compute::cancel_input();
            if matches!(tool, Tool::Zone(_)) && p.item_at(b).is_none() {
                let why = Some(NO_FOOD_HERE.to_string());
                if self.notice.with_untracked(|n| *n != why) {
                    self.notice.set(why);
                }
            }
        }
    }

    /// Paints at one cell as its own undoable edit (the keyboard's brush).
    pub fn paint_cell(&self, cell: usize) {
        let before = self.plan.get_untracked();
        self.history.update_value(|h| h.record(before));
        self.paint_at(cell, cell, self.brush.get_untracked());
        self.plan
            .with_untracked(|p| self.history.update_value(|h| h.settle(p)));
    }
}
