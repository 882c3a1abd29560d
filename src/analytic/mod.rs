//! Results without random numbers: exact enumeration of small yes/no designs (and, later,
//! expected Fisher information), from the same tables as the Monte Carlo path.

pub mod exact;
pub mod information;
pub mod scan;
pub mod trial_grid;
