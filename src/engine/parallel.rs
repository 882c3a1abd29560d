//! The parallel Monte Carlo loop: replicates in fixed chunks, merged in a fixed order.
//!
//! Replicate r always draws from the stream of (seed, scenario, r) and always lands in
//! chunk r / CHUNK; chunk tallies are merged in chunk order. So the bits of the result do
//! not depend on the thread count or on scheduling. Chunks are processed in blocks of
//! BLOCK_CHUNKS so memory stays fixed however many replicates are asked for.

use crate::phase::{Event, Progress};
use crate::simulate::{ReplicateRng, replicate_rng};
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, Ordering};

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

/// Number of chunks of a point of `replicates` replicates.
pub fn chunk_count(replicates: u64) -> u64 {
    replicates.div_ceil(CHUNK)
}

/// Runs chunk `chunk` of a point of `replicates` replicates: replicates
/// chunk·CHUNK .. min((chunk + 1)·CHUNK, replicates), each on its own stream.
pub fn run_chunk<K: Kernel + ?Sized>(
    kernel: &K,
    seed: u64,
    scenario: u64,
    replicates: u64,
    chunk: u64,
) -> K::Tally {
    let mut tally = kernel.tally();
    let lo = chunk * CHUNK;
    let hi = (lo + CHUNK).min(replicates);
    for r in lo..hi {
        let mut rng = replicate_rng(seed, scenario, r);
        kernel.replicate(&mut rng, &mut tally);
    }
    tally
}

/// Folds chunk tallies, given in chunk order, into one total exactly as
/// [`run_replicates`] does (an empty tally first, then each chunk in turn), so a run
/// split into parts and merged has the bits of one whole run.
pub fn merge_in_order<K: Kernel + ?Sized>(
    kernel: &K,
    chunks: impl IntoIterator<Item = K::Tally>,
) -> K::Tally {
    let mut total = kernel.tally();
    for part in chunks {
        kernel.merge(&mut total, part);
    }
    total
}

/// Runs the listed chunks (in parallel, blocks of BLOCK_CHUNKS) and returns their tallies
/// in the order given; for a part of a run split across machines.
pub fn run_chunks<K: Kernel + ?Sized>(
    kernel: &K,
    seed: u64,
    scenario: u64,
    replicates: u64,
    chunks: &[u64],
    progress: &Progress<'_>,
) -> Vec<K::Tally> {
    let mut out = Vec::with_capacity(chunks.len());
    for block in chunks.chunks(BLOCK_CHUNKS as usize) {
        let parts: Vec<K::Tally> = block
            .par_iter()
            .map(|&chunk| {
                let tally = run_chunk(kernel, seed, scenario, replicates, chunk);
                let lo = chunk * CHUNK;
                progress(Event::Done((lo + CHUNK).min(replicates).saturating_sub(lo)));
                tally
            })
            .collect();
        out.extend(parts);
    }
    out
}

/// [`run_chunks`] that starts no chunk once `stop` is set: returns the chunks that finished,
/// as (chunk, tally), in the order given (for checkpointed runs that can be interrupted).
pub fn run_chunks_until<K: Kernel + ?Sized>(
    kernel: &K,
    seed: u64,
    scenario: u64,
    replicates: u64,
    chunks: &[u64],
    stop: &AtomicBool,
    progress: &Progress<'_>,
) -> Vec<(u64, K::Tally)> {
    let done: Vec<Option<(u64, K::Tally)>> = chunks
        .par_iter()
        .map(|&chunk| {
            if stop.load(Ordering::Relaxed) {
                return None;
            }
            let tally = run_chunk(kernel, seed, scenario, replicates, chunk);
            let lo = chunk * CHUNK;
            progress(Event::Done((lo + CHUNK).min(replicates).saturating_sub(lo)));
            Some((chunk, tally))
        })
        .collect();
    done.into_iter().flatten().collect()
}

/// Runs the chunks `range` of a point of `replicates` replicates in parallel; their tallies
/// in chunk order.
fn run_block<K: Kernel + ?Sized>(
    kernel: &K,
    (seed, scenario, replicates): (u64, u64, u64),
    range: std::ops::Range<u64>,
    progress: &Progress<'_>,
) -> Vec<K::Tally> {
    range
        .into_par_iter()
        .map(|chunk| {
            let tally = run_chunk(kernel, seed, scenario, replicates, chunk);
            let lo = chunk * CHUNK;
            progress(Event::Done((lo + CHUNK).min(replicates) - lo));
            tally
        })
        .collect()
}

/// Runs `replicates` replicates of `kernel`; `progress` is told how many finished. A fixed
/// run is a growing run that is never precise enough before its count.
pub fn run_replicates<K: Kernel + ?Sized>(
    kernel: &K,
    seed: u64,
    scenario: u64,
    replicates: u64,
    progress: &Progress<'_>,
) -> K::Tally {
    let never = |_: &K::Tally| false;
    run_replicates_until(
        kernel,
        seed,
        scenario,
        (replicates, replicates),
        &never,
        progress,
    )
    .tally
}

/// The end of a run that grows until its tally is precise enough.
pub struct Grown<T> {
    pub tally: T,
    /// Replicates in the tally.
    pub replicates: u64,
    /// Whether `enough` held (false: the ceiling was reached first).
    pub met: bool,
}

/// Runs chunks of `kernel` in chunk order until `enough(tally)` holds at a chunk boundary at
/// or past `fewest` replicates, or `most` replicates are done. Chunks run in parallel blocks,
/// but the tally is folded and checked one chunk at a time, so where it stops depends only
/// on the tallies, never on the thread count; chunks of a block past the stop are dropped.
/// Stopping at n replicates gives the bits of [`run_replicates`] of n (every chunk before
/// the last is whole, and the last is cut at `most` in both).
pub fn run_replicates_until<K: Kernel + ?Sized>(
    kernel: &K,
    seed: u64,
    scenario: u64,
    (fewest, most): (u64, u64),
    enough: &dyn Fn(&K::Tally) -> bool,
    progress: &Progress<'_>,
) -> Grown<K::Tally> {
    let chunks = chunk_count(most);
    let first_check = chunk_count(fewest.min(most));
    // After the first check, blocks of one chunk per thread: little work is wasted past the
    // stop, and the block size changes only how fast, not what.
    let growing = rayon::current_num_threads().max(1) as u64;
    let mut total = kernel.tally();
    let mut start = 0;
    while start < chunks {
        let size = if start < first_check {
            (first_check - start).min(BLOCK_CHUNKS)
        } else {
            growing
        };
        let end = (start + size).min(chunks);
        let parts = run_block(kernel, (seed, scenario, most), start..end, progress);
        for (chunk, part) in (start..end).zip(parts) {
            kernel.merge(&mut total, part);
            let done = chunk + 1;
            if done >= first_check && done < chunks && enough(&total) {
                return Grown {
                    tally: total,
                    replicates: done * CHUNK,
                    met: true,
                };
            }
        }
        start = end;
    }
    let met = enough(&total);
    Grown {
        tally: total,
        replicates: most,
        met,
    }
}
