//! Round holes across the skin, along the rotor axis (y): each cuts an entry loop out of
//! one skin face and an exit loop out of the other, joined by a cylindrical wall.
//!
//! The loops are where the hole's cylinder meets the lofted B-spline. That curve has no
//! closed form, so it is computed point by point (the hole's line at angle `phi` meets
//! the skin where the section at `z(phi)` has `x(phi)`: one bisection along the span,
//! one along the section) and fitted by a cubic B-spline within 1e-7 mm
//! ([`super::geom::FIT_TOLERANCE`], a tenth of the STEP file's uncertainty). The
//! surfaces themselves (skin and cylinder) are exact.

use super::geom::{curve_edge, fit_curve, line_edge, Frame, Profile};
use super::hole::sector_face;
use super::skin::{SkinPiece, SpanMap};
use super::BrepError;
use crate::loft::{Basis, Skin};
use std::f64::consts::{PI, TAU};
use truck_modeling::{Curve, Edge, Face, Point3, Vector3, Vertex, Wire};

/// A round hole through the skin along the rotor axis (y), its axis the line
/// `x = x, z = z`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CrossHole {
    /// x of the hole's axis, mm.
    pub x: f64,
    /// z (span position) of the hole's axis, mm.
    pub z: f64,
    /// Hole diameter, mm.
    pub diameter: f64,
}

/// Where the line along y at `(x0, z0)` crosses the skin: `(u, v, point)` per crossing,
/// larger y first. `None` unless there are exactly two crossings.
fn crossings(skin: &Skin, map: &SpanMap<'_>, x0: f64, z0: f64) -> Option<[(f64, f64, Point3); 2]> {
    let v = map.v_at(z0, "cross hole").ok()?;
    let bv = Basis::at(&skin.knots_v, skin.degree_v, v);
    let x = |u: f64| {
        skin.eval_basis(&Basis::at(&skin.knots_u, skin.degree_u, u), &bv)
            .x
            - x0
    };
    const N: usize = 512;
    let fx: Vec<f64> = (0..=N).map(|i| x(i as f64 / N as f64)).collect();
    let mut roots = Vec::new();
    for i in 0..N {
        if (fx[i] < 0.0) != (fx[i + 1] < 0.0) {
            let (mut a, mut b) = (i as f64 / N as f64, (i + 1) as f64 / N as f64);
            let sa = fx[i] < 0.0;
            for _ in 0..60 {
                let m = 0.5 * (a + b);
                if (x(m) < 0.0) == sa {
                    a = m;
                } else {
                    b = m;
                }
            }
            let u = 0.5 * (a + b);
            let p = skin.eval(u, v);
            roots.push((u, v, Point3::new(x0, p.y, z0)));
        }
    }
    if roots.len() != 2 {
        return None;
    }
    if roots[0].2.y < roots[1].2.y {
        roots.swap(0, 1);
    }
    Some([roots[0], roots[1]])
}

/// The hole's rim on the skin, traced from a table of robust crossings: between table
/// entries a point is found by Newton along the span (`z`) and around the section
/// (`x`), started from the table (`u`, `v` interpolated in the angle).
struct Tracer<'a> {
    skin: &'a Skin,
    map: &'a SpanMap<'a>,
    x: f64,
    z: f64,
    r: f64,
    /// `(u, v)` per side at angles `TAU k / n`, `k = 0..=n` (the last repeats the first).
    table: Vec<[(f64, f64); 2]>,
}

impl Tracer<'_> {
    /// The rim point of side `s` at angle `phi` in `[0, TAU]`.
    fn at(&self, phi: f64, s: usize) -> Option<Point3> {
        let n = self.table.len() - 1;
        let f = (phi / TAU * n as f64).clamp(0.0, n as f64);
        let k = (f.floor() as usize).min(n - 1);
        let w = f - k as f64;
        let (a, b) = (self.table[k][s], self.table[k + 1][s]);
        let (mut u, v0) = (a.0 + (b.0 - a.0) * w, a.1 + (b.1 - a.1) * w);
        let (sn, cs) = phi.sin_cos();
        let (x0, z0) = (self.x + self.r * cs, self.z + self.r * sn);
        let v = self.map.v_near(z0, v0, "cross hole").ok()?;
        let bv = Basis::at(&self.skin.knots_v, self.skin.degree_v, v);
        let x = |u: f64| {
            self.skin
                .eval_basis(&Basis::at(&self.skin.knots_u, self.skin.degree_u, u), &bv)
                .x
                - x0
        };
        // Newton on x(u) = x0 inside the table's bracket (widened a little).
        let (lo, hi) = (a.0.min(b.0), a.0.max(b.0));
        let pad = 0.5 * (hi - lo) + 1e-6;
        let (lo, hi) = (lo - pad, hi + pad);
        let mut ok = false;
        for _ in 0..30 {
            let h = 1e-8;
            let (fx, d) = (x(u), (x(u + h) - x(u - h)) / (2.0 * h));
            if fx.abs() < 1e-12 {
                ok = true;
                break;
            }
            if !(d.abs() > 0.0) {
                break;
            }
            let next = u - fx / d;
            if !(next > lo && next < hi) {
                break;
            }
            u = next;
        }
        if !ok {
            // Bisection on the bracket when Newton does not settle.
            let (mut p, mut q) = (lo.max(0.0), hi.min(1.0));
            if (x(p) < 0.0) == (x(q) < 0.0) {
                return None;
            }
            let sp = x(p) < 0.0;
            for _ in 0..60 {
                let m = 0.5 * (p + q);
                if (x(m) < 0.0) == sp {
                    p = m;
                } else {
                    q = m;
                }
            }
            u = 0.5 * (p + q);
        }
        let y = self.skin.eval(u, v).y;
        Some(Point3::new(x0, y, z0))
    }
}

/// One crossing of the hole's rim with the skin per side (larger y first), at one angle:
/// `(u, v, point)`.
type Crossing = [(f64, f64, Point3); 2];

/// One rim of the hole on the skin: two fitted halves joined at `phi = 0` and `pi`.
struct Rim {
    /// The halves, `phi` in `[0, pi]` and `[pi, 2 pi]`.
    edges: [Edge; 2],
    /// The vertices at `phi = 0` and `pi`.
    verts: [Vertex; 2],
}

/// Cuts `hole` (number `index`, for messages) into the skin faces of `piece`; returns
/// the hole's wall faces.
pub(crate) fn cut_cross_hole(
    skin: &Skin,
    piece: &mut SkinPiece,
    hole: &CrossHole,
    index: usize,
    planar: f64,
) -> Result<Vec<Face>, BrepError> {
    let what = format!("cross hole {} (z = {} mm)", index + 1, hole.z);
    let r = checked_radius(piece, hole, &what)?;
    let map = SpanMap::new(skin, planar)?;
    let samples = sample_rims(skin, &map, hole, r, &what)?;
    let sides = faces_of_sides(skin, &samples, &what)?;
    let tracer = Tracer {
        skin,
        map: &map,
        x: hole.x,
        z: hole.z,
        r,
        table: trace_table(&samples),
    };
    let rims = [fit_rim(&tracer, 0, &what)?, fit_rim(&tracer, 1, &what)?];
    // Inner loops of the skin faces: clockwise in the face's (u, v) parameters.
    for s in 0..2 {
        let area: f64 = (0..samples.len())
            .map(|k| {
                let (a, b) = (samples[k][s], samples[(k + 1) % samples.len()][s]);
                a.0 * b.1 - b.0 * a.1
            })
            .sum();
        let w = Wire::from(rims[s].edges.to_vec());
        piece.add_hole(sides[s], if area > 0.0 { w.inverse() } else { w });
    }
    wall_faces(hole, r, &samples, &rims)
}

/// The hole's radius, once its size is finite and it lies clear of the piece's ends.
fn checked_radius(piece: &SkinPiece, hole: &CrossHole, what: &str) -> Result<f64, BrepError> {
    let r = 0.5 * hole.diameter;
    if !(r > 0.0 && r.is_finite() && hole.x.is_finite() && hole.z.is_finite()) {
        return Err(BrepError::feature(
            what.to_string(),
            format!("diameter {} mm", hole.diameter),
            "give a positive diameter and finite position",
        ));
    }
    let (lo, hi) = (piece.z_low.min(piece.z_high), piece.z_low.max(piece.z_high));
    if !(hole.z - r > lo && hole.z + r < hi) {
        return Err(BrepError::feature(
            what.to_string(),
            format!(
                "the hole reaches from z = {} to {} mm, outside the skin piece's {lo} .. {hi} mm",
                hole.z - r,
                hole.z + r
            ),
            "move the hole onto the skin, clear of the piece's ends",
        ));
    }
    Ok(r)
}

/// Both rims sampled at 64 angles: each line along y must cross the skin exactly twice.
fn sample_rims(
    skin: &Skin,
    map: &SpanMap<'_>,
    hole: &CrossHole,
    r: f64,
    what: &str,
) -> Result<Vec<Crossing>, BrepError> {
    let at = |phi: f64| {
        let (s, c) = phi.sin_cos();
        crossings(skin, map, hole.x + r * c, hole.z + r * s)
    };
    (0..64)
        .map(|k| at(TAU * k as f64 / 64.0))
        .collect::<Option<_>>()
        .ok_or_else(|| {
            BrepError::feature(
                what.to_string(),
                "its rim does not cross the skin exactly twice all round (it breaks out at an edge of the section)",
                "move the hole inside the section or make it smaller",
            )
        })
}

/// The skin face (0 upper, 1 lower) each rim lies on: each must stay inside one face,
/// and the two rims on different faces.
fn faces_of_sides(skin: &Skin, samples: &[Crossing], what: &str) -> Result<[usize; 2], BrepError> {
    let margin = 1e-4;
    let u_le = skin.u_le;
    let mut sides = [0usize; 2];
    for (s, side) in sides.iter_mut().enumerate() {
        let us: Vec<f64> = samples.iter().map(|c| c[s].0).collect();
        let upper = us.iter().all(|&u| u > margin && u < u_le - margin);
        let lower = us.iter().all(|&u| u > u_le + margin && u < 1.0 - margin);
        *side = match (upper, lower) {
            (true, _) => 0,
            (_, true) => 1,
            _ => {
                return Err(BrepError::NotExact {
                    feature: "cross hole",
                    reason: format!(
                        "{what}: its rim crosses the leading or trailing edge, where the skin's faces meet; the exact solid keeps each hole inside one face (move the hole, or twist the root less)"
                    ),
                })
            }
        };
    }
    if sides[0] == sides[1] {
        return Err(BrepError::NotExact {
            feature: "cross hole",
            reason: format!("{what}: entry and exit lie on the same skin face"),
        });
    }
    Ok(sides)
}

/// The tracer's table: `(u, v)` per side at each sample, the first repeated at the end.
fn trace_table(samples: &[Crossing]) -> Vec<[(f64, f64); 2]> {
    let mut table: Vec<[(f64, f64); 2]> = samples
        .iter()
        .map(|c| [(c[0].0, c[0].1), (c[1].0, c[1].1)])
        .collect();
    table.push(table[0]);
    table
}

/// The rim of side `s`, fitted in two halves with vertices at `phi = 0` and `pi`.
fn fit_rim(tracer: &Tracer<'_>, s: usize, what: &str) -> Result<Rim, BrepError> {
    let exact = |phi: f64| tracer.at(phi, s);
    let halves: Vec<truck_modeling::BSplineCurve<Point3>> = (0..2)
        .map(|h| fit_curve(h as f64 * PI, (h + 1) as f64 * PI, &exact))
        .collect::<Option<_>>()
        .ok_or_else(|| BrepError::NotExact {
            feature: "cross hole",
            reason: format!("{what}: its rim could not be fitted within 1e-7 mm by 1024 points"),
        })?;
    let v0 = Vertex::new(*halves[0].control_points().first().expect("fitted"));
    let v1 = Vertex::new(*halves[1].control_points().first().expect("fitted"));
    let e0 = curve_edge(&v0, &v1, Curve::BSplineCurve(halves[0].clone()))?;
    let e1 = curve_edge(&v1, &v0, Curve::BSplineCurve(halves[1].clone()))?;
    Ok(Rim {
        edges: [e0, e1],
        verts: [v0, v1],
    })
}

/// The wall: the cylinder about the hole's axis (frame z = -y, angle phi from +x
/// toward +z), reaching past both rims, in two sectors.
fn wall_faces(
    hole: &CrossHole,
    r: f64,
    samples: &[Crossing],
    rims: &[Rim; 2],
) -> Result<Vec<Face>, BrepError> {
    let frame = Frame {
        origin: Point3::new(hole.x, 0.0, hole.z),
        x: Vector3::unit_x(),
        y: Vector3::unit_z(),
        z: -Vector3::unit_y(),
    };
    let ys: Vec<f64> = samples.iter().flat_map(|c| [c[0].2.y, c[1].2.y]).collect();
    let (ymin, ymax) = ys
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &y| {
            (a.min(y), b.max(y))
        });
    let pad = 0.1 * (ymax - ymin) + r;
    let profile = Profile::line(r, -(ymax + pad), r, -(ymin - pad));
    let lines = [
        line_edge(&rims[0].verts[0], &rims[1].verts[0])?,
        line_edge(&rims[0].verts[1], &rims[1].verts[1])?,
    ];
    let mut faces = Vec::new();
    for k in 0..2 {
        let mid = (k as f64 + 0.5) * PI;
        faces.push(sector_face(
            &frame,
            &profile,
            k,
            vec![
                rims[0].edges[k].clone(),
                lines[(k + 1) % 2].clone(),
                rims[1].edges[k].inverse(),
                lines[k].inverse(),
            ],
            -frame.radial(mid),
        )?);
    }
    Ok(faces)
}
