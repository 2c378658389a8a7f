//! The hub body: a flat disc about the rotor axis with a central bore and axial bolt
//! holes on a circle, built as its own structured mesh (watertight by construction).
//!
//! ```text
//!   seen along the rotor axis (y)          section through the axis
//!        .-----------.                      |<------ diameter ------>|
//!      /   o       o   \                    +------+  +--+  +------+  ^
//!     |       ( )       |   ( ) bore        |      |  |  |  |      |  thickness
//!      \   o       o   /     o  bolt holes  +------+  +--+  +------+  v
//!        '-----------'                            bore
//! ```
//!
//! The two flat faces share one constrained Delaunay triangulation (spade) of the
//! annulus with its holes; every boundary loop (rim, bore, each bolt hole) is joined
//! from face to face by a quad strip through the same vertices, so every edge is used by
//! exactly two triangles. Circles are inscribed polygons with enough sides that the
//! largest gap between a side and its arc (the sagitta `r (1 - cos(pi / n))`) stays
//! under the design's mesh tolerance.
//!
//! The hub is centred on the plane of rotation (y = 0) and on the rotor axis. Each
//! through-hole adds one to the genus: [`Hub::genus`] is the bore (0 or 1) plus the bolt
//! count, for [`crate::check::check_solid`].
//!
//! Not built (yet): radial sockets for the blade shanks; blades are placed by the
//! assembly and overlap the hub only where their roots reach inside its radius.

use crate::design::{Design, DesignError};
use crate::mesh::{Part, TriMesh};
use nalgebra::{Point2, Point3, Vector3};
use serde::Deserialize;
use std::f64::consts::{PI, TAU};

/// The `[rotor.hub]` table (lengths in the file's unit, converted by [`HubSpec::to_mm`]).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct HubSpec {
    /// Thickness along the rotor axis, mm.
    pub thickness: f64,
    /// Disc diameter, mm (default: twice `rotor.hub-radius`).
    pub diameter: Option<f64>,
    /// Central bore diameter, mm (default: no bore).
    pub bore: Option<f64>,
    /// Number of axial bolt holes (default 0).
    #[serde(default)]
    pub bolt_count: u32,
    /// Bolt hole diameter, mm (needed when `bolt-count` > 0).
    pub bolt_diameter: Option<f64>,
    /// Diameter of the circle through the bolt hole centres, mm (needed when
    /// `bolt-count` > 0).
    pub bolt_circle: Option<f64>,
    /// Smallest wall left between holes and edges, mm (default 0.8: two 0.4 mm nozzle
    /// widths, common practice).
    #[serde(default = "default_min_wall")]
    pub min_wall: f64,
}

fn default_min_wall() -> f64 {
    0.8
}

/// A validated hub in millimetres.
#[derive(Debug, Clone, PartialEq)]
pub struct Hub {
    /// Disc radius, mm.
    pub radius: f64,
    /// Thickness along the rotor axis, mm.
    pub thickness: f64,
    /// Bore radius, mm (`None`: no bore).
    pub bore_radius: Option<f64>,
    /// Bolt holes: count, hole radius (mm), bolt circle radius (mm).
    pub bolts: Option<(u32, f64, f64)>,
    /// Angle of the first bolt hole from +z toward +x, degrees (the assembly puts it
    /// between the first two blades).
    pub bolt_phase: f64,
}

impl HubSpec {
    /// Converts every length by `k` (file unit to mm).
    pub fn to_mm(mut self, k: f64) -> Self {
        self.thickness *= k;
        self.diameter = self.diameter.map(|v| v * k);
        self.bore = self.bore.map(|v| v * k);
        self.bolt_diameter = self.bolt_diameter.map(|v| v * k);
        self.bolt_circle = self.bolt_circle.map(|v| v * k);
        self.min_wall *= k;
        self
    }

    /// Checks the hub (lengths in mm) and resolves its defaults; `hub_radius` is
    /// `rotor.hub-radius` in mm. Problems name `rotor.hub.<key>` in `design`'s file.
    pub fn resolve(&self, hub_radius: f64, design: &Design) -> Result<Hub, DesignError> {
        let bad = |key: &str, msg: String| DesignError::one(design.problem(key, msg));
        let positive = |key: &str, v: f64| {
            if v > 0.0 && v.is_finite() {
                Ok(v)
            } else {
                Err(bad(
                    key,
                    format!("{v} is not a positive number of millimetres; give a positive size"),
                ))
            }
        };
        let thickness = positive("rotor.hub.thickness", self.thickness)?;
        let wall = positive("rotor.hub.min-wall", self.min_wall)?;
        let radius = 0.5
            * positive(
                "rotor.hub.diameter",
                self.diameter.unwrap_or(2.0 * hub_radius),
            )?;
        let bore_radius = match self.bore {
            Some(b) => Some(0.5 * positive("rotor.hub.bore", b)?),
            None => None,
        };
        let rb = bore_radius.unwrap_or(0.0);
        if radius - rb < wall {
            return Err(bad(
                "rotor.hub.bore",
                format!(
                    "a bore of {:.2} mm leaves a wall of {:.2} mm in a hub of diameter {:.2} mm, under rotor.hub.min-wall = {wall:.2} mm; use a smaller bore or a larger hub",
                    2.0 * rb,
                    radius - rb,
                    2.0 * radius
                ),
            ));
        }
        let bolts = if self.bolt_count == 0 {
            None
        } else {
            let n = self.bolt_count;
            let d = self.bolt_diameter.ok_or_else(|| {
                bad(
                    "rotor.hub.bolt-diameter",
                    format!(
                        "bolt-count = {n} needs bolt-diameter (mm); add it or set bolt-count = 0"
                    ),
                )
            })?;
            let c = self.bolt_circle.ok_or_else(|| {
                bad(
                    "rotor.hub.bolt-circle",
                    format!("bolt-count = {n} needs bolt-circle (diameter through the hole centres, mm); add it or set bolt-count = 0"),
                )
            })?;
            let rh = 0.5 * positive("rotor.hub.bolt-diameter", d)?;
            let rc = 0.5 * positive("rotor.hub.bolt-circle", c)?;
            let inner = rc - rh - rb;
            let outer = radius - rc - rh;
            let between = if n > 1 {
                2.0 * rc * (PI / n as f64).sin() - 2.0 * rh
            } else {
                f64::INFINITY
            };
            for (what, left) in [
                ("to the bore", inner),
                ("to the rim", outer),
                ("between neighbouring holes", between),
            ] {
                if left < wall {
                    return Err(bad(
                        "rotor.hub.bolt-circle",
                        format!(
                            "bolt holes of {d:.2} mm on a {c:.2} mm circle leave {left:.2} mm {what}, under rotor.hub.min-wall = {wall:.2} mm; change bolt-circle, bolt-diameter or bolt-count"
                        ),
                    ));
                }
            }
            Some((n, rh, rc))
        };
        Ok(Hub {
            radius,
            thickness,
            bore_radius,
            bolts,
            bolt_phase: 0.0,
        })
    }
}

/// Sides of an inscribed polygon whose sagitta `r (1 - cos(pi / n))` is at most `tol`
/// (at least 12).
pub fn circle_sides(r: f64, tol: f64) -> usize {
    let x = (1.0 - tol / r).clamp(-1.0, 1.0);
    let half = x.acos();
    if half > 0.0 {
        ((PI / half).ceil() as usize).max(12)
    } else {
        4096
    }
}

impl Hub {
    /// Through-holes: the bore (0 or 1) plus the bolt holes.
    pub fn genus(&self) -> u32 {
        u32::from(self.bore_radius.is_some()) + self.bolts.map_or(0, |b| b.0)
    }

    /// The exact volume of the disc minus its holes, mm³ (the mesh is inscribed and
    /// differs by less than the tolerance times the hole walls' and rim's areas).
    pub fn exact_volume(&self) -> f64 {
        let holes = self.bore_radius.map_or(0.0, |r| r * r)
            + self.bolts.map_or(0.0, |(n, r, _)| n as f64 * r * r);
        PI * (self.radius * self.radius - holes) * self.thickness
    }

    /// The closed mesh; circles deviate at most `tol` (mm) from the exact ones.
    pub fn mesh(&self, tol: f64) -> TriMesh {
        // Loops in the face plane (u, w) = (x, z): outer rim first, then holes.
        let mut loops: Vec<(Point2<f64>, f64)> = vec![(Point2::origin(), self.radius)];
        if let Some(r) = self.bore_radius {
            loops.push((Point2::origin(), r));
        }
        if let Some((n, rh, rc)) = self.bolts {
            for k in 0..n {
                let a = self.bolt_phase.to_radians() + TAU * k as f64 / n as f64;
                loops.push((Point2::new(rc * a.sin(), rc * a.cos()), rh));
            }
        }
        let mut pts: Vec<Point2<f64>> = Vec::new();
        let mut ranges = Vec::new();
        for (c, r) in &loops {
            let n = circle_sides(*r, tol);
            let start = pts.len();
            for i in 0..n {
                let a = TAU * i as f64 / n as f64;
                // From +z (w) toward +x (u): the mirror x -> -x maps the set onto itself.
                pts.push(Point2::new(c.x + r * a.sin(), c.y + r * a.cos()));
            }
            ranges.push(start..pts.len());
        }
        let faces = face_triangles(&pts, &ranges);
        let np = pts.len() as u32;
        let h = 0.5 * self.thickness;
        let mut mesh = TriMesh::new();
        for y in [h, -h] {
            for p in &pts {
                mesh.push_vertex(Point3::new(p.x, y, p.y));
            }
        }
        // Top (y = +h) faces +y, bottom faces -y.
        for t in &faces {
            push_facing(&mut mesh, *t, Vector3::y());
            push_facing(&mut mesh, [t[0] + np, t[1] + np, t[2] + np], -Vector3::y());
        }
        for (k, range) in ranges.iter().enumerate() {
            let centre = loops[k].0;
            let outward = if k == 0 { 1.0 } else { -1.0 };
            let (s, e) = (range.start as u32, range.end as u32);
            for i in s..e {
                let j = if i + 1 == e { s } else { i + 1 };
                let mid = Point2::from((pts[i as usize].coords + pts[j as usize].coords) * 0.5);
                let d = (mid - centre) * outward;
                let out = Vector3::new(d.x, 0.0, d.y);
                push_facing(&mut mesh, [i, j, j + np], out);
                push_facing(&mut mesh, [i, j + np, i + np], out);
            }
        }
        mesh
    }

    /// The hub as a named part.
    pub fn part(&self, name: &str, tol: f64) -> Part {
        Part {
            name: format!("{name}-hub"),
            mesh: self.mesh(tol),
        }
    }
}

/// Pushes triangle `t`, reversed if needed so its normal has a positive component along
/// `out`.
fn push_facing(mesh: &mut TriMesh, t: [u32; 3], out: Vector3<f64>) {
    let [a, b, c] = t.map(|i| mesh.vertices[i as usize]);
    if (b - a).cross(&(c - a)).dot(&out) >= 0.0 {
        mesh.triangles.push(t);
    } else {
        mesh.triangles.push([t[0], t[2], t[1]]);
    }
}

/// Constrained Delaunay triangulation of the first loop minus the others (no points are
/// added: the loops do not cross, so the constraint edges need no splitting).
fn face_triangles(pts: &[Point2<f64>], ranges: &[std::ops::Range<usize>]) -> Vec<[u32; 3]> {
    use spade::{ConstrainedDelaunayTriangulation, Point2 as SPoint, Triangulation};
    let vertices: Vec<SPoint<f64>> = pts.iter().map(|p| SPoint::new(p.x, p.y)).collect();
    let mut edges = Vec::new();
    for r in ranges {
        for i in r.clone() {
            let j = if i + 1 == r.end { r.start } else { i + 1 };
            edges.push([i, j]);
        }
    }
    let mut out = Vec::new();
    let Ok(cdt) = ConstrainedDelaunayTriangulation::<SPoint<f64>>::bulk_load_cdt(vertices, edges)
    else {
        return out;
    };
    let polys: Vec<&[Point2<f64>]> = ranges.iter().map(|r| &pts[r.clone()]).collect();
    for face in cdt.inner_faces() {
        let [a, b, c] = face.vertices().map(|v| v.fix().index());
        let q = Point2::from((pts[a].coords + pts[b].coords + pts[c].coords) / 3.0);
        let in_disc = inside(polys[0], &q);
        let in_hole = polys[1..].iter().any(|p| inside(p, &q));
        if in_disc && !in_hole {
            out.push([a as u32, b as u32, c as u32]);
        }
    }
    out
}

/// Point-in-polygon by the crossing-number rule (even-odd).
fn inside(poly: &[Point2<f64>], q: &Point2<f64>) -> bool {
    let mut c = false;
    let n = poly.len();
    for i in 0..n {
        let (a, b) = (poly[i], poly[(i + 1) % n]);
        if (a.y > q.y) != (b.y > q.y) {
            let x = a.x + (q.y - a.y) * (b.x - a.x) / (b.y - a.y);
            if q.x < x {
                c = !c;
            }
        }
    }
    c
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sides_meet_the_sagitta() {
        // Sagitta of a chord subtending 2 pi / n: r (1 - cos(pi / n)) (elementary geometry).
        for (r, tol) in [(35.0, 0.01), (4.0, 0.01), (100.0, 0.1)] {
            let n = circle_sides(r, tol) as f64;
            assert!(r * (1.0 - (PI / n).cos()) <= tol * (1.0 + 1e-12));
            assert!(r * (1.0 - (PI / (n - 1.0)).cos()) > tol || n == 12.0);
        }
    }
}
