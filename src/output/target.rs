//! Which output paths are safe, checked before any work.
//!
//! vigil writes an output by renaming a finished temporary file over the target, which would
//! silently replace whatever is there: a device node such as `/dev/null`, a FIFO another
//! program reads, a symbolic link (not the file it points to), or the plan itself. These are
//! refused with the reason; standard output is asked for explicitly with `-`.

use std::fs::Metadata;
use std::path::{Path, PathBuf};
use thiserror::Error;

/// Where an output goes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum OutputTarget {
    /// `-`: standard output.
    Stdout,
    /// A regular file (existing or new), with its folder resolved through links.
    File {
        /// The path as the user gave it (for messages).
        given: PathBuf,
        /// The canonical folder joined with the file name: equal for two spellings of one file.
        resolved: PathBuf,
    },
}

/// Why an output path is refused.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
pub enum PathProblem {
    #[error("the path names no file")]
    NoFileName,
    #[error("the folder {0} does not exist")]
    MissingFolder(PathBuf),
    #[error("it is a folder")]
    Folder,
    #[error(
        "it is a symbolic link; vigil does not replace links (name the file it points to, or `-` for standard output)"
    )]
    Symlink,
    #[error(
        "it is a device node; vigil would replace it with a regular file (use `-` for standard output)"
    )]
    Device,
    #[error(
        "it is a named pipe (FIFO); vigil would replace it with a regular file (use `-` for standard output)"
    )]
    Fifo,
    #[error("it is a socket; vigil would replace it with a regular file")]
    Socket,
    #[error("it is not a regular file")]
    NotRegular,
    #[error("it is the {0} this command reads; writing there would overwrite it")]
    Input(String),
    #[error("{0} names the same file; each output needs its own path")]
    SameAs(String),
    #[error("{0} already writes to standard output (`-`); only one output can")]
    StdoutTaken(String),
}

impl OutputTarget {
    /// Checks `path` as an output (`-` is standard output) and resolves it.
    pub fn resolve(path: &Path) -> Result<Self, PathProblem> {
        if path.as_os_str() == "-" {
            return Ok(Self::Stdout);
        }
        let name = path.file_name().ok_or(PathProblem::NoFileName)?;
        if let Ok(meta) = std::fs::symlink_metadata(path) {
            refuse_special(&meta)?;
        }
        let folder = match path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p,
            _ => Path::new("."),
        };
        let folder = std::fs::canonicalize(folder)
            .map_err(|_| PathProblem::MissingFolder(folder.to_path_buf()))?;
        Ok(Self::File {
            given: path.to_path_buf(),
            resolved: folder.join(name),
        })
    }

    /// Whether this target is the file at `other` (an input or another output): the same
    /// resolved path, or the same file reached through a hard link.
    pub fn is_same_file(&self, other: &Path) -> bool {
        let Self::File { resolved, .. } = self else {
            return false;
        };
        if let Ok(other_resolved) = std::fs::canonicalize(other)
            && &other_resolved == resolved
        {
            return true;
        }
        same_inode(resolved, other)
    }
}

fn refuse_special(meta: &Metadata) -> Result<(), PathProblem> {
    let kind = meta.file_type();
    if kind.is_symlink() {
        return Err(PathProblem::Symlink);
    }
    if kind.is_dir() {
        return Err(PathProblem::Folder);
    }
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        if kind.is_block_device() || kind.is_char_device() {
            return Err(PathProblem::Device);
        }
        if kind.is_fifo() {
            return Err(PathProblem::Fifo);
        }
        if kind.is_socket() {
            return Err(PathProblem::Socket);
        }
    }
    if !kind.is_file() {
        return Err(PathProblem::NotRegular);
    }
    Ok(())
}

#[cfg(unix)]
fn same_inode(a: &Path, b: &Path) -> bool {
    use std::os::unix::fs::MetadataExt;
    match (std::fs::metadata(a), std::fs::metadata(b)) {
        (Ok(x), Ok(y)) => x.dev() == y.dev() && x.ino() == y.ino(),
        _ => false,
    }
}

#[cfg(not(unix))]
fn same_inode(_: &Path, _: &Path) -> bool {
    false
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dash_is_standard_output() {
        assert_eq!(
            OutputTarget::resolve(Path::new("-")),
            Ok(OutputTarget::Stdout)
        );
    }

    #[cfg(unix)]
    #[test]
    fn special_files_are_refused() {
        assert_eq!(
            OutputTarget::resolve(Path::new("/dev/null")),
            Err(PathProblem::Device)
        );
        assert_eq!(
            OutputTarget::resolve(Path::new("/dev/stdout")),
            Err(PathProblem::Symlink)
        );
        assert_eq!(
            OutputTarget::resolve(Path::new("/")),
            Err(PathProblem::NoFileName)
        );
        let dir = tempfile::tempdir().unwrap();
        assert_eq!(OutputTarget::resolve(dir.path()), Err(PathProblem::Folder));
    }

    #[test]
    fn two_spellings_of_one_file_are_the_same() {
        let dir = tempfile::tempdir().unwrap();
        let plan = dir.path().join("plan.toml");
        std::fs::write(&plan, "x").unwrap();
        let sub = dir.path().join("sub");
        std::fs::create_dir(&sub).unwrap();
        let other = sub.join("../plan.toml");
        let target = OutputTarget::resolve(&other).unwrap();
        assert!(target.is_same_file(&plan));
        assert!(
            !OutputTarget::resolve(&sub.join("plan.toml"))
                .unwrap()
                .is_same_file(&plan)
        );
    }
}
