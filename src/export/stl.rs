//! STL writers, binary and ASCII (StereoLithography Interface Specification, 3D Systems,
//! 1989): every triangle of every part in one solid, unit normals by the right-hand rule.

use crate::check::CheckedPart;
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

/// The facets of all parts as STL triangles (coordinates and normals rounded to `f32`).
fn facets(parts: &[CheckedPart]) -> Vec<stl_io::Triangle> {
    let total = parts.iter().map(|p| p.mesh().len()).sum();
    let mut out = Vec::with_capacity(total);
    for part in parts {
        let m = part.mesh();
        for t in 0..m.len() {
            let [a, b, c] = m.corners(t);
            let n = unit_normal(&a, &b, &c);
            out.push(stl_io::Triangle {
                normal: stl_io::Normal::new(to_f32([n.x, n.y, n.z])),
                vertices: [a, b, c].map(|p| stl_io::Vertex::new(to_f32([p.x, p.y, p.z]))),
            });
        }
    }
    out
}

/// Passes bytes through but replaces the first 80 (the header stl_io writes as zeros)
/// with [`STL_HEADER`].
struct HeaderPatch<'a> {
    inner: &'a mut dyn Write,
    pos: usize,
}

impl Write for HeaderPatch<'_> {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        if self.pos < STL_HEADER.len() {
            let n = buf.len().min(STL_HEADER.len() - self.pos);
            self.inner.write_all(&STL_HEADER[self.pos..self.pos + n])?;
            self.pos += n;
            return Ok(n);
        }
        self.inner.write(buf)
    }

    fn flush(&mut self) -> io::Result<()> {
        self.inner.flush()
    }
}

/// Writes all parts as one binary STL: [`STL_HEADER`], the facet count (u32,
/// little-endian), then 50 bytes per facet (normal, three vertices as little-endian f32,
/// a zero attribute count). Written through stl_io.
///
/// More than `u32::MAX` facets is an `InvalidInput` error.
pub fn write_stl(w: &mut dyn Write, parts: &[CheckedPart]) -> io::Result<()> {
    let tris = facets(parts);
    if u32::try_from(tris.len()).is_err() {
        return Err(io::Error::new(
            io::ErrorKind::InvalidInput,
            format!(
                "{} triangles do not fit a binary STL (at most {}); split the parts or use 3MF",
                tris.len(),
                u32::MAX
            ),
        ));
    }
    let mut patched = HeaderPatch { inner: w, pos: 0 };
    stl_io::write_stl(&mut patched, tris.iter())
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
    for t in facets(parts) {
        line.clear();
        line.push_str("  facet normal ");
        for (k, c) in t.normal.0.iter().enumerate() {
            if k > 0 {
                line.push(' ');
            }
            push_f32(&mut line, *c);
        }
        line.push_str("\n    outer loop\n");
        for v in &t.vertices {
            line.push_str("      vertex ");
            for (k, c) in v.0.iter().enumerate() {
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
    fn header_is_not_ascii_marker() {
        assert_eq!(STL_HEADER.len(), 80);
        assert!(!STL_HEADER.starts_with(b"solid"));
        assert!(STL_HEADER.is_ascii());
    }
}
