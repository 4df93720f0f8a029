//! The progress bar of long work (a sweep, a sample, a batch), on stderr.

use std::io::IsTerminal;
use std::time::{Duration, Instant};

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

/// Work shorter than this shows no bar.
const AFTER: Duration = Duration::from_secs(1);

/// A bar for `total` units of work: drawn on stderr only when that is a
/// terminal, without `-q`, and once the work has taken about a second.
pub(crate) struct Progress {
    bar: ProgressBar,
    start: Instant,
    wanted: bool,
}

impl Progress {
    pub(crate) fn new(total: u64, what: &str) -> Self {
        let bar = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::hidden());
        if let Ok(style) = ProgressStyle::with_template("{msg} [{bar:30}] {pos}/{len} ({eta} left)")
        {
            bar.set_style(style.progress_chars("=> "));
        }
        bar.set_message(what.to_string());
        Self {
            bar,
            start: Instant::now(),
            wanted: !crate::settings().quiet && std::io::stderr().is_terminal(),
        }
    }

    /// `done` units finished.
    pub(crate) fn at(&self, done: usize) {
        if self.wanted && self.bar.is_hidden() && self.start.elapsed() >= AFTER {
            self.bar.set_draw_target(ProgressDrawTarget::stderr());
        }
        self.bar.set_position(done as u64);
    }

    /// The work is over: the bar is cleared.
    pub(crate) fn done(&self) {
        self.bar.finish_and_clear();
    }
}
