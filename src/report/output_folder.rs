//! An output folder that appears whole or not at all.
//!
//! The folder is claimed before the long work starts: a temporary sibling folder is created
//! beside the target, so a bad path fails in the first second. The files are written into
//! it and the folder is renamed into place only when every file is complete; an abandoned
//! temporary folder is removed. An existing target is replaced only when a marker file
//! shows it is an earlier vigil report folder, never a folder of the user's.

use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

/// The file that marks a folder as vigil's own (safe to replace on the next run).
pub const MARKER: &str = ".vigil-report";

/// A claimed output folder with its temporary sibling.
#[derive(Debug)]
pub struct PendingFolder {
    target: PathBuf,
    temp: PathBuf,
    committed: bool,
}

fn invalid(message: &str) -> std::io::Error {
    std::io::Error::new(std::io::ErrorKind::InvalidInput, message.to_string())
}

impl PendingFolder {
    /// Creates the temporary folder beside `target`; fails now if the parent folder is
    /// missing or not writable, or if `target` exists and is not a vigil report folder.
    pub fn claim(target: &Path) -> std::io::Result<Self> {
        let name = target
            .file_name()
            .ok_or_else(|| invalid("the path names no folder"))?;
        let parent = match target.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        if !parent.is_dir() {
            return Err(invalid("its parent folder does not exist"));
        }
        if target.exists() {
            if !target.is_dir() {
                return Err(invalid("the path is a file, not a folder"));
            }
            if !target.join(MARKER).is_file() {
                return Err(invalid(
                    "the folder exists and is not a vigil report folder (it has no .vigil-report file), so vigil will not replace it",
                ));
            }
        }
        let temp = parent.join(format!(
            ".{}.vigil-{}.tmp",
            name.to_string_lossy(),
            std::process::id()
        ));
        if temp.exists() {
            fs::remove_dir_all(&temp)?;
        }
        fs::create_dir(&temp)?;
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

    /// Writes every `(relative path, bytes)` into the temporary folder, then puts the folder
    /// in place of the target (an earlier report folder is moved aside first and removed
    /// after).
    pub fn commit(mut self, files: &[(String, Vec<u8>)]) -> std::io::Result<()> {
        for (relative, bytes) in files {
            let path = self.temp.join(relative);
            if let Some(dir) = path.parent() {
                fs::create_dir_all(dir)?;
            }
            let mut f = fs::File::create(&path)?;
            f.write_all(bytes)?;
            f.sync_all()?;
        }
        fs::write(self.temp.join(MARKER), b"written by vigil report\n")?;
        let old = self.temp.with_extension("old");
        let replaced = self.target.exists();
        if replaced {
            fs::rename(&self.target, &old)?;
        }
        if let Err(e) = fs::rename(&self.temp, &self.target) {
            if replaced {
                let _ = fs::rename(&old, &self.target);
            }
            return Err(e);
        }
        self.committed = true;
        if replaced {
            fs::remove_dir_all(&old)?;
        }
        Ok(())
    }
}

impl Drop for PendingFolder {
    fn drop(&mut self) {
        if !self.committed {
            let _ = fs::remove_dir_all(&self.temp);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn abandoned_claim_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        {
            let _claim = PendingFolder::claim(&dir.path().join("out")).unwrap();
        }
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 0);
    }

    #[test]
    fn commit_writes_whole_folder_and_replaces_an_earlier_one() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out");
        let files = vec![("a/b.txt".to_string(), b"one".to_vec())];
        PendingFolder::claim(&target)
            .unwrap()
            .commit(&files)
            .unwrap();
        assert_eq!(fs::read(target.join("a/b.txt")).unwrap(), b"one");
        let again = vec![("c.txt".to_string(), b"two".to_vec())];
        PendingFolder::claim(&target)
            .unwrap()
            .commit(&again)
            .unwrap();
        assert!(!target.join("a").exists());
        assert_eq!(fs::read(target.join("c.txt")).unwrap(), b"two");
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 1);
    }

    #[test]
    fn refuses_a_folder_of_the_users() {
        let dir = tempfile::tempdir().unwrap();
        fs::write(dir.path().join("notes.txt"), b"mine").unwrap();
        assert!(PendingFolder::claim(dir.path()).is_err());
        assert!(PendingFolder::claim(Path::new("/nonexistent-vigil-dir/out")).is_err());
    }
}
