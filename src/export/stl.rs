//! STL writers, binary and ASCII (StereoLithography Interface Specification, 3D Systems,
//! 1989): every triangle of every part in one solid, unit normals by the right-hand rule.

use crate::check::CheckedPart;
use crate::mesh::TriMesh;
use nalgebra::{Point3, Vector3};
use std::io::{self, Write};

/// The fixed 80-byte header of our binary STL files: plain ASCII text padded with spaces.
/// It never starts with `solid`, so no reader takes the file for ASCII STL, and it holds
/// no time stamp, so the same mesh always gives the same bytes.
pub const STL_HEADER: [u8; 80] = {
    let text = b"binary STL written by spanwright; units: millimetres";
    let mut h = [b' '; 80];
    let mut i = 0;
    while i < text.len() {
        h[i] = text[i];
        i += 1;
    }
    h
};

/// Unit normal of the triangle `a, b, c` by the right-hand rule, `(b - a) x (c - a)`
/// normalised: outward for a mesh that follows [`crate::mesh`]'s orientation. Zero for a
/// triangle of zero area (common practice; readers recompute it).
pub fn unit_normal(a: &Point3<f64>, b: &Point3<f64>, c: &Point3<f64>) -> Vector3<f64> {
    let n = (b - a).cross(&(c - a));
    let len = n.norm();
    if len > 0.0 && len.is_finite() {
        n / len
    } else {
        Vector3::zeros()
    }
}

fn to_f32(v: [f64; 3]) -> [f32; 3] {
    [v[0] as f32, v[1] as f32, v[2] as f32]
}

/// One facet as STL stores it: unit normal and three vertices, rounded to `f32`.
fn facet(m: &TriMesh, t: usize) -> [[f32; 3]; 4] {
    let [a, b, c] = m.corners(t);
    let n = unit_normal(&a, &b, &c);
    [
        to_f32([n.x, n.y, n.z]),
        to_f32([a.x, a.y, a.z]),
        to_f32([b.x, b.y, b.z]),
        to_f32([c.x, c.y, c.z]),
    ]
}

/// Every facet of every part, in order, computed as it is read (no copy of the mesh).
fn facets<'a>(meshes: &'a [&'a TriMesh]) -> impl Iterator<Item = [[f32; 3]; 4]> + 'a {
    meshes
        .iter()
        .flat_map(|m| (0..m.len()).map(move |t| facet(m, t)))
}

/// Facets encoded per parallel task, and tasks per batch per thread: a batch is
/// encoded in parallel, then written in order, so at most one batch (a few megabytes) is
/// held besides the mesh.
const FACETS_PER_TASK: usize = 1 << 14;
const TASKS_PER_THREAD: usize = 4;

/// The 50 bytes of each facet of `m` in `range`: normal and three vertices as
/// little-endian `f32`, then a zero attribute count.
fn encode(m: &TriMesh, range: std::ops::Range<usize>) -> Vec<u8> {
    let mut out = Vec::with_capacity(range.len() * 50);
    for t in range {
        for v in facet(m, t) {
            for x in v {
                out.extend_from_slice(&x.to_le_bytes());
            }
        }
        out.extend_from_slice(&[0, 0]);
    }
    out
}

/// Writes all parts as one binary STL: [`STL_HEADER`], the facet count (u32,
/// little-endian), then 50 bytes per facet (normal, three vertices as little-endian f32,
/// a zero attribute count), the layout stl_io reads and writes. Streamed: facets are
/// encoded in parallel batches and written in order, so memory stays at a few megabytes
/// whatever the mesh size, and the bytes do not depend on the thread count.
///
/// More than `u32::MAX` facets is an `InvalidInput` error.
pub fn write_stl(w: &mut dyn Write, parts: &[CheckedPart]) -> io::Result<()> {
    let meshes: Vec<&TriMesh> = parts.iter().map(CheckedPart::mesh).collect();
    write_meshes(w, &meshes)
}

/// [`write_stl`] on meshes.
fn write_meshes(w: &mut dyn Write, meshes: &[&TriMesh]) -> io::Result<()> {
    use rayon::prelude::*;
    let total: usize = meshes.iter().map(|m| m.len()).sum();
    let Ok(count) = u32::try_from(total) else {
        return Err(io::Error::new(
            io::ErrorKind::InvalidInput,
            format!(
                "{total} triangles do not fit a binary STL (at most {}); split the parts or use 3MF",
                u32::MAX
            ),
        ));
    };
    w.write_all(&STL_HEADER)?;
    w.write_all(&count.to_le_bytes())?;
    let batch = FACETS_PER_TASK * TASKS_PER_THREAD * rayon::current_num_threads();
    for &m in meshes {
        for start in (0..m.len()).step_by(batch) {
            let end = (start + batch).min(m.len());
            let tasks: Vec<std::ops::Range<usize>> = (start..end)
                .step_by(FACETS_PER_TASK)
                .map(|a| a..(a + FACETS_PER_TASK).min(end))
                .collect();
            let bytes: Vec<Vec<u8>> = tasks.into_par_iter().map(|r| encode(m, r)).collect();
            for b in bytes {
                w.write_all(&b)?;
            }
        }
    }
    Ok(())
}

/// A name usable after `solid`: printable ASCII without spaces; anything else becomes
/// `_`; an empty name becomes `part`.
pub fn solid_name(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| if c.is_ascii_graphic() { c } else { '_' })
        .collect();
    if s.is_empty() {
        "part".to_string()
    } else {
        s
    }
}

/// Appends `x` in the specification's `sign mantissa e sign exponent` form, with the
/// shortest mantissa that reads back to the same `f32` and a two-digit exponent, e.g.
/// `-1.25e+01`. Deterministic on every platform.
pub fn push_f32(out: &mut String, x: f32) {
    use std::fmt::Write as _;
    let x = if x == 0.0 { 0.0 } else { x }; // no "-0"
    let start = out.len();
    let _ = write!(out, "{x:e}");
    let Some(e_at) = out[start..].find('e').map(|k| start + k) else {
        return;
    };
    let exp: i32 = out[e_at + 1..].parse().unwrap_or(0);
    let has_point = out[start..e_at].contains('.');
    out.truncate(e_at);
    if !has_point {
        out.push_str(".0");
    }
    out.push('e');
    out.push(if exp < 0 { '-' } else { '+' });
    let a = exp.unsigned_abs();
    if a < 10 {
        out.push('0');
    }
    let _ = write!(out, "{a}");
}

/// Writes all parts as one ASCII STL solid named `name` (see [`solid_name`]):
/// `solid`, then per facet `facet normal`, `outer loop`, three `vertex` lines, `endloop`,
/// `endfacet`, and `endsolid`. Numbers are the same `f32` values the binary file holds,
/// formatted by [`push_f32`].
pub fn write_stl_ascii(w: &mut dyn Write, name: &str, parts: &[CheckedPart]) -> io::Result<()> {
    let name = solid_name(name);
    writeln!(w, "solid {name}")?;
    let mut line = String::with_capacity(256);
    let meshes: Vec<&TriMesh> = parts.iter().map(CheckedPart::mesh).collect();
    for [normal, a, b, c] in facets(&meshes) {
        line.clear();
        line.push_str("  facet normal ");
        for (k, c) in normal.iter().enumerate() {
            if k > 0 {
                line.push(' ');
            }
            push_f32(&mut line, *c);
        }
        line.push_str("\n    outer loop\n");
        for v in [a, b, c] {
            line.push_str("      vertex ");
            for (k, c) in v.iter().enumerate() {
                if k > 0 {
                    line.push(' ');
                }
                push_f32(&mut line, *c);
            }
            line.push('\n');
        }
        line.push_str("    endloop\n  endfacet\n");
        w.write_all(line.as_bytes())?;
    }
    writeln!(w, "endsolid {name}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn number_format() {
        let mut s = String::new();
        for x in [1.0f32, -12.5, 0.001, 0.0, -0.0, 3.4028235e38, 1.0e-40] {
            s.clear();
            push_f32(&mut s, x);
            // Reads back exactly (shortest round-trip representation).
            assert_eq!(s.parse::<f32>().unwrap(), x, "{s}");
            let (m, e) = s.split_once('e').unwrap();
            assert!(m.contains('.'), "{s}");
            assert!(e.starts_with('+') || e.starts_with('-'), "{s}");
            assert!(e.len() >= 3, "{s}");
        }
        s.clear();
        push_f32(&mut s, -12.5);
        assert_eq!(s, "-1.25e+01");
    }

    #[test]
    fn streamed_bytes_equal_stl_io_over_many_batches() {
        // Reference writer: stl_io (general-purpose STL library) on the same facets, with
        // our header in place of its zero header. 300 000 triangles span several batches.
        use crate::mesh::TriMesh;
        use nalgebra::Point3;
        let mut m = TriMesh::new();
        let n = 150_000u32;
        for i in 0..=n {
            let a = i as f64 * 1e-3;
            m.push_vertex(Point3::new(a.cos() * (10.0 + a), a.sin(), 0.3 * a));
            m.push_vertex(Point3::new(a.cos() * (10.0 + a), a.sin(), 0.3 * a + 1.0));
        }
        for i in 0..n {
            let (a, b, c, d) = (2 * i, 2 * i + 1, 2 * i + 2, 2 * i + 3);
            m.triangles.push([a, c, b]);
            m.triangles.push([b, c, d]);
        }
        let meshes = [&m, &m];
        let mut ours = Vec::new();
        write_meshes(&mut ours, &meshes).unwrap();
        let tris: Vec<stl_io::Triangle> = facets(&meshes)
            .map(|[n, a, b, c]| stl_io::Triangle {
                normal: stl_io::Normal::new(n),
                vertices: [a, b, c].map(stl_io::Vertex::new),
            })
            .collect();
        let mut theirs = Vec::new();
        stl_io::write_stl(&mut theirs, tris.iter()).unwrap();
        theirs[..80].copy_from_slice(&STL_HEADER);
        assert_eq!(ours.len(), 84 + 50 * 600_000);
        assert!(ours == theirs);
    }

    #[test]
    fn header_is_not_ascii_marker() {
        assert_eq!(STL_HEADER.len(), 80);
        assert!(!STL_HEADER.starts_with(b"solid"));
        assert!(STL_HEADER.is_ascii());
    }
}
