//! Clean-up on SIGINT and SIGTERM: a command that is writing files registers what an
//! interrupted run would leave behind (temporary files of a vector set, a directory it
//! created), and a watcher thread removes them before the process exits with 128 + the
//! signal number. Without it, a `gen` stopped with Ctrl-C left gigabytes of `.tmp` files.
//!
//! The watcher uses `signal-hook`'s iterator, so the handler itself only records the signal;
//! the file removals run on an ordinary thread.

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};
use std::sync::Mutex;

/// One thing to undo when the run is interrupted.
enum Cleanup {
    /// The temporary files of a vector set being written into this directory.
    SetTemporaries(PathBuf),
    /// A temporary file being written.
    File(PathBuf),
    /// A directory this run created; removed only when it is empty.
    CreatedDir(PathBuf),
}

static PENDING: Mutex<Vec<(u64, Cleanup)>> = Mutex::new(Vec::new());
static NEXT_ID: AtomicU64 = AtomicU64::new(1);

/// Unregisters its clean-up when dropped (the run finished or failed on its own, and the
/// library removed its temporaries itself).
pub struct Guard(u64);

impl Drop for Guard {
    fn drop(&mut self) {
        if let Ok(mut p) = PENDING.lock() {
            p.retain(|(id, _)| *id != self.0);
        }
    }
}

fn register(c: Cleanup) -> Guard {
    install();
    let id = NEXT_ID.fetch_add(1, Ordering::Relaxed);
    PENDING
        .lock()
        .unwrap_or_else(|e| e.into_inner())
        .push((id, c));
    Guard(id)
}

/// Removes the temporaries of a vector set written into `dir` if the run is interrupted.
pub fn guard_vector_set(dir: &Path) -> Guard {
    register(Cleanup::SetTemporaries(dir.to_path_buf()))
}

/// Removes the temporary file `tmp` if the run is interrupted.
pub fn guard_file(tmp: &Path) -> Guard {
    register(Cleanup::File(tmp.to_path_buf()))
}

/// Removes `dir` (when empty) if the run is interrupted; a no-op guard when `dir` already
/// exists, so nobody's directory is touched.
pub fn guard_new_dir(dir: &Path) -> Option<Guard> {
    if dir.exists() {
        None
    } else {
        Some(register(Cleanup::CreatedDir(dir.to_path_buf())))
    }
}

/// Runs every registered clean-up, newest first (files before the directories holding them).
fn clean_all() {
    let pending = std::mem::take(&mut *PENDING.lock().unwrap_or_else(|e| e.into_inner()));
    for (_, c) in pending.iter().rev() {
        match c {
            Cleanup::SetTemporaries(dir) => arithvec::remove_set_temporaries(dir),
            Cleanup::File(tmp) => {
                let _ = std::fs::remove_file(tmp);
            }
            Cleanup::CreatedDir(dir) => {
                let _ = std::fs::remove_dir(dir);
            }
        }
    }
}

#[cfg(unix)]
fn install() {
    use std::sync::Once;
    static INSTALLED: Once = Once::new();
    INSTALLED.call_once(|| {
        use signal_hook::consts::{SIGINT, SIGTERM};
        let Ok(mut signals) = signal_hook::iterator::Signals::new([SIGINT, SIGTERM]) else {
            return;
        };
        std::thread::spawn(move || {
            if let Some(sig) = signals.forever().next() {
                clean_all();
                eprintln!(
                    "error: interrupted by signal {sig}; removed the unfinished output files"
                );
                std::process::exit(128 + sig);
            }
        });
    });
}

#[cfg(not(unix))]
fn install() {}
