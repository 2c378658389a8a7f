//! Wavefront OBJ writer: `v` lines, 1-based `f` lines, one `o` object per part.

use crate::check::CheckedPart;
use std::io::{self, Write};

/// Writes the parts as one OBJ file: a comment line, then per part `o name`, its
/// vertices (`v x y z`, millimetres, shortest decimal that reads back to the same `f64`)
/// and its triangles (`f a b c`, 1-based indices counted over the whole file, counter-
/// clockwise seen from outside). Names are made of printable ASCII without spaces (see
/// [`super::solid_name`]).
pub fn write_obj(w: &mut dyn Write, parts: &[CheckedPart]) -> io::Result<()> {
    writeln!(w, "# OBJ written by spanwright; units: millimetres")?;
    let mut base: u64 = 1;
    let mut line = String::with_capacity(128);
    for part in parts {
        let m = part.mesh();
        writeln!(w, "o {}", super::solid_name(part.name()))?;
        for p in &m.vertices {
            use std::fmt::Write as _;
            line.clear();
            let _ = writeln!(line, "v {} {} {}", clean(p.x), clean(p.y), clean(p.z));
            w.write_all(line.as_bytes())?;
        }
        for t in &m.triangles {
            use std::fmt::Write as _;
            line.clear();
            let _ = writeln!(
                line,
                "f {} {} {}",
                base + t[0] as u64,
                base + t[1] as u64,
                base + t[2] as u64
            );
            w.write_all(line.as_bytes())?;
        }
        base += m.vertices.len() as u64;
    }
    Ok(())
}

/// Maps `-0.0` to `0.0` so a coordinate never prints as `-0`.
pub(crate) fn clean(x: f64) -> f64 {
    if x == 0.0 {
        0.0
    } else {
        x
    }
}
