//! The observer: evidence distributions, criteria, response probabilities and the
//! measures of signal detection theory. Knows nothing of plans or random numbers.

pub mod ideal;
pub mod normal;
pub mod observer;

pub use observer::{LapseSpec, Observer, Rates, YesNoMeasures};
