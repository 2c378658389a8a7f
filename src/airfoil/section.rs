//! The [`Section`] type: one closed airfoil outline in unit-chord coordinates.
//!
//! # Convention (kept everywhere in spanwright)
//!
//! The frame and its chord line are stated once, in [`crate::conventions`] ("Section
//! frame"); what follows is how a [`Section`] holds its points in that frame.
//!
//! ```text
//!        y (toward the upper, usually suction, surface)
//!        ^      upper surface: points 0 ..= le
//!        |   .-~~~~~~~~~~-.__
//!   LE   o  (0,0)             ~~--.__  TE (1, +g/2) = points[0]
//!        |                          |  trailing-edge segment (length g, may be 0)
//!         `-.__________________.--~    TE (1, -g/2) = points[n-1]
//!               lower surface: points le ..= n-1            -> x (along the chord line)
//! ```
//!
//! * The chord line is the x axis, from (0, 0) to (1, 0); the trailing edge is at
//!   (1, 0), the midpoint of the trailing-edge segment when the trailing edge is blunt.
//! * The leading-edge point `points[le]`, where the upper surface meets the lower one,
//!   is the outline's foremost point (smallest x), so that each surface is single-valued
//!   in x from it. Where it lies relative to (0, 0) depends on the chord line
//!   ([`Section::chord_line`]; see the conventions): at (0, 0) for a chord line drawn to
//!   the farthest point, a little ahead of and above it on a cambered NACA section,
//!   whose published chord line starts at the mean line's origin, a point of the nose
//!   that is not its foremost one.
//! * Points run from the upper trailing edge over the upper surface to the leading edge
//!   and back along the lower surface to the lower trailing edge. The loop is closed by
//!   the trailing-edge segment `points[n-1] -> points[0]`; for a sharp trailing edge
//!   the two end points coincide and that segment has zero length. The end point is
//!   never repeated otherwise.
//! * Walking the points in order, the enclosed area lies on the left: the loop is
//!   counter-clockwise in (x, y) and its signed (shoelace) area is positive.
//!
//! A *resampled* section (see [`Section::resample`]) has exactly `n` points per side
//! (leading edge shared), at the same chordwise stations on both sides, cosine-spaced
//! from the leading-edge point's x to the trailing edge, so that any two resampled
//! sections with the same `n` correspond point by point: this is what blending and
//! lofting rely on. (When a blunt trailing edge is slanted to the chord, as on a
//! cambered section with open trailing edge, each side's stations end at that side's
//! trailing-edge x; the two differ by at most a few 1e-4 chord.)

use super::resample::{Frame, NORMALISED_TOLERANCE};
use nalgebra::Point2;

/// Which line a section's x axis (its chord line) is, by where the section came from
/// (the rule is stated in [`crate::conventions`], "Section frame").
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ChordLine {
    /// A generated designation's published chord line: from the mean line's origin to
    /// the trailing edge (NACA Reports 460 and 537).
    Published,
    /// The coordinates' own x axis: they were already in the section frame (leading edge
    /// at (0, 0) and trailing edge at (1, 0) within [`NORMALISED_TOLERANCE`]) and are
    /// kept as given. Also the chord line of sections built point by point.
    Kept,
    /// Drawn from the trailing-edge midpoint to the outline's farthest point: the
    /// outline was not in the section frame and was normalised by the similarity
    /// `frame` (move, turn, scale).
    Normalised(Frame),
}

impl ChordLine {
    /// A few words for a file's name line.
    pub fn brief(&self) -> &'static str {
        match self {
            ChordLine::Published => {
                "published chord line (from the mean line's origin to the trailing edge)"
            }
            ChordLine::Kept => "chord line as given",
            ChordLine::Normalised(_) => {
                "normalised: chord line drawn from the trailing edge to the farthest point"
            }
        }
    }
}

impl std::fmt::Display for ChordLine {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ChordLine::Published => write!(
                f,
                "published chord line of the designation, from the mean line's origin to the trailing edge (NACA Reports 460 and 537)"
            ),
            ChordLine::Kept => write!(
                f,
                "the coordinates' own x axis, kept as given (leading edge at (0, 0) and trailing edge at (1, 0) within {NORMALISED_TOLERANCE} chord)"
            ),
            ChordLine::Normalised(frame) => write!(
                f,
                "drawn from the trailing-edge midpoint to the farthest point of the outline (the coordinates were not normalised: that line was {:.6} long at {:.4} degrees to their x axis, now moved to (0, 0)-(1, 0))",
                frame.chord,
                frame.angle().to_degrees()
            ),
        }
    }
}

/// A closed airfoil outline in unit-chord coordinates (see the module docs for the
/// point order and frame).
#[derive(Debug, Clone, PartialEq)]
pub struct Section {
    name: String,
    points: Vec<Point2<f64>>,
    le: usize,
    chord_line: ChordLine,
}

impl Section {
    /// Builds a section from points already in the spanwright order and frame, with the
    /// leading edge at index `le`. The points are taken as they are (chord line
    /// [`ChordLine::Kept`]); use the import or generator functions for raw data that
    /// needs normalising.
    ///
    /// # Panics
    /// Never; returns `None` when `le` is not an interior index or fewer than 3 points
    /// are given.
    pub fn from_ordered(
        name: impl Into<String>,
        points: Vec<Point2<f64>>,
        le: usize,
    ) -> Option<Self> {
        if points.len() < 3 || le == 0 || le + 1 >= points.len() {
            return None;
        }
        Some(Self {
            name: name.into(),
            points,
            le,
            chord_line: ChordLine::Kept,
        })
    }

    /// The section's name (a designation such as `naca2412`, or a file stem).
    pub fn name(&self) -> &str {
        &self.name
    }

    /// Renames the section.
    pub fn with_name(mut self, name: impl Into<String>) -> Self {
        self.name = name.into();
        self
    }

    /// Which line the x axis is (how the section came into the section frame).
    pub fn chord_line(&self) -> ChordLine {
        self.chord_line
    }

    /// The same section, its chord line described as `chord_line` (the points are not
    /// moved).
    pub fn with_chord_line(mut self, chord_line: ChordLine) -> Self {
        self.chord_line = chord_line;
        self
    }

    /// All points, upper trailing edge -> leading edge -> lower trailing edge.
    pub fn points(&self) -> &[Point2<f64>] {
        &self.points
    }

    /// Index of the leading-edge point.
    pub fn leading_edge_index(&self) -> usize {
        self.le
    }

    /// Upper surface from the trailing edge to the leading edge (inclusive).
    pub fn upper_te_to_le(&self) -> &[Point2<f64>] {
        &self.points[..=self.le]
    }

    /// Lower surface from the leading edge to the trailing edge (inclusive).
    pub fn lower_le_to_te(&self) -> &[Point2<f64>] {
        &self.points[self.le..]
    }

    /// Upper surface points ordered from the leading edge to the trailing edge.
    pub fn upper_le_to_te(&self) -> Vec<Point2<f64>> {
        self.upper_te_to_le().iter().rev().copied().collect()
    }

    /// Trailing-edge gap: distance between the first and last point (0 when sharp).
    pub fn te_gap(&self) -> f64 {
        (self.points[0] - self.points[self.points.len() - 1]).norm()
    }

    /// Signed shoelace area of the closed loop (positive for the spanwright order).
    pub fn signed_area(&self) -> f64 {
        let p = &self.points;
        let n = p.len();
        let mut a = 0.0;
        for i in 0..n {
            let (q, r) = (p[i], p[(i + 1) % n]);
            a += q.x * r.y - r.x * q.y;
        }
        0.5 * a
    }

    /// Enclosed area in chord² (always positive).
    pub fn area(&self) -> f64 {
        self.signed_area().abs()
    }

    /// Number of points per side when this section is resampled (upper and lower have the
    /// same count and the leading edge sits in the middle); `None` otherwise.
    pub fn points_per_side(&self) -> Option<usize> {
        let n = self.points.len();
        (n % 2 == 1 && self.le == n / 2).then_some(self.le + 1)
    }

    /// True when `other` has the same point structure (same count, same leading-edge
    /// index), so that the two can be blended or lofted point by point.
    pub fn is_compatible(&self, other: &Section) -> bool {
        self.points.len() == other.points.len() && self.le == other.le
    }

    /// Builds a resampled-structure section from matching upper and lower ordinates given
    /// at the same chordwise stations `x` (`x[0] = 0` at the leading edge, increasing to
    /// the trailing edge). `upper[i]` and `lower[i]` are (x, y) points for station `i`.
    pub fn from_sides(
        name: impl Into<String>,
        upper: &[Point2<f64>],
        lower: &[Point2<f64>],
    ) -> Option<Self> {
        if upper.len() != lower.len() || upper.len() < 2 {
            return None;
        }
        let n = upper.len();
        let mut points = Vec::with_capacity(2 * n - 1);
        points.extend(upper.iter().rev().copied());
        // The leading edge is shared: take the mean of the two given leading-edge points.
        let le = nalgebra::center(&upper[0], &lower[0]);
        points[n - 1] = le;
        points.extend(lower[1..].iter().copied());
        Self::from_ordered(name, points, n - 1)
    }

    /// Maps every point through `f` (for example to scale thickness), keeping order and
    /// the chord-line description.
    pub fn map_points(&self, mut f: impl FnMut(usize, Point2<f64>) -> Point2<f64>) -> Section {
        Section {
            name: self.name.clone(),
            points: self
                .points
                .iter()
                .enumerate()
                .map(|(i, &p)| f(i, p))
                .collect(),
            le: self.le,
            chord_line: self.chord_line,
        }
    }
}
