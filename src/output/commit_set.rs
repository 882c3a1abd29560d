//! A set of output files committed together: every file is written to its temporary and
//! fsynced first; only when all are complete is each renamed over its target.
//!
//! ```no_run
//! # use std::path::Path;
//! use vigil::output::CommitSet;
//! let mut set = CommitSet::new();
//! set.input("plan", Path::new("plan.toml"));
//! let json = set.claim("--json", Path::new("out.json"))?; // before the long work
//! let csv = set.claim("--csv", Path::new("out.csv"))?;
//! // … the long work …
//! set.write(json, b"{}")?;
//! set.write(csv, b"a,b\n")?;
//! let to_stdout = set.commit()?; // bytes of an output named `-`, if any
//! # Ok::<(), vigil::output::OutputError>(())
//! ```

use super::target::{OutputTarget, PathProblem};
use super::temporaries::{self, register, sweep_stale, temporary_for, unregister};
use std::fs::File;
use std::io::Write;
use std::path::{Path, PathBuf};
use thiserror::Error;

/// What an output path may be, for error messages.
pub const OUTPUT_ALLOWED: &str = "a regular file (new, or one to replace) in an existing, writable folder, \
or `-` for standard output; not an input such as the plan, not the path of another output, \
not a symbolic link, device node or named pipe";

/// A claimed output in a [`CommitSet`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct OutputSlot(usize);

/// Why an output could not be claimed or written.
#[derive(Debug, Error)]
pub enum OutputError {
    /// The path is unsafe or conflicts with an input or another output (before any work).
    #[error("{option} {}: {problem}\n  allowed: {OUTPUT_ALLOWED}", path.display())]
    Refused {
        option: String,
        path: PathBuf,
        problem: PathProblem,
    },
    /// The temporary file beside the target cannot be created (before any work).
    #[error("{option} {}: cannot write there: {source}\n  allowed: {OUTPUT_ALLOWED}", path.display())]
    Unwritable {
        option: String,
        path: PathBuf,
        source: std::io::Error,
    },
    /// Writing a finished output failed (after the work); no output was replaced.
    #[error("{}: writing the output failed: {source}; no output file was changed", path.display())]
    Write {
        path: PathBuf,
        source: std::io::Error,
    },
    /// Renaming a finished output into place failed; outputs renamed before it stay replaced.
    #[error("{}: moving the finished output into place failed: {source}", path.display())]
    Rename {
        path: PathBuf,
        source: std::io::Error,
    },
}

impl OutputError {
    /// True when the error was found before any work (a bad path: exit code 2); false for a
    /// failure while writing results (exit code 1).
    pub fn is_bad_input(&self) -> bool {
        matches!(self, Self::Refused { .. } | Self::Unwritable { .. })
    }
}

#[derive(Debug)]
struct Entry {
    target: OutputTarget,
    /// The temporary file (file targets only).
    temp: Option<PathBuf>,
    /// Bytes for standard output.
    stdout: Option<Vec<u8>>,
    written: bool,
}

/// Output files claimed before the work and committed together after it.
#[derive(Debug, Default)]
pub struct CommitSet {
    inputs: Vec<(String, PathBuf)>,
    entries: Vec<(String, Entry)>,
    swept: Vec<PathBuf>,
}

impl CommitSet {
    pub fn new() -> Self {
        Self::default()
    }

    /// Names a file this command reads (`what`, e.g. "plan"): no output may overwrite it.
    pub fn input(&mut self, what: &str, path: &Path) {
        self.inputs.push((what.to_string(), path.to_path_buf()));
    }

    /// Checks `path` for the output of `option` and creates its temporary file; sweeps the
    /// folder of temporaries left by killed vigil processes.
    pub fn claim(&mut self, option: &str, path: &Path) -> Result<OutputSlot, OutputError> {
        let refused = |problem| OutputError::Refused {
            option: option.to_string(),
            path: path.to_path_buf(),
            problem,
        };
        let target = OutputTarget::resolve(path).map_err(refused)?;
        for (what, input) in &self.inputs {
            if target.is_same_file(input) {
                return Err(refused(PathProblem::Input(what.clone())));
            }
        }
        for (other, entry) in &self.entries {
            match (&target, &entry.target) {
                (OutputTarget::Stdout, OutputTarget::Stdout) => {
                    return Err(refused(PathProblem::StdoutTaken(other.clone())));
                }
                (
                    OutputTarget::File { resolved: a, .. },
                    OutputTarget::File { resolved: b, .. },
                ) if a == b || target.is_same_file(b) => {
                    return Err(refused(PathProblem::SameAs(other.clone())));
                }
                _ => {}
            }
        }
        let temp = match &target {
            OutputTarget::Stdout => None,
            OutputTarget::File { resolved, .. } => {
                let folder = resolved.parent().unwrap_or(Path::new("/")).to_path_buf();
                if !self.swept.contains(&folder) {
                    sweep_stale(&folder);
                    self.swept.push(folder);
                }
                let temp = temporary_for(resolved);
                register(&temp);
                if let Err(source) = File::create(&temp) {
                    unregister(&mut temporaries::live(), &temp);
                    return Err(OutputError::Unwritable {
                        option: option.to_string(),
                        path: path.to_path_buf(),
                        source,
                    });
                }
                Some(temp)
            }
        };
        self.entries.push((
            option.to_string(),
            Entry {
                target,
                temp,
                stdout: None,
                written: false,
            },
        ));
        Ok(OutputSlot(self.entries.len() - 1))
    }

    /// The path the user gave for `slot` (`-` for standard output).
    pub fn path(&self, slot: OutputSlot) -> PathBuf {
        match &self.entries[slot.0].1.target {
            OutputTarget::Stdout => PathBuf::from("-"),
            OutputTarget::File { given, .. } => given.clone(),
        }
    }

    /// Writes the whole content of `slot` to its temporary file and fsyncs it (or keeps it
    /// for standard output). Nothing is replaced yet.
    pub fn write(&mut self, slot: OutputSlot, bytes: &[u8]) -> Result<(), OutputError> {
        let path = self.path(slot);
        let entry = &mut self.entries[slot.0].1;
        match &entry.temp {
            None => entry.stdout = Some(bytes.to_vec()),
            Some(temp) => {
                let written = File::create(temp).and_then(|mut f| {
                    f.write_all(bytes)?;
                    f.sync_all()
                });
                written.map_err(|source| OutputError::Write { path, source })?;
            }
        }
        entry.written = true;
        Ok(())
    }

    /// Renames every temporary over its target, once all were written, and returns the bytes
    /// meant for standard output. An interrupt cannot fall between two renames: the signal
    /// handler waits for the registry lock held here.
    pub fn commit(mut self) -> Result<Option<Vec<u8>>, OutputError> {
        if let Some((_, entry)) = self.entries.iter().find(|(_, e)| !e.written) {
            let path = match &entry.target {
                OutputTarget::Stdout => PathBuf::from("-"),
                OutputTarget::File { given, .. } => given.clone(),
            };
            return Err(OutputError::Write {
                path,
                source: std::io::Error::other("the output was never written"),
            });
        }
        let mut live = temporaries::live();
        let mut folders: Vec<PathBuf> = Vec::new();
        let mut stdout = None;
        for (_, entry) in &mut self.entries {
            match (&entry.target, entry.temp.take()) {
                (OutputTarget::File { given, resolved }, Some(temp)) => {
                    if let Err(source) = std::fs::rename(&temp, resolved) {
                        entry.temp = Some(temp);
                        return Err(OutputError::Rename {
                            path: given.clone(),
                            source,
                        });
                    }
                    unregister(&mut live, &temp);
                    if let Some(folder) = resolved.parent()
                        && !folders.iter().any(|f| f == folder)
                    {
                        folders.push(folder.to_path_buf());
                    }
                }
                _ => stdout = entry.stdout.take(),
            }
        }
        drop(live);
        // Make the renames durable; a folder that cannot be opened (some platforms) is skipped.
        for folder in folders {
            if let Ok(dir) = File::open(&folder) {
                let _ = dir.sync_all();
            }
        }
        Ok(stdout)
    }
}

impl Drop for CommitSet {
    fn drop(&mut self) {
        let mut live = temporaries::live();
        for (_, entry) in &mut self.entries {
            if let Some(temp) = entry.temp.take() {
                let _ = std::fs::remove_file(&temp);
                unregister(&mut live, &temp);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn files(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    #[test]
    fn nothing_is_replaced_until_all_are_written() {
        let dir = tempfile::tempdir().unwrap();
        let (a, b) = (dir.path().join("a.json"), dir.path().join("b.csv"));
        std::fs::write(&a, "old a").unwrap();
        std::fs::write(&b, "old b").unwrap();
        {
            let mut set = CommitSet::new();
            let sa = set.claim("--json", &a).unwrap();
            set.claim("--csv", &b).unwrap();
            set.write(sa, b"new a").unwrap();
            // b is never written: the set is dropped, as after a failure.
        }
        assert_eq!(std::fs::read_to_string(&a).unwrap(), "old a");
        assert_eq!(files(dir.path()), ["a.json", "b.csv"]);
        let mut set = CommitSet::new();
        let sa = set.claim("--json", &a).unwrap();
        let sb = set.claim("--csv", &b).unwrap();
        set.write(sa, b"new a").unwrap();
        set.write(sb, b"new b").unwrap();
        assert_eq!(set.commit().unwrap(), None);
        assert_eq!(std::fs::read_to_string(&b).unwrap(), "new b");
        assert_eq!(files(dir.path()), ["a.json", "b.csv"]);
    }

    #[test]
    fn an_unwritten_output_fails_the_commit_and_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let mut set = CommitSet::new();
        set.claim("--json", &dir.path().join("a.json")).unwrap();
        assert!(!set.commit().unwrap_err().is_bad_input());
        assert!(files(dir.path()).is_empty());
    }

    #[test]
    fn conflicts_are_refused_before_any_file_is_made() {
        let dir = tempfile::tempdir().unwrap();
        let plan = dir.path().join("plan.toml");
        std::fs::write(&plan, "x").unwrap();
        let mut set = CommitSet::new();
        set.input("plan", &plan);
        let err = set.claim("--json", &plan).unwrap_err();
        assert!(
            err.is_bad_input() && err.to_string().contains("plan"),
            "{err}"
        );
        let out = dir.path().join("out");
        set.claim("--json", &out).unwrap();
        let err = set.claim("--csv", &dir.path().join("./out")).unwrap_err();
        assert!(
            err.to_string().contains("--json names the same file"),
            "{err}"
        );
        set.claim("--csv", Path::new("-")).unwrap();
        assert!(set.claim("--svg", Path::new("-")).is_err());
    }

    #[test]
    fn standard_output_bytes_come_back() {
        let mut set = CommitSet::new();
        let s = set.claim("--json", Path::new("-")).unwrap();
        set.write(s, b"{}").unwrap();
        assert_eq!(set.commit().unwrap().as_deref(), Some(&b"{}"[..]));
    }
}
