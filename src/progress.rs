//! The progress bar of the command line: on stderr, hidden when stderr is not a terminal
//! or when asked to be quiet. The engine only calls a counter; it never draws.

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;

/// A bar over `total` replicates; hidden when `quiet`, when stderr is not a terminal,
/// or when there is nothing to count.
pub fn bar(total: u64, quiet: bool) -> ProgressBar {
    if quiet || total == 0 || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::stderr());
    if let Ok(style) = ProgressStyle::with_template(
        "simulating {bar:40} {percent:>3}%  {human_pos}/{human_len} datasets  eta {eta}",
    ) {
        bar.set_style(style);
    }
    bar
}
