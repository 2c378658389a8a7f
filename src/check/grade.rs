//! The grade of a checked mesh, from unusable to a valid solid.

use serde::Serialize;

/// How far a mesh is from a valid solid, worst first; the grade of a report is the worst
/// grade among its findings. Modelled on the graded shell conditions of B-rep kernels
/// (irregular, regular, oriented, closed) and extended with the geometric checks.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Grade {
    /// Not a usable triangle list: no triangles, indices out of range, repeated indices in
    /// a triangle, or coordinates that are not finite.
    Broken,
    /// Some edge is used by more than two triangles, or some vertex's triangles do not
    /// form a single fan.
    NonManifold,
    /// Two neighbouring triangles run their shared edge in the same direction.
    Inconsistent,
    /// Manifold and consistently oriented, but some edges are used by one triangle only.
    Open,
    /// Closed, manifold and oriented, but a geometric check failed (degenerate triangles,
    /// zero or negative volume, several components, unexpected genus, self-intersection).
    Closed,
    /// A valid solid: every check passed.
    Solid,
}

impl Grade {
    /// A short lower-case name.
    pub fn name(self) -> &'static str {
        match self {
            Grade::Broken => "broken",
            Grade::NonManifold => "non-manifold",
            Grade::Inconsistent => "inconsistent",
            Grade::Open => "open",
            Grade::Closed => "closed",
            Grade::Solid => "solid",
        }
    }
}

impl std::fmt::Display for Grade {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}
