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
use nalgebra::Point2;

/// Why an outline could not be normalised or resampled.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ResampleError {
    /// Fewer points than a spline and a leading edge need.
    #[error("only {0} distinct points; an outline needs at least 5")]
    TooFewPoints(usize),
    /// The trailing edge and the leading edge coincide.
    #[error("the outline has no extent (leading and trailing edge coincide)")]
    Degenerate,
    /// The outline encloses (almost) no area: all points on one line, or a side given
    /// twice.
    #[error("the outline encloses almost no area ({0:.2e} chord²)")]
    NoArea(f64),
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

/// The points without consecutive duplicates (closer than `1e-12`), borrowed when there
/// are none.
pub(crate) fn dedup_cow(points: &[Point2<f64>]) -> std::borrow::Cow<'_, [Point2<f64>]> {
    if points
        .windows(2)
        .all(|w| (w[1] - w[0]).norm_squared() > 1e-24)
    {
        std::borrow::Cow::Borrowed(points)
    } else {
        std::borrow::Cow::Owned(dedup(points))
    }
}

/// Removes consecutive duplicates (closer than `1e-12`).
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

/// Distance (fraction of chord) within which a data point is taken as the leading edge
/// instead of the farthest spline point, so that an outline that already holds its
/// leading-edge point (a written and re-read section) keeps it exactly: the spline through
/// a resampled section puts its farthest point up to about 1e-5 chord away from the
/// written leading edge. Used by [`normalize`]; equal to the resampling shape tolerance.
pub const LE_SNAP: f64 = 1e-4;

/// Folds in x smaller than this (fraction of chord) are ignored when checking that each
/// surface is single-valued in x.
pub const FOLD_TOLERANCE: f64 = 1e-6;

/// The similarity transform found by normalising: raw coordinates to the section frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Frame {
    /// Leading edge in raw coordinates.
    pub leading_edge: Point2<f64>,
    /// Trailing-edge midpoint in raw coordinates.
    pub trailing_edge: Point2<f64>,
    /// Chord length in raw units.
    pub chord: f64,
}

impl Frame {
    /// Maps a raw point to the unit-chord section frame.
    pub fn map(&self, p: Point2<f64>) -> Point2<f64> {
        let axis = (self.trailing_edge - self.leading_edge) / self.chord;
        let (c, s) = (axis.x, axis.y);
        let d = p - self.leading_edge;
        Point2::new(
            (c * d.x + s * d.y) / self.chord,
            (-s * d.x + c * d.y) / self.chord,
        )
    }

    /// Angle of the raw chord line from the raw x axis, radians (counter-clockwise).
    pub fn angle(&self) -> f64 {
        let a = self.trailing_edge - self.leading_edge;
        a.y.atan2(a.x)
    }
}

/// Normalises a raw outline given in loop order (either direction, starting and ending
/// at the trailing edge) to the spanwright frame: leading edge (0, 0), trailing-edge
/// midpoint (1, 0), upper surface first. Returns the section with the leading edge
/// inserted as an explicit point.
pub fn normalize(name: &str, raw: &[Point2<f64>]) -> Result<Section, ResampleError> {
    normalize_with_frame(name, raw).map(|(s, _)| s)
}

/// [`normalize`], also returning the transform that was applied (to map raw data such as
/// the file lines of offending points).
pub fn normalize_with_frame(
    name: &str,
    raw: &[Point2<f64>],
) -> Result<(Section, Frame), ResampleError> {
    let pts = dedup(raw);
    if pts.len() < 5 {
        return Err(ResampleError::TooFewPoints(pts.len()));
    }
    let sp = Spline2::fit(&pts).ok_or(ResampleError::TooFewPoints(pts.len()))?;
    let te = nalgebra::center(&pts[0], &pts[pts.len() - 1]);
    let mut t_le = farthest_parameter(&sp, te);
    let mut le = sp.eval(t_le);
    let mut chord = (te - le).norm();
    if chord.is_nan() || chord <= 0.0 || !chord.is_finite() {
        return Err(ResampleError::Degenerate);
    }
    // Snap to a data point lying on the leading edge already.
    let knots = sp.knots();
    let k = knots.partition_point(|&v| v < t_le).min(knots.len() - 1);
    for j in [k.saturating_sub(1), k] {
        if (pts[j] - le).norm() < LE_SNAP * chord {
            t_le = knots[j];
            le = pts[j];
            chord = (te - le).norm();
            break;
        }
    }
    let frame = Frame {
        leading_edge: le,
        trailing_edge: te,
        chord,
    };
    // Split at the leading-edge parameter; keep the spline's leading-edge point exactly.
    let mut first: Vec<Point2<f64>> = knots
        .iter()
        .zip(&pts)
        .filter(|(&k, _)| k < t_le)
        .map(|(_, &p)| frame.map(p))
        .collect();
    let mut second: Vec<Point2<f64>> = knots
        .iter()
        .zip(&pts)
        .filter(|(&k, _)| k > t_le)
        .map(|(_, &p)| frame.map(p))
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
    Ok((section, frame))
}

/// Samples one side at the stations `xs` (LE to TE). `at(k)` is the knot index of the
/// side's `k`-th data point counted from the leading edge, `len` their number.
fn sample_side(
    sp: &Spline2,
    pts: &[Point2<f64>],
    at: impl Fn(usize) -> usize,
    len: usize,
    xs: &[f64],
    side: &'static str,
) -> Result<Vec<Point2<f64>>, ResampleError> {
    for k in 1..len {
        let (a, b) = (pts[at(k - 1)].x, pts[at(k)].x);
        if b < a - FOLD_TOLERANCE {
            return Err(ResampleError::NotSingleValued { side, x: a });
        }
    }
    let mut out = Vec::with_capacity(xs.len());
    out.push(Point2::origin());
    let mut j = 0;
    // Stations scaled to this side's trailing-edge x (1 unless the blunt trailing edge
    // is slanted to the chord), so that no station falls beyond the surface's end.
    let x_end = pts[at(len - 1)].x;
    let scale = if x_end > 0.0 { x_end } else { 1.0 };
    for &x in &xs[1..xs.len() - 1] {
        let x = x * scale;
        while j + 2 < len && pts[at(j + 1)].x < x {
            j += 1;
        }
        let span = at(j).min(at(j + 1));
        out.push(sp.point_at_x_in_span(span, x));
    }
    out.push(pts[at(len - 1)]);
    Ok(out)
}

impl Section {
    /// Resamples to `n` points per side (at least 3) at the cosine-spaced stations of
    /// [`cosine_stations`], both sides at the same x. The section must already be
    /// normalised (leading edge at the origin, chord along x). Result: `2n - 1` points.
    /// The trailing-edge points are kept as they are; when a blunt trailing edge is
    /// slanted to the chord (a cambered section with open trailing edge), each side's
    /// stations are scaled by that side's trailing-edge x, a shift of at most the
    /// trailing-edge thickness times its slant. Resampling a resampled section with the
    /// same `n` returns the same points (to rounding).
    pub fn resample(&self, n: usize) -> Result<Section, ResampleError> {
        let n = n.max(3);
        let pts = dedup_cow(self.points());
        if pts.len() < 5 {
            return Err(ResampleError::TooFewPoints(pts.len()));
        }
        let sp = Spline2::fit(&pts).ok_or(ResampleError::TooFewPoints(pts.len()))?;
        // The leading-edge point is a data point; find its index after de-duplication.
        let le_point = self.points()[self.leading_edge_index()];
        let le_k = if pts.len() == self.points().len() {
            self.leading_edge_index()
        } else {
            pts.iter()
                .position(|p| (p - le_point).norm() < 1e-12)
                .ok_or(ResampleError::Degenerate)?
        };
        if le_k == 0 || le_k + 1 >= pts.len() {
            return Err(ResampleError::Degenerate);
        }
        let xs = cosine_stations(n);
        let upper = sample_side(&sp, &pts, |k| le_k - k, le_k + 1, &xs, "upper")?;
        let lower = sample_side(&sp, &pts, |k| le_k + k, pts.len() - le_k, &xs, "lower")?;
        Section::from_sides(self.name(), &upper, &lower).ok_or(ResampleError::Degenerate)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::Vector2;

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

    #[test]
    fn resampling_is_idempotent_and_has_no_duplicates() {
        // A cambered open-TE section has a slanted trailing edge; resampled twice it
        // must give the same points, and no two consecutive points may coincide.
        let s = crate::airfoil::Naca4::from_digits("4415", crate::airfoil::TrailingEdge::Open)
            .unwrap()
            .section("naca4415", 121)
            .unwrap();
        assert_eq!(dedup(s.points()).len(), s.points().len());
        let again = s.resample(121).unwrap();
        let worst = again
            .points()
            .iter()
            .zip(s.points())
            .map(|(a, b)| (a - b).norm())
            .fold(0.0, f64::max);
        assert!(worst < 1e-14, "{worst}");
    }
}
