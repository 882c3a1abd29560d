//! Output files that appear whole or not at all.
//!
//! The file is claimed before the long work starts (a temporary file beside the target),
//! so a bad path fails in the first second; the content is renamed into place only when
//! complete, and an abandoned temporary file is removed.

use std::fs::File;
use std::io::Write;
use std::path::{Path, PathBuf};

/// A claimed output path with its temporary file.
#[derive(Debug)]
pub struct PendingFile {
    target: PathBuf,
    temp: PathBuf,
    committed: bool,
}

impl PendingFile {
    /// Creates the temporary file beside `target`; fails now if the folder is missing or
    /// not writable.
    pub fn claim(target: &Path) -> std::io::Result<Self> {
        let dir = match target.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        let name = target.file_name().ok_or_else(|| {
            std::io::Error::new(std::io::ErrorKind::InvalidInput, "the path names no file")
        })?;
        if target.is_dir() {
            return Err(std::io::Error::new(
                std::io::ErrorKind::InvalidInput,
                "the path is a folder",
            ));
        }
        let temp = dir.join(format!(
            ".{}.vigil-{}.tmp",
            name.to_string_lossy(),
            std::process::id()
        ));
        File::create(&temp)?;
        Ok(Self {
            target: target.to_path_buf(),
            temp,
            committed: false,
        })
    }

    /// The final path.
    pub fn target(&self) -> &Path {
        &self.target
    }

    /// Writes `bytes` to the temporary file and renames it over the target.
    pub fn commit(mut self, bytes: &[u8]) -> std::io::Result<()> {
        let mut f = File::create(&self.temp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&self.temp, &self.target)?;
        self.committed = true;
        Ok(())
    }
}

impl Drop for PendingFile {
    fn drop(&mut self) {
        if !self.committed {
            let _ = std::fs::remove_file(&self.temp);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn abandoned_claim_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out.csv");
        {
            let _claim = PendingFile::claim(&target).unwrap();
        }
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
    }

    #[test]
    fn commit_writes_whole_file() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out.csv");
        PendingFile::claim(&target)
            .unwrap()
            .commit(b"a,b\n")
            .unwrap();
        assert_eq!(std::fs::read(&target).unwrap(), b"a,b\n");
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    }

    #[test]
    fn missing_folder_fails_early() {
        assert!(PendingFile::claim(Path::new("/nonexistent-vigil-dir/out.csv")).is_err());
    }
}
