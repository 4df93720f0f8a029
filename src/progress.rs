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

/// A spinner for one long piece of work whose size is not known (the
/// analysis of a large calc): drawn on stderr only on a terminal, without
/// `-q`, once the work has taken about a second.
pub(crate) struct Spinner {
    bar: ProgressBar,
    done: std::sync::Arc<std::sync::atomic::AtomicBool>,
    waiter: Option<std::thread::JoinHandle<()>>,
}

impl Spinner {
    pub(crate) fn new(what: &str) -> Self {
        use std::sync::atomic::{AtomicBool, Ordering};
        let bar = ProgressBar::with_draw_target(None, ProgressDrawTarget::hidden());
        if let Ok(style) = ProgressStyle::with_template("{spinner} {msg} ({elapsed})") {
            bar.set_style(style);
        }
        bar.set_message(what.to_string());
        let done = std::sync::Arc::new(AtomicBool::new(false));
        let wanted = !crate::settings().quiet && std::io::stderr().is_terminal();
        let waiter = wanted.then(|| {
            let (bar, done) = (bar.clone(), std::sync::Arc::clone(&done));
            std::thread::spawn(move || {
                let start = Instant::now();
                while start.elapsed() < AFTER {
                    if done.load(Ordering::Relaxed) {
                        return;
                    }
                    std::thread::sleep(Duration::from_millis(20));
                }
                if !done.load(Ordering::Relaxed) {
                    bar.set_draw_target(ProgressDrawTarget::stderr());
                    bar.enable_steady_tick(Duration::from_millis(120));
                }
            })
        });
        Self { bar, done, waiter }
    }
}

impl Drop for Spinner {
    fn drop(&mut self) {
        self.done.store(true, std::sync::atomic::Ordering::Relaxed);
        if let Some(w) = self.waiter.take() {
            let _ = w.join();
        }
        self.bar.finish_and_clear();
    }
}
