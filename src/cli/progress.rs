//! Progress while figures are made: a bar on a terminal, plain lines otherwise.
//!
//! On a terminal the bar appears only once a build has taken more than a moment
//! ([`BAR_DELAY`]), so quick builds print nothing but their closing line. Elsewhere (a log, a
//! pipe, CI) each figure gets one line as it finishes: `built NAME` or `failed NAME`. With
//! JSON diagnostics nothing is printed, so standard error holds only JSON.

use std::io::IsTerminal;
use std::time::{Duration, Instant};

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use crate::build::Progress;

/// How long a build runs before the bar is shown.
const BAR_DELAY: Duration = Duration::from_millis(300);

/// How progress is shown.
enum Display {
    Quiet,
    Lines,
    Bar(ProgressBar),
}

/// Shows figures as they are made.
pub struct Reporter {
    display: Display,
    started: Instant,
}

impl Reporter {
    pub fn new(quiet: bool) -> Reporter {
        let display = if quiet {
            Display::Quiet
        } else if std::io::stderr().is_terminal() {
            let bar = ProgressBar::with_draw_target(Some(0), ProgressDrawTarget::hidden());
            if let Ok(style) =
                ProgressStyle::with_template("{bar:30} {pos}/{len} figures  {elapsed}  {msg}")
            {
                bar.set_style(style);
            }
            Display::Bar(bar)
        } else {
            Display::Lines
        };
        Reporter {
            display,
            started: Instant::now(),
        }
    }

    /// Removes the bar, if one was drawn.
    pub fn finish(&self) {
        if let Display::Bar(bar) = &self.display {
            bar.finish_and_clear();
        }
    }
}

impl Progress for Reporter {
    fn start(&self, count: usize) {
        if let Display::Bar(bar) = &self.display {
            bar.set_length(count as u64);
        }
    }

    fn done(&self, name: &str, ok: bool) {
        match &self.display {
            Display::Quiet => {}
            Display::Lines => {
                eprintln!("{} {name}", if ok { "built" } else { "failed" });
            }
            Display::Bar(bar) => {
                if bar.is_hidden() && self.started.elapsed() >= BAR_DELAY {
                    bar.set_draw_target(ProgressDrawTarget::stderr());
                }
                bar.set_message(name.to_string());
                bar.inc(1);
            }
        }
    }
}
