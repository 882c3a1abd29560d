//! The parallel Monte Carlo loop: replicates in fixed chunks, merged in a fixed order.
//!
//! Replicate r always draws from the stream of (seed, scenario, r) and always lands in
//! chunk r / CHUNK; chunk tallies are merged in chunk order. So the bits of the result do
//! not depend on the thread count or on scheduling. Chunks are processed in blocks of
//! BLOCK_CHUNKS so memory stays fixed however many replicates are asked for.

use crate::simulate::{ReplicateRng, replicate_rng};
use rayon::prelude::*;

/// Replicates per chunk (one chunk is one sequential task).
pub const CHUNK: u64 = 256;
/// Chunks run in parallel before their tallies are folded into the total.
pub const BLOCK_CHUNKS: u64 = 64;

/// A simulate-and-fit step for one scenario.
pub trait Kernel: Sync {
    type Tally: Send;
    /// An empty tally.
    fn tally(&self) -> Self::Tally;
    /// Simulates one dataset from `rng`, fits it and records the result.
    fn replicate(&self, rng: &mut ReplicateRng, tally: &mut Self::Tally);
    /// Folds `other` into `into`.
    fn merge(&self, into: &mut Self::Tally, other: Self::Tally);
}

/// Runs `replicates` replicates of `kernel`; `progress` is told how many finished.
pub fn run_replicates<K: Kernel>(
    kernel: &K,
    seed: u64,
    scenario: u64,
    replicates: u64,
    progress: &(dyn Fn(u64) + Sync),
) -> K::Tally {
    let chunks = replicates.div_ceil(CHUNK);
    let mut total = kernel.tally();
    let mut start = 0;
    while start < chunks {
        let end = (start + BLOCK_CHUNKS).min(chunks);
        let parts: Vec<K::Tally> = (start..end)
            .into_par_iter()
            .map(|chunk| {
                let mut tally = kernel.tally();
                let lo = chunk * CHUNK;
                let hi = (lo + CHUNK).min(replicates);
                for r in lo..hi {
                    let mut rng = replicate_rng(seed, scenario, r);
                    kernel.replicate(&mut rng, &mut tally);
                }
                progress(hi - lo);
                tally
            })
            .collect();
        for part in parts {
            kernel.merge(&mut total, part);
        }
        start = end;
    }
    total
}
