//! Bringing outlines into the section frame, and resampling sections to a common point
//! structure. The frame and the rule choosing its chord line are stated once in
//! [`crate::conventions`] ("Section frame"); this module carries them out.
//!
//! All of it works on a [`Spline2`] through the points (chord-length parameter):
//!
//! * [`keep_frame`] takes an outline already in the section frame as it is and splits it
//!   into its two surfaces at its foremost point (smallest x), found by a discrete search
//!   refined by bisection on the spline;
//! * [`normalize`] draws the chord line from the trailing-edge midpoint to the point of
//!   the spline farthest from it (refined the same way) and moves that point to (0, 0)
//!   and the trailing-edge midpoint to (1, 0) (a similarity transform: translation,
//!   rotation, uniform scale); the farthest point is then also the foremost one;
//! * [`to_section_frame`] chooses between the two for coordinates read from a file:
//!   kept when [`is_normalised`], normalised otherwise;
//! * resampling places `n` points on each side at the cosine-spaced stations
//!   `x_i = x_le + (x_te - x_le) (1 - cos(pi i / (n - 1))) / 2` from the leading-edge
//!   point's `x_le` to the trailing edge `x_te` (1, or that side's end of a slanted blunt
//!   trailing edge), which clusters points at both edges, and the *same* stations on
//!   both sides, so that sections correspond point by point.

use super::section::{ChordLine, Section};
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

/// Parameter of the spline point with the smallest x (the foremost point).
fn foremost_parameter(sp: &Spline2) -> f64 {
    let knots = sp.knots();
    let x = |t: f64| sp.eval(t).x;
    let (imin, _) = knots
        .iter()
        .enumerate()
        .map(|(i, &t)| (i, x(t)))
        .fold((0, f64::MAX), |a, b| if b.1 < a.1 { b } else { a });
    let mut a = knots[imin.saturating_sub(1)];
    let mut b = knots[(imin + 1).min(knots.len() - 1)];
    // The minimum is where dx/dt changes sign from - to +.
    let g = |t: f64| sp.eval_with_derivative(t).1.x;
    if !(g(a) < 0.0 && g(b) > 0.0) {
        return knots[imin];
    }
    for _ in 0..200 {
        let m = 0.5 * (a + b);
        if m <= a || m >= b {
            break;
        }
        if g(m) < 0.0 {
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
/// a resampled section puts its farthest (or foremost) point up to about 1e-5 chord away
/// from the written leading edge. Used by [`normalize`] and [`keep_frame`]; equal to the
/// resampling shape tolerance.
pub const LE_SNAP: f64 = 1e-4;

/// Largest distance (fraction of chord) by which an outline may miss (0, 0) and have
/// its trailing-edge midpoint miss (1, 0) and still count as already normalised, so
/// that its coordinates are kept as given (see [`is_normalised`]): 1e-3 chord, twice the
/// rounding error of coordinates printed with three decimals. Turning a unit chord by
/// 0.06 degrees about its leading edge moves the trailing edge by this much.
pub const NORMALISED_TOLERANCE: f64 = 1e-3;

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
    /// The frame of coordinates kept as given: leading edge (0, 0), trailing edge (1, 0).
    pub const IDENTITY: Frame = Frame {
        leading_edge: Point2::new(0.0, 0.0),
        trailing_edge: Point2::new(1.0, 0.0),
        chord: 1.0,
    };

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

/// Distance from `p` to the polyline through `pts` (open: the trailing-edge segment is
/// not included).
fn distance_to_polyline(p: Point2<f64>, pts: &[Point2<f64>]) -> f64 {
    pts.windows(2)
        .map(|w| {
            let (a, b) = (w[0], w[1]);
            let ab = b - a;
            let l2 = ab.norm_squared();
            let t = if l2 > 0.0 {
                ((p - a).dot(&ab) / l2).clamp(0.0, 1.0)
            } else {
                0.0
            };
            (p - (a + ab * t)).norm()
        })
        .fold(f64::INFINITY, f64::min)
}

/// True when a raw outline in loop order (starting and ending at the trailing edge) is
/// already in the section frame: its trailing-edge midpoint (the mean of the first and
/// last point) lies within [`NORMALISED_TOLERANCE`] of (1, 0), and the outline passes
/// within that distance of (0, 0).
pub fn is_normalised(raw: &[Point2<f64>]) -> bool {
    let pts = dedup(raw);
    if pts.len() < 5 {
        return false;
    }
    let te = nalgebra::center(&pts[0], &pts[pts.len() - 1]);
    (te - Point2::new(1.0, 0.0)).norm() <= NORMALISED_TOLERANCE
        && distance_to_polyline(Point2::origin(), &pts) <= NORMALISED_TOLERANCE
}

/// Splits points already in the section frame (loop order, either direction, from the
/// trailing edge round to it) at the leading-edge point `le` found at spline parameter
/// `t_le` (`knots` are the points' spline parameters), inserting `le` as an explicit
/// point unless it is a data point, and orders the loop upper surface first.
fn split_at(
    name: &str,
    pts: &[Point2<f64>],
    knots: &[f64],
    t_le: f64,
    le: Point2<f64>,
) -> Result<Section, ResampleError> {
    let side = |keep: &dyn Fn(f64) -> bool| -> Vec<Point2<f64>> {
        knots
            .iter()
            .zip(pts)
            .filter(|(&k, _)| keep(k))
            .map(|(_, &p)| p)
            // Input points that sit on the leading edge itself are dropped.
            .filter(|p| (p - le).norm() > 1e-12)
            .collect()
    };
    let first = side(&|k| k < t_le);
    let second = side(&|k| k > t_le);
    if first.is_empty() || second.is_empty() {
        return Err(ResampleError::Degenerate);
    }
    let mut points = first;
    let le_index = points.len();
    points.push(le);
    points.extend(second);
    let section = Section::from_ordered(name, points, le_index).ok_or(ResampleError::Degenerate)?;
    if section.signed_area() < 0.0 {
        // Given lower surface first: reverse the loop.
        let n = section.points().len();
        let rev: Vec<_> = section.points().iter().rev().copied().collect();
        return Section::from_ordered(name, rev, n - 1 - le_index).ok_or(ResampleError::Degenerate);
    }
    Ok(section)
}

/// Takes an outline already in the section frame (chord line on the x axis from (0, 0)
/// to (1, 0)), in loop order (either direction, starting and ending at the trailing
/// edge), with its coordinates as given: only the leading-edge point is found, the
/// outline's foremost point (a data point when one lies within [`LE_SNAP`] of it,
/// otherwise the spline's point, inserted). The chord line is [`ChordLine::Kept`].
pub fn keep_frame(name: &str, raw: &[Point2<f64>]) -> Result<Section, ResampleError> {
    let pts = dedup(raw);
    if pts.len() < 5 {
        return Err(ResampleError::TooFewPoints(pts.len()));
    }
    let sp = Spline2::fit(&pts).ok_or(ResampleError::TooFewPoints(pts.len()))?;
    let te = nalgebra::center(&pts[0], &pts[pts.len() - 1]);
    let mut t_le = foremost_parameter(&sp);
    let mut le = sp.eval(t_le);
    // Snap to the foremost data point when it is (nearly) the foremost point already: a
    // written and re-read section keeps its leading-edge point exactly.
    let knots = sp.knots();
    let (imin, _) =
        pts.iter().enumerate().fold(
            (0, f64::MAX),
            |a, (i, p)| if p.x < a.1 { (i, p.x) } else { a },
        );
    if (pts[imin] - le).norm() < LE_SNAP {
        t_le = knots[imin];
        le = pts[imin];
    }
    if !(te.x - le.x > 0.0) {
        return Err(ResampleError::Degenerate);
    }
    split_at(name, &pts, knots, t_le, le)
}

/// Normalises a raw outline given in loop order (either direction, starting and ending
/// at the trailing edge): the chord line is drawn from the trailing-edge midpoint to the
/// outline's farthest point, which goes to (0, 0), the trailing-edge midpoint to (1, 0),
/// upper surface first. Returns the section with the leading edge inserted as an
/// explicit point; its chord line is [`ChordLine::Normalised`].
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
    let mapped: Vec<Point2<f64>> = pts.iter().map(|&p| frame.map(p)).collect();
    // The spline's leading-edge point maps exactly to the origin.
    let section = split_at(name, &mapped, knots, t_le, Point2::origin())?;
    Ok((section.with_chord_line(ChordLine::Normalised(frame)), frame))
}

/// Brings coordinates read from a file into the section frame by the rule of
/// [`crate::conventions`] ("Section frame"): kept as given when they are already
/// normalised ([`is_normalised`], then [`keep_frame`]), normalised to the farthest point
/// otherwise ([`normalize_with_frame`]). Returns the section, whose
/// [`Section::chord_line`] says which was done, and the transform applied
/// ([`Frame::IDENTITY`] when kept).
pub fn to_section_frame(
    name: &str,
    raw: &[Point2<f64>],
) -> Result<(Section, Frame), ResampleError> {
    if is_normalised(raw) {
        Ok((keep_frame(name, raw)?, Frame::IDENTITY))
    } else {
        normalize_with_frame(name, raw)
    }
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
    let le = pts[at(0)];
    out.push(le);
    let mut j = 0;
    // Stations from the leading-edge point's x to this side's trailing-edge x (1 unless
    // the blunt trailing edge is slanted to the chord), so that no station falls beyond
    // the surface's end.
    let x_end = pts[at(len - 1)].x;
    if !(x_end > le.x) {
        return Err(ResampleError::Degenerate);
    }
    for &c in &xs[1..xs.len() - 1] {
        let x = le.x + c * (x_end - le.x);
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
    /// [`cosine_stations`] laid from the leading-edge point's x to the trailing edge, both
    /// sides at the same x. The section must already be in the section frame (chord along
    /// x, leading-edge point foremost). Result: `2n - 1` points, the same chord line.
    /// The leading- and trailing-edge points are kept as they are; when a blunt trailing
    /// edge is slanted to the chord (a cambered section with open trailing edge), each
    /// side's stations end at that side's trailing-edge x, a shift of at most the
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
        Section::from_sides(self.name(), &upper, &lower)
            .map(|s| s.with_chord_line(self.chord_line()))
            .ok_or(ResampleError::Degenerate)
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
    fn keep_frame_splits_at_the_foremost_point() {
        // An ellipse with semi-axes 0.5 and 0.05 about (0.5, 0), turned by 2 degrees about
        // its centre: its foremost point lies at x = 0.5 - sqrt(a^2 cos^2 + b^2 sin^2)
        // (analytic geometry), ahead of the origin. Kept as given, the section's leading
        // edge is that point and no point moves.
        let (a, b, phi) = (0.5_f64, 0.05_f64, 2f64.to_radians());
        let raw = ellipse(400, 0.1, phi, 1.0, Vector2::zeros())
            .into_iter()
            .map(|p| {
                // ellipse() turns about the origin; turn about the centre instead.
                let c = nalgebra::Rotation2::new(phi) * Vector2::new(0.5, 0.0);
                p + (Vector2::new(0.5, 0.0) - c)
            })
            .collect::<Vec<_>>();
        let s = keep_frame("e", &raw).unwrap();
        assert_eq!(s.chord_line(), ChordLine::Kept);
        let le = s.points()[s.leading_edge_index()];
        let want = 0.5 - (a * a * phi.cos().powi(2) + b * b * phi.sin().powi(2)).sqrt();
        assert!((le.x - want).abs() < 1e-7, "{} vs {want}", le.x);
        assert!(s.points().iter().all(|p| p.x >= le.x));
        for p in &raw[..raw.len() - 1] {
            assert!(s.points().iter().any(|q| q == p), "{p} moved");
        }
        // Turned by 2 degrees the trailing edge is 0.017 off (1, 0): not normalised.
        assert!(!is_normalised(&raw));
        let flat = ellipse(400, 0.1, 0.0, 1.0, Vector2::zeros());
        assert!(is_normalised(&flat));
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
