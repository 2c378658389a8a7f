//! Normalising raw outlines and resampling sections to a common point structure.
//!
//! Both work on a [`Spline2`] through the points (chord-length parameter):
//!
//! * the leading edge is the point of the spline farthest from the trailing-edge midpoint
//!   (not simply the smallest input x), found by a discrete search refined by golden-section
//!   search on the spline;
//! * normalising moves the leading edge to (0, 0) and the trailing-edge midpoint to (1, 0)
//!   (a similarity transform: translation, rotation, uniform scale);
//! * resampling places `n` points on each side at the cosine-spaced chord stations
//!   `x_i = (1 - cos(pi i / (n - 1))) / 2`, which clusters points at both edges, and the
//!   *same* stations on both sides, so that sections correspond point by point.

use super::section::Section;
use super::spline::Spline2;
use nalgebra::{Point2, Vector2};

/// Why an outline could not be normalised or resampled.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ResampleError {
    /// Fewer points than a spline and a leading edge need.
    #[error("only {0} distinct points; an outline needs at least 5")]
    TooFewPoints(usize),
    /// The trailing edge and the leading edge coincide.
    #[error("the outline has no extent (leading and trailing edge coincide)")]
    Degenerate,
    /// A side of the outline turns back in x, so a chord station meets it twice.
    #[error("the {side} surface is not single-valued in x near x = {x:.4}; the outline folds back there")]
    NotSingleValued {
        /// `upper` or `lower`.
        side: &'static str,
        /// Chord station where the fold was found.
        x: f64,
    },
}

/// Cosine-spaced chord stations from 0 (leading edge) to 1 (trailing edge), `n >= 2`.
pub fn cosine_stations(n: usize) -> Vec<f64> {
    let n = n.max(2);
    (0..n)
        .map(|i| 0.5 * (1.0 - (std::f64::consts::PI * i as f64 / (n - 1) as f64).cos()))
        .collect()
}

/// Removes consecutive duplicates (closer than `1e-12` relative to the extent).
pub(crate) fn dedup(points: &[Point2<f64>]) -> Vec<Point2<f64>> {
    let mut out: Vec<Point2<f64>> = Vec::with_capacity(points.len());
    for &p in points {
        if out.last().is_none_or(|q| (p - q).norm() > 1e-12) {
            out.push(p);
        }
    }
    out
}

/// Parameter of the spline point farthest from `target`.
fn farthest_parameter(sp: &Spline2, target: Point2<f64>) -> f64 {
    let knots = sp.knots();
    let dist = |t: f64| (sp.eval(t) - target).norm_squared();
    let (imax, _) = knots
        .iter()
        .enumerate()
        .map(|(i, &t)| (i, dist(t)))
        .fold((0, f64::MIN), |a, b| if b.1 > a.1 { b } else { a });
    let mut a = knots[imax.saturating_sub(1)];
    let mut b = knots[(imax + 1).min(knots.len() - 1)];
    // The maximum is where g(t) = (p(t) - target) . p'(t) changes sign from + to -.
    let g = |t: f64| {
        let (p, d) = sp.eval_with_derivative(t);
        (p - target).dot(&d)
    };
    if !(g(a) > 0.0 && g(b) < 0.0) {
        return knots[imax];
    }
    for _ in 0..200 {
        let m = 0.5 * (a + b);
        if m <= a || m >= b {
            break;
        }
        if g(m) > 0.0 {
            a = m;
        } else {
            b = m;
        }
    }
    0.5 * (a + b)
}

/// Normalises a raw outline given in loop order (either direction, starting and ending
/// at the trailing edge) to the spanwright frame: leading edge (0, 0), trailing-edge
/// midpoint (1, 0), upper surface first. Returns the section with the leading edge
/// inserted as an explicit point.
pub fn normalize(name: &str, raw: &[Point2<f64>]) -> Result<Section, ResampleError> {
    let pts = dedup(raw);
    if pts.len() < 5 {
        return Err(ResampleError::TooFewPoints(pts.len()));
    }
    let sp = Spline2::fit(&pts).ok_or(ResampleError::TooFewPoints(pts.len()))?;
    let te = nalgebra::center(&pts[0], &pts[pts.len() - 1]);
    let t_le = farthest_parameter(&sp, te);
    let le = sp.eval(t_le);
    let axis: Vector2<f64> = te - le;
    let chord = axis.norm();
    if !(chord > 0.0) || !chord.is_finite() {
        return Err(ResampleError::Degenerate);
    }
    let (c, s) = (axis.x / chord, axis.y / chord);
    let map = |p: Point2<f64>| {
        let d = p - le;
        Point2::new((c * d.x + s * d.y) / chord, (-s * d.x + c * d.y) / chord)
    };
    // Split at the leading edge parameter; keep the spline's leading-edge point exactly.
    let knots = sp.knots();
    let mut first: Vec<Point2<f64>> = knots
        .iter()
        .zip(&pts)
        .filter(|(&k, _)| k < t_le)
        .map(|(_, &p)| map(p))
        .collect();
    let mut second: Vec<Point2<f64>> = knots
        .iter()
        .zip(&pts)
        .filter(|(&k, _)| k > t_le)
        .map(|(_, &p)| map(p))
        .collect();
    // Drop input points that sit on the leading edge itself.
    first.retain(|p| p.coords.norm() > 1e-12);
    second.retain(|p| p.coords.norm() > 1e-12);
    if first.is_empty() || second.is_empty() {
        return Err(ResampleError::Degenerate);
    }
    let mut points = first;
    let le_index = points.len();
    points.push(Point2::origin());
    points.extend(second);
    let mut section =
        Section::from_ordered(name, points, le_index).ok_or(ResampleError::Degenerate)?;
    if section.signed_area() < 0.0 {
        // Given lower surface first: reverse the loop.
        let n = section.points().len();
        let rev: Vec<_> = section.points().iter().rev().copied().collect();
        section =
            Section::from_ordered(name, rev, n - 1 - le_index).ok_or(ResampleError::Degenerate)?;
    }
    Ok(section)
}

/// Finds the parameter in `[a, b]` where the spline's x equals `x`, assuming x is
/// monotone there (bisection safeguarded Newton).
fn solve_x(sp: &Spline2, x: f64, mut a: f64, mut b: f64) -> f64 {
    let fa = sp.eval(a).x - x;
    let increasing = sp.eval(b).x - x > fa;
    let mut t = 0.5 * (a + b);
    for _ in 0..100 {
        let (p, d) = sp.eval_with_derivative(t);
        let f = p.x - x;
        if f.abs() < 1e-14 {
            break;
        }
        if (f < 0.0) == increasing {
            a = t;
        } else {
            b = t;
        }
        let newton = t - f / d.x;
        t = if d.x.abs() > 0.0 && newton > a && newton < b {
            newton
        } else {
            0.5 * (a + b)
        };
        if b - a < 1e-15 {
            break;
        }
    }
    t
}

impl Section {
    /// Resamples to `n` points per side at the cosine-spaced stations of
    /// [`cosine_stations`], both sides at the same x. The section must already be
    /// normalised (leading edge at the origin, chord along x). Result: `2n - 1` points.
    pub fn resample(&self, n: usize) -> Result<Section, ResampleError> {
        let pts = dedup(self.points());
        let sp = Spline2::fit(&pts).ok_or(ResampleError::TooFewPoints(pts.len()))?;
        // The leading-edge point is a data point; find its parameter.
        let le_point = self.points()[self.leading_edge_index()];
        let le_k = pts
            .iter()
            .position(|p| (p - le_point).norm() < 1e-12)
            .ok_or(ResampleError::Degenerate)?;
        let t_le = sp.knots()[le_k];
        let xs = cosine_stations(n);
        let side = |name: &'static str,
                    a: f64,
                    b: f64,
                    te: Point2<f64>|
         -> Result<Vec<Point2<f64>>, ResampleError> {
            // Check monotonicity of x along the side on the data points.
            let ks: Vec<f64> = sp
                .knots()
                .iter()
                .copied()
                .filter(|&k| k >= a && k <= b)
                .collect();
            let xs_data: Vec<f64> = ks.iter().map(|&k| sp.eval(k).x).collect();
            let dir = (xs_data[xs_data.len() - 1] - xs_data[0]).signum();
            for w in xs_data.windows(2) {
                if (w[1] - w[0]) * dir < -1e-9 {
                    return Err(ResampleError::NotSingleValued {
                        side: name,
                        x: w[0],
                    });
                }
            }
            let mut out = Vec::with_capacity(xs.len());
            for (i, &x) in xs.iter().enumerate() {
                if i == 0 {
                    out.push(Point2::origin());
                } else if i + 1 == xs.len() {
                    out.push(te);
                } else {
                    // Bracket between data knots for robustness.
                    let j = xs_data.partition_point(|&v| (v - x) * dir < 0.0);
                    let j = j.clamp(1, ks.len() - 1);
                    let t = solve_x(&sp, x, ks[j - 1], ks[j]);
                    out.push(sp.eval(t));
                }
            }
            Ok(out)
        };
        let n_pts = pts.len();
        let upper = side("upper", 0.0, t_le, pts[0]);
        let lower = side("lower", t_le, sp.length(), pts[n_pts - 1]);
        let mut upper = upper?;
        let lower = lower?;
        // Upper side was computed from TE toward LE in parameter, but stations are from
        // LE; the bracketing handles direction, the list is LE -> TE already.
        upper[0] = Point2::origin();
        Section::from_sides(self.name(), &upper, &lower).ok_or(ResampleError::Degenerate)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ellipse(n: usize, t: f64, angle: f64, scale: f64, shift: Vector2<f64>) -> Vec<Point2<f64>> {
        // Loop from the trailing edge (x = 1) over the upper side and back.
        (0..=n)
            .map(|i| {
                let a = std::f64::consts::TAU * i as f64 / n as f64;
                let p = Vector2::new(0.5 + 0.5 * a.cos(), 0.5 * t * a.sin());
                let r = nalgebra::Rotation2::new(angle) * p * scale + shift;
                Point2::from(r)
            })
            .collect() // the last point repeats the first: a sharp trailing edge
    }

    #[test]
    fn cosine_stations_end_at_edges() {
        let x = cosine_stations(5);
        assert_eq!(x[0], 0.0);
        assert!((x[4] - 1.0).abs() < 1e-15);
        assert!((x[2] - 0.5).abs() < 1e-15);
    }

    #[test]
    fn normalize_undoes_a_similarity_transform() {
        let raw = ellipse(200, 0.12, 0.3, 7.0, Vector2::new(3.0, -2.0));
        let s = normalize("e", &raw).unwrap();
        // Leading edge at the origin, trailing edge at (1, 0) (exact ellipse: geometry).
        let p = s.points();
        assert!(p[s.leading_edge_index()].coords.norm() < 1e-12);
        assert!((p[0] - Point2::new(1.0, 0.0)).norm() < 1e-6);
        // Every point lies on the normalised ellipse within the spline error.
        for q in p {
            let e = ((q.x - 0.5) / 0.5).powi(2) + (q.y / 0.06).powi(2);
            assert!((e - 1.0).abs() < 1e-5, "{q:?} {e}");
        }
        assert!(s.signed_area() > 0.0);
    }

    #[test]
    fn resample_hits_stations_on_both_sides() {
        let raw = ellipse(300, 0.1, 0.0, 1.0, Vector2::zeros());
        let s = normalize("e", &raw).unwrap().resample(41).unwrap();
        assert_eq!(s.points().len(), 81);
        assert_eq!(s.points_per_side(), Some(41));
        let xs = cosine_stations(41);
        let up = s.upper_le_to_te();
        let lo = s.lower_le_to_te();
        for i in 1..40 {
            assert!((up[i].x - xs[i]).abs() < 1e-12);
            assert!((lo[i].x - xs[i]).abs() < 1e-12);
            assert!(up[i].y > 0.0 && lo[i].y < 0.0);
            // Ellipse ordinate: y = t/2 * sqrt(1 - (2x - 1)^2) (analytic geometry).
            let exact = 0.05 * (1.0 - (2.0 * xs[i] - 1.0).powi(2)).sqrt();
            assert!((up[i].y - exact).abs() < 2e-5, "{i} {} {exact}", up[i].y);
        }
    }
}
