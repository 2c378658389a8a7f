//! Cutting a closed mesh by a plane `z = r` into closed polygons.
//!
//! Robustness: a vertex lying exactly on the plane is treated as if it were slightly above
//! it (symbolic perturbation), so every triangle is either not cut or cut along exactly
//! two of its edges. Each crossing point is computed from its edge alone (the same
//! arithmetic in both triangles sharing the edge) and segments are joined by edge, not
//! by comparing coordinates, so loops close exactly on any closed, manifold mesh.
//! Consequence: a plane through a flat cap at the low end (the root face) finds nothing;
//! ask for a radius a little inside the part there.

use std::collections::HashMap;

use nalgebra::{Point2, Point3};

use crate::mesh::TriMesh;

/// The cut of a mesh by one plane.
#[derive(Debug, Clone, PartialEq)]
pub struct Slice {
    /// Plane position `z = radius`, mm.
    pub radius: f64,
    /// Closed loops in (x, y), mm, without repeating the first point. The material lies
    /// on the left: outer boundaries run counter-clockwise seen from +z (tip), holes
    /// clockwise.
    pub loops: Vec<Vec<Point2<f64>>>,
}

/// Why a mesh could not be cut.
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

impl Slice {
    /// Cuts `mesh` (closed, outward) by the plane `z = radius`. An empty slice means the
    /// plane misses the part.
    pub fn cut(mesh: &TriMesh, radius: f64) -> Result<Slice, SliceError> {
        let above = |i: u32| mesh.vertices[i as usize].z >= radius;
        let point = |(lo, hi): (u32, u32)| -> Point2<f64> {
            let (p, q): (Point3<f64>, Point3<f64>) =
                (mesh.vertices[lo as usize], mesh.vertices[hi as usize]);
            // A vertex on the plane is its own crossing point, exactly.
            for v in [p, q] {
                if v.z == radius {
                    return Point2::new(v.x, v.y);
                }
            }
            let t = (radius - p.z) / (q.z - p.z);
            Point2::new(p.x + t * (q.x - p.x), p.y + t * (q.y - p.y))
        };
        // Segment: from the edge the triangle crosses going down (above -> below) to the
        // edge it crosses going up; this keeps the material on the left seen from +z.
        let mut starts: HashMap<(u32, u32), usize> = HashMap::new();
        let mut segs: Vec<(Edge, Edge, usize)> = Vec::new();
        for (t, tri) in mesh.triangles.iter().enumerate() {
            let mut down = None;
            let mut up = None;
            for k in 0..3 {
                let (a, b) = (tri[k], tri[(k + 1) % 3]);
                match (above(a), above(b)) {
                    (true, false) => down = Some(key(a, b)),
                    (false, true) => up = Some(key(a, b)),
                    _ => {}
                }
            }
            if let (Some(s), Some(e)) = (down, up) {
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
                ring.push(point(s));
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
    }
}
