//! Bodies that must not meet: the blades and the hub of an assembled rotor, the parts on
//! a plate. Each body is checked on its own by [`super::check_solid`]; this check finds
//! triangles of two different bodies that cross or touch.
//!
//! Only triangles inside the overlap of the two bodies' bounding boxes take part, and
//! the pairs are found by the same grid and exact triangle tests as the
//! self-intersection check, so the cost follows the size of the overlap, not of the
//! bodies. Body meshes must be valid solids (they are [`super::CheckedPart`]s).

use super::intersections::self_intersections;
use super::Listed;
use crate::mesh::{Aabb, TriMesh};
use std::fmt;

/// Two bodies that meet, with the triangle pairs where they do.
#[derive(Debug, Clone, PartialEq)]
pub struct Interference {
    /// Index of the first body.
    pub a: usize,
    /// Index of the second body.
    pub b: usize,
    /// Name of the first body.
    pub a_name: String,
    /// Name of the second body.
    pub b_name: String,
    /// Pairs (triangle of `a`, triangle of `b`) that cross or touch.
    pub pairs: Listed<[usize; 2]>,
}

impl fmt::Display for Interference {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "'{}' and '{}' cross or touch: {} triangle pair{} (first: ",
            self.a_name,
            self.b_name,
            self.pairs.count,
            if self.pairs.count == 1 { "" } else { "s" }
        )?;
        let shown: Vec<String> = self
            .pairs
            .items
            .iter()
            .map(|p| format!("({}, {})", p[0], p[1]))
            .collect();
        write!(f, "{})", shown.join(", "))
    }
}

/// Every pair of `bodies` (name, mesh) that meets, listing at most `max_listed` triangle
/// pairs each. Empty when all bodies are apart.
pub fn interferences(bodies: &[(&str, &TriMesh)], max_listed: usize) -> Vec<Interference> {
    let boxes: Vec<Option<Aabb>> = bodies.iter().map(|(_, m)| m.bounding_box()).collect();
    let mut out = Vec::new();
    for a in 0..bodies.len() {
        for b in a + 1..bodies.len() {
            let (Some(ba), Some(bb)) = (boxes[a], boxes[b]) else {
                continue;
            };
            let lo = ba.min.sup(&bb.min);
            let hi = ba.max.inf(&bb.max);
            if (0..3).any(|k| lo[k] > hi[k]) {
                continue;
            }
            let pairs = crossing_pairs(bodies[a].1, bodies[b].1, &Aabb { min: lo, max: hi });
            if pairs.is_empty() {
                continue;
            }
            let mut listed = Listed::new();
            for p in pairs {
                listed.push(p, max_listed);
            }
            out.push(Interference {
                a,
                b,
                a_name: bodies[a].0.to_string(),
                b_name: bodies[b].0.to_string(),
                pairs: listed,
            });
        }
    }
    out
}

/// Pairs (triangle of `a`, triangle of `b`) that meet, among the triangles whose boxes
/// reach into `window`.
fn crossing_pairs(a: &TriMesh, b: &TriMesh, window: &Aabb) -> Vec<[usize; 2]> {
    let mut both = a.clone();
    both.append(b);
    let na = a.triangles.len();
    let active: Vec<bool> = both
        .triangles
        .iter()
        .map(|t| {
            let pts = t.map(|i| both.vertices[i as usize]);
            (0..3).all(|k| {
                let lo = pts.iter().map(|p| p[k]).fold(f64::INFINITY, f64::min);
                let hi = pts.iter().map(|p| p[k]).fold(f64::NEG_INFINITY, f64::max);
                lo <= window.max[k] && hi >= window.min[k]
            })
        })
        .collect();
    self_intersections(&both, &active, None)
        .into_iter()
        .filter(|&[i, j]| i < na && j >= na)
        .map(|[i, j]| [i, j - na])
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::{Point3, Vector3};

    #[test]
    fn boxes_apart_touching_and_crossing() {
        let unit = Vector3::new(1.0, 1.0, 1.0);
        let a = TriMesh::cuboid(Point3::origin(), unit);
        let apart = TriMesh::cuboid(Point3::new(3.0, 0.0, 0.0), unit);
        let crossing = TriMesh::cuboid(Point3::new(0.5, 0.5, 0.5), unit);
        assert!(interferences(&[("a", &a), ("b", &apart)], 10).is_empty());
        let found = interferences(&[("a", &a), ("b", &apart), ("c", &crossing)], 10);
        assert_eq!(found.len(), 1, "{found:?}");
        assert_eq!((found[0].a, found[0].b), (0, 2));
        assert!(found[0].pairs.count > 0);
        assert!(found[0].to_string().contains("'a' and 'c'"));
    }
}
