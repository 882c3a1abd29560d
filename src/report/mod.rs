//! Reports: pure functions from summaries to text or bytes, one format per file.
//!
//! Nothing here computes statistics; it formats what the engine summarised. Output files
//! are written whole or not at all by [`crate::output`].

pub mod advice_text;
pub mod check_text;
pub mod comparison;
pub mod conditions_text;
pub mod coverage_notes;
pub mod csv_out;
pub mod explore_text;
pub mod format;
pub mod groups_text;
pub mod habituation_text;
pub mod ideal_scan_text;
pub mod ideal_text;
pub mod identification_text;
pub mod json_out;
pub mod justification;
pub mod layout;
pub mod output_folder;
pub mod page;
pub mod page_html;
pub mod page_markdown;
pub mod phase_text;
pub mod pilot_plan;
pub mod pilot_text;
pub mod precision_text;
pub mod random_effects_text;
pub mod reading;
pub mod report_page;
pub mod shard_text;
pub mod style;
pub mod tables;
pub mod terminal;
pub mod uncertainty_text;
pub mod verdict;
pub mod workload_text;

/// Kept for callers of the single-file interface; see [`crate::output`].
pub use crate::output::PendingFile;
pub use output_folder::PendingFolder;

/// The caution every report carries: results rest on assumptions; animal numbers are
/// decided with the local animal-welfare body.
pub const CAUTION: &str = "These figures rest on the plan's assumptions (the hypothesised d′ and criterion, \
Gaussian evidence, independent trials, no learning or habituation). They size an experiment; they do not \
license one. Numbers of animals and trials are settled with your local animal-welfare body and the \
regulations that apply, under the Reduction principle: use the fewest animals that answer the question.";
