//! The planar end caps: a constrained Delaunay triangulation of the end row, with
//! interior points added where boundary points alone would only give slivers.
//!
//! Near the leading and trailing edges of a small section (the end of a round tip is 5 %
//! of the tip chord) the grid's columns crowd together, and three neighbouring boundary
//! points can be so nearly collinear that the triangle a constrained Delaunay
//! triangulation makes of them has next to no area; the solid checks rightly call such
//! triangles degenerate. Such a sliver is replaced by inserting an interior point inward
//! of its middle boundary point, at the sliver's circumradius but at most half the local
//! thickness (a Steiner point, as in Delaunay refinement: Chew 1989, Ruppert 1995; the
//! boundary edges are never split, so the cap keeps the skin's boundary vertices). A
//! point is kept only when the triangulation with it has fewer slivers than without.

use crate::mesh::TriMesh;
use crate::planar::{point_in_polygon, triangulate};
use nalgebra::{Point2, Point3};

/// A cap triangle counts as a sliver to repair when its area is below this fraction of
/// the part's squared size (100 times the solid check's degenerate limit,
/// [`crate::check::CheckOptions::DEFAULT`]) and it is thin (height below a fifth of its
/// longest side).
const SLIVER_AREA: f64 = 1e-10;
/// Rounds of point insertion.
const MAX_ROUNDS: usize = 8;

/// A triangulated cap, not yet added to the mesh.
pub(super) struct Cap {
    z: f64,
    ring: Vec<u32>,
    /// Interior points (section plane coordinates).
    interior: Vec<Point2<f64>>,
    /// Triangles indexing `ring` followed by `interior`, counter-clockwise seen from +z.
    triangles: Vec<[usize; 3]>,
    up: bool,
}

impl Cap {
    /// Adds the interior points and the triangles (facing +z when `up`, else -z).
    pub(super) fn append_to(self, mesh: &mut TriMesh) {
        let base = mesh.vertices.len();
        for p in &self.interior {
            mesh.push_vertex(Point3::new(p.x, p.y, self.z));
        }
        let n = self.ring.len();
        let id = |k: usize| {
            if k < n {
                self.ring[k]
            } else {
                (base + k - n) as u32
            }
        };
        for [a, b, c] in self.triangles {
            let t = [id(a), id(b), id(c)];
            mesh.triangles
                .push(if self.up { t } else { [t[0], t[2], t[1]] });
        }
    }
}

/// Circumcentre and circumradius of a triangle; `None` when its corners are collinear.
fn circumcircle(a: Point2<f64>, b: Point2<f64>, c: Point2<f64>) -> Option<(Point2<f64>, f64)> {
    let (ab, ac) = (b - a, c - a);
    let d = 2.0 * ab.perp(&ac);
    if d == 0.0 {
        return None;
    }
    let (l1, l2) = (ab.norm_squared(), ac.norm_squared());
    let off = nalgebra::Vector2::new(ac.y * l1 - ab.y * l2, ab.x * l2 - ac.x * l1) / d;
    Some((a + off, off.norm()))
}

fn dist_to_segment(q: Point2<f64>, a: Point2<f64>, b: Point2<f64>) -> f64 {
    let ab = b - a;
    let l2 = ab.norm_squared();
    let t = if l2 > 0.0 {
        ((q - a).dot(&ab) / l2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    (q - (a + ab * t)).norm()
}

/// Distance along the ray from `o` in direction `dir` (unit) to the outline, ignoring
/// the edges that touch the outline point `skip`.
fn ray_to_outline(
    outline: &[Point2<f64>],
    skip: usize,
    o: Point2<f64>,
    dir: nalgebra::Vector2<f64>,
) -> f64 {
    let n = outline.len();
    let mut best = f64::INFINITY;
    for k in 0..n {
        let k1 = (k + 1) % n;
        if k == skip || k1 == skip {
            continue;
        }
        let (a, e) = (outline[k], outline[k1] - outline[k]);
        let den = dir.perp(&e);
        if den == 0.0 {
            continue;
        }
        let w = a - o;
        let t = w.perp(&e) / den;
        let s = w.perp(&dir) / den;
        if t > 0.0 && (0.0..=1.0).contains(&s) {
            best = best.min(t);
        }
    }
    best
}

/// Triangles whose area is below `small` and which are thin (height below a fifth of
/// the longest side).
fn slivers(points: &[Point2<f64>], triangles: &[[usize; 3]], small: f64) -> Vec<[usize; 3]> {
    triangles
        .iter()
        .filter(|t| {
            let [a, b, c] = t.map(|k| points[k]);
            let twice_area = (b - a).perp(&(c - a)).abs();
            let longest = (b - a)
                .norm_squared()
                .max((c - b).norm_squared())
                .max((a - c).norm_squared());
            0.5 * twice_area < small && twice_area < 0.2 * longest
        })
        .copied()
        .collect()
}

/// Where to put an interior point that replaces a sliver with a boundary corner: inward
/// from the sliver's middle boundary point (the corner opposite its longest side), by its
/// circumradius but at most half the local thickness of the cap.
fn candidate(
    outline: &[Point2<f64>],
    points: &[Point2<f64>],
    t: [usize; 3],
) -> Option<Point2<f64>> {
    let n = outline.len();
    let [a, b, c] = t.map(|k| points[k]);
    let (_, r) = circumcircle(a, b, c)?;
    // The corner opposite the longest side is the middle one.
    let sides = [(c - b).norm(), (a - c).norm(), (b - a).norm()];
    let m = (0..3).max_by(|&i, &j| sides[i].total_cmp(&sides[j]))?;
    let mid = t[m];
    if mid >= n {
        return None;
    }
    // Inward normal of the outline at `mid` (the outline runs counter-clockwise).
    let tangent = outline[(mid + 1) % n] - outline[(mid + n - 1) % n];
    let inward = nalgebra::Vector2::new(-tangent.y, tangent.x).try_normalize(0.0)?;
    let depth = ray_to_outline(outline, mid, outline[mid], inward);
    let h = r.min(0.5 * depth);
    if !(h > 0.0) || !h.is_finite() {
        return None;
    }
    Some(outline[mid] + inward * h)
}

/// Triangulates the cap bounded by the vertex loop `ring` (all in one plane `z =
/// const`); `scale` is the part's size (its box diagonal). `None` when the outline
/// crosses itself.
pub(super) fn cap(vertices: &[Point3<f64>], ring: &[u32], up: bool, scale: f64) -> Option<Cap> {
    let mut outline: Vec<Point2<f64>> = ring
        .iter()
        .map(|&i| {
            let p = vertices[i as usize];
            Point2::new(p.x, p.y)
        })
        .collect();
    // Counter-clockwise for the inward normals (the triangles do not depend on it).
    let twice_area: f64 = (0..outline.len())
        .map(|k| {
            outline[k]
                .coords
                .perp(&outline[(k + 1) % outline.len()].coords)
        })
        .sum();
    let reversed = twice_area < 0.0;
    if reversed {
        outline.reverse();
    }
    let n = outline.len();
    let small = SLIVER_AREA * scale * scale;
    let mut points = outline.clone();
    let mut triangles = triangulate(&points, std::slice::from_ref(&(0..n)))?;
    let mut bad = slivers(&points, &triangles, small);
    for _ in 0..MAX_ROUNDS {
        if bad.is_empty() {
            break;
        }
        let mut improved = false;
        for t in bad.clone() {
            let Some(p) = candidate(&outline, &points, t) else {
                continue;
            };
            let near = points
                .iter()
                .map(|q| (q - p).norm())
                .fold(f64::INFINITY, f64::min);
            let wall = (0..n)
                .map(|k| dist_to_segment(p, outline[k], outline[(k + 1) % n]))
                .fold(f64::INFINITY, f64::min);
            if !point_in_polygon(&outline, &p) || near <= 0.0 || wall <= 0.0 {
                continue;
            }
            // Keep the point only if it leaves fewer slivers.
            points.push(p);
            match triangulate(&points, std::slice::from_ref(&(0..n))) {
                Some(tris) => {
                    let now = slivers(&points, &tris, small);
                    if now.len() < bad.len() {
                        triangles = tris;
                        bad = now;
                        improved = true;
                        continue;
                    }
                    points.pop();
                }
                None => {
                    points.pop();
                }
            }
        }
        if !improved {
            break;
        }
    }
    // Back to ring order.
    let map = |k: usize| if reversed && k < n { n - 1 - k } else { k };
    Some(Cap {
        z: vertices[ring[0] as usize].z,
        ring: ring.to_vec(),
        interior: points[n..].to_vec(),
        triangles: triangles.into_iter().map(|t| t.map(map)).collect(),
        up,
    })
}
