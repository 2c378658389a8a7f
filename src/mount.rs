//! Mounting features at the root face, built as surfaces of revolution on the skin's
//! own root ring (so the part stays watertight by construction): a flange plate with a
//! fillet up to the shank, and a coaxial blind bore with a drill-point cone (or a flat
//! bottom), and cross holes through the straight round shank along the rotor axis. These
//! are mesh features; the exact solid for STEP is built from the same dimensions by the
//! B-rep writer, which says which of them it carries.
//!
//! Every surface of revolution reuses the angular positions of the root ring's vertices:
//! a ring of the lathe is `c + d_k * rho` for the ring's directions `d_k` about the shank
//! centre `c`, so neighbouring rings have matching vertex counts and are joined by quad
//! strips.

use crate::mesh::TriMesh;
use crate::root::RootSpec;
use nalgebra::{Point3, Vector3};

/// Why a cross hole could not be cut into the meshed shank. Validated roots
/// ([`RootSpec::validate`]) leave room for every hole, so these are rare; each says what
/// to change. The part is then not built at all.
#[derive(Debug, Clone, Copy, PartialEq, Eq, thiserror::Error)]
pub enum MountError {
    /// The skin has a single row of vertices along the span.
    #[error("root.cross-holes: the skin has fewer than two rows along the span; give the blade a longer span or a finer tolerance")]
    TooFewRows,
    /// Every skin row lies beyond the holes.
    #[error("root.cross-holes: no skin row lies between the root face and the holes; move the holes away from the root face (larger `at`)")]
    NoRowBelow,
    /// Every skin row lies before the holes.
    #[error("root.cross-holes: no skin row lies beyond the holes; move the holes toward the root face (smaller `at`) or lengthen root.shank-length")]
    NoRowBeyond,
    /// The constrained triangulation of the band failed.
    #[error("root.cross-holes: the band of skin around the holes could not be triangulated; move the holes apart or change their diameters")]
    BandNotTriangulated,
    /// Hole outlines cross the grid lines of the band.
    #[error("root.cross-holes: the hole outlines cross the band's grid; give the holes more room from each other and from the transition (root.shank-length, `at`)")]
    OutlinesCrossGrid,
}

/// Segments of a quarter-circle fillet.
const FILLET_STEPS: usize = 8;

/// Replaces the root cap of a tessellated blade by the mounting features of `root`:
/// the flange (with fillet) below the ring and the bore from the root face; then cuts the
/// cross holes into the skin's straight shank (each raises the genus by one, see
/// [`RootSpec::genus`]).
///
/// Expects the mesh exactly as [`crate::tessellate::tessellate`] left it (the skin's
/// grid first). Should a hole's band not be found or not triangulate (validated roots
/// always leave room), the whole part is refused with a [`MountError`] saying what to
/// change; no hole is ever left out silently.
///
/// `ring` is the skin's root boundary loop (as in
/// [`crate::tessellate::Tessellation::root_ring`]), `cap` the cap's triangle range,
/// `face` the radius of the root face (mm). Does nothing when the root has no flange,
/// bore or cross hole.
pub fn add_mount_features(
    mesh: &mut TriMesh,
    ring: &[u32],
    cap: std::ops::Range<usize>,
    root: &RootSpec,
    face: f64,
) -> Result<(), MountError> {
    let grid_vertices = mesh.vertices.len();
    if root.flange.is_some() || root.bore.is_some() {
        add_lathe_features(mesh, ring, cap, root, face);
    }
    if !root.cross_holes.is_empty() && ring.len() > 2 {
        let c = shank_centre(mesh, ring, root);
        let r_shank = 0.5 * root.shank_diameter;
        let holes: Vec<(f64, f64)> = root
            .cross_holes
            .iter()
            .map(|h| (face + h.at, 0.5 * h.diameter))
            .collect();
        add_cross_holes(mesh, ring, grid_vertices, c, r_shank, &holes)?;
    }
    Ok(())
}

/// The shank centre (x, y; z = 0): recorded by the blade; else the middle of the ring's
/// bounding box (a circle or an ellipse centred on the stacking axis).
fn shank_centre(mesh: &TriMesh, ring: &[u32], root: &RootSpec) -> Point3<f64> {
    if let Some([x, y]) = root.centre {
        return Point3::new(x, y, 0.0);
    }
    let p0 = mesh.vertices[ring[0] as usize];
    let (mut lo, mut hi) = (p0, p0);
    for &i in ring {
        lo = lo.inf(&mesh.vertices[i as usize]);
        hi = hi.sup(&mesh.vertices[i as usize]);
    }
    Point3::new(0.5 * (lo.x + hi.x), 0.5 * (lo.y + hi.y), 0.0)
}

/// Flange and bore (see [`add_mount_features`]).
fn add_lathe_features(
    mesh: &mut TriMesh,
    ring: &[u32],
    cap: std::ops::Range<usize>,
    root: &RootSpec,
    face: f64,
) {
    mesh.triangles.drain(cap);
    let pts: Vec<Point3<f64>> = ring.iter().map(|&i| mesh.vertices[i as usize]).collect();
    let z_ring = pts[0].z;
    // The blade records the exact centre (a flat moves the box's middle).
    let c = shank_centre(mesh, ring, root);
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

/// Points per hole loop (entry and exit curves).
const HOLE_STEPS: usize = 96;

/// Cuts cross holes (each `(z_c, r_h)`: axis along y through the shank axis at height
/// `z_c`, radius `r_h`) through the skin's straight round shank (radius `r_shank` about
/// `c`), all in one band of the skin.
///
/// The skin is the tessellation's structured grid: vertex `(i, j)` (column `i` around
/// the section, row `j` along the span) is `ring[i] + j`, so the row count is
/// `ring[1] - ring[0]` and the grid holds the first `grid_vertices` vertices. The band
/// of rows around the hole is unrolled to `(R theta, z)` (cut at the column farthest
/// from the hole's two ends), retriangulated by a constrained Delaunay triangulation
/// of the band's own boundary vertices, its inner grid vertices clear of the hole, and
/// the hole's entry and exit curves (the exact intersection of the two cylinders,
/// `HOLE_STEPS` points each) as constrained loops whose insides are left out; a tube of
/// straight segments parallel to y joins entry and exit. Every boundary edge is shared
/// with the untouched skin, so the part stays watertight by construction.
fn add_cross_holes(
    mesh: &mut TriMesh,
    ring: &[u32],
    grid_vertices: usize,
    c: Point3<f64>,
    r_shank: f64,
    holes: &[(f64, f64)],
) -> Result<(), MountError> {
    use spade::{ConstrainedDelaunayTriangulation, Point2 as SPoint, Triangulation};
    use std::f64::consts::TAU;
    let nv = (ring[1] - ring[0]) as usize;
    if nv < 2 {
        return Err(MountError::TooFewRows);
    }
    let nu = ring.len();
    let vertex = |i: usize, j: usize| ring[i] + j as u32;
    let zs: Vec<f64> = (0..nv)
        .map(|j| mesh.vertices[vertex(0, j) as usize].z)
        .collect();
    let z_lo = holes
        .iter()
        .map(|h| h.0 - h.1)
        .fold(f64::INFINITY, f64::min);
    let z_hi = holes
        .iter()
        .map(|h| h.0 + h.1)
        .fold(f64::NEG_INFINITY, f64::max);
    let r_min = holes.iter().map(|h| h.1).fold(f64::INFINITY, f64::min);
    let Some(ja) = (0..nv).rev().find(|&j| zs[j] < z_lo) else {
        return Err(MountError::NoRowBelow);
    };
    let Some(jb) = (0..nv).find(|&j| zs[j] > z_hi) else {
        return Err(MountError::NoRowBeyond);
    };
    // Distance from a point to the nearest hole's rim, measured across x and z (the
    // holes' axes run along y): negative inside a hole.
    let clear = |p: &Point3<f64>| {
        holes
            .iter()
            .map(|&(z_c, r_h)| ((p.x - c.x).powi(2) + (p.z - z_c).powi(2)).sqrt() - r_h)
            .fold(f64::INFINITY, f64::min)
    };
    // Columns by angle, starting at the one farthest from the hole's ends (+-y).
    let theta = |p: &Point3<f64>| (p.y - c.y).atan2(p.x - c.x);
    let th: Vec<f64> = (0..nu)
        .map(|i| theta(&mesh.vertices[vertex(i, ja) as usize]))
        .collect();
    let ks = (0..nu)
        .min_by(|&a, &b| th[a].sin().abs().total_cmp(&th[b].sin().abs()))
        .unwrap_or(0);
    let wrap = |a: f64| a.rem_euclid(TAU);
    let orient = if wrap(th[(ks + 1) % nu] - th[ks]) < std::f64::consts::PI {
        1.0
    } else {
        -1.0
    };
    let u_of = |a: f64| r_shank * wrap(orient * (a - th[ks]));

    // CDT vertices: (u, z) and the mesh vertex each stands for.
    let mut uv: Vec<(f64, f64)> = Vec::new();
    let mut ids: Vec<u32> = Vec::new();
    let mut edges: Vec<[usize; 2]> = Vec::new();
    // Boundary loop: bottom row left to right, right side up, top row right to left,
    // left side down. The cut column stands at u = 0 (left) and u = 2 pi R (right).
    let mut boundary: Vec<usize> = Vec::new();
    let push = |uv: &mut Vec<(f64, f64)>, ids: &mut Vec<u32>, p: (f64, f64), id: u32| {
        uv.push(p);
        ids.push(id);
        uv.len() - 1
    };
    let col = |t: usize| (ks + t) % nu;
    let u_col = |t: usize| {
        if t == 0 {
            0.0
        } else if t == nu {
            r_shank * TAU
        } else {
            u_of(th[col(t)])
        }
    };
    for t in 0..=nu {
        let k = push(&mut uv, &mut ids, (u_col(t), zs[ja]), vertex(col(t), ja));
        boundary.push(k);
    }
    for (j, &z) in zs.iter().enumerate().take(jb).skip(ja + 1) {
        let k = push(&mut uv, &mut ids, (u_col(nu), z), vertex(col(0), j));
        boundary.push(k);
    }
    for t in (0..=nu).rev() {
        let k = push(&mut uv, &mut ids, (u_col(t), zs[jb]), vertex(col(t), jb));
        boundary.push(k);
    }
    for j in (ja + 1..jb).rev() {
        let k = push(&mut uv, &mut ids, (0.0, zs[j]), vertex(col(0), j));
        boundary.push(k);
    }
    for w in 0..boundary.len() {
        edges.push([boundary[w], boundary[(w + 1) % boundary.len()]]);
    }
    let dz_min = TAU * r_min / HOLE_STEPS as f64;
    // Inner grid vertices clear of the hole (distance from the hole's axis, measured
    // across x and z since the axis runs along y).
    for t in 1..nu {
        for (j, &z) in zs.iter().enumerate().take(jb).skip(ja + 1) {
            let id = vertex(col(t), j);
            let p = mesh.vertices[id as usize];
            if clear(&p) > 0.5 * dz_min {
                push(&mut uv, &mut ids, (u_col(t), z), id);
            }
        }
    }
    // Extra levels between the rows, as dense as the hole's curve, so no triangle
    // spans a wide angle (its chord would sink into the shank): points on each column's
    // straight line between the band's two rows, clear of the hole.
    let dz = dz_min.max((zs[jb] - zs[ja]) / 96.0);
    let levels = ((zs[jb] - zs[ja]) / dz).floor() as usize;
    for l in 1..levels {
        let z = zs[ja] + dz * l as f64;
        if (ja..=jb).any(|j| (zs[j] - z).abs() < 0.5 * dz) {
            continue;
        }
        let f = (z - zs[ja]) / (zs[jb] - zs[ja]);
        for t in 1..nu {
            let (a, b) = (
                mesh.vertices[vertex(col(t), ja) as usize],
                mesh.vertices[vertex(col(t), jb) as usize],
            );
            let p = a + (b - a) * f;
            if clear(&p) > dz {
                let id = mesh.push_vertex(p);
                push(&mut uv, &mut ids, (u_col(t), z), id);
            }
        }
    }
    // Entry (+y) and exit (-y) curves: x' = r_h cos(phi), z = z_c + r_h sin(phi),
    // y' = +-sqrt(R^2 - x'^2) on the shank cylinder.
    let mut loops: Vec<Vec<usize>> = Vec::new();
    let mut loop_ids: Vec<Vec<u32>> = Vec::new();
    for (side, &(z_c, r_h)) in holes.iter().flat_map(|h| [(1.0, h), (-1.0, h)]) {
        let mut lp = Vec::with_capacity(HOLE_STEPS);
        let mut li = Vec::with_capacity(HOLE_STEPS);
        for k in 0..HOLE_STEPS {
            let phi = TAU * k as f64 / HOLE_STEPS as f64;
            let xr = r_h * phi.cos();
            let yr = side * (r_shank * r_shank - xr * xr).max(0.0).sqrt();
            let p = Point3::new(c.x + xr, c.y + yr, z_c + r_h * phi.sin());
            let id = mesh.push_vertex(p);
            let q = push(&mut uv, &mut ids, (u_of(theta(&p)), p.z), id);
            lp.push(q);
            li.push(id);
        }
        for k in 0..HOLE_STEPS {
            edges.push([lp[k], lp[(k + 1) % HOLE_STEPS]]);
        }
        loops.push(lp);
        loop_ids.push(li);
    }
    let verts: Vec<SPoint<f64>> = uv.iter().map(|&(u, z)| SPoint::new(u, z)).collect();
    let n = verts.len();
    let mut conflict = false;
    let Ok(cdt) =
        ConstrainedDelaunayTriangulation::<SPoint<f64>>::try_bulk_load_cdt(verts, edges, |_| {
            conflict = true
        })
    else {
        return Err(MountError::BandNotTriangulated);
    };
    if conflict || cdt.num_vertices() != n {
        return Err(MountError::OutlinesCrossGrid);
    }
    // Remove the band's old triangles: grid triangles with every vertex in rows
    // ja..=jb that reach inside the band.
    let row = |v: u32| (v as usize) % nv;
    mesh.triangles.retain(|t| {
        let grid = t.iter().all(|&v| (v as usize) < grid_vertices);
        if !grid {
            return true;
        }
        let rows = t.map(row);
        let (lo, hi) = (
            rows.iter().copied().min().unwrap_or(0),
            rows.iter().copied().max().unwrap_or(0),
        );
        !(lo >= ja && hi <= jb && hi > ja && lo < jb)
    });
    let hole_polys: Vec<Vec<nalgebra::Point2<f64>>> = loops
        .iter()
        .map(|lp| {
            lp.iter()
                .map(|&k| nalgebra::Point2::new(uv[k].0, uv[k].1))
                .collect()
        })
        .collect();
    for face in cdt.inner_faces() {
        let [a, b, cc] = face.vertices().map(|v| v.fix().index());
        let cu = (uv[a].0 + uv[b].0 + uv[cc].0) / 3.0;
        let cz = (uv[a].1 + uv[b].1 + uv[cc].1) / 3.0;
        let q = nalgebra::Point2::new(cu, cz);
        if hole_polys
            .iter()
            .any(|poly| crate::planar::point_in_polygon(poly, &q))
        {
            continue;
        }
        let t = [ids[a], ids[b], ids[cc]];
        let centroid = Point3::from(
            (mesh.vertices[t[0] as usize].coords
                + mesh.vertices[t[1] as usize].coords
                + mesh.vertices[t[2] as usize].coords)
                / 3.0,
        );
        let outward = Vector3::new(centroid.x - c.x, centroid.y - c.y, 0.0);
        push_oriented(mesh, t, outward);
    }
    // The hole's wall: straight segments from entry to exit, facing the hole's axis.
    for (h, &(z_c, _)) in holes.iter().enumerate() {
        let (entry, exit) = (&loop_ids[2 * h], &loop_ids[2 * h + 1]);
        for k in 0..HOLE_STEPS {
            let k1 = (k + 1) % HOLE_STEPS;
            let p = mesh.vertices[entry[k] as usize];
            let q = mesh.vertices[entry[k1] as usize];
            let mid = Point3::from((p.coords + q.coords) * 0.5);
            let outward = Vector3::new(c.x - mid.x, 0.0, z_c - mid.z);
            push_oriented(mesh, [entry[k], entry[k1], exit[k1]], outward);
            push_oriented(mesh, [entry[k], exit[k1], exit[k]], outward);
        }
    }
    Ok(())
}
