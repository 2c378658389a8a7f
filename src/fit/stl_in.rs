//! Reading a part from an STL file the user already has.
//!
//! Which of the two STL layouts a file is, is decided here before the reader sees it
//! (3D Systems, *Stereolithography Interface Specification*, 1989): a binary file is an
//! 80-byte header, a 4-byte little-endian triangle count and 50 bytes per triangle, so
//! its size is exactly `84 + 50 n`; an ASCII file starts with `solid`. A binary file
//! whose header happens to start with `solid` (some exporters write that) is read as
//! binary when its size matches, and a binary file shorter than its count announces is
//! refused with the figures instead of a bare end-of-file error.

use super::FitError;
use crate::mesh::{Part, TriMesh};
use nalgebra::Point3;
use std::borrow::Cow;
use std::collections::HashMap;
use std::path::Path;

/// Bytes before the triangles of a binary STL: the header and the count.
const BINARY_HEAD: u64 = 84;
/// Bytes per triangle of a binary STL: normal, three vertices, attribute count.
const BINARY_TRIANGLE: u64 = 50;

/// Reads a binary or ASCII STL file into a part named after the file stem. Vertices with
/// identical coordinates are welded into one; triangles that repeat a vertex after the
/// weld are dropped.
pub fn read_stl_part(path: &Path) -> Result<Part, FitError> {
    let label = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|e| FitError::Stl {
        path: label.clone(),
        why: format!("cannot open it ({e}); check the path"),
    })?;
    let name = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "part".into());
    parse_stl(&bytes, &name, &label)
}

/// The STL layout of `bytes`, with the bytes to give the reader (a binary header that
/// starts like an ASCII file is changed so the reader takes it as binary; an ASCII
/// `solid` line without a name gets the space the reader expects).
fn layout<'a>(
    bytes: &'a [u8],
    why: impl Fn(String) -> FitError,
) -> Result<Cow<'a, [u8]>, FitError> {
    if bytes.is_empty() {
        return Err(why("is empty; export the part again as STL".into()));
    }
    let starts_ascii = bytes.len() >= 5 && bytes[..5].eq_ignore_ascii_case(b"solid");
    let count = (bytes.len() as u64 >= BINARY_HEAD).then(|| {
        u64::from(u32::from_le_bytes([
            bytes[80], bytes[81], bytes[82], bytes[83],
        ]))
    });
    let binary_size = count.map(|n| BINARY_HEAD + BINARY_TRIANGLE * n);
    if starts_ascii && binary_size != Some(bytes.len() as u64) {
        // ASCII. The reader wants "solid " with a space even when the solid has no name.
        if bytes.get(5).is_some_and(|b| *b != b' ') {
            let mut fixed = b"solid ".to_vec();
            fixed.extend_from_slice(&bytes[5..]);
            return Ok(Cow::Owned(fixed));
        }
        return Ok(Cow::Borrowed(bytes));
    }
    let (Some(n), Some(need)) = (count, binary_size) else {
        return Err(why(format!(
            "is too short for an STL file: {} bytes, while a binary STL has at least {BINARY_HEAD} \
             (an 80-byte header and the triangle count) and an ASCII STL starts with 'solid'; \
             export the part again",
            bytes.len()
        )));
    };
    let have = bytes.len() as u64;
    if have < need {
        return Err(why(format!(
            "is cut short: its header announces {n} triangles, {need} bytes as binary STL, but \
             the file has {have} bytes ({} whole triangles); it was probably not copied or \
             written completely: export it again",
            (have - BINARY_HEAD) / BINARY_TRIANGLE
        )));
    }
    if starts_ascii {
        let mut fixed = bytes.to_vec();
        fixed[0] = b'S';
        fixed[1] = b'O';
        return Ok(Cow::Owned(fixed));
    }
    Ok(Cow::Borrowed(bytes))
}

/// Reads STL bytes (binary or ASCII) into a part named `name`; `label` names the source
/// in messages (the file). Welding and dropping as [`read_stl_part`].
///
/// # Errors
/// [`FitError::Stl`] naming `label`, what is wrong and what to do.
pub fn parse_stl(bytes: &[u8], name: &str, label: &str) -> Result<Part, FitError> {
    let bad = |why: String| FitError::Stl {
        path: label.to_string(),
        why,
    };
    let bytes = layout(bytes, bad)?;
    let mut cursor = std::io::Cursor::new(bytes.as_ref());
    let raw = stl_io::read_stl(&mut cursor).map_err(|e| {
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
    Ok(Part {
        name: name.to_string(),
        mesh,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A binary STL of `n` copies of one triangle (3D Systems 1989 layout: 80-byte header,
    /// u32 count, per triangle 12 f32 and a u16).
    fn binary(header: &[u8], n: u32, k: usize) -> Vec<u8> {
        let mut b = vec![b' '; 80];
        b[..header.len()].copy_from_slice(header);
        b.extend_from_slice(&n.to_le_bytes());
        for i in 0..k {
            let z = i as f32;
            for v in [0.0f32, 0.0, 1.0, 0.0, 0.0, z, 1.0, 0.0, z, 0.0, 1.0, z] {
                b.extend_from_slice(&v.to_le_bytes());
            }
            b.extend_from_slice(&[0, 0]);
        }
        b
    }

    #[test]
    fn truncated_binary_names_the_figures() {
        let e = parse_stl(&binary(b"x", 3, 2), "p", "p.stl")
            .unwrap_err()
            .to_string();
        assert!(e.starts_with("p.stl: is cut short"), "{e}");
        assert!(
            e.contains("3 triangles, 234 bytes") && e.contains("184 bytes (2 whole"),
            "{e}"
        );
        let e = parse_stl(b"\x00\x01", "p", "p.stl")
            .unwrap_err()
            .to_string();
        assert!(e.contains("too short"), "{e}");
        assert!(parse_stl(b"", "p", "p.stl")
            .unwrap_err()
            .to_string()
            .contains("empty"));
    }

    #[test]
    fn binary_header_starting_with_solid_is_binary() {
        let p = parse_stl(&binary(b"solid exported", 2, 2), "p", "p.stl").expect("binary");
        assert_eq!(p.mesh.triangles.len(), 2);
        let ascii = b"solid\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\n\
                      vertex 0 1 0\nendloop\nendfacet\nendsolid\n";
        let p = parse_stl(ascii, "p", "p.stl").expect("ascii without a name");
        assert_eq!(p.mesh.triangles.len(), 1);
    }
}
