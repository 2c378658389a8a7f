//! The planar end caps: a constrained Delaunay triangulation of the end row, with
//! interior points added where boundary points alone would only give slivers.
//!
//! Near the leading and trailing edges of a small section (the end of a round tip is 5 %
//! of the tip chord) the grid's columns crowd together, and a triangle a constrained
//! Delaunay triangulation makes of three neighbouring boundary points can have next to
//! no area (nearly collinear points, or points a few ten-thousandths of a millimetre
//! apart); the solid checks call such triangles degenerate. Such a triangle is replaced
//! by inserting an interior point inward of its middle boundary point, at its
//! circumradius but at most half the local thickness (a Steiner point, as in Delaunay
//! refinement: Chew 1989, Ruppert 1995; the boundary edges are never split, so the cap
//! keeps the skin's boundary vertices). Points are kept only when the triangulation with
//! them has fewer too-small triangles than without.

use crate::mesh::TriMesh;
use crate::planar::{point_in_polygon, triangulate};
use nalgebra::{Point2, Point3};

/// A cap triangle counts as too small when its area is below this fraction of the part's
/// squared size: four times the solid check's degenerate limit
/// ([`crate::check::CheckOptions::DEFAULT`]), a margin for the part growing by its mount
/// features.
const SLIVER_AREA: f64 = 4e-12;
/// Candidate points tried one at a time per round when a whole round's batch does not
/// help.
const SINGLE_TRIES: usize = 64;
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

/// Triangles whose area is below `small`.
fn slivers(points: &[Point2<f64>], triangles: &[[usize; 3]], small: f64) -> Vec<[usize; 3]> {
    triangles
        .iter()
        .filter(|t| {
            let [a, b, c] = t.map(|k| points[k]);
            0.5 * (b - a).perp(&(c - a)).abs() < small
        })
        .copied()
        .collect()
}

/// Where to try an interior point that replaces a too small triangle: inward from each of
/// its boundary corners (the middle one, opposite the longest side, first), at its
/// circumradius and at 4 and 16 times that, but at most half the local thickness of the
/// cap there (the depth of the inward ray). A thin wedge (a sharp trailing edge at a small
/// tip end) needs the point well inside, where the wedge is thick enough.
fn candidates(outline: &[Point2<f64>], points: &[Point2<f64>], t: [usize; 3]) -> Vec<Point2<f64>> {
    let n = outline.len();
    let [a, b, c] = t.map(|k| points[k]);
    let Some((_, r)) = circumcircle(a, b, c) else {
        return Vec::new();
    };
    let sides = [(c - b).norm(), (a - c).norm(), (b - a).norm()];
    let mut corners = [0, 1, 2];
    corners.sort_by(|&i, &j| sides[j].total_cmp(&sides[i]));
    let mut out = Vec::new();
    for m in corners {
        let corner = t[m];
        if corner >= n {
            continue;
        }
        // Inward normal of the outline at the corner (the outline runs counter-clockwise).
        let tangent = outline[(corner + 1) % n] - outline[(corner + n - 1) % n];
        let Some(inward) = nalgebra::Vector2::new(-tangent.y, tangent.x).try_normalize(0.0) else {
            continue;
        };
        let depth = ray_to_outline(outline, corner, outline[corner], inward);
        for f in [1.0, 4.0, 16.0] {
            let h = (f * r).min(0.5 * depth);
            if h > 0.0 && h.is_finite() {
                out.push(outline[corner] + inward * h);
            }
            if f * r >= 0.5 * depth {
                break;
            }
        }
    }
    out
}

/// Constrained Delaunay triangulation of the region inside the loop `points[..n]`, with
/// the other points inside it and the segments `spokes` (point index pairs) as further
/// constraints. Triangles counter-clockwise. `None` when constraints cross or points
/// coincide. (As [`crate::planar::triangulate`], plus interior constraint segments.)
fn triangulate_with(
    points: &[Point2<f64>],
    n: usize,
    spokes: &[[usize; 2]],
) -> Option<Vec<[usize; 3]>> {
    if spokes.is_empty() {
        return triangulate(points, std::slice::from_ref(&(0..n)));
    }
    use spade::{ConstrainedDelaunayTriangulation, Point2 as SPoint, Triangulation};
    let vertices: Vec<SPoint<f64>> = points.iter().map(|p| SPoint::new(p.x, p.y)).collect();
    let mut edges: Vec<[usize; 2]> = (0..n).map(|i| [i, (i + 1) % n]).collect();
    edges.extend_from_slice(spokes);
    let mut conflict = false;
    let cdt: ConstrainedDelaunayTriangulation<SPoint<f64>> =
        ConstrainedDelaunayTriangulation::try_bulk_load_cdt(vertices, edges, |_| conflict = true)
            .ok()?;
    if conflict || cdt.num_vertices() != points.len() {
        return None;
    }
    let outline = &points[..n];
    let mut out = Vec::new();
    for face in cdt.inner_faces() {
        let [a, b, c] = face.vertices().map(|v| v.fix().index());
        let q = Point2::from((points[a].coords + points[b].coords + points[c].coords) / 3.0);
        if point_in_polygon(outline, &q) {
            let area = (points[b] - points[a]).perp(&(points[c] - points[a]));
            out.push(if area >= 0.0 { [a, b, c] } else { [a, c, b] });
        }
    }
    Some(out)
}

/// For a too small triangle that is an ear at a sharp corner of the outline (two of its
/// sides are the outline edges at one corner, as at a sharp trailing edge), a point on
/// the corner's bisector far enough in for the two halves of the corner to reach the
/// area `small` (at most half the depth there), with the spoke from the corner to it.
fn ear_spoke(outline: &[Point2<f64>], t: [usize; 3], small: f64) -> Option<(Point2<f64>, usize)> {
    let n = outline.len();
    let corner = (0..3)
        .map(|i| t[i])
        .find(|&v| v < n && t.contains(&((v + 1) % n)) && t.contains(&((v + n - 1) % n)))?;
    let (v, prev, next) = (
        outline[corner],
        outline[(corner + n - 1) % n],
        outline[(corner + 1) % n],
    );
    let (e1, e2) = (
        (prev - v).try_normalize(0.0)?,
        (next - v).try_normalize(0.0)?,
    );
    let bisector = (e1 + e2).try_normalize(0.0)?;
    let half_sin = e1.perp(&bisector).abs();
    let short = (prev - v).norm().min((next - v).norm());
    let depth = ray_to_outline(outline, corner, v, bisector);
    let want = 4.0 * small / (short * half_sin.max(1e-12));
    let d = want.min(0.5 * depth);
    (d > 0.0 && d.is_finite()).then(|| (v + bisector * d, corner))
}

/// Triangulates the cap bounded by the vertex loop `ring` (all in one plane `z =
/// const`); `scale` is the part's size (its box diagonal). `None` when the outline
/// crosses itself.
pub(super) fn cap(vertices: &[Point3<f64>], ring: &[u32], up: bool, scale: f64) -> Option<Cap> {
    let (outline, reversed) = ccw_outline(vertices, ring);
    let refine = Refine {
        outline: &outline,
        n: outline.len(),
        small: SLIVER_AREA * scale * scale,
    };
    let mut state = refine.start()?;
    for _ in 0..MAX_ROUNDS {
        if state.bad.is_empty() || !refine.round(&mut state) {
            break;
        }
    }
    // Back to ring order.
    let n = refine.n;
    let map = |k: usize| if reversed && k < n { n - 1 - k } else { k };
    Some(Cap {
        z: vertices[ring[0] as usize].z,
        ring: ring.to_vec(),
        interior: state.points[n..].to_vec(),
        triangles: state.triangles.into_iter().map(|t| t.map(map)).collect(),
        up,
    })
}

/// The ring's outline in its plane, counter-clockwise for the inward normals (the
/// triangles do not depend on it), and whether it was reversed to be so.
fn ccw_outline(vertices: &[Point3<f64>], ring: &[u32]) -> (Vec<Point2<f64>>, bool) {
    let mut outline: Vec<Point2<f64>> = ring
        .iter()
        .map(|&i| {
            let p = vertices[i as usize];
            Point2::new(p.x, p.y)
        })
        .collect();
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
    (outline, reversed)
}

/// A candidate: an interior point, and the corner it is joined to (for ears).
type Candidate = (Point2<f64>, Option<usize>);

/// A cap's triangulation as it is refined.
struct Triangulated {
    /// The outline, then the interior points.
    points: Vec<Point2<f64>>,
    /// Constraint segments from ear corners to their interior points.
    spokes: Vec<[usize; 2]>,
    /// Counter-clockwise triangles on `points`.
    triangles: Vec<[usize; 3]>,
    /// The too small ones.
    bad: Vec<[usize; 3]>,
}

/// Refinement of a cap's triangulation by interior points (module docs).
struct Refine<'a> {
    /// The outline, counter-clockwise.
    outline: &'a [Point2<f64>],
    /// Its number of points.
    n: usize,
    /// Area below which a triangle is too small.
    small: f64,
}

impl Refine<'_> {
    /// The triangulation of the outline alone; `None` when it crosses itself.
    fn start(&self) -> Option<Triangulated> {
        let points = self.outline.to_vec();
        let triangles = triangulate(&points, std::slice::from_ref(&(0..self.n)))?;
        let bad = slivers(&points, &triangles, self.small);
        Some(Triangulated {
            points,
            spokes: Vec::new(),
            triangles,
            bad,
        })
    }

    /// True when `p` lies strictly inside the outline and on none of `points`.
    fn fits(&self, points: &[Point2<f64>], p: &Point2<f64>) -> bool {
        let (outline, n) = (self.outline, self.n);
        let near = points
            .iter()
            .map(|q| (q - p).norm())
            .fold(f64::INFINITY, f64::min);
        let wall = (0..n)
            .map(|k| dist_to_segment(*p, outline[k], outline[(k + 1) % n]))
            .fold(f64::INFINITY, f64::min);
        point_in_polygon(outline, p) && near > 0.0 && wall > 0.0
    }

    /// The triangulation with the `extra` candidates added; `None` when it cannot be
    /// made.
    fn trial(&self, from: &Triangulated, extra: &[Candidate]) -> Option<Triangulated> {
        let mut pts = from.points.to_vec();
        let mut sp = from.spokes.to_vec();
        for (p, corner) in extra {
            if let Some(c) = corner {
                sp.push([*c, pts.len()]);
            }
            pts.push(*p);
        }
        let tris = triangulate_with(&pts, self.n, &sp)?;
        let now = slivers(&pts, &tris, self.small);
        Some(Triangulated {
            points: pts,
            spokes: sp,
            triangles: tris,
            bad: now,
        })
    }

    /// The candidates for the too small triangles: the first fitting one of each
    /// triangle as one batch (no nearer another batch point than the mesh points), and
    /// all of them for trying singly.
    fn candidates(&self, state: &Triangulated) -> (Vec<Candidate>, Vec<Candidate>) {
        let mut batch: Vec<Candidate> = Vec::new();
        let mut singles: Vec<Candidate> = Vec::new();
        for t in &state.bad {
            let ear = ear_spoke(self.outline, *t, self.small).map(|(p, c)| (p, Some(c)));
            let others = candidates(self.outline, &state.points, *t)
                .into_iter()
                .map(|p| (p, None));
            let mut first = true;
            for c in ear.into_iter().chain(others) {
                if !self.fits(&state.points, &c.0) || singles.iter().any(|q| q.0 == c.0) {
                    continue;
                }
                // A batch point no nearer another batch point than the mesh points.
                let room = state
                    .points
                    .iter()
                    .map(|q| (q - c.0).norm())
                    .fold(f64::INFINITY, f64::min);
                if first && batch.iter().all(|q| (q.0 - c.0).norm() >= room) {
                    batch.push(c);
                    first = false;
                }
                singles.push(c);
            }
        }
        (batch, singles)
    }

    /// One round: the batch if it leaves fewer too small triangles, else each single
    /// candidate (up to [`SINGLE_TRIES`]) that does. False when nothing helped.
    fn round(&self, state: &mut Triangulated) -> bool {
        let (batch, singles) = self.candidates(state);
        if let Some(r) = self
            .trial(state, &batch)
            .filter(|r| r.bad.len() < state.bad.len())
        {
            *state = r;
            return true;
        }
        let mut improved = false;
        for c in singles.iter().take(SINGLE_TRIES) {
            if let Some(r) = self
                .trial(state, std::slice::from_ref(c))
                .filter(|r| r.bad.len() < state.bad.len())
            {
                *state = r;
                improved = true;
            }
        }
        improved
    }
}
