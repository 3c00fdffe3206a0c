//! Replacing a vector-set directory as a unit.
//!
//! A set is written into a staging directory beside its target (`.NAME.arithvec-new-PID`),
//! every file and the staging directory are synced, and then one rename commits it: onto the
//! target when there is none (or it is empty), or an atomic exchange with the old set
//! (Linux `renameat2(RENAME_EXCHANGE)`) after which the old set, now under the staging name,
//! is removed. Where the exchange is not available the old set is first renamed aside, which
//! leaves a moment with no set at the target (a reader then finds no manifest and refuses),
//! never one with files of two runs. A failed or dropped staging removes everything it
//! created, including parent directories it had to make, so a failed `gen` leaves no empty
//! directory behind.
//!
//! The target must be a directory holding only a set (or nothing): `gen` replaces the whole
//! directory, so anything else in it is refused rather than silently deleted.

use std::path::{Path, PathBuf};

use crate::error::{Error, Problem, Result};
use crate::sets::vectorset::{EXPECTED_HEX, MANIFEST_JSON, STIMULUS_HEX, VECTORS_CSV};

/// The names a set directory may hold: the four files and their temporary names.
fn is_set_entry(name: &str) -> bool {
    [VECTORS_CSV, STIMULUS_HEX, EXPECTED_HEX, MANIFEST_JSON]
        .iter()
        .any(|f| name == *f || name == format!(".{f}.tmp"))
}

/// A staging directory that becomes the set directory on [`Staging::commit`].
pub(crate) struct Staging {
    target: PathBuf,
    dir: PathBuf,
    /// Parent directories this staging created, outermost first.
    created: Vec<PathBuf>,
    committed: bool,
}

impl Staging {
    /// Checks `target` can take a set and creates the staging directory beside it.
    pub(crate) fn begin(target: &Path) -> Result<Staging> {
        let refuse = |path: &Path, message: String| {
            Error::problem(Problem::new(path.display().to_string(), message).field("out"))
        };
        let Some(name) = target.file_name() else {
            return Err(refuse(
                target,
                "is not a directory name a set can be written to; name a new or empty \
                 directory"
                    .into(),
            ));
        };
        let parent = target
            .parent()
            .filter(|p| !p.as_os_str().is_empty())
            .unwrap_or(Path::new("."))
            .to_path_buf();
        match std::fs::symlink_metadata(target) {
            Ok(m) if m.is_dir() => {
                if m.permissions().readonly() {
                    return Err(refuse(target, "is read-only".into()));
                }
                let entries = std::fs::read_dir(target).map_err(|e| Error::io(target, e))?;
                for entry in entries {
                    let entry = entry.map_err(|e| Error::io(target, e))?;
                    let entry_name = entry.file_name().to_string_lossy().into_owned();
                    let is_file = entry.file_type().is_ok_and(|t| t.is_file());
                    if !(is_file && is_set_entry(&entry_name)) {
                        return Err(refuse(
                            &entry.path(),
                            "is not part of a vector set; gen replaces the whole directory, \
                             so it may hold only a set: move it away or choose another --out"
                                .into(),
                        ));
                    }
                }
            }
            Ok(_) => return Err(refuse(target, "exists and is not a directory".into())),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => {}
            Err(e) => return Err(Error::io(target, e)),
        }
        // Missing parents are created and remembered, so a failure can remove them again.
        let mut missing = Vec::new();
        let mut p = parent.as_path();
        while !p.as_os_str().is_empty() && !p.exists() {
            missing.push(p.to_path_buf());
            p = p.parent().unwrap_or(Path::new(""));
        }
        let mut staging = Staging {
            target: target.to_path_buf(),
            dir: parent.join(format!(
                ".{}.arithvec-new-{}",
                name.to_string_lossy(),
                std::process::id()
            )),
            created: Vec::new(),
            committed: false,
        };
        for dir in missing.into_iter().rev() {
            std::fs::create_dir(&dir).map_err(|e| Error::io(&dir, e))?;
            staging.created.push(dir);
        }
        // A staging directory left by a killed run of this same process id is stale.
        let _ = remove_all(&staging.dir);
        std::fs::create_dir(&staging.dir).map_err(|e| Error::io(&staging.dir, e))?;
        Ok(staging)
    }

    /// Where the set's files are written.
    pub(crate) fn path(&self) -> &Path {
        &self.dir
    }

    /// Syncs the staging directory and makes it the target in one step.
    pub(crate) fn commit(mut self) -> Result<()> {
        sync_dir(&self.dir)?;
        let target_has_files = std::fs::read_dir(&self.target)
            .map(|mut d| d.next().is_some())
            .unwrap_or(false);
        if target_has_files {
            if exchange(&self.dir, &self.target).is_err() {
                // No atomic exchange here: move the old set aside, then put the new one in.
                let mut old = self.dir.clone().into_os_string();
                old.push(".old");
                let old = PathBuf::from(old);
                let _ = remove_all(&old);
                std::fs::rename(&self.target, &old).map_err(|e| Error::io(&self.target, e))?;
                if let Err(e) = std::fs::rename(&self.dir, &self.target) {
                    let _ = std::fs::rename(&old, &self.target);
                    return Err(Error::io(&self.target, e));
                }
                std::fs::rename(&old, &self.dir).map_err(|e| Error::io(&old, e))?;
            }
            // The staging name now holds the old set; Drop removes it.
        } else {
            // Onto a missing or empty directory, rename(2) replaces it in one step.
            std::fs::rename(&self.dir, &self.target).map_err(|e| Error::io(&self.target, e))?;
        }
        if let Some(parent) = self.target.parent() {
            let parent = if parent.as_os_str().is_empty() {
                Path::new(".")
            } else {
                parent
            };
            sync_dir(parent)?;
        }
        self.committed = true;
        let _ = remove_all(&self.dir);
        Ok(())
    }
}

impl Drop for Staging {
    fn drop(&mut self) {
        if self.committed {
            return;
        }
        let _ = remove_all(&self.dir);
        for dir in self.created.iter().rev() {
            // Only empty directories go; remove_dir refuses anything else.
            let _ = std::fs::remove_dir(dir);
        }
    }
}

/// Removes a directory this module created and the files in it.
fn remove_all(dir: &Path) -> std::io::Result<()> {
    for entry in std::fs::read_dir(dir)? {
        let _ = std::fs::remove_file(entry?.path());
    }
    std::fs::remove_dir(dir)
}

/// Makes a directory's entries durable (its renames and new files).
fn sync_dir(dir: &Path) -> Result<()> {
    std::fs::File::open(dir)
        .and_then(|d| d.sync_all())
        .map_err(|e| Error::io(dir, e))
}

/// Swaps two directories atomically.
#[cfg(target_os = "linux")]
fn exchange(a: &Path, b: &Path) -> std::io::Result<()> {
    use std::ffi::CString;
    use std::os::unix::ffi::OsStrExt;
    let ca = CString::new(a.as_os_str().as_bytes())?;
    let cb = CString::new(b.as_os_str().as_bytes())?;
    // SAFETY: both paths are valid NUL-terminated strings that outlive the call.
    let rc = unsafe {
        libc::syscall(
            libc::SYS_renameat2,
            libc::AT_FDCWD,
            ca.as_ptr(),
            libc::AT_FDCWD,
            cb.as_ptr(),
            libc::RENAME_EXCHANGE,
        )
    };
    if rc == 0 {
        Ok(())
    } else {
        Err(std::io::Error::last_os_error())
    }
}

/// Swaps two directories atomically (not available here).
#[cfg(not(target_os = "linux"))]
fn exchange(_a: &Path, _b: &Path) -> std::io::Result<()> {
    Err(std::io::Error::from(std::io::ErrorKind::Unsupported))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A staging dropped before its commit removes itself and the parents it created.
    #[test]
    fn an_uncommitted_staging_removes_what_it_created() {
        let root = tempfile::tempdir().expect("temp dir");
        let target = root.path().join("new/deeper/set");
        let staging = Staging::begin(&target).expect("begin");
        std::fs::write(staging.path().join(VECTORS_CSV), "partial").expect("write");
        drop(staging);
        let left: Vec<_> = std::fs::read_dir(root.path()).expect("list").collect();
        assert!(left.is_empty(), "left behind: {left:?}");
    }

    /// A commit over an old set leaves exactly the new files and nothing beside them.
    #[test]
    fn a_commit_replaces_the_old_set_whole() {
        let root = tempfile::tempdir().expect("temp dir");
        let target = root.path().join("set");
        for (round, names) in [
            (1, &[VECTORS_CSV, MANIFEST_JSON][..]),
            (2, &[STIMULUS_HEX][..]),
        ] {
            let staging = Staging::begin(&target).expect("begin");
            for name in names {
                std::fs::write(staging.path().join(name), format!("{round}")).expect("write");
            }
            staging.commit().expect("commit");
        }
        let mut left: Vec<String> = std::fs::read_dir(&target)
            .expect("list")
            .map(|e| e.expect("entry").file_name().to_string_lossy().into_owned())
            .collect();
        left.sort();
        assert_eq!(left, [STIMULUS_HEX]);
        assert_eq!(std::fs::read_dir(root.path()).expect("list").count(), 1);
    }
}
