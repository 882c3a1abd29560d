//! The partial-results file of one part of a split run (documented in docs/cluster.md).
//!
//! JSON, versioned by `format_version`. It holds every chunk's tally unmerged, so the merge
//! can fold them in the fixed chunk order of a whole run; the tallies are the engine's own
//! types, serialised by derive, so a field added to a tally is carried with no change here.
//! Floating values are written in shortest round-trip form and read back exactly (serde_json
//! with `float_roundtrip`).

use crate::engine::parallel::CHUNK;
use crate::engine::tally::EstimateTally;
use crate::groups::kernel::GroupTally;
use serde::{Deserialize, Serialize};
use std::hash::Hasher;

/// What the `format` field says.
pub const FORMAT: &str = "vigil partial results";
/// Bumped whenever the layout changes; files of another version are refused.
pub const FORMAT_VERSION: u32 = 1;
/// The version of this vigil.
pub const VIGIL_VERSION: &str = env!("CARGO_PKG_VERSION");

/// The plan's identity: FNV-1a (64 bit) of the plan file's bytes, as `fnv1a64:` and 16 hex
/// digits. Any edit of the file, even of a comment, makes another plan.
pub fn plan_hash(bytes: &[u8]) -> String {
    let mut h = fnv::FnvHasher::default();
    h.write(bytes);
    format!("fnv1a64:{:016x}", h.finish())
}

/// What identifies a part: read first, so a file of another version is named as such
/// before its body is parsed.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Header {
    pub format: String,
    pub format_version: u32,
    pub vigil_version: String,
}

/// One part of a split run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PartFile {
    pub format: String,
    pub format_version: u32,
    pub vigil_version: String,
    /// [`plan_hash`] of the plan file.
    pub plan_hash: String,
    /// The plan's seed.
    pub seed: u64,
    /// Simulated experiments per point (the plan's, or `--experiments`).
    pub experiments: u64,
    /// Replicates per chunk.
    pub chunk_size: u64,
    /// This part, counted from 1.
    pub part: u32,
    /// How many parts the run was split into.
    pub parts: u32,
    /// Chunks of the table's scenarios this part holds.
    pub scenarios: Vec<ScenarioChunks>,
    /// Chunks of the group grid's points this part holds.
    pub groups: Vec<GroupChunks>,
}

impl PartFile {
    /// An empty part with the identifying fields filled in.
    pub fn new(plan_hash: String, seed: u64, experiments: u64, part: u32, parts: u32) -> Self {
        Self {
            format: FORMAT.into(),
            format_version: FORMAT_VERSION,
            vigil_version: VIGIL_VERSION.into(),
            plan_hash,
            seed,
            experiments,
            chunk_size: CHUNK,
            part,
            parts,
            scenarios: Vec::new(),
            groups: Vec::new(),
        }
    }

    /// Chunks this part holds, over all points.
    pub fn chunk_total(&self) -> usize {
        self.scenarios.iter().map(|s| s.chunks.len()).sum::<usize>()
            + self.groups.iter().map(|g| g.chunks.len()).sum::<usize>()
    }
}

/// One chunk's tally.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Chunk<T> {
    /// Chunk index within its point (replicates index·chunk_size onwards).
    pub chunk: u64,
    pub tally: T,
}

/// The chunks of one scenario of the table.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ScenarioChunks {
    /// The scenario's id (its position in the table; its random-stream key).
    pub scenario: u64,
    pub design: String,
    pub trials: u32,
    pub chunks: Vec<Chunk<EstimateTally>>,
}

/// The chunks of one group-grid point.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GroupChunks {
    /// Position of the design in the plan.
    pub design_index: usize,
    pub design: String,
    pub animals: u32,
    /// Trials per condition.
    pub trials: u32,
    pub chunks: Vec<Chunk<GroupTally>>,
}
