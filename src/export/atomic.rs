//! Atomic file writing: a file appears at its path complete or not at all.

use super::ExportError;
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

/// Writes a file atomically.
///
/// `write` streams the content into a temporary file in the same folder as `path`
/// (buffered); the file is then flushed, synced to disk and renamed onto `path`. On any
/// error (or a panic in `write`) the temporary file is removed: nothing new appears at
/// `path`, and a file that was already there is left unchanged.
///
/// # Errors
/// [`ExportError::Io`] naming `path` and the step that failed; an error returned by
/// `write` is reported the same way.
pub fn write_atomic(
    path: &Path,
    write: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<(), ExportError> {
    let io = |action: &'static str| {
        move |error: std::io::Error| ExportError::Io {
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
    fs::rename(&tmp, path).map_err(io("rename the temporary file onto it"))?;
    guard.path = None;
    // Make the rename itself durable where the platform allows it (best effort).
    #[cfg(unix)]
    if let Ok(d) = File::open(&dir) {
        let _ = d.sync_all();
    }
    Ok(())
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
    fn missing_folder_is_named() {
        let p = std::env::temp_dir().join("spanwright-no-such-dir-xyz/b.stl");
        let msg = write_atomic(&p, |_| Ok(())).unwrap_err().to_string();
        assert!(
            msg.contains("b.stl") && msg.contains("folder exists"),
            "{msg}"
        );
    }
}
