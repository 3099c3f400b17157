//! A progress line on stderr for anything that takes more than a second (only on a terminal).

use std::io::IsTerminal;
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Duration;

/// Prints "… still working" after a second until dropped.
pub struct Progress {
    done: Arc<AtomicBool>,
}

impl Progress {
    /// Starts the timer for `what`.
    pub fn after_a_second(what: &'static str) -> Self {
        let done = Arc::new(AtomicBool::new(false));
        if std::io::stderr().is_terminal() {
            let flag = done.clone();
            std::thread::spawn(move || {
                std::thread::sleep(Duration::from_secs(1));
                let mut dots = 0;
                while !flag.load(Ordering::Relaxed) {
                    eprint!("\r{what}{:<3}", ".".repeat(dots % 4));
                    dots += 1;
                    std::thread::sleep(Duration::from_millis(300));
                }
                eprint!("\r{:width$}\r", "", width = what.len() + 3);
            });
        }
        Progress { done }
    }
}

impl Drop for Progress {
    fn drop(&mut self) {
        self.done.store(true, Ordering::Relaxed);
    }
}
