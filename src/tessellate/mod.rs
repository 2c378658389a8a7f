//! Tessellation of the surface model: a structured `(u, v)` grid over the skin whose
//! rows and columns are placed where curvature needs them, closed by the trailing-edge
//! strip and by constrained-Delaunay caps built on the very same boundary vertices.
//!
//! **Watertight by construction**: every edge inside the skin, along the trailing edge
//! and along the cap boundaries is shared by exactly two triangles because both sides use
//! the same vertex indices; no welding step is needed.
//!
//! **Tolerance**: the largest distance from the exact surface (the skin and the ruled
//! trailing-edge face) to the mesh. Grid lines are first added by bisection until, on
//! every grid line, the chord between two neighbouring samples stays within
//! `0.5 * tolerance` of the curve (tested at the quarter points of each interval); then
//! every grid cell is certified with a proven upper bound of its deviation (samples
//! plus a second-derivative margin, see [`max_deviation`] and the `bound` module), and the
//! rows and columns of any cell whose bound exceeds the tolerance are split. Dense
//! columns land at the leading edge, sparse ones across the flat mid-chord; rows follow
//! spanwise curvature. [`Tessellation::deviation`] is the certified bound.
//!
//! **Caps**: constrained Delaunay triangulations of the end rows; where the boundary
//! points are so dense that a triangle of boundary points only would be a sliver (the
//! leading edge of a small round-tip end), interior points are added at the slivers'
//! circumcentres, so the boundary stays shared with the skin.
//!
//! **Crowded rows**: where an outline shrinks (the end of a round tip) the shared columns
//! crowd into slivers; such row neighbours are merged into one vertex (an edge collapse,
//! see [`merge_distance`]) and the deviation bound is taken on the merged corners.
//!
//! **Work**: choosing the grid costs a few dozen surface evaluations per grid cell
//! (each interval and each cell is tested once, plus the rows and columns split later);
//! building the mesh costs one evaluation per vertex; both grow linearly with the number
//! of triangles and run in parallel (see [`crate::parallel`]), with the same output on
//! any number of threads. [`estimate`] predicts the triangle count before any of it.

mod bound;
mod cap;
mod estimate;
mod grid;

pub use bound::{max_deviation, mesh_deviation, mesh_deviation_known, KnownBounds};
pub use estimate::{estimate, WorkEstimate};

use crate::loft::{Basis, Skin};
use crate::mesh::TriMesh;
use nalgebra::Point3;
use rayon::prelude::*;

/// Options of [`tessellate`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TessellationOptions {
    /// Largest allowed distance between mesh and exact surface, mm. Default 0.01.
    pub tolerance: f64,
    /// Largest number of bisection rounds per grid line (guards against runaway
    /// refinement). Default 24.
    pub max_depth: u32,
}

impl TessellationOptions {
    /// The defaults: 0.01 mm, 24 levels.
    pub const DEFAULT: TessellationOptions = TessellationOptions {
        tolerance: 0.01,
        max_depth: 24,
    };
}

impl Default for TessellationOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// Why a skin could not be tessellated.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TessellateError {
    /// The tolerance is not a positive finite number.
    #[error("tolerance must be a positive number of millimetres, got {0}")]
    Tolerance(f64),
    /// A cap outline crosses itself, so no cap can close the solid there.
    #[error("{}", cap_message(.0))]
    CapSelfIntersects(&'static str),
}
/// What a self-intersecting cap means for the design, and what to change.
fn cap_message(which: &str) -> String {
    let section = if which == "root" {
        "the first station's section, or the [root] shank at the root face"
    } else {
        "the last station's section, or the end of a [tip] shape = \"round\""
    };
    format!(
        "the {which} cap outline crosses itself once meshed: the section there ({section}) \
         self-intersects, usually at a thin trailing edge; open the trailing edge with [blade] \
         min-te-thickness (e.g. 0.4 mm), give a finer tolerance, or check that section"
    )
}

/// A tessellated skin with the grid parameters it used.
#[derive(Debug, Clone)]
pub struct Tessellation {
    /// The closed mesh.
    pub mesh: TriMesh,
    /// Grid parameters around the section (`u`).
    pub us: Vec<f64>,
    /// Grid parameters along the span (`v`).
    pub vs: Vec<f64>,
    /// The root boundary loop (vertex indices, in `u` order, without a repeated
    /// trailing-edge vertex).
    pub root_ring: Vec<u32>,
    /// The triangles of the root cap (a range of `mesh.triangles`), for features that
    /// replace the cap.
    pub root_cap: std::ops::Range<usize>,
    /// Certified upper bound of the distance from the exact surface (skin and
    /// trailing-edge face) to the skin and strip triangles, mm; at most the tolerance
    /// unless refinement hit [`TessellationOptions::max_depth`]. [`max_deviation`]
    /// computes a tighter bound on the same grid.
    pub deviation: f64,
    /// The bounds certified per cell while choosing the grid (cells whose corners moved
    /// by merging forgotten), for [`Tessellation::measured_deviation`].
    pub known: KnownBounds,
    /// The mesh vertex of each grid point (`i * vs.len() + j`; `u32::MAX` when dropped)
    /// once features have renumbered the vertices; `None` while grid point `g` is
    /// vertex `g`.
    pub grid_ids: Option<Vec<u32>>,
}

impl Tessellation {
    /// The tight deviation bound of this mesh ([`mesh_deviation`] on its own grid
    /// vertices, reusing the bounds certified while choosing the grid). Call before
    /// features renumber the mesh's vertices.
    pub fn measured_deviation(&self, skin: &Skin, k: usize) -> f64 {
        let grid = &self.mesh.vertices[..self.us.len() * self.vs.len()];
        mesh_deviation_known(skin, &self.us, &self.vs, grid, k, &self.known)
    }
}

/// Distance from `q` to the segment `a b`.
fn dist_to_segment(q: &Point3<f64>, a: &Point3<f64>, b: &Point3<f64>) -> f64 {
    (q - closest_on_segment(q, a, b)).norm()
}

/// Distance from `q` to triangle `a b c` (Ericson, *Real-Time Collision Detection*, 2005,
/// section 5.1.5, closest point on triangle). A triangle with coincident corners is
/// measured as the segments between them.
pub fn dist_to_triangle(q: &Point3<f64>, a: &Point3<f64>, b: &Point3<f64>, c: &Point3<f64>) -> f64 {
    (q - closest_on_triangle(q, a, b, c)).norm()
}

/// The point of triangle `a b c` nearest to `q` (Ericson, section 5.1.5); for a
/// triangle with coincident corners, the nearest point of its edges.
fn closest_on_triangle(
    q: &Point3<f64>,
    a: &Point3<f64>,
    b: &Point3<f64>,
    c: &Point3<f64>,
) -> Point3<f64> {
    let p = ericson_closest(q, a, b, c);
    if p.coords.iter().all(|x| x.is_finite()) {
        return p;
    }
    [(a, b), (b, c), (c, a)]
        .map(|(s, t)| closest_on_segment(q, s, t))
        .into_iter()
        .min_by(|x, y| (q - x).norm_squared().total_cmp(&(q - y).norm_squared()))
        .unwrap_or(*a)
}

fn closest_on_segment(q: &Point3<f64>, a: &Point3<f64>, b: &Point3<f64>) -> Point3<f64> {
    let ab = b - a;
    let l2 = ab.norm_squared();
    let t = if l2 > 0.0 {
        ((q - a).dot(&ab) / l2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    a + ab * t
}

fn ericson_closest(
    q: &Point3<f64>,
    a: &Point3<f64>,
    b: &Point3<f64>,
    c: &Point3<f64>,
) -> Point3<f64> {
    let (ab, ac, ap) = (b - a, c - a, q - a);
    let (d1, d2) = (ab.dot(&ap), ac.dot(&ap));
    if d1 <= 0.0 && d2 <= 0.0 {
        return *a;
    }
    let bp = q - b;
    let (d3, d4) = (ab.dot(&bp), ac.dot(&bp));
    if d3 >= 0.0 && d4 <= d3 {
        return *b;
    }
    let vc = d1 * d4 - d3 * d2;
    if vc <= 0.0 && d1 >= 0.0 && d3 <= 0.0 {
        let v = d1 / (d1 - d3);
        return a + ab * v;
    }
    let cp = q - c;
    let (d5, d6) = (ab.dot(&cp), ac.dot(&cp));
    if d6 >= 0.0 && d5 <= d6 {
        return *c;
    }
    let vb = d5 * d2 - d1 * d6;
    if vb <= 0.0 && d2 >= 0.0 && d6 <= 0.0 {
        let w = d2 / (d2 - d6);
        return a + ac * w;
    }
    let va = d3 * d6 - d5 * d4;
    if va <= 0.0 && (d4 - d3) >= 0.0 && (d5 - d6) >= 0.0 {
        let w = (d4 - d3) / ((d4 - d3) + (d5 - d6));
        return b + (c - b) * w;
    }
    let denom = 1.0 / (va + vb + vc);
    let (v, w) = (vb * denom, vc * denom);
    a + ab * v + ac * w
}

/// The two triangles of a grid cell `a b c d` (counter-clockwise in `(u, v)`), split
/// along the shorter diagonal, as corner indices 0..4 of `[a, b, c, d]`.
fn cell_split(
    a: &Point3<f64>,
    b: &Point3<f64>,
    c: &Point3<f64>,
    d: &Point3<f64>,
) -> [[usize; 3]; 2] {
    if (a - c).norm_squared() <= (b - d).norm_squared() {
        [[0, 1, 2], [0, 2, 3]]
    } else {
        [[0, 1, 3], [1, 2, 3]]
    }
}

/// Chooses grid parameters for the skin at the given tolerance: `(us, vs)`, each sorted
/// from 0 to 1.
pub fn grid_parameters(skin: &Skin, opts: &TessellationOptions) -> (Vec<f64>, Vec<f64>) {
    let g = grid::grid(skin, opts);
    (g.us, g.vs)
}

/// Tessellates the skin into a closed, outward-oriented triangle mesh.
pub fn tessellate(
    skin: &Skin,
    opts: &TessellationOptions,
) -> Result<Tessellation, TessellateError> {
    if !(opts.tolerance > 0.0) || !opts.tolerance.is_finite() {
        return Err(TessellateError::Tolerance(opts.tolerance));
    }
    let g = grid::grid(skin, opts);
    let cap = merge_distance(opts.tolerance);
    let (nu, nv) = (g.us.len(), g.vs.len());
    let mut known = g.known;
    let (mesh, root_ring, root_cap) = mesh_from_points(skin, &g.us, &g.vs, g.points, cap, |v| {
        // The cells around a moved vertex (and the strip rows beside column 0 or the
        // last column) have new triangles.
        let (i, j) = (v / nv, v % nv);
        let rows = j.saturating_sub(1)..=j.min(nv - 2);
        for ci in i.saturating_sub(1)..=i.min(nu - 2) {
            for cj in rows.clone() {
                known.forget(ci * (nv - 1) + cj);
            }
        }
        if i == 0 || i == nu - 1 {
            for cj in rows {
                known.forget((nu - 1) * (nv - 1) + cj);
            }
        }
    })?;
    Ok(Tessellation {
        mesh,
        us: g.us,
        vs: g.vs,
        root_ring,
        root_cap,
        deviation: g.deviation,
        known,
        grid_ids: None,
    })
}

/// The root ring and the range of the root cap's triangles.
type RootCap = (Vec<u32>, std::ops::Range<usize>);

/// How much larger than the solid check's degenerate area
/// ([`crate::conventions::DEGENERATE_AREA`]) the triangles next to a row edge must stay
/// before the edge's vertices are merged: a rotor or one-piece part holding the blade is
/// checked against its own, larger bounding box (up to 4 times the blade's diagonal).
const MERGE_GUARD: f64 = 16.0;

/// A row edge is short (a sliver's short side) below this share of the triangle's
/// longest side.
const SLIVER: f64 = 0.25;

/// Farthest two neighbouring vertices of one grid row may be apart and still be merged
/// into one mesh vertex, mm: the mesh tolerance.
///
/// The grid's columns are shared by every row, so columns placed close together where
/// a section is large (the corners of an opened trailing edge) crowd together where the
/// outline shrinks (the end of a round tip) into row edges a few hundred-thousandths of
/// a millimetre long, between rows only thousandths of a millimetre apart in radius: the
/// triangles on such an edge are slivers the solid check refuses and single-precision
/// STL cannot hold. Such a vertex is merged into the one before it in its row when a
/// triangle it would make with a neighbouring row is a sliver (area below
/// `MERGE_GUARD` (16) times the degenerate area, the row edge under `SLIVER` (a quarter) of its
/// longest side) and the row edge is at most this distance; exactly coincident
/// vertices (a sharp trailing edge) always merge. The cells on the edge
/// collapse onto their neighbours' edges (an edge collapse inside a triangulated grid
/// keeps it a closed 2-manifold), and the deviation bound ([`mesh_deviation`]) is taken
/// on the moved corners, so the printed figure covers the merge.
pub fn merge_distance(tolerance: f64) -> f64 {
    tolerance
}

/// Builds the closed mesh on the given grid parameters (`us` from 0 to 1, `vs` from 0
/// to 1, both sorted), merging crowded row neighbours at most `merge` mm apart (see
/// [`merge_distance`]; 0 merges only coincident ones); also returns the root ring and
/// the root cap's triangle range.
pub fn mesh_from_grid(
    skin: &Skin,
    us: &[f64],
    vs: &[f64],
    merge: f64,
) -> Result<(TriMesh, Vec<u32>, std::ops::Range<usize>), TessellateError> {
    mesh_from_points(skin, us, vs, grid::eval_grid(skin, us, vs), merge, |_| {})
}

/// For each grid vertex that merges into an earlier one of its row, the pair (vertex,
/// the vertex it becomes), both as `i * nv + j`. Along row `j` a run of vertices, each
/// making a sliver with the run's first vertex (see [`merge_distance`]; `cap` the
/// longest edge merged), becomes that first vertex; when the row's last run's first
/// vertex makes a sliver with column 0 (a trailing edge closing to nothing), the run
/// becomes column 0's vertex.
///
/// Only rows that can merge are walked: a merged vertex lies within `cap` of its run's
/// first vertex, so its edge to the vertex before it is at most `2 cap` long (or, at
/// the row's end, its trailing-edge edge at most `cap`); those edges are found column
/// by column first, in the grid's memory order.
fn row_merges(points: &[Point3<f64>], nu: usize, nv: usize, cap: f64) -> Vec<(u32, u32)> {
    let diag = crate::mesh::Aabb::of_points(points).map_or(0.0, |b| b.size().norm());
    let guard = MERGE_GUARD * crate::conventions::DEGENERATE_AREA * diag * diag;
    let near = |a: &Point3<f64>, b: &Point3<f64>, d: f64| (a - b).norm_squared() <= d * d;
    // Exactly coincident vertices (within 1e-9) always merge.
    let reach = 2.0 * cap.max(1e-9);
    let candidate = (1..nu)
        .into_par_iter()
        .fold(
            || vec![false; nv],
            |mut rows, i| {
                let (before, here) = (&points[(i - 1) * nv..i * nv], &points[i * nv..][..nv]);
                for (j, (a, b)) in before.iter().zip(here).enumerate() {
                    rows[j] |= near(a, b, reach);
                }
                if i == nu - 1 {
                    for (j, (a, b)) in points[..nv].iter().zip(here).enumerate() {
                        rows[j] |= near(a, b, cap.max(1e-9));
                    }
                }
                rows
            },
        )
        .reduce(
            || vec![false; nv],
            |mut a, b| {
                a.iter_mut().zip(b).for_each(|(x, y)| *x |= y);
                a
            },
        );
    (0..nv)
        .into_par_iter()
        .filter(|&j| candidate[j])
        .flat_map_iter(|j| {
            let p = |i: usize, j: usize| points[i * nv + j];
            let rows: Vec<usize> = [j.checked_sub(1), (j + 1 < nv).then_some(j + 1)]
                .into_iter()
                .flatten()
                .collect();
            // A sliver on the row edge from `a` (column `ia`) to `b` (column `ib`): a
            // triangle with a neighbouring row's vertex whose area is below the guard
            // while the edge is short against the triangle's other sides.
            let sliver = |a: Point3<f64>, ib: usize, ia: usize| {
                let b = p(ib, j);
                let ab = (b - a).norm();
                if ab <= 1e-9 {
                    return true;
                }
                ab <= cap
                    && rows.iter().any(|&k| {
                        [p(ia, k), p(ib, k)].iter().any(|c| {
                            let area = 0.5 * (b - a).cross(&(c - a)).norm();
                            let long = (c - a).norm().max((c - b).norm());
                            area < guard && ab < SLIVER * long
                        })
                    })
            };
            let mut out: Vec<(u32, u32)> = Vec::new();
            let mut first = 0;
            let mut run_start = 0;
            for i in 1..nu {
                if sliver(p(first, j), i, i - 1) {
                    out.push(((i * nv + j) as u32, (first * nv + j) as u32));
                } else {
                    first = i;
                    run_start = out.len();
                }
            }
            if first != 0 && sliver(p(0, j), first, 0) {
                for m in &mut out[run_start..] {
                    m.1 = j as u32;
                }
                out.push(((first * nv + j) as u32, j as u32));
            }
            out
        })
        .collect()
}

/// The loop of grid row `j`'s mesh vertices, in `u` order, each once: the row's
/// vertices with merged ones (equal positions, see [`merge_distance`]) and the
/// trailing edge's repeat left out. Row `j` of column `i` is vertex `i * nv + j`.
pub fn row_ring(vertices: &[Point3<f64>], nu: usize, nv: usize, j: usize) -> Vec<u32> {
    let mut ring: Vec<u32> = Vec::with_capacity(nu);
    for i in 0..nu {
        let v = (i * nv + j) as u32;
        match ring.last() {
            Some(&w) if vertices[w as usize] == vertices[v as usize] => {}
            _ => ring.push(v),
        }
    }
    while ring.len() > 1 && vertices[ring[ring.len() - 1] as usize] == vertices[ring[0] as usize] {
        ring.pop();
    }
    ring
}

/// [`mesh_from_grid`] on the evaluated grid `points` (`u` major), which become the
/// first `us.len() * vs.len()` vertices: vertex `i * vs.len() + j` is at
/// `(us[i], vs[j])`, or, when merged, at the position of the vertex it merged into
/// (each such vertex is passed to `moved`). Cap interior points, if any, follow them.
fn mesh_from_points(
    skin: &Skin,
    us: &[f64],
    vs: &[f64],
    mut points: Vec<Point3<f64>>,
    merge: f64,
    mut moved: impl FnMut(usize),
) -> Result<(TriMesh, Vec<u32>, std::ops::Range<usize>), TessellateError> {
    let (nu, nv) = (us.len(), vs.len());
    let merges = row_merges(&points, nu, nv, merge);
    let mut target: Vec<u32> = Vec::new();
    if !merges.is_empty() {
        target = (0..(nu * nv) as u32).collect();
        for &(v, to) in &merges {
            target[v as usize] = to;
            points[v as usize] = points[to as usize];
            moved(v as usize);
        }
    }
    let index = |i: usize, j: usize| {
        let v = i * nv + j;
        if target.is_empty() {
            v as u32
        } else {
            target[v]
        }
    };
    let outward = skin.orientation() > 0.0;
    let orient = |t: [u32; 3]| if outward { t } else { [t[0], t[2], t[1]] };
    let cell = |i: usize, i1: usize, j: usize| {
        let q = [index(i, j), index(i1, j), index(i1, j + 1), index(i, j + 1)];
        let p = q.map(|v| &points[v as usize]);
        cell_split(p[0], p[1], p[2], p[3]).map(|t| [q[t[0]], q[t[1]], q[t[2]]])
    };
    // Skin cells: two triangles each, column by column.
    let mut triangles = vec![[0u32; 3]; 2 * (nu - 1) * (nv - 1)];
    triangles
        .par_chunks_mut(2 * (nv - 1))
        .enumerate()
        .for_each(|(i, column)| {
            for j in 0..nv - 1 {
                let [t0, t1] = cell(i, i + 1, j);
                column[2 * j] = orient(t0);
                column[2 * j + 1] = orient(t1);
            }
        });
    // The trailing-edge strip (column nu-1 back to column 0), where it has width.
    for j in 0..nv - 1 {
        triangles.extend(cell(nu - 1, 0, j).map(orient));
    }
    // Cells collapsed by merged vertices leave triangles with a repeated corner.
    triangles.retain(|t| t[0] != t[1] && t[1] != t[2] && t[0] != t[2]);
    let mut mesh = TriMesh {
        vertices: points,
        triangles,
    };
    // Caps: the boundary loops of the end rows.
    let scale = mesh.bounding_box().map_or(1.0, |b| b.size().norm());
    let rings: Vec<Vec<u32>> = [0, nv - 1]
        .iter()
        .map(|&j| row_ring(&mesh.vertices, nu, nv, j))
        .collect();
    let (root_cap, tip_cap) = rayon::join(
        || cap::cap(&mesh.vertices, &rings[0], false, scale),
        || cap::cap(&mesh.vertices, &rings[1], true, scale),
    );
    let mut root: RootCap = (Vec::new(), 0..0);
    for (c, name, ring) in [(root_cap, "root", &rings[0]), (tip_cap, "tip", &rings[1])] {
        let c = c.ok_or(TessellateError::CapSelfIntersects(name))?;
        let start = mesh.triangles.len();
        c.append_to(&mut mesh);
        if name == "root" {
            root = (ring.clone(), start..mesh.triangles.len());
        }
    }
    Ok((mesh, root.0, root.1))
}

/// Radius (z) of the skin's iso-curve at `v`. Every iso-curve of the skin is planar:
/// the rings it interpolates lie in planes `z = const` and interpolation is linear in
/// the data, so every control point of a `v` column has the same `z` (see
/// [`crate::loft`]), and `z` depends on `v` alone.
pub fn row_radius(skin: &Skin, v: f64) -> f64 {
    let b = Basis::at(&skin.knots_v, skin.degree_v, v.clamp(0.0, 1.0));
    b.values()
        .iter()
        .enumerate()
        .map(|(k, n)| n * skin.control[0][b.first + k].z)
        .sum()
}

/// The `v` of the skin's iso-curve at radius `z` (bisection on [`row_radius`], which
/// grows along the span), or `None` when `z` is not strictly between the root and tip
/// rows.
pub fn row_at_radius(skin: &Skin, z: f64) -> Option<f64> {
    let (mut lo, mut hi) = (0.0f64, 1.0f64);
    let (z0, z1) = (row_radius(skin, lo), row_radius(skin, hi));
    if !(z > z0 && z < z1) {
        return None;
    }
    for _ in 0..64 {
        let mid = 0.5 * (lo + hi);
        if row_radius(skin, mid) < z {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(0.5 * (lo + hi))
}

/// Grid rows `vs` (sorted, 0 to 1) with a row forced at each radius of `radii` (inside
/// the skin): the row's `v` is found by [`row_at_radius`]; an existing row within
/// `0.01` mm of the radius is moved onto it (no sliver cells). Returns the new rows and
/// the index of each forced row, in the order of `radii`; `None` for a radius outside
/// the skin. Rows are only added or nudged, so the grid stays at least as fine as
/// before. Build the mesh with [`mesh_from_grid`] and then put the forced rows' vertices
/// exactly on their planes (row `j` of column `i` is vertex `i * vs.len() + j`).
pub fn with_rows(skin: &Skin, vs: &[f64], radii: &[f64]) -> Option<(Vec<f64>, Vec<usize>)> {
    let mut out = vs.to_vec();
    let mut forced = Vec::with_capacity(radii.len());
    for &z in radii {
        let v = row_at_radius(skin, z)?;
        let near = out
            .iter()
            .position(|&w| w > 0.0 && w < 1.0 && (row_radius(skin, w) - z).abs() < 0.01);
        match near {
            Some(k) => out[k] = v,
            None => out.push(v),
        }
        forced.push(v);
    }
    out.sort_by(f64::total_cmp);
    out.dedup();
    let rows = forced
        .iter()
        .map(|v| out.iter().position(|w| w == v))
        .collect::<Option<Vec<usize>>>()?;
    Some((out, rows))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ellipse_ring(z: f64, a: f64, b: f64, n: usize) -> Vec<Point3<f64>> {
        (0..n)
            .map(|k| {
                let t = std::f64::consts::TAU * k as f64 / (n - 1) as f64;
                Point3::new(a * t.cos(), b * t.sin(), z)
            })
            .collect()
    }

    #[test]
    fn elliptic_cylinder_is_closed_and_within_tolerance() {
        // Exact volume of an elliptic cylinder: pi a b L (elementary geometry); the
        // inscribed mesh must come within its tolerance-sized sliver of it.
        let rings: Vec<_> = (0..3)
            .map(|l| ellipse_ring(10.0 * l as f64, 20.0, 4.0, 121))
            .collect();
        let skin = Skin::interpolate(&rings, 60).unwrap();
        let tol = 0.01;
        let t = tessellate(
            &skin,
            &TessellationOptions {
                tolerance: tol,
                ..Default::default()
            },
        )
        .unwrap();
        let exact = std::f64::consts::PI * 20.0 * 4.0 * 20.0;
        let vol = t.mesh.signed_volume();
        // Inscribed polygon: the area lost is at most perimeter * tol.
        let perimeter =
            2.0 * std::f64::consts::PI * ((20.0f64.powi(2) + 4.0f64.powi(2)) / 2.0).sqrt();
        assert!(
            vol < exact * (1.0 + 1e-5) && vol > exact - perimeter * tol * 20.0,
            "{vol} {exact}"
        );
        // Every edge used twice in opposite directions.
        let mut edges = std::collections::HashMap::new();
        for tri in &t.mesh.triangles {
            for k in 0..3 {
                *edges.entry((tri[k], tri[(k + 1) % 3])).or_insert(0) += 1;
            }
        }
        for (&(a, b), &count) in &edges {
            assert_eq!(count, 1);
            assert_eq!(edges.get(&(b, a)), Some(&1));
        }
    }
}
