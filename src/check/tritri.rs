//! Triangle-triangle intersection tests.
//!
//! Pairs without a shared vertex use the interval method of T. Möller, "A Fast
//! Triangle-Triangle Intersection Test", *Journal of Graphics Tools* 2(2), 1997: reject
//! when one triangle lies strictly on one side of the other's plane; otherwise both
//! triangles cut the line where the planes meet in an interval, and they intersect
//! exactly when the intervals overlap. Coplanar pairs are tested in 2D (edge crossings and
//! containment), as in the same paper.
//!
//! Pairs sharing exactly one vertex `v` use the fact that the intersection of two convex
//! sets is convex: if it holds `v` and any other point `p`, it holds the segment `vp`, so
//! the two corners at `v` (the cones spanned by the edges leaving `v`) share a direction;
//! and if the cones share a direction, a short step from `v` along it lies in both
//! triangles. So such a pair intersects beyond `v` exactly when the cones share a
//! direction.

use nalgebra::Vector3;

type V = Vector3<f64>;

/// Relative tolerance below which a signed distance to a plane counts as zero.
const PLANE_EPS: f64 = 1e-12;
/// Planes closer to parallel than this (sine of the angle between them) are tested as
/// one plane: the line where they meet is then too ill-conditioned to place intervals
/// on (two thin cells of a straight shank, flat to 1e-10, gave a false crossing).
const PARALLEL_SIN: f64 = 1e-6;

/// True when the closed triangles `p` and `q` (no shared vertex) have a common point.
/// Both must be non-degenerate.
pub(crate) fn disjoint_pair_meets(p: &[V; 3], q: &[V; 3]) -> bool {
    // Work near the origin to limit cancellation.
    let o = p[0];
    let p = [p[0] - o, p[1] - o, p[2] - o];
    let q = [q[0] - o, q[1] - o, q[2] - o];
    let scale = p
        .iter()
        .chain(q.iter())
        .map(|x| x.amax())
        .fold(0.0, f64::max);

    let n2 = (q[1] - q[0]).cross(&(q[2] - q[0]));
    let dp = distances(&n2, &q[0], &p, scale);
    if same_strict_side(&dp) {
        return false;
    }
    let n1 = (p[1] - p[0]).cross(&(p[2] - p[0]));
    let dq = distances(&n1, &p[0], &q, scale);
    if same_strict_side(&dq) {
        return false;
    }
    let dir = n1.cross(&n2);
    if dp == [0.0; 3] || dq == [0.0; 3] || dir.norm() <= PARALLEL_SIN * n1.norm() * n2.norm() {
        return coplanar_meets(&n1, &p, &q);
    }
    let (a0, a1) = interval(&dir, &p, &dp);
    let (b0, b1) = interval(&dir, &q, &dq);
    a0.max(b0) <= a1.min(b1)
}

/// True when the triangles `p` and `q`, which share exactly the vertex `p[0] == q[0]`
/// (and no other), have a common point other than that vertex. Both must be
/// non-degenerate.
pub(crate) fn corner_pair_meets(p: &[V; 3], q: &[V; 3]) -> bool {
    let v = p[0];
    let (e1, e2) = (p[1] - v, p[2] - v);
    let (f1, f2) = (q[1] - v, q[2] - v);
    let n1 = e1.cross(&e2);
    let n2 = f1.cross(&f2);
    let dir = n1.cross(&n2);
    if dir.norm() <= PARALLEL_SIN * n1.norm() * n2.norm() {
        // Coplanar: two convex corners with a common apex overlap exactly when one holds an
        // edge direction of the other.
        in_cone(&e1, &e2, &n1, &f1)
            || in_cone(&e1, &e2, &n1, &f2)
            || in_cone(&f1, &f2, &n2, &e1)
            || in_cone(&f1, &f2, &n2, &e2)
    } else {
        // The common directions lie on the line where the planes meet.
        (in_cone(&e1, &e2, &n1, &dir) && in_cone(&f1, &f2, &n2, &dir))
            || (in_cone(&e1, &e2, &n1, &-dir) && in_cone(&f1, &f2, &n2, &-dir))
    }
}

/// True when the triangles `p` and `q`, which share exactly the edge between `p[1]`,
/// `p[2]` and `q[1]`, `q[2]` (in either order), overlap beyond that edge. Two triangles
/// in different planes meet only on the line where the planes cross, and each meets that
/// line only along the shared edge; so they overlap beyond it exactly when they are
/// coplanar and their free corners `p[0]`, `q[0]` lie on the same side of the edge (the
/// pair is folded flat onto itself). Both must be non-degenerate.
pub(crate) fn edge_pair_meets(p: &[V; 3], q: &[V; 3]) -> bool {
    let (u, w) = (p[1], p[2]);
    let e = w - u;
    let (x, y) = (p[0] - u, q[0] - u);
    let n = e.cross(&x);
    let scale = e.amax().max(x.amax()).max(y.amax());
    if n.dot(&y).abs() > PLANE_EPS * n.norm() * scale {
        return false;
    }
    n.dot(&e.cross(&y)) > 0.0
}

/// True when direction `d` (in, or projected on, the plane with normal `n = a x b`) lies
/// in the closed cone spanned by `a` and `b`.
fn in_cone(a: &V, b: &V, n: &V, d: &V) -> bool {
    a.cross(d).dot(n) >= 0.0 && d.cross(b).dot(n) >= 0.0
}

/// Signed distances (scaled by |n|) of `pts` to the plane through `o` with normal `n`,
/// with values within the tolerance set to zero.
fn distances(n: &V, o: &V, pts: &[V; 3], scale: f64) -> [f64; 3] {
    let eps = PLANE_EPS * n.norm() * scale;
    pts.map(|x| {
        let d = n.dot(&(x - o));
        if d.abs() <= eps {
            0.0
        } else {
            d
        }
    })
}

fn same_strict_side(d: &[f64; 3]) -> bool {
    (d[0] > 0.0 && d[1] > 0.0 && d[2] > 0.0) || (d[0] < 0.0 && d[1] < 0.0 && d[2] < 0.0)
}

/// The interval that triangle `t` (distances `d` to the other plane) covers on the line
/// with direction `dir`, as positions `dir . x`.
fn interval(dir: &V, t: &[V; 3], d: &[f64; 3]) -> (f64, f64) {
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    let mut take = |x: V| {
        let s = dir.dot(&x);
        lo = lo.min(s);
        hi = hi.max(s);
    };
    for i in 0..3 {
        let j = (i + 1) % 3;
        if d[i] == 0.0 {
            take(t[i]);
        }
        if (d[i] < 0.0 && d[j] > 0.0) || (d[i] > 0.0 && d[j] < 0.0) {
            take(t[i] + (t[j] - t[i]) * (d[i] / (d[i] - d[j])));
        }
    }
    (lo, hi)
}

/// Coplanar test in 2D: drop the coordinate where the normal is largest.
fn coplanar_meets(n: &V, p: &[V; 3], q: &[V; 3]) -> bool {
    let ax = n.iamax();
    let (i, j) = match ax {
        0 => (1, 2),
        1 => (0, 2),
        _ => (0, 1),
    };
    let to2 = |x: &V| [x[i], x[j]];
    let a = p.each_ref().map(to2);
    let b = q.each_ref().map(to2);
    for k in 0..3 {
        for l in 0..3 {
            if segments_meet(a[k], a[(k + 1) % 3], b[l], b[(l + 1) % 3]) {
                return true;
            }
        }
    }
    inside(&a, b[0]) || inside(&b, a[0])
}

fn orient(a: [f64; 2], b: [f64; 2], c: [f64; 2]) -> f64 {
    (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
}

fn on_segment(a: [f64; 2], b: [f64; 2], c: [f64; 2]) -> bool {
    c[0] >= a[0].min(b[0])
        && c[0] <= a[0].max(b[0])
        && c[1] >= a[1].min(b[1])
        && c[1] <= a[1].max(b[1])
}

/// Closed segments `ab` and `cd` have a common point.
fn segments_meet(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> bool {
    let o1 = orient(a, b, c);
    let o2 = orient(a, b, d);
    let o3 = orient(c, d, a);
    let o4 = orient(c, d, b);
    if ((o1 > 0.0 && o2 < 0.0) || (o1 < 0.0 && o2 > 0.0))
        && ((o3 > 0.0 && o4 < 0.0) || (o3 < 0.0 && o4 > 0.0))
    {
        return true;
    }
    (o1 == 0.0 && on_segment(a, b, c))
        || (o2 == 0.0 && on_segment(a, b, d))
        || (o3 == 0.0 && on_segment(c, d, a))
        || (o4 == 0.0 && on_segment(c, d, b))
}

/// Point `x` lies in the closed triangle `t`.
fn inside(t: &[[f64; 2]; 3], x: [f64; 2]) -> bool {
    let s = [
        orient(t[0], t[1], x),
        orient(t[1], t[2], x),
        orient(t[2], t[0], x),
    ];
    (s[0] >= 0.0 && s[1] >= 0.0 && s[2] >= 0.0) || (s[0] <= 0.0 && s[1] <= 0.0 && s[2] <= 0.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn v(x: f64, y: f64, z: f64) -> V {
        V::new(x, y, z)
    }

    #[test]
    fn crossing_and_separate_pairs() {
        // Worked cases checked by hand against the definition (closed point sets).
        let t = [v(0.0, 0.0, 0.0), v(2.0, 0.0, 0.0), v(0.0, 2.0, 0.0)];
        // Pierces t through its interior.
        let pierce = [v(0.5, 0.5, -1.0), v(0.5, 0.5, 1.0), v(3.0, 3.0, 0.5)];
        assert!(disjoint_pair_meets(&t, &pierce));
        assert!(disjoint_pair_meets(&pierce, &t));
        // Same, lifted above the plane: apart.
        let above = pierce.map(|x| x + v(0.0, 0.0, 1.5));
        assert!(!disjoint_pair_meets(&t, &above));
        // Crosses the plane beside the triangle (beyond the hypotenuse): apart.
        let beside = [v(1.5, 1.5, -1.0), v(1.5, 1.5, 1.0), v(3.0, 3.0, 0.0)];
        assert!(!disjoint_pair_meets(&t, &beside));
        // Touches t at one point of its interior with a vertex.
        let touch = [v(0.5, 0.5, 0.0), v(0.5, 0.5, 1.0), v(1.0, 0.0, 1.0)];
        assert!(disjoint_pair_meets(&t, &touch));
    }

    #[test]
    fn coplanar_pairs() {
        let t = [v(0.0, 0.0, 0.0), v(2.0, 0.0, 0.0), v(0.0, 2.0, 0.0)];
        let overlap = [v(1.0, 1.0, 0.0), v(1.0, -1.0, 0.0), v(3.0, 0.0, 0.0)];
        assert!(disjoint_pair_meets(&t, &overlap));
        let inner = [v(0.2, 0.2, 0.0), v(0.5, 0.2, 0.0), v(0.2, 0.5, 0.0)];
        assert!(disjoint_pair_meets(&t, &inner));
        assert!(disjoint_pair_meets(&inner, &t));
        let apart = [v(3.0, 3.0, 0.0), v(4.0, 3.0, 0.0), v(3.0, 4.0, 0.0)];
        assert!(!disjoint_pair_meets(&t, &apart));
    }

    #[test]
    fn nearly_coplanar_cells_of_a_straight_shank_are_apart() {
        // Regression (property test): triangles of two neighbouring grid cells on a
        // straight shank, flat to 1e-11 mm, meeting only the row line between the cells
        // at different points; the line where their planes meet is ill-conditioned.
        let a = [
            v(8.246825035104656, 0.13810586004787245, 32.96202369074034),
            v(8.24682503510485, 0.1381058600473365, 35.1169484087158),
            v(8.247624668562054, 0.07683961722083055, 32.962023690740345),
        ];
        let b = [
            v(8.247624668562334, 0.07683961722005397, 35.1169484087158),
            v(8.246825035108145, 0.1381058600382856, 36.1944107678961),
            v(8.24762466856711, 0.07683961720693981, 36.1944107678961),
        ];
        assert!(!disjoint_pair_meets(&a, &b));
        assert!(!disjoint_pair_meets(&b, &a));
        // A copy of `a` slid 1 mm along the strip overlaps it.
        let up = a.map(|x| x + v(0.0, 0.0, 1.0));
        assert!(disjoint_pair_meets(&a, &up));
    }

    #[test]
    fn corner_pairs() {
        let o = v(0.0, 0.0, 0.0);
        let t = [o, v(1.0, 0.0, 0.0), v(0.0, 1.0, 0.0)];
        // Fan neighbours two steps apart on a flat disc: only the apex in common.
        let flat = [o, v(-1.0, 0.0, 0.0), v(0.0, -1.0, 0.0)];
        assert!(!corner_pair_meets(&t, &flat));
        // Folded onto t: overlapping corner.
        let folded = [o, v(1.0, 1.0, 0.0), v(0.5, 2.0, 0.0)];
        assert!(corner_pair_meets(&t, &folded));
        // Standing up through the corner of t.
        let through = [o, v(1.0, 1.0, 1.0), v(1.0, 1.0, -1.0)];
        assert!(corner_pair_meets(&t, &through));
        // Standing up outside the corner of t.
        let outside = [o, v(-1.0, -1.0, 1.0), v(-1.0, -1.0, -1.0)];
        assert!(!corner_pair_meets(&t, &outside));
        // A box corner: three faces meeting at the vertex, pairwise only sharing edges or
        // the vertex; a cone on a different face does not meet t beyond the vertex.
        let wall = [o, v(0.0, 0.0, 1.0), v(1.0, 0.0, 1.0)];
        assert!(!corner_pair_meets(
            &[o, v(0.0, 1.0, 0.0), v(1.0, 1.0, 0.0)],
            &wall
        ));
    }

    #[test]
    fn edge_pairs() {
        // Shared edge from (0,0,0) to (1,0,0); free corner of p at (0.5, 1, 0).
        let (u, w) = (v(0.0, 0.0, 0.0), v(1.0, 0.0, 0.0));
        let p = [v(0.5, 1.0, 0.0), u, w];
        // Flat continuation across the edge, and a bent one: only the edge in common.
        assert!(!edge_pair_meets(&p, &[v(0.5, -1.0, 0.0), w, u]));
        assert!(!edge_pair_meets(&p, &[v(0.5, 0.2, 1.0), w, u]));
        // Folded flat back onto p: they overlap.
        assert!(edge_pair_meets(&p, &[v(0.2, 0.5, 0.0), w, u]));
    }
}
