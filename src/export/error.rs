//! The error type of every writer in [`crate::export`].

use std::path::PathBuf;

/// Why a file could not be written. Every message names the file or the offending item and
/// says how to fix it. When a write fails nothing is left at the target path (see
/// [`crate::atomic::write_atomic`]).
#[derive(Debug, thiserror::Error)]
pub enum ExportError {
    /// The file could not be written (nothing was left at its path).
    #[error(transparent)]
    Write(#[from] crate::atomic::WriteError),
    /// A format name that is not one of ours.
    #[error("unknown export format '{name}': use one of {known}")]
    UnknownFormat {
        /// The name as given.
        name: String,
        /// The accepted names, comma-separated.
        known: &'static str,
    },
    /// Nothing to write.
    #[error("nothing to write to '{path}': the list of parts is empty; pass at least one part")]
    NoParts {
        /// The target file.
        path: PathBuf,
    },
    /// A 3MF build transform that is not usable.
    #[error("placement {index} for part '{part}': {problem}")]
    BadPlacement {
        /// Index of the placement (= index of the part).
        index: usize,
        /// Name of the part.
        part: String,
        /// What is wrong and how to fix it.
        problem: String,
    },
    /// The exact solid could not be built (the message names the skin field or the
    /// feature, and the fix).
    #[error(transparent)]
    Solid(#[from] crate::brep::BrepError),
}
