//! Writing report files atomically: a temporary file in the same folder, then a rename,
//! so a reader never sees a half-written file.

use std::io::Write;
use std::path::{Path, PathBuf};

/// Why a file could not be written.
#[derive(Debug, thiserror::Error)]
#[error("cannot write {}: {source} (check that the folder exists and is writable)", path.display())]
pub struct WriteError {
    /// The file being written.
    pub path: PathBuf,
    /// The I/O error.
    pub source: std::io::Error,
}

/// Writes `contents` to `path` through a temporary file and a rename.
pub fn write_atomic(path: &Path, contents: &[u8]) -> Result<(), WriteError> {
    let err = |source| WriteError {
        path: path.to_path_buf(),
        source,
    };
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "report".into());
    let tmp = path.with_file_name(format!(".{name}.{}.tmp", std::process::id()));
    let result = (|| {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(contents)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result.map_err(err)
}
