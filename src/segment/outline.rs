//! The skin's cross-sections as the mesh has them: the outline of every grid row of the
//! tessellation (each a plane `z = const`, see [`crate::tessellate::row_radius`]), and
//! the outline at any radius. Walls to the skin are measured on these outlines.
//!
//! Between two rows the mesh follows each grid column on a straight line that stays
//! within half the tolerance of the surface (the tessellation's refinement rule), so a
//! wall measured on the rows with the tolerance added holds in every cut between them
//! too.

use crate::loft::Skin;
use crate::planar::point_in_polygon;
use crate::tessellate::{row_at_radius, row_radius};
use nalgebra::{Point2, Point3};

/// One cross-section: the closed outline (first point not repeated) in a plane `z`.
#[derive(Debug, Clone, PartialEq)]
pub struct Outline {
    /// Radius of the plane, mm.
    pub z: f64,
    /// The outline's points in `(x, y)`, mm, in `u` order.
    pub points: Vec<Point2<f64>>,
}

impl Outline {
    /// The skin's outline at parameter `v`, sampled at the grid columns `us` (the mesh's
    /// own vertices of that row).
    pub fn of_row(skin: &Skin, us: &[f64], v: f64) -> Outline {
        let mut pts = skin.iso_v(v, us);
        if pts.len() > 1 && (pts[0] - pts[pts.len() - 1]).norm() <= 1e-9 {
            pts.pop();
        }
        Outline {
            z: row_radius(skin, v),
            points: pts.iter().map(|p| Point2::new(p.x, p.y)).collect(),
        }
    }

    /// The outline at radius `z`, or `None` outside the skin.
    pub fn at(skin: &Skin, us: &[f64], z: f64) -> Option<Outline> {
        let v = row_at_radius(skin, z)?;
        let mut o = Outline::of_row(skin, us, v);
        o.z = z;
        Some(o)
    }

    /// Signed distance from `p` to the outline: positive inside, negative outside, mm.
    pub fn clearance(&self, p: &Point2<f64>) -> f64 {
        let d = distance_to_loop(&self.points, p);
        if point_in_polygon(&self.points, p) {
            d
        } else {
            -d
        }
    }

    /// The outline's points placed at its radius, in space.
    pub fn points3(&self) -> impl Iterator<Item = Point3<f64>> + '_ {
        self.points.iter().map(|p| Point3::new(p.x, p.y, self.z))
    }
}

/// Distance from `p` to the closed polyline `pts`, mm.
pub fn distance_to_loop(pts: &[Point2<f64>], p: &Point2<f64>) -> f64 {
    let n = pts.len();
    let mut best = f64::INFINITY;
    for i in 0..n {
        let (a, b) = (pts[i], pts[(i + 1) % n]);
        let ab = b - a;
        let l2 = ab.norm_squared();
        let t = if l2 > 0.0 {
            ((p - a).dot(&ab) / l2).clamp(0.0, 1.0)
        } else {
            0.0
        };
        best = best.min((p - (a + ab * t)).norm_squared());
    }
    best.sqrt()
}

/// Every row outline of a tessellation grid, root to tip.
#[derive(Debug, Clone)]
pub struct Outlines {
    /// The outlines, by increasing radius.
    pub rows: Vec<Outline>,
}

impl Outlines {
    /// The outlines of the grid rows `vs` at the columns `us`.
    pub fn of_grid(skin: &Skin, us: &[f64], vs: &[f64]) -> Outlines {
        let mut rows: Vec<Outline> = vs.iter().map(|&v| Outline::of_row(skin, us, v)).collect();
        rows.sort_by(|a, b| a.z.total_cmp(&b.z));
        Outlines { rows }
    }

    /// The rows with `a <= z <= b`.
    pub fn between(&self, a: f64, b: f64) -> &[Outline] {
        let lo = self.rows.partition_point(|o| o.z < a);
        let hi = self.rows.partition_point(|o| o.z <= b);
        &self.rows[lo..hi.max(lo)]
    }

    /// Radius of the first and last row, mm.
    pub fn span(&self) -> (f64, f64) {
        (
            self.rows.first().map_or(0.0, |o| o.z),
            self.rows.last().map_or(0.0, |o| o.z),
        )
    }
}

/// The smallest clearance of `p` over `outlines`, stopping early once it is at most
/// `stop` (the value returned is then at most `stop`, not necessarily the smallest).
pub fn smallest_clearance<'a>(
    outlines: impl IntoIterator<Item = &'a Outline>,
    p: &Point2<f64>,
    stop: f64,
) -> f64 {
    let mut m = f64::INFINITY;
    for o in outlines {
        m = m.min(o.clearance(p));
        if m <= stop {
            break;
        }
    }
    m
}

/// The point of the largest smallest clearance over `outlines` (each a nearly convex
/// outline, so the function is unimodal in practice), searched from `start` by a compass
/// search whose step halves from `step` down to `precision` (Kolda, Lewis and Torczon,
/// "Optimization by direct search", SIAM Review 45, 2003, section 3). Returns the point
/// and its clearance.
pub fn deepest_point(
    outlines: &[&Outline],
    start: Point2<f64>,
    step: f64,
    precision: f64,
) -> (Point2<f64>, f64) {
    let f = |p: &Point2<f64>, stop: f64| smallest_clearance(outlines.iter().copied(), p, stop);
    let mut p = start;
    let mut fp = f(&p, f64::NEG_INFINITY);
    let mut h = step;
    const DIRS: [(f64, f64); 8] = [
        (1.0, 0.0),
        (0.0, 1.0),
        (-1.0, 0.0),
        (0.0, -1.0),
        (
            std::f64::consts::FRAC_1_SQRT_2,
            std::f64::consts::FRAC_1_SQRT_2,
        ),
        (
            -std::f64::consts::FRAC_1_SQRT_2,
            std::f64::consts::FRAC_1_SQRT_2,
        ),
        (
            -std::f64::consts::FRAC_1_SQRT_2,
            -std::f64::consts::FRAC_1_SQRT_2,
        ),
        (
            std::f64::consts::FRAC_1_SQRT_2,
            -std::f64::consts::FRAC_1_SQRT_2,
        ),
    ];
    let mut moves = 0;
    while h >= precision && moves < 10_000 {
        let mut improved = false;
        for (dx, dy) in DIRS {
            let q = Point2::new(p.x + h * dx, p.y + h * dy);
            let fq = f(&q, fp);
            if fq > fp {
                p = q;
                fp = fq;
                improved = true;
                moves += 1;
                break;
            }
        }
        if !improved {
            h *= 0.5;
        }
    }
    (p, fp)
}

/// A start for [`deepest_point`]: the best point of a grid over the bounding box of
/// `outline` (`n` by `n` cells), judged on `outline` alone.
pub fn grid_start(outline: &Outline, n: usize) -> Point2<f64> {
    let (mut lo, mut hi) = (outline.points[0], outline.points[0]);
    for p in &outline.points {
        lo = lo.inf(p);
        hi = hi.sup(p);
    }
    let mut best = (nalgebra::center(&lo, &hi), f64::NEG_INFINITY);
    for i in 0..n {
        for j in 0..n {
            let p = Point2::new(
                lo.x + (hi.x - lo.x) * (i as f64 + 0.5) / n as f64,
                lo.y + (hi.y - lo.y) * (j as f64 + 0.5) / n as f64,
            );
            let c = outline.clearance(&p);
            if c > best.1 {
                best = (p, c);
            }
        }
    }
    best.0
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square(z: f64, half: f64) -> Outline {
        Outline {
            z,
            points: vec![
                Point2::new(-half, -half),
                Point2::new(half, -half),
                Point2::new(half, half),
                Point2::new(-half, half),
            ],
        }
    }

    #[test]
    fn deepest_point_of_nested_squares_is_their_centre() {
        // Elementary geometry: the point farthest inside a square is its centre, at half
        // the side from every edge; of two squares, the smaller one decides.
        let a = square(0.0, 5.0);
        let b = square(1.0, 3.0);
        let (p, c) = deepest_point(&[&a, &b], Point2::new(1.0, -2.0), 1.0, 1e-6);
        assert!(p.coords.norm() < 1e-5, "{p}");
        assert!((c - 3.0).abs() < 1e-5, "{c}");
        assert!((a.clearance(&Point2::new(7.0, 0.0)) + 2.0).abs() < 1e-12);
    }
}
