//! The exact solid of the hub ([`crate::assembly::Hub`]): a disc about the rotor axis (y)
//! with a bore, bolt holes and radial blade sockets, the same part the hub's mesh
//! approximates.
//!
//! ```text
//!   rim: cylinder sectors, one per socket (sockets sit in a sector's middle, seams
//!        between sockets where the mesh puts its seam), each socket's opening an inner
//!        loop: the intersection of the two cylinders, fitted within 1e-7 mm
//!   top and bottom: planes y = +-thickness/2, with the bore and bolt circles
//!   bore, bolt holes: half-cylinders; sockets: half-cylinders and a flat floor
//! ```

use super::face::planar_face;
use super::geom::{arc, curve_edge, fit_curve, line_edge, Frame, Profile};
use super::hole::{hole, revolved_face, sector_face, Bottom};
use super::piece::closed_solid;
use super::BrepError;
use crate::assembly::Hub;
use std::f64::consts::{PI, TAU};
use truck_modeling::{Curve, Edge, Face, Point3, Solid, Vector3, Vertex, Wire};

/// Sectors of the rim per blade socket: one for three blades or more; three (an odd
/// count, so the socket sits in a sector's middle) for one or two, so no sector spans
/// more than 120 degrees.
fn sectors_per_socket(blades: usize) -> usize {
    if blades >= 3 {
        1
    } else {
        3
    }
}

/// The exact closed solid of `hub` (rotor coordinates, mm): the part
/// [`Hub::mesh`] tessellates.
///
/// # Errors
/// [`BrepError::BadFeature`] for a hub whose sockets do not fit their sectors or reach
/// the faces (a resolved [`Hub`] always fits); [`BrepError::NotExact`] when a socket's
/// opening cannot be fitted; [`BrepError::Kernel`] when truck refuses the result.
pub fn hub_solid(hub: &Hub) -> Result<Solid, BrepError> {
    let (rr, h) = (hub.radius, 0.5 * hub.thickness);
    if !(rr > 0.0 && h > 0.0 && rr.is_finite() && h.is_finite()) {
        return Err(BrepError::feature(
            "hub",
            format!("radius {rr} mm, thickness {} mm", hub.thickness),
            "give a positive size",
        ));
    }
    let sectors = Sectors::new(hub, rr, h)?;
    let mut faces: Vec<Face> = Vec::new();
    let rim = sectors.rim(hub, rr, h, &mut faces)?;
    // Bore and bolt holes: through holes from the bottom face to the top.
    let (mut top_mouths, mut bot_mouths) = (Vec::new(), Vec::new());
    for (x, z, r) in through_holes(hub) {
        let frame = Frame::new(Point3::new(x, -h, z), Vector3::unit_y(), Vector3::unit_z());
        let hf = hole(&frame, r, 2.0 * h, Bottom::Through)?;
        faces.extend(hf.faces);
        bot_mouths.push(hf.mouth);
        top_mouths.extend(hf.far_mouth);
    }
    faces.push(planar_face(
        Wire::from(rim.top_arcs),
        top_mouths,
        Point3::new(0.0, h, 0.0),
        Vector3::unit_y(),
    )?);
    faces.push(planar_face(
        Wire::from(rim.bot_arcs),
        bot_mouths,
        Point3::new(0.0, -h, 0.0),
        -Vector3::unit_y(),
    )?);
    closed_solid(faces)
}

/// Angle a about +y, measured from +z toward +x (the hub's convention).
const AXIS: Frame = Frame {
    origin: Point3::new(0.0, 0.0, 0.0),
    x: Vector3::new(0.0, 0.0, 1.0),
    y: Vector3::new(1.0, 0.0, 0.0),
    z: Vector3::new(0.0, 1.0, 0.0),
};

/// The rim's sectors: their bounding angles (radians, the last a full turn after the
/// first) and the socket each holds.
struct Sectors {
    bounds: Vec<f64>,
    socket_of: Vec<Option<usize>>,
}

/// The rim's edges along the top and bottom faces, one arc per sector.
struct RimEdges {
    top_arcs: Vec<Edge>,
    bot_arcs: Vec<Edge>,
}

impl Sectors {
    /// Two half-turns without sockets; else [`sectors_per_socket`] per socket, each
    /// socket's opening inside its sector and clear of the faces (half thickness `h`).
    fn new(hub: &Hub, rr: f64, h: f64) -> Result<Sectors, BrepError> {
        let Some(s) = &hub.sockets else {
            return Ok(Sectors {
                bounds: vec![0.0, PI, TAU],
                socket_of: vec![None, None],
            });
        };
        let m = s.angles.len() * sectors_per_socket(s.angles.len());
        let start = hub.rim_start.to_radians();
        let bounds: Vec<f64> = (0..=m).map(|k| start + TAU * k as f64 / m as f64).collect();
        let mut of = vec![None; m];
        for (j, &psi) in s.angles.iter().enumerate() {
            let a = (psi.to_radians() - start).rem_euclid(TAU);
            let k = ((a / TAU * m as f64).floor() as usize).min(m - 1);
            let half = (s.radius / rr).asin();
            let (lo, hi) = (TAU * k as f64 / m as f64, TAU * (k + 1) as f64 / m as f64);
            if !(a - half > lo && a + half < hi) || s.radius >= h {
                return Err(BrepError::feature(
                    format!("hub socket {}", j + 1),
                    "its opening does not fit between the neighbouring sockets and the hub's faces",
                    "use fewer blades, a thicker hub or a thinner shank",
                ));
            }
            of[k] = Some(j);
        }
        Ok(Sectors {
            bounds,
            socket_of: of,
        })
    }

    /// The rim's cylinder sectors (each socket's faces before its sector) pushed onto
    /// `faces`; returns the arcs along the top and bottom faces.
    fn rim(
        &self,
        hub: &Hub,
        rr: f64,
        h: f64,
        faces: &mut Vec<Face>,
    ) -> Result<RimEdges, BrepError> {
        let (axis, bounds) = (&AXIS, &self.bounds);
        let n = bounds.len() - 1;
        let top: Vec<Vertex> = (0..n)
            .map(|k| Vertex::new(axis.at(rr, bounds[k], h)))
            .collect();
        let bot: Vec<Vertex> = (0..n)
            .map(|k| Vertex::new(axis.at(rr, bounds[k], -h)))
            .collect();
        let mut top_arcs = Vec::new();
        let mut bot_arcs = Vec::new();
        for k in 0..n {
            let k1 = (k + 1) % n;
            top_arcs.push(curve_edge(
                &top[k],
                &top[k1],
                Curve::NurbsCurve(arc(axis, rr, h, bounds[k], bounds[k + 1])),
            )?);
            bot_arcs.push(curve_edge(
                &bot[k],
                &bot[k1],
                Curve::NurbsCurve(arc(axis, rr, -h, bounds[k], bounds[k + 1])),
            )?);
        }
        let sides: Vec<Edge> = (0..n)
            .map(|k| line_edge(&top[k], &bot[k]))
            .collect::<Result<_, _>>()?;
        let rim = Profile::line(rr, -h, rr, h);
        for k in 0..n {
            let k1 = (k + 1) % n;
            let outer = Wire::from(vec![
                top_arcs[k].clone(),
                sides[k1].clone(),
                bot_arcs[k].inverse(),
                sides[k].inverse(),
            ]);
            let mid = 0.5 * (bounds[k] + bounds[k + 1]);
            let mut inner = Vec::new();
            if let (Some(j), Some(s)) = (self.socket_of[k], &hub.sockets) {
                let (opening, socket_faces) = socket(rr, s.radius, s.floor, s.angles[j], j)?;
                inner.push(opening);
                faces.extend(socket_faces);
            }
            faces.push(revolved_face(
                axis,
                &rim,
                (bounds[k], bounds[k + 1]),
                outer,
                inner,
                axis.radial(mid),
            )?);
        }
        Ok(RimEdges { top_arcs, bot_arcs })
    }
}

/// The bore and the bolt holes, all through along y: `(x, z, radius)` of each.
fn through_holes(hub: &Hub) -> Vec<(f64, f64, f64)> {
    let mut holes: Vec<(f64, f64, f64)> = Vec::new();
    if let Some(rb) = hub.bore_radius {
        holes.push((0.0, 0.0, rb));
    }
    if let Some((count, rh, rc)) = hub.bolts {
        for k in 0..count {
            let a = hub.bolt_phase.to_radians() + TAU * k as f64 / count as f64;
            holes.push((rc * a.sin(), rc * a.cos(), rh));
        }
    }
    holes
}

/// Socket `j` at angle `psi` (degrees from +z toward +x) of radius `rs`, its floor at
/// `floor` from the axis, cut into a rim of radius `rr`: the opening loop in the rim and
/// the wall and floor faces.
fn socket(
    rr: f64,
    rs: f64,
    floor: f64,
    psi: f64,
    j: usize,
) -> Result<(Wire, Vec<Face>), BrepError> {
    let p = psi.to_radians();
    let d = Vector3::new(p.sin(), 0.0, p.cos());
    let e = Vector3::new(p.cos(), 0.0, -p.sin());
    let y = Vector3::unit_y();
    // The opening: a = rs sin t across, b = rs cos t along y, on the rim cylinder.
    let exact = |t: f64| {
        let (a, b) = (rs * t.sin(), rs * t.cos());
        let along = (rr * rr - a * a).sqrt();
        Some(Point3::new(0.0, 0.0, 0.0) + d * along + e * a + y * b)
    };
    let halves: Vec<truck_modeling::BSplineCurve<Point3>> = (0..2)
        .map(|k| fit_curve(k as f64 * PI, (k + 1) as f64 * PI, &exact))
        .collect::<Option<_>>()
        .ok_or_else(|| BrepError::NotExact {
            feature: "hub socket",
            reason: format!(
                "socket {}: its opening could not be fitted within 1e-7 mm",
                j + 1
            ),
        })?;
    let o0 = Vertex::new(*halves[0].control_points().first().expect("fitted"));
    let o1 = Vertex::new(*halves[1].control_points().first().expect("fitted"));
    let opening = [
        curve_edge(&o0, &o1, Curve::BSplineCurve(halves[0].clone()))?,
        curve_edge(&o1, &o0, Curve::BSplineCurve(halves[1].clone()))?,
    ];
    // The socket's frame: angle t from +y toward e, heights along -d.
    let frame = Frame {
        origin: Point3::new(0.0, 0.0, 0.0),
        x: y,
        y: e,
        z: -d,
    };
    let f0 = Vertex::new(frame.at(rs, 0.0, -floor));
    let f1 = Vertex::new(frame.at(rs, PI, -floor));
    let floor_arcs = [
        curve_edge(
            &f0,
            &f1,
            Curve::NurbsCurve(arc(&frame, rs, -floor, 0.0, PI)),
        )?,
        curve_edge(
            &f1,
            &f0,
            Curve::NurbsCurve(arc(&frame, rs, -floor, PI, TAU)),
        )?,
    ];
    let lines = [line_edge(&o0, &f0)?, line_edge(&o1, &f1)?];
    let wall = Profile::line(rs, -(rr + rs), rs, -floor);
    let mut faces = Vec::new();
    for k in 0..2 {
        let mid = (k as f64 + 0.5) * PI;
        faces.push(sector_face(
            &frame,
            &wall,
            k,
            vec![
                opening[k].clone(),
                lines[(k + 1) % 2].clone(),
                floor_arcs[k].inverse(),
                lines[k].inverse(),
            ],
            -frame.radial(mid),
        )?);
    }
    faces.push(planar_face(
        Wire::from(floor_arcs.to_vec()),
        Vec::new(),
        Point3::new(0.0, 0.0, 0.0) + d * floor,
        d,
    )?);
    Ok((Wire::from(opening.to_vec()), faces))
}
