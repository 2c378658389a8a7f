//! Round holes along the span axis, opening in a planar end face: a cylinder split into
//! two half-cylinders (no seam edge), closed by a flat floor, a drill-point cone, or a
//! mouth in the opposite end face (a through channel).

use super::face::{oriented_face, planar_face, turned};
use super::geom::{arc, curve_edge, line_edge, revolve, Frame, Profile};
use super::BrepError;
use std::f64::consts::PI;
use truck_modeling::{
    Curve, Face, InnerSpace, ParametricSurface3D, Surface, Vector3, Vertex, Wire,
};

/// How a hole along the span axis ends.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Bottom {
    /// A flat floor at the hole's depth.
    Flat,
    /// A drill-point cone of this included angle (degrees, in (0, 180)) beyond the
    /// hole's depth, ending in a point on the axis.
    Point(f64),
    /// Through to the opposite end face of the piece (the depth is then ignored).
    Through,
}

impl Bottom {
    /// Axial length of the cone beyond the cylinder for a hole of radius `r`, mm.
    pub fn point_depth(&self, r: f64) -> f64 {
        match *self {
            Bottom::Point(angle) if angle < 180.0 => r / (0.5 * angle).to_radians().tan(),
            _ => 0.0,
        }
    }
}

/// The faces of one hole, and the loops it leaves in the end faces.
pub(crate) struct HoleFaces {
    /// Walls, floor or cone.
    pub faces: Vec<Face>,
    /// The mouth in the face the hole starts from (two half-circle edges).
    pub mouth: Wire,
    /// The far mouth of a through hole.
    pub far_mouth: Option<Wire>,
}

/// A half-cylinder or half-cone sector `k` (angles `k pi .. (k + 1) pi`) of the surface
/// of revolution of `profile` about `frame.z`, bounded by `edges` (any sense); it faces
/// `outward` at its middle (profile middle, angle `(k + 1/2) pi`).
pub(crate) fn sector_face(
    frame: &Frame,
    profile: &Profile,
    k: usize,
    edges: Vec<truck_modeling::Edge>,
    outward: Vector3,
) -> Result<Face, BrepError> {
    let (a0, a1) = (k as f64 * PI, (k + 1) as f64 * PI);
    revolved_face(
        frame,
        profile,
        (a0, a1),
        Wire::from(edges),
        Vec::new(),
        outward,
    )
}

/// A face on the surface of revolution of `profile` about `frame.z` between the angles
/// `a0` and `a1` (at most a half-turn), bounded by `outer` and `inner` loops (any
/// sense); it faces `outward` at its middle.
pub(crate) fn revolved_face(
    frame: &Frame,
    profile: &Profile,
    (a0, a1): (f64, f64),
    outer: Wire,
    inner: Vec<Wire>,
    outward: Vector3,
) -> Result<Face, BrepError> {
    let surface = revolve(frame, profile, a0, a1);
    let natural = surface.normal(0.5, 0.5);
    let mut loops = vec![turned(outer, outward, true)];
    loops.extend(inner.into_iter().map(|w| turned(w, outward, false)));
    oriented_face(
        loops,
        Surface::NurbsSurface(surface),
        natural.dot(outward) > 0.0,
    )
}

/// Builds a hole of radius `r` from the end face through `frame.origin` into the part
/// along `frame.z`: cylinder to `depth`, then `bottom`. For [`Bottom::Through`],
/// `depth` is the distance to the opposite end face.
pub(crate) fn hole(
    frame: &Frame,
    r: f64,
    depth: f64,
    bottom: Bottom,
) -> Result<HoleFaces, BrepError> {
    let v = |a: f64, h: f64| Vertex::new(frame.at(r, a, h));
    let (m0, m1) = (v(0.0, 0.0), v(PI, 0.0));
    let (f0, f1) = (v(0.0, depth), v(PI, depth));
    let circle = |a: &Vertex, b: &Vertex, h: f64| -> Result<[truck_modeling::Edge; 2], BrepError> {
        Ok([
            curve_edge(a, b, Curve::NurbsCurve(arc(frame, r, h, 0.0, PI)))?,
            curve_edge(b, a, Curve::NurbsCurve(arc(frame, r, h, PI, 2.0 * PI)))?,
        ])
    };
    let mouth = circle(&m0, &m1, 0.0)?;
    let floor = circle(&f0, &f1, depth)?;
    let walls = [line_edge(&m0, &f0)?, line_edge(&m1, &f1)?];
    let mut faces = Vec::new();
    let wall = Profile::line(r, 0.0, r, depth);
    for k in 0..2 {
        let mid = (k as f64 + 0.5) * PI;
        faces.push(sector_face(
            frame,
            &wall,
            k,
            vec![
                mouth[k].clone(),
                walls[(k + 1) % 2].clone(),
                floor[k].inverse(),
                walls[k].inverse(),
            ],
            -frame.radial(mid),
        )?);
    }
    let mut far_mouth = None;
    match bottom {
        Bottom::Flat => {
            faces.push(planar_face(
                Wire::from(floor.to_vec()),
                Vec::new(),
                frame.at(0.0, 0.0, depth),
                -frame.z,
            )?);
        }
        Bottom::Point(_) => {
            let h = bottom.point_depth(r);
            let apex = Vertex::new(frame.at(0.0, 0.0, depth + h));
            let spokes = [line_edge(&f0, &apex)?, line_edge(&f1, &apex)?];
            let cone = Profile::line(r, depth, 0.0, depth + h);
            for k in 0..2 {
                let mid = (k as f64 + 0.5) * PI;
                faces.push(sector_face(
                    frame,
                    &cone,
                    k,
                    vec![
                        floor[k].clone(),
                        spokes[(k + 1) % 2].clone(),
                        spokes[k].inverse(),
                    ],
                    -(frame.radial(mid) * h + frame.z * r).normalize(),
                )?);
            }
        }
        Bottom::Through => far_mouth = Some(Wire::from(floor.to_vec())),
    }
    Ok(HoleFaces {
        faces,
        mouth: Wire::from(mouth.to_vec()),
        far_mouth,
    })
}
