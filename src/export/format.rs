//! The file formats we write, with our own short names.

use super::ExportError;
use std::fmt;
use std::str::FromStr;

/// A file format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Format {
    /// Binary STL (StereoLithography Interface Specification, 3D Systems, 1989).
    Stl,
    /// ASCII STL (same specification).
    StlAscii,
    /// Wavefront OBJ (vertices and triangular faces only).
    Obj,
    /// 3MF package (3MF Core Specification, 3MF Consortium).
    ThreeMf,
    /// STEP physical file (ISO 10303-21) of the exact solid.
    Step,
}

/// The accepted names, in the order of [`Format::ALL`].
const NAMES: &str = "stl, stl-ascii, obj, 3mf, step";

impl Format {
    /// Every format, in a fixed order.
    pub const ALL: [Format; 5] = [
        Format::Stl,
        Format::StlAscii,
        Format::Obj,
        Format::ThreeMf,
        Format::Step,
    ];

    /// Our short name, as accepted by [`Format::from_str`].
    pub fn name(self) -> &'static str {
        match self {
            Format::Stl => "stl",
            Format::StlAscii => "stl-ascii",
            Format::Obj => "obj",
            Format::ThreeMf => "3mf",
            Format::Step => "step",
        }
    }

    /// The usual file extension, without the dot (ASCII STL also uses `stl`).
    pub fn extension(self) -> &'static str {
        match self {
            Format::Stl | Format::StlAscii => "stl",
            Format::Obj => "obj",
            Format::ThreeMf => "3mf",
            Format::Step => "step",
        }
    }

    /// True for the triangle-mesh formats written by [`super::write_parts`].
    pub fn is_mesh(self) -> bool {
        !matches!(self, Format::Step)
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
            "stl" => Format::Stl,
            "stl-ascii" | "ascii-stl" => Format::StlAscii,
            "obj" => Format::Obj,
            "3mf" => Format::ThreeMf,
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
