//! A rotor printed as one part: the blades joined by a prismatic hub, watertight by
//! construction (no boolean operation).
//!
//! The hub is a regular prism with one flat side face per blade, along the rotor axis
//! (y). Each side face lies in the plane of its blade's root face (at the root face's
//! radius from the axis: the first station, or the root face of a `[root]` shank), so the blade's root ring is cut out of that face and shared, vertex for
//! vertex, with the blade's skin: the blade grows out of the hub with no seam to weld.
//! The top and bottom faces are the regular polygon (with an optional central bore,
//! whose wall joins them). Needs at least 3 blades, no cone, and a root without mesh
//! features (flange, bore, cross holes).
//!
//! ```text
//!        ____          seen along the rotor axis (3 blades):
//!       /    \  blade  each blade's root ring sits in one side face of the prism
//!  ____/  hub \____
//!      \  (o) /        (o) optional bore for the shaft
//!       \____/
//! ```

use super::rotor::{blade_transform, AssemblyError, BladeFacts, RotorSpec};
use crate::design::Lengths;
use crate::mesh::{Part, TriMesh};
use nalgebra::{Matrix4, Point2, Point3, Vector3};
use serde::Deserialize;
use std::f64::consts::{PI, TAU};

/// The `[rotor.one-piece]` table (lengths in mm after [`OnePieceSpec::to_mm`]).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct OnePieceSpec {
    /// Hub thickness along the rotor axis, mm (default: the blade roots' extent along
    /// the axis plus twice `wall`).
    pub thickness: Option<f64>,
    /// Central bore diameter, mm (default: none).
    pub bore: Option<f64>,
    /// Smallest wall kept around the blade roots and the bore, mm (default 1.2: three
    /// 0.4 mm nozzle widths, common practice for a load-bearing printed wall).
    #[serde(default = "default_wall")]
    pub wall: f64,
}

fn default_wall() -> f64 {
    1.2
}

impl Lengths for OnePieceSpec {
    fn to_mm(mut self, k: f64) -> Self {
        self.thickness = self.thickness.map(|t| t * k);
        self.bore = self.bore.map(|b| b * k);
        self.wall *= k;
        self
    }
}

/// The blade a one-piece rotor is made of: its name, its mesh (in the blade frame) and
/// the vertex indices of its root ring (the loop the hub's side faces take over, as
/// [`crate::tessellate::Tessellation::root_ring`]).
#[derive(Debug, Clone)]
pub struct OnePieceBlade<'a> {
    /// Design name; the part is named `<name>-rotor-one-piece`.
    pub name: &'a str,
    /// The blade mesh.
    pub mesh: &'a TriMesh,
    /// Root ring vertex indices into `mesh`.
    pub root_ring: &'a [u32],
    /// The root cap's triangles in `mesh` (replaced by the hub).
    pub root_cap: std::ops::Range<usize>,
    /// What the assembly needs to know of the blade.
    pub facts: &'a BladeFacts,
}

/// Builds the one-piece rotor of a built blade.
///
/// # Errors
/// [`AssemblyError`] naming `rotor.one-piece.<key>` (or `rotor.<key>`).
pub fn one_piece(
    blade: &OnePieceBlade<'_>,
    rotor: &RotorSpec,
    spec: &OnePieceSpec,
) -> Result<Part, AssemblyError> {
    check_rotor(blade, rotor)?;
    let frames = Frames::new(blade, rotor);
    let prism = Prism::size(blade.facts, rotor.blades as usize, &frames.ring_face, spec)?;
    let mut mesh = TriMesh::new();
    let rings = add_blades(&mut mesh, blade, &frames.placed);
    let mut corners = Corners::new(prism.z0);
    add_side_faces(&mut mesh, &mut corners, &frames, &prism, &rings)?;
    let bore = spec
        .bore
        .map(|d| (0.5 * d, bore_sides(0.5 * d, blade.facts.tolerance)));
    let bore_rings = add_end_faces(&mut mesh, &corners, &prism, bore)?;
    if let [top, bottom] = &bore_rings[..] {
        add_bore_wall(&mut mesh, top, bottom);
    }
    Ok(Part {
        name: format!("{}-rotor-one-piece", blade.name),
        mesh,
    })
}

fn bad(key: &str, msg: String) -> AssemblyError {
    AssemblyError::new(key, msg)
}

/// What a one-piece rotor asks of the rotor and the blade: at least 3 blades, no cone,
/// a bare shank, and the rotor's own checks.
fn check_rotor(blade: &OnePieceBlade<'_>, rotor: &RotorSpec) -> Result<(), AssemblyError> {
    let b = rotor.blades as usize;
    if b < 3 {
        return Err(bad(
            "rotor.blades",
            format!("{b} blades: a one-piece hub prism needs at least 3"),
        ));
    }
    if rotor.cone != 0.0 {
        return Err(bad(
            "rotor.cone",
            "a one-piece rotor needs cone = 0 (the blade roots must lie in the hub's faces)".into(),
        ));
    }
    if let Some(root) = &blade.facts.root {
        let f = root.mount_features();
        if !f.is_empty() {
            return Err(bad(
                "rotor.one-piece",
                format!("the blade root has {}: a one-piece rotor joins the bare shank to the hub; remove them from [root]", f.join(", ")),
            ));
        }
    }
    // The rotor's own checks (a deprecated rotor.hub-radius must equal the root face).
    rotor.validate(blade.facts)?;
    Ok(())
}

/// Where the blades go: the hub's face frames and the placed blades' transforms, and
/// the root ring in face coordinates.
struct Frames {
    /// Azimuth-only frames (pitch 0): they define the hub's side faces.
    faces: Vec<Matrix4<f64>>,
    /// The blades' transforms, pitch included.
    placed: Vec<Matrix4<f64>>,
    /// The root ring in face coordinates (x, y of the azimuth frame): pitch turns it in
    /// its plane.
    ring_face: Vec<Point2<f64>>,
}

impl Frames {
    fn new(blade: &OnePieceBlade<'_>, rotor: &RotorSpec) -> Self {
        let z0 = blade.facts.root_face;
        let mut flat = rotor.clone();
        flat.pitch = 0.0;
        let rotation = blade.facts.rotation;
        let faces: Vec<Matrix4<f64>> = (0..rotor.blades)
            .map(|k| blade_transform(&flat, rotation, z0, k))
            .collect();
        let placed: Vec<Matrix4<f64>> = (0..rotor.blades)
            .map(|k| blade_transform(rotor, rotation, z0, k))
            .collect();
        let pitch_only = faces[0].try_inverse().expect("rigid") * placed[0];
        let ring_face: Vec<Point2<f64>> = blade
            .root_ring
            .iter()
            .map(|&i| {
                let p = blade.mesh.vertices[i as usize];
                let q = pitch_only.transform_point(&Point3::new(p.x, p.y, z0));
                Point2::new(q.x, q.y)
            })
            .collect();
        Frames {
            faces,
            placed,
            ring_face,
        }
    }
}

/// The hub prism's size, mm: side faces at `z0` from the axis, `2 half_w` wide, from
/// `y_bot` to `y_top` along the rotor axis.
struct Prism {
    z0: f64,
    half_w: f64,
    y_bot: f64,
    y_top: f64,
}

impl Prism {
    /// Face width from the prism, thickness from the roots; checks the walls around
    /// the roots and the bore.
    fn size(
        facts: &BladeFacts,
        b: usize,
        ring_face: &[Point2<f64>],
        spec: &OnePieceSpec,
    ) -> Result<Prism, AssemblyError> {
        let z0 = facts.root_face;
        let half_w = z0 * (PI / b as f64).tan();
        let (ylo, yhi) = ring_face
            .iter()
            .fold((f64::MAX, f64::MIN), |(a, c), p| (a.min(p.y), c.max(p.y)));
        let xmax = ring_face.iter().map(|p| p.x.abs()).fold(0.0, f64::max);
        let wall = spec.wall;
        if xmax + wall > half_w {
            return Err(bad(
                "rotor.one-piece",
                format!(
                    "the blade root ({:.2} mm wide from the axis line) does not fit the hub's {:.2} mm faces with rotor.one-piece.wall = {:.2} mm; the faces sit at the blades' root face, {z0:.2} mm from the axis ({}): move the stations out by about {:.1} mm, use fewer blades (wider faces), or narrow the root chord",
                    2.0 * xmax,
                    2.0 * half_w,
                    wall,
                    super::rotor::root_face_words(facts),
                    (xmax + wall - half_w) / (PI / b as f64).tan()
                ),
            ));
        }
        let yc = 0.5 * (ylo + yhi);
        let need = (yhi - ylo) + 2.0 * wall;
        let h = spec.thickness.unwrap_or(need);
        if h < need {
            return Err(bad(
                "rotor.one-piece.thickness",
                format!(
                    "{h:.2} mm is {:.2} mm short of the blade roots' {:.2} mm plus the walls",
                    need - h,
                    yhi - ylo
                ),
            ));
        }
        if let Some(d) = spec.bore {
            // The bore must stay inside the prism's inscribed circle, clear of the roots.
            let inner = z0 - wall;
            if !(d > 0.0) || 0.5 * d > inner {
                return Err(bad(
                    "rotor.one-piece.bore",
                    format!(
                        "{d:.2} mm: give a bore smaller than {:.2} mm (the hub radius less the wall)",
                        2.0 * inner
                    ),
                ));
            }
        }
        Ok(Prism {
            z0,
            half_w,
            y_bot: yc - 0.5 * h,
            y_top: yc + 0.5 * h,
        })
    }
}

/// Appends the placed blades without their root caps; returns each blade's root ring
/// in `mesh`.
fn add_blades(
    mesh: &mut TriMesh,
    blade: &OnePieceBlade<'_>,
    placed: &[Matrix4<f64>],
) -> Vec<Vec<u32>> {
    let mut cut = blade.mesh.clone();
    cut.triangles.drain(blade.root_cap.clone());
    let mut rings: Vec<Vec<u32>> = Vec::with_capacity(placed.len());
    for m in placed {
        let offset = mesh.vertices.len() as u32;
        mesh.append(&cut.transformed(m));
        rings.push(blade.root_ring.iter().map(|&i| i + offset).collect());
    }
    rings
}

/// The prism's corners, shared between the side faces and the end polygons.
struct Corners {
    tol: f64,
    list: Vec<(Point3<f64>, u32)>,
}

impl Corners {
    fn new(z0: f64) -> Self {
        Corners {
            tol: 1e-9 * z0.max(1.0),
            list: Vec::new(),
        }
    }

    /// The vertex at `p`, pushed to `mesh` the first time.
    fn vertex(&mut self, mesh: &mut TriMesh, p: Point3<f64>) -> u32 {
        if let Some((_, i)) = self.list.iter().find(|(q, _)| (q - p).norm() < self.tol) {
            return *i;
        }
        let i = mesh.push_vertex(p);
        self.list.push((p, i));
        i
    }
}

/// Each side face: its rectangle with the blade's root ring cut out, triangulated in
/// face coordinates.
fn add_side_faces(
    mesh: &mut TriMesh,
    corners: &mut Corners,
    frames: &Frames,
    prism: &Prism,
    rings: &[Vec<u32>],
) -> Result<(), AssemblyError> {
    let (half_w, z0) = (prism.half_w, prism.z0);
    for (k, frame) in frames.faces.iter().enumerate() {
        let local = [
            (-half_w, prism.y_bot),
            (half_w, prism.y_bot),
            (half_w, prism.y_top),
            (-half_w, prism.y_top),
        ];
        let ids: Vec<u32> = local
            .iter()
            .map(|&(x, y)| corners.vertex(mesh, frame.transform_point(&Point3::new(x, y, z0))))
            .collect();
        let mut pts: Vec<Point2<f64>> = local.iter().map(|&(x, y)| Point2::new(x, y)).collect();
        pts.extend(frames.ring_face.iter().copied());
        let all: Vec<u32> = ids
            .iter()
            .copied()
            .chain(rings[k].iter().copied())
            .collect();
        let tris = crate::planar::triangulate(&pts, &[0..4, 4..pts.len()]).ok_or_else(|| {
            bad(
                "rotor.one-piece",
                "a blade root crosses its hub face; check the root size".into(),
            )
        })?;
        let outward = frame.transform_vector(&Vector3::z());
        for t in tris {
            push_facing(mesh, [all[t[0]], all[t[1]], all[t[2]]], outward);
        }
    }
    Ok(())
}

/// The top and bottom polygons, with the bore (`(radius, sides)`) cut out, in (x, z)
/// of the rotor frame; returns the bore's rings (top, then bottom).
fn add_end_faces(
    mesh: &mut TriMesh,
    corners: &Corners,
    prism: &Prism,
    bore: Option<(f64, usize)>,
) -> Result<Vec<Vec<u32>>, AssemblyError> {
    let mut bore_rings = Vec::new();
    for (y, up) in [(prism.y_top, true), (prism.y_bot, false)] {
        let mut poly: Vec<(Point3<f64>, u32)> = corners
            .list
            .iter()
            .filter(|(p, _)| (p.y - y).abs() < 1e-9)
            .copied()
            .collect();
        poly.sort_by(|a, c| a.0.z.atan2(a.0.x).total_cmp(&c.0.z.atan2(c.0.x)));
        let mut pts: Vec<Point2<f64>> = poly.iter().map(|(p, _)| Point2::new(p.x, p.z)).collect();
        let mut ids: Vec<u32> = poly.iter().map(|(_, i)| *i).collect();
        let outline = 0..pts.len();
        let mut loops = vec![outline];
        if let Some((r, n)) = bore {
            let start = pts.len();
            let mut ringv = Vec::with_capacity(n);
            for s in 0..n {
                let a = TAU * s as f64 / n as f64;
                let p = Point3::new(r * a.cos(), y, r * a.sin());
                let i = mesh.push_vertex(p);
                pts.push(Point2::new(p.x, p.z));
                ids.push(i);
                ringv.push(i);
            }
            loops.push(start..pts.len());
            bore_rings.push(ringv);
        }
        let tris = crate::planar::triangulate(&pts, &loops).ok_or_else(|| {
            bad(
                "rotor.one-piece",
                "the hub's end face could not be triangulated".into(),
            )
        })?;
        let outward = Vector3::y() * if up { 1.0 } else { -1.0 };
        for t in tris {
            push_facing(mesh, [ids[t[0]], ids[t[1]], ids[t[2]]], outward);
        }
    }
    Ok(bore_rings)
}

/// The bore's wall between its top and bottom rings, facing the axis.
fn add_bore_wall(mesh: &mut TriMesh, top: &[u32], bottom: &[u32]) {
    let n = top.len();
    for s in 0..n {
        let s1 = (s + 1) % n;
        let mid = (mesh.vertices[top[s] as usize].coords
            + mesh.vertices[bottom[s1] as usize].coords)
            * 0.5;
        let inward = -Vector3::new(mid.x, 0.0, mid.z);
        push_facing(mesh, [top[s], top[s1], bottom[s1]], inward);
        push_facing(mesh, [top[s], bottom[s1], bottom[s]], inward);
    }
}

/// Sides of a bore polygon whose sagitta stays within `tol` (at least 24).
fn bore_sides(r: f64, tol: f64) -> usize {
    let n = PI / (1.0 - (tol / r).min(1.0)).acos();
    (n.ceil() as usize).max(24)
}

/// Pushes `t`, reversed if needed so its normal agrees with `out`.
fn push_facing(mesh: &mut TriMesh, t: [u32; 3], out: Vector3<f64>) {
    let [a, b, c] = t.map(|i| mesh.vertices[i as usize]);
    if (b - a).cross(&(c - a)).dot(&out) >= 0.0 {
        mesh.triangles.push(t);
    } else {
        mesh.triangles.push([t[0], t[2], t[1]]);
    }
}
