//! Reading a part from an STL file the user already has.

use super::FitError;
use crate::mesh::{Part, TriMesh};
use nalgebra::Point3;
use std::collections::HashMap;
use std::path::Path;

/// Reads a binary or ASCII STL file into a part named after the file stem. Vertices with
/// identical coordinates are welded into one; triangles that repeat a vertex after the
/// weld are dropped.
pub fn read_stl_part(path: &Path) -> Result<Part, FitError> {
    let bad = |why: String| FitError::Stl {
        path: path.display().to_string(),
        why,
    };
    let mut file = std::fs::File::open(path)
        .map_err(|e| bad(format!("cannot open it ({e}); check the path")))?;
    let raw = stl_io::read_stl(&mut file).map_err(|e| {
        bad(format!(
            "is not a readable STL file ({e}); export it again as binary or ASCII STL"
        ))
    })?;
    let mut mesh = TriMesh::new();
    let mut index: HashMap<[u32; 3], u32> = HashMap::new();
    let mut map = Vec::with_capacity(raw.vertices.len());
    for v in &raw.vertices {
        let key = v.0.map(f32::to_bits);
        if v.0.iter().any(|c| !c.is_finite()) {
            return Err(bad(format!(
                "has a vertex with a non-finite coordinate {:?}; repair the mesh",
                v.0
            )));
        }
        let id = *index.entry(key).or_insert_with(|| {
            mesh.push_vertex(Point3::new(v.0[0] as f64, v.0[1] as f64, v.0[2] as f64))
        });
        map.push(id);
    }
    for (k, f) in raw.faces.iter().enumerate() {
        let mut t = [0u32; 3];
        for (slot, &i) in t.iter_mut().zip(f.vertices.iter()) {
            *slot = *map.get(i).ok_or_else(|| {
                bad(format!(
                    "triangle {k} names vertex {i}, which does not exist"
                ))
            })?;
        }
        if t[0] != t[1] && t[1] != t[2] && t[0] != t[2] {
            mesh.triangles.push(t);
        }
    }
    if mesh.is_empty() {
        return Err(bad("has no triangles with three distinct corners".into()));
    }
    let name = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "part".into());
    Ok(Part { name, mesh })
}
