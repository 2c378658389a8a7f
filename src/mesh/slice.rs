//! Cutting a mesh by planes `z = const`: the one mesh slicer that mass properties,
//! printability and the rotation-sense check share.
//!
//! Robustness: a vertex lying exactly on the plane is treated as if it were slightly above
//! it (symbolic perturbation), so every triangle is either not cut or cut along exactly
//! two of its edges. Each crossing point is computed from its edge alone, from the vertex
//! with the smaller index to the larger (the same arithmetic in both triangles sharing
//! the edge), and segments are joined by edge, not by comparing coordinates, so loops
//! close exactly on any closed, manifold mesh. Consequence: a plane through a flat cap at
//! the low end (the root face) finds nothing; ask for a position a little inside the part
//! there.
//!
//! Three ways in, one rule:
//!
//! * [`Slice::cut`] and [`Slice::cut_many`]: closed loops, for closed meshes; an open or
//!   non-manifold mesh is an error naming the triangle and edge.
//! * [`segments`] and [`segments_many`]: the same crossings as loose directed segments,
//!   for meshes that may be open (a user's STL): nothing is joined, nothing fails.
//!
//! The `_many` forms sort the triangles into the planes they cross first, so `n` planes
//! cost one pass over the mesh plus the crossings found, not `n` passes.

use std::collections::HashMap;

use nalgebra::Point2;

use super::TriMesh;

/// The cut of a mesh by one plane.
#[derive(Debug, Clone, PartialEq)]
pub struct Slice {
    /// Plane position `z = radius`, mm (in the blade frame the plane's distance from the
    /// rotor axis, see [`crate::conventions`]).
    pub radius: f64,
    /// Closed loops in (x, y), mm, without repeating the first point. The material lies
    /// on the left: outer boundaries run counter-clockwise seen from +z (tip), holes
    /// clockwise.
    pub loops: Vec<Vec<Point2<f64>>>,
}

/// Why a mesh could not be cut into closed loops.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SliceError {
    /// A cut segment ends on an edge no other triangle continues from: the mesh is open.
    #[error(
        "the cut at z = {radius} mm does not close: edge ({a}, {b}) of triangle {triangle} \
         has no neighbour; the mesh is open there (repair or re-export it watertight)"
    )]
    Open {
        /// Plane position, mm.
        radius: f64,
        /// Triangle whose segment dead-ends.
        triangle: usize,
        /// Edge vertex indices.
        a: u32,
        /// Edge vertex indices.
        b: u32,
    },
    /// More than two triangles meet along one cut edge.
    #[error(
        "the cut at z = {radius} mm meets edge ({a}, {b}) more than twice (triangles \
         {first} and {second}): the mesh is not manifold there"
    )]
    NonManifold {
        /// Plane position, mm.
        radius: f64,
        /// Edge vertex indices.
        a: u32,
        /// Edge vertex indices.
        b: u32,
        /// First triangle using the edge the same way.
        first: usize,
        /// Second triangle using the edge the same way.
        second: usize,
    },
}

/// A mesh edge as its two vertex indices, smaller first.
type Edge = (u32, u32);

fn key(a: u32, b: u32) -> Edge {
    (a.min(b), a.max(b))
}

/// The crossing of triangle `t` by the plane `z`: the edge it crosses going down (above
/// -> below) and the edge it crosses going up, in the triangle's winding. Walking from the
/// first to the second keeps the material on the left seen from +z. `None` when the plane
/// misses the triangle or the triangle names a vertex the mesh does not have.
fn crossing(mesh: &TriMesh, t: usize, z: f64) -> Option<(Edge, Edge)> {
    let tri = mesh.triangles[t];
    let mut above = [false; 3];
    for (k, &v) in tri.iter().enumerate() {
        above[k] = mesh.vertices.get(v as usize)?.z >= z;
    }
    let (mut down, mut up) = (None, None);
    for k in 0..3 {
        let l = (k + 1) % 3;
        match (above[k], above[l]) {
            (true, false) => down = Some(key(tri[k], tri[l])),
            (false, true) => up = Some(key(tri[k], tri[l])),
            _ => {}
        }
    }
    Some((down?, up?))
}

/// Where the plane `z` crosses `edge` (one end above, one below), in (x, y).
fn point(mesh: &TriMesh, (lo, hi): Edge, z: f64) -> Point2<f64> {
    let (p, q) = (mesh.vertices[lo as usize], mesh.vertices[hi as usize]);
    // A vertex on the plane is its own crossing point, exactly.
    for v in [p, q] {
        if v.z == z {
            return Point2::new(v.x, v.y);
        }
    }
    let t = (z - p.z) / (q.z - p.z);
    Point2::new(p.x + t * (q.x - p.x), p.y + t * (q.y - p.y))
}

/// For each plane of `zs` (any order), the triangles it crosses, in mesh order. A plane
/// crosses a triangle when one vertex is below it and one on or above it.
fn crossed_triangles(mesh: &TriMesh, zs: &[f64]) -> Vec<Vec<usize>> {
    let mut order: Vec<usize> = (0..zs.len()).collect();
    order.sort_by(|&a, &b| zs[a].total_cmp(&zs[b]));
    let sorted: Vec<f64> = order.iter().map(|&i| zs[i]).collect();
    let mut out = vec![Vec::new(); zs.len()];
    for (t, tri) in mesh.triangles.iter().enumerate() {
        let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
        for &v in tri {
            if let Some(p) = mesh.vertices.get(v as usize) {
                lo = lo.min(p.z);
                hi = hi.max(p.z);
            }
        }
        // Planes with lo < z <= hi.
        let first = sorted.partition_point(|&z| z <= lo);
        let last = sorted.partition_point(|&z| z <= hi);
        for &plane in &order[first..last.max(first)] {
            out[plane].push(t);
        }
    }
    out
}

/// The directed segments where the plane `z` cuts `mesh`, material on the left seen from
/// +z (for a closed, outward mesh). Works on any mesh: triangles naming missing vertices
/// are skipped and nothing is joined.
pub fn segments(mesh: &TriMesh, z: f64) -> Vec<[Point2<f64>; 2]> {
    segments_of(mesh, z, 0..mesh.len())
}

/// [`segments`] for many planes at once (one pass over the mesh), in the order of `zs`.
pub fn segments_many(mesh: &TriMesh, zs: &[f64]) -> Vec<Vec<[Point2<f64>; 2]>> {
    crossed_triangles(mesh, zs)
        .into_iter()
        .zip(zs)
        .map(|(tris, &z)| segments_of(mesh, z, tris))
        .collect()
}

fn segments_of(
    mesh: &TriMesh,
    z: f64,
    tris: impl IntoIterator<Item = usize>,
) -> Vec<[Point2<f64>; 2]> {
    tris.into_iter()
        .filter_map(|t| crossing(mesh, t, z))
        .map(|(s, e)| [point(mesh, s, z), point(mesh, e, z)])
        .collect()
}

impl Slice {
    /// Cuts `mesh` (closed, outward) by the plane `z = radius`. An empty slice means the
    /// plane misses the part.
    pub fn cut(mesh: &TriMesh, radius: f64) -> Result<Slice, SliceError> {
        Self::join(mesh, radius, 0..mesh.len())
    }

    /// Cuts `mesh` by every plane of `radii` (any order; the slices come back in that
    /// order), in one pass over the mesh.
    pub fn cut_many(mesh: &TriMesh, radii: &[f64]) -> Result<Vec<Slice>, SliceError> {
        crossed_triangles(mesh, radii)
            .into_iter()
            .zip(radii)
            .map(|(tris, &r)| Self::join(mesh, r, tris))
            .collect()
    }

    /// Joins the crossings of the triangles `tris` by the plane `radius` into loops.
    fn join(
        mesh: &TriMesh,
        radius: f64,
        tris: impl IntoIterator<Item = usize>,
    ) -> Result<Slice, SliceError> {
        let mut starts: HashMap<Edge, usize> = HashMap::new();
        let mut segs: Vec<(Edge, Edge, usize)> = Vec::new();
        for t in tris {
            let Some((s, e)) = crossing(mesh, t, radius) else {
                continue;
            };
            if let Some(&other) = starts.get(&s) {
                return Err(SliceError::NonManifold {
                    radius,
                    a: s.0,
                    b: s.1,
                    first: segs[other].2,
                    second: t,
                });
            }
            starts.insert(s, segs.len());
            segs.push((s, e, t));
        }
        let mut used = vec![false; segs.len()];
        let mut loops = Vec::new();
        for first in 0..segs.len() {
            if used[first] {
                continue;
            }
            let mut ring = Vec::new();
            let mut i = first;
            loop {
                used[i] = true;
                let (s, e, t) = segs[i];
                ring.push(point(mesh, s, radius));
                match starts.get(&e) {
                    Some(&next) if next == first => break,
                    Some(&next) if !used[next] => i = next,
                    _ => {
                        return Err(SliceError::Open {
                            radius,
                            triangle: t,
                            a: e.0,
                            b: e.1,
                        })
                    }
                }
            }
            ring.dedup_by(|a, b| (*a - *b).norm() == 0.0);
            if ring.len() > 1 && ring.first() == ring.last() {
                ring.pop();
            }
            if ring.len() >= 3 {
                loops.push(ring);
            }
        }
        Ok(Slice { radius, loops })
    }

    /// True when the plane misses the part.
    pub fn is_empty(&self) -> bool {
        self.loops.is_empty()
    }

    /// All loop points (for extreme-fibre searches and bounding boxes).
    pub fn points(&self) -> impl Iterator<Item = &Point2<f64>> {
        self.loops.iter().flatten()
    }

    /// The loops' edges as directed segments (material on the left).
    pub fn segments(&self) -> impl Iterator<Item = [Point2<f64>; 2]> + '_ {
        self.loops
            .iter()
            .flat_map(|l| (0..l.len()).map(move |i| [l[i], l[(i + 1) % l.len()]]))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::tests::box_mesh;
    use nalgebra::Vector3;

    #[test]
    fn box_cut_through_vertices() {
        // The box has vertices only at z = 0 and z = 5; cutting at z = 5 (on the tip
        // face) still gives the full rectangle, at z = 0 nothing.
        let m = box_mesh(Vector3::new(2.0, 3.0, 5.0));
        let s = Slice::cut(&m, 2.0).unwrap();
        assert_eq!(s.loops.len(), 1);
        assert_eq!(s.loops[0].len(), 8); // four corners plus one point per side diagonal
        let top = Slice::cut(&m, 5.0).unwrap();
        assert_eq!(top.loops.len(), 1);
        assert!(Slice::cut(&m, 0.0).unwrap().is_empty());
        let mut open = m.clone();
        open.triangles.pop();
        assert!(Slice::cut(&open, 2.0).is_err());
        // The loose segments of the open mesh are still found, one fewer.
        assert_eq!(segments(&open, 2.0).len() + 1, segments(&m, 2.0).len());
    }

    #[test]
    fn many_planes_agree_with_one_at_a_time() {
        let m = box_mesh(Vector3::new(2.0, 3.0, 5.0));
        let zs = [4.0, -1.0, 0.0, 2.5, 5.0, 6.0, 0.5];
        let many = Slice::cut_many(&m, &zs).unwrap();
        let segs = segments_many(&m, &zs);
        for (k, &z) in zs.iter().enumerate() {
            assert_eq!(many[k], Slice::cut(&m, z).unwrap(), "z = {z}");
            assert_eq!(segs[k], segments(&m, z), "z = {z}");
        }
        // A triangle naming a missing vertex cuts nothing and does not panic.
        let mut broken = m.clone();
        broken.triangles.push([0, 1, 99]);
        assert_eq!(segments(&broken, 2.0).len(), segments(&m, 2.0).len());
    }
}
