//! The one simulation of a scenario: cell counts of every observed block drawn from the true
//! model, whatever route later fits them.
//!
//! A replicate's counts depend only on (seed, scenario, replicate) and the truth: the
//! sampler is built from the true observation model alone (never from the analysis, the
//! route or the hypotheses), and it draws the blocks in the model's block order. A block of
//! two cells is one binomial count of its second cell by alias-table lookup (the yes/no hot
//! path); a block of more cells is a multinomial by conditional binomials.

use crate::cells::cell_probabilities::{Order, cell_probabilities};
use crate::cells::error::SpecError;
use crate::cells::observation_model::ObservationModel;
use crate::simulate::{BinomialTable, ReplicateRng, multinomial_into};
use std::ops::Range;

/// How one block is drawn.
#[derive(Debug, Clone)]
enum BlockDraw {
    /// Two cells: the count of the second cell ~ Binomial(n, p₁); the first gets the rest.
    Two { n: u64, table: BinomialTable },
    /// More cells: multinomial counts of `n` over `p`.
    Many { n: u64, p: Vec<f64> },
}

/// Samples the observed count table of one scenario.
#[derive(Debug, Clone)]
pub struct TableSampler {
    blocks: Vec<BlockDraw>,
    /// Start of each block's cells in the flat count buffer, plus the total at the end.
    offsets: Vec<usize>,
}

impl TableSampler {
    /// The sampler of the true model `truth` at its hypothesised parameters.
    pub fn new(truth: &ObservationModel) -> Result<Self, SpecError> {
        let theta = truth.hypothesised_theta();
        let probabilities = cell_probabilities(truth, &theta, Order::First)
            .map_err(|e| SpecError::Probabilities(e.to_string()))?;
        let mut offsets = vec![0];
        let blocks = truth
            .blocks()
            .iter()
            .zip(probabilities)
            .map(|(b, p)| {
                let n = b.n.round() as u64;
                offsets.push(offsets.last().copied().unwrap_or(0) + p.p.len());
                match p.p.len() {
                    2 => BlockDraw::Two {
                        n,
                        table: BinomialTable::new(n as u32, p.p[1]),
                    },
                    _ => BlockDraw::Many { n, p: p.p },
                }
            })
            .collect();
        Ok(Self { blocks, offsets })
    }

    /// Cells in the whole table (the length of the buffer `draw` fills).
    pub fn cells(&self) -> usize {
        self.offsets.last().copied().unwrap_or(0)
    }

    /// Number of blocks.
    pub fn block_count(&self) -> usize {
        self.blocks.len()
    }

    /// Where block `b`'s cells sit in the flat buffer.
    pub fn block_range(&self, b: usize) -> Range<usize> {
        self.offsets[b]..self.offsets[b + 1]
    }

    /// The binomial table of a two-cell block (its second cell's count), for exact
    /// enumeration; `None` for larger blocks.
    pub fn binomial_table(&self, b: usize) -> Option<&BinomialTable> {
        match &self.blocks[b] {
            BlockDraw::Two { table, .. } => Some(table),
            BlockDraw::Many { .. } => None,
        }
    }

    /// Draws one table into `out` (length [`Self::cells`]), block by block in model order.
    #[inline]
    pub fn draw(&self, rng: &mut ReplicateRng, out: &mut [u64]) {
        for (b, block) in self.blocks.iter().enumerate() {
            let at = self.offsets[b];
            match block {
                BlockDraw::Two { n, table } => {
                    let k = u64::from(table.sample(rng));
                    out[at] = n - k;
                    out[at + 1] = k;
                }
                BlockDraw::Many { n, p } => {
                    multinomial_into(rng, *n, p, &mut out[at..at + p.len()]);
                }
            }
        }
    }
}
