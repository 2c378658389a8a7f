//! Progress on a terminal: a spinner naming the current stage, drawn on standard error
//! only when it is a terminal and `--quiet` is not given, so pipes and CI logs stay clean.

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;
use std::time::Duration;

/// A stage counter shown as `[k/n] stage…` with a spinner.
pub struct Stages {
    bar: Option<ProgressBar>,
}

impl Stages {
    /// A counter of `n` stages; hidden when quiet or not on a terminal.
    pub fn new(ctx: &super::Context, n: u64) -> Stages {
        let show = !ctx.quiet && std::io::stderr().is_terminal();
        let bar = show.then(|| {
            let bar = ProgressBar::with_draw_target(Some(n), ProgressDrawTarget::stderr());
            bar.set_style(
                ProgressStyle::with_template("{spinner} [{pos}/{len}] {msg} ({elapsed})")
                    .unwrap_or_else(|_| ProgressStyle::default_spinner()),
            );
            bar.enable_steady_tick(Duration::from_millis(100));
            bar
        });
        Stages { bar }
    }

    /// Starts the next stage.
    pub fn set(&self, msg: &'static str) {
        if let Some(bar) = &self.bar {
            bar.inc(1);
            bar.set_message(msg);
        }
    }

    /// Clears the spinner.
    pub fn finish(&self) {
        if let Some(bar) = &self.bar {
            bar.finish_and_clear();
        }
    }
}
