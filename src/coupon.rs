//! Fit coupons: a few grams of print that tell whether the blade's root will fit its hub
//! before the whole rotor is printed.
//!
//! * **Shank coupon** (`<name>-coupon-shank`): a short piece of the root shank, the
//!   design's shank outline (round or elliptical, with its flat) extruded
//!   [`CouponOptions::length`], with the root's bore running through it when the root has
//!   one (so the insert or bolt can be tried too).
//! * **Socket coupon** (`<name>-coupon-socket`): a short ring whose inner outline is the
//!   hub's socket (the shank's larger extent plus `rotor.hub.socket-clearance`, round,
//!   as [`crate::assembly::Hub`] cuts it) and whose wall is the hub's thinnest wall
//!   around the socket (half the hub's thickness less the socket radius), never under
//!   `rotor.hub.min-wall`.
//!
//! * **Joint coupon** (`<name>-coupon-joint`), for a blade split into segments: a short
//!   slice of the blade at its first joint, the outline of the split face, with the pin
//!   holes and the spar channel (when it crosses the joint) running through it at their
//!   diameters and places; a pin and the rod are tried in it before the segments print.
//!
//! The shank and socket coupons are made when the design has a `[root]` and a hub with
//! sockets, the joint coupon when the blade is split (see [`coupons`]). They print standing on an end face; the clearance found with them
//! carries over to the rotor when the blade's shank is printed the same way (the outline
//! in the layer plane).
//!
//! ```text
//!   shank coupon (seen along its axis)      socket coupon
//!        .-----.                              .-------.
//!      /    _    \                          /  .---.  \
//!     |    (_)    |  <- bore (optional)    |  (     )  |  <- socket: shank + clearance
//!      \_________/   <- flat (optional)     \  '---'  /
//!                                             '-------'   wall: the hub's
//! ```
//!
//! # Construction
//! Each coupon is a prism: closed loops in the plane (an outer loop and holes) extruded
//! along z from 0 to the length ([`prism`]). Both caps share one constrained Delaunay
//! triangulation of the loops ([`crate::planar::triangulate`], no added points) and every
//! loop edge is joined from cap to cap by a quad, so every edge is used by exactly two
//! triangles: closed and consistently oriented by construction, of genus the number of
//! holes. Each coupon is still certified ([`crate::check::certify`]) before it is handed
//! out. Circles are inscribed polygons with enough sides that the sagitta stays under the
//! design's mesh tolerance; the shank and the socket use the same sides at the same
//! angles, so the gap between the two outlines is the same at every vertex.
//!
//! # Adding a coupon kind
//! Add a [`CouponKind`] variant, write a function that returns its loops (outer
//! counter-clockwise, holes clockwise) and add it to [`coupons`]; naming
//! ([`CouponKind::suffix`]), certification and writing come with the frame. The joint
//! coupon's outline is the whole blade's mesh cut at the joint ([`crate::mesh::Slice`]),
//! within the mesh tolerance of the split face.

use crate::assembly::circle_sides;
use crate::check::{certify, CheckOptions, CheckedPart, Rejected};
use crate::mesh::{Part, Slice, TriMesh};
use crate::pipeline::Outcome;
use crate::planar::triangulate;
use crate::root::RootSpec;
use nalgebra::{Point2, Point3};
use std::f64::consts::TAU;

/// What a coupon tests.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CouponKind {
    /// A short piece of the root shank.
    Shank,
    /// A ring of the hub's blade socket.
    Socket,
    /// A slice of a split blade at its first joint, with the pin holes and the channel.
    Joint,
}

impl CouponKind {
    /// The part name's suffix after the design name (`-coupon-shank`).
    pub fn suffix(self) -> &'static str {
        match self {
            CouponKind::Shank => "-coupon-shank",
            CouponKind::Socket => "-coupon-socket",
            CouponKind::Joint => "-coupon-joint",
        }
    }
}

/// Options of the coupons.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CouponOptions {
    /// Length of each coupon along its axis, mm (default 10; the shank coupon is never
    /// longer than the design's straight shank).
    pub length: f64,
}

impl CouponOptions {
    /// The defaults.
    pub const DEFAULT: CouponOptions = CouponOptions { length: 10.0 };
}

impl Default for CouponOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// One coupon: the checked part and what it tests.
#[derive(Debug, Clone)]
pub struct Coupon {
    /// What it tests.
    pub kind: CouponKind,
    /// The part (closed, oriented, checked), axis along z from z = 0.
    pub part: CheckedPart,
    /// The loops its prism is made of (outer counter-clockwise, holes clockwise), mm, and
    /// its length along z: the exact solid is [`crate::brep::prism_solid`] of the same.
    pub loops: Vec<Vec<Point2<f64>>>,
    /// Length along z, mm.
    pub length: f64,
    /// The fit it tests, mm: socket diameter minus the shank's larger extent (the
    /// design's `rotor.hub.socket-clearance`) for the shank and socket coupons; pin hole
    /// minus pin diameter (`segments.dowels.clearance`) for the joint coupon.
    pub clearance: f64,
}

/// Why no coupons can be made.
#[derive(Debug, thiserror::Error)]
pub enum CouponError {
    /// The design has no root shank or no hub socket to test.
    #[error("no fit coupons for {name}: {reason}")]
    NothingToTest {
        /// Design name.
        name: String,
        /// What is missing, and how to add it.
        reason: &'static str,
    },
    /// A length is not a positive number.
    #[error("coupon length {0} mm: give a positive length in mm (10 is the default)")]
    BadLength(f64),
    /// A coupon's outline could not be triangulated (crossing loops).
    #[error("the outline of {0} crosses itself; please report this with the design file")]
    Outline(String),
    /// A coupon failed its checks (a bug: they are closed by construction).
    #[error(transparent)]
    Rejected(#[from] Rejected),
}

/// The coupons of a built design: the shank and socket coupons when the design has a
/// `[root]` and a hub with sockets (`[rotor.hub]`, `sockets` on), and the joint coupon
/// when the blade is split into segments.
///
/// # Errors
/// [`CouponError::NothingToTest`] when the design has none of these (a build with
/// `blade_only` has no hub); [`CouponError::BadLength`]; the others are bugs.
pub fn coupons(outcome: &Outcome, opts: &CouponOptions) -> Result<Vec<Coupon>, CouponError> {
    if !(opts.length > 0.0 && opts.length.is_finite()) {
        return Err(CouponError::BadLength(opts.length));
    }
    let mut out = Vec::new();
    let missing = match shank_and_socket(outcome, opts)? {
        Ok(pair) => {
            out.extend(pair);
            None
        }
        Err(reason) => Some(reason),
    };
    out.extend(joint(outcome, opts)?);
    match missing {
        Some(reason) if out.is_empty() => Err(CouponError::NothingToTest {
            name: outcome.blade.name.clone(),
            reason,
        }),
        _ => Ok(out),
    }
}

/// The shank and socket coupons, or what the design lacks for them.
fn shank_and_socket(
    outcome: &Outcome,
    opts: &CouponOptions,
) -> Result<Result<Vec<Coupon>, &'static str>, CouponError> {
    let name = &outcome.blade.name;
    let Some(root) = outcome.blade.blade.root() else {
        return Ok(Err("the design has no [root] shank; add a [root] table"));
    };
    let Some(rotor) = outcome.rotor.as_ref() else {
        return Ok(Err("the build has no rotor; add a [rotor] table with [rotor.hub] (and build without --blade-only)"));
    };
    let (hub, spec) = match (&rotor.hub, &rotor.spec.hub) {
        (Some(h), Some(s)) => (h, s),
        _ => return Ok(Err("the rotor has no hub; add a [rotor.hub] table")),
    };
    let Some(sockets) = hub.sockets.as_ref() else {
        return Ok(Err(
            "the hub has no blade sockets; set rotor.hub.sockets = true (the default)",
        ));
    };
    let tol = outcome.blade.tolerance;
    let wall = (0.5 * hub.thickness - sockets.radius).max(spec.min_wall);
    let sides = ring_sides(root, sockets.radius + wall, tol);
    let shank_length = opts.length.min(root.shank_length);
    let shank = shank_loops(root, sides);
    let socket = vec![
        circle(sockets.radius + wall, sides, false),
        circle(sockets.radius, sides, true),
    ];
    Ok(Ok(vec![
        coupon(
            name,
            CouponKind::Shank,
            &shank,
            shank_length,
            spec.socket_clearance,
        )?,
        coupon(
            name,
            CouponKind::Socket,
            &socket,
            opts.length,
            spec.socket_clearance,
        )?,
    ]))
}

/// The joint coupon of a split blade (its first joint), or `None` when it is not split.
fn joint(outcome: &Outcome, opts: &CouponOptions) -> Result<Option<Coupon>, CouponError> {
    let Some(plan) = outcome.segments.as_ref() else {
        return Ok(None);
    };
    let Some(j) = plan.joints.first() else {
        return Ok(None);
    };
    let name = format!("{}{}", outcome.blade.name, CouponKind::Joint.suffix());
    let cut = Slice::cut(outcome.blade.mesh(), j.radius)
        .map_err(|_| CouponError::Outline(name.clone()))?;
    let [outer] = &cut.loops[..] else {
        return Err(CouponError::Outline(name));
    };
    let tol = outcome.blade.tolerance.max(1e-6);
    let mut loops = vec![outer.clone()];
    for (centre, diameter) in j.holes(plan.channel.as_ref()) {
        let r = 0.5 * diameter;
        let sides = circle_sides(r, tol).div_ceil(4) * 4;
        let ring = circle(r, sides, true);
        loops.push(ring.iter().map(|p| centre + p.coords).collect());
    }
    let clearance = j.hole_diameter - j.pin_diameter;
    coupon(
        &outcome.blade.name,
        CouponKind::Joint,
        &loops,
        opts.length,
        clearance,
    )
    .map(Some)
}

/// Sides of every circle of the coupons: enough for the largest curvature radius of the
/// shank's outline and for the ring's outer circle to stay within `tol` (see
/// [`circle_sides`]), a multiple of 4 so the outlines are symmetric about both axes.
fn ring_sides(root: &RootSpec, outer: f64, tol: f64) -> usize {
    let (a, b) = (0.5 * root.shank_diameter, 0.5 * root.thickness());
    // Largest radius of curvature of the ellipse: a²/b at the ends of the minor axis.
    let curvature = a.max(b) * a.max(b) / a.min(b);
    let n = circle_sides(outer.max(curvature), tol.max(1e-6));
    n.div_ceil(4) * 4
}

/// The shank's outline (counter-clockwise) and the bore (clockwise), if any: the ellipse
/// of semi-axes `shank-diameter / 2` (x) and `thickness / 2` (y) sampled at `sides` equal
/// angles, cut by the flat `y = -(thickness / 2 - flat-depth)` when there is one (its two
/// corners exact).
fn shank_loops(root: &RootSpec, sides: usize) -> Vec<Vec<Point2<f64>>> {
    let (a, b) = (0.5 * root.shank_diameter, 0.5 * root.thickness());
    let outer = match root.flat_depth.filter(|d| *d > 0.0) {
        Some(depth) => ellipse_with_flat(a, b, -(b - depth), sides),
        None => (0..sides)
            .map(|i| on_ellipse(a, b, TAU * i as f64 / sides as f64))
            .collect(),
    };
    let mut loops = vec![outer];
    if let Some(bore) = &root.bore {
        loops.push(circle(0.5 * bore.diameter, sides, true));
    }
    loops
}

/// The point of the ellipse of semi-axes `a` (x) and `b` (y) on the ray at angle `t`.
fn on_ellipse(a: f64, b: f64, t: f64) -> Point2<f64> {
    let (s, c) = t.sin_cos();
    let rho = a * b / ((b * c).powi(2) + (a * s).powi(2)).sqrt();
    Point2::new(rho * c, rho * s)
}

/// The outline of the ellipse of semi-axes `a`, `b` cut by the flat `y = y0` (`-b < y0
/// < 0`), counter-clockwise from the flat's right corner: the ellipse's points at the
/// angles `2 pi i / sides` above the flat, then the left corner; the flat is the closing
/// edge. The corners are exact: `x = ±a sqrt(1 - (y0 / b)²)`.
fn ellipse_with_flat(a: f64, b: f64, y0: f64, sides: usize) -> Vec<Point2<f64>> {
    let xc = a * (1.0 - (y0 / b).powi(2)).max(0.0).sqrt();
    let start = y0.atan2(xc).rem_euclid(TAU); // the right corner, in (3 pi / 2, 2 pi)
    let end = y0.atan2(-xc).rem_euclid(TAU); // the left corner, in (pi, 3 pi / 2)
    let span = (end - start).rem_euclid(TAU);
    // Ray angles strictly between the corners (1e-9 rad clear of them), ordered from the
    // right corner.
    let mut arc: Vec<(f64, f64)> = (0..sides)
        .map(|i| TAU * i as f64 / sides as f64)
        .map(|t| ((t - start).rem_euclid(TAU), t))
        .filter(|(along, _)| *along > 1e-9 && *along < span - 1e-9)
        .collect();
    arc.sort_by(|x, y| x.0.total_cmp(&y.0));
    let mut out = Vec::with_capacity(arc.len() + 2);
    out.push(Point2::new(xc, y0));
    out.extend(arc.into_iter().map(|(_, t)| on_ellipse(a, b, t)));
    out.push(Point2::new(-xc, y0));
    out
}

/// A circle of radius `r` as an inscribed polygon of `sides` vertices at the angles
/// `2 pi i / sides`, counter-clockwise, or clockwise when `hole`.
fn circle(r: f64, sides: usize, hole: bool) -> Vec<Point2<f64>> {
    let mut pts: Vec<Point2<f64>> = (0..sides)
        .map(|i| {
            let t = TAU * i as f64 / sides as f64;
            Point2::new(r * t.cos(), r * t.sin())
        })
        .collect();
    if hole {
        pts.reverse();
    }
    pts
}

/// Builds, names and certifies one coupon.
fn coupon(
    design: &str,
    kind: CouponKind,
    loops: &[Vec<Point2<f64>>],
    length: f64,
    clearance: f64,
) -> Result<Coupon, CouponError> {
    let name = format!("{design}{}", kind.suffix());
    let mesh = prism(loops, length).ok_or_else(|| CouponError::Outline(name.clone()))?;
    let genus = u32::try_from(loops.len() - 1).unwrap_or(u32::MAX);
    let part = certify(
        Part { name, mesh },
        &CheckOptions::DEFAULT.with_expected_genus(Some(genus)),
    )?;
    Ok(Coupon {
        kind,
        loops: loops.to_vec(),
        length,
        part,
        clearance,
    })
}

/// The prism of the region bounded by `loops` (the first counter-clockwise, the others
/// clockwise holes inside it), from z = 0 to z = `length`: caps triangulated once and
/// shared, one quad per loop edge between them (see the module docs). `None` when the
/// loops cross or repeat a point.
pub fn prism(loops: &[Vec<Point2<f64>>], length: f64) -> Option<TriMesh> {
    let points: Vec<Point2<f64>> = loops.iter().flatten().copied().collect();
    let mut ranges = Vec::with_capacity(loops.len());
    let mut start = 0;
    for l in loops {
        if l.len() < 3 {
            return None;
        }
        ranges.push(start..start + l.len());
        start += l.len();
    }
    let cap = triangulate(&points, &ranges)?;
    let n = points.len();
    let mut mesh = TriMesh::new();
    for z in [0.0, length] {
        for p in &points {
            mesh.push_vertex(Point3::new(p.x, p.y, z));
        }
    }
    let top = |i: usize| (n + i) as u32;
    let bottom = |i: usize| i as u32;
    for t in &cap {
        mesh.triangles.push([top(t[0]), top(t[1]), top(t[2])]);
        mesh.triangles
            .push([bottom(t[0]), bottom(t[2]), bottom(t[1])]);
    }
    for r in &ranges {
        for i in r.clone() {
            let j = if i + 1 == r.end { r.start } else { i + 1 };
            // Outward for a counter-clockwise outer loop and clockwise holes: the quad's
            // normal is the edge direction turned clockwise.
            mesh.triangles.push([bottom(i), bottom(j), top(j)]);
            mesh.triangles.push([bottom(i), top(j), top(i)]);
        }
    }
    Some(mesh)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn prism_of_a_square_with_a_square_hole() {
        // Volume (16 - 4) x 2 = 24 (elementary geometry); genus 1 (Euler: V - E + F =
        // 2 - 2g).
        let p = |x: f64, y: f64| Point2::new(x, y);
        let outer = vec![p(0.0, 0.0), p(4.0, 0.0), p(4.0, 4.0), p(0.0, 4.0)];
        let hole = vec![p(1.0, 1.0), p(1.0, 3.0), p(3.0, 3.0), p(3.0, 1.0)];
        let m = prism(&[outer, hole], 2.0).unwrap();
        assert!((m.signed_volume() - 24.0).abs() < 1e-12);
        let (v, f) = (m.vertices.len() as i64, m.len() as i64);
        let e = 3 * f / 2;
        assert_eq!(v - e + f, 0);
    }

    #[test]
    fn flat_outline_keeps_its_corners() {
        let pts = ellipse_with_flat(10.0, 10.0, -8.0, 64);
        // Corners at x = ±6 on y = -8 (3-4-5 triangle).
        assert!((pts[0] - Point2::new(6.0, -8.0)).norm() < 1e-12);
        assert!((pts[pts.len() - 1] - Point2::new(-6.0, -8.0)).norm() < 1e-12);
        assert!(pts.iter().all(|p| p.y >= -8.0 - 1e-12));
    }
}
