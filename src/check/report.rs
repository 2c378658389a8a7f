//! The graded result of [`super::check_solid`].

use super::finding::Finding;
use super::grade::Grade;
use serde::Serialize;
use std::fmt;

/// What [`super::check_solid`] found: a grade, the mesh's measures, and every failed
/// check with the offending items.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckReport {
    /// The worst grade among the findings; [`Grade::Solid`] when there are none.
    pub grade: Grade,
    /// Triangles in the mesh.
    pub triangles: usize,
    /// Vertices used by the (valid) triangles.
    pub vertices: usize,
    /// Distinct edges of the (valid) triangles.
    pub edges: usize,
    /// Euler characteristic V - E + F of the valid triangles.
    pub euler: i64,
    /// Connected components (triangles sharing vertices).
    pub components: usize,
    /// Genus (number of through-holes) when the mesh is a closed manifold, from
    /// V - E + F = 2 (C - g) for C closed orientable components.
    pub genus: Option<u32>,
    /// Signed enclosed volume, mm³ (meaningful when closed).
    pub volume: f64,
    /// Surface area, mm².
    pub area: f64,
    /// Whether the self-intersection test ran.
    pub self_intersection_tested: bool,
    /// Every failed check, worst first.
    pub findings: Vec<Finding>,
}

impl CheckReport {
    /// True when the mesh is a valid solid (no findings).
    pub fn is_ok(&self) -> bool {
        self.findings.is_empty()
    }

    /// The first finding of the given grade, if any.
    pub fn finding(&self, grade: Grade) -> Option<&Finding> {
        self.findings.iter().find(|f| f.grade() == grade)
    }
}

impl fmt::Display for CheckReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{}: {} triangles, {} vertices, {} edges, V - E + F = {}, {} component{}",
            self.grade,
            self.triangles,
            self.vertices,
            self.edges,
            self.euler,
            self.components,
            if self.components == 1 { "" } else { "s" }
        )?;
        if let Some(g) = self.genus {
            write!(f, ", genus {g}")?;
        }
        write!(
            f,
            ", volume {:.6} mm³, area {:.6} mm²",
            self.volume, self.area
        )?;
        if !self.self_intersection_tested {
            write!(f, " (self-intersection not tested)")?;
        }
        for finding in &self.findings {
            write!(f, "\n{finding}")?;
        }
        Ok(())
    }
}
