//! Runs split into parts for a cluster's job array, and their exact merge.
//!
//! A plan's fixed points — every scenario of the table and every animals × trials point of
//! the group grid — are cut into the engine's chunks of replicates. All (point, chunk) pairs
//! are numbered in plan order and dealt round-robin to the parts: pair i belongs to part
//! i mod N + 1 (so every part gets a similar share, however the points differ in size). A
//! part simulates only its chunks and writes each chunk's tally, unmerged, to a partial-
//! results file ([`part_file`]). The merge reads every part, checks that they come from the
//! same plan file, seed, experiments, vigil version and split, that no part is repeated and
//! none is missing, folds the chunk tallies of each point in chunk order (the order of one
//! whole run, so the floating sums have the same bits) and hands the totals to the same
//! summary, search and report code as a whole run.
//!
//! The sample-size search and the effort split choose each point they simulate from the
//! result of the last, so they are not split: the merge runs them, on one machine, after
//! the fixed points are combined (they simulate a few points, the table and grid many).
//! docs/cluster.md explains the choice.

pub mod checkpoint;
pub mod error;
pub mod merge;
pub mod part_file;
pub mod points;
pub mod run_part;
pub mod selection;

pub use error::ShardError;
pub use merge::{MergedTallies, merge_parts};
pub use part_file::{PartFile, plan_hash};
pub use run_part::run_part;
pub use selection::Part;
