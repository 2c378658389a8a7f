//! Writers: binary and ASCII STL, OBJ, 3MF, STEP; every file written atomically.
//!
//! Mesh formats take [`Part`]s (one file may hold several parts) through [`write_parts`];
//! the exact solid goes to STEP through [`step_solid`] and [`write_step`]. Every writer
//! is deterministic: the same input gives the same bytes (no time stamps, fixed number
//! formatting, fixed zip entry order and times). Every file is written through
//! [`write_atomic`], so a failed write leaves nothing at the target path.
//!
//! ```no_run
//! # use spanwright::export::{write_parts, Format};
//! # fn demo(parts: &[spanwright::mesh::Part]) -> Result<(), spanwright::export::ExportError> {
//! write_parts("blade.3mf".as_ref(), Format::ThreeMf, parts)?;
//! # Ok(()) }
//! ```

mod atomic;
mod brep;
mod error;
mod format;
mod mesh_check;
mod obj;
mod step;
mod stl;
mod threemf;

pub use atomic::write_atomic;
pub use brep::{step_solid, step_solid_with, BrepOptions};
pub use error::ExportError;
pub use format::Format;
pub use mesh_check::check_parts;
pub use obj::write_obj;
pub use step::{
    step_assembly_text, step_real, step_string, step_text, write_step, write_step_assembly,
    StepHeader, STEP_SCHEMA,
};
pub use stl::{push_f32, solid_name, unit_normal, write_stl, write_stl_ascii, STL_HEADER};
pub use threemf::{
    check_placements, model_xml, write_3mf, CORE_NS, MODEL_CONTENT_TYPE, MODEL_PATH,
    MODEL_REL_TYPE, RELS_CONTENT_TYPE,
};

use crate::mesh::Part;
use nalgebra::Matrix4;
use std::path::Path;

/// Writes `parts` to `path` in a mesh `format`, atomically: binary or ASCII STL (all
/// triangles in one solid), OBJ (one `o` object per part) or 3MF (one object and one
/// build item per part).
///
/// The meshes are checked first ([`check_parts`]). ASCII STL names its solid after the
/// part when there is one, else after the file stem.
///
/// # Errors
/// [`ExportError::StepFromMesh`] for [`Format::Step`], [`ExportError::NoParts`],
/// [`ExportError::BadMesh`], [`ExportError::Io`].
pub fn write_parts(path: &Path, format: Format, parts: &[Part]) -> Result<(), ExportError> {
    if format == Format::ThreeMf {
        return write_3mf_file(path, parts, None);
    }
    if !format.is_mesh() {
        return Err(ExportError::StepFromMesh);
    }
    if parts.is_empty() {
        return Err(ExportError::NoParts {
            path: path.to_path_buf(),
        });
    }
    check_parts(parts, false)?;
    match format {
        Format::Stl => write_atomic(path, |w| write_stl(w, parts)),
        Format::StlAscii => {
            let name = match parts {
                [one] => one.name.clone(),
                _ => path
                    .file_stem()
                    .map(|s| s.to_string_lossy().into_owned())
                    .unwrap_or_default(),
            };
            write_atomic(path, |w| write_stl_ascii(w, &name, parts))
        }
        Format::Obj => write_atomic(path, |w| write_obj(w, parts)),
        Format::ThreeMf | Format::Step => Err(ExportError::StepFromMesh),
    }
}

/// Writes `parts` to `path` as a 3MF package, atomically, with optional build
/// transforms (one per part, see [`check_placements`]), e.g. a plate layout.
///
/// # Errors
/// [`ExportError::NoParts`], [`ExportError::BadMesh`] (also for a triangle that repeats
/// a vertex, which 3MF forbids), [`ExportError::BadPlacement`], [`ExportError::Io`].
pub fn write_3mf_file(
    path: &Path,
    parts: &[Part],
    placements: Option<&[Matrix4<f64>]>,
) -> Result<(), ExportError> {
    if parts.is_empty() {
        return Err(ExportError::NoParts {
            path: path.to_path_buf(),
        });
    }
    check_parts(parts, true)?;
    check_placements(parts, placements)?;
    write_atomic(path, |w| write_3mf(w, parts, placements))
}
