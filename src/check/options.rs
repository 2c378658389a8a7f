//! Options of [`super::check_solid`].

use serde::Serialize;

/// What [`super::check_solid`] tests and how strictly.
///
/// Start from [`CheckOptions::DEFAULT`] and change fields with the `with_*` setters.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CheckOptions {
    /// A triangle is degenerate when its area is below `degenerate_area * d * d`, where `d`
    /// is the diagonal of the mesh's bounding box (mm). Relative, so it does not depend on
    /// the units or the size of the part. Default `1e-12`.
    pub degenerate_area: f64,
    /// Run the self-intersection test (triangle pairs found through a bounding volume
    /// hierarchy; see [`super::check_solid_on_grid`] for meshes built on a grid). Roughly
    /// linear in the triangle count. Default `true`.
    pub self_intersection: bool,
    /// The genus the solid must have (number of through-holes: 0 for a blade, 1 for a
    /// ring), or `None` to accept any genus and only report it. Default `Some(0)`.
    pub expected_genus: Option<u32>,
    /// The most offending items (triangles, edges, vertices, pairs) listed per finding;
    /// the counts are always complete. Default `10`.
    pub max_listed: usize,
}

impl CheckOptions {
    /// The defaults: relative degenerate area `1e-12`, self-intersection test on, genus 0
    /// expected, 10 items listed per finding.
    pub const DEFAULT: CheckOptions = CheckOptions {
        degenerate_area: crate::conventions::DEGENERATE_AREA,
        self_intersection: true,
        expected_genus: Some(0),
        max_listed: 10,
    };

    /// Sets [`CheckOptions::degenerate_area`].
    pub fn with_degenerate_area(mut self, relative: f64) -> Self {
        self.degenerate_area = relative;
        self
    }

    /// Sets [`CheckOptions::self_intersection`].
    pub fn with_self_intersection(mut self, on: bool) -> Self {
        self.self_intersection = on;
        self
    }

    /// Sets [`CheckOptions::expected_genus`].
    pub fn with_expected_genus(mut self, genus: Option<u32>) -> Self {
        self.expected_genus = genus;
        self
    }

    /// Sets [`CheckOptions::max_listed`].
    pub fn with_max_listed(mut self, n: usize) -> Self {
        self.max_listed = n;
        self
    }
}

impl Default for CheckOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}
