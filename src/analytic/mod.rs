//! Results without random numbers: exact enumeration of small yes/no designs, expected
//! Fisher information, and what it says a reading should advise (`advice`, `scale_fit`).

pub mod advice;
pub mod exact;
pub mod exact_sums;
pub mod information;
pub mod scale_fit;
pub mod scan;
pub mod trial_grid;
