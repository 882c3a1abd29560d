//! Every design is a coarsening of one table: the observed record of a condition is a list of
//! multinomial blocks, each with a size n and cells, and each cell is a sum of full-table terms
//! P(category | class) weighted by 1, π or 1 − π (or a bare weight, for a census of encounters).
//!
//! Full counts: present block [P(m | present)]_m (n = N_S) and absent block [P(m | absent)]_m
//! (n = N_N). Error totals (K = 2): one block [(1−π)F, π(1−H), (1−π)(1−F) + πH] (n = N).
//! Response totals (K = 2): [πH + (1−π)F, π(1−H) + (1−π)(1−F)]. A census adds [π, 1−π] (n = M).
//! A two-choice task: the target-left block [right, left] from the present row and the
//! target-right block from the absent row (n = trials of each order); its table scales d′ by
//! √2 (see `Record::TwoChoice`), so the blocks are those of full counts with other labels.

use crate::cells::full_table::Class;
use crate::cells::spec::{ConditionSpec, Record};

/// Multiplier of a term.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Weight {
    One,
    /// π of the block's condition.
    BaseRate,
    /// 1 − π of the block's condition.
    NotBaseRate,
}

/// The full-table factor of a term.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Source {
    /// P(category | class) of the block's condition.
    Table { class: Class, category: usize },
    /// The constant 1 (the weight alone, as in a census).
    Constant,
}

/// One summand of a cell probability: weight × source.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Term {
    pub source: Source,
    pub weight: Weight,
}

/// An observed cell: its probability is the sum of its terms.
#[derive(Debug, Clone, PartialEq)]
pub struct Cell {
    pub label: String,
    pub terms: Vec<Term>,
}

/// What a block counts, so a caller can set block sizes for a grid of trial numbers.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BlockKind {
    /// Trials with the stimulus present (full counts; two-choice: target on the left).
    PresentTrials,
    /// Trials with the stimulus absent (full counts; two-choice: target on the right).
    AbsentTrials,
    /// Encounters of unknown class (error or response totals).
    Encounters,
    /// Encounters counted for the base-rate census.
    Census,
}

/// One multinomial block of one condition.
#[derive(Debug, Clone, PartialEq)]
pub struct Block {
    /// Index of the condition whose parameters the cells depend on (a block never spans two).
    pub condition: usize,
    pub kind: BlockKind,
    /// Number of observations in the block (the multinomial size).
    pub n: f64,
    pub cells: Vec<Cell>,
}

fn table(class: Class, category: usize, weight: Weight) -> Term {
    Term {
        source: Source::Table { class, category },
        weight,
    }
}

fn row_labels(categories: usize, class: Class) -> Vec<String> {
    match (categories, class) {
        (2, Class::Present) => vec!["miss".into(), "hit".into()],
        (2, Class::Absent) => vec!["correct rejection".into(), "false alarm".into()],
        (_, Class::Present) => (0..categories).map(|m| format!("present→{m}")).collect(),
        (_, Class::Absent) => (0..categories).map(|m| format!("absent→{m}")).collect(),
    }
}

fn class_row(condition: usize, spec: &ConditionSpec, class: Class, n: u64) -> Block {
    let labels = if matches!(spec.record, Record::TwoChoice { .. }) {
        let order = match class {
            Class::Present => "target left",
            Class::Absent => "target right",
        };
        vec![
            format!("{order}: chose right"),
            format!("{order}: chose left"),
        ]
    } else {
        row_labels(spec.categories, class)
    };
    let cells = labels
        .into_iter()
        .enumerate()
        .map(|(m, label)| Cell {
            label,
            terms: vec![table(class, m, Weight::One)],
        })
        .collect();
    Block {
        condition,
        kind: match class {
            Class::Present => BlockKind::PresentTrials,
            Class::Absent => BlockKind::AbsentTrials,
        },
        n: n as f64,
        cells,
    }
}

fn cell(label: &str, terms: Vec<Term>) -> Cell {
    Cell {
        label: label.to_string(),
        terms,
    }
}

/// The observed blocks of condition `condition` (spec already validated; totals need K = 2).
pub fn blocks_for(condition: usize, spec: &ConditionSpec) -> Vec<Block> {
    use Class::{Absent, Present};
    use Weight::{BaseRate, NotBaseRate};
    let (encounters, knowledge, cells) = match spec.record {
        Record::Full { present, absent }
        | Record::TwoChoice {
            left: present,
            right: absent,
        } => {
            return vec![
                class_row(condition, spec, Present, present),
                class_row(condition, spec, Absent, absent),
            ];
        }
        Record::ErrorTotals {
            encounters,
            base_rate,
        } => (
            encounters,
            base_rate,
            vec![
                cell("false alarm", vec![table(Absent, 1, NotBaseRate)]),
                cell("miss", vec![table(Present, 0, BaseRate)]),
                cell(
                    "correct",
                    vec![table(Absent, 0, NotBaseRate), table(Present, 1, BaseRate)],
                ),
            ],
        ),
        Record::ResponseTotals {
            encounters,
            base_rate,
        } => (
            encounters,
            base_rate,
            vec![
                cell(
                    "yes",
                    vec![table(Present, 1, BaseRate), table(Absent, 1, NotBaseRate)],
                ),
                cell(
                    "no",
                    vec![table(Present, 0, BaseRate), table(Absent, 0, NotBaseRate)],
                ),
            ],
        ),
    };
    let mut blocks = vec![Block {
        condition,
        kind: BlockKind::Encounters,
        n: encounters as f64,
        cells,
    }];
    if let crate::vocab::BaseRate::Census(m) = knowledge {
        let constant = |weight| Term {
            source: Source::Constant,
            weight,
        };
        blocks.push(Block {
            condition,
            kind: BlockKind::Census,
            n: m as f64,
            cells: vec![
                cell("census: present", vec![constant(BaseRate)]),
                cell("census: absent", vec![constant(NotBaseRate)]),
            ],
        });
    }
    blocks
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::ConditionSpec;

    #[test]
    fn error_totals_with_census_give_two_blocks() {
        let rec = Record::ErrorTotals {
            encounters: 80,
            base_rate: crate::vocab::BaseRate::Census(200),
        };
        let spec = ConditionSpec::yes_no("field", rec, 1.5, 0.2, 0.3);
        let blocks = blocks_for(4, &spec);
        assert_eq!(blocks.len(), 2);
        assert_eq!(blocks[0].cells.len(), 3);
        assert_eq!(blocks[1].kind, BlockKind::Census);
        assert_eq!(blocks[1].n, 200.0);
        assert!(blocks.iter().all(|b| b.condition == 4));
    }

    #[test]
    fn full_rating_counts_give_two_rows_of_k_cells() {
        let spec = ConditionSpec::yes_no(
            "lab",
            Record::Full {
                present: 30,
                absent: 50,
            },
            1.0,
            0.0,
            0.5,
        );
        let blocks = blocks_for(0, &spec);
        assert_eq!(blocks.len(), 2);
        assert_eq!(blocks[0].cells[1].label, "hit");
        assert_eq!(blocks[1].n, 50.0);
    }
}
