//! One output file on its own: a [`CommitSet`] of one, with the older `claim`/`commit`
//! interface. Commands that write several files use a [`CommitSet`], so that all appear
//! together or none does.

use super::commit_set::{CommitSet, OutputError, OutputSlot};
use std::path::{Path, PathBuf};

/// A claimed output path with its temporary file.
#[derive(Debug)]
pub struct PendingFile {
    set: CommitSet,
    slot: OutputSlot,
    target: PathBuf,
}

fn to_io(e: OutputError) -> std::io::Error {
    std::io::Error::other(e.to_string())
}

impl PendingFile {
    /// Checks the path and creates the temporary file beside `target`.
    pub fn claim(target: &Path) -> std::io::Result<Self> {
        let mut set = CommitSet::new();
        let slot = set.claim("output", target).map_err(to_io)?;
        Ok(Self {
            set,
            slot,
            target: target.to_path_buf(),
        })
    }

    /// The final path.
    pub fn target(&self) -> &Path {
        &self.target
    }

    /// Writes `bytes` to the temporary file, fsyncs it and renames it over the target.
    pub fn commit(mut self, bytes: &[u8]) -> std::io::Result<()> {
        self.set.write(self.slot, bytes).map_err(to_io)?;
        self.set.commit().map_err(to_io).map(|_| ())
    }
}
