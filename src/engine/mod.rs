//! The engine: kernels that simulate and fit one dataset, the deterministic parallel loop,
//! tallies and their summaries.
//!
//! The engine receives what to simulate and what to fit (a kernel built from a resolved
//! scenario); it knows nothing of plans as a whole, expected information or hypotheses
//! beyond the contrasts it is handed. Printing stays out: progress goes to a callback the
//! command line turns into a bar.

pub mod contrast;
pub mod general_fit;
pub mod parallel;
pub mod rating_kernel;
pub mod sampler;
pub mod scenario_kernel;
pub mod summary;
pub mod tally;
pub mod yesno_kernel;

pub use contrast::Contrast;
pub use summary::{DatasetSummary, Figure, Method, QuantitySummary, ScenarioSummary, Share};
