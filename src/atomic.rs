//! Atomic file writing: a file appears at its path complete or not at all; a [`Batch`]
//! of files appears whole or not at all. Every file spanwright writes goes through here.

use std::fs::{self, File, OpenOptions};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

/// Distinguishes temporary files of concurrent writes within one process.
static COUNTER: AtomicU64 = AtomicU64::new(0);

/// Removes the temporary file unless disarmed (also when the writer panics).
struct TempGuard {
    path: Option<PathBuf>,
}

impl Drop for TempGuard {
    fn drop(&mut self) {
        if let Some(p) = self.path.take() {
            let _ = fs::remove_file(p);
        }
    }
}

/// Why a file could not be written: the file, what we were doing, and the system's
/// error. Nothing was left at the path.
#[derive(Debug, thiserror::Error)]
#[error(
    "cannot write '{}' ({action}): {error}. Check that the folder exists and is writable \
     and that the disk has free space; nothing was written to '{}'",
    path.display(),
    path.display()
)]
pub struct WriteError {
    /// The file we tried to write.
    pub path: PathBuf,
    /// What we were doing (create the temporary file, write, sync, rename).
    pub action: &'static str,
    /// The operating system's error.
    pub error: std::io::Error,
}

/// Writes a file atomically.
///
/// `write` streams the content into a temporary file in the same folder as `path`
/// (buffered); the file is then flushed, synced to disk and renamed onto `path`. On any
/// error (or a panic in `write`) the temporary file is removed: nothing new appears at
/// `path`, and a file that was already there is left unchanged.
///
/// # Errors
/// [`WriteError`] naming `path` and the step that failed; an error returned by `write`
/// is reported the same way.
pub fn write_atomic(
    path: &Path,
    write: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<(), WriteError> {
    let staged = stage(path, write)?;
    staged.commit()
}

/// A file written to its temporary name and synced, waiting for its rename.
struct Staged {
    tmp: TempGuard,
    path: PathBuf,
    dir: PathBuf,
}

impl Staged {
    fn commit(self) -> Result<(), WriteError> {
        let dir = self.dir.clone();
        self.rename()?;
        sync_dir(&dir);
        Ok(())
    }

    /// Renames the temporary file onto the path (not yet durable: see [`sync_dir`]).
    fn rename(mut self) -> Result<(), WriteError> {
        let Some(tmp) = self.tmp.path.take() else {
            return Ok(());
        };
        if let Err(error) = fs::rename(&tmp, &self.path) {
            let _ = fs::remove_file(&tmp);
            return Err(WriteError {
                path: self.path.clone(),
                action: "rename the temporary file onto it",
                error,
            });
        }
        Ok(())
    }
}

/// Makes the renames in `dir` durable where the platform allows it (best effort).
fn sync_dir(dir: &Path) {
    #[cfg(unix)]
    if let Ok(d) = File::open(dir) {
        let _ = d.sync_all();
    }
    #[cfg(not(unix))]
    let _ = dir;
}

/// Several files that appear together: each [`Batch::write`] stages a complete,
/// synced temporary file; [`Batch::commit`] renames them all onto their paths. A batch
/// dropped before its commit (an error in a later file, a panic) removes its temporary
/// files, so a command that fails half way leaves nothing new behind.
#[derive(Default)]
pub struct Batch {
    staged: Vec<Staged>,
}

impl Batch {
    /// An empty batch.
    pub fn new() -> Self {
        Self::default()
    }

    /// Stages one file (see [`write_atomic`] for how).
    ///
    /// # Errors
    /// [`WriteError`] naming `path` and the step that failed.
    pub fn write(
        &mut self,
        path: &Path,
        write: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
    ) -> Result<(), WriteError> {
        self.staged.push(stage(path, write)?);
        Ok(())
    }

    /// The paths staged so far, in order.
    pub fn paths(&self) -> Vec<PathBuf> {
        self.staged.iter().map(|s| s.path.clone()).collect()
    }

    /// Renames every staged file onto its path, in order, and returns the paths.
    ///
    /// # Errors
    /// [`WriteError`] for the first rename that fails; the files not yet renamed are
    /// removed.
    pub fn commit(mut self) -> Result<Vec<PathBuf>, WriteError> {
        let paths = self.paths();
        let mut dirs: Vec<PathBuf> = Vec::new();
        for s in std::mem::take(&mut self.staged) {
            if !dirs.contains(&s.dir) {
                dirs.push(s.dir.clone());
            }
            s.rename()?;
        }
        // Each folder synced once, after all its renames.
        for d in &dirs {
            sync_dir(d);
        }
        Ok(paths)
    }
}

/// Writes `path`'s content to a new temporary file beside it and syncs it.
fn stage(
    path: &Path,
    write: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<Staged, WriteError> {
    let io = |action: &'static str| {
        move |error: std::io::Error| WriteError {
            path: path.to_path_buf(),
            action,
            error,
        }
    };
    let name = path.file_name().ok_or_else(|| {
        io("check the file name")(std::io::Error::new(
            std::io::ErrorKind::InvalidInput,
            "the path has no file name; give a path that ends in a file name",
        ))
    })?;
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let tmp = dir.join(format!(
        ".{}.{}-{}.tmp",
        name.to_string_lossy(),
        std::process::id(),
        COUNTER.fetch_add(1, Ordering::Relaxed)
    ));
    let file = OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&tmp)
        .map_err(io("create a temporary file beside it"))?;
    let mut guard = TempGuard {
        path: Some(tmp.clone()),
    };
    let mut out = BufWriter::with_capacity(1 << 16, file);
    write(&mut out).map_err(io("write"))?;
    let file: File = out.into_inner().map_err(|e| io("write")(e.into_error()))?;
    file.sync_all().map_err(io("sync to disk"))?;
    drop(file);
    Ok(Staged {
        tmp: std::mem::replace(&mut guard, TempGuard { path: None }),
        path: path.to_path_buf(),
        dir,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!(
            "spanwright-atomic-{tag}-{}-{}",
            std::process::id(),
            COUNTER.fetch_add(1, Ordering::Relaxed)
        ));
        fs::create_dir_all(&d).unwrap();
        d
    }

    #[test]
    fn writes_whole_file_and_leaves_no_temporary() {
        let d = scratch("ok");
        let p = d.join("a.txt");
        write_atomic(&p, |w| w.write_all(b"hello")).unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"hello");
        assert_eq!(fs::read_dir(&d).unwrap().count(), 1);
        fs::remove_dir_all(d).unwrap();
    }

    #[test]
    fn failure_keeps_old_file_and_removes_temporary() {
        let d = scratch("fail");
        let p = d.join("a.txt");
        fs::write(&p, b"old").unwrap();
        let e = write_atomic(&p, |w| {
            w.write_all(b"partial")?;
            Err(std::io::Error::other("disk on fire"))
        })
        .unwrap_err();
        let msg = e.to_string();
        assert!(
            msg.contains("a.txt") && msg.contains("disk on fire"),
            "{msg}"
        );
        assert_eq!(fs::read(&p).unwrap(), b"old");
        assert_eq!(fs::read_dir(&d).unwrap().count(), 1);
        fs::remove_dir_all(d).unwrap();
    }

    #[test]
    fn a_batch_dropped_before_commit_leaves_nothing() {
        let d = scratch("batch");
        let mut batch = Batch::new();
        batch
            .write(&d.join("a.txt"), |w| w.write_all(b"a"))
            .unwrap();
        let e = batch.write(&d.join("no/such/b.txt"), |w| w.write_all(b"b"));
        assert!(e.is_err());
        drop(batch);
        assert_eq!(fs::read_dir(&d).unwrap().count(), 0);
        let mut batch = Batch::new();
        batch
            .write(&d.join("a.txt"), |w| w.write_all(b"a"))
            .unwrap();
        batch
            .write(&d.join("b.txt"), |w| w.write_all(b"b"))
            .unwrap();
        assert_eq!(fs::read_dir(&d).unwrap().count(), 2, "two temporaries");
        let paths = batch.commit().unwrap();
        assert_eq!(paths.len(), 2);
        assert_eq!(fs::read(d.join("b.txt")).unwrap(), b"b");
        assert_eq!(fs::read_dir(&d).unwrap().count(), 2, "no temporaries left");
        fs::remove_dir_all(d).unwrap();
    }

    #[test]
    fn missing_folder_is_named() {
        let p = std::env::temp_dir().join("spanwright-no-such-dir-xyz/b.stl");
        let msg = write_atomic(&p, |_| Ok(())).unwrap_err().to_string();
        assert!(
            msg.contains("b.stl") && msg.contains("folder exists"),
            "{msg}"
        );
    }
}
