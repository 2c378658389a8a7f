//! Checks a mesh must pass before any writer sees it: indices in range, finite
//! coordinates, no repeated corner.

use super::ExportError;
use crate::mesh::Part;

/// Checks every part: each triangle index is below the vertex count, each vertex used by
/// a triangle has finite coordinates, and (when `distinct_corners`, as 3MF requires) no
/// triangle repeats a vertex index. Reports the first offence with part, triangle and
/// vertex indices.
///
/// # Errors
/// [`ExportError::BadMesh`].
pub fn check_parts(parts: &[Part], distinct_corners: bool) -> Result<(), ExportError> {
    for part in parts {
        let bad = |problem: String| ExportError::BadMesh {
            part: part.name.clone(),
            problem,
        };
        let n = part.mesh.vertices.len();
        for (t, tri) in part.mesh.triangles.iter().enumerate() {
            for &i in tri {
                let Some(p) = part.mesh.vertices.get(i as usize) else {
                    return Err(bad(format!(
                        "triangle {t} refers to vertex {i} but there are only {n} vertices"
                    )));
                };
                if !(p.x.is_finite() && p.y.is_finite() && p.z.is_finite()) {
                    return Err(bad(format!(
                        "vertex {i} (used by triangle {t}) is not finite: ({}, {}, {})",
                        p.x, p.y, p.z
                    )));
                }
            }
            if distinct_corners && (tri[0] == tri[1] || tri[1] == tri[2] || tri[0] == tri[2]) {
                return Err(bad(format!(
                    "triangle {t} repeats a vertex: {tri:?} (3MF forbids degenerate triangles)"
                )));
            }
        }
    }
    Ok(())
}

/// [`check_parts`] for the stream writers: the error as an `InvalidInput` I/O error, so
/// a writer called directly on a broken mesh fails instead of panicking.
pub(crate) fn check_io(parts: &[Part], distinct_corners: bool) -> std::io::Result<()> {
    check_parts(parts, distinct_corners)
        .map_err(|e| std::io::Error::new(std::io::ErrorKind::InvalidInput, e.to_string()))
}
