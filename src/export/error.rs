//! The error type of every writer in [`crate::export`].

use std::path::PathBuf;

/// Why a file could not be written. Every message names the file or the offending item and
/// says how to fix it. When a write fails nothing is left at the target path (see
/// [`super::write_atomic`]).
#[derive(Debug, thiserror::Error)]
pub enum ExportError {
    /// The operating system refused a file operation.
    #[error(
        "cannot write '{path}' ({action}): {error}. Check that the folder exists and is \
         writable and that the disk has free space; nothing was written to '{path}'"
    )]
    Io {
        /// The file we tried to write.
        path: PathBuf,
        /// What we were doing (create the temporary file, write, sync, rename).
        action: &'static str,
        /// The operating system's error.
        error: std::io::Error,
    },
    /// A format name that is not one of ours.
    #[error("unknown export format '{name}': use one of {known}")]
    UnknownFormat {
        /// The name as given.
        name: String,
        /// The accepted names, comma-separated.
        known: &'static str,
    },
    /// STEP was asked of a mesh writer.
    #[error(
        "STEP is written from the exact surface model, not from a triangle mesh: build the \
         solid with export::step_solid and write it with export::write_step"
    )]
    StepFromMesh,
    /// Nothing to write.
    #[error("nothing to write to '{path}': the list of parts is empty; pass at least one part")]
    NoParts {
        /// The target file.
        path: PathBuf,
    },
    /// A mesh that no file format can represent faithfully.
    #[error(
        "part '{part}': {problem}. The mesh is broken before export: rebuild it (if it came \
         from the tessellator, please report this as a bug)"
    )]
    BadMesh {
        /// Name of the part.
        part: String,
        /// What is wrong, with the offending index and value.
        problem: String,
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
