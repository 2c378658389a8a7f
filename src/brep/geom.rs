//! Geometry helpers shared by the builders: point conversion, exact circle arcs and
//! surfaces of revolution as rational B-splines, straight edges, and cubic interpolation
//! of sampled intersection curves.
//!
//! Circles are rational quadratic B-splines of at most 90 degrees per segment (The NURBS
//! Book, Piegl & Tiller, 2nd ed. 1997, section 7.5 and algorithm A7.1): exact, and read
//! by every STEP reader as `B_SPLINE_CURVE_WITH_KNOTS` + `RATIONAL_B_SPLINE_CURVE`.
//! Surfaces of revolution are the tensor product of a rational profile and such an arc
//! (section 8.5, algorithm A8.1), so cylinders, cones and the flange's fillet are exact
//! too. (truck's own `SURFACE_OF_REVOLUTION` is not used: truck-stepio 0.3 writes its
//! face sense flipped through the `Surface` enum, which an independent reader sees as a
//! face turned inside out.)

use super::BrepError;
use std::f64::consts::FRAC_PI_2;
use truck_modeling::{
    BSplineCurve, Curve, Edge, InnerSpace, KnotVec, Line, NurbsCurve, NurbsSurface, Point3,
    Vector3, Vector4, Vertex,
};

/// A truck point from a nalgebra point.
pub(crate) fn pt(p: &nalgebra::Point3<f64>) -> Point3 {
    Point3::new(p.x, p.y, p.z)
}

/// A right-handed orthonormal frame: circles lie in the planes spanned by `x` and `y`,
/// revolutions turn about `z` (counter-clockwise seen from +z, angle 0 along `x`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Frame {
    pub origin: Point3,
    pub x: Vector3,
    pub y: Vector3,
    pub z: Vector3,
}

impl Frame {
    /// The frame with `z` along `axis` (need not be unit) and `x` along `x_hint` made
    /// normal to it.
    pub fn new(origin: Point3, axis: Vector3, x_hint: Vector3) -> Frame {
        let z = axis.normalize();
        let x = (x_hint - z * x_hint.dot(z)).normalize();
        Frame {
            origin,
            x,
            y: z.cross(x),
            z,
        }
    }

    /// The point at radius `r`, angle `a` (radians) and height `h` along `z`.
    pub fn at(&self, r: f64, a: f64, h: f64) -> Point3 {
        let (s, c) = a.sin_cos();
        self.origin + self.z * h + (self.x * c + self.y * s) * r
    }

    /// The unit radial direction at angle `a`.
    pub fn radial(&self, a: f64) -> Vector3 {
        let (s, c) = a.sin_cos();
        self.x * c + self.y * s
    }
}

/// Control points `(cos, sin, weight)` of the unit circle arc from angle `a0` to `a1`
/// and its knot vector: `ceil(|a1 - a0| / 90 degrees)` rational quadratic segments
/// (NURBS Book A7.1), knots at the segment ends with multiplicity 2.
pub(crate) fn unit_arc(a0: f64, a1: f64) -> (Vec<(f64, f64, f64)>, KnotVec) {
    let n = ((a1 - a0).abs() / FRAC_PI_2 - 1e-9).ceil().max(1.0) as usize;
    let d = (a1 - a0) / n as f64;
    let w = (0.5 * d).cos();
    let mut pts = Vec::with_capacity(2 * n + 1);
    pts.push((a0.cos(), a0.sin(), 1.0));
    let mut knots = vec![0.0; 3];
    for i in 1..=n {
        let mid = a0 + (i as f64 - 0.5) * d;
        let end = a0 + i as f64 * d;
        pts.push((mid.cos() / w, mid.sin() / w, w));
        pts.push((end.cos(), end.sin(), 1.0));
        let k = if i == n { 1.0 } else { i as f64 / n as f64 };
        knots.extend([k, k]);
    }
    knots.push(1.0);
    (pts, KnotVec::from(knots))
}

/// Homogeneous control point of Cartesian `p` with weight `w`.
fn hom(p: Point3, w: f64) -> Vector4 {
    Vector4::new(p.x * w, p.y * w, p.z * w, w)
}

/// The exact circle arc of radius `r` at height `h` in `frame`, from angle `a0` to `a1`.
pub(crate) fn arc(frame: &Frame, r: f64, h: f64, a0: f64, a1: f64) -> NurbsCurve<Vector4> {
    let (unit, knots) = unit_arc(a0, a1);
    let cps = unit
        .iter()
        .map(|&(c, s, w)| {
            hom(
                frame.origin + frame.z * h + (frame.x * c + frame.y * s) * r,
                w,
            )
        })
        .collect();
    NurbsCurve::new(BSplineCurve::new(knots, cps))
}

/// A profile in the `(r, h)` half-plane of a frame: a B-spline (possibly rational) given
/// by its control points `(r, h, weight)` and knot vector.
#[derive(Debug, Clone)]
pub(crate) struct Profile {
    pub points: Vec<(f64, f64, f64)>,
    pub knots: KnotVec,
}

impl Profile {
    /// The straight segment from `(r0, h0)` to `(r1, h1)`.
    pub fn line(r0: f64, h0: f64, r1: f64, h1: f64) -> Profile {
        Profile {
            points: vec![(r0, h0, 1.0), (r1, h1, 1.0)],
            knots: KnotVec::bezier_knot(1),
        }
    }
}

/// The surface of revolution of `profile` about `frame.z` from angle `a0` to `a1`
/// (NURBS Book A8.1): `u` runs along the profile, `v` along the angle. Its natural
/// normal `S_u x S_v` is the profile's direction turned toward +angle.
pub(crate) fn revolve(frame: &Frame, profile: &Profile, a0: f64, a1: f64) -> NurbsSurface<Vector4> {
    let (unit, knots_v) = unit_arc(a0, a1);
    let cps = profile
        .points
        .iter()
        .map(|&(r, h, wp)| {
            unit.iter()
                .map(|&(c, s, w)| {
                    hom(
                        frame.origin + frame.z * h + (frame.x * c + frame.y * s) * r,
                        wp * w,
                    )
                })
                .collect()
        })
        .collect();
    NurbsSurface::new(truck_modeling::BSplineSurface::new(
        (profile.knots.clone(), knots_v),
        cps,
    ))
}

/// A straight edge from `a` to `b`.
pub(crate) fn line_edge(a: &Vertex, b: &Vertex) -> Result<Edge, BrepError> {
    Edge::try_new(a, b, Curve::Line(Line(a.point(), b.point()))).map_err(BrepError::kernel("edge"))
}

/// An edge along `curve` from `a` to `b` (the curve must start at `a` and end at `b`).
pub(crate) fn curve_edge(a: &Vertex, b: &Vertex, curve: Curve) -> Result<Edge, BrepError> {
    Edge::try_new(a, b, curve).map_err(BrepError::kernel("edge"))
}

/// The cubic B-spline interpolating `points` at the parameters `params` (strictly
/// increasing; clamped knots by averaging, NURBS Book section 9.2.1, equation 9.8),
/// solved densely (a few hundred points at most).
pub(crate) fn interpolate(points: &[Point3], params: &[f64]) -> Option<BSplineCurve<Point3>> {
    let n = points.len();
    if n < 4 || params.len() != n {
        return None;
    }
    let p = 3;
    let mut knots = vec![params[0]; p + 1];
    for j in 1..n - p {
        knots.push(params[j..j + p].iter().sum::<f64>() / p as f64);
    }
    knots.extend(std::iter::repeat_n(params[n - 1], p + 1));
    let mut a = nalgebra::DMatrix::<f64>::zeros(n, n);
    for (i, &t) in params.iter().enumerate() {
        let b = crate::loft::Basis::at(&knots, p, t);
        for (k, v) in b.values().iter().enumerate() {
            a[(i, b.first + k)] = *v;
        }
    }
    let lu = a.lu();
    let mut rhs = nalgebra::DMatrix::<f64>::zeros(n, 3);
    for (i, q) in points.iter().enumerate() {
        rhs[(i, 0)] = q.x;
        rhs[(i, 1)] = q.y;
        rhs[(i, 2)] = q.z;
    }
    let x = lu.solve(&rhs)?;
    let cps = (0..n)
        .map(|i| Point3::new(x[(i, 0)], x[(i, 1)], x[(i, 2)]))
        .collect();
    BSplineCurve::try_new(KnotVec::from(knots), cps).ok()
}

/// Largest distance allowed between a fitted intersection curve and the exact
/// intersection, mm: a tenth of the STEP file's uncertainty (1e-6 mm).
pub(crate) const FIT_TOLERANCE: f64 = 1e-7;

/// Fits a cubic B-spline to the curve `exact(t)`, `t` in `[t0, t1]`, by interpolating
/// samples at evenly spaced parameters, doubling the samples until the fit is within
/// [`FIT_TOLERANCE`] of the exact curve at every midpoint between samples. `None` when
/// 1024 samples do not reach it or `exact` fails.
pub(crate) fn fit_curve(
    t0: f64,
    t1: f64,
    exact: &dyn Fn(f64) -> Option<Point3>,
) -> Option<BSplineCurve<Point3>> {
    use truck_modeling::ParametricCurve;
    let mut n = 16;
    while n <= 1024 {
        let params: Vec<f64> = (0..=n)
            .map(|i| t0 + (t1 - t0) * i as f64 / n as f64)
            .collect();
        let points: Vec<Point3> = params.iter().map(|&t| exact(t)).collect::<Option<_>>()?;
        let curve = interpolate(&points, &params)?;
        let mut worst = 0.0f64;
        for w in params.windows(2) {
            let t = 0.5 * (w[0] + w[1]);
            worst = worst.max((curve.subs(t) - exact(t)?).magnitude());
        }
        if worst <= FIT_TOLERANCE {
            return Some(curve);
        }
        n *= 2;
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;
    use truck_modeling::ParametricCurve;

    #[test]
    fn arcs_lie_on_their_circle() {
        // A rational quadratic arc is exactly a circle (NURBS Book, section 7.5).
        let f = Frame::new(
            Point3::new(1.0, 2.0, 3.0),
            Vector3::new(0.3, -0.2, 1.0),
            Vector3::unit_x(),
        );
        for (a0, a1) in [
            (0.0, 3.0),
            (1.0, 1.5),
            (-2.0, 2.0 * std::f64::consts::PI - 2.0),
        ] {
            let c = arc(&f, 7.5, 2.0, a0, a1);
            for k in 0..=200 {
                let p = c.subs(k as f64 / 200.0);
                let d = p - (f.origin + f.z * 2.0);
                assert!((d.dot(f.z)).abs() < 1e-12);
                assert!((d.magnitude() - 7.5).abs() < 1e-12, "{}", d.magnitude());
            }
            assert!((c.subs(0.0) - f.at(7.5, a0, 2.0)).magnitude() < 1e-12);
            assert!((c.subs(1.0) - f.at(7.5, a1, 2.0)).magnitude() < 1e-12);
        }
    }

    #[test]
    fn revolved_line_is_a_cone() {
        // A line from (r, h) = (4, 0) to (1, 3) revolved: r = 4 - h on the surface.
        let f = Frame::new(
            Point3::new(0.0, 0.0, 0.0),
            Vector3::unit_z(),
            Vector3::unit_x(),
        );
        let s = revolve(&f, &Profile::line(4.0, 0.0, 1.0, 3.0), 0.5, 2.5);
        for i in 0..=20 {
            for j in 0..=20 {
                let p = s.subs(i as f64 / 20.0, j as f64 / 20.0);
                let r = (p.x * p.x + p.y * p.y).sqrt();
                assert!((r - (4.0 - p.z)).abs() < 1e-12);
            }
        }
    }

    #[test]
    fn interpolation_passes_through_points() {
        let pts: Vec<Point3> = (0..10)
            .map(|i| Point3::new(i as f64, (i as f64).sin(), 0.0))
            .collect();
        let ts: Vec<f64> = (0..10).map(|i| i as f64 / 9.0).collect();
        let c = interpolate(&pts, &ts).unwrap();
        for (p, t) in pts.iter().zip(&ts) {
            assert!((c.subs(*t) - p).magnitude() < 1e-12);
        }
    }
}
