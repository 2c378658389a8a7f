//! The blade model: spanwise interpolation of the design table, stacking and twist.
//!
//! A [`Blade`] knows, at any radius between root and tip, the section shape (unit chord),
//! chord, twist and offsets, and places the section in the blade frame of
//! [`crate::conventions`]. It samples the span into *rings* (placed sections with one
//! common point structure) for the lofter.
//!
//! Spanwise interpolation follows the design's law ([`crate::interp::Law`],
//! `blade.spanwise`, stated by [`Blade::spanwise`]): by default monotone cubic
//! ([`crate::interp::Monotone`]): chord, twist, offsets and every section ordinate vary
//! C1 between stations and never overshoot the neighbouring station values; or linear
//! ([`crate::interp::Linear`]): straight lines between stations. Either way, where the
//! section changes along the span its shape is blended point by point.
//!
//! The stacking axis passes through each section at the point its station's rule names
//! (a chord fraction, the quarter chord, the area centroid or the thickest point); how
//! the rules are resolved and carried between stations is in [`stacking`]. The blade
//! reports the rules and how far the section centroids sit off the axis in
//! [`Blade::stacking`].

use crate::airfoil::Section;
use crate::design::{BladeOptions, Flow, Rotation, Stacking, Station};
use crate::interp::{Bundle, Curve, Law};
use crate::root::{RootError, RootSpec, TipShape, TipSpec};
use nalgebra::{Point2, Point3};

pub mod stacking;

use stacking::StackLine;
pub use stacking::{StackingSummary, StationStacking, CENTROID_SAMPLES};

/// Why a blade could not be built from its stations.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BladeError {
    /// Sections of different point structure were given.
    #[error("station sections must be resampled to one point structure (got {0})")]
    Incompatible(String),
    /// Fewer than two stations, radii not increasing, or a non-finite value.
    #[error("invalid stations: {0}")]
    Stations(String),
    /// The root settings cannot be built.
    #[error(transparent)]
    Root(#[from] RootError),
    /// The tip settings cannot be built.
    #[error("tip.length = {0}: must be a positive number of millimetres")]
    TipLength(f64),
    /// A round tip longer than [`MAX_TIP_CHORDS`] tip chords.
    #[error(
        "tip.length = {length} mm is more than {MAX_TIP_CHORDS} times the {chord} mm tip \
         chord: a round tip closes the blade over about half a chord (the default); for a \
         longer blade add stations, or give a length of at most {} mm", MAX_TIP_CHORDS * chord
    )]
    TipTooLong {
        /// The length given, mm.
        length: f64,
        /// The chord at the last station, mm.
        chord: f64,
    },
    /// A station's stacking rule cannot be resolved from its section.
    #[error(
        "{origin}: stacking \"{rule}\" cannot be found on section '{section}': {reason} \
         (give the station a chord fraction such as stacking = 0.25)"
    )]
    Stacking {
        /// The station (`file:line` or key path).
        origin: String,
        /// The rule.
        rule: Stacking,
        /// The section's name.
        section: String,
        /// Why it failed.
        reason: String,
    },
}

impl BladeError {
    /// The design key at fault, for errors of the `[root]` and `[tip]` tables (so the
    /// message can name the file and line).
    pub fn key(&self) -> Option<String> {
        match self {
            BladeError::Root(e) => Some(e.key()),
            BladeError::TipLength(_) | BladeError::TipTooLong { .. } => Some("tip.length".into()),
            _ => None,
        }
    }
}

/// The spanwise-interpolated blade.
#[derive(Debug, Clone)]
pub struct Blade {
    radii: Vec<f64>,
    chord: Curve,
    twist: Curve,
    sweep: Curve,
    prebend: Curve,
    /// The section coordinates' interpolants: curves `2k` and `2k + 1` are x and y of
    /// point `k`.
    shape: Bundle,
    le_index: usize,
    name: String,
    stacking: StackLine,
    side: f64,
    mirror: bool,
    root: Option<RootSpec>,
    tip: TipSpec,
    /// What every transition outline shares, set with the root.
    transition: Option<TransitionParts>,
}

/// The parts every outline of the root transition shares (the shank, the first
/// station's outline and its spanwise slope, their areas), computed once when the root is
/// set: the transition is sampled hundreds of times while rings are placed.
#[derive(Debug, Clone)]
struct TransitionParts {
    shank: Vec<Point2<f64>>,
    air: Vec<Point2<f64>>,
    slope: Vec<nalgebra::Vector2<f64>>,
    /// The shank over its diameter and the first station over its chord.
    n0: Vec<Point2<f64>>,
    n1: Vec<Point2<f64>>,
    /// Areas of the shank and the first station, and the blade's relative area change
    /// per mm at the first station.
    a0: f64,
    a1: f64,
    rel_slope: f64,
}

/// Spanwise regions of the blade, root to tip.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Region {
    /// Constant round (or elliptical) shank.
    Shank,
    /// Shank-to-airfoil transition.
    Transition,
    /// The airfoil stations.
    Airfoil,
    /// Rounded tip closure.
    Tip,
}

/// Longest round tip, in tip chords (`tip.length`): the closure is an ellipse continuing
/// the blade; much longer, it is no longer a tip but a spike the stations should describe.
pub const MAX_TIP_CHORDS: f64 = 2.0;

/// The round tip stops where the outline has shrunk to 5 % (sin of the elliptic angle).
const TIP_END_SIN: f64 = 0.998_749_217_771_908_8; // sqrt(1 - 0.05^2)

/// Shoelace area of a closed polygon (absolute value).
fn polygon_area(p: &[Point2<f64>]) -> f64 {
    let n = p.len();
    (0..n)
        .map(|i| {
            let (a, b) = (p[i], p[(i + 1) % n]);
            a.x * b.y - b.x * a.y
        })
        .sum::<f64>()
        .abs()
        * 0.5
}

/// A section placed in the blade frame at one radius.
#[derive(Debug, Clone, PartialEq)]
pub struct Ring {
    /// Radius (z), mm.
    pub radius: f64,
    /// Chord, mm.
    pub chord: f64,
    /// Twist, degrees.
    pub twist: f64,
    /// The placed points, same order as the section's.
    pub points: Vec<Point3<f64>>,
}

impl Blade {
    /// Builds the blade from validated stations and their sections (one per station, all
    /// resampled to the same point structure, see [`Section::resample`]).
    pub fn new(
        stations: &[Station],
        sections: &[Section],
        opts: &BladeOptions,
    ) -> Result<Blade, BladeError> {
        if stations.len() < 2 || sections.len() != stations.len() {
            return Err(BladeError::Stations(format!(
                "{} stations and {} sections; at least two of each, one per station",
                stations.len(),
                sections.len()
            )));
        }
        if let Some(bad) = sections.iter().find(|s| !s.is_compatible(&sections[0])) {
            return Err(BladeError::Incompatible(format!(
                "{} has {} points, {} has {}",
                sections[0].name(),
                sections[0].points().len(),
                bad.name(),
                bad.points().len()
            )));
        }
        let radii: Vec<f64> = stations.iter().map(|s| s.radius).collect();
        let rules: Vec<Stacking> = stations
            .iter()
            .map(|s| s.stacking.unwrap_or(opts.stacking))
            .collect();
        let origins: Vec<&str> = stations.iter().map(|s| s.origin.as_str()).collect();
        let stacking = StackLine::new(&radii, &rules, sections, &origins)?;
        let law = opts.spanwise;
        let curve = |f: &dyn Fn(&Station) -> f64| -> Result<Curve, BladeError> {
            let ys: Vec<f64> = stations.iter().map(f).collect();
            Curve::new(law, &radii, &ys).ok_or_else(|| {
                BladeError::Stations("radii must increase strictly and values be finite".into())
            })
        };
        let n = sections[0].points().len();
        let columns: Vec<Vec<f64>> = (0..2 * n)
            .map(|c| {
                let coordinate = |p: &Point2<f64>| if c % 2 == 0 { p.x } else { p.y };
                sections
                    .iter()
                    .map(|s| coordinate(&s.points()[c / 2]))
                    .collect()
            })
            .collect();
        let shape = Bundle::new(law, &radii, &columns)
            .ok_or_else(|| BladeError::Stations("non-finite section point".into()))?;
        Ok(Blade {
            chord: curve(&|s| s.chord)?,
            twist: curve(&|s| s.twist)?,
            sweep: curve(&|s| s.sweep)?,
            prebend: curve(&|s| s.prebend)?,
            shape,
            le_index: sections[0].leading_edge_index(),
            name: sections[0].name().to_string(),
            radii,
            stacking,
            side: match opts.flow {
                Flow::Turbine => 1.0,
                Flow::Propeller => -1.0,
            },
            mirror: opts.rotation == Rotation::Cw,
            root: None,
            tip: TipSpec::default(),
            transition: None,
        })
    }

    /// Adds a round shank and transition at the root (lengths in mm), after checking them
    /// against the first station.
    pub fn with_root(mut self, root: RootSpec) -> Result<Blade, BladeError> {
        root.validate()?;
        let face = self.radii[0] - root.transition_length - root.shank_length;
        // Lengths that add up to the first station's radius exactly leave a rounding
        // error, not a part behind the axis.
        if face < -1e-9 * self.radii[0].abs().max(1.0) {
            return Err(RootError::BehindAxis(face).into());
        }
        let mut root = root;
        let first = self.radii[0];
        let centre = self.place(
            &[Point2::origin()],
            first,
            self.twist.eval(first),
            self.sweep.eval(first),
            self.prebend.eval(first),
        )[0];
        root.centre = Some(Point2::new(centre.x, centre.y));
        self.root = Some(root);
        self.transition = Some(self.transition_parts());
        let (shank, air) = (self.shank_outline(), self.airfoil_outline(self.radii[0]));
        let travel = shank
            .iter()
            .zip(&air)
            .map(|(a, b)| (a - b).norm())
            .fold(0.0, f64::max);
        let given = self.root.as_ref().map_or(0.0, |r| r.transition_length);
        if given < travel {
            return Err(RootError::TransitionTooShort { given, travel }.into());
        }
        // Section area along the transition must be monotone (no waist).
        let (z0, z1) = (self.radii[0] - given, self.radii[0]);
        let areas: Vec<f64> = (0..=64)
            .map(|i| polygon_area(&self.outline(z0 + (z1 - z0) * i as f64 / 64.0).0))
            .collect();
        let (start, end) = (areas[0], areas[64]);
        let rising = end >= start;
        let slack = 1e-9 * start.max(end);
        let monotone = areas.windows(2).all(|w| {
            if rising {
                w[1] >= w[0] - slack
            } else {
                w[1] <= w[0] + slack
            }
        });
        if !monotone {
            let (lo, hi) = (start.min(end), start.max(end));
            let worst = areas
                .iter()
                .copied()
                .max_by(|a, b| {
                    let off = |x: f64| (lo - x).max(x - hi);
                    off(*a).total_cmp(&off(*b))
                })
                .unwrap_or(start);
            return Err(RootError::Waist {
                min_area: worst,
                start,
                end,
            }
            .into());
        }
        Ok(self)
    }

    /// Sets the tip closure.
    pub fn with_tip(mut self, tip: TipSpec) -> Result<Blade, BladeError> {
        if let Some(l) = tip.length {
            if !(l > 0.0 && l.is_finite()) {
                return Err(BladeError::TipLength(l));
            }
            let chord = self.chord_at(self.tip_radius());
            if l > MAX_TIP_CHORDS * chord {
                return Err(BladeError::TipTooLong { length: l, chord });
            }
        }
        self.tip = tip;
        Ok(self)
    }

    /// The root settings, if any.
    pub fn root(&self) -> Option<&RootSpec> {
        self.root.as_ref()
    }

    /// Radius of the root face (the first station without a shank), mm.
    pub fn root_face(&self) -> f64 {
        match &self.root {
            Some(r) => self.radii[0] - r.transition_length - r.shank_length,
            None => self.radii[0],
        }
    }

    /// Radius where the lofted skin starts: the root face, or the top of the flange's
    /// fillet when there is a flange (the flange itself is a mesh feature), mm.
    pub fn skin_start(&self) -> f64 {
        let flange = self.root.as_ref().and_then(|r| r.flange.as_ref());
        self.root_face() + flange.map_or(0.0, |f| f.thickness + f.fillet)
    }

    /// Radius of the tip end (the last station for a flat tip), mm.
    pub fn tip_end(&self) -> f64 {
        self.tip_radius() + self.tip_length()
    }

    fn tip_length(&self) -> f64 {
        match self.tip.shape {
            TipShape::Flat => 0.0,
            TipShape::Round => self
                .tip
                .length
                .unwrap_or(0.5 * self.chord_at(self.tip_radius())),
        }
    }

    /// The region a radius falls in.
    pub fn region(&self, r: f64) -> Region {
        let first = self.radii[0];
        if r > self.tip_radius() && self.tip.shape == TipShape::Round {
            Region::Tip
        } else if r >= first || self.root.is_none() {
            Region::Airfoil
        } else if r >= first - self.root.as_ref().map_or(0.0, |s| s.transition_length) {
            Region::Transition
        } else {
            Region::Shank
        }
    }

    /// Section outline in physical section coordinates (mm, stacking point at the
    /// origin, before twist, flow side and mirroring) at an airfoil radius.
    fn airfoil_outline(&self, r: f64) -> Vec<Point2<f64>> {
        let c = self.chord.eval(r);
        let unit = self.unit_outline(r);
        let s = self.stacking.point(r, &unit);
        unit.iter()
            .map(|p| Point2::new((p.x - s.x) * c, (p.y - s.y) * c))
            .collect()
    }

    /// The interpolated section at radius `r`: unit chord, section frame.
    fn unit_outline(&self, r: f64) -> Vec<Point2<f64>> {
        let values: Vec<f64> = self.shape.eval(r).collect();
        values
            .chunks_exact(2)
            .map(|p| Point2::new(p[0], p[1]))
            .collect()
    }

    /// Spanwise derivative of [`Blade::airfoil_outline`] (forward difference), mm/mm.
    fn airfoil_outline_slope(&self, r: f64, dir: f64) -> Vec<nalgebra::Vector2<f64>> {
        let h = 1e-5 * (self.tip_radius() - self.radii[0]) * dir;
        let (a, b) = (self.airfoil_outline(r), self.airfoil_outline(r + h));
        a.iter().zip(&b).map(|(p, q)| (q - p) / h).collect()
    }

    fn slope(f: &Curve, r: f64, h: f64) -> f64 {
        (f.eval(r + h) - f.eval(r)) / h
    }

    /// The shank outline (physical coordinates, centred on the stacking axis).
    fn shank_outline(&self) -> Vec<Point2<f64>> {
        let root = self.root.as_ref().expect("only called with a root");
        let n = self.le_index + 1;
        let xs = crate::airfoil::cosine_stations(n);
        let air = self.airfoil_outline(self.radii[0]);
        let gap = (air[0] - air[air.len() - 1]).norm();
        let (d, t) = (root.shank_diameter, root.thickness());
        let flat = root
            .flat_depth
            .map_or(f64::INFINITY, |depth| 0.5 * t - depth);
        let m = 2 * n - 1;
        (0..m)
            .map(|k| {
                let (i, sign) = if k < n {
                    (n - 1 - k, 1.0)
                } else {
                    (k - (n - 1), -1.0)
                };
                let x = xs[i];
                let mut y = if i == n - 1 {
                    0.5 * gap
                } else {
                    t * (x * (1.0 - x)).max(0.0).sqrt()
                };
                if sign < 0.0 {
                    // The flat against rotation clips the lower (pressure) side.
                    y = y.min(flat);
                }
                Point2::new((x - 0.5) * d, sign * y)
            })
            .collect()
    }

    /// Transition outline at parameter `s` (0 at the shank end, 1 at the first station),
    /// physical coordinates.
    ///
    /// The outline is a width `w(s)` times a normalised shape (outline divided by its
    /// width: shank diameter or chord), plus the Hermite slope term `h11(s) l dP/dr` that
    /// continues the blade's spanwise slope. With the Hermite weight
    /// `H(s) = 3s² - 2s³` (zero slope at both ends):
    /// * the width is blended geometrically, `w = d^(1-H) c^H`;
    /// * the normalised shape is blended linearly, `(1-g) N_shank + g N_airfoil`, with `g`
    ///   chosen so the section area follows a cubic Hermite law in `log(area)` from the
    ///   shank's area (zero slope) to the first station's (the blade's own slope).
    ///
    /// The area is then monotone whenever a C1 monotone law exists (checked in
    /// [`Blade::with_root`]): no waist and no bulge. Position and spanwise slope match the
    /// shank (zero slope) and the first station (the blade's own slope) at the ends, as
    /// `g` runs from 0 to 1 with zero slope at both ends. The trailing-edge points are
    /// held the first station's trailing-edge gap apart (Hermite in the gap, never below
    /// the first station's gap), so a blunt trailing edge keeps its printable thickness
    /// all along the transition.
    /// The shared parts of the transition outlines (see [`TransitionParts`]); only
    /// called with a root.
    fn transition_parts(&self) -> TransitionParts {
        let first = self.radii[0];
        let d = self.root.as_ref().map_or(1.0, |r| r.shank_diameter);
        let c = self.chord.eval(first);
        let shank = self.shank_outline();
        let air = self.airfoil_outline(first);
        let slope = self.airfoil_outline_slope(first, 1.0);
        let n0 = shank.iter().map(|p| p / d).collect();
        let n1 = air.iter().map(|p| p / c).collect();
        let (a0, a1) = (polygon_area(&shank), polygon_area(&air));
        let h = 1e-5 * (self.tip_radius() - first);
        let rel_slope = (polygon_area(&self.airfoil_outline(first + h)) / a1).ln() / h;
        TransitionParts {
            shank,
            air,
            slope,
            n0,
            n1,
            a0,
            a1,
            rel_slope,
        }
    }

    fn transition_outline(&self, s: f64) -> Vec<Point2<f64>> {
        let first = self.radii[0];
        // `with_root` sets the root and its transition parts together.
        let (Some(root), Some(parts)) = (self.root.as_ref(), self.transition.as_ref()) else {
            return self.airfoil_outline(first);
        };
        let (air, slope, n0, n1) = (&parts.air, &parts.slope, &parts.n0, &parts.n1);
        let (a0, a1, rel_slope) = (parts.a0, parts.a1, parts.rel_slope);
        let l = root.transition_length;
        let (hw, h11) = (3.0 * s * s - 2.0 * s * s * s, s * s * s - s * s);
        let (d, c) = (root.shank_diameter, self.chord.eval(first));
        let w = d.powf(1.0 - hw) * c.powf(hw);
        let blend = |g: f64| -> Vec<Point2<f64>> {
            (0..n0.len())
                .map(|k| {
                    Point2::from(
                        (n0[k].coords * (1.0 - g) + n1[k].coords * g) * w + slope[k] * (h11 * l),
                    )
                })
                .collect()
        };
        // Area law: cubic Hermite in log(area), zero slope at the shank, the blade's own
        // relative area change at the first station (so the area, like the outline, is
        // C1 there). Monotone when that slope agrees in sign with the change from shank
        // to first station and is at most three times its mean (Fritsch & Carlson,
        // "Monotone piecewise cubic interpolation", SIAM J. Numer. Anal. 17, 1980);
        // `with_root` checks the result.
        let target = (a0.ln() * (1.0 - hw) + a1.ln() * hw + h11 * l * rel_slope).exp();
        let g = if hw <= 0.0 {
            0.0
        } else if hw >= 1.0 {
            1.0
        } else {
            // The blend is affine in g, so its area (the shoelace sum) is the quadratic
            // through its areas at g = 0, 1/2 and 1; from near a0 to near a1: bisection
            // on that quadratic.
            let (q0, qh, q1) = (
                polygon_area(&blend(0.0)),
                polygon_area(&blend(0.5)),
                polygon_area(&blend(1.0)),
            );
            let (b, c2) = (4.0 * qh - 3.0 * q0 - q1, 2.0 * q1 - 4.0 * qh + 2.0 * q0);
            let area = |g: f64| q0 + g * (b + g * c2);
            let rising = q1 > q0;
            let (mut lo, mut hi) = (0.0f64, 1.0f64);
            for _ in 0..60 {
                let g = 0.5 * (lo + hi);
                if (area(g) < target) == rising {
                    lo = g;
                } else {
                    hi = g;
                }
            }
            0.5 * (lo + hi)
        };
        let mut pts = blend(g);
        let last = pts.len() - 1;
        let gap = air[0].y - air[last].y;
        // Never thinner than the first station's gap (where the gap grows outward the
        // slope term would dip below it; the kink that leaves in the gap's slope is
        // that growth rate, tiny for a gap held to a printable thickness).
        let half = (0.5 * (gap + h11 * l * (slope[0].y - slope[last].y))).max(0.5 * gap);
        let centre = 0.5 * (pts[0].y + pts[last].y);
        pts[0].y = centre + half;
        pts[last].y = centre - half;
        pts
    }

    /// Physical outline, twist (degrees), sweep and prebend (mm) at radius `r`.
    fn outline(&self, r: f64) -> (Vec<Point2<f64>>, f64, f64, f64) {
        let first = self.radii[0];
        let last = self.tip_radius();
        match self.region(r) {
            Region::Airfoil => (
                self.airfoil_outline(r),
                self.twist.eval(r),
                self.sweep.eval(r),
                self.prebend.eval(r),
            ),
            Region::Shank => (
                self.transition
                    .as_ref()
                    .map_or_else(|| self.shank_outline(), |t| t.shank.clone()),
                self.twist.eval(first),
                self.sweep.eval(first),
                self.prebend.eval(first),
            ),
            Region::Transition => {
                let l = self.root.as_ref().map_or(1.0, |s| s.transition_length);
                let s = ((r - (first - l)) / l).clamp(0.0, 1.0);
                let h11 = s * s * s - s * s;
                let pts = self.transition_outline(s);
                let h = 1e-5 * (last - first);
                let cont = |f: &Curve| f.eval(first) + h11 * l * Self::slope(f, first, h);
                (
                    pts,
                    cont(&self.twist),
                    cont(&self.sweep),
                    cont(&self.prebend),
                )
            }
            Region::Tip => {
                // Elliptic closure continuing the blade's slope at the last station.
                let l = self.tip_length();
                let dz = (r - last).clamp(0.0, l);
                let s = TIP_END_SIN * dz / l;
                let k = (1.0 - s * s).max(0.0).sqrt();
                let air = self.airfoil_outline(last);
                let slope = self.airfoil_outline_slope(last, -1.0);
                let pts = air
                    .iter()
                    .zip(&slope)
                    .map(|(p, d)| Point2::from((p.coords + d * dz) * k))
                    .collect();
                let h = -1e-5 * (last - first);
                let cont = |f: &Curve| f.eval(last) + dz * Self::slope(f, last, h);
                (
                    pts,
                    cont(&self.twist),
                    cont(&self.sweep),
                    cont(&self.prebend),
                )
            }
        }
    }

    /// How chord, twist, offsets and section shape vary between stations (the design's
    /// `blade.spanwise`), for the build summary.
    pub fn spanwise(&self) -> Law {
        self.chord.law()
    }

    /// Root radius (first station), mm.
    pub fn root_radius(&self) -> f64 {
        self.radii[0]
    }

    /// Tip radius (last station), mm.
    pub fn tip_radius(&self) -> f64 {
        self.radii[self.radii.len() - 1]
    }

    /// Station radii, mm.
    pub fn station_radii(&self) -> &[f64] {
        &self.radii
    }

    /// Index of the leading-edge point in every section.
    pub fn le_index(&self) -> usize {
        self.le_index
    }

    /// Chord at radius `r`, mm.
    pub fn chord_at(&self, r: f64) -> f64 {
        self.chord.eval(r)
    }

    /// Twist at radius `r`, degrees.
    pub fn twist_at(&self, r: f64) -> f64 {
        self.twist.eval(r)
    }

    /// The section shape (unit chord) at radius `r`.
    pub fn section_at(&self, r: f64) -> Section {
        Section::from_ordered(self.name.clone(), self.unit_outline(r), self.le_index)
            .expect("structure checked in Blade::new")
    }

    /// The stacking point at radius `r` in the section frame (unit chord, leading edge at
    /// the origin), on the interpolated section there (see [`stacking`]).
    pub fn stacking_point_at(&self, r: f64) -> Point2<f64> {
        self.stacking.point(r, &self.unit_outline(r))
    }

    /// The stacking rules and how far the section centroids sit off the axis.
    pub fn stacking(&self) -> StackingSummary {
        let mut radii = vec![self.radii[0]];
        for w in self.radii.windows(2) {
            let k = CENTROID_SAMPLES;
            radii.extend((1..=k).map(|i| w[0] + (w[1] - w[0]) * i as f64 / k as f64));
        }
        let (mut off, mut rel, mut at) = (0.0, 0.0, self.radii[0]);
        for r in radii {
            let Some(c) = stacking::centroid(&self.airfoil_outline(r)) else {
                continue;
            };
            let d = c.coords.norm();
            if d > off {
                (off, rel, at) = (d, d / self.chord_at(r), r);
            }
        }
        StackingSummary {
            rule: self.stacking.common_rule(),
            stations: self.stacking.stations().to_vec(),
            centroid_offset: off,
            centroid_offset_chord: rel,
            centroid_offset_radius: at,
        }
    }

    /// The stacking axis from the root face to the tip end, `n` (at least 2) points evenly
    /// spaced in radius plus every station: where the stacking point of each section lies
    /// in the blade frame (the sweep and prebend offsets, mirrored for a clockwise rotor).
    pub fn stacking_axis(&self, n: usize) -> Vec<Point3<f64>> {
        let (a, b) = (self.root_face(), self.tip_end());
        let k = n.max(2) - 1;
        let mut radii: Vec<f64> = (0..=k).map(|i| a + (b - a) * i as f64 / k as f64).collect();
        radii.extend(self.radii.iter().copied());
        radii.sort_by(f64::total_cmp);
        radii.dedup_by(|x, y| (*x - *y).abs() < 1e-9);
        radii.into_iter().map(|r| self.axis_point(r)).collect()
    }

    /// The point of the stacking axis at radius `r` (any region), in the blade frame.
    pub fn axis_point(&self, r: f64) -> Point3<f64> {
        let (_, twist, dx, dy) = self.outline(r);
        self.place(&[Point2::origin()], r, twist, dx, dy)[0]
    }

    /// Places a physical outline at radius `r` with twist (degrees) and offsets, following
    /// [`crate::conventions`].
    fn place(
        &self,
        outline: &[Point2<f64>],
        r: f64,
        twist_deg: f64,
        dx: f64,
        dy: f64,
    ) -> Vec<Point3<f64>> {
        let (s, c) = twist_deg.to_radians().sin_cos();
        let mirror = if self.mirror { -1.0 } else { 1.0 };
        outline
            .iter()
            .map(|p| {
                let (u, v) = (p.x, self.side * p.y);
                Point3::new(mirror * (u * c - v * s + dx), u * s + v * c + dy, r)
            })
            .collect()
    }

    /// The placed section at radius `r` (any region).
    pub fn ring(&self, r: f64) -> Ring {
        let (outline, twist, dx, dy) = self.outline(r);
        let chord = match self.region(r) {
            Region::Airfoil => self.chord_at(r),
            _ => {
                let xs = outline.iter().map(|p| p.x);
                xs.clone().fold(f64::MIN, f64::max) - xs.fold(f64::MAX, f64::min)
            }
        };
        Ring {
            radius: r,
            chord,
            twist,
            points: self.place(&outline, r, twist, dx, dy),
        }
    }

    /// Section area at radius `r`, mm² (of the outline polygon).
    pub fn area_at(&self, r: f64) -> f64 {
        polygon_area(&self.outline(r).0)
    }

    /// Radii at which to start placing the loft's rings ([`crate::rings::place_rings`] adds
    /// more where the skin strays from the blade), root face to tip end: every station,
    /// evenly spaced radii between stations no farther apart than `max_spacing` (mm), at
    /// least 2 rings along the shank, 4 along the transition, and rings clustered toward
    /// the end of a round tip (even steps of the elliptic angle).
    pub fn ring_radii(&self, max_spacing: f64) -> Vec<f64> {
        let mut out = Vec::new();
        let push_range = |out: &mut Vec<f64>, a: f64, b: f64, min_steps: usize| {
            let k = (((b - a) / max_spacing).ceil() as usize)
                .max(min_steps)
                .max(1);
            for i in 1..k {
                out.push(a + (b - a) * i as f64 / k as f64);
            }
            out.push(b);
        };
        out.push(self.skin_start());
        if let Some(root) = &self.root {
            let shank_end = self.radii[0] - root.transition_length;
            if shank_end > self.skin_start() {
                push_range(&mut out, self.skin_start(), shank_end, 2);
            }
            push_range(&mut out, shank_end, self.radii[0], 4);
        }
        for w in self.radii.windows(2) {
            push_range(&mut out, w[0], w[1], 1);
        }
        if self.tip.shape == TipShape::Round {
            let (last, l) = (self.tip_radius(), self.tip_length());
            let phi_end = TIP_END_SIN.asin();
            let k = 8;
            for i in 1..=k {
                let phi = phi_end * i as f64 / k as f64;
                out.push(last + l * phi.sin() / TIP_END_SIN);
            }
        }
        out
    }
}
