//! Intervals and tests.

mod wilson;

pub use wilson::wilson_interval;
