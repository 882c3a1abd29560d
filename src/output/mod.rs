//! Output files that are safe to name and appear whole or not at all.
//!
//! Every command that writes files goes through one [`CommitSet`]:
//!
//! 1. **Claim** each output before any work ([`CommitSet::claim`]): the path is checked
//!    ([`target`]: no device node, FIFO, socket, folder or symbolic link is ever replaced; no
//!    output may be an input such as the plan, nor the same file as another output; `-` is
//!    standard output) and an empty temporary file is created beside it, so a bad path fails
//!    in the first second, not after the simulation.
//! 2. **Write** each output's bytes to its temporary file and fsync it ([`CommitSet::write`]).
//! 3. **Commit** ([`CommitSet::commit`]): only once every claimed output is written in full,
//!    rename each temporary over its target. A failure before this step leaves every old
//!    output as it was.
//!
//! Temporary files are registered in [`temporaries`]: they are removed when a claim is
//! dropped, by the signal handler on SIGINT/SIGTERM/SIGHUP, and — for processes that were
//! killed outright — swept from the target's folder by the next run.
//!
//! This module knows nothing of plans or reports, so figures, report folders and
//! partial-result files can reuse it.

pub mod commit_set;
pub mod pending_file;
pub mod target;
pub mod temporaries;

pub use commit_set::{CommitSet, OUTPUT_ALLOWED, OutputError, OutputSlot};
pub use pending_file::PendingFile;
pub use target::{OutputTarget, PathProblem};
pub use temporaries::{cleanup_on_signals, stop_gracefully_with};
