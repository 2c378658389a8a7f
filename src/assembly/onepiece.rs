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
    let bad = |key: &str, msg: String| AssemblyError::new(key, msg);
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
        let f = root.mesh_only_features();
        if !f.is_empty() {
            return Err(bad(
                "rotor.one-piece",
                format!("the blade root has {}: a one-piece rotor joins the bare shank to the hub; remove them from [root]", f.join(", ")),
            ));
        }
    }
    // The rotor's own checks (a deprecated rotor.hub-radius must equal the root face).
    rotor.validate(blade.facts)?;
    let z0 = blade.facts.root_face;
    let ring = blade.root_ring;
    let blade_mesh = blade.mesh;
    let ring2: Vec<Point2<f64>> = ring
        .iter()
        .map(|&i| {
            let p = blade_mesh.vertices[i as usize];
            Point2::new(p.x, p.y)
        })
        .collect();

    // Azimuth-only frames (pitch 0) define the hub faces; the blades carry their pitch.
    let mut flat = rotor.clone();
    flat.pitch = 0.0;
    let rotation = blade.facts.rotation;
    let frames: Vec<Matrix4<f64>> = (0..b as u32)
        .map(|k| blade_transform(&flat, rotation, z0, k))
        .collect();
    let placed: Vec<Matrix4<f64>> = (0..b as u32)
        .map(|k| blade_transform(rotor, rotation, z0, k))
        .collect();
    // Ring in face coordinates (x, y of the azimuth frame): pitch turns it in its plane.
    let pitch_only = frames[0].try_inverse().expect("rigid") * placed[0];
    let ring_face: Vec<Point2<f64>> = ring2
        .iter()
        .map(|p| {
            let q = pitch_only.transform_point(&Point3::new(p.x, p.y, z0));
            Point2::new(q.x, q.y)
        })
        .collect();

    // Hub size: face width from the prism, thickness from the roots.
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
                super::rotor::root_face_words(blade.facts),
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
    let (y_bot, y_top) = (yc - 0.5 * h, yc + 0.5 * h);
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

    // Blades without their root caps.
    let mut mesh = TriMesh::new();
    let mut cut = blade_mesh.clone();
    cut.triangles.drain(blade.root_cap.clone());
    let mut rings: Vec<Vec<u32>> = Vec::with_capacity(b);
    for m in &placed {
        let offset = mesh.vertices.len() as u32;
        mesh.append(&cut.transformed(m));
        rings.push(ring.iter().map(|&i| i + offset).collect());
    }

    // Prism corners, shared between side faces and the end polygons.
    let mut corners: Vec<(Point3<f64>, u32)> = Vec::new();
    let mut corner = |mesh: &mut TriMesh, p: Point3<f64>| -> u32 {
        if let Some((_, i)) = corners
            .iter()
            .find(|(q, _)| (q - p).norm() < 1e-9 * z0.max(1.0))
        {
            return *i;
        }
        let i = mesh.push_vertex(p);
        corners.push((p, i));
        i
    };
    for (k, frame) in frames.iter().enumerate() {
        let local = [
            (-half_w, y_bot),
            (half_w, y_bot),
            (half_w, y_top),
            (-half_w, y_top),
        ];
        let ids: Vec<u32> = local
            .iter()
            .map(|&(x, y)| corner(&mut mesh, frame.transform_point(&Point3::new(x, y, z0))))
            .collect();
        let mut pts: Vec<Point2<f64>> = local.iter().map(|&(x, y)| Point2::new(x, y)).collect();
        pts.extend(ring_face.iter().copied());
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
            push_facing(&mut mesh, [all[t[0]], all[t[1]], all[t[2]]], outward);
        }
    }

    // End polygons (and the bore), in (x, z) of the rotor frame.
    let bore_n = spec
        .bore
        .map(|d| bore_sides(0.5 * d, blade.facts.tolerance));
    let mut bore_rings = Vec::new();
    for (y, up) in [(y_top, true), (y_bot, false)] {
        let mut poly: Vec<(Point3<f64>, u32)> = corners
            .iter()
            .filter(|(p, _)| (p.y - y).abs() < 1e-9)
            .copied()
            .collect();
        poly.sort_by(|a, c| a.0.z.atan2(a.0.x).total_cmp(&c.0.z.atan2(c.0.x)));
        let mut pts: Vec<Point2<f64>> = poly.iter().map(|(p, _)| Point2::new(p.x, p.z)).collect();
        let mut ids: Vec<u32> = poly.iter().map(|(_, i)| *i).collect();
        let outline = 0..pts.len();
        let mut loops = vec![outline];
        if let (Some(d), Some(n)) = (spec.bore, bore_n) {
            let start = pts.len();
            let mut ringv = Vec::with_capacity(n);
            for s in 0..n {
                let a = TAU * s as f64 / n as f64;
                let p = Point3::new(0.5 * d * a.cos(), y, 0.5 * d * a.sin());
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
            push_facing(&mut mesh, [ids[t[0]], ids[t[1]], ids[t[2]]], outward);
        }
    }
    if let [top, bottom] = &bore_rings[..] {
        let n = top.len();
        for s in 0..n {
            let s1 = (s + 1) % n;
            let mid = (mesh.vertices[top[s] as usize].coords
                + mesh.vertices[bottom[s1] as usize].coords)
                * 0.5;
            let inward = -Vector3::new(mid.x, 0.0, mid.z);
            push_facing(&mut mesh, [top[s], top[s1], bottom[s1]], inward);
            push_facing(&mut mesh, [top[s], bottom[s1], bottom[s]], inward);
        }
    }
    Ok(Part {
        name: format!("{}-rotor-one-piece", blade.name),
        mesh,
    })
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
