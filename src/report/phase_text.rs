//! Words for the progress phases: the bar's label and the `--log` line of a finished phase.
//!
//! The log line is `key=value` pairs separated by single spaces, values without spaces
//! (design names are written as JSON strings), so a batch script can split it.

use crate::phase::Phase;

/// The label the progress bar shows while `phase` runs.
pub fn bar_label(phase: &Phase) -> String {
    match phase {
        Phase::Table { scenarios } => format!("table of {scenarios} scenarios"),
        Phase::SearchRound {
            design,
            round,
            trials,
        } => format!("search {design}: round {round}, {trials} trials"),
        Phase::GroupsGrid { design } => format!("groups grid {design}"),
        Phase::EffortSplit { design } => format!("effort split {design}"),
        Phase::Assumptions { design } => format!("assumptions {design}"),
        Phase::Part { index, of } => format!("part {index}/{of}"),
        Phase::Checkpointed { resumed: false } => "fixed points (checkpointed)".into(),
        Phase::Checkpointed { resumed: true } => "fixed points (resumed)".into(),
        Phase::Merge { parts } => format!("merge of {parts} parts"),
    }
}

/// One line for the log of a finished phase: its name, the work units done in it (datasets
/// or group studies simulated) and the seconds it took, then what identifies it.
pub fn log_line(phase: &Phase, units: u64, seconds: f64) -> String {
    let mut line = format!(
        "vigil-phase phase={} units={units} seconds={seconds:.3}",
        phase.name()
    );
    let quoted = |s: &str| serde_json::to_string(s).unwrap_or_else(|_| "\"?\"".into());
    let detail = match phase {
        Phase::Table { scenarios } => format!(" scenarios={scenarios}"),
        Phase::SearchRound {
            design,
            round,
            trials,
        } => format!(" design={} round={round} trials={trials}", quoted(design)),
        Phase::GroupsGrid { design }
        | Phase::EffortSplit { design }
        | Phase::Assumptions { design } => {
            format!(" design={}", quoted(design))
        }
        Phase::Part { index, of } => format!(" part={index}/{of}"),
        Phase::Checkpointed { resumed } => format!(" resumed={resumed}"),
        Phase::Merge { parts } => format!(" parts={parts}"),
    };
    line.push_str(&detail);
    line
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_design_name_with_spaces_stays_one_value() {
        let line = log_line(
            &Phase::GroupsGrid {
                design: "two words".into(),
            },
            12,
            0.5,
        );
        assert_eq!(
            line,
            "vigil-phase phase=groups units=12 seconds=0.500 design=\"two words\""
        );
    }
}
