//! The exact solid of the one-piece rotor ([`crate::assembly::one_piece`]): the blades
//! joined by a prismatic hub whose side faces carry the blades' root loops as inner
//! loops, one closed solid by construction (no boolean operation), as the mesh does it.
//!
//! ```text
//!   each blade: skin faces and tip cap, placed by its rotor transform; its root loop
//!               (the skin's own edges) is an inner loop of its hub side face
//!   hub: one planar side face per blade (a rectangle in the plane of the blade's root
//!        face), top and bottom regular polygons, optional central bore
//! ```

use super::face::planar_face;
use super::geom::{line_edge, Frame};
use super::hole::{hole, Bottom};
use super::piece::closed_solid;
use super::skin::{Cut, SkinOptions, SkinPiece};
use super::BrepError;
use crate::assembly::{blade_transform, OnePieceSpec, RotorSpec};
use crate::design::Rotation;
use crate::loft::Skin;
use nalgebra::{Matrix4, Point3 as NPoint};
use std::f64::consts::PI;
use truck_modeling::{Edge, Face, Point3, Shell, Solid, Vector3, Vertex, Wire};

/// The prismatic hub of a one-piece rotor, in rotor coordinates (mm).
#[derive(Debug, Clone, PartialEq)]
pub struct PrismHub {
    /// Per blade, the rotor transform without pitch: side face `k` lies in the plane
    /// `z = root_face` of frame `k`, its outward normal along the frame's `z`.
    pub face_frames: Vec<Matrix4<f64>>,
    /// Radius of the blades' root faces (the side faces' distance from the axis), mm.
    pub root_face: f64,
    /// Half the width of a side face, `root_face tan(pi / blades)`, mm.
    pub half_width: f64,
    /// The hub's extent along the rotor axis (y), mm.
    pub y_range: (f64, f64),
    /// Central bore diameter, mm.
    pub bore_diameter: Option<f64>,
}

impl PrismHub {
    /// The hub [`crate::assembly::one_piece`] builds for a blade whose root ring (the
    /// mesh's root loop, blade frame) is `ring` and whose root face lies at
    /// `root_face`: the same faces, width and thickness (the default thickness is the
    /// ring's extent along the axis, pitched as placed, plus twice the wall). The
    /// settings are assumed checked by that builder.
    pub fn new(
        ring: &[NPoint<f64>],
        root_face: f64,
        rotor: &RotorSpec,
        rotation: Rotation,
        spec: &OnePieceSpec,
    ) -> PrismHub {
        let b = rotor.blades.max(1);
        let mut flat = rotor.clone();
        flat.pitch = 0.0;
        let face_frames: Vec<Matrix4<f64>> = (0..b)
            .map(|k| blade_transform(&flat, rotation, root_face, k))
            .collect();
        let placed0 = blade_transform(rotor, rotation, root_face, 0);
        let pitch_only = face_frames[0]
            .try_inverse()
            .unwrap_or_else(Matrix4::identity)
            * placed0;
        let (ylo, yhi) = ring
            .iter()
            .map(|p| {
                pitch_only
                    .transform_point(&NPoint::new(p.x, p.y, root_face))
                    .y
            })
            .fold((f64::MAX, f64::MIN), |(a, c), y| (a.min(y), c.max(y)));
        let yc = 0.5 * (ylo + yhi);
        let h = spec.thickness.unwrap_or((yhi - ylo) + 2.0 * spec.wall);
        PrismHub {
            face_frames,
            root_face,
            half_width: root_face * (PI / b as f64).tan(),
            y_range: (yc - 0.5 * h, yc + 0.5 * h),
            bore_diameter: spec.bore,
        }
    }
}

fn to_truck(m: &Matrix4<f64>) -> truck_modeling::Matrix4 {
    let cols: [[f64; 4]; 4] = std::array::from_fn(|c| std::array::from_fn(|r| m[(r, c)]));
    truck_modeling::Matrix4::from(cols)
}

fn tp(p: NPoint<f64>) -> Point3 {
    Point3::new(p.x, p.y, p.z)
}

/// The exact closed solid of the one-piece rotor: the blade of `skin` (blade frame, its
/// root face in a plane `z = hub.root_face`) placed by each of `placements` (the rotor
/// transforms, one per blade, cone 0) and joined by `hub`.
///
/// # Errors
/// [`BrepError::BadFeature`] when the counts differ, a placed root does not lie in its
/// side face, or a root loop leaves its face; [`BrepError::BadSkin`] /
/// [`BrepError::Kernel`] as for [`super::piece_solid`].
pub fn one_piece_solid(
    skin: &Skin,
    placements: &[Matrix4<f64>],
    hub: &PrismHub,
) -> Result<Solid, BrepError> {
    let b = placements.len();
    if b < 3 || hub.face_frames.len() != b {
        return Err(BrepError::feature(
            "one-piece rotor",
            format!("{b} placements for {} hub faces", hub.face_frames.len()),
            "give one placement per blade, at least three",
        ));
    }
    let blade = open_blade(skin, hub)?;
    let mut prism = Prism::new(hub);
    let mut faces: Vec<Face> = Vec::new();
    for (k, (frame, place)) in hub.face_frames.iter().zip(placements).enumerate() {
        let side = prism.side(frame)?;
        let (placed, root) = placed_blade(&blade, place)?;
        check_root_in_face(&root, frame, hub, k)?;
        let normal = frame.transform_vector(&nalgebra::Vector3::z());
        faces.push(planar_face(
            side.outer,
            vec![root],
            side.middle,
            Vector3::new(normal.x, normal.y, normal.z),
        )?);
        faces.extend(placed.face_into_iter());
    }
    faces.extend(prism.end_faces()?);
    closed_solid(faces)
}

/// The blade without its root cap, in the blade frame: skin faces and tip cap; its
/// root face must lie in the plane of the hub's side faces.
fn open_blade(skin: &Skin, hub: &PrismHub) -> Result<Shell, BrepError> {
    let piece = SkinPiece::new(skin, Cut::SkinEnd, Cut::SkinEnd, &SkinOptions::DEFAULT)?;
    if (piece.z_low - hub.root_face).abs() > 1e-6 * hub.root_face.abs().max(1.0) {
        return Err(BrepError::feature(
            "one-piece rotor",
            format!(
                "the blade's root face is at z = {} mm, the hub's faces at {} mm",
                piece.z_low, hub.root_face
            ),
            "loft the blade from the hub radius",
        ));
    }
    let dir = Vector3::new(0.0, 0.0, piece.span_sign());
    let tip = planar_face(
        piece.high_loop(),
        Vec::new(),
        Point3::new(0.0, 0.0, piece.z_high),
        dir,
    )?;
    let mut blade: Shell = piece.faces()?.into();
    blade.push(tip);
    Ok(blade)
}

/// The blade placed by `place` and its root loop (the shell's only open boundary).
fn placed_blade(blade: &Shell, place: &Matrix4<f64>) -> Result<(Shell, Wire), BrepError> {
    let placed: Shell = truck_modeling::builder::transformed(blade, to_truck(place));
    let mut open = placed.extract_boundaries();
    if open.len() != 1 {
        return Err(BrepError::Kernel {
            what: "one-piece blade",
            detail: format!(
                "the blade without its root cap has {} open loops, not 1",
                open.len()
            ),
        });
    }
    let root = open.remove(0);
    Ok((placed, root))
}

/// The root loop of blade `k` must lie in its side face (`frame`), inside its rectangle.
fn check_root_in_face(
    root: &Wire,
    frame: &Matrix4<f64>,
    hub: &PrismHub,
    k: usize,
) -> Result<(), BrepError> {
    let (y0, y1) = hub.y_range;
    let inv = frame.try_inverse().unwrap_or_else(Matrix4::identity);
    for v in root.vertex_iter() {
        let p = v.point();
        let q = inv.transform_point(&NPoint::new(p.x, p.y, p.z));
        if (q.z - hub.root_face).abs() > 1e-6 * hub.root_face.max(1.0)
            || q.x.abs() >= hub.half_width
            || !(q.y > y0 && q.y < y1)
        {
            return Err(BrepError::feature(
                format!("one-piece rotor, blade {}", k + 1),
                format!(
                    "its root ({:.3}, {:.3}) mm does not lie inside its hub face",
                    q.x, q.y
                ),
                "check the hub size against the blade root (the mesh builder checks the walls)",
            ));
        }
    }
    Ok(())
}

/// The hub prism's edges as the side faces are made: corners and vertical edges shared
/// between neighbouring side faces, top and bottom edges kept for the end polygons.
struct Prism<'a> {
    hub: &'a PrismHub,
    corners: Vec<Vertex>,
    verticals: Vec<Edge>,
    top_edges: Vec<Edge>,
    bottom_edges: Vec<Edge>,
}

/// A side face's rectangle and a point in its middle.
struct SideFace {
    outer: Wire,
    middle: Point3,
}

impl<'a> Prism<'a> {
    fn new(hub: &'a PrismHub) -> Prism<'a> {
        Prism {
            hub,
            corners: Vec::new(),
            verticals: Vec::new(),
            top_edges: Vec::new(),
            bottom_edges: Vec::new(),
        }
    }

    /// The corner at `p`, shared with a neighbouring face when one made it already.
    fn corner(&mut self, p: Point3) -> Vertex {
        let tol = 1e-9 * self.hub.root_face.max(1.0);
        if let Some(v) = self.corners.iter().find(|v| {
            let q = v.point();
            (q.x - p.x).abs() + (q.y - p.y).abs() + (q.z - p.z).abs() < tol
        }) {
            return v.clone();
        }
        let v = Vertex::new(p);
        self.corners.push(v.clone());
        v
    }

    /// The vertical edge from `a` to `c`, shared with a neighbouring face.
    fn vertical(&mut self, a: &Vertex, c: &Vertex) -> Result<Edge, BrepError> {
        if let Some(e) = self
            .verticals
            .iter()
            .find(|e| e.front() == a && e.back() == c)
        {
            return Ok(e.clone());
        }
        if let Some(e) = self
            .verticals
            .iter()
            .find(|e| e.front() == c && e.back() == a)
        {
            return Ok(e.inverse());
        }
        let e = line_edge(a, c)?;
        self.verticals.push(e.clone());
        Ok(e)
    }

    /// The rectangle of the side face in the plane `z = root_face` of `frame`.
    fn side(&mut self, frame: &Matrix4<f64>) -> Result<SideFace, BrepError> {
        let (y0, y1) = self.hub.y_range;
        let (hw, root_face) = (self.hub.half_width, self.hub.root_face);
        let at = |x: f64, y: f64| tp(frame.transform_point(&NPoint::new(x, y, root_face)));
        let (bl, br, tr, tl) = (
            self.corner(at(-hw, y0)),
            self.corner(at(hw, y0)),
            self.corner(at(hw, y1)),
            self.corner(at(-hw, y1)),
        );
        let bottom = line_edge(&bl, &br)?;
        let top = line_edge(&tr, &tl)?;
        let (right, left) = (self.vertical(&br, &tr)?, self.vertical(&tl, &bl)?);
        self.bottom_edges.push(bottom.clone());
        self.top_edges.push(top.clone());
        Ok(SideFace {
            outer: Wire::from(vec![bottom, right, top, left]),
            middle: at(0.0, 0.5 * (y0 + y1)),
        })
    }

    /// The bore's faces (when the hub has one), then the end polygons (the side faces'
    /// top and bottom edges, in order around the axis) with the bore's mouths.
    fn end_faces(self) -> Result<Vec<Face>, BrepError> {
        let (y0, y1) = self.hub.y_range;
        let mut faces = Vec::new();
        let mut ends: [Vec<Wire>; 2] = [Vec::new(), Vec::new()];
        if let Some(d) = self.hub.bore_diameter {
            let frame = Frame::new(
                Point3::new(0.0, y0, 0.0),
                Vector3::unit_y(),
                Vector3::unit_x(),
            );
            let hf = hole(&frame, 0.5 * d, y1 - y0, Bottom::Through)?;
            faces.extend(hf.faces);
            ends[0].push(hf.mouth);
            ends[1].extend(hf.far_mouth);
        }
        let [bottom_holes, top_holes] = ends;
        faces.push(planar_face(
            polygon(self.top_edges)?,
            top_holes,
            Point3::new(0.0, y1, 0.0),
            Vector3::unit_y(),
        )?);
        faces.push(planar_face(
            polygon(self.bottom_edges)?,
            bottom_holes,
            Point3::new(0.0, y0, 0.0),
            -Vector3::unit_y(),
        )?);
        Ok(faces)
    }
}

/// The closed wire of `edges` (each shared end to end with another), chained.
fn polygon(mut edges: Vec<Edge>) -> Result<Wire, BrepError> {
    let mut out = vec![edges.remove(0)];
    while !edges.is_empty() {
        let end = out.last().expect("one edge").back().clone();
        let Some(k) = edges
            .iter()
            .position(|e| *e.front() == end || *e.back() == end)
        else {
            return Err(BrepError::Kernel {
                what: "one-piece hub",
                detail: "the end polygon's edges do not close".into(),
            });
        };
        let e = edges.remove(k);
        out.push(if *e.front() == end { e } else { e.inverse() });
    }
    Ok(Wire::from(out))
}
