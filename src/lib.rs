//! vigil: plan signal-detection experiments before fieldwork.
//!
//! A plan (TOML) names a hypothesised observer and candidate designs. vigil simulates each
//! design many times, fits every simulated dataset by maximum likelihood and reports how
//! precisely sensitivity (d′) and bias (c) are estimated and how strongly they trade off.
//!
//! Data flow, one direction: [`plan`] → scenarios → [`engine`] (simulate → fit → tally)
//! or [`analytic`] → summaries → [`report`].

pub mod analytic;
pub mod cells;
pub mod commands;
pub mod design;
pub mod engine;
pub mod evaluate;
pub mod fit;
pub mod groups;
pub mod infer;
pub mod model;
pub mod plan;
pub mod power;
pub mod progress;
pub mod report;
pub mod search;
pub mod simulate;
pub mod vocab;
