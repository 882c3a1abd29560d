//! The temporary files of this process: named after their target and the process id
//! (`.NAME.vigil-PID.tmp`, beside the target), registered while they exist, removed on
//! SIGINT/SIGTERM/SIGHUP by [`cleanup_on_signals`], and swept by a later run when the
//! process that made them was killed outright ([`sweep_stale`]).

use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// Exit code after an interrupting signal (128 + SIGINT, the shell's convention).
pub const INTERRUPTED_EXIT_CODE: i32 = 130;

const PREFIX: &str = ".";
const MARK: &str = ".vigil-";
const SUFFIX: &str = ".tmp";

/// Temporary files that exist now. The commit step holds this lock while it renames, so an
/// interrupt either waits for a whole commit or removes every temporary before any rename.
static LIVE: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

/// The registry, usable even if a thread panicked while holding it.
pub(crate) fn live() -> std::sync::MutexGuard<'static, Vec<PathBuf>> {
    LIVE.lock().unwrap_or_else(|poisoned| poisoned.into_inner())
}

/// The temporary file for `target` (a path in the same folder, so the rename is atomic).
pub fn temporary_for(target: &Path) -> PathBuf {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let folder = target.parent().unwrap_or(Path::new(""));
    folder.join(format!(
        "{PREFIX}{name}{MARK}{}{SUFFIX}",
        std::process::id()
    ))
}

pub(crate) fn register(path: &Path) {
    live().push(path.to_path_buf());
}

pub(crate) fn unregister(list: &mut Vec<PathBuf>, path: &Path) {
    list.retain(|p| p != path);
}

/// Removes every registered temporary file (and forgets them).
pub fn remove_all() {
    let mut list = live();
    for path in list.drain(..) {
        let _ = std::fs::remove_file(path);
    }
}

/// Installs the handler for SIGINT, SIGTERM and SIGHUP: it removes this process's temporary
/// files and exits with [`INTERRUPTED_EXIT_CODE`], which also stops the work. Outputs
/// already renamed into place stay (they are complete). Called once, by the binary.
pub fn cleanup_on_signals() -> Result<(), String> {
    ctrlc::set_handler(|| {
        // A checkpointed run stops at its next chunk boundary and saves; a second signal
        // (or any signal of a run without a checkpoint) ends the process here.
        if let Some(flag) = GRACEFUL.get()
            && !flag.swap(true, std::sync::atomic::Ordering::SeqCst)
        {
            eprintln!("\nstopping: saving the checkpoint (press Ctrl-C again to quit at once)");
            return;
        }
        // Holding the lock through exit: no commit can start renaming after this point.
        let mut list = live();
        for path in list.drain(..) {
            let _ = std::fs::remove_file(path);
        }
        eprintln!("vigil: interrupted; temporary files removed, earlier outputs left as they were");
        std::process::exit(INTERRUPTED_EXIT_CODE);
    })
    .map_err(|e| e.to_string())
}

static GRACEFUL: std::sync::OnceLock<&'static std::sync::atomic::AtomicBool> =
    std::sync::OnceLock::new();

/// Makes the first SIGINT/SIGTERM/SIGHUP set `flag` (the work polls it, saves and stops)
/// instead of ending the process; a second signal still removes the temporaries and exits.
/// One handler serves both, since a process may install only one.
pub fn stop_gracefully_with(flag: &'static std::sync::atomic::AtomicBool) {
    let _ = GRACEFUL.set(flag);
}

/// The process id in a temporary file name of ours (`.NAME.vigil-PID.tmp`).
fn owner(file_name: &str) -> Option<u32> {
    let rest = file_name.strip_prefix(PREFIX)?.strip_suffix(SUFFIX)?;
    let (_, pid) = rest.rsplit_once(MARK)?;
    pid.parse().ok()
}

/// Whether process `pid` is running; `None` where this cannot be told (no `/proc`).
fn alive(pid: u32) -> Option<bool> {
    let proc = Path::new("/proc");
    if !proc.join("self").exists() {
        return None;
    }
    Some(proc.join(pid.to_string()).exists())
}

/// Removes the temporary files in `folder` left by vigil processes that no longer run
/// (killed with SIGKILL, or by a power cut). Files of running processes are kept; where
/// liveness cannot be told (no `/proc`) nothing is removed. Returns how many were removed.
pub fn sweep_stale(folder: &Path) -> usize {
    let Ok(entries) = std::fs::read_dir(folder) else {
        return 0;
    };
    let mut removed = 0;
    for entry in entries.flatten() {
        let name = entry.file_name();
        let Some(pid) = owner(&name.to_string_lossy()) else {
            continue;
        };
        let is_file = entry.file_type().is_ok_and(|t| t.is_file());
        if is_file
            && pid != std::process::id()
            && alive(pid) == Some(false)
            && std::fs::remove_file(entry.path()).is_ok()
        {
            removed += 1;
        }
    }
    removed
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_carry_the_process_id() {
        let t = temporary_for(Path::new("out/run.json"));
        let name = t.file_name().unwrap().to_string_lossy().into_owned();
        assert_eq!(owner(&name), Some(std::process::id()));
        assert_eq!(t.parent().unwrap(), Path::new("out"));
        assert_eq!(owner("run.json"), None);
        assert_eq!(owner(".a.vigil-x.tmp"), None);
    }

    #[cfg(target_os = "linux")]
    #[test]
    fn sweep_removes_only_dead_processes_files() {
        let dir = tempfile::tempdir().unwrap();
        // A pid above the kernel's largest (2^22) never runs.
        let dead = dir.path().join(".out.json.vigil-4194305.tmp");
        let mine = temporary_for(&dir.path().join("out.csv"));
        let other = dir.path().join("notes.tmp");
        for p in [&dead, &mine, &other] {
            std::fs::write(p, "x").unwrap();
        }
        assert_eq!(sweep_stale(dir.path()), 1);
        assert!(!dead.exists() && mine.exists() && other.exists());
    }
}
