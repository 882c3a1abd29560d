//! Sentences of split runs: what a part wrote, and how to merge.

use crate::shard::Part;
use std::path::Path;

/// The terminal text of `vigil run --part`: what was written and the next step.
pub fn part_written(part: Part, chunks: usize, path: &Path) -> String {
    let noun = if chunks == 1 { "chunk" } else { "chunks" };
    super::layout::wrap_prose(&format!(
        "Part {} of {}: {chunks} {noun} of simulated experiments written to {}.\n\
         When all {} parts are done, combine them: vigil merge PLAN PART-FILES… (see docs/cluster.md).\n",
        part.index,
        part.count,
        path.display(),
        part.count
    ))
}
