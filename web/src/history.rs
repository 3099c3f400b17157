//! Undo and redo: every edit of the plan is one step back, a whole brush stroke included.
//!
//! Plain data with no browser in it, so its rules are tested natively.

/// The states to go back and forward to.
#[derive(Clone, Debug)]
pub struct History<T> {
    back: Vec<T>,
    forward: Vec<T>,
    limit: usize,
}

impl<T: Clone + PartialEq> History<T> {
    /// An empty history keeping at most `limit` steps back (the oldest are forgotten first).
    pub fn new(limit: usize) -> Self {
        History {
            back: Vec::new(),
            forward: Vec::new(),
            limit: limit.max(1),
        }
    }

    /// Records `before` as the state an undo returns to, and forgets what could be redone: a new
    /// change starts a new branch.
    pub fn record(&mut self, before: T) {
        if self.back.len() == self.limit {
            self.back.remove(0);
        }
        self.back.push(before);
        self.forward.clear();
    }

    /// Applies `change` to a copy of `current`. When that changes anything, the old state is
    /// recorded and the new one returned; otherwise nothing is recorded.
    pub fn edit(&mut self, current: &T, change: impl FnOnce(&mut T)) -> Option<T> {
        let mut after = current.clone();
        change(&mut after);
        (after != *current).then(|| {
            self.record(current.clone());
            after
        })
    }

    /// The state before `current`, which becomes the one a redo returns to.
    pub fn undo(&mut self, current: T) -> Option<T> {
        let before = self.back.pop()?;
        self.forward.push(current);
        Some(before)
    }

    /// The state an undo left, `current` becoming the one to undo to again.
    pub fn redo(&mut self, current: T) -> Option<T> {
        let after = self.forward.pop()?;
        self.back.push(current);
        Some(after)
    }

    /// The state recorded last, taken back (a stroke abandoned: it is restored).
    pub fn revert(&mut self) -> Option<T> {
        self.back.pop()
    }

    /// Ends a stroke recorded with [`History::record`] before it began: when it changed nothing
    /// (`current` is the state recorded), the step is dropped again.
    pub fn settle(&mut self, current: &T) {
        if self.back.last() == Some(current) {
            self.back.pop();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::History;

    #[test]
    fn undo_and_redo_walk_the_edits_both_ways() {
        let mut h = History::new(10);
        let mut s = 1;
        for k in 2..=4 {
            s = h.edit(&s, |v| *v = k).expect("changed");
        }
        assert_eq!(s, 4);
        s = h.undo(s).unwrap();
        s = h.undo(s).unwrap();
        assert_eq!(s, 2);
        s = h.redo(s).unwrap();
        assert_eq!(s, 3);
        s = h.undo(s).unwrap();
        s = h.undo(s).unwrap();
        assert_eq!(s, 1);
        assert_eq!(h.undo(s), None, "nothing before the first state");
        assert_eq!(h.redo(s), Some(2), "and the undone steps wait to be redone");
    }

    #[test]
    fn an_edit_that_changes_nothing_is_not_a_step() {
        let mut h = History::new(10);
        assert_eq!(h.edit(&5, |v| *v = 5), None);
        assert_eq!(h.undo(5), None);
    }

    #[test]
    fn a_new_edit_after_undo_forgets_the_redo() {
        let mut h = History::new(10);
        let mut s = h.edit(&1, |v| *v = 2).unwrap();
        s = h.undo(s).unwrap();
        s = h.edit(&s, |v| *v = 7).unwrap();
        assert_eq!(s, 7);
        assert_eq!(h.redo(s), None);
        assert_eq!(h.undo(s), Some(1));
    }

    #[test]
    fn the_oldest_steps_go_first_past_the_limit() {
        let mut h = History::new(3);
        let mut s = 0;
        for k in 1..=5 {
            s = h.edit(&s, |v| *v = k).unwrap();
        }
        let mut seen = vec![];
        while let Some(b) = h.undo(s) {
            seen.push(b);
            s = b;
        }
        assert_eq!(seen, vec![4, 3, 2]);
    }

    #[test]
    fn a_stroke_that_changed_nothing_leaves_no_step() {
        let mut h = History::new(10);
        let s = h.edit(&1, |v| *v = 2).unwrap();
        h.record(s);
        h.settle(&s);
        assert_eq!(h.undo(s), Some(1));
        // A stroke that did change something keeps its step.
        let mut h = History::new(10);
        h.record(1);
        h.settle(&3);
        assert_eq!(h.undo(3), Some(1));
    }
}
