//! Section designations understood by the generators: `naca2412`, `NACA 2412`,
//! `naca23012`, and the closed-trailing-edge variants with the suffix `-closed`
//! (`naca0012-closed`).

use super::naca::{published_section, Naca4, TrailingEdge};
use super::naca5::Naca5;
use super::resample::ResampleError;
use super::section::Section;
use nalgebra::Point2;

/// Raw points per side used to generate a section (not resampled).
pub const GENERATED_POINTS: usize = 241;

/// A generated section.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Designation {
    /// NACA 4-digit section (NACA Report 460).
    Naca4(Naca4),
    /// NACA 5-digit section (NACA Report 537).
    Naca5(Naca5),
}

/// Outcome of reading a name as a designation.
#[derive(Debug, Clone, PartialEq)]
pub enum Parsed {
    /// A valid designation.
    Valid(Designation),
    /// Written like a designation but naming no section; the text says why.
    Invalid(String),
    /// Not written like a designation (probably a file name).
    NotADesignation,
}

impl Designation {
    /// Reads a designation; case, spaces, `-` and `_` after `naca` are ignored.
    pub fn parse(name: &str) -> Parsed {
        let lower: String = name
            .trim()
            .to_ascii_lowercase()
            .chars()
            .filter(|c| !c.is_whitespace())
            .collect();
        let Some(rest) = lower.strip_prefix("naca") else {
            return Parsed::NotADesignation;
        };
        let rest = rest.trim_start_matches(['-', '_']);
        let digits: String = rest.chars().take_while(|c| c.is_ascii_digit()).collect();
        let suffix = rest[digits.len()..].trim_start_matches(['-', '_']);
        let te = match suffix {
            "" => TrailingEdge::Open,
            "closed" => TrailingEdge::Closed,
            other => {
                return Parsed::Invalid(format!(
                    "unknown suffix `{other}` (the only suffix is `-closed`)"
                ))
            }
        };
        match digits.len() {
            4 => match Naca4::from_digits(&digits, te) {
                Some(s) => Parsed::Valid(Designation::Naca4(s)),
                None => Parsed::Invalid(format!(
                    "`{digits}` is no 4-digit section: thickness must be above 0, and camber and its position both zero or both non-zero"
                )),
            },
            5 => match Naca5::from_digits(&digits, te) {
                Some(s) => Parsed::Valid(Designation::Naca5(s)),
                None => Parsed::Invalid(format!(
                    "`{digits}` names no tabulated 5-digit mean line (standard 210, 220, 230, 240, 250; reflexed 221, 231, 241, 251; first digit 1 to 9)"
                )),
            },
            n => Parsed::Invalid(format!(
                "NACA designations here have 4 or 5 digits, `{lower}` has {n}"
            )),
        }
    }

    /// Canonical name, e.g. `naca2412` or `naca0012-closed`.
    pub fn name(&self) -> String {
        let (digits, te) = match self {
            Designation::Naca4(s) => (
                format!(
                    "{}{}{:02}",
                    (s.m * 100.0).round() as u32,
                    (s.p * 10.0).round() as u32,
                    (s.t * 100.0).round() as u32
                ),
                s.te,
            ),
            Designation::Naca5(s) => (
                format!(
                    "{}{}{}{:02}",
                    (s.cl / 0.15).round() as u32,
                    (s.p * 20.0).round() as u32,
                    u32::from(s.k2_over_k1.is_some()),
                    (s.t * 100.0).round() as u32
                ),
                s.te,
            ),
        };
        match te {
            TrailingEdge::Open => format!("naca{digits}"),
            TrailingEdge::Closed => format!("naca{digits}-closed"),
        }
    }

    /// The published source of the equations.
    pub fn source(&self) -> &'static str {
        match self {
            Designation::Naca4(_) => "NACA Report 460 (Jacobs, Ward & Pinkerton, 1933)",
            Designation::Naca5(_) => "NACA Reports 460 and 537 (Jacobs & Pinkerton, 1935)",
        }
    }

    /// Raw outline (loop order) from `n` cosine-spaced stations per side.
    pub fn raw_outline(&self, n: usize) -> Vec<Point2<f64>> {
        match self {
            Designation::Naca4(s) => s.raw_outline(n),
            Designation::Naca5(s) => s.raw_outline(n),
        }
    }

    /// The section in its published frame (chord line from the mean line's origin to
    /// the trailing edge), not resampled, generated from [`GENERATED_POINTS`] stations
    /// per side.
    pub fn section(&self) -> Result<Section, ResampleError> {
        published_section(&self.name(), &self.raw_outline(GENERATED_POINTS))
    }
}
