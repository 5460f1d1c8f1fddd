//! A progress bar on standard error for long runs: only when standard error is a terminal, not
//! under CI, and only once a run has taken more than a second (a short run shows nothing).

use indicatif::{ProgressBar, ProgressStyle};
use std::io::IsTerminal;
use std::time::{Duration, Instant};

/// Whether a run may show a progress bar.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Bar {
    /// Once the run has taken more than a second, if standard error is a terminal and not CI.
    WhenSlow,
    /// Never (several files judged at once: their bars would fight over one line).
    Hidden,
}

/// Progress of reading one file, in bytes.
pub struct Progress {
    start: Instant,
    total: Option<u64>,
    label: String,
    enabled: bool,
    bar: Option<ProgressBar>,
}

impl Progress {
    /// Progress over `total` bytes (when known), labelled `label`, shown as `bar` allows.
    pub fn new(label: &str, total: Option<u64>, bar: Bar) -> Self {
        let enabled = bar == Bar::WhenSlow
            && std::io::stderr().is_terminal()
            && std::env::var_os("CI").is_none();
        Progress {
            start: Instant::now(),
            total,
            label: label.to_string(),
            enabled,
            bar: None,
        }
    }

    /// `done` bytes have been read.
    pub fn set(&mut self, done: u64) {
        if !self.enabled {
            return;
        }
        if self.bar.is_none() && self.start.elapsed() > Duration::from_secs(1) {
            let bar = match self.total {
                Some(t) => ProgressBar::new(t),
                None => ProgressBar::new_spinner(),
            }
            .with_elapsed(self.start.elapsed())
            .with_position(done);
            let style =
                ProgressStyle::with_template("{msg} [{bar:30}] {bytes}/{total_bytes}, {elapsed}")
                    .unwrap_or_else(|_| ProgressStyle::default_bar())
                    .progress_chars("=> ");
            bar.set_style(style);
            bar.set_message(self.label.clone());
            self.bar = Some(bar);
        }
        if let Some(b) = &self.bar {
            b.set_position(done);
        }
    }

    /// Remove the bar.
    pub fn finish(self) {
        if let Some(b) = self.bar {
            b.finish_and_clear();
        }
    }
}
