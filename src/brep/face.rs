//! Faces with outward normals and correctly turning loops.
//!
//! A face of a closed solid faces outward, its outer loop runs counter-clockwise about
//! the outward normal and its inner loops clockwise (ISO 10303-42, `face_bound`; truck
//! stores loops the same way about the face's oriented normal). Builders here take loops
//! in any sense and the outward normal, and store them the way truck expects: about the
//! surface's natural normal, then invert the face when that normal points inward.

use super::BrepError;
use truck_modeling::{
    BoundedCurve, Face, InnerSpace, ParametricCurve, Plane, Point3, Surface, Vector3, Wire,
};

/// Vector area `1/2 sum p_k x p_(k+1)` of a closed wire, 16 samples per edge: for a
/// planar loop its area times the normal about which it turns counter-clockwise; for a
/// loop on a surface patch of less than a half-turn, roughly the patch's mean normal
/// times its area when the loop runs counter-clockwise about it.
pub(crate) fn vector_area(w: &Wire) -> Vector3 {
    let mut pts: Vec<Point3> = Vec::new();
    for e in w.edge_iter() {
        let c = e.oriented_curve();
        let (t0, t1) = c.range_tuple();
        for k in 0..16 {
            pts.push(c.subs(t0 + (t1 - t0) * k as f64 / 16.0));
        }
    }
    let o = pts.first().copied().unwrap_or(Point3::new(0.0, 0.0, 0.0));
    let mut s = Vector3::new(0.0, 0.0, 0.0);
    for k in 0..pts.len() {
        let (a, b) = (pts[k] - o, pts[(k + 1) % pts.len()] - o);
        s += a.cross(b);
    }
    s * 0.5
}

/// `w`, or its inverse, so that it turns counter-clockwise (`ccw`) or clockwise about
/// `normal`.
pub(crate) fn turned(w: Wire, normal: Vector3, ccw: bool) -> Wire {
    if (vector_area(&w).dot(normal) > 0.0) == ccw {
        w
    } else {
        w.inverse()
    }
}

/// The face on `surface` bounded by `loops` (outer first), which already turn the right
/// way about the outward normal. `natural_outward` tells whether the surface's natural
/// normal points out of the solid.
pub(crate) fn oriented_face(
    loops: Vec<Wire>,
    surface: Surface,
    natural_outward: bool,
) -> Result<Face, BrepError> {
    if natural_outward {
        Face::try_new(loops, surface).map_err(BrepError::kernel("face"))
    } else {
        let inverted = loops.into_iter().map(|w| w.inverse()).collect();
        let mut f = Face::try_new(inverted, surface).map_err(BrepError::kernel("face"))?;
        f.invert();
        Ok(f)
    }
}

/// The plane through `origin` whose natural normal is `normal`.
pub(crate) fn plane(origin: Point3, normal: Vector3) -> Plane {
    let n = normal.normalize();
    let hint = if n.x.abs() < 0.9 {
        Vector3::unit_x()
    } else {
        Vector3::unit_y()
    };
    let a = (hint - n * hint.dot(n)).normalize();
    let b = n.cross(a);
    Plane::new(origin, origin + a, origin + b)
}

/// A planar face through `origin` facing `outward`: `outer` is turned counter-clockwise
/// and every loop of `inner` clockwise about `outward`.
pub(crate) fn planar_face(
    outer: Wire,
    inner: Vec<Wire>,
    origin: Point3,
    outward: Vector3,
) -> Result<Face, BrepError> {
    let mut loops = vec![turned(outer, outward, true)];
    loops.extend(inner.into_iter().map(|w| turned(w, outward, false)));
    oriented_face(loops, Surface::Plane(plane(origin, outward)), true)
}
