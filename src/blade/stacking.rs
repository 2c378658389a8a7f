//! The stacking axis along the span: where it passes through the section at any radius.
//!
//! Each station names a rule ([`Stacking`]: the station's own `stacking`, else the
//! blade's). The rules come in two kinds:
//!
//! * **points on the chord line**: a chord fraction, the quarter chord (0.25), and the
//!   thickest point. The thickest point is resolved at the station from its own section
//!   (after blending, thickness scaling and trailing-edge thickening), as the chord
//!   position of the largest thickness measured perpendicular to the chord line
//!   ([`crate::airfoil::Measures::thickness_at`]). Between stations the fraction is
//!   interpolated like chord and twist (monotone cubic, [`crate::interp::Monotone`], over
//!   the stations of this kind); where every such station has the same fraction it is
//!   that number exactly, so `0.25` and `"quarter-chord"` place every point identically.
//!   The thickest point is interpolated rather than measured on the interpolated section
//!   because it is an arg-max: it can jump where the thickness is flat, and the axis must
//!   stay smooth. (Sections blended point by point from sections of one family keep their
//!   thickest point: every NACA 4-digit section is thickest at 30 % chord.)
//! * **the area centroid**: applied to the interpolated section at every radius, not
//!   only at the stations, so the centroid of every section between two centroid-stacked
//!   stations is on the axis too (the centroid is a smooth function of the section's
//!   ordinates, so the axis stays C1).
//!
//! Where two neighbouring stations use different kinds, the stacking point moves from
//! one kind's point to the other's along `H(t) = 3t² - 2t³` (`t` from 0 at the inner
//! station to 1 at the outer), both points taken on the section at that radius: `H` has
//! zero slope at both stations, so the axis stays C1 and each station keeps its own rule.
//!
//! The rule governs the airfoil stations, root to tip station. The root shank and its
//! transition are centred on the axis by their own construction ([`crate::root`]), and a
//! round tip continues the last station's outline; neither is held to the rule.

use nalgebra::{Point2, Vector2};

use super::BladeError;
use crate::airfoil::{Section, Spline2};
use crate::design::Stacking;
use crate::interp::Monotone;

/// How a station's stacking point is found at a radius.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    /// A chord-line point at the interpolated fraction.
    Chord,
    /// The area centroid of the section at that radius.
    Centroid,
}

/// The chord fraction of the chord-line stations along the span.
#[derive(Debug, Clone)]
enum Fraction {
    /// One fraction everywhere (also when no station is of the chord kind).
    Const(f64),
    /// Monotone cubic through the chord-line stations.
    Curve(Monotone),
}

/// The resolved stacking of one station.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct StationStacking {
    /// Station radius, mm.
    pub radius: f64,
    /// The rule, as the design gives it.
    pub rule: Stacking,
    /// The stacking point in the station's section frame (unit chord, leading edge at
    /// the origin, see [`crate::conventions`]).
    pub point: Point2<f64>,
}

/// Where the stacking axis passes through every section of a blade.
#[derive(Debug, Clone)]
pub(crate) struct StackLine {
    radii: Vec<f64>,
    kinds: Vec<Kind>,
    stations: Vec<StationStacking>,
    fraction: Fraction,
}

/// Gauss-Legendre nodes and weights on [-1, 1], 5 points: exact for polynomials up to
/// degree 9 (Abramowitz & Stegun, *Handbook of Mathematical Functions*, 1964, table 25.4).
const GAUSS5: [(f64, f64); 5] = [
    (0.0, 0.568_888_888_888_888_9),
    (-0.538_469_310_105_683_1, 0.478_628_670_499_366_5),
    (0.538_469_310_105_683_1, 0.478_628_670_499_366_5),
    (-0.906_179_845_938_664, 0.236_926_885_056_189_1),
    (0.906_179_845_938_664, 0.236_926_885_056_189_1),
];

/// Area centroid of a section outline (points in loop order, first not repeated): of the
/// region bounded by the cubic spline through the points ([`Spline2`], the smooth curve
/// the loft also draws through them) and the straight trailing-edge segment closing it.
/// `None` when the outline encloses no area or has coincident consecutive points.
///
/// Green's theorem: `A = 1/2 ∮ (x dy - y dx)`, `∫ x dA = ∮ x²/2 dy`,
/// `∫ y dA = -∮ y²/2 dx`. On a cubic span the integrands are polynomials of degree at
/// most 8 in the parameter, so [`GAUSS5`] integrates them exactly; the closing segment
/// adds its exact polygon terms. Coordinates are taken relative to the first point.
///
/// The polygon through the same points has a centroid about `1e-5` chord away (at 120
/// points per side); a mesh converges to the spline, so this is the centroid a cut of the
/// finished blade finds.
pub(crate) fn centroid(points: &[Point2<f64>]) -> Option<Point2<f64>> {
    let sp = Spline2::fit(points)?;
    let o = points[0].coords;
    let (mut a, mut mx, mut my) = (0.0f64, 0.0f64, 0.0f64);
    for k in sp.knots().windows(2) {
        let (mid, half) = (0.5 * (k[0] + k[1]), 0.5 * (k[1] - k[0]));
        for (x, w) in GAUSS5 {
            let (p, d) = sp.eval_with_derivative(mid + half * x);
            let (q, wh) = (p.coords - o, w * half);
            a += wh * (q.x * d.y - q.y * d.x);
            mx += wh * q.x * q.x * d.y;
            my -= wh * q.y * q.y * d.x;
        }
    }
    // The trailing-edge segment from the last point `p` back to the first (the origin
    // here), `p (1 - s)` for s in [0, 1]: `x dy - y dx` vanishes on it, and
    // `∮ x² dy = -p_x² p_y / 3`, `-∮ y² dx = p_x p_y² / 3`.
    let p = points[points.len() - 1].coords - o;
    mx -= p.x * p.x * p.y / 3.0;
    my += p.x * p.y * p.y / 3.0;
    // With the halves left out of all three sums, the centroid is (mx, my) / a.
    (a != 0.0 && a.is_finite()).then(|| Point2::from(o + Vector2::new(mx, my) / a))
}

impl StackLine {
    /// Resolves each station's rule on its own section. `origins` name the stations in
    /// messages.
    pub fn new(
        radii: &[f64],
        rules: &[Stacking],
        sections: &[Section],
        origins: &[&str],
    ) -> Result<StackLine, BladeError> {
        let mut kinds = Vec::with_capacity(radii.len());
        let mut stations = Vec::with_capacity(radii.len());
        let mut chord: Vec<(f64, f64)> = Vec::new();
        for (i, (&rule, section)) in rules.iter().zip(sections).enumerate() {
            let fail = |reason: String| BladeError::Stacking {
                origin: origins.get(i).copied().unwrap_or("a station").to_string(),
                rule,
                section: section.name().to_string(),
                reason,
            };
            let (kind, point) = match rule {
                Stacking::ChordFraction(_) | Stacking::QuarterChord => {
                    let f = rule.chord_fraction().unwrap_or(0.25);
                    (Kind::Chord, Point2::new(f, 0.0))
                }
                Stacking::Thickest => {
                    let m = section.measures().map_err(|e| fail(e.to_string()))?;
                    (Kind::Chord, Point2::new(m.thickness_at, 0.0))
                }
                Stacking::Centroid => {
                    let c = centroid(section.points())
                        .ok_or_else(|| fail("the section encloses no area".into()))?;
                    (Kind::Centroid, c)
                }
            };
            if !(point.x.is_finite() && point.y.is_finite()) {
                return Err(fail(format!(
                    "the point ({}, {}) is not finite",
                    point.x, point.y
                )));
            }
            if kind == Kind::Chord {
                chord.push((radii[i], point.x));
            }
            kinds.push(kind);
            stations.push(StationStacking {
                radius: radii[i],
                rule,
                point,
            });
        }
        let fraction = match chord.as_slice() {
            [] => Fraction::Const(0.0),
            [(_, f), rest @ ..] if rest.iter().all(|(_, g)| g == f) => Fraction::Const(*f),
            _ => {
                let (r, f): (Vec<f64>, Vec<f64>) = chord.into_iter().unzip();
                Fraction::Curve(Monotone::new(&r, &f).ok_or_else(|| {
                    BladeError::Stations("radii must increase strictly and values be finite".into())
                })?)
            }
        };
        Ok(StackLine {
            radii: radii.to_vec(),
            kinds,
            stations,
            fraction,
        })
    }

    /// Each station's rule and resolved point.
    pub fn stations(&self) -> &[StationStacking] {
        &self.stations
    }

    /// The rule every station uses, or `None` when they differ.
    pub fn common_rule(&self) -> Option<Stacking> {
        let first = self.stations.first()?.rule;
        self.stations
            .iter()
            .all(|s| s.rule == first)
            .then_some(first)
    }

    fn chord_point(&self, r: f64) -> Point2<f64> {
        let f = match &self.fraction {
            Fraction::Const(f) => *f,
            Fraction::Curve(m) => m.eval(r),
        };
        Point2::new(f, 0.0)
    }

    fn kind_point(&self, kind: Kind, r: f64, section: &[Point2<f64>]) -> Point2<f64> {
        match kind {
            Kind::Chord => self.chord_point(r),
            // An outline with no area (never a validated section) keeps the chord point.
            Kind::Centroid => centroid(section).unwrap_or_else(|| self.chord_point(r)),
        }
    }

    /// The stacking point at radius `r` of the section `section` (unit chord, the
    /// interpolated section at `r`). Radii outside the stations take the end station's
    /// rule.
    pub fn point(&self, r: f64, section: &[Point2<f64>]) -> Point2<f64> {
        let n = self.radii.len();
        let i = self.radii[1..n - 1].partition_point(|&x| x <= r);
        let (a, b) = (self.kinds[i], self.kinds[i + 1]);
        let (r0, r1) = (self.radii[i], self.radii[i + 1]);
        if a == b || r <= r0 {
            return self.kind_point(a, r, section);
        }
        if r >= r1 {
            return self.kind_point(b, r, section);
        }
        let t = (r - r0) / (r1 - r0);
        let h = t * t * (3.0 - 2.0 * t);
        let (p, q) = (
            self.kind_point(a, r, section),
            self.kind_point(b, r, section),
        );
        Point2::from(p.coords * (1.0 - h) + q.coords * h)
    }
}

/// A built blade's stacking, for summaries and reports ([`super::Blade::stacking`]).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct StackingSummary {
    /// The rule every station uses; `None` when the stations differ (see `stations`).
    pub rule: Option<Stacking>,
    /// Each station's rule and resolved point.
    pub stations: Vec<StationStacking>,
    /// Largest distance between a section's area centroid and the stacking axis over the
    /// airfoil span (at the stations and [`CENTROID_SAMPLES`] - 1 radii between
    /// neighbouring stations), mm. About zero (rounding) for the centroid rule; for the
    /// other rules it is the arm of the centrifugal force about the axis.
    pub centroid_offset: f64,
    /// That distance as a fraction of the local chord.
    pub centroid_offset_chord: f64,
    /// Radius where the distance is largest, mm.
    pub centroid_offset_radius: f64,
}

/// Intervals between neighbouring stations at which [`StackingSummary::centroid_offset`]
/// is measured.
pub const CENTROID_SAMPLES: usize = 8;

impl StackingSummary {
    /// The rule in words: the common rule as a design writes it, or `per station` with
    /// each station's rule.
    pub fn rule_text(&self) -> String {
        match self.rule {
            Some(rule) => rule.to_string(),
            None => {
                let each: Vec<String> = self
                    .stations
                    .iter()
                    .map(|s| format!("{} at r = {:.1} mm", s.rule, s.radius))
                    .collect();
                format!("per station ({})", each.join(", "))
            }
        }
    }
}

/// One line: the rule and the largest centroid offset.
impl std::fmt::Display for StackingSummary {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "stacking {}; section centroids at most {:.4} mm ({:.5} chord) off the axis, at r = {:.1} mm",
            self.rule_text(),
            self.centroid_offset,
            self.centroid_offset_chord,
            self.centroid_offset_radius
        )
    }
}
