//! Tessellation of the surface model: a structured `(u, v)` grid over the skin whose
//! rows and columns are placed where curvature needs them, closed by the trailing-edge
//! strip and by constrained-Delaunay caps built on the very same boundary vertices.
//!
//! **Watertight by construction**: every edge inside the skin, along the trailing edge
//! and along the cap boundaries is shared by exactly two triangles because both sides use
//! the same vertex indices; no welding step is needed.
//!
//! **Tolerance**: the largest distance between the mesh and the exact surface. Grid lines
//! are added by bisection until, on every grid line, the chord between two neighbouring
//! samples stays within `0.5 * tolerance` of the curve (tested at the quarter points of
//! each interval), and every grid cell's two triangles stay within `tolerance` of the
//! surface at the cell's centre and quarter points. Dense columns land at the leading
//! edge, sparse ones across the flat mid-chord; rows follow spanwise curvature.

use crate::loft::{Basis, Skin};
use crate::mesh::TriMesh;
use nalgebra::{Point2, Point3};

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
}

/// Precomputed basis values along one direction.
struct Axis {
    params: Vec<f64>,
    basis: Vec<Basis>,
}

impl Axis {
    fn new(knots: &[f64], p: usize, params: Vec<f64>) -> Axis {
        let basis = params.iter().map(|&t| Basis::at(knots, p, t)).collect();
        Axis { params, basis }
    }
}

/// Distance from `q` to the segment `a b`.
fn dist_to_segment(q: &Point3<f64>, a: &Point3<f64>, b: &Point3<f64>) -> f64 {
    let ab = b - a;
    let l2 = ab.norm_squared();
    let t = if l2 > 0.0 {
        ((q - a).dot(&ab) / l2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    (q - (a + ab * t)).norm()
}

/// Distance from `q` to triangle `a b c` (Ericson, *Real-Time Collision Detection*, 2005,
/// section 5.1.5, closest point on triangle).
pub fn dist_to_triangle(q: &Point3<f64>, a: &Point3<f64>, b: &Point3<f64>, c: &Point3<f64>) -> f64 {
    let (ab, ac, ap) = (b - a, c - a, q - a);
    let (d1, d2) = (ab.dot(&ap), ac.dot(&ap));
    if d1 <= 0.0 && d2 <= 0.0 {
        return ap.norm();
    }
    let bp = q - b;
    let (d3, d4) = (ab.dot(&bp), ac.dot(&bp));
    if d3 >= 0.0 && d4 <= d3 {
        return bp.norm();
    }
    let vc = d1 * d4 - d3 * d2;
    if vc <= 0.0 && d1 >= 0.0 && d3 <= 0.0 {
        let v = d1 / (d1 - d3);
        return (q - (a + ab * v)).norm();
    }
    let cp = q - c;
    let (d5, d6) = (ab.dot(&cp), ac.dot(&cp));
    if d6 >= 0.0 && d5 <= d6 {
        return cp.norm();
    }
    let vb = d5 * d2 - d1 * d6;
    if vb <= 0.0 && d2 >= 0.0 && d6 <= 0.0 {
        let w = d2 / (d2 - d6);
        return (q - (a + ac * w)).norm();
    }
    let va = d3 * d6 - d5 * d4;
    if va <= 0.0 && (d4 - d3) >= 0.0 && (d5 - d6) >= 0.0 {
        let w = (d4 - d3) / ((d4 - d3) + (d5 - d6));
        return (q - (b + (c - b) * w)).norm();
    }
    let denom = 1.0 / (va + vb + vc);
    let (v, w) = (vb * denom, vc * denom);
    (q - (a + ab * v + ac * w)).norm()
}

/// Refines `params` (sorted, in [0, 1]) of the direction `dir` (0 = u, 1 = v) until the
/// chord between neighbours stays within `tol` of the curve on every line of `other`.
fn refine(
    skin: &Skin,
    params: &mut Vec<f64>,
    other: &Axis,
    dir: usize,
    tol: f64,
    max_depth: u32,
) -> bool {
    let (knots, p) = if dir == 0 {
        (&skin.knots_u, skin.degree_u)
    } else {
        (&skin.knots_v, skin.degree_v)
    };
    let eval = |b: &Basis, o: &Basis| {
        if dir == 0 {
            skin.eval_basis(b, o)
        } else {
            skin.eval_basis(o, b)
        }
    };
    let mut changed = false;
    for _round in 0..max_depth {
        let mut next = Vec::with_capacity(params.len() * 2);
        let mut split_any = false;
        let basis: Vec<Basis> = params.iter().map(|&t| Basis::at(knots, p, t)).collect();
        for i in 0..params.len() - 1 {
            next.push(params[i]);
            let (t0, t1) = (params[i], params[i + 1]);
            if t1 - t0 < 1e-9 {
                continue;
            }
            let tests: Vec<Basis> = [0.25, 0.5, 0.75]
                .iter()
                .map(|f| Basis::at(knots, p, t0 + f * (t1 - t0)))
                .collect();
            // Aft of the leading-edge region, a chord must also stay well inside the
            // local thickness, or near a thin trailing edge it could cut through the
            // opposite surface (the outline would cross itself).
            let mid = 0.5 * (t0 + t1);
            let mirror = (dir == 0
                && (mid - skin.u_le).abs() > 0.25 * skin.u_le.min(1.0 - skin.u_le))
            .then(|| Basis::at(knots, p, mirror_u(mid, skin.u_le)));
            let needs_split = other.basis.iter().any(|ob| {
                let a = eval(&basis[i], ob);
                let b = eval(&basis[i + 1], ob);
                let limit = match &mirror {
                    Some(mb) => tol.min(0.25 * (eval(&tests[1], ob) - eval(mb, ob)).norm()),
                    None => tol,
                };
                tests
                    .iter()
                    .any(|tb| dist_to_segment(&eval(tb, ob), &a, &b) > limit)
            });
            if needs_split {
                next.push(0.5 * (t0 + t1));
                split_any = true;
            }
        }
        next.push(params[params.len() - 1]);
        *params = next;
        if !split_any {
            break;
        }
        changed = true;
    }
    changed
}

/// The parameter on the opposite surface at about the same chord station: maps the
/// upper side `[0, u_le]` linearly onto the lower side `[1, u_le]` and back (trailing
/// edge to trailing edge, leading edge to leading edge).
fn mirror_u(u: f64, u_le: f64) -> f64 {
    if u <= u_le {
        1.0 - (1.0 - u_le) * u / u_le
    } else {
        u_le * (1.0 - u) / (1.0 - u_le)
    }
}

/// Uniform subdivision of `[a, b]` into `k` intervals (end points included).
fn uniform(a: f64, b: f64, k: usize) -> Vec<f64> {
    (0..=k).map(|i| a + (b - a) * i as f64 / k as f64).collect()
}

/// Chooses grid parameters for the skin at the given tolerance.
pub fn grid_parameters(skin: &Skin, opts: &TessellationOptions) -> (Vec<f64>, Vec<f64>) {
    let tol = opts.tolerance;
    let mut us = uniform(0.0, skin.u_le, 8);
    us.extend(uniform(skin.u_le, 1.0, 8).into_iter().skip(1));
    let mut vs = uniform(0.0, 1.0, 4);
    // Alternate directions until both are settled (grid lines added in one direction
    // can reveal chord error in the other).
    for _ in 0..4 {
        let va = Axis::new(&skin.knots_v, skin.degree_v, vs.clone());
        let cu = refine(skin, &mut us, &va, 0, 0.5 * tol, opts.max_depth);
        let ua = Axis::new(&skin.knots_u, skin.degree_u, us.clone());
        let cv = refine(skin, &mut vs, &ua, 1, 0.5 * tol, opts.max_depth);
        if !cu && !cv {
            break;
        }
    }
    // Cell interiors: split the rows and columns of any cell whose triangles stray.
    for _ in 0..opts.max_depth {
        let ua = Axis::new(&skin.knots_u, skin.degree_u, us.clone());
        let va = Axis::new(&skin.knots_v, skin.degree_v, vs.clone());
        let grid: Vec<Vec<Point3<f64>>> = ua
            .basis
            .iter()
            .map(|bu| va.basis.iter().map(|bv| skin.eval_basis(bu, bv)).collect())
            .collect();
        let mut split_u = vec![false; us.len()];
        let mut split_v = vec![false; vs.len()];
        for i in 0..us.len() - 1 {
            for j in 0..vs.len() - 1 {
                let (a, b, c, d) = (
                    &grid[i][j],
                    &grid[i + 1][j],
                    &grid[i + 1][j + 1],
                    &grid[i][j + 1],
                );
                let worst = [
                    (0.5, 0.5),
                    (0.25, 0.25),
                    (0.75, 0.25),
                    (0.25, 0.75),
                    (0.75, 0.75),
                ]
                .iter()
                .map(|&(fu, fv)| {
                    let q = skin.eval(
                        us[i] + fu * (us[i + 1] - us[i]),
                        vs[j] + fv * (vs[j + 1] - vs[j]),
                    );
                    dist_to_cell(&q, [a, b, c, d])
                })
                .fold(0.0, f64::max);
                if worst > tol {
                    split_u[i] = true;
                    split_v[j] = true;
                }
            }
        }
        if !split_u.iter().any(|&s| s) {
            break;
        }
        us = insert_midpoints(&us, &split_u);
        vs = insert_midpoints(&vs, &split_v);
    }
    (us, vs)
}

fn insert_midpoints(params: &[f64], split: &[bool]) -> Vec<f64> {
    let mut out = Vec::with_capacity(params.len() * 2);
    for i in 0..params.len() {
        out.push(params[i]);
        if i + 1 < params.len() && split[i] {
            out.push(0.5 * (params[i] + params[i + 1]));
        }
    }
    out
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

/// Distance from `q` to the nearer of a cell's two triangles.
fn dist_to_cell(q: &Point3<f64>, corners: [&Point3<f64>; 4]) -> f64 {
    cell_split(corners[0], corners[1], corners[2], corners[3])
        .iter()
        .map(|t| dist_to_triangle(q, corners[t[0]], corners[t[1]], corners[t[2]]))
        .fold(f64::INFINITY, f64::min)
}

/// Measured largest distance from the skin to its grid mesh: the skin is sampled at
/// `k x k` points inside every cell (`k >= 1`), and each sample's distance to the cell's
/// two triangles is taken. The nearest point of the whole mesh can only be nearer, so
/// this is an upper bound of the sampled surface-to-mesh distance.
pub fn max_deviation(skin: &Skin, us: &[f64], vs: &[f64], k: usize) -> f64 {
    let k = k.max(1);
    let ua = Axis::new(&skin.knots_u, skin.degree_u, us.to_vec());
    let va = Axis::new(&skin.knots_v, skin.degree_v, vs.to_vec());
    let grid: Vec<Vec<Point3<f64>>> = ua
        .basis
        .iter()
        .map(|bu| va.basis.iter().map(|bv| skin.eval_basis(bu, bv)).collect())
        .collect();
    let mut worst: f64 = 0.0;
    for i in 0..us.len() - 1 {
        for j in 0..vs.len() - 1 {
            let corners = [
                &grid[i][j],
                &grid[i + 1][j],
                &grid[i + 1][j + 1],
                &grid[i][j + 1],
            ];
            for a in 0..k {
                for b in 0..k {
                    let fu = (a as f64 + 0.5) / k as f64;
                    let fv = (b as f64 + 0.5) / k as f64;
                    let q = skin.eval(
                        us[i] + fu * (us[i + 1] - us[i]),
                        vs[j] + fv * (vs[j + 1] - vs[j]),
                    );
                    worst = worst.max(dist_to_cell(&q, corners));
                }
            }
        }
    }
    worst
}

/// Tessellates the skin into a closed, outward-oriented triangle mesh.
pub fn tessellate(
    skin: &Skin,
    opts: &TessellationOptions,
) -> Result<Tessellation, TessellateError> {
    if !(opts.tolerance > 0.0) || !opts.tolerance.is_finite() {
        return Err(TessellateError::Tolerance(opts.tolerance));
    }
    let (us, vs) = grid_parameters(skin, opts);
    let (mesh, root_ring, root_cap) = mesh_from_grid(skin, &us, &vs)?;
    Ok(Tessellation {
        mesh,
        us,
        vs,
        root_ring,
        root_cap,
    })
}

/// The root ring and the range of the root cap's triangles.
type RootCap = (Vec<u32>, std::ops::Range<usize>);

/// Builds the closed mesh on the given grid parameters (`us` from 0 to 1, `vs` from 0
/// to 1, both sorted); also returns the root ring and the root cap's triangle range.
pub fn mesh_from_grid(
    skin: &Skin,
    us: &[f64],
    vs: &[f64],
) -> Result<(TriMesh, Vec<u32>, std::ops::Range<usize>), TessellateError> {
    let ua = Axis::new(&skin.knots_u, skin.degree_u, us.to_vec());
    let va = Axis::new(&skin.knots_v, skin.degree_v, vs.to_vec());
    let (nu, nv) = (ua.params.len(), va.params.len());
    let mut mesh = TriMesh::new();
    // index[i][j] of grid vertex (u_i, v_j); the last column may alias the first
    // where the trailing edge is sharp.
    let mut index = vec![vec![0u32; nv]; nu];
    for (i, bu) in ua.basis.iter().enumerate() {
        for (j, bv) in va.basis.iter().enumerate() {
            let mut p = skin.eval_basis(bu, bv);
            // The end rows lie in their cap planes exactly (the clamped end control
            // points share one z); snap away the rounding of the basis sum.
            if j == 0 {
                p.z = skin.control[0][0].z;
            } else if j == nv - 1 {
                p.z = skin.control[0][skin.control[0].len() - 1].z;
            }
            index[i][j] = mesh.push_vertex(p);
        }
    }
    // Where the trailing edge is sharp, the last column is the first one.
    let first_column = index[0].clone();
    for (last, first) in index[nu - 1].iter_mut().zip(first_column) {
        if (mesh.vertices[first as usize] - mesh.vertices[*last as usize]).norm() <= 1e-9 {
            *last = first;
        }
    }
    let outward = skin.orientation() > 0.0;
    let push = |mesh: &mut TriMesh, t: [u32; 3]| {
        if t[0] != t[1] && t[1] != t[2] && t[0] != t[2] {
            mesh.triangles
                .push(if outward { t } else { [t[0], t[2], t[1]] });
        }
    };
    // Skin cells, plus the trailing-edge strip (column nu-1 back to column 0).
    for i in 0..nu {
        let i1 = if i + 1 < nu { i + 1 } else { 0 };
        if i + 1 == nu && (0..nv).all(|j| index[nu - 1][j] == index[0][j]) {
            break;
        }
        for j in 0..nv - 1 {
            let (a, b, c, d) = (index[i][j], index[i1][j], index[i1][j + 1], index[i][j + 1]);
            let pa = mesh.vertices[a as usize];
            let (pb, pc, pd) = (
                mesh.vertices[b as usize],
                mesh.vertices[c as usize],
                mesh.vertices[d as usize],
            );
            let q = [a, b, c, d];
            for t in cell_split(&pa, &pb, &pc, &pd) {
                push(&mut mesh, [q[t[0]], q[t[1]], q[t[2]]]);
            }
        }
    }
    // Caps: the boundary loop of row j, without the aliased duplicate.
    let mut root: RootCap = (Vec::new(), 0..0);
    for (j, name, up) in [(0usize, "root", false), (nv - 1, "tip", true)] {
        let mut ring: Vec<u32> = (0..nu).map(|i| index[i][j]).collect();
        if ring[nu - 1] == ring[0] {
            ring.pop();
        }
        let start = mesh.triangles.len();
        for t in cap_triangles(&mesh, &ring, up).ok_or(TessellateError::CapSelfIntersects(name))? {
            mesh.triangles.push(t);
        }
        if !up {
            root = (ring, start..mesh.triangles.len());
        }
    }
    Ok((mesh, root.0, root.1))
}

/// Triangulation of a planar cap (a plane `z = const`) bounded by the vertex loop
/// `ring`; triangles face +z when `up`, else -z. `None` when the outline crosses itself.
fn cap_triangles(mesh: &TriMesh, ring: &[u32], up: bool) -> Option<Vec<[u32; 3]>> {
    let pts: Vec<Point2<f64>> = ring
        .iter()
        .map(|&i| {
            let p = mesh.vertices[i as usize];
            Point2::new(p.x, p.y)
        })
        .collect();
    let outline = 0..pts.len();
    let tris = crate::planar::triangulate(&pts, std::slice::from_ref(&outline))?;
    Some(
        tris.into_iter()
            .map(|[a, b, c]| {
                if up {
                    [ring[a], ring[b], ring[c]]
                } else {
                    [ring[a], ring[c], ring[b]]
                }
            })
            .collect(),
    )
}

/// Radius (z) of the skin's iso-curve at `v`. Every iso-curve of the skin is planar:
/// the rings it interpolates lie in planes `z = const` and interpolation is linear in
/// the data, so every control point of a `v` column has the same `z` (see
/// [`crate::loft`]), and `z` depends on `v` alone.
pub fn row_radius(skin: &Skin, v: f64) -> f64 {
    let b = Basis::at(&skin.knots_v, skin.degree_v, v.clamp(0.0, 1.0));
    b.values
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
