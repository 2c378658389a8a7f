//! The file formats we write, with our own short names.

use super::ExportError;
use std::fmt;
use std::str::FromStr;

/// A file format: a triangle-mesh format, or STEP for the exact solid.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Format {
    /// A triangle-mesh format, written from checked parts by [`super::write_mesh`].
    Mesh(MeshFormat),
    /// STEP physical file (ISO 10303-21) of the exact solid, written by
    /// [`super::write_step`].
    Step,
}

/// The triangle-mesh formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum MeshFormat {
    /// Binary STL (StereoLithography Interface Specification, 3D Systems, 1989).
    Stl,
    /// ASCII STL (same specification).
    StlAscii,
    /// Wavefront OBJ (vertices and triangular faces only).
    Obj,
    /// 3MF package (3MF Core Specification, 3MF Consortium).
    ThreeMf,
}

/// The accepted names, in the order of [`Format::ALL`].
const NAMES: &str = "stl, stl-ascii, obj, 3mf, step";

impl Format {
    /// Every format, in a fixed order.
    pub const ALL: [Format; 5] = [
        Format::Mesh(MeshFormat::Stl),
        Format::Mesh(MeshFormat::StlAscii),
        Format::Mesh(MeshFormat::Obj),
        Format::Mesh(MeshFormat::ThreeMf),
        Format::Step,
    ];

    /// Our short name, as accepted by [`Format::from_str`].
    pub fn name(self) -> &'static str {
        match self {
            Format::Mesh(MeshFormat::Stl) => "stl",
            Format::Mesh(MeshFormat::StlAscii) => "stl-ascii",
            Format::Mesh(MeshFormat::Obj) => "obj",
            Format::Mesh(MeshFormat::ThreeMf) => "3mf",
            Format::Step => "step",
        }
    }

    /// The usual file extension, without the dot (ASCII STL also uses `stl`).
    pub fn extension(self) -> &'static str {
        match self {
            Format::Mesh(m) => m.extension(),
            Format::Step => "step",
        }
    }
}

impl MeshFormat {
    /// The usual file extension, without the dot (ASCII STL also uses `stl`).
    pub fn extension(self) -> &'static str {
        match self {
            MeshFormat::Stl | MeshFormat::StlAscii => "stl",
            MeshFormat::Obj => "obj",
            MeshFormat::ThreeMf => "3mf",
        }
    }
}

impl fmt::Display for Format {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Format {
    type Err = ExportError;

    /// Parses our short names, ignoring case and surrounding spaces; `stp` is taken as
    /// `step` and `ascii-stl` as `stl-ascii`.
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let t = s.trim().to_ascii_lowercase();
        Ok(match t.as_str() {
            "stl" => Format::Mesh(MeshFormat::Stl),
            "stl-ascii" | "ascii-stl" => Format::Mesh(MeshFormat::StlAscii),
            "obj" => Format::Mesh(MeshFormat::Obj),
            "3mf" => Format::Mesh(MeshFormat::ThreeMf),
            "step" | "stp" => Format::Step,
            _ => {
                return Err(ExportError::UnknownFormat {
                    name: s.to_string(),
                    known: NAMES,
                })
            }
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip() {
        for f in Format::ALL {
            assert_eq!(f.name().parse::<Format>().unwrap(), f);
            assert_eq!(f.to_string(), f.name());
        }
        assert_eq!(" STP ".parse::<Format>().unwrap(), Format::Step);
        let e = "iges".parse::<Format>().unwrap_err().to_string();
        assert!(e.contains("'iges'") && e.contains("3mf"), "{e}");
    }
}
