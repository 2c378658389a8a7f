//! Checks of finished solids: closed, consistently oriented 2-manifold, positive volume,
//! no degenerate triangles, one component, expected genus, no self-intersection.
//!
//! [`check_solid`] runs every check on a [`TriMesh`] and returns a [`CheckReport`] graded
//! from [`Grade::Broken`] to [`Grade::Solid`], listing each failed check with the
//! offending triangles, edges, vertices or triangle pairs. [`certify`] runs it and turns a
//! passing part into a [`CheckedPart`], the only kind of part the writers, the printer
//! fit and the reports accept.
//!
//! Self-intersection means any common point of two triangles other than what they are
//! meant to share: crossing and touching both count (two parts touching along a face
//! are reported), triangles sharing one vertex count when they meet anywhere else, and
//! neighbours sharing an edge count when folded flat onto each other. Signed distances to
//! a plane below `1e-12` of the local size count as zero. Degenerate triangles are
//! reported as such and left out of this test.
//!
//! ```
//! use spanwright::check::{check_solid, CheckOptions, Grade};
//! use spanwright::mesh::TriMesh;
//! use nalgebra::Point3;
//!
//! // A tetrahedron, counter-clockwise seen from outside.
//! let mut m = TriMesh::new();
//! for p in [[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]] {
//!     m.push_vertex(Point3::from(p));
//! }
//! m.triangles = vec![[0, 2, 1], [0, 1, 3], [1, 2, 3], [0, 3, 2]];
//! let report = check_solid(&m, &CheckOptions::DEFAULT);
//! assert!(report.is_ok(), "{report}");
//! assert_eq!(report.grade, Grade::Solid);
//! assert!((report.volume - 1.0 / 6.0).abs() < 1e-15);
//! ```

mod apart;
mod certified;
mod components;
mod finding;
mod grade;
mod grid;
mod intersections;
mod options;
mod report;
mod topology;
mod tritri;
mod weld;

pub use apart::{interferences, Interference};
pub use certified::{certify, certify_on_grid, CheckedPart, Rejected};
pub use components::components;
pub use finding::{EdgeUse, Finding, Listed, VertexFans};
pub use grade::Grade;
pub use grid::GridLayout;
pub use options::CheckOptions;
pub use report::CheckReport;
pub use weld::weld;

use crate::mesh::TriMesh;

/// Runs every check on `mesh` (see the module docs) and grades it.
///
/// Order: indices and coordinates first (a broken mesh stops there), then edge use,
/// orientation and vertex fans, degenerate triangles, volume (only when closed and
/// consistently oriented), components, genus, and the self-intersection test (when
/// [`CheckOptions::self_intersection`] is set; degenerate triangles are left out of it).
pub fn check_solid(mesh: &TriMesh, opts: &CheckOptions) -> CheckReport {
    check_solid_on_grid(mesh, opts, None)
}

/// [`check_solid`] on a mesh whose first vertices lie on `grid` (a tessellation's skin
/// grid): the same report, found faster, since the self-intersection test skips the
/// pairs of grid cells it proves apart from the mesh's own coordinates (see
/// [`GridLayout`]; a layout that does not fit the mesh only costs time).
pub fn check_solid_on_grid(
    mesh: &TriMesh,
    opts: &CheckOptions,
    grid: Option<&GridLayout>,
) -> CheckReport {
    let mut run = Checking::new(mesh, opts);
    let valid = run.indices();
    let Some(valid) = valid else {
        run.report.components = components::component_sizes(mesh).len();
        return run.finish();
    };
    let use_tri: Vec<u32> = (0..mesh.triangles.len() as u32)
        .filter(|&t| valid[t as usize])
        .collect();
    // The components (a sequential union-find) are counted while the edges, fans and
    // measures are taken.
    let (comps, (closed, active)) = rayon::join(
        || components::component_sizes(mesh),
        || {
            let (closed, oriented) = run.topology(&use_tri);
            (closed, run.measures(&use_tri, valid, closed && oriented))
        },
    );
    run.report.components = comps.len();
    run.components_and_genus(&comps, closed);
    if opts.self_intersection {
        run.self_intersection(&active, grid);
    }
    run.finish()
}

/// A check in progress: the report filled in step by step and the findings so far.
struct Checking<'a> {
    mesh: &'a TriMesh,
    opts: &'a CheckOptions,
    report: CheckReport,
    findings: Vec<Finding>,
}

impl<'a> Checking<'a> {
    fn new(mesh: &'a TriMesh, opts: &'a CheckOptions) -> Self {
        let mut findings = Vec::new();
        if mesh.triangles.is_empty() {
            findings.push(Finding::Empty);
        }
        Checking {
            mesh,
            opts,
            report: CheckReport {
                grade: Grade::Solid,
                triangles: mesh.triangles.len(),
                vertices: 0,
                edges: 0,
                euler: 0,
                components: 0,
                genus: None,
                volume: 0.0,
                area: 0.0,
                self_intersection_tested: false,
                findings: Vec::new(),
            },
            findings,
        }
    }

    /// Indices, repeated indices, coordinates. Returns which triangles are valid, or
    /// `None` when the mesh is broken (an index out of range or a non-finite vertex).
    fn indices(&mut self) -> Option<Vec<bool>> {
        let (mesh, cap) = (self.mesh, self.opts.max_listed);
        let nv = mesh.vertices.len();
        let mut out_of_range = Listed::new();
        let mut repeated = Listed::new();
        let mut valid = vec![false; mesh.triangles.len()];
        for (t, tri) in mesh.triangles.iter().enumerate() {
            if tri.iter().any(|&i| i as usize >= nv) {
                out_of_range.push(t, cap);
            } else if tri[0] == tri[1] || tri[1] == tri[2] || tri[0] == tri[2] {
                repeated.push(t, cap);
            } else {
                valid[t] = true;
            }
        }
        let mut non_finite = Listed::new();
        for (i, p) in mesh.vertices.iter().enumerate() {
            if !(p.x.is_finite() && p.y.is_finite() && p.z.is_finite()) {
                non_finite.push(i as u32, cap);
            }
        }
        let broken = !out_of_range.is_empty() || !non_finite.is_empty();
        if !non_finite.is_empty() {
            self.findings.push(Finding::NonFinite(non_finite));
        }
        if !out_of_range.is_empty() {
            self.findings.push(Finding::IndexOutOfRange {
                vertex_count: nv,
                triangles: out_of_range,
            });
        }
        if !repeated.is_empty() {
            self.findings.push(Finding::RepeatedIndex(repeated));
        }
        (!broken).then_some(valid)
    }

    /// Edge use, orientation, fans, Euler characteristic. Returns (closed manifold,
    /// consistently oriented).
    fn topology(&mut self, use_tri: &[u32]) -> (bool, bool) {
        let mesh = self.mesh;
        let topo = topology::analyse(
            &mesh.triangles,
            use_tri,
            mesh.vertices.len(),
            self.opts.max_listed,
        );
        self.report.vertices = topo.vertices;
        self.report.edges = topo.edges;
        self.report.euler = topo.euler();
        let closed = topo.closed_manifold();
        let oriented = topo.same_direction.is_empty();
        if !topo.overused.is_empty() {
            self.findings
                .push(Finding::OverusedEdges(topo.overused.clone()));
        }
        if !topo.fans.is_empty() {
            self.findings
                .push(Finding::NonManifoldVertices(topo.fans.clone()));
        }
        if !oriented {
            self.findings
                .push(Finding::SameDirection(topo.same_direction.clone()));
        }
        if !topo.boundary.is_empty() {
            self.findings
                .push(Finding::BoundaryEdges(topo.boundary.clone()));
        }
        (closed, oriented)
    }

    /// Degenerate triangles (relative to the size of the mesh), the surface area and
    /// the volume (about the box centre, for precision far from the origin; judged only
    /// when the mesh is `closed_and_oriented`), in one pass. Returns the triangles left
    /// for the self-intersection test.
    ///
    /// The sums run over fixed chunks in parallel and add the chunks in order, so they
    /// do not depend on the thread count.
    fn measures(
        &mut self,
        use_tri: &[u32],
        valid: Vec<bool>,
        closed_and_oriented: bool,
    ) -> Vec<bool> {
        use rayon::prelude::*;
        const CHUNK: usize = 1 << 14;
        let mesh = self.mesh;
        let bbox = mesh.bounding_box();
        let diag = bbox.map(|b| b.size().norm()).unwrap_or(0.0);
        let centre = bbox
            .map(|b| nalgebra::center(&b.min, &b.max))
            .unwrap_or_else(nalgebra::Point3::origin);
        let threshold = self.opts.degenerate_area * diag * diag;
        let parts: Vec<(f64, f64, Vec<u32>)> = use_tri
            .par_chunks(CHUNK)
            .map(|chunk| {
                let (mut area, mut six_volume, mut degenerate) = (0.0, 0.0, Vec::new());
                for &t in chunk {
                    let [a, b, c] = mesh.corners(t as usize).map(|p| p - centre);
                    let a2 = 0.5 * (b - a).cross(&(c - a)).norm();
                    area += a2;
                    six_volume += a.dot(&b.cross(&c));
                    if a2.is_nan() || a2 <= threshold {
                        degenerate.push(t);
                    }
                }
                (area, six_volume, degenerate)
            })
            .collect();
        let mut active = valid;
        let (mut area, mut six_volume) = (0.0, 0.0);
        let mut degenerate = Listed::new();
        for (a, v, d) in parts {
            area += a;
            six_volume += v;
            for t in d {
                degenerate.push(t as usize, self.opts.max_listed);
                active[t as usize] = false;
            }
        }
        self.report.area = area;
        if !degenerate.is_empty() {
            self.findings.push(Finding::Degenerate {
                threshold,
                triangles: degenerate,
            });
        }
        let volume = six_volume / 6.0;
        self.report.volume = volume;
        if closed_and_oriented {
            // Zero within the rounding of the sum: |V| below 1e-12 of the box volume scale.
            if volume.abs() <= 1e-12 * diag * diag * diag {
                self.findings.push(Finding::ZeroVolume { volume });
            } else if volume < 0.0 {
                self.findings.push(Finding::InsideOut { volume });
            }
        }
        active
    }

    /// Components (one expected) and, when closed, the genus against the expected one.
    fn components_and_genus(&mut self, comps: &[usize], closed: bool) {
        let report = &mut self.report;
        if report.components > 1 {
            let mut sizes = Listed::new();
            for &c in comps {
                sizes.push(c, self.opts.max_listed);
            }
            self.findings.push(Finding::Components { sizes });
        }
        if closed {
            let twice_genus = 2 * report.components as i64 - report.euler;
            if twice_genus >= 0 && twice_genus % 2 == 0 {
                let genus = (twice_genus / 2) as u32;
                report.genus = Some(genus);
                if let Some(expected) = self.opts.expected_genus {
                    if genus != expected {
                        self.findings.push(Finding::Genus { genus, expected });
                    }
                }
            }
        }
    }

    /// Pairs of `active` triangles that meet where they should not.
    fn self_intersection(&mut self, active: &[bool], grid: Option<&GridLayout>) {
        self.report.self_intersection_tested = true;
        let pairs = intersections::self_intersections(self.mesh, active, grid);
        if !pairs.is_empty() {
            let mut l = Listed::new();
            for p in pairs {
                l.push(p, self.opts.max_listed);
            }
            self.findings.push(Finding::SelfIntersection(l));
        }
    }

    /// Sorts the findings worst first and sets the grade.
    fn finish(self) -> CheckReport {
        let (mut report, mut findings) = (self.report, self.findings);
        findings.sort_by_key(|f| f.grade());
        report.grade = findings.first().map_or(Grade::Solid, |f| f.grade());
        report.findings = findings;
        report
    }
}
