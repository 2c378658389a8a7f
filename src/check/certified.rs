//! [`CheckedPart`]: a named solid that passed every check of [`super::check_solid`].
//!
//! Only [`certify`] makes one, so a function that takes a `CheckedPart` (every writer,
//! the printer fit, the reports) cannot be handed a mesh that was never checked. Moving a
//! checked part rigidly ([`CheckedPart::placed`]) keeps it checked: a rotation and a
//! translation change no edge use, orientation, volume, genus or intersection.

use super::{check_solid_on_grid, CheckOptions, CheckReport, GridLayout};
use crate::mesh::{Part, TriMesh};
use nalgebra::IsometryMatrix3;
use std::fmt;

/// A named, closed, consistently oriented, self-intersection-free solid of positive
/// volume and the expected genus.
#[derive(Debug, Clone, PartialEq)]
pub struct CheckedPart {
    part: Part,
    report: CheckReport,
}

/// A part that failed its checks: its name and the graded findings.
#[derive(Debug, Clone, PartialEq)]
pub struct Rejected {
    /// The part's name.
    pub name: String,
    /// What the checks found.
    pub report: Box<CheckReport>,
}

impl fmt::Display for Rejected {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "the solid '{}' failed its checks; nothing was written:\n{}",
            self.name, self.report
        )
    }
}

impl std::error::Error for Rejected {}

/// Runs every check on `part` with `opts` (set the genus the part's features imply) and
/// returns it as a [`CheckedPart`] when it passes.
///
/// # Errors
/// [`Rejected`] with the report when any check fails.
pub fn certify(part: Part, opts: &CheckOptions) -> Result<CheckedPart, Rejected> {
    certify_on_grid(part, opts, None)
}

/// [`certify`] for a part whose first vertices lie on `grid` (see
/// [`super::check_solid_on_grid`]): the same verdict, found faster.
///
/// # Errors
/// [`Rejected`] with the report when any check fails.
pub fn certify_on_grid(
    part: Part,
    opts: &CheckOptions,
    grid: Option<&GridLayout>,
) -> Result<CheckedPart, Rejected> {
    let report = check_solid_on_grid(&part.mesh, opts, grid);
    if report.is_ok() {
        Ok(CheckedPart { part, report })
    } else {
        Err(Rejected {
            name: part.name,
            report: Box::new(report),
        })
    }
}

impl CheckedPart {
    /// The part's name (file and object names).
    pub fn name(&self) -> &str {
        &self.part.name
    }

    /// The checked mesh.
    pub fn mesh(&self) -> &TriMesh {
        &self.part.mesh
    }

    /// The report of the checks it passed (volume, area, genus, ...).
    pub fn report(&self) -> &CheckReport {
        &self.report
    }

    /// The named mesh, for code that reads it as a plain [`Part`].
    pub fn as_part(&self) -> &Part {
        &self.part
    }

    /// The same part renamed.
    pub fn renamed(&self, name: impl Into<String>) -> CheckedPart {
        let mut out = self.clone();
        out.part.name = name.into();
        out
    }

    /// The part moved by a rigid motion (a proper rotation and a translation) and
    /// renamed. The checks still hold, so none is run again.
    pub fn placed(&self, name: impl Into<String>, motion: &IsometryMatrix3<f64>) -> CheckedPart {
        CheckedPart {
            part: Part {
                name: name.into(),
                mesh: self.part.mesh.transformed(&motion.to_homogeneous()),
            },
            report: self.report.clone(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::check::check_solid;
    use nalgebra::{Point3, Rotation3, Translation3, Vector3};

    #[test]
    fn only_a_solid_is_certified_and_placing_keeps_its_measures() {
        // A 2 x 3 x 4 box: volume 24, area 2 (6 + 8 + 12) = 52 (elementary geometry).
        let mesh = TriMesh::cuboid(Point3::origin(), Vector3::new(2.0, 3.0, 4.0));
        let part = Part {
            name: "box".into(),
            mesh: mesh.clone(),
        };
        let checked = certify(part, &CheckOptions::DEFAULT).expect("a box is a solid");
        assert!((checked.report().volume - 24.0).abs() < 1e-12);
        let motion = IsometryMatrix3::from_parts(
            Translation3::new(5.0, -2.0, 1.0),
            Rotation3::from_euler_angles(0.3, -1.1, 2.0),
        );
        let moved = checked.placed("moved", &motion);
        assert_eq!(moved.name(), "moved");
        let again = check_solid(moved.mesh(), &CheckOptions::DEFAULT);
        assert!(again.is_ok(), "{again}");
        assert!((again.volume - 24.0).abs() < 1e-9);
        assert!((again.area - 52.0).abs() < 1e-9);

        // The same box with one triangle missing is open: rejected, named.
        let mut open = mesh;
        open.triangles.pop();
        let err = certify(
            Part {
                name: "open box".into(),
                mesh: open,
            },
            &CheckOptions::DEFAULT,
        )
        .unwrap_err();
        assert_eq!(err.name, "open box");
        assert!(err.to_string().contains("failed its checks"), "{err}");
    }
}
