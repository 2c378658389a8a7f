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
//! **Blade sockets** (when the design has a `[root]` shank and `sockets` is on): one
//! radial blind hole per blade in the plane of rotation, of the shank diameter plus
//! `socket-clearance`, from the rim down to half the clearance below the blade's root
//! face, so the placed blade sits in its socket with the clearance all round. The rim is
//! a constrained Delaunay triangulation of the unrolled cylinder with the socket
//! openings (the exact intersection of the socket and rim cylinders, sampled) as holes;
//! each socket wall is a quad strip from its opening to its floor, closed by a fan.
//! Sockets are radial, so a coned rotor (`rotor.cone` not 0) cannot have them.

use super::rotor::{root_face_words, AssemblyError, BladeFacts, RotorSpec};
use crate::design::Lengths;
use crate::design::Rotation;
use crate::mesh::{Part, TriMesh};
use crate::planar::point_in_polygon;
use crate::root::RootSpec;
use nalgebra::{Point2, Point3, Vector3};
use serde::Deserialize;
use std::f64::consts::{PI, TAU};

/// The `[rotor.hub]` table (lengths in the file's unit, converted by [`HubSpec::to_mm`]).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct HubSpec {
    /// Thickness along the rotor axis, mm.
    pub thickness: f64,
    /// Disc diameter, mm. Default: with sockets, the rim halfway along the blade's round
    /// shank (root face + half of `root.shank-length`); without, the rim half a
    /// `socket-clearance` short of the blades' root face. Without sockets the rim must stay
    /// inside the root face; with them, between the root face and the end of the shank.
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
    /// Cut a radial socket for each blade's round shank (needs a `[root]` table; default
    /// true).
    #[serde(default = "default_true")]
    pub sockets: bool,
    /// Socket diameter minus shank diameter, mm (default 0.3, a printed slip fit: common
    /// practice, from memory). The socket floor sits half of it below the root face.
    #[serde(default = "default_clearance")]
    pub socket_clearance: f64,
}

fn default_min_wall() -> f64 {
    0.8
}

fn default_true() -> bool {
    true
}

fn default_clearance() -> f64 {
    0.3
}

/// Radial blind sockets, one per blade, in the plane of rotation.
#[derive(Debug, Clone, PartialEq)]
pub struct Sockets {
    /// Socket radius (shank radius plus half the clearance), mm.
    pub radius: f64,
    /// Distance of the socket floors from the rotor axis, mm.
    pub floor: f64,
    /// Socket axis angles from +z toward +x, degrees, one per blade.
    pub angles: Vec<f64>,
}

/// Angle from +z toward +x (the hub's angles) of azimuth `phi` (degrees, in the sense
/// of rotation, see [`super::assembly`]).
fn hub_angle(rotation: Rotation, phi: f64) -> f64 {
    match rotation {
        Rotation::Ccw => -phi,
        Rotation::Cw => phi,
    }
}

/// Distance from `p` to the segment `a`-`b` (plane).
fn seg_dist(p: Point2<f64>, a: Point2<f64>, b: Point2<f64>) -> f64 {
    let ab = b - a;
    let s = ((p - a).dot(&ab) / ab.norm_squared()).clamp(0.0, 1.0);
    (p - (a + ab * s)).norm()
}

/// Socket axis from the floor to the rim, in the face plane (u, w) = (x, z).
fn socket_axis(angle_deg: f64, floor: f64, rim: f64) -> (Point2<f64>, Point2<f64>) {
    let (s, c) = angle_deg.to_radians().sin_cos();
    (
        Point2::new(floor * s, floor * c),
        Point2::new(rim * s, rim * c),
    )
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
    /// Angle of the first bolt hole from +z toward +x, degrees (half a blade spacing
    /// past the first blade in the sense of rotation).
    pub bolt_phase: f64,
    /// Blade sockets, when cut.
    pub sockets: Option<Sockets>,
    /// Angle of the rim's first vertex from +z toward +x, degrees (between sockets).
    pub rim_start: f64,
}

impl Lengths for HubSpec {
    fn to_mm(mut self, k: f64) -> Self {
        self.thickness *= k;
        self.diameter = self.diameter.map(|v| v * k);
        self.bore = self.bore.map(|v| v * k);
        self.bolt_diameter = self.bolt_diameter.map(|v| v * k);
        self.bolt_circle = self.bolt_circle.map(|v| v * k);
        self.min_wall *= k;
        self.socket_clearance *= k;
        self
    }
}

impl HubSpec {
    /// Checks the hub (lengths in mm) against the rotor (`rotor`, in mm) and the blade's
    /// root, and resolves its defaults and the angles of its holes for the blade's
    /// rotation sense. Errors name `rotor.<key>` or `rotor.hub.<key>`.
    pub fn resolve(&self, rotor: &RotorSpec, blade: &BladeFacts) -> Result<Hub, AssemblyError> {
        let disc = self.disc(blade)?;
        let bolts = self.bolts(&disc)?;
        let blades = rotor.blades.max(1);
        let between = hub_angle(
            blade.rotation,
            rotor.azimuth_offset + 180.0 / f64::from(blades),
        );
        let sockets = match (&blade.root, self.sockets) {
            (Some(root), true) => Some(self.sockets(root, rotor, blade, &disc)?),
            _ => None,
        };
        if let (Some(s), Some(b)) = (&sockets, bolts) {
            bolts_clear_sockets(s, b, between, &disc)?;
        }
        Ok(Hub {
            radius: disc.radius,
            thickness: disc.thickness,
            bore_radius: disc.bore_radius,
            bolts,
            bolt_phase: between,
            rim_start: if sockets.is_some() { between } else { 0.0 },
            sockets,
        })
    }

    /// The disc's size and the wall it keeps, checked: positive sizes and the wall
    /// around the bore.
    fn disc(&self, blade: &BladeFacts) -> Result<Disc, AssemblyError> {
        let thickness = positive("rotor.hub.thickness", self.thickness)?;
        let wall = positive("rotor.hub.min-wall", self.min_wall)?;
        let socketed = blade.root.is_some() && self.sockets;
        let radius = 0.5
            * positive(
                "rotor.hub.diameter",
                self.diameter
                    .unwrap_or_else(|| 2.0 * self.default_rim(blade, socketed)),
            )?;
        if !socketed {
            self.rim_clear_of_blades(radius, blade)?;
        }
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
        Ok(Disc {
            radius,
            thickness,
            bore_radius,
            wall,
        })
    }

    /// The rim radius when `diameter` is not given, mm: halfway along the round shank when
    /// sockets hold the shanks, else half a socket clearance short of the root face.
    fn default_rim(&self, blade: &BladeFacts, socketed: bool) -> f64 {
        match (&blade.root, socketed) {
            (Some(root), true) => blade.root_face + 0.5 * root.shank_length,
            _ => blade.root_face - 0.5 * self.socket_clearance.max(0.0),
        }
    }

    /// Without sockets the disc must stop short of the blades' root face, or the two
    /// bodies meet.
    fn rim_clear_of_blades(&self, radius: f64, blade: &BladeFacts) -> Result<(), AssemblyError> {
        let face = blade.root_face;
        if radius < face {
            return Ok(());
        }
        let why = if blade.root.is_some() {
            "rotor.hub.sockets = false, so the shanks have no sockets"
        } else {
            "the blade has no [root] shank for a socket"
        };
        Err(AssemblyError::new(
            "rotor.hub.diameter",
            format!(
                "{:.2} mm puts the hub's rim at {radius:.2} mm from the axis, into the blades, \
                 whose root face is at {face:.2} mm ({}), and {why}; give a diameter under \
                 {:.2} mm (leave it out for the default, which stops {:.2} mm short of the root \
                 face){}",
                2.0 * radius,
                root_face_words(blade),
                2.0 * face,
                0.5 * self.socket_clearance.max(0.0),
                if blade.root.is_some() {
                    ", or set rotor.hub.sockets = true"
                } else {
                    ", or add a [root] shank and let the hub hold it in sockets"
                }
            ),
        ))
    }

    /// The bolt holes (count, hole radius, circle radius), checked against the bore, the
    /// rim and each other; `None` without bolts.
    fn bolts(&self, disc: &Disc) -> Result<Option<(u32, f64, f64)>, AssemblyError> {
        if self.bolt_count == 0 {
            return Ok(None);
        }
        let (radius, rb, wall) = (disc.radius, disc.bore(), disc.wall);
        let n = self.bolt_count;
        let d = self.bolt_diameter.ok_or_else(|| {
            bad(
                "rotor.hub.bolt-diameter",
                format!("bolt-count = {n} needs bolt-diameter (mm); add it or set bolt-count = 0"),
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
        Ok(Some((n, rh, rc)))
    }

    /// Resolves and checks the blade sockets.
    fn sockets(
        &self,
        root: &RootSpec,
        rotor: &RotorSpec,
        blade: &BladeFacts,
        disc: &Disc,
    ) -> Result<Sockets, AssemblyError> {
        let clearance = self.socket_clearance;
        socket_allowed(clearance, root, rotor, blade)?;
        let face = blade.root_face;
        let socket_radius = 0.5 * (root.shank_diameter.max(root.thickness()) + clearance);
        let floor = face - 0.5 * clearance;
        socket_fits_disc(root, face, socket_radius, floor, disc)?;
        let blades = rotor.blades.max(1);
        let angles: Vec<f64> = (0..blades)
            .map(|k| {
                hub_angle(
                    blade.rotation,
                    rotor.azimuth_offset + 360.0 * f64::from(k) / f64::from(blades),
                )
            })
            .collect();
        let sockets = Sockets {
            radius: socket_radius,
            floor,
            angles,
        };
        sockets_apart(&sockets, disc)?;
        Ok(sockets)
    }
}

/// The disc of a hub being resolved, mm.
struct Disc {
    radius: f64,
    thickness: f64,
    bore_radius: Option<f64>,
    /// Smallest wall kept.
    wall: f64,
}

impl Disc {
    /// The bore radius, 0 without a bore.
    fn bore(&self) -> f64 {
        self.bore_radius.unwrap_or(0.0)
    }
}

fn bad(key: &str, msg: String) -> AssemblyError {
    AssemblyError::new(key, msg)
}

/// `v` when it is a positive, finite number of millimetres, else an error naming `key`.
fn positive(key: &str, v: f64) -> Result<f64, AssemblyError> {
    if v > 0.0 && v.is_finite() {
        Ok(v)
    } else {
        Err(bad(
            key,
            format!("{v} is not a positive number of millimetres; give a positive size"),
        ))
    }
}

/// Whether sockets can be cut at all: a clearance of zero or more, no cone, no flange,
/// and the shank on the stacking axis within a quarter of the clearance.
fn socket_allowed(
    clearance: f64,
    root: &RootSpec,
    rotor: &RotorSpec,
    blade: &BladeFacts,
) -> Result<(), AssemblyError> {
    if !(clearance >= 0.0 && clearance.is_finite()) {
        return Err(bad(
            "rotor.hub.socket-clearance",
            format!("{clearance}: give a clearance of zero or more millimetres"),
        ));
    }
    if rotor.cone != 0.0 {
        return Err(bad(
            "rotor.cone",
            format!(
                "{} degrees: hub sockets are cut radially in the plane of rotation; set cone = 0, or rotor.hub.sockets = false",
                rotor.cone
            ),
        ));
    }
    if root.flange.is_some() {
        return Err(bad(
            "rotor.hub.sockets",
            "the blade root has a flange (root.flange), which a round socket cannot take; remove the flange or set rotor.hub.sockets = false".into(),
        ));
    }
    let off = blade.shank_offset;
    if off > 0.25 * clearance {
        return Err(bad(
            "rotor.hub.sockets",
            format!(
                "the shank is centred {off:.2} mm off the stacking axis (first station sweep and prebend), more than a quarter of rotor.hub.socket-clearance = {clearance:.2} mm; set them to 0 at the first station or set rotor.hub.sockets = false"
            ),
        ));
    }
    Ok(())
}

/// Whether a socket of `socket_radius` with its floor at `floor` fits the disc: the rim
/// between the root face and the shank's end, walls above, below and to the bore.
fn socket_fits_disc(
    root: &RootSpec,
    face: f64,
    socket_radius: f64,
    floor: f64,
    disc: &Disc,
) -> Result<(), AssemblyError> {
    let (radius, thickness, rb, wall) = (disc.radius, disc.thickness, disc.bore(), disc.wall);
    let shank_end = face + root.shank_length;
    let suggest = 2.0 * (face + 0.5 * root.shank_length);
    if radius <= face {
        return Err(bad(
            "rotor.hub.diameter",
            format!(
                "{:.2} mm puts the hub's rim at {radius:.2} mm from the axis, short of the blades' root face at {face:.2} mm, so no socket can hold the shank; give a diameter between {:.2} and {:.2} mm (e.g. {suggest:.2}, the default), or lengthen root.shank-length by more than {:.2} mm to bring the root face in",
                2.0 * radius,
                2.0 * face,
                2.0 * shank_end,
                face - radius,
            ),
        ));
    }
    if radius > shank_end {
        return Err(bad(
            "rotor.hub.diameter",
            format!(
                "{:.2} mm puts the hub's rim at {radius:.2} mm from the axis, past the end of the round shank at {shank_end:.2} mm (root face {face:.2} mm + root.shank-length {:.2} mm), so the socket would cut into the transition; give a diameter between {:.2} and {:.2} mm (e.g. {suggest:.2}, the default), or shorten root.transition-length by {:.2} mm to move the shank's end out",
                2.0 * radius,
                root.shank_length,
                2.0 * face,
                2.0 * shank_end,
                radius - shank_end,
            ),
        ));
    }
    if socket_radius + wall > 0.5 * thickness {
        return Err(bad(
            "rotor.hub.thickness",
            format!(
                "{thickness:.2} mm leaves {:.2} mm over the {:.2} mm socket, under rotor.hub.min-wall = {wall:.2} mm; make the hub at least {:.2} mm thick",
                0.5 * thickness - socket_radius,
                2.0 * socket_radius,
                2.0 * (socket_radius + wall)
            ),
        ));
    }
    if floor - rb < wall {
        return Err(bad(
            "rotor.hub.bore",
            format!(
                "the socket floors at radius {floor:.2} mm leave {:.2} mm to the bore, under rotor.hub.min-wall = {wall:.2} mm; use a smaller bore or a longer shank",
                floor - rb
            ),
        ));
    }
    Ok(())
}

/// Whether neighbouring sockets keep the wall between them at their floors.
fn sockets_apart(s: &Sockets, disc: &Disc) -> Result<(), AssemblyError> {
    let blades = s.angles.len();
    if blades < 2 {
        return Ok(());
    }
    let (a0, a1) = (
        socket_axis(s.angles[0], s.floor, disc.radius),
        socket_axis(s.angles[1], s.floor, disc.radius),
    );
    let gap = seg_dist(a0.0, a1.0, a1.1).min(seg_dist(a1.0, a0.0, a0.1)) - 2.0 * s.radius;
    if gap < disc.wall {
        return Err(bad(
            "rotor.blades",
            format!(
                "{blades} sockets of {:.2} mm leave {gap:.2} mm between neighbours at their floors, under rotor.hub.min-wall = {:.2} mm; use fewer blades, a thinner shank or a longer shank",
                2.0 * s.radius,
                disc.wall
            ),
        ));
    }
    Ok(())
}

/// Whether each bolt hole keeps the wall to every blade socket.
fn bolts_clear_sockets(
    s: &Sockets,
    (n, rh, rc): (u32, f64, f64),
    between: f64,
    disc: &Disc,
) -> Result<(), AssemblyError> {
    let wall = disc.wall;
    for k in 0..n {
        let a = (between + 360.0 * f64::from(k) / f64::from(n)).to_radians();
        let p = Point2::new(rc * a.sin(), rc * a.cos());
        for &angle in &s.angles {
            let (f, e) = socket_axis(angle, s.floor, disc.radius);
            let left = seg_dist(p, f, e) - rh - s.radius;
            if left < wall {
                return Err(bad(
                    "rotor.hub.bolt-circle",
                    format!(
                        "bolt hole {} comes within {left:.2} mm of a blade socket, under rotor.hub.min-wall = {wall:.2} mm; change bolt-circle, bolt-diameter or bolt-count",
                        k + 1
                    ),
                ));
            }
        }
    }
    Ok(())
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

    /// The exact volume of the disc minus its holes, mm³ (the mesh's circles are
    /// inscribed, its sockets circumscribed; it differs by less than the tolerance times
    /// the hole walls' and rim's areas).
    pub fn exact_volume(&self) -> f64 {
        let holes = self.bore_radius.map_or(0.0, |r| r * r)
            + self.bolts.map_or(0.0, |(n, r, _)| n as f64 * r * r);
        let disc = PI * (self.radius * self.radius - holes) * self.thickness;
        disc - self.sockets.as_ref().map_or(0.0, |s| {
            s.angles.len() as f64 * socket_volume(self.radius, s.radius, s.floor)
        })
    }

    /// The closed mesh; circles deviate at most `tol` (mm) from the exact ones. With
    /// sockets, rim triangles may span more than one side of the rim polygon, and their
    /// gap to the cylinder grows with their angular extent `dt` as `R (1 - cos(dt / 2))`.
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
        for (k, (c, r)) in loops.iter().enumerate() {
            let n = circle_sides(*r, tol);
            let start = pts.len();
            let a0 = if k == 0 {
                self.rim_start.to_radians()
            } else {
                0.0
            };
            for i in 0..n {
                let a = a0 + TAU * i as f64 / n as f64;
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
            if k == 0 && self.sockets.is_some() {
                self.rim_with_sockets(&mut mesh, ranges[0].len(), np, tol);
                continue;
            }
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

    /// The rim (outer cylinder) with the socket openings: a constrained Delaunay
    /// triangulation of the unrolled cylinder (U = R (theta - rim_start), y), seam at
    /// `rim_start` between sockets, and each socket's wall (a quad strip from its
    /// opening on the rim to its floor) and floor (a fan). Rim vertices `0..n` (top) and
    /// `np..np + n` (bottom) are already in `mesh`.
    fn rim_with_sockets(&self, mesh: &mut TriMesh, n: usize, np: u32, tol: f64) {
        let Some(sockets) = &self.sockets else {
            return;
        };
        let mut rim = UnrolledRim::new(self.radius, 0.5 * self.thickness, self.rim_start, n, np);
        // The socket is circumscribed (its flats touch the nominal circle), so the
        // shank's inscribed mesh keeps the whole clearance at any tolerance; a tenth of
        // the tolerance spare keeps its corners `r (sec(pi / m) - 1)` within it.
        let m = circle_sides(sockets.radius, 0.9 * tol);
        for &angle in &sockets.angles {
            rim.add_socket(mesh, sockets, angle, m);
        }
        rim.add_interior(mesh, n);
        rim.triangulate_into(mesh);
    }

    /// The hub as a named part.
    pub fn part(&self, name: &str, tol: f64) -> Part {
        Part {
            name: format!("{name}-hub"),
            mesh: self.mesh(tol),
        }
    }
}

/// The hub's rim unrolled into the plane (x along the rim from `rim_start`, y across
/// it): its edge polygons, the socket openings as holes and interior points, each
/// standing for a mesh vertex, for one constrained Delaunay triangulation.
struct UnrolledRim {
    /// Radius of the rim, mm.
    rr: f64,
    /// Half the hub's thickness, mm.
    h: f64,
    /// Where the unrolled rim starts, radians.
    start: f64,
    /// 2-D points of the unrolled rim.
    flat: Vec<Point2<f64>>,
    /// The mesh vertex each point stands for.
    index: Vec<u32>,
    /// Constraint edges.
    edges: Vec<[usize; 2]>,
    /// The socket openings' ranges in `flat`.
    holes: Vec<std::ops::Range<usize>>,
}

impl UnrolledRim {
    /// The rim's two edges (the faces' `n`-gons, the lower face's vertices from `np`)
    /// and its seam, as constraints.
    fn new(rr: f64, h: f64, rim_start_deg: f64, n: usize, np: u32) -> Self {
        let mut flat: Vec<Point2<f64>> = Vec::new();
        let mut index: Vec<u32> = Vec::new();
        let mut edges: Vec<[usize; 2]> = Vec::new();
        for (y, base) in [(h, 0u32), (-h, np)] {
            let first = flat.len();
            for j in 0..=n {
                flat.push(Point2::new(rr * TAU * j as f64 / n as f64, y));
                index.push(base + (j % n) as u32);
                if j > 0 {
                    edges.push([flat.len() - 2, flat.len() - 1]);
                }
            }
            if y < 0.0 {
                edges.push([0, first]);
                edges.push([n, first + n]);
            }
        }
        UnrolledRim {
            rr,
            h,
            start: rim_start_deg.to_radians(),
            flat,
            index,
            edges,
            holes: Vec::new(),
        }
    }

    /// Position along the unrolled rim of the angle `theta`, mm.
    fn unroll(&self, theta: f64) -> f64 {
        self.rr * (theta - self.start).rem_euclid(TAU)
    }

    /// The socket at `angle` (degrees): its opening in the rim (an `m`-gon circumscribed
    /// about the socket's circle, a hole of the unrolled rim), its wall and its floor,
    /// added to the mesh.
    fn add_socket(&mut self, mesh: &mut TriMesh, sockets: &Sockets, angle: f64, m: usize) {
        let rr = self.rr;
        let psi = angle.to_radians();
        let d = Vector3::new(psi.sin(), 0.0, psi.cos());
        let e = Vector3::new(psi.cos(), 0.0, -psi.sin());
        let first_flat = self.flat.len();
        let opening = mesh.vertices.len() as u32;
        let mut floor_ring = Vec::with_capacity(m);
        let corner = sockets.radius / (PI / m as f64).cos();
        for i in 0..m {
            let t = TAU * i as f64 / m as f64;
            let (a, b) = (corner * t.sin(), corner * t.cos());
            let along = (rr * rr - a * a).sqrt();
            mesh.push_vertex(Point3::from(d * along + e * a + Vector3::y() * b));
            floor_ring.push(Point3::from(d * sockets.floor + e * a + Vector3::y() * b));
            let x = self.unroll(psi + (a / rr).asin());
            self.flat.push(Point2::new(x, b));
            self.index.push(opening + i as u32);
            self.edges.push([first_flat + i, first_flat + (i + 1) % m]);
        }
        self.holes.push(first_flat..self.flat.len());
        let floor = mesh.vertices.len() as u32;
        for q in floor_ring {
            mesh.push_vertex(q);
        }
        let centre = mesh.push_vertex(Point3::from(d * sockets.floor));
        for i in 0..m as u32 {
            let j = (i + 1) % m as u32;
            let (o0, o1, f0, f1) = (opening + i, opening + j, floor + i, floor + j);
            // The wall faces the socket's axis; the floor faces up the socket.
            let mid = (mesh.vertices[o0 as usize].coords + mesh.vertices[f1 as usize].coords) * 0.5;
            let out = -(mid - d * mid.dot(&d));
            push_facing(mesh, [o0, o1, f1], out);
            push_facing(mesh, [o0, f1, f0], out);
            push_facing(mesh, [centre, f0, f1], d);
        }
    }

    /// Interior columns, two per angular step of the rim's `n`-gon: a rim triangle then
    /// spans less than one step around the axis (also beside a socket opening, where
    /// points nearer the outline than a third of a column are left out), so it stays
    /// within the tolerance of the cylinder: a step's sagitta is (see `circle_sides`).
    fn add_interior(&mut self, mesh: &mut TriMesh, n: usize) {
        let (rr, h) = (self.rr, self.h);
        let du = rr * TAU / (2 * n) as f64;
        let rows = ((2.0 * h / du).ceil() as usize).max(1);
        // Each opening with its box grown by a third of a column (and a millionth, for
        // rounding): a point outside it is neither inside the opening nor that near its
        // outline, so only points inside are tested against the outline.
        let outlines: Vec<(Vec<Point2<f64>>, Bounds)> = self
            .holes
            .iter()
            .map(|r| {
                let o = self.flat[r.clone()].to_vec();
                let b = Bounds::of(&o, du / 3.0 * (1.0 + 1e-6));
                (o, b)
            })
            .collect();
        for j in 1..2 * n {
            for k in 1..rows {
                let q = Point2::new(du * j as f64, -h + 2.0 * h * k as f64 / rows as f64);
                let near = outlines.iter().any(|(o, b)| {
                    b.holds(&q)
                        && (point_in_polygon(o, &q) || distance_to_outline(o, &q) < du / 3.0)
                });
                if near {
                    continue;
                }
                let theta = self.start + q.x / rr;
                let v = mesh.push_vertex(Point3::new(rr * theta.sin(), q.y, rr * theta.cos()));
                self.flat.push(q);
                self.index.push(v);
            }
        }
    }

    /// The rim's triangles outside the socket openings, facing out from the axis (none
    /// when the constraints cannot be triangulated).
    fn triangulate_into(self, mesh: &mut TriMesh) {
        use spade::{ConstrainedDelaunayTriangulation, Point2 as SPoint, Triangulation};
        let UnrolledRim {
            flat,
            index,
            edges,
            holes,
            ..
        } = self;
        let vertices: Vec<SPoint<f64>> = flat.iter().map(|p| SPoint::new(p.x, p.y)).collect();
        let Ok(cdt) =
            ConstrainedDelaunayTriangulation::<SPoint<f64>>::bulk_load_cdt(vertices, edges)
        else {
            return;
        };
        let polys: Vec<(&[Point2<f64>], Bounds)> = holes
            .iter()
            .map(|r| (&flat[r.clone()], Bounds::of(&flat[r.clone()], 0.0)))
            .collect();
        for face in cdt.inner_faces() {
            let [a, b, c] = face.vertices().map(|v| v.fix().index());
            let q = Point2::from((flat[a].coords + flat[b].coords + flat[c].coords) / 3.0);
            if polys
                .iter()
                .any(|(p, b)| b.holds(&q) && point_in_polygon(p, &q))
            {
                continue;
            }
            let t = [index[a], index[b], index[c]];
            let c3 = (mesh.vertices[t[0] as usize].coords
                + mesh.vertices[t[1] as usize].coords
                + mesh.vertices[t[2] as usize].coords)
                / 3.0;
            push_facing(mesh, t, Vector3::new(c3.x, 0.0, c3.z));
        }
    }
}

/// A polygon's bounding box grown by a margin: a point outside it is outside the
/// polygon and farther than the margin from its outline.
struct Bounds {
    min: Point2<f64>,
    max: Point2<f64>,
}

impl Bounds {
    fn of(points: &[Point2<f64>], margin: f64) -> Bounds {
        let (mut min, mut max) = (
            Point2::new(f64::INFINITY, f64::INFINITY),
            Point2::new(f64::NEG_INFINITY, f64::NEG_INFINITY),
        );
        for p in points {
            min = Point2::new(min.x.min(p.x), min.y.min(p.y));
            max = Point2::new(max.x.max(p.x), max.y.max(p.y));
        }
        Bounds {
            min: Point2::new(min.x - margin, min.y - margin),
            max: Point2::new(max.x + margin, max.y + margin),
        }
    }

    /// True when `q` lies in the box, its sides included.
    fn holds(&self, q: &Point2<f64>) -> bool {
        q.x >= self.min.x && q.x <= self.max.x && q.y >= self.min.y && q.y <= self.max.y
    }
}

/// Distance from `q` to the closed polygon `outline`.
fn distance_to_outline(outline: &[Point2<f64>], q: &Point2<f64>) -> f64 {
    (0..outline.len())
        .map(|i| {
            let (a, b) = (outline[i], outline[(i + 1) % outline.len()]);
            let ab = b - a;
            let t = ((q - a).dot(&ab) / ab.norm_squared().max(f64::MIN_POSITIVE)).clamp(0.0, 1.0);
            (a + ab * t - q).norm()
        })
        .fold(f64::INFINITY, f64::min)
}

/// Volume of one radial socket: a cylinder of radius `rs` along a radius of the disc,
/// from the floor plane at `floor` out to the rim cylinder of radius `rr`:
/// `V = integral over a^2 + b^2 <= rs^2 of (sqrt(rr^2 - a^2) - floor) da db`
/// `  = integral_{-pi/2}^{pi/2} 2 rs^2 cos^2(p) (sqrt(rr^2 - rs^2 sin^2 p) - floor) dp`
/// (a = rs sin p), by Simpson's rule on 512 panels (the integrand is smooth and
/// periodic-like, so the error is far below a micrometre cubed for hub sizes).
pub fn socket_volume(rr: f64, rs: f64, floor: f64) -> f64 {
    let f = |p: f64| {
        let (s, c) = p.sin_cos();
        2.0 * rs * rs * c * c * ((rr * rr - rs * rs * s * s).max(0.0).sqrt() - floor)
    };
    let k = 512;
    let (a, b) = (-0.5 * PI, 0.5 * PI);
    let step = (b - a) / k as f64;
    let mut sum = f(a) + f(b);
    for i in 1..k {
        sum += f(a + step * i as f64) * if i % 2 == 1 { 4.0 } else { 2.0 };
    }
    sum * step / 3.0
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

/// Triangulation of the first loop minus the others (no points are added: the loops do
/// not cross, so the constraint edges need no splitting); empty when impossible.
fn face_triangles(pts: &[Point2<f64>], ranges: &[std::ops::Range<usize>]) -> Vec<[u32; 3]> {
    crate::planar::triangulate(pts, ranges)
        .unwrap_or_default()
        .into_iter()
        .map(|t| t.map(|i| i as u32))
        .collect()
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
