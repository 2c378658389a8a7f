//! Writers: binary and ASCII STL, OBJ, 3MF, STEP; every file written atomically.
//!
//! Mesh formats take [`CheckedPart`]s (one file may hold several parts) through
//! [`write_mesh`]: only a part that passed the solid checks can be written. The exact
//! solid goes to STEP through [`step_solid`] and [`write_step`]. Every writer is
//! deterministic: the same input gives the same bytes (no time stamps, fixed number
//! formatting, fixed zip entry order and times). Every file is written through
//! [`write_atomic`], so a failed write leaves nothing at the target path.
//!
//! ```no_run
//! # use spanwright::export::{write_mesh, MeshFormat};
//! # fn demo(parts: &[spanwright::check::CheckedPart]) -> Result<(), spanwright::export::ExportError> {
//! write_mesh("blade.3mf".as_ref(), MeshFormat::ThreeMf, parts)?;
//! # Ok(()) }
//! ```

mod brep;
mod error;
mod format;
mod obj;
mod outcome;
mod step;
mod stl;
mod threemf;

pub use crate::atomic::write_atomic;
pub use brep::{step_solid, step_solid_with, BrepOptions};
pub use error::ExportError;
pub use format::{Format, MeshFormat};
pub use obj::write_obj;
pub use outcome::{
    file_name, part_step_text, prism_step_text, segment_spec, stage_outcome, StepNote,
};
pub use step::{
    step_assembly_text, step_real, step_string, step_text, write_step, write_step_assembly,
    StepHeader, STEP_SCHEMA,
};
pub use stl::{push_f32, solid_name, unit_normal, write_stl, write_stl_ascii, STL_HEADER};
pub use threemf::{
    check_placements, model_xml, write_3mf, CORE_NS, MODEL_CONTENT_TYPE, MODEL_PATH,
    MODEL_REL_TYPE, RELS_CONTENT_TYPE,
};

use crate::check::CheckedPart;
use nalgebra::Matrix4;
use std::io::Write;
use std::path::Path;

/// Writes `parts` to `path` in a mesh `format`, atomically: binary or ASCII STL (all
/// triangles in one solid), OBJ (one `o` object per part) or 3MF (one object and one
/// build item per part). ASCII STL names its solid after the part when there is one,
/// else after the file stem.
///
/// # Errors
/// [`ExportError::NoParts`], [`ExportError::Write`].
pub fn write_mesh(
    path: &Path,
    format: MeshFormat,
    parts: &[CheckedPart],
) -> Result<(), ExportError> {
    if format == MeshFormat::ThreeMf {
        return write_3mf_file(path, parts, None);
    }
    if parts.is_empty() {
        return Err(ExportError::NoParts {
            path: path.to_path_buf(),
        });
    }
    let name = match parts {
        [one] => one.name().to_string(),
        _ => path
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default(),
    };
    Ok(write_atomic(path, |w| {
        write_mesh_to(w, format, &name, parts)
    })?)
}

/// Writes `parts` in a mesh `format` to a stream (`name` names an ASCII STL solid).
///
/// # Errors
/// The stream's I/O errors; more than `u32::MAX` facets in a binary STL.
pub fn write_mesh_to(
    w: &mut dyn Write,
    format: MeshFormat,
    name: &str,
    parts: &[CheckedPart],
) -> std::io::Result<()> {
    match format {
        MeshFormat::Stl => write_stl(w, parts),
        MeshFormat::StlAscii => write_stl_ascii(w, name, parts),
        MeshFormat::Obj => write_obj(w, parts),
        MeshFormat::ThreeMf => write_3mf(w, parts, None),
    }
}

/// Writes `parts` to `path` as a 3MF package, atomically, with optional build
/// transforms (one per part, see [`check_placements`]), e.g. a plate layout.
///
/// # Errors
/// [`ExportError::NoParts`], [`ExportError::BadPlacement`], [`ExportError::Write`].
pub fn write_3mf_file(
    path: &Path,
    parts: &[CheckedPart],
    placements: Option<&[Matrix4<f64>]>,
) -> Result<(), ExportError> {
    if parts.is_empty() {
        return Err(ExportError::NoParts {
            path: path.to_path_buf(),
        });
    }
    check_placements(parts, placements)?;
    Ok(write_atomic(path, |w| write_3mf(w, parts, placements))?)
}
