//! Every result as tidy CSV, one table per file (`vigil run --tables DIR`, the report
//! folder's `tables/`): the estimates (the bytes of `--csv`), power by trials, every point
//! the sample-size search evaluated, the group grid and the effort frontier. Every file is
//! always written, header only when the plan has nothing for it, so a script can rely on
//! the set. Columns are documented in docs/outputs.md.

pub mod assurance;
pub mod effort;
pub mod group_grid;
pub mod power;
pub mod search;
pub mod sensitivity;

use crate::engine::{Figure, ScenarioSummary, Share};
use crate::groups::GroupReport;
use crate::plan::Plan;
use crate::search::SearchResult;

/// The file names, in the order they are written.
pub const FILES: [&str; 7] = [
    "estimates.csv",
    "power.csv",
    "search.csv",
    "group_grid.csv",
    "effort.csv",
    "sensitivity.csv",
    "assurance.csv",
];

/// The report folder's subfolder holding the tables.
pub const FOLDER: &str = "tables";

/// What a table file holds, for the report page's list of files.
pub fn describe(file: &str) -> &'static str {
    match file {
        "estimates.csv" => "one row per design × trials × quantity (the bytes of results.csv)",
        "power.csv" => "power by trials: one row per design × trials × hypothesis × test",
        "search.csv" => "every point the sample-size search evaluated, one row per target",
        "group_grid.csv" => "the group grid: animals × trials × analysis × group test",
        "effort.csv" => "the effort frontier: every simulated allocation × driving test",
        "sensitivity.csv" => {
            "the answer for each value of each [sensitivity] assumption, corners simulated"
        }
        "assurance.csv" => {
            "expected power over the [assurance] distributions, approximate and simulated"
        }
        _ => "a table",
    }
}

/// Everything the tables are made from.
pub struct TableInputs<'a> {
    pub plan: &'a Plan,
    pub summaries: &'a [ScenarioSummary],
    pub searches: &'a [SearchResult],
    pub groups: Option<&'a GroupReport>,
    pub uncertainty: Option<&'a crate::uncertainty::UncertaintyReport>,
}

/// Every table as (file name, bytes), in [`FILES`] order.
pub fn render(inputs: &TableInputs) -> Result<Vec<(&'static str, Vec<u8>)>, csv::Error> {
    Ok(vec![
        (
            FILES[0],
            super::csv_out::render(inputs.plan, inputs.summaries)?,
        ),
        (FILES[1], power::render(inputs.plan, inputs.summaries)?),
        (FILES[2], search::render(inputs.searches)?),
        (FILES[3], group_grid::render(inputs.groups)?),
        (FILES[4], effort::render(inputs.groups)?),
        (
            FILES[5],
            sensitivity::render(inputs.uncertainty.and_then(|u| u.sensitivity.as_ref()))?,
        ),
        (
            FILES[6],
            assurance::render(inputs.uncertainty.and_then(|u| u.assurance.as_ref()))?,
        ),
    ])
}

/// Full precision, empty for undefined values (the estimates' rule).
fn num(x: f64) -> String {
    super::csv_out::num(x)
}

fn opt(x: Option<f64>) -> String {
    x.map_or_else(String::new, num)
}

/// A share's value, low and high.
fn share(s: &Share) -> [String; 3] {
    [num(s.value), num(s.low), num(s.high)]
}

/// A mean's value and Monte Carlo SE.
fn figure(f: &Figure) -> [String; 2] {
    [num(f.value), num(f.mc_se)]
}

/// The bytes of a table with `columns` and `rows`.
fn write(columns: &[&str], rows: &[Vec<String>]) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(columns)?;
    for row in rows {
        debug_assert_eq!(row.len(), columns.len());
        w.write_record(row)?;
    }
    w.into_inner().map_err(|e| e.into_error().into())
}
