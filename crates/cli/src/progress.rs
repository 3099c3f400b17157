//! Progress on stderr for work that takes more than a second, and only on a terminal (indicatif).

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;
use std::time::Duration;

/// A spinner for work of unknown length; cleared when dropped.
pub fn spinner(what: &'static str) -> ProgressBar {
    let bar = ProgressBar::with_draw_target(None, target());
    bar.set_style(ProgressStyle::with_template("{spinner} {msg} ({elapsed})").expect("template"));
    bar.set_message(what);
    bar.enable_steady_tick(Duration::from_millis(120));
    bar
}

/// A bar over `total` items (plans of a batch, say).
pub fn bar(total: u64, what: &'static str) -> ProgressBar {
    let bar = ProgressBar::with_draw_target(Some(total), target());
    bar.set_style(
        ProgressStyle::with_template("{msg} [{bar:30}] {pos}/{len} ({eta} left)")
            .expect("template"),
    );
    bar.set_message(what);
    bar
}

/// Drawn on stderr, at most four times a second, when it is a terminal; hidden otherwise, so pipes
/// and CI logs stay clean.
fn target() -> ProgressDrawTarget {
    if std::io::stderr().is_terminal() {
        ProgressDrawTarget::stderr_with_hz(4)
    } else {
        ProgressDrawTarget::hidden()
    }
}
