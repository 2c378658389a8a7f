//! A part made of a piece of skin and its features: the API the blade, its segments and
//! the one-piece rotor are built from.

use super::cross::{cut_cross_hole, CrossHole};
use super::face::{oriented_face, planar_face, turned};
use super::geom::{arc, curve_edge, Frame, Profile};
use super::hole::{hole, sector_face, Bottom};
use super::skin::{Cut, SkinOptions, SkinPiece};
use super::{check_knots, BrepError};
use crate::loft::Skin;
use crate::root::RootSpec;
use std::f64::consts::{FRAC_1_SQRT_2, PI};
use truck_modeling::{
    BSplineCurve, BSplineSurface, BoundedCurve, Curve, Edge, Face, InnerSpace, KnotVec, NurbsCurve,
    NurbsSurface, ParametricCurve, ParametricSurface3D, Point3, Shell, ShellCondition, Solid,
    Surface, Vector3, Vector4, Vertex, Wire,
};

/// Which end of a piece a feature belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum End {
    /// The end at the skin's smaller `v` (the root side).
    Low,
    /// The end at the skin's larger `v` (the tip side).
    High,
}

/// A round hole along the span axis into the part from one of its planar end faces
/// (a bore, a spar channel, a pin hole).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EndHole {
    /// The end face it opens in.
    pub end: End,
    /// Axis position (x, y), mm.
    pub centre: [f64; 2],
    /// Diameter, mm.
    pub diameter: f64,
    /// Depth of the cylindrical part from the end face, mm (ignored for
    /// [`Bottom::Through`]).
    pub depth: f64,
    /// How it ends.
    pub bottom: Bottom,
}

/// A round flange plate below the skin's low end, joined to it by a fillet (a concave
/// quarter circle in every half-plane through the shank's axis, the ring moved
/// radially outward), as [`crate::mount`] meshes it. The skin must start at the top of
/// the fillet (`flange face + thickness + fillet`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Flange {
    /// Centre of the plate and of the shank (x, y), mm.
    pub centre: [f64; 2],
    /// Plate diameter, mm.
    pub diameter: f64,
    /// Plate thickness, mm.
    pub thickness: f64,
    /// Fillet radius, mm (0: none).
    pub fillet: f64,
    /// The shank's radius at the skin's low end, mm: with a fillet the low end must be
    /// this circle (within 0.1 %), since only there the mesh's radial offset of the
    /// ring is an exact surface (a scaled copy of the ring).
    pub shank_radius: f64,
}

/// A part cut from a skin: the span range and the features. The solid is closed by
/// planar faces at both ends (the flange at the low end, when given); end holes open in
/// those faces, cross holes go through the skin.
///
/// ```text
///        high end (skin's tip, or a plane z = const): planar cap + end holes
///   |   skin faces (upper, lower, trailing edge), cross holes along y   |
///        low end (skin's root, or a plane z = const): planar cap + end holes,
///        or the flange (fillet, plate) with the end holes in its face
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct PieceSpec {
    /// Where the piece starts (smaller `v`).
    pub low: Cut,
    /// Where the piece ends.
    pub high: Cut,
    /// Flange at the low end (needs `low = Cut::SkinEnd`).
    pub flange: Option<Flange>,
    /// Holes from the end faces.
    pub end_holes: Vec<EndHole>,
    /// Holes across the skin.
    pub cross_holes: Vec<CrossHole>,
}

impl PieceSpec {
    /// The whole skin, no features: the blade skin with planar caps.
    pub fn whole() -> PieceSpec {
        PieceSpec {
            low: Cut::SkinEnd,
            high: Cut::SkinEnd,
            flange: None,
            end_holes: Vec::new(),
            cross_holes: Vec::new(),
        }
    }

    /// The piece between two planes `z = z0` and `z = z1` (either may be the skin's
    /// end), no features.
    pub fn between(low: Cut, high: Cut) -> PieceSpec {
        PieceSpec {
            low,
            high,
            ..PieceSpec::whole()
        }
    }

    /// The blade of a `[root]` table: flange, bore (a drill point or flat floor) and
    /// cross holes as [`crate::mount`] meshes them, on a skin lofted by the pipeline
    /// (`root_face` = [`crate::blade::Blade::root_face`], mm). The flat and the round
    /// tip are part of the skin already.
    pub fn blade(root: Option<&RootSpec>, root_face: f64) -> PieceSpec {
        let mut spec = PieceSpec::whole();
        let Some(root) = root else {
            return spec;
        };
        let centre = root.centre.map_or([0.0, 0.0], |p| [p.x, p.y]);
        spec.flange = root.flange.as_ref().map(|f| Flange {
            centre,
            diameter: f.diameter,
            thickness: f.thickness,
            fillet: f.fillet,
            shank_radius: 0.5 * root.shank_diameter,
        });
        if let Some(b) = &root.bore {
            spec.end_holes.push(EndHole {
                end: End::Low,
                centre,
                diameter: b.diameter,
                depth: b.depth,
                bottom: if b.point_angle >= 180.0 {
                    Bottom::Flat
                } else {
                    Bottom::Point(b.point_angle)
                },
            });
        }
        spec.cross_holes = root
            .cross_holes
            .iter()
            .map(|h| CrossHole {
                x: centre[0],
                z: root_face + h.at,
                diameter: h.diameter,
            })
            .collect();
        spec
    }
}

/// The exact closed solid of a blade: [`PieceSpec::blade`] on `skin`.
///
/// # Errors
/// See [`piece_solid`].
pub fn blade_solid(
    skin: &Skin,
    root: Option<&RootSpec>,
    root_face: f64,
) -> Result<Solid, BrepError> {
    piece_solid(
        skin,
        &PieceSpec::blade(root, root_face),
        &SkinOptions::DEFAULT,
    )
}

/// The faces of one end, and the loops its holes leave.
struct EndFaces {
    faces: Vec<Face>,
}

/// Builds the exact closed solid of `spec` on `skin`: skin faces, end faces (caps or
/// flange), end holes and cross holes, every face facing outward. The kernel's own
/// check must grade the shell closed, and every knot vector must be one a STEP reader
/// reads as written ([`check_knots`]).
///
/// # Errors
/// [`BrepError::BadSkin`] for a malformed skin; [`BrepError::BadFeature`] for a feature
/// that does not fit (a hole breaking out of the section, overlapping holes, a split
/// plane outside the skin); [`BrepError::NotExact`] for a feature this builder cannot
/// make exact as the mesh has it (a fillet on a shank that is not round, a cross hole
/// across the leading or trailing edge); [`BrepError::Kernel`] when truck refuses the
/// result.
pub fn piece_solid(skin: &Skin, spec: &PieceSpec, opts: &SkinOptions) -> Result<Solid, BrepError> {
    let mut piece = SkinPiece::new(skin, spec.low, spec.high, opts)?;
    let mut faces: Vec<Face> = Vec::new();
    check_end_holes(skin, &piece, spec, opts)?;
    for (i, h) in spec.cross_holes.iter().enumerate() {
        faces.extend(cut_cross_hole(skin, &mut piece, h, i, opts.planar)?);
    }
    let s = piece.span_sign();
    let dir = Vector3::new(0.0, 0.0, s);
    // End holes and their mouths.
    let z_face_low = match (&spec.flange, spec.low) {
        (Some(f), Cut::SkinEnd) => piece.z_low - s * (f.thickness + f.fillet),
        (Some(_), Cut::Plane(_)) => {
            return Err(BrepError::feature(
                "flange",
                "a flange needs the piece to start at the skin's own low end",
                "drop the flange or start the piece at the skin's end",
            ))
        }
        (None, _) => piece.z_low,
    };
    let z_face_high = piece.z_high;
    let mut mouths: [Vec<Wire>; 2] = [Vec::new(), Vec::new()];
    for h in &spec.end_holes {
        let (z0, into, end) = match h.end {
            End::Low => (z_face_low, dir, 0),
            End::High => (z_face_high, -dir, 1),
        };
        let origin = Point3::new(h.centre[0], h.centre[1], z0);
        let frame = Frame::new(origin, into, Vector3::unit_x());
        let depth = match h.bottom {
            Bottom::Through => (z_face_high - z_face_low).abs(),
            _ => h.depth,
        };
        let hf = hole(&frame, 0.5 * h.diameter, depth, h.bottom)?;
        faces.extend(hf.faces);
        mouths[end].push(hf.mouth);
        if let Some(far) = hf.far_mouth {
            mouths[1 - end].push(far);
        }
    }
    // Low end.
    let [low_mouths, high_mouths] = mouths;
    match &spec.flange {
        Some(f) => faces.extend(flange_faces(&piece, f, z_face_low, low_mouths)?.faces),
        None => faces.push(planar_face(
            piece.low_loop(),
            low_mouths,
            Point3::new(0.0, 0.0, piece.z_low),
            -dir,
        )?),
    }
    faces.push(planar_face(
        piece.high_loop(),
        high_mouths,
        Point3::new(0.0, 0.0, piece.z_high),
        dir,
    )?);
    faces.extend(piece.faces()?);
    closed_solid(faces)
}

/// The shell of `faces`, graded closed by the kernel, as a solid with checked knots.
pub(crate) fn closed_solid(faces: Vec<Face>) -> Result<Solid, BrepError> {
    let shell: Shell = faces.into();
    let grade = shell.shell_condition();
    if grade != ShellCondition::Closed {
        return Err(BrepError::Kernel {
            what: "shell",
            detail: format!("the kernel grades it {grade:?}, not Closed"),
        });
    }
    let solid = Solid::try_new(vec![shell]).map_err(BrepError::kernel("solid"))?;
    check_knots(&solid)?;
    Ok(solid)
}

/// Polygon of the skin's section at `z` (400 points), or `None` outside the skin.
fn section_at(skin: &Skin, v: f64) -> Vec<(f64, f64)> {
    let us: Vec<f64> = (0..400).map(|i| i as f64 / 400.0).collect();
    skin.iso_v(v, &us).iter().map(|p| (p.x, p.y)).collect()
}

/// Signed distance from `q` to a closed polygon: positive inside.
fn inside_distance(poly: &[(f64, f64)], q: (f64, f64)) -> f64 {
    let mut d = f64::INFINITY;
    let mut inside = false;
    for k in 0..poly.len() {
        let (a, b) = (poly[k], poly[(k + 1) % poly.len()]);
        let (ex, ey) = (b.0 - a.0, b.1 - a.1);
        let len2 = ex * ex + ey * ey;
        let t = if len2 > 0.0 {
            (((q.0 - a.0) * ex + (q.1 - a.1) * ey) / len2).clamp(0.0, 1.0)
        } else {
            0.0
        };
        let (px, py) = (a.0 + ex * t - q.0, a.1 + ey * t - q.1);
        d = d.min((px * px + py * py).sqrt());
        if (a.1 > q.1) != (b.1 > q.1) && q.0 < a.0 + (q.1 - a.1) / (b.1 - a.1) * ex {
            inside = !inside;
        }
    }
    if inside {
        d
    } else {
        -d
    }
}

/// The span an end hole takes along z (from its face to its reach) and its axis and
/// radius, for the overlap checks.
struct Extent {
    /// z of the hole's face, mm.
    from: f64,
    /// z as far as it reaches, mm.
    to: f64,
    centre: [f64; 2],
    r: f64,
}

impl Extent {
    /// The smaller and the larger z of the hole's span.
    fn range(&self) -> (f64, f64) {
        (self.from.min(self.to), self.from.max(self.to))
    }
}

/// End holes must stay inside the section over their length, away from each other and
/// from the cross holes.
fn check_end_holes(
    skin: &Skin,
    piece: &SkinPiece,
    spec: &PieceSpec,
    opts: &SkinOptions,
) -> Result<(), BrepError> {
    if spec.end_holes.is_empty() && spec.cross_holes.len() < 2 {
        return Ok(());
    }
    let map = super::skin::SpanMap::new(skin, opts.planar)?;
    let mut extents: Vec<Extent> = Vec::new();
    for (i, h) in spec.end_holes.iter().enumerate() {
        let what = format!("end hole {} (diameter {} mm)", i + 1, h.diameter);
        let e = end_hole_extent(piece, spec, h, &what)?;
        check_inside_section(skin, &map, piece, h, &e, &what)?;
        check_clearances(spec, h, &e, &extents, &what)?;
        extents.push(e);
    }
    check_cross_holes_apart(spec)
}

/// The z range the end hole `h` takes (its reach from its face), once its size, depth
/// and point angle are valid and it does not run through the piece.
fn end_hole_extent(
    piece: &SkinPiece,
    spec: &PieceSpec,
    h: &EndHole,
    what: &str,
) -> Result<Extent, BrepError> {
    let s = piece.span_sign();
    let (zl, zh) = (piece.z_low, piece.z_high);
    let span = (zh - zl).abs();
    let r = 0.5 * h.diameter;
    if !(r > 0.0 && r.is_finite() && h.centre.iter().all(|c| c.is_finite())) {
        return Err(BrepError::feature(
            what.to_string(),
            "not a positive finite size",
            "give a positive diameter",
        ));
    }
    let reach = match h.bottom {
        Bottom::Through => span,
        b => {
            if !(h.depth > 0.0 && h.depth.is_finite()) {
                return Err(BrepError::feature(
                    what.to_string(),
                    format!("depth {} mm", h.depth),
                    "give a positive depth",
                ));
            }
            if let Bottom::Point(a) = b {
                if !(a > 0.0 && a < 180.0) {
                    return Err(BrepError::feature(
                        what.to_string(),
                        format!("point angle {a} degrees"),
                        "give an angle between 0 and 180 degrees (or a flat floor)",
                    ));
                }
            }
            h.depth + b.point_depth(r)
        }
    };
    let flange_depth = spec.flange.map_or(0.0, |f| f.thickness + f.fillet);
    if reach >= span + if h.end == End::Low { flange_depth } else { 0.0 }
        && h.bottom != Bottom::Through
    {
        return Err(BrepError::feature(
            what.to_string(),
            format!("it reaches {reach} mm deep, through the piece"),
            "make it shallower or a through hole",
        ));
    }
    let (za, zb) = match h.end {
        End::Low => (zl - s * flange_depth, zl - s * flange_depth + s * reach),
        End::High => (zh - s * reach, zh),
    };
    Ok(Extent {
        from: za,
        to: zb,
        centre: h.centre,
        r,
    })
}

/// The end hole stays inside the section all along (sampled at 24 levels on the skin,
/// from its face to its reach).
fn check_inside_section(
    skin: &Skin,
    map: &super::skin::SpanMap<'_>,
    piece: &SkinPiece,
    h: &EndHole,
    e: &Extent,
    what: &str,
) -> Result<(), BrepError> {
    let s = piece.span_sign();
    let (zl, zh) = (piece.z_low, piece.z_high);
    let span = (zh - zl).abs();
    let (za, zb) = (e.from, e.to);
    for k in 0..=24 {
        let z = za + (zb - za) * k as f64 / 24.0;
        let zc = if s > 0.0 {
            z.clamp(zl.min(zh), zl.max(zh))
        } else {
            z.clamp(zh.min(zl), zh.max(zl))
        };
        let v = if (zc - zl).abs() < 1e-9 * span.max(1.0) {
            end_v(zl, map, 0.0)?
        } else if (zc - zh).abs() < 1e-9 * span.max(1.0) {
            end_v(zh, map, 1.0)?
        } else {
            map.v_at(zc, what)?
        };
        let room = inside_distance(&section_at(skin, v), (h.centre[0], h.centre[1]));
        if room <= e.r {
            return Err(BrepError::feature(
                what.to_string(),
                format!(
                    "at z = {zc:.3} mm it comes {:.3} mm outside the section",
                    e.r - room
                ),
                "move the hole toward the section's middle, make it smaller or shorter",
            ));
        }
    }
    Ok(())
}

/// The end hole stays inside the flange's rim and clear of the end holes before it
/// (`extents`) and of every cross hole.
fn check_clearances(
    spec: &PieceSpec,
    h: &EndHole,
    e: &Extent,
    extents: &[Extent],
    what: &str,
) -> Result<(), BrepError> {
    let r = e.r;
    if let Some(f) = &spec.flange {
        let d = ((h.centre[0] - f.centre[0]).powi(2) + (h.centre[1] - f.centre[1]).powi(2)).sqrt();
        if h.end == End::Low && d + r >= 0.5 * f.diameter {
            return Err(BrepError::feature(
                what.to_string(),
                "it breaks out of the flange's rim",
                "move it inside the flange",
            ));
        }
    }
    let (lo, hi) = e.range();
    for (j, o) in extents.iter().enumerate() {
        let (lo2, hi2) = o.range();
        let d = ((h.centre[0] - o.centre[0]).powi(2) + (h.centre[1] - o.centre[1]).powi(2)).sqrt();
        if lo < hi2 && lo2 < hi && d <= r + o.r {
            return Err(BrepError::feature(
                what.to_string(),
                format!("it overlaps end hole {}", j + 1),
                "space the holes apart",
            ));
        }
    }
    for (j, c) in spec.cross_holes.iter().enumerate() {
        let rc = 0.5 * c.diameter;
        if lo < c.z + rc && c.z - rc < hi && (h.centre[0] - c.x).abs() < r + rc {
            return Err(BrepError::feature(
                what.to_string(),
                format!("it meets cross hole {}", j + 1),
                "move the cross hole beyond the end hole's depth",
            ));
        }
    }
    Ok(())
}

/// No two cross holes overlap.
fn check_cross_holes_apart(spec: &PieceSpec) -> Result<(), BrepError> {
    for (i, a) in spec.cross_holes.iter().enumerate() {
        for (j, b) in spec.cross_holes.iter().enumerate().skip(i + 1) {
            let (ra, rb) = (0.5 * a.diameter, 0.5 * b.diameter);
            if ((a.x - b.x).powi(2) + (a.z - b.z).powi(2)).sqrt() <= ra + rb {
                return Err(BrepError::feature(
                    format!("cross hole {}", j + 1),
                    format!("it overlaps cross hole {}", i + 1),
                    "space the holes apart",
                ));
            }
        }
    }
    Ok(())
}

/// The `v` of an end of the piece at `z`: the skin's own end (`skin_end`, 0 or 1) when
/// the piece ends there, else the cut plane's.
fn end_v(z: f64, map: &super::skin::SpanMap<'_>, skin_end: f64) -> Result<f64, BrepError> {
    if (map.z(skin_end) - z).abs() < 1e-9 * z.abs().max(1.0) {
        Ok(skin_end)
    } else {
        map.v_at(z, "piece end")
    }
}

/// The flange at the low end: fillet faces (when the fillet is not zero) from the skin's
/// low loop down to the plate, the plate's top annulus, rim and face (with `mouths`).
fn flange_faces(
    piece: &SkinPiece,
    f: &Flange,
    z_face: f64,
    mouths: Vec<Wire>,
) -> Result<EndFaces, BrepError> {
    let s = piece.span_sign();
    let c = Point3::new(f.centre[0], f.centre[1], 0.0);
    let r_f = 0.5 * f.diameter;
    let z_top = piece.z_low - s * f.fillet;
    if !(f.thickness > 0.0 && f.fillet >= 0.0 && r_f > 0.0) {
        return Err(BrepError::feature(
            "flange",
            format!(
                "thickness {} mm, fillet {} mm, diameter {} mm",
                f.thickness, f.fillet, f.diameter
            ),
            "give a positive thickness and diameter and a fillet of zero or more",
        ));
    }
    let mut faces = Vec::new();
    let low = piece.low_loop();
    let rho = ring_radii(&low, c);
    let foot = if f.fillet > 0.0 {
        let r = f.shank_radius;
        if (rho.1 - r).abs() > 1e-3 * r || (r - rho.0).abs() > 1e-3 * r {
            return Err(BrepError::NotExact {
                feature: "flange fillet",
                reason: format!(
                    "the shank at the fillet is not round (its radius runs from {:.3} to {:.3} mm about the flange's centre, for a round shank of {r:.3} mm): the mesh moves each point of the ring outward by the fillet, which on a shank that is not round (elliptical, or with a flat) is no surface a STEP file can hold exactly; use a round shank without a flat, or no fillet",
                    rho.0, rho.1
                ),
            });
        }
        let k_out = 1.0 + f.fillet / r;
        let (fillet_faces, foot) = fillet(piece, &low, c, k_out, z_top)?;
        faces.extend(fillet_faces);
        foot
    } else {
        low
    };
    let foot_max = if f.fillet > 0.0 {
        rho.1 * (1.0 + f.fillet / f.shank_radius)
    } else {
        rho.1
    };
    if foot_max >= r_f {
        return Err(BrepError::feature(
            "flange",
            format!("the shank and its fillet reach {foot_max:.3} mm from the centre, the flange's rim only {r_f:.3} mm"),
            "make the flange larger than the shank and its fillet",
        ));
    }
    let plate = Plate {
        frame: Frame::new(
            Point3::new(c.x, c.y, z_face),
            Vector3::new(0.0, 0.0, s),
            Vector3::unit_x(),
        ),
        r_f,
        h: f.thickness,
    };
    faces.extend(plate.faces(foot, mouths, z_top)?);
    Ok(EndFaces { faces })
}

/// The smallest and largest distance (in x, y) of the loop `low` from the centre `c`,
/// 64 samples per edge.
fn ring_radii(low: &Wire, c: Point3) -> (f64, f64) {
    let mut rho = (f64::INFINITY, 0.0f64);
    for e in low.edge_iter() {
        let cv = e.curve();
        let (t0, t1) = cv.range_tuple();
        for k in 0..=64 {
            let p = cv.subs(t0 + (t1 - t0) * k as f64 / 64.0);
            let d = ((p.x - c.x).powi(2) + (p.y - c.y).powi(2)).sqrt();
            rho = (rho.0.min(d), rho.1.max(d));
        }
    }
    rho
}

/// The flange's round plate: its face at the origin of `frame` (z along the span), its
/// rim of radius `r_f`, its top `h` above the face.
struct Plate {
    frame: Frame,
    r_f: f64,
    h: f64,
}

impl Plate {
    /// The plate's rim (two sectors), its top annulus around `foot` (at `z_top`) and its
    /// face with `mouths`.
    fn faces(&self, foot: Wire, mouths: Vec<Wire>, z_top: f64) -> Result<Vec<Face>, BrepError> {
        let (frame, r_f, h) = (&self.frame, self.r_f, self.h);
        let (c, dir) = (frame.origin, frame.z);
        let vtx = |a: f64, hh: f64| Vertex::new(frame.at(r_f, a, hh));
        let (t0, t1, b0, b1) = (vtx(0.0, h), vtx(PI, h), vtx(0.0, 0.0), vtx(PI, 0.0));
        let circle = |a: &Vertex, b: &Vertex, hh: f64| -> Result<[Edge; 2], BrepError> {
            Ok([
                curve_edge(a, b, Curve::NurbsCurve(arc(frame, r_f, hh, 0.0, PI)))?,
                curve_edge(b, a, Curve::NurbsCurve(arc(frame, r_f, hh, PI, 2.0 * PI)))?,
            ])
        };
        let top = circle(&t0, &t1, h)?;
        let bottom = circle(&b0, &b1, 0.0)?;
        let spokes = [
            super::geom::line_edge(&t0, &b0)?,
            super::geom::line_edge(&t1, &b1)?,
        ];
        let rim = Profile::line(r_f, h, r_f, 0.0);
        let mut faces = Vec::new();
        for k in 0..2 {
            let mid = (k as f64 + 0.5) * PI;
            faces.push(sector_face(
                frame,
                &rim,
                k,
                vec![
                    top[k].clone(),
                    spokes[(k + 1) % 2].clone(),
                    bottom[k].inverse(),
                    spokes[k].inverse(),
                ],
                frame.radial(mid),
            )?);
        }
        faces.push(planar_face(
            Wire::from(top.to_vec()),
            vec![foot],
            Point3::new(c.x, c.y, z_top),
            dir,
        )?);
        faces.push(planar_face(
            Wire::from(bottom.to_vec()),
            mouths,
            Point3::new(c.x, c.y, c.z),
            -dir,
        )?);
        Ok(faces)
    }
}

/// The fillet from the skin's low loop `low` (at the skin's low end) down to the plate
/// top at `z_top`: each edge of the loop swept by a quarter circle that moves it
/// radially outward from the centre `c` (scale factor from 1 to `k_out`) while it drops
/// to `z_top`. The surface `P(u, t) = c + (C(u) - c) s(t) + z(t) e_z`, with `(s, z)`
/// the rational quadratic quarter circle (weights 1, 1/sqrt 2, 1; NURBS Book eq. 7.33)
/// from `(1, z_low)` over the corner `(1, z_top)` to `(k_out, z_top)`, is a NURBS
/// surface, exact, and equal to the mesh's radial offset when the ring is a circle of
/// radius `R` with `k_out = 1 + fillet / R`. Returns the faces and the loop at the foot.
fn fillet(
    piece: &SkinPiece,
    low: &Wire,
    c: Point3,
    k_out: f64,
    z_top: f64,
) -> Result<(Vec<Face>, Wire), BrepError> {
    let mut sweep = Sweep {
        c,
        k_out,
        z_top,
        profile: [
            (1.0, piece.z_low, 1.0),
            (1.0, z_top, FRAC_1_SQRT_2),
            (k_out, z_top, 1.0),
        ],
        feet: Vec::new(),
        sides: Vec::new(),
    };
    let mut faces = Vec::new();
    let mut foot_edges = Vec::new();
    for e in low.edge_iter() {
        let (face, foot_edge) = sweep.face(e, piece.span_sign())?;
        faces.push(face);
        foot_edges.push(foot_edge);
    }
    Ok((faces, Wire::from(foot_edges)))
}

/// The fillet's sweep (see [`fillet`]): the quarter-circle profile `(s, z, weight)`
/// and the foot vertices and side edges made so far, shared between neighbouring
/// faces.
struct Sweep {
    c: Point3,
    k_out: f64,
    z_top: f64,
    profile: [(f64, f64, f64); 3],
    /// Per top vertex, its foot.
    feet: Vec<(Vertex, Vertex)>,
    /// Per top vertex, the side edge down to its foot.
    sides: Vec<(Vertex, Edge)>,
}

impl Sweep {
    /// `p` moved radially from the centre by the factor `s`, at height `z`.
    fn place(&self, p: Point3, s: f64, z: f64) -> Point3 {
        let c = self.c;
        Point3::new(c.x + (p.x - c.x) * s, c.y + (p.y - c.y) * s, z)
    }

    /// The homogeneous control points of the profile through `p`.
    fn profile_of(&self, p: Point3) -> Vec<Vector4> {
        self.profile
            .iter()
            .map(|&(s, z, w)| {
                let q = self.place(p, s, z);
                Vector4::new(q.x * w, q.y * w, q.z * w, w)
            })
            .collect()
    }

    /// The foot of the top vertex `v`.
    fn foot_vertex(&mut self, v: &Vertex) -> Vertex {
        if let Some((_, f)) = self.feet.iter().find(|(a, _)| a == v) {
            return f.clone();
        }
        let f = Vertex::new(self.place(v.point(), self.k_out, self.z_top));
        self.feet.push((v.clone(), f.clone()));
        f
    }

    /// The side edge from the top vertex `v` down to its foot.
    fn side(&mut self, v: &Vertex, foot: &Vertex) -> Result<Edge, BrepError> {
        if let Some((_, e)) = self.sides.iter().find(|(a, _)| a == v) {
            return Ok(e.clone());
        }
        let cps = self.profile_of(v.point());
        let curve = NurbsCurve::new(BSplineCurve::new(KnotVec::bezier_knot(2), cps));
        let e = curve_edge(v, foot, Curve::NurbsCurve(curve))?;
        self.sides.push((v.clone(), e.clone()));
        Ok(e)
    }

    /// The fillet face below the edge `e` of the low loop, facing outward (away from
    /// the shank's axis and along `span_sign` toward the blade), and its foot edge.
    fn face(&mut self, e: &Edge, span_sign: f64) -> Result<(Face, Edge), BrepError> {
        let c = self.c;
        let bs = as_bspline(e)?;
        // The edge as stored (front to back along its curve's parameter).
        let (a, b) = if e.orientation() {
            (e.front().clone(), e.back().clone())
        } else {
            (e.back().clone(), e.front().clone())
        };
        let (fa, fb) = (self.foot_vertex(&a), self.foot_vertex(&b));
        let foot_curve = BSplineCurve::new(
            bs.knot_vec().clone(),
            bs.control_points()
                .iter()
                .map(|&p| self.place(p, self.k_out, self.z_top))
                .collect(),
        );
        let top_edge = if e.orientation() {
            e.clone()
        } else {
            e.inverse()
        };
        let foot_edge = curve_edge(&fa, &fb, Curve::BSplineCurve(foot_curve))?;
        let (sa, sb) = (self.side(&a, &fa)?, self.side(&b, &fb)?);
        let cps: Vec<Vec<Vector4>> = bs
            .control_points()
            .iter()
            .map(|&p| self.profile_of(p))
            .collect();
        let surface = NurbsSurface::new(BSplineSurface::new(
            (bs.knot_vec().clone(), KnotVec::bezier_knot(2)),
            cps,
        ));
        // Outward at the middle: away from the shank's axis and up toward the blade.
        let (t0, t1) = bs.range_tuple();
        let um = 0.5 * (t0 + t1);
        let pm = surface.subs(um, 0.5);
        let radial = Vector3::new(pm.x - c.x, pm.y - c.y, 0.0).normalize();
        let outward = radial + Vector3::new(0.0, 0.0, span_sign);
        let natural = surface.normal(um, 0.5);
        let w = turned(
            Wire::from(vec![top_edge, sb, foot_edge.inverse(), sa.inverse()]),
            outward,
            true,
        );
        let face = oriented_face(
            vec![w],
            Surface::NurbsSurface(surface),
            natural.dot(outward) > 0.0,
        )?;
        Ok((face, foot_edge))
    }
}

/// The curve of an edge of the skin's low loop as a B-spline (a line as one of degree 1).
fn as_bspline(e: &Edge) -> Result<BSplineCurve<Point3>, BrepError> {
    match e.curve() {
        Curve::BSplineCurve(b) => Ok(b),
        Curve::Line(l) => Ok(BSplineCurve::new(KnotVec::bezier_knot(1), vec![l.0, l.1])),
        _ => Err(BrepError::Kernel {
            what: "fillet",
            detail: "the skin's low loop holds a curve that is neither a B-spline nor a line"
                .into(),
        }),
    }
}
