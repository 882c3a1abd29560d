//! What each command does, as library functions the binary calls: `check`, `run`,
//! `report`, `merge`, `explore`, `ideal` and `pilot`. Each loads its input, calls the layers below and hands typed
//! results to `report`, which writes every sentence.
//!
//! Exit codes: 0 success; 2 bad input (plan, options, output path, partial-results or
//! checkpoint files); 130 a checkpointed run stopped by SIGINT or SIGTERM; 1 anything else
//! (an I/O failure while writing results).

pub mod check;
pub mod error;
pub mod explore;
pub mod ideal;
pub mod merge;
pub mod pilot;
pub mod report;
pub mod run;

pub use check::check;
pub use error::AppError;
pub use run::{PreparedRun, RunRequest, execute, prepare};
