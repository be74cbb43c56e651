//! The progress bar of a long sweep: on stderr, only when stderr is a terminal and the
//! sweep is expected to take more than a second, never with `--quiet`.

use std::io::IsTerminal;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

/// Whether a progress bar may be shown.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ProgressMode {
    /// Shown when stderr is a terminal and the sweep takes more than a second.
    Auto,
    /// Never shown (`--quiet`, tests, library callers).
    Hidden,
}

/// Sweeps expected to be shorter than this run silently.
const SHOW_AFTER_SECONDS: f64 = 1.0;

/// A bar, or nothing.
pub struct Bar(Option<ProgressBar>);

impl Bar {
    pub fn tick(&self) {
        if let Some(bar) = &self.0 {
            bar.inc(1);
        }
    }

    pub fn finish(&self) {
        if let Some(bar) = &self.0 {
            bar.finish_and_clear();
        }
    }
}

/// Starts a bar over `points` points expected to take `estimate` seconds, when the mode and
/// the estimate call for one.
pub fn start(mode: ProgressMode, estimate: f64, points: usize) -> Bar {
    if mode == ProgressMode::Hidden
        || estimate <= SHOW_AFTER_SECONDS
        || !std::io::stderr().is_terminal()
    {
        return Bar(None);
    }
    let bar = ProgressBar::with_draw_target(Some(points as u64), ProgressDrawTarget::stderr());
    bar.set_style(
        ProgressStyle::with_template(
            "sweep {bar:40} {pos}/{len} points, {elapsed} (about {eta} left)",
        )
        .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    bar.inc(0);
    Bar(Some(bar))
}
