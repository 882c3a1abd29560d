//! The command line's rendering of progress events, on stderr: a bar showing the running
//! phase and an ETA over the whole run (hidden when stderr is not a terminal or when asked
//! to be quiet), or with `--log` one plain line per finished phase for batch jobs. The
//! engine only sends [`Event`]s; it never draws.

use crate::phase::{Event, Phase};
use crate::report::phase_text;
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;
use std::sync::Mutex;
use std::time::Instant;

/// How progress is shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Show {
    /// The bar, when stderr is a terminal.
    Bar,
    /// One line per finished phase, whatever stderr is.
    Log,
    /// Nothing.
    Quiet,
}

/// Renders the events of one command.
pub struct Renderer {
    kind: Kind,
}

enum Kind {
    Bar(ProgressBar),
    Log(Mutex<Option<Running>>),
}

/// The phase being logged: what it is, when it started, the units done so far.
struct Running {
    phase: Phase,
    started: Instant,
    units: u64,
}

impl Running {
    fn line(&self) -> String {
        phase_text::log_line(
            &self.phase,
            self.units,
            self.started.elapsed().as_secs_f64(),
        )
    }
}

impl Renderer {
    /// A renderer over `total` work units (the bar's length; an upper bound is fine).
    pub fn new(total: u64, show: Show) -> Self {
        let kind = match show {
            Show::Log => Kind::Log(Mutex::new(None)),
            Show::Bar => Kind::Bar(bar(total, false)),
            Show::Quiet => Kind::Bar(ProgressBar::hidden()),
        };
        Renderer { kind }
    }

    /// Takes one event from the layers.
    pub fn event(&self, event: Event) {
        match &self.kind {
            Kind::Bar(bar) => match event {
                Event::Start(phase) => bar.set_message(phase_text::bar_label(&phase)),
                Event::Done(n) | Event::Skipped(n) => bar.inc(n),
                Event::Planned(n) => {
                    let needed = bar.position().saturating_add(n);
                    if bar.length().is_some_and(|len| len < needed) {
                        bar.set_length(needed);
                    }
                }
            },
            Kind::Log(running) => {
                let mut running = running.lock().unwrap_or_else(|e| e.into_inner());
                match event {
                    Event::Start(phase) => {
                        if let Some(done) = running.take() {
                            eprintln!("{}", done.line());
                        }
                        *running = Some(Running {
                            phase,
                            started: Instant::now(),
                            units: 0,
                        });
                    }
                    Event::Done(n) => {
                        if let Some(r) = running.as_mut() {
                            r.units += n;
                        }
                    }
                    Event::Planned(_) | Event::Skipped(_) => {}
                }
            }
        }
    }

    /// Ends the output: clears the bar, or logs the last phase.
    pub fn finish(&self) {
        match &self.kind {
            Kind::Bar(bar) => bar.finish_and_clear(),
            Kind::Log(running) => {
                let mut running = running.lock().unwrap_or_else(|e| e.into_inner());
                if let Some(done) = running.take() {
                    eprintln!("{}", done.line());
                }
            }
        }
    }
}

/// The bar's layout: the running phase's label (cut to 40 columns), the bar over the whole
/// run, and an ETA from the rate so far.
const TEMPLATE: &str = "{msg:<40!} {bar:24} {percent:>3}%  {human_pos}/{human_len}  eta {eta}";

/// A bar over `total` work units; hidden when `quiet`, when stderr is not a terminal,
/// or when there is nothing to count.
pub fn bar(total: u64, quiet: bool) -> ProgressBar {
    if quiet || total == 0 || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::stderr());
    if let Ok(style) = ProgressStyle::with_template(TEMPLATE) {
        bar.set_style(style);
    }
    bar.set_message("simulating");
    bar
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_template_is_one_indicatif_accepts() {
        // A rejected template would silently fall back to indicatif's default style.
        assert!(ProgressStyle::with_template(TEMPLATE).is_ok());
    }
}
