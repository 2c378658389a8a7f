//! Alignment pins (dowels) at a joint, keyed so that a segment fits only its neighbour
//! and only one way round.
//!
//! # Where the pins go
//! On the joint section's camber line (halfway between the upper and lower surface at
//! each chord station, from the leading to the trailing edge), where a pin hole keeps
//! `segments.min-wall` to the skin at every grid row it passes (its depth and drill point
//! on both sides of the joint, with twice the mesh tolerance added), to the spar channel
//! and to the other pins. The first pin goes to the foremost such place, the last to the
//! aftmost, the others in between at the fractions of [`FRACTIONS`] (uneven on purpose):
//! spread wide, the pins resist the joint's twisting best.
//!
//! # Keyed layouts
//! A layout is the set of hole centres at the joint (the pins, and the channel when it
//! crosses). It must be *one-way*: no turn about an axis normal to the joint maps it
//! onto itself (checked for every turn of 360/m degrees about the centroid, holes of the
//! same diameter matching within a pin hole's radius). And it must differ from every
//! earlier joint's layout: the sorted hole-to-hole distances of two layouts differ by at
//! least a pin hole's radius somewhere (so no rigid move of one face lines its holes up
//! with the other's). Each joint takes the first layout that passes, moving its last pin
//! forward by whole hole diameters from the aftmost place.

use super::channel::Channel;
use super::outline::{smallest_clearance, Outline, Outlines};
use super::spec::{point_depth, SegmentsSpec};
use crate::blade::Blade;
use crate::loft::Skin;
use nalgebra::Point2;

/// Where the pins between the first and the last sit, as fractions of the way from the
/// first to the last, for 3 to 6 pins (uneven, so no layout is symmetric by itself).
pub const FRACTIONS: [&[f64]; 5] = [
    &[0.42],
    &[0.29, 0.63],
    &[0.21, 0.45, 0.72],
    &[0.17, 0.36, 0.57, 0.79],
    &[0.14, 0.3, 0.47, 0.63, 0.81],
];

/// The pins of one joint (mm, blade frame).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Joint {
    /// Joint number from the root, from 1: joint `k` lies between segments `k` and
    /// `k + 1`.
    pub index: usize,
    /// Radius of the split plane.
    pub radius: f64,
    /// Pin axes `[x, y]` (parallel to the span), foremost first.
    pub pins: Vec<[f64; 2]>,
    /// Pin diameter.
    pub pin_diameter: f64,
    /// Pin hole diameter (pin plus clearance).
    pub hole_diameter: f64,
    /// Depth of each hole's straight part into each side.
    pub depth: f64,
    /// Axial depth of each hole's drill point (0: flat).
    pub point_depth: f64,
    /// True when the spar channel crosses the joint (its hole is part of the layout).
    pub channel: bool,
    /// Smallest wall left around the pin holes (to the skin's rows, the channel and each
    /// other).
    pub smallest_wall: f64,
    /// How far the last pin was moved forward from the aftmost place to key the joint.
    pub key_shift: f64,
}

impl Joint {
    /// Hole centres and diameters of the layout (pins, then the channel when it
    /// crosses).
    pub fn holes(&self, channel: Option<&Channel>) -> Vec<(Point2<f64>, f64)> {
        let mut out: Vec<(Point2<f64>, f64)> = self
            .pins
            .iter()
            .map(|p| (Point2::new(p[0], p[1]), self.hole_diameter))
            .collect();
        if let (true, Some(c)) = (self.channel, channel) {
            out.push((c.axis_point(), c.hole_diameter));
        }
        out
    }

    /// Radii the pin holes occupy on both sides, drill points included.
    pub fn occupies(&self) -> (f64, f64) {
        let d = self.depth + self.point_depth;
        (self.radius - d, self.radius + d)
    }
}

/// What the pin planner reads of the blade.
#[derive(Debug, Clone, Copy)]
pub struct PinInput<'a> {
    /// The blade model (for the camber line).
    pub blade: &'a Blade,
    /// The surface model.
    pub skin: &'a Skin,
    /// The grid's columns.
    pub us: &'a [f64],
    /// The grid rows' outlines.
    pub outlines: &'a Outlines,
    /// The channel, when there is one.
    pub channel: Option<&'a Channel>,
    /// Mesh tolerance, mm.
    pub tolerance: f64,
}

/// Why no layout was found.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum NoLayout {
    /// Too few places keep the wall for the pins.
    NoRoom,
    /// Every layout that fits is symmetric or repeats an earlier joint's.
    NotKeyed,
}

/// Which joint is asked for and how.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct JointAsk {
    /// Radius of the split plane, mm.
    pub radius: f64,
    /// Joint number from the root, from 1.
    pub index: usize,
    /// Pins wanted.
    pub count: usize,
    /// True when the spar channel crosses the joint.
    pub channel: bool,
}

/// The pins of the joint `ask` of the spec's size (or a pin of `pin_diameter` when
/// given), keyed against the `earlier` joints.
///
/// # Errors
/// [`NoLayout`] when no layout fits and is keyed.
pub fn place(
    input: &PinInput<'_>,
    spec: &SegmentsSpec,
    ask: JointAsk,
    earlier: &[Joint],
    pin_diameter: Option<f64>,
) -> Result<Joint, NoLayout> {
    let JointAsk {
        radius: r,
        index,
        count,
        channel,
    } = ask;
    let d = &spec.dowels;
    let pin = pin_diameter.unwrap_or(d.diameter);
    let hole = pin + d.clearance;
    let rp = 0.5 * hole;
    let cone = point_depth(rp, d.point_angle);
    let reach = d.depth + cone;
    let wall = spec.min_wall;
    let rows = rows_around(input, r, reach);
    let need = rp + wall + 2.0 * input.tolerance;
    let chan = input.channel.filter(|c| {
        let (lo, hi) = c.occupies();
        lo < r + reach && hi > r - reach
    });
    let path = camber_path(input.blade, r, 0.2);
    let ok: Vec<bool> = path
        .iter()
        .map(|q| {
            smallest_clearance(rows.iter(), q, need) >= need
                && chan.is_none_or(|c| (q - c.axis_point()).norm() >= c.hole_radius() + rp + wall)
        })
        .collect();
    let places: Vec<usize> = (0..path.len()).filter(|&i| ok[i]).collect();
    let (Some(&front), Some(&aft)) = (places.first(), places.last()) else {
        return Err(NoLayout::NoRoom);
    };
    let step = (hole / 0.2).ceil() as usize;
    let mut shift = 0usize;
    loop {
        let last_target = aft.saturating_sub(shift * step);
        if last_target <= front {
            return Err(if shift == 0 {
                NoLayout::NoRoom
            } else {
                NoLayout::NotKeyed
            });
        }
        if let Some(pins) = pick(&path, &places, front, last_target, count, hole + wall) {
            let joint = Joint {
                index,
                radius: r,
                pins: pins.iter().map(|p| [p.x, p.y]).collect(),
                pin_diameter: pin,
                hole_diameter: hole,
                depth: d.depth,
                point_depth: cone,
                channel,
                smallest_wall: 0.0,
                key_shift: arc(&path, last_target, aft),
            };
            let holes = joint.holes(input.channel);
            let distinct = earlier
                .iter()
                .all(|e| differ(&holes, &e.holes(input.channel), rp));
            if one_way(&holes, rp) && distinct {
                return Ok(with_wall(joint, &rows, chan));
            }
        } else if shift == 0 {
            return Err(NoLayout::NoRoom);
        }
        shift += 1;
    }
}

/// The largest pin (to 0.05 mm) for which [`place`] finds a layout, or `None`.
pub fn largest_pin(
    input: &PinInput<'_>,
    spec: &SegmentsSpec,
    ask: JointAsk,
    earlier: &[Joint],
) -> Option<f64> {
    let fits = |d: f64| place(input, spec, ask, earlier, Some(d)).is_ok();
    let (mut lo, mut hi) = (0.2, spec.dowels.diameter);
    if !fits(lo) {
        return None;
    }
    while hi - lo > 0.05 {
        let mid = 0.5 * (lo + hi);
        if fits(mid) {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(lo)
}

/// The grid rows within `reach` of `r` on both sides, and the exact outlines at `r` and
/// at both ends.
fn rows_around(input: &PinInput<'_>, r: f64, reach: f64) -> Vec<Outline> {
    let mut rows: Vec<Outline> = [r, r - reach, r + reach]
        .iter()
        .filter_map(|&z| Outline::at(input.skin, input.us, z))
        .collect();
    rows.extend(input.outlines.between(r - reach, r + reach).iter().cloned());
    rows
}

/// Points every `step` mm along the camber line of the blade's section at `r`, from the
/// leading edge to the trailing edge.
pub fn camber_path(blade: &Blade, r: f64, step: f64) -> Vec<Point2<f64>> {
    let ring = blade.ring(r);
    let (n, le) = (ring.points.len(), blade.le_index());
    let m = le.min(n - 1 - le);
    let line: Vec<Point2<f64>> = (0..=m)
        .map(|k| {
            let (a, b) = (ring.points[le - k], ring.points[le + k]);
            Point2::new(0.5 * (a.x + b.x), 0.5 * (a.y + b.y))
        })
        .collect();
    let mut out = vec![line[0]];
    let mut carry = 0.0;
    for w in line.windows(2) {
        let len = (w[1] - w[0]).norm();
        let mut s = step - carry;
        while s <= len {
            out.push(w[0] + (w[1] - w[0]) * (s / len));
            s += step;
        }
        carry = len - (s - step);
    }
    out
}

/// Length along the sampled path from index `a` to `b`.
fn arc(path: &[Point2<f64>], a: usize, b: usize) -> f64 {
    let (a, b) = (a.min(b), a.max(b));
    path[a..=b].windows(2).map(|w| (w[1] - w[0]).norm()).sum()
}

/// The pins: the first at `front`, the last at `last`, the others at [`FRACTIONS`] of
/// the way, each at the nearest place that keeps `spacing` to the ones placed.
fn pick(
    path: &[Point2<f64>],
    places: &[usize],
    front: usize,
    last: usize,
    count: usize,
    spacing: f64,
) -> Option<Vec<Point2<f64>>> {
    let last = *places.iter().rev().find(|&&i| i <= last)?;
    let mut chosen = vec![path[front], path[last]];
    if (path[front] - path[last]).norm() < spacing {
        return None;
    }
    let fractions: &[f64] = if count >= 3 {
        FRACTIONS[(count - 3).min(FRACTIONS.len() - 1)]
    } else {
        &[]
    };
    let total = arc(path, front, last);
    for f in fractions {
        let target = f * total;
        let mut best: Option<(f64, usize)> = None;
        for &i in places.iter().filter(|&&i| i > front && i < last) {
            let q = path[i];
            if chosen.iter().any(|c| (c - q).norm() < spacing) {
                continue;
            }
            let off = (arc(path, front, i) - target).abs();
            if best.is_none_or(|b| off < b.0) {
                best = Some((off, i));
            }
        }
        chosen.push(path[best?.1]);
    }
    // Foremost first: order by the place along the path.
    let mut idx: Vec<(usize, Point2<f64>)> = chosen
        .into_iter()
        .map(|q| {
            let i = path.iter().position(|p| *p == q).unwrap_or(0);
            (i, q)
        })
        .collect();
    idx.sort_by_key(|x| x.0);
    Some(idx.into_iter().map(|x| x.1).collect())
}

/// True when no turn of 360/m degrees (m = 2..=n) about the holes' centroid maps the
/// layout onto itself (holes of equal diameter matching within `tol`).
pub fn one_way(holes: &[(Point2<f64>, f64)], tol: f64) -> bool {
    let n = holes.len();
    if n < 2 {
        return n == 0;
    }
    let c = holes
        .iter()
        .fold(nalgebra::Vector2::zeros(), |s, h| s + h.0.coords)
        / n as f64;
    (2..=n).all(|m| {
        let a = std::f64::consts::TAU / m as f64;
        let (s, co) = a.sin_cos();
        !holes.iter().all(|(p, d)| {
            let v = p.coords - c;
            let q =
                Point2::from(c + nalgebra::Vector2::new(co * v.x - s * v.y, s * v.x + co * v.y));
            holes
                .iter()
                .any(|(p2, d2)| (d - d2).abs() < 1e-9 && (q - p2).norm() < tol)
        })
    })
}

/// True when two layouts differ: other hole counts or diameters, or sorted
/// hole-to-hole distances that differ by at least `tol` somewhere.
pub fn differ(a: &[(Point2<f64>, f64)], b: &[(Point2<f64>, f64)], tol: f64) -> bool {
    let sig = |h: &[(Point2<f64>, f64)]| {
        let mut d: Vec<(f64, f64, f64)> = Vec::new();
        for i in 0..h.len() {
            for j in i + 1..h.len() {
                let (lo, hi) = (h[i].1.min(h[j].1), h[i].1.max(h[j].1));
                d.push(((h[i].0 - h[j].0).norm(), lo, hi));
            }
        }
        d.sort_by(|x, y| {
            x.1.total_cmp(&y.1)
                .then(x.2.total_cmp(&y.2))
                .then(x.0.total_cmp(&y.0))
        });
        d
    };
    let (sa, sb) = (sig(a), sig(b));
    sa.len() != sb.len()
        || sa.iter().zip(&sb).any(|(x, y)| {
            (x.1 - y.1).abs() > 1e-9 || (x.2 - y.2).abs() > 1e-9 || (x.0 - y.0).abs() >= tol
        })
}

/// The joint with its smallest wall measured.
fn with_wall(mut j: Joint, rows: &[Outline], chan: Option<&Channel>) -> Joint {
    let rp = 0.5 * j.hole_diameter;
    let mut w = f64::INFINITY;
    for (k, p) in j.pins.iter().enumerate() {
        let q = Point2::new(p[0], p[1]);
        w = w.min(smallest_clearance(rows.iter(), &q, f64::NEG_INFINITY) - rp);
        if let Some(c) = chan {
            w = w.min((q - c.axis_point()).norm() - rp - c.hole_radius());
        }
        for o in &j.pins[k + 1..] {
            w = w.min((q - Point2::new(o[0], o[1])).norm() - 2.0 * rp);
        }
    }
    j.smallest_wall = w;
    j
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn symmetry_and_keys() {
        // Elementary geometry: two equal holes are symmetric under a half turn about
        // their midpoint; an equilateral triangle under a third of a turn; three holes
        // on a line at unequal spacing under none.
        let p = |x: f64, y: f64, d: f64| (Point2::new(x, y), d);
        assert!(!one_way(&[p(0.0, 0.0, 3.0), p(10.0, 0.0, 3.0)], 0.5));
        let h = 3f64.sqrt() * 5.0;
        assert!(!one_way(
            &[p(0.0, 0.0, 3.0), p(10.0, 0.0, 3.0), p(5.0, h, 3.0)],
            0.5
        ));
        let line = [p(0.0, 0.0, 3.0), p(7.0, 0.0, 6.0), p(20.0, 0.0, 3.0)];
        assert!(one_way(&line, 0.5));
        // Symmetric about the channel: a half turn maps it onto itself.
        assert!(!one_way(
            &[p(0.0, 0.0, 3.0), p(10.0, 0.0, 6.0), p(20.0, 0.0, 3.0)],
            0.5
        ));
        // The same layout moved and turned is not different; a pin 1 mm away is.
        let moved: Vec<_> = line
            .iter()
            .map(|(q, d)| (Point2::new(5.0 + q.y, -2.0 + q.x), *d))
            .collect();
        assert!(!differ(&line, &moved, 0.5));
        let other = [p(0.0, 0.0, 3.0), p(7.0, 0.0, 6.0), p(21.0, 0.0, 3.0)];
        assert!(differ(&line, &other, 0.5));
    }
}
