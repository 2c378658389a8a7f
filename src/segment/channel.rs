//! The spar channel: a straight round hole parallel to the span for a rod or tube.
//!
//! # Where it starts
//! At the root face when that face is plain (no `root.flange`, `root.bore` or
//! `root.cross-holes`): the channel opens there. Otherwise the root's features own the
//! root face and the middle of the shank, so the channel starts blind, `min-wall` beyond
//! the farthest of them (the bore's drill point, the cross holes, the flange's fillet),
//! its own drill point included; a rod then goes in from a split face, so such a channel
//! needs the blade split beyond its start. `spar-channel.start` moves the start outward.
//!
//! # The axis rule
//! The axis is the line parallel to the span (z) through the point `(x, y)` that carries
//! the channel farthest: call *clearance* of a point at a radius its distance inside the
//! skin's outline there (measured on the mesh's grid rows, see [`super::outline`]). The
//! channel needs a clearance of at least `need = hole radius + min-wall + 2 x mesh
//! tolerance` at every radius it passes, its drill point included. For a radius `R` let
//! `best(R)` be the largest, over points, of the smallest clearance over the rows from
//! the start to `R`; the **reach** is the farthest row radius `R` with
//! `best(R) >= need`, and the **axis** is the point that attains `best(reach)`: among
//! the points that reach as far, the one with the most wall to spare. A given
//! `spar-channel.axis` replaces the rule; the reach is then where its clearance first
//! falls short.
//!
//! # Where it ends
//! The straight part ends where its drill point just fits inside the reach and keeps
//! `min-wall` to the tip's end face (or at `spar-channel.end`, which must not lie beyond
//! that). The rod to cut is the straight
//! part's length. A channel must run at least [`MIN_ENGAGEMENT`] rod diameters, or it is
//! refused with the widest rod that would.

use super::outline::{deepest_point, grid_start, smallest_clearance, Outline, Outlines};
use super::spec::{point_depth, ChannelSpec};
use super::SegmentError;
use crate::loft::Skin;
use crate::root::RootSpec;
use nalgebra::Point2;

/// A channel must run at least this many hole diameters (and a rod engage a joint's
/// side at least as far): a glued round joint engages about two diameters (common
/// practice).
pub const MIN_ENGAGEMENT: f64 = 2.0;

/// How the axis was found.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum AxisRule {
    /// Given in the design (`spar-channel.axis`).
    Given,
    /// The point that carries the channel farthest with the wall kept (module docs).
    Farthest,
}

/// A planned channel (mm, blade frame).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Channel {
    /// Axis `[x, y]`: the channel runs along z through it.
    pub axis: [f64; 2],
    /// How the axis was found.
    pub rule: AxisRule,
    /// The rod's diameter.
    pub rod_diameter: f64,
    /// The hole's diameter (rod plus clearance).
    pub hole_diameter: f64,
    /// Radius where the hole begins (its mouth at the root face, or its blind start).
    pub start: f64,
    /// True when it opens at the root face; else it starts blind and a rod goes in from
    /// a split face.
    pub opens_at_root: bool,
    /// Radius where the straight part ends.
    pub end: f64,
    /// Axial depth of the drill points at the blind ends (0: flat).
    pub point_depth: f64,
    /// Farthest radius at which the wall holds for this axis.
    pub reach: f64,
    /// Rod length to cut: the straight part, `end - start`.
    pub rod_length: f64,
    /// Wall required to the skin (the design's `min-wall`).
    pub min_wall: f64,
    /// Smallest wall left between the hole and the skin's rows, and where.
    pub smallest_wall: f64,
    /// Radius of the smallest wall.
    pub smallest_wall_at: f64,
}

impl Channel {
    /// Radius of the hole.
    pub fn hole_radius(&self) -> f64 {
        0.5 * self.hole_diameter
    }

    /// The radii the hole occupies, drill points included.
    pub fn occupies(&self) -> (f64, f64) {
        let lo = if self.opens_at_root {
            self.start
        } else {
            self.start - self.point_depth
        };
        (lo, self.end + self.point_depth)
    }

    /// The axis as a point.
    pub fn axis_point(&self) -> Point2<f64> {
        Point2::new(self.axis[0], self.axis[1])
    }

    /// The engagement a rod needs on each side of a joint, mm.
    pub fn engagement(&self) -> f64 {
        MIN_ENGAGEMENT * self.hole_diameter
    }
}

/// Radius beyond which the root's features (flange and fillet, bore and its point, cross
/// holes) leave the middle of the blade free; the root face when there are none.
pub fn root_features_end(root: Option<&RootSpec>, face: f64) -> f64 {
    let Some(r) = root else { return face };
    let mut end = face;
    if let Some(f) = &r.flange {
        end = end.max(face + f.thickness + f.fillet);
    }
    if let Some(b) = &r.bore {
        end = end.max(face + b.depth + r.bore_point_depth());
    }
    for h in &r.cross_holes {
        end = end.max(face + h.at + 0.5 * h.diameter);
    }
    end
}

/// True when the root face is a plain cap a channel can open through.
pub fn plain_root_face(root: Option<&RootSpec>) -> bool {
    root.is_none_or(|r| r.flange.is_none() && r.bore.is_none() && r.cross_holes.is_empty())
}

/// What the channel planner needs to know of the blade.
#[derive(Debug, Clone, Copy)]
pub struct ChannelInput<'a> {
    /// The surface model.
    pub skin: &'a Skin,
    /// The grid's columns (the mesh's vertices around every row).
    pub us: &'a [f64],
    /// The grid rows' outlines.
    pub outlines: &'a Outlines,
    /// The root table, when there is one.
    pub root: Option<&'a RootSpec>,
    /// Radius of the root face, mm.
    pub root_face: f64,
    /// Mesh tolerance, mm.
    pub tolerance: f64,
}

/// Plans the channel (see the module docs).
///
/// # Errors
/// [`SegmentError::Key`] for a start or end that cannot be; [`SegmentError::ChannelTooThin`]
/// when no axis keeps the wall over the shortest useful length, or up to the given end,
/// naming the widest rod that would.
pub fn plan_channel(input: &ChannelInput<'_>, spec: &ChannelSpec) -> Result<Channel, SegmentError> {
    spec.validate()?;
    let start = Start::of(input, spec)?;
    let course = Course::from(input, spec, &start)?;
    let axis = course.axis()?;
    let reach = course.rows[axis.k_reach].z;
    let end = course.end(reach)?;
    Ok(finish(
        Channel {
            axis: [axis.point.x, axis.point.y],
            rule: axis.rule,
            rod_diameter: spec.diameter,
            hole_diameter: 2.0 * course.rc,
            start: start.radius,
            opens_at_root: start.opens,
            end,
            point_depth: course.cone,
            reach,
            rod_length: end - start.radius,
            min_wall: spec.min_wall,
            smallest_wall: 0.0,
            smallest_wall_at: start.radius,
        },
        &course.rows,
    ))
}

/// Where the channel starts.
struct Start {
    /// Radius of the hole's mouth at the root face, or of its blind start, mm.
    radius: f64,
    /// True when it opens at the root face.
    opens: bool,
}

impl Start {
    /// The given start, checked against the root's face and features and the tip; or
    /// the root face when it is plain, else just beyond the root's features.
    fn of(input: &ChannelInput<'_>, spec: &ChannelSpec) -> Result<Start, SegmentError> {
        let cone = point_depth(spec.hole_radius(), spec.point_angle);
        let (_, last) = input.outlines.span();
        let plain = plain_root_face(input.root);
        let features = root_features_end(input.root, input.root_face);
        let (start, opens) = match spec.start {
            Some(s) if s <= input.root_face + 1e-9 => {
                if !plain {
                    return Err(SegmentError::key(
                        "spar-channel.start",
                        format!(
                            "{s:.2} mm is the root face, which carries the root's flange, bore or cross holes; start the channel at {:.2} mm or beyond (their end plus the wall and the drill point), or remove them so the channel opens at the root face",
                            features + spec.min_wall + cone
                        ),
                    ));
                }
                (input.root_face, true)
            }
            Some(s) => {
                let least = if plain {
                    input.root_face + spec.min_wall + cone
                } else {
                    features + spec.min_wall + cone
                };
                if s < least - 1e-9 {
                    return Err(SegmentError::key(
                        "spar-channel.start",
                        format!("{s:.2} mm leaves less than spar-channel.min-wall before the root's features or face (with the drill point): start at {least:.2} mm or beyond"),
                    ));
                }
                (s, false)
            }
            None if plain => (input.root_face, true),
            None => (features + spec.min_wall + cone, false),
        };
        if start >= last {
            return Err(SegmentError::key(
                "spar-channel.start",
                format!("{start:.2} mm is beyond the blade (its tip is at {last:.2} mm)"),
            ));
        }
        Ok(Start {
            radius: start,
            opens,
        })
    }
}

/// The outlines a channel from a start passes, and what it must keep there.
struct Course<'s> {
    spec: &'s ChannelSpec,
    /// Outlines from the hole's lowest point (its drill point when blind) outward.
    rows: Vec<Outline>,
    /// Radius where the channel starts, mm.
    start: f64,
    /// Radius of the blade's outer end, mm.
    last: f64,
    /// Radius of the hole, mm.
    rc: f64,
    /// Axial depth of the drill point, mm.
    cone: f64,
    /// Allowance for the mesh tolerance, mm.
    margin: f64,
    /// Clearance the axis needs to every outline: the hole, the wall and the margin, mm.
    need: f64,
    /// The shortest useful channel, mm.
    length_min: f64,
    /// Index of the first row beyond the shortest useful channel (its point included).
    k_min: usize,
}

/// The channel's axis and how far it keeps the wall.
struct Axis {
    point: Point2<f64>,
    rule: AxisRule,
    /// Index of the last row where the wall holds.
    k_reach: usize,
}

impl<'s> Course<'s> {
    /// The rows from the start outward.
    ///
    /// # Errors
    /// [`SegmentError::ChannelTooThin`] when the blade ends before the shortest useful
    /// channel.
    fn from(
        input: &ChannelInput<'_>,
        spec: &'s ChannelSpec,
        start: &Start,
    ) -> Result<Self, SegmentError> {
        let rc = spec.hole_radius();
        let cone = point_depth(rc, spec.point_angle);
        let margin = 2.0 * input.tolerance;
        let (first, last) = input.outlines.span();
        let low = if start.opens {
            start.radius
        } else {
            start.radius - cone
        };
        let mut rows: Vec<Outline> = Vec::new();
        if let Some(o) = Outline::at(input.skin, input.us, low.max(first + 1e-9)) {
            rows.push(o);
        }
        rows.extend(input.outlines.between(low, last).iter().cloned());
        let length_min = MIN_ENGAGEMENT * 2.0 * rc;
        let least_reach = start.radius + length_min + cone;
        let k_min = rows.partition_point(|o| o.z < least_reach);
        if k_min >= rows.len() {
            return Err(SegmentError::ChannelTooThin {
                what: "the blade is shorter than the shortest useful channel beyond its start"
                    .into(),
                start: start.radius,
                widest_rod: None,
                min_wall: spec.min_wall,
            });
        }
        Ok(Course {
            spec,
            rows,
            start: start.radius,
            last,
            rc,
            cone,
            margin,
            need: rc + spec.min_wall + margin,
            length_min,
            k_min,
        })
    }

    /// The widest rod whose channel keeps the wall up to row `k`.
    fn widest(&self, k: usize) -> Option<f64> {
        let spec = self.spec;
        let slice: Vec<&Outline> = self.rows[..=k].iter().collect();
        let (_, c) = deepest(&slice, spec.axis);
        let d = 2.0 * (c - spec.min_wall - self.margin) - spec.clearance;
        (d > 0.0).then_some(d)
    }

    /// A channel too thin at row `k` for `what`.
    fn too_thin(&self, what: String, k: usize) -> SegmentError {
        SegmentError::ChannelTooThin {
            what,
            start: self.start,
            widest_rod: self.widest(k),
            min_wall: self.spec.min_wall,
        }
    }

    /// The given axis and how far it keeps the wall, or the axis that keeps it
    /// farthest.
    fn axis(&self) -> Result<Axis, SegmentError> {
        let Some([x, y]) = self.spec.axis else {
            return self.farthest();
        };
        let p = Point2::new(x, y);
        let rows = &self.rows;
        let k = match rows.iter().position(|o| o.clearance(&p) < self.need) {
            None => Some(rows.len() - 1),
            Some(0) => None,
            Some(k) => Some(k - 1),
        };
        let Some(k) = k.filter(|&k| k >= self.k_min) else {
            return Err(self.too_thin(
                format!(
                    "the given axis ({x:.2}, {y:.2}) does not keep the wall for {:.1} mm from the start",
                    self.length_min
                ),
                self.k_min,
            ));
        };
        Ok(Axis {
            point: p,
            rule: AxisRule::Given,
            k_reach: k,
        })
    }

    /// The axis that keeps the wall farthest: the best clearance over the rows up to
    /// `k` does not grow with `k`, so bisect on the row index.
    fn farthest(&self) -> Result<Axis, SegmentError> {
        let ok = |k: usize| {
            let slice: Vec<&Outline> = self.rows[..=k].iter().collect();
            deepest(&slice, None).1 >= self.need
        };
        if !ok(self.k_min) {
            return Err(self.too_thin(
                format!(
                    "no axis keeps the wall for {:.1} mm from the start",
                    self.length_min
                ),
                self.k_min,
            ));
        }
        let (mut lo, mut hi) = (self.k_min, self.rows.len() - 1);
        if ok(hi) {
            lo = hi;
        }
        while hi - lo > 1 {
            let mid = (lo + hi) / 2;
            if ok(mid) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        let slice: Vec<&Outline> = self.rows[..=lo].iter().collect();
        Ok(Axis {
            point: deepest(&slice, None).0,
            rule: AxisRule::Farthest,
            k_reach: lo,
        })
    }

    /// Where the straight part ends: the given end, or where the wall holds with the
    /// drill point (the drill point also keeps the wall to the tip's end face).
    fn end(&self, reach: f64) -> Result<f64, SegmentError> {
        let (spec, cone) = (self.spec, self.cone);
        let mut end = reach.min(self.last - spec.min_wall) - cone;
        if let Some(e) = spec.end {
            if e > end + 1e-9 {
                let k = self
                    .rows
                    .partition_point(|o| o.z < e + cone)
                    .min(self.rows.len() - 1);
                return Err(self.too_thin(
                    format!(
                        "spar-channel.end = {e:.2} mm lies beyond where the wall holds (the straight part can end at {end:.2} mm, the reach {reach:.2} mm less the drill point)"
                    ),
                    k,
                ));
            }
            end = e;
        }
        if end < self.start + self.length_min {
            return Err(SegmentError::ChannelTooThin {
                what: format!(
                    "the channel would end at {end:.1} mm, less than {:.1} mm beyond its start",
                    self.length_min
                ),
                start: self.start,
                widest_rod: None,
                min_wall: spec.min_wall,
            });
        }
        Ok(end)
    }
}

/// The widest rod (to 0.05 mm, at most the spec's) whose channel reaches past
/// `radius` by a rod's engagement, or `None`.
pub fn widest_reaching(input: &ChannelInput<'_>, spec: &ChannelSpec, radius: f64) -> Option<f64> {
    let reaches = |d: f64| {
        let s = ChannelSpec {
            diameter: d,
            end: None,
            ..spec.clone()
        };
        plan_channel(input, &s).is_ok_and(|c| c.end >= radius + c.engagement())
    };
    let (mut lo, mut hi) = (0.1, spec.diameter);
    if !reaches(lo) {
        return None;
    }
    while hi - lo > 0.05 {
        let mid = 0.5 * (lo + hi);
        if reaches(mid) {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(lo)
}

/// The channel with its smallest wall measured on the rows it passes.
pub fn finish(mut c: Channel, rows: &[Outline]) -> Channel {
    let (lo, hi) = c.occupies();
    let p = c.axis_point();
    let (mut w, mut at) = (f64::INFINITY, c.start);
    for o in rows.iter().filter(|o| o.z >= lo && o.z <= hi) {
        let wall = o.clearance(&p) - c.hole_radius();
        if wall < w {
            (w, at) = (wall, o.z);
        }
    }
    c.smallest_wall = w;
    c.smallest_wall_at = at;
    c.rod_length = c.end - c.start;
    c
}

/// The deepest point over `rows` (or the given axis and its smallest clearance).
fn deepest(rows: &[&Outline], axis: Option<[f64; 2]>) -> (Point2<f64>, f64) {
    if let Some([x, y]) = axis {
        let p = Point2::new(x, y);
        return (
            p,
            smallest_clearance(rows.iter().copied(), &p, f64::NEG_INFINITY),
        );
    }
    let last = rows[rows.len() - 1];
    // Start from the deepest point of the outermost (tightest) row, then the compass
    // search over all of them, binding rows first.
    let start = grid_start(last, 24);
    let (mut lo, mut hi) = (last.points[0], last.points[0]);
    for q in &last.points {
        lo = lo.inf(q);
        hi = hi.sup(q);
    }
    let step = 0.25 * (hi - lo).min();
    let ordered: Vec<&Outline> = rows.iter().rev().copied().collect();
    deepest_point(&ordered, start, step.max(0.01), 1e-3)
}
