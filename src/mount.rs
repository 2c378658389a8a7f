//! Mounting features at the root face, built as surfaces of revolution on the skin's
//! own root ring (so the part stays watertight by construction): a flange plate with a
//! fillet up to the shank, and a coaxial blind bore with a drill-point cone (or a flat
//! bottom). These are mesh features; the STEP solid carries the shank without them.
//!
//! Every surface of revolution reuses the angular positions of the root ring's vertices:
//! a ring of the lathe is `c + d_k * rho` for the ring's directions `d_k` about the shank
//! centre `c`, so neighbouring rings have matching vertex counts and are joined by quad
//! strips.

use crate::mesh::TriMesh;
use crate::root::RootSpec;
use nalgebra::{Point3, Vector3};

/// Segments of a quarter-circle fillet.
const FILLET_STEPS: usize = 8;

/// Replaces the root cap of a tessellated blade by the mounting features of `root`:
/// the flange (with fillet) below the ring and the bore from the root face.
///
/// `ring` is the skin's root boundary loop (as in
/// [`crate::tessellate::Tessellation::root_ring`]), `cap` the cap's triangle range,
/// `face` the radius of the root face (mm). Does nothing when the root has neither
/// flange nor bore.
pub fn add_mount_features(
    mesh: &mut TriMesh,
    ring: &[u32],
    cap: std::ops::Range<usize>,
    root: &RootSpec,
    face: f64,
) {
    if root.flange.is_none() && root.bore.is_none() {
        return;
    }
    mesh.triangles.drain(cap);
    let pts: Vec<Point3<f64>> = ring.iter().map(|&i| mesh.vertices[i as usize]).collect();
    let z_ring = pts[0].z;
    // Shank centre: recorded by the blade; else the middle of the ring's bounding box
    // (a circle or an ellipse centred on the stacking axis).
    let (mut lo, mut hi) = (pts[0], pts[0]);
    for p in &pts {
        lo = lo.inf(p);
        hi = hi.sup(p);
    }
    // The blade records the exact centre (a flat moves the box's middle).
    let c = match root.centre {
        Some([x, y]) => Point3::new(x, y, 0.0),
        None => Point3::new(0.5 * (lo.x + hi.x), 0.5 * (lo.y + hi.y), 0.0),
    };
    let dirs: Vec<(Vector3<f64>, f64)> = pts
        .iter()
        .map(|p| {
            let d = Vector3::new(p.x - c.x, p.y - c.y, 0.0);
            let rho = d.norm();
            (d / rho, rho)
        })
        .collect();
    let at = |k: usize, rho: f64, z: f64| {
        Point3::new(c.x + dirs[k].0.x * rho, c.y + dirs[k].0.y * rho, z)
    };
    let n = ring.len();

    // Outer profile from the ring down to the root face: rings of vertex indices.
    let mut outer: Vec<Vec<u32>> = vec![ring.to_vec()];
    if let Some(f) = &root.flange {
        let z_top = face + f.thickness;
        let steps = if f.fillet > 0.0 { FILLET_STEPS } else { 0 };
        for s in 1..=steps {
            // Quarter circle from (rho, z_top + r) to (rho + r, z_top).
            let th = std::f64::consts::FRAC_PI_2 * s as f64 / FILLET_STEPS as f64;
            let (dr, dz) = (f.fillet * (1.0 - th.cos()), f.fillet * (1.0 - th.sin()));
            let rho_z = z_top + dz;
            outer.push(
                (0..n)
                    .map(|k| mesh.push_vertex(at(k, dirs[k].1 + dr, rho_z)))
                    .collect(),
            );
        }
        let r_f = 0.5 * f.diameter;
        outer.push(
            (0..n)
                .map(|k| mesh.push_vertex(at(k, r_f, z_top)))
                .collect(),
        );
        outer.push((0..n).map(|k| mesh.push_vertex(at(k, r_f, face))).collect());
    } else {
        debug_assert!((z_ring - face).abs() < 1e-9);
    }
    for w in outer.windows(2) {
        strip(mesh, &w[0], &w[1], c);
    }
    let bottom = outer.last().expect("at least the ring").clone();

    match &root.bore {
        Some(b) => {
            let rb = 0.5 * b.diameter;
            let mouth: Vec<u32> = (0..n).map(|k| mesh.push_vertex(at(k, rb, face))).collect();
            let floor: Vec<u32> = (0..n)
                .map(|k| mesh.push_vertex(at(k, rb, face + b.depth)))
                .collect();
            strip(mesh, &bottom, &mouth, c);
            strip(mesh, &mouth, &floor, c);
            let apex = mesh.push_vertex(Point3::new(
                c.x,
                c.y,
                face + b.depth + root.bore_point_depth(),
            ));
            fan(mesh, &floor, apex, c);
        }
        None => {
            let centre = mesh.push_vertex(Point3::new(c.x, c.y, face));
            fan(mesh, &bottom, centre, c);
        }
    }
}

/// Pushes a triangle oriented so that its normal points away from the solid, judged by
/// `outward` (a vector the normal should agree with).
fn push_oriented(mesh: &mut TriMesh, t: [u32; 3], outward: Vector3<f64>) {
    let [a, b, cc] = t.map(|i| mesh.vertices[i as usize]);
    let nrm = (b - a).cross(&(cc - a));
    if nrm.norm_squared() == 0.0 {
        return;
    }
    mesh.triangles.push(if nrm.dot(&outward) >= 0.0 {
        t
    } else {
        [t[0], t[2], t[1]]
    });
}

/// Quad strip between two rings of equal count (closed loops), `a` before `b` along
/// the profile walk (see [`strip_outward`]).
fn strip(mesh: &mut TriMesh, a: &[u32], b: &[u32], c: Point3<f64>) {
    let n = a.len();
    for k in 0..n {
        let k1 = (k + 1) % n;
        let (p0, p1, q0, q1) = (a[k], a[k1], b[k], b[k1]);
        let outward = strip_outward(mesh, p0, q0, c);
        push_oriented(mesh, [p0, p1, q1], outward);
        push_oriented(mesh, [p0, q1, q0], outward);
    }
}

/// Outward direction of the profile segment from vertex `p` to vertex `q`.
///
/// The profile is walked in one sense all the way: down the outside from the skin's
/// ring to the root face, inward across the face, up the bore and to the drill point. In
/// the (r, z) half-plane the solid then always lies to the right of the walking
/// direction `(dr, dz)`, so the outward normal is its left normal `(-dz, dr)`.
fn strip_outward(mesh: &TriMesh, p: u32, q: u32, c: Point3<f64>) -> Vector3<f64> {
    let (pp, qq) = (mesh.vertices[p as usize], mesh.vertices[q as usize]);
    let radial = |x: &Point3<f64>| Vector3::new(x.x - c.x, x.y - c.y, 0.0);
    let sum = radial(&pp) + radial(&qq);
    let e_r = if sum.norm_squared() > 0.0 {
        sum.normalize()
    } else {
        Vector3::x()
    };
    let dr = radial(&qq).norm() - radial(&pp).norm();
    let dz = qq.z - pp.z;
    e_r * (-dz) + Vector3::z() * dr
}

/// Closes a ring with a fan to a single vertex.
fn fan(mesh: &mut TriMesh, ring: &[u32], apex: u32, c: Point3<f64>) {
    let n = ring.len();
    for k in 0..n {
        let outward = strip_outward(mesh, ring[k], apex, c);
        push_oriented(mesh, [ring[k], ring[(k + 1) % n], apex], outward);
    }
}
