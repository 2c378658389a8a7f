//! Where to split: the fewest segments that fit the printer, or the radii given.
//!
//! # Does a segment fit?
//! A segment from radius `a` to `b` fits when the printer-fit stage's own orientation
//! search finds an orientation for it ([`crate::fit::fit_extents`]: the branch and bound
//! of [`crate::fit::fit_part`] without the choice of a pose). Fitting depends only on the
//! part's convex hull, so the search is given points whose hull is the segment's: the
//! convex hull of each grid row's outline between `a` and `b`, the outlines at `a` and
//! `b`, and (for the root segment) the root's flange. While planning, rows at least
//! [`PLAN_ROW_SPACING`] apart stand for the rest, each hull is thinned to within a
//! quarter of the planning slack, the printer's margin is grown by the slack
//! ([`PLAN_SLACK`]) and the search runs with [`PLAN_FIT`]; every segment built is then
//! checked again on all of its hull points with the printer as given and the search's
//! default options (see [`super::segment`]), and the plan is made again with three
//! times the slack should one not fit.
//!
//! Fitting is monotone: a segment inside one that fits also fits (its points lie inside
//! the larger one's hull).
//!
//! # The count
//! From the root, each segment is made as long as it fits, ending at the farthest radius
//! where a joint can be (greedy, which gives the fewest segments for a monotone test);
//! the same from the tip gives, for each split, the innermost radius that still leaves the
//! rest coverable. With a spar channel the first joint must lie a rod's engagement
//! before the channel's end, so that the rod joins the first two segments. A **joint can
//! be** at a radius when its pins fit there
//! ([`super::dowels`]) and it lies a pin's depth and drill point plus the wall beyond
//! the root's features and before the tip end.
//!
//! # Each radius
//! Splits are chosen root to tip. Split `k` may lie in its *window*: from the innermost
//! radius that leaves the rest coverable to the farthest the segment before it reaches.
//! Within it, among radii where a joint can be (searched every [`CANDIDATE_STEP`] mm):
//! radii outside the root transition (shank end to first station) when there are any;
//! then the radius nearest the *even target*, which would make the remaining segments
//! equally long. Each split records its window, its target and what kept it from the
//! target ([`Split`]).

use super::outline::{Outline, Outlines};
use super::SegmentError;
use crate::fit::{hull, FitOptions, Printer};
use crate::loft::Skin;
use crate::mesh::TriMesh;
use nalgebra::{Point2, Point3};
use std::collections::BTreeMap;
use std::sync::Mutex;

/// Extra margin kept from the printer's walls while planning (covering the thinned
/// rows and hulls), mm.
pub const PLAN_SLACK: f64 = 0.5;
/// Rows closer than this to the last one kept are left out while planning, mm.
pub const PLAN_ROW_SPACING: f64 = 3.0;
/// Spacing of the radii tried for a joint, mm.
pub const CANDIDATE_STEP: f64 = 1.0;
/// Precision of the farthest fitting radius, mm.
const REACH_PRECISION: f64 = 1.0;
/// The search's options while planning: a coarser angle, fewer support directions and
/// a cap on the directions tried. Each can only make the search miss a fit, never find
/// a false one (its fits are checked on every point), so planning errs toward shorter
/// segments; the segments built are checked with the default options.
pub const PLAN_FIT: FitOptions = FitOptions {
    resolution_deg: 1.0,
    support_directions: 200,
    tolerance: FitOptions::DEFAULT.tolerance,
    max_evaluations: 1500,
    print: FitOptions::DEFAULT.print,
};

/// Why a split sits where it does (plain data; the commands print it).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Split {
    /// Radius of the split plane, mm.
    pub radius: f64,
    /// Given in the design or on the command line.
    pub given: bool,
    /// Radii where this split keeps every segment printable with the planned count
    /// (automatic plans).
    pub window: Option<[f64; 2]>,
    /// The radius that would make the remaining segments equally long (automatic).
    pub target: Option<f64>,
    /// Radii between the target and the radius chosen that were passed over, and why.
    pub passed_over: Vec<PassedOver>,
}

/// A stretch of radii a split was kept out of.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PassedOver {
    /// From this radius, mm.
    pub from: f64,
    /// To this radius, mm.
    pub to: f64,
    /// Why.
    pub why: Avoid,
}

/// Why a radius was not taken for a split.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Avoid {
    /// The root transition, where the outline changes from the shank to the airfoil.
    Transition,
    /// Too thin for the joint's pins (and channel) with the wall kept.
    TooThin,
    /// Outside the window: a segment would not fit the printer.
    Printer,
}

impl std::fmt::Display for Avoid {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            Avoid::Transition => "the root transition",
            Avoid::TooThin => "too thin for the pins with the wall kept",
            Avoid::Printer => "a segment would not fit the printer",
        })
    }
}

impl std::fmt::Display for Split {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{:.1} mm", self.radius)?;
        if self.given {
            return write!(f, " (given)");
        }
        if let Some(t) = self.target {
            write!(f, ": even lengths aim at {t:.1} mm")?;
        }
        for p in &self.passed_over {
            write!(f, "; {:.1}..{:.1} mm passed over: {}", p.from, p.to, p.why)?;
        }
        if let Some([a, b]) = self.window {
            write!(f, "; the printer allows {a:.1}..{b:.1} mm with this count")?;
        }
        Ok(())
    }
}

/// Where splits may go and what the planner knows of the blade.
pub struct Frame<'a> {
    /// The surface model.
    pub skin: &'a Skin,
    /// Grid columns.
    pub us: &'a [f64],
    /// The grid rows' outlines.
    pub outlines: &'a Outlines,
    /// The built blade's mesh (its root features join the root segment's points).
    pub mesh: &'a TriMesh,
    /// Radius of the part's lowest point (the root face), mm.
    pub part_start: f64,
    /// Radius where the skin starts (the root face, or the flange's top), mm.
    pub skin_start: f64,
    /// Radius of the tip end, mm.
    pub part_end: f64,
    /// Innermost and outermost radius a joint may have, mm.
    pub joint_range: (f64, f64),
    /// The root transition (shank end to first station), when there is one.
    pub transition: Option<(f64, f64)>,
    /// Shortest segment between two joints, mm.
    pub min_length: f64,
    /// Farthest radius for the first joint: the spar channel's end less a rod's
    /// engagement, so that the rod joins the root segment to the next.
    pub first_joint_max: Option<f64>,
}

/// The test "does the segment from `a` to `b` fit": the printer-fit search on the
/// segment's hull points (module docs).
pub struct FitTest<'a> {
    frame: &'a Frame<'a>,
    printer: Printer,
    options: FitOptions,
    rows: Vec<(f64, Vec<Point2<f64>>)>,
    base: Vec<Point3<f64>>,
    slack: f64,
    /// Answers by segment (ends in micrometres).
    memo: Mutex<BTreeMap<(i64, i64), bool>>,
}

impl<'a> FitTest<'a> {
    /// A test for `printer`, with the margin grown by `slack` mm.
    pub fn new(frame: &'a Frame<'a>, printer: &Printer, slack: f64) -> FitTest<'a> {
        let mut p = *printer;
        p.margin += slack;
        let mut rows = Vec::new();
        let mut last = f64::NEG_INFINITY;
        let n = frame.outlines.rows.len();
        for (k, o) in frame.outlines.rows.iter().enumerate() {
            if o.z - last >= PLAN_ROW_SPACING || k + 1 == n {
                rows.push((o.z, thin(&hull_of(o), 0.25 * slack)));
                last = o.z;
            }
        }
        let base = frame
            .mesh
            .vertices
            .iter()
            .filter(|v| v.z < frame.skin_start - 1e-9)
            .copied()
            .collect();
        FitTest {
            frame,
            printer: p,
            options: PLAN_FIT,
            rows,
            base,
            slack,
            memo: Mutex::new(BTreeMap::new()),
        }
    }

    /// Number of distinct segments searched so far (the same on any thread count: two
    /// threads asking the same question at once both search, but it is one question).
    pub fn calls(&self) -> usize {
        self.lock().len()
    }

    /// True when the segment from `a` to `b` fits (each question asked once).
    pub fn fits(&self, a: f64, b: f64) -> bool {
        let key = ((a * 1e3).round() as i64, (b * 1e3).round() as i64);
        if let Some(&v) = self.lock().get(&key) {
            return v;
        }
        let v = self.search(a, b);
        self.lock().insert(key, v);
        v
    }

    fn lock(&self) -> std::sync::MutexGuard<'_, BTreeMap<(i64, i64), bool>> {
        self.memo.lock().unwrap_or_else(|e| e.into_inner())
    }

    fn search(&self, a: f64, b: f64) -> bool {
        let mut pts: Vec<Point3<f64>> = Vec::new();
        for z in [a, b] {
            let o = if z <= self.frame.skin_start + 1e-9 {
                self.frame.outlines.rows.first().cloned()
            } else if z >= self.frame.part_end - 1e-9 {
                self.frame.outlines.rows.last().cloned()
            } else {
                Outline::at(self.frame.skin, self.frame.us, z)
            };
            if let Some(o) = o {
                pts.extend(
                    thin(&hull_of(&o), 0.25 * self.slack)
                        .iter()
                        .map(|p| Point3::new(p[0], p[1], o.z)),
                );
            }
        }
        for (z, h) in &self.rows {
            if *z > a && *z < b {
                pts.extend(h.iter().map(|p| Point3::new(p[0], p[1], *z)));
            }
        }
        if a <= self.frame.part_start + 1e-9 {
            pts.extend(self.base.iter().copied());
        }
        points_fit(&pts, &self.printer, &self.options)
    }
}

/// True when the printer-fit search places the points ([`crate::fit::fit_extents`]).
pub fn points_fit(points: &[Point3<f64>], printer: &Printer, options: &FitOptions) -> bool {
    crate::fit::fit_extents(points, printer, options).is_some()
}

/// The convex hull of an outline.
fn hull_of(o: &Outline) -> Vec<Point2<f64>> {
    hull::convex_hull(&o.points)
}

/// A convex polygon with vertices left out where the polygon moves inward by at most
/// `eps` (mm): every kept edge stays within `eps` of the vertices it skips.
fn thin(poly: &[Point2<f64>], eps: f64) -> Vec<Point2<f64>> {
    let n = poly.len();
    if n <= 8 || eps <= 0.0 {
        return poly.to_vec();
    }
    let dist = |p: Point2<f64>, a: Point2<f64>, b: Point2<f64>| {
        let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
        let l = dx.hypot(dy);
        if l == 0.0 {
            (p[0] - a[0]).hypot(p[1] - a[1])
        } else {
            ((p[0] - a[0]) * dy - (p[1] - a[1]) * dx).abs() / l
        }
    };
    let mut out = vec![poly[0]];
    let mut i = 0;
    while i + 1 < n {
        let mut j = i + 1;
        while j + 1 < n && (i + 1..=j).all(|k| dist(poly[k], poly[i], poly[j + 1]) <= eps) {
            j += 1;
        }
        out.push(poly[j]);
        i = j;
    }
    out
}

/// The planner's state: the fit test, where joints can be (cached), the frame.
pub struct Planner<'a, 'f> {
    /// Where splits may go.
    pub frame: &'a Frame<'a>,
    /// The fit test.
    pub test: &'a FitTest<'f>,
    joint_ok: Mutex<BTreeMap<i64, bool>>,
    can_join: &'a (dyn Fn(f64) -> bool + Sync),
    diagonal: f64,
}

impl<'a, 'f> Planner<'a, 'f> {
    /// A planner; `can_join(r)` says whether a joint's pins fit at radius `r`.
    pub fn new(
        frame: &'a Frame<'a>,
        test: &'a FitTest<'f>,
        can_join: &'a (dyn Fn(f64) -> bool + Sync),
    ) -> Self {
        let (a, b, h) = test.printer.available();
        Planner {
            frame,
            test,
            joint_ok: Mutex::new(BTreeMap::new()),
            can_join,
            diagonal: (a * a + b * b + h * h).sqrt(),
        }
    }

    /// Whether a joint can be at `r` (cached).
    fn joint(&self, r: f64) -> bool {
        let (lo, hi) = self.frame.joint_range;
        if r < lo - 1e-9 || r > hi + 1e-9 {
            return false;
        }
        let key = (r * 1000.0).round() as i64;
        let cached = self
            .joint_ok
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .get(&key)
            .copied();
        if let Some(v) = cached {
            return v;
        }
        let v = (self.can_join)(r);
        self.joint_ok
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .insert(key, v);
        v
    }

    /// Candidate radii of the grid (every [`CANDIDATE_STEP`] from the innermost joint
    /// radius), from `lo` up to `hi`.
    fn grid(&self, lo: f64, hi: f64) -> Vec<f64> {
        let (jlo, jhi) = self.frame.joint_range;
        let (lo, hi) = (lo.max(jlo), hi.min(jhi));
        if hi < lo {
            return Vec::new();
        }
        let k0 = ((lo - jlo) / CANDIDATE_STEP - 1e-9).ceil() as i64;
        let k1 = ((hi - jlo) / CANDIDATE_STEP + 1e-9).floor() as i64;
        (k0..=k1).map(|k| jlo + k as f64 * CANDIDATE_STEP).collect()
    }

    /// The farthest radius the segment from `a` reaches while fitting (or the tip end).
    pub fn reach(&self, a: f64) -> f64 {
        let end = self.frame.part_end;
        if self.test.fits(a, end) {
            return end;
        }
        let (mut lo, mut hi) = (a, end.min(a + self.diagonal));
        if hi < end && self.test.fits(a, hi) {
            lo = hi;
            hi = end;
        }
        while hi - lo > REACH_PRECISION {
            let mid = 0.5 * (lo + hi);
            if self.test.fits(a, mid) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        lo
    }

    /// The innermost radius from which a segment reaching `b` fits.
    pub fn back_reach(&self, b: f64) -> f64 {
        let start = self.frame.part_start;
        if self.test.fits(start, b) {
            return start;
        }
        let (mut lo, mut hi) = ((b - self.diagonal).max(start), b);
        if lo > start && self.test.fits(lo, b) {
            hi = lo;
            lo = start;
        }
        while hi - lo > REACH_PRECISION {
            let mid = 0.5 * (lo + hi);
            if self.test.fits(mid, b) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        hi
    }

    /// The farthest joint radius at or below `b` and beyond `a + min_length`.
    fn last_joint(&self, a: f64, b: f64) -> Option<f64> {
        self.grid(a + self.frame.min_length, b)
            .into_iter()
            .rev()
            .find(|&r| self.joint(r))
    }

    /// The innermost joint radius at or beyond `a`, below `b - min_length`.
    fn first_joint(&self, a: f64, b: f64) -> Option<f64> {
        self.grid(a, b - self.frame.min_length)
            .into_iter()
            .find(|&r| self.joint(r))
    }

    /// Greedy from the root: the farthest joint of each segment, at most `max` segments.
    fn forward(&self, max: usize) -> Result<Vec<f64>, SegmentError> {
        let end = self.frame.part_end;
        let mut far = Vec::new();
        let mut a = self.frame.part_start;
        loop {
            let b = self.reach(a);
            if b >= end {
                return Ok(far);
            }
            if b <= a + REACH_PRECISION {
                return Err(SegmentError::NoPlan {
                    reason: format!(
                        "no slice of the blade from {a:.1} mm outward fits the printer (its section there is larger than the build volume); use a larger printer or scale the design"
                    ),
                });
            }
            let b = match self.frame.first_joint_max {
                Some(m) if far.is_empty() && m < b => m,
                _ => b,
            };
            let r = self.last_joint(a, b).ok_or_else(|| self.no_joint(a, b))?;
            far.push(r);
            if far.len() + 1 > max {
                return Err(SegmentError::NoPlan {
                    reason: format!(
                        "more than segments.max-count = {max} segments would be needed; raise it or use a larger printer"
                    ),
                });
            }
            a = r;
        }
    }

    /// Greedy from the tip: the innermost joint of each segment, tip first; `None` when
    /// it needs more than `max` segments or finds no joint.
    fn backward(&self, max: usize) -> Option<Vec<f64>> {
        let start = self.frame.part_start;
        let mut near = Vec::new();
        let mut b = self.frame.part_end;
        loop {
            let lo = self.back_reach(b);
            if lo <= start + 1e-9 {
                near.reverse();
                return Some(near);
            }
            let r = self.first_joint(lo, b)?;
            near.push(r);
            if near.len() + 1 > max || r >= b {
                return None;
            }
            b = r;
        }
    }

    /// The fewest segments (the automatic plan, see the module docs), at most `max`.
    /// The passes from the root and from the tip run side by side.
    ///
    /// # Errors
    /// [`SegmentError::NoPlan`] with the reason.
    pub fn plan(&self, max: usize) -> Result<Vec<Split>, SegmentError> {
        let (far, near) = std::thread::scope(|scope| {
            let back = scope.spawn(|| self.backward(max));
            let far = self.forward(max);
            (
                far,
                back.join().unwrap_or_else(|p| std::panic::resume_unwind(p)),
            )
        });
        let far = far?;
        let n = far.len() + 1;
        if n == 1 {
            return Ok(Vec::new());
        }
        // The innermost radius of each split; the farthest when the passes disagree.
        let near = near
            .filter(|v| v.len() == far.len())
            .unwrap_or_else(|| far.clone());
        let (start, end) = (self.frame.part_start, self.frame.part_end);
        let mut out: Vec<Split> = Vec::new();
        let mut prev = start;
        for (k, &lo) in near.iter().enumerate() {
            let hi = if k == 0 {
                far[0]
            } else {
                self.last_joint(prev, self.reach(prev)).unwrap_or(lo)
            }
            .max(lo);
            let target = prev + (end - prev) / (n - k) as f64;
            let split = self.choose(lo, hi, target);
            prev = split.radius;
            out.push(split);
        }
        Ok(out)
    }

    /// The split in `[lo, hi]` (module docs), with why: candidates are tried from the
    /// target outward.
    fn choose(&self, lo: f64, hi: f64, target: f64) -> Split {
        let in_transition = |r: f64| {
            self.frame
                .transition
                .is_some_and(|(t0, t1)| r >= t0 && r <= t1)
        };
        let mut grid = self.grid(lo, hi);
        grid.sort_by(|x, y| {
            (x - target)
                .abs()
                .total_cmp(&(y - target).abs())
                .then(x.total_cmp(y))
        });
        let radius = grid
            .iter()
            .copied()
            .find(|&r| !in_transition(r) && self.joint(r))
            .or_else(|| grid.iter().copied().find(|&r| self.joint(r)))
            .unwrap_or(lo);
        // The candidates between the target and the radius chosen, in stretches.
        let (from, to) = if target < radius {
            (target, radius)
        } else {
            (radius, target)
        };
        let mut passed: Vec<PassedOver> = Vec::new();
        let mut between = self.grid(from.max(lo), to.min(hi));
        between.retain(|&r| (r - radius).abs() > 1e-9);
        let any_outside = !in_transition(radius);
        for r in between {
            let why = if in_transition(r) && any_outside {
                Avoid::Transition
            } else {
                Avoid::TooThin
            };
            match passed.last_mut() {
                Some(p) if p.why == why && r - p.to < CANDIDATE_STEP + 1e-9 => p.to = r,
                _ => passed.push(PassedOver {
                    from: r,
                    to: r,
                    why,
                }),
            }
        }
        if target < lo - 1e-9 || target > hi + 1e-9 {
            // The target itself is outside the window.
            let (a, b) = if target < lo {
                (target, lo)
            } else {
                (hi, target)
            };
            passed.insert(
                0,
                PassedOver {
                    from: a,
                    to: b,
                    why: Avoid::Printer,
                },
            );
        }
        Split {
            radius,
            given: false,
            window: Some([lo, hi]),
            target: Some(target),
            passed_over: passed,
        }
    }

    fn no_joint(&self, a: f64, b: f64) -> SegmentError {
        let (jlo, jhi) = self.frame.joint_range;
        if let Some(m) = self.frame.first_joint_max.filter(|&m| (m - b).abs() < 1e-9) {
            return SegmentError::NoPlan {
                reason: format!(
                    "the spar channel's rod reaches a joint only up to {m:.1} mm, and no joint can be placed between {:.1} and {m:.1} mm (pins that keep their wall fit nowhere there; joints may lie from {jlo:.1} to {jhi:.1} mm, clear of the root's features and the tip); use a thinner rod (spar-channel.diameter) that reaches farther, smaller pins, or no channel",
                    a + self.frame.min_length
                ),
            };
        }
        SegmentError::NoPlan {
            reason: format!(
                "a segment from {a:.1} mm fits the printer only up to {b:.1} mm, and no joint can be placed between {:.1} and {b:.1} mm (pins that keep their wall fit nowhere there; joints may lie from {jlo:.1} to {jhi:.1} mm, clear of the root's features and the tip); use smaller or fewer pins (segments.dowels), a smaller segments.min-wall, or a larger printer",
                a + self.frame.min_length
            ),
        }
    }
}
