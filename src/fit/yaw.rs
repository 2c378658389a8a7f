//! Exact in-plane rotation (yaw) of a footprint for a rectangular bed, by rotating
//! calipers.
//!
//! For a convex polygon and a direction `u(t) = (cos t, sin t)`, the width along `u` is
//! `max p.u - min p.u`. The vertices giving the maximum and the minimum change only when
//! `u` or `-u` crosses an edge's outward normal (G. Toussaint, "Solving geometric problems
//! with the rotating calipers", Proc. IEEE MELECON, 1983). Between those events the width
//! is `e . u(t)` for a fixed vector `e`: a sinusoid, concave where positive. The same holds
//! for the width along `v(t) = (-sin t, cos t)`. The largest ratio
//! `max(w_u / a, w_v / b)` is thus minimised, on each interval, at an end or where the two
//! ratios cross, which is solved in closed form. Every event and every crossing is
//! visited, so the yaw returned is exact (to rounding), not sampled.

use nalgebra::{Point2, Vector2};
use std::f64::consts::{FRAC_PI_2, PI};

/// Result of [`best_yaw`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Yaw {
    /// Rotation angle of the bed's x axis in the footprint plane, radians in `[0, pi)`.
    pub angle: f64,
    /// `max(w_x / a, w_y / b)` at that angle (at most 1 when the footprint fits).
    pub ratio: f64,
    /// Width along the bed's x axis, mm.
    pub wx: f64,
    /// Width along the bed's y axis, mm.
    pub wy: f64,
}

fn dot(p: Point2<f64>, u: Vector2<f64>) -> f64 {
    p.x * u.x + p.y * u.y
}

/// Widths of a point set along `u(t)` and `v(t)`, by a full scan (for checks and ends).
pub fn widths(points: &[Point2<f64>], t: f64) -> (f64, f64) {
    let u = Vector2::new(t.cos(), t.sin());
    let v = Vector2::new(-t.sin(), t.cos());
    let (mut u0, mut u1, mut v0, mut v1) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
    for &p in points {
        let (a, b) = (dot(p, u), dot(p, v));
        u0 = u0.min(a);
        u1 = u1.max(a);
        v0 = v0.min(b);
        v1 = v1.max(b);
    }
    if points.is_empty() {
        return (0.0, 0.0);
    }
    (u1 - u0, v1 - v0)
}

/// The yaw minimising `max(w_x / a, w_y / b)` for a convex polygon given
/// counter-clockwise (as from [`super::hull::convex_hull`]); `a`, `b` > 0 are the
/// available lengths along the bed's x and y, mm.
pub fn best_yaw(hull: &[Point2<f64>], a: f64, b: f64) -> Yaw {
    if hull.len() < 3 {
        return degenerate_yaw(hull, a, b);
    }
    let events = event_angles(hull);
    let mut calipers = Calipers::new(hull, 0.5 * (events[0] + events[1]));
    let mut best = scan(hull, a, b, 0.0);
    for w in events.windows(2) {
        let (lo, hi) = (w[0], w[1]);
        if hi - lo < 1e-15 {
            continue;
        }
        let piece = calipers.piece(0.5 * (lo + hi), a, b);
        for t in [Some(lo), Some(hi), piece.crossing(lo, hi)]
            .into_iter()
            .flatten()
        {
            let y = piece.at(t);
            if y.ratio < best.ratio {
                best = y;
            }
        }
    }
    best
}

/// The yaw at angle `t` by a full scan of the points.
fn scan(points: &[Point2<f64>], a: f64, b: f64, t: f64) -> Yaw {
    let (wx, wy) = widths(points, t);
    Yaw {
        angle: t,
        ratio: (wx / a).max(wy / b),
        wx,
        wy,
    }
}

/// A point or a segment: the segment laid along the longer usable side.
fn degenerate_yaw(hull: &[Point2<f64>], a: f64, b: f64) -> Yaw {
    if hull.len() < 2 {
        return scan(hull, a, b, 0.0);
    }
    let d = hull[1] - hull[0];
    let phi = d.y.atan2(d.x);
    let cands = [phi, phi + FRAC_PI_2];
    cands
        .iter()
        .map(|&t| scan(hull, a, b, t.rem_euclid(PI)))
        .min_by(|p, q| p.ratio.total_cmp(&q.ratio))
        .unwrap_or_else(|| scan(hull, a, b, 0.0))
}

/// Event angles in `[0, pi]`, sorted: every edge's outward normal, shifted by multiples
/// of pi/2, and both ends.
fn event_angles(hull: &[Point2<f64>]) -> Vec<f64> {
    let n = hull.len();
    let mut events: Vec<f64> = Vec::with_capacity(2 * n + 2);
    for i in 0..n {
        let (p, q) = (hull[i], hull[(i + 1) % n]);
        let normal = (-(q.x - p.x)).atan2(q.y - p.y); // outward normal of a CCW edge
        let base = normal.rem_euclid(FRAC_PI_2);
        events.push(base);
        events.push(base + FRAC_PI_2);
    }
    events.push(0.0);
    events.push(PI);
    events.sort_by(f64::total_cmp);
    events.dedup_by(|x, y| (*x - *y).abs() < 1e-15);
    events
}

/// The directions `+u, -u, +v, -v` at angle `t`.
fn directions(t: f64) -> [Vector2<f64>; 4] {
    let (c, s) = (t.cos(), t.sin());
    [
        Vector2::new(c, s),
        Vector2::new(-c, -s),
        Vector2::new(-s, c),
        Vector2::new(s, -c),
    ]
}

/// Support vertices for `+u, -u, +v, -v`, advanced monotonically as the angle grows.
struct Calipers<'a> {
    hull: &'a [Point2<f64>],
    idx: [usize; 4],
}

impl<'a> Calipers<'a> {
    /// The support vertices at angle `t`, by a full scan.
    fn new(hull: &'a [Point2<f64>], t: f64) -> Self {
        let argmax = |dir: Vector2<f64>| -> usize {
            (0..hull.len())
                .max_by(|&i, &j| dot(hull[i], dir).total_cmp(&dot(hull[j], dir)))
                .unwrap_or(0)
        };
        let d = directions(t);
        Calipers {
            hull,
            idx: [argmax(d[0]), argmax(d[1]), argmax(d[2]), argmax(d[3])],
        }
    }

    /// Advances the support vertices to angle `t` (inside the next interval between
    /// events) and returns the widths there as a [`Piece`].
    fn piece(&mut self, t: f64, a: f64, b: f64) -> Piece {
        let (hull, n) = (self.hull, self.hull.len());
        let d = directions(t);
        for (idx, dir) in self.idx.iter_mut().zip(d) {
            for _ in 0..n {
                let next = (*idx + 1) % n;
                if dot(hull[next], dir) > dot(hull[*idx], dir) {
                    *idx = next;
                } else {
                    break;
                }
            }
        }
        Piece {
            e: hull[self.idx[0]] - hull[self.idx[1]],
            f: hull[self.idx[2]] - hull[self.idx[3]],
            a,
            b,
        }
    }
}

/// The widths between two events: `w_x = e . u(t)`, `w_y = f . v(t)` for fixed `e`, `f`.
struct Piece {
    e: Vector2<f64>,
    f: Vector2<f64>,
    a: f64,
    b: f64,
}

impl Piece {
    fn at(&self, t: f64) -> Yaw {
        let (e, f) = (self.e, self.f);
        let (c, s) = (t.cos(), t.sin());
        let wx = e.x * c + e.y * s;
        let wy = -f.x * s + f.y * c;
        Yaw {
            angle: t,
            ratio: (wx / self.a).max(wy / self.b),
            wx,
            wy,
        }
    }

    /// Where `w_x / a = w_y / b` inside `(lo, hi)`: `alpha cos t + beta sin t = 0`.
    fn crossing(&self, lo: f64, hi: f64) -> Option<f64> {
        let (e, f) = (self.e, self.f);
        let alpha = e.x / self.a - f.y / self.b;
        let beta = e.y / self.a + f.x / self.b;
        if alpha == 0.0 && beta == 0.0 {
            return None;
        }
        let t = (-alpha).atan2(beta).rem_euclid(PI);
        (t > lo && t < hi).then_some(t)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pts(xy: &[[f64; 2]]) -> Vec<Point2<f64>> {
        xy.iter().map(|&[x, y]| Point2::new(x, y)).collect()
    }

    #[test]
    fn rectangle_fits_diagonally() {
        // Elementary geometry: a 100 x 4 rectangle in a 80 x 80 square. Tilted by t, its
        // box is (100 cos t + 4 sin t) wide and (100 sin t + 4 cos t) high; at t = 45 deg
        // both are 104 / sqrt 2 = 73.54 < 80, so it fits diagonally while its length
        // exceeds the side.
        let r = pts(&[[0.0, 0.0], [100.0, 0.0], [100.0, 4.0], [0.0, 4.0]]);
        let y = best_yaw(&r, 80.0, 80.0);
        let expect = 104.0 / 2f64.sqrt() / 80.0;
        assert!((y.ratio - expect).abs() < 1e-9, "{y:?}");
        assert!((y.angle - std::f64::consts::FRAC_PI_4).abs() < 1e-9);
        // Aligned case: fits exactly along x in a 100 x 4 box (ratio 1).
        let y = best_yaw(&r, 100.0, 4.0);
        assert!((y.ratio - 1.0).abs() < 1e-12, "{y:?}");
        // And the swap: 4 x 100 box needs a quarter turn.
        let y = best_yaw(&r, 4.0, 100.0);
        assert!((y.ratio - 1.0).abs() < 1e-12, "{y:?}");
    }

    #[test]
    fn exact_against_fine_sampling() {
        // Independent check: a dense scan over yaw never beats the calipers result.
        let poly = super::super::hull::convex_hull(&pts(&[
            [0.0, 0.0],
            [120.0, 10.0],
            [118.0, 25.0],
            [30.0, 40.0],
            [-5.0, 22.0],
        ]));
        let y = best_yaw(&poly, 90.0, 70.0);
        let scan = (0..200_000)
            .map(|i| {
                let t = PI * i as f64 / 200_000.0;
                let (wx, wy) = widths(&poly, t);
                (wx / 90.0).max(wy / 70.0)
            })
            .fold(f64::MAX, f64::min);
        // The scan's step is pi / 200000 rad; the ratio moves at most diameter / 70 per
        // radian (diameter < 130 mm), so the scan may exceed the optimum by < 3e-5.
        assert!(
            y.ratio <= scan + 1e-12 && scan - y.ratio < 3e-5,
            "{} {}",
            y.ratio,
            scan
        );
        let (wx, wy) = widths(&poly, y.angle);
        assert!(((wx / 90.0).max(wy / 70.0) - y.ratio).abs() < 1e-9);
    }
}
