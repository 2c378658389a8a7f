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
use crate::root::{BoreSpec, FlangeSpec, RootSpec};
use nalgebra::{Point2, Point3, Vector3};

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
    /// The root face between the shank's outline and the bore could not be triangulated
    /// (the bore reaches the outline).
    #[error("root.bore: the bore's mouth crosses the shank's outline at the root face; give a smaller bore diameter (or a larger root.shank-diameter)")]
    BoreMeetsOutline,
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
        add_lathe_features(mesh, ring, cap, root, face)?;
    }
    if !root.cross_holes.is_empty() && ring.len() > 2 {
        let c = shank_centre(mesh, ring, root);
        let r_shank = 0.5 * root.shank_diameter;
        let holes: Vec<CrossHole> = root
            .cross_holes
            .iter()
            .map(|h| CrossHole {
                z: face + h.at,
                r: 0.5 * h.diameter,
            })
            .collect();
        add_cross_holes(mesh, ring, grid_vertices, c, r_shank, &holes)?;
    }
    Ok(())
}

/// The shank centre (x, y; z = 0): recorded by the blade; else the middle of the ring's
/// bounding box (a circle or an ellipse centred on the stacking axis).
fn shank_centre(mesh: &TriMesh, ring: &[u32], root: &RootSpec) -> Point3<f64> {
    if let Some(p) = root.centre {
        return Point3::new(p.x, p.y, 0.0);
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
///
/// Without a flange the bore opens in the root face inside the skin's own root ring,
/// which need not be star-shaped about the shank's centre (an opened trailing edge can
/// turn back on itself there): the face between the ring and the bore's mouth (a
/// circle) is then a constrained Delaunay triangulation of the two loops, as the
/// tessellation's own caps are, and the bore is a circle of as many sides as the ring.
fn add_lathe_features(
    mesh: &mut TriMesh,
    ring: &[u32],
    cap: std::ops::Range<usize>,
    root: &RootSpec,
    face: f64,
) -> Result<(), MountError> {
    mesh.triangles.drain(cap);
    let lathe = Lathe::new(mesh, ring, root);
    let outer = lathe.outer_profile(mesh, ring, root.flange.as_ref(), face);
    for w in outer.windows(2) {
        strip(mesh, &w[0], &w[1], lathe.c);
    }
    let bottom = outer.last().expect("at least the ring").clone();
    match &root.bore {
        Some(b) if root.flange.is_none() => lathe.bore_in_ring(mesh, &bottom, b, root, face)?,
        Some(b) => lathe.bore_in_flange(mesh, &bottom, b, root, face),
        None => lathe.close_face(mesh, &bottom, face),
    }
    Ok(())
}

/// The lathe of the root ring: the shank centre and, per ring vertex, its direction
/// and distance from the centre (see the module docs).
struct Lathe {
    /// The shank centre (z = 0).
    c: Point3<f64>,
    /// Unit direction (z = 0) and distance from `c` of each ring vertex.
    dirs: Vec<(Vector3<f64>, f64)>,
}

impl Lathe {
    fn new(mesh: &TriMesh, ring: &[u32], root: &RootSpec) -> Lathe {
        // The blade records the exact centre (a flat moves the box's middle).
        let c = shank_centre(mesh, ring, root);
        let dirs = ring
            .iter()
            .map(|&i| {
                let p = mesh.vertices[i as usize];
                let d = Vector3::new(p.x - c.x, p.y - c.y, 0.0);
                let rho = d.norm();
                (d / rho, rho)
            })
            .collect();
        Lathe { c, dirs }
    }

    /// The point at distance `rho` from the centre in the direction of ring vertex `k`,
    /// at height `z`.
    fn at(&self, k: usize, rho: f64, z: f64) -> Point3<f64> {
        let c = self.c;
        let d = self.dirs[k].0;
        Point3::new(c.x + d.x * rho, c.y + d.y * rho, z)
    }

    /// A ring of new vertices, one per ring direction, at `rho(k)` and height `z`.
    fn new_ring(&self, mesh: &mut TriMesh, rho: impl Fn(usize) -> f64, z: f64) -> Vec<u32> {
        (0..self.dirs.len())
            .map(|k| mesh.push_vertex(self.at(k, rho(k), z)))
            .collect()
    }

    /// The outer profile from the ring down to the root face, as rings of vertex
    /// indices: the ring itself, then with a flange the fillet's rings (a quarter
    /// circle), the plate's top rim and its bottom rim in the root face.
    fn outer_profile(
        &self,
        mesh: &mut TriMesh,
        ring: &[u32],
        flange: Option<&FlangeSpec>,
        face: f64,
    ) -> Vec<Vec<u32>> {
        let mut outer: Vec<Vec<u32>> = vec![ring.to_vec()];
        let Some(f) = flange else {
            debug_assert!((mesh.vertices[ring[0] as usize].z - face).abs() < 1e-9);
            return outer;
        };
        let z_top = face + f.thickness;
        let steps = if f.fillet > 0.0 { FILLET_STEPS } else { 0 };
        for s in 1..=steps {
            // Quarter circle from (rho, z_top + r) to (rho + r, z_top).
            let th = std::f64::consts::FRAC_PI_2 * s as f64 / FILLET_STEPS as f64;
            let (dr, dz) = (f.fillet * (1.0 - th.cos()), f.fillet * (1.0 - th.sin()));
            outer.push(self.new_ring(mesh, |k| self.dirs[k].1 + dr, z_top + dz));
        }
        let r_f = 0.5 * f.diameter;
        outer.push(self.new_ring(mesh, |_| r_f, z_top));
        outer.push(self.new_ring(mesh, |_| r_f, face));
        outer
    }

    /// The bore opening in the root face inside the skin's own ring (no flange): the
    /// face between `bottom` and the mouth triangulated, the bore a circle of as many
    /// sides as the ring (at least 12), then its wall and drill point.
    fn bore_in_ring(
        &self,
        mesh: &mut TriMesh,
        bottom: &[u32],
        b: &BoreSpec,
        root: &RootSpec,
        face: f64,
    ) -> Result<(), MountError> {
        let c = self.c;
        let rb = 0.5 * b.diameter;
        let sides = self.dirs.len().max(12);
        let mut circle = |z: f64| -> Vec<u32> {
            (0..sides)
                .map(|k| {
                    let t = std::f64::consts::TAU * k as f64 / sides as f64;
                    mesh.push_vertex(Point3::new(c.x + rb * t.cos(), c.y + rb * t.sin(), z))
                })
                .collect()
        };
        let mouth = circle(face);
        let floor = circle(face + b.depth);
        annulus(mesh, bottom, &mouth)?;
        strip(mesh, &mouth, &floor, c);
        self.drill_point(mesh, &floor, b, root, face);
        Ok(())
    }

    /// The bore opening in the flange's face: mouth and floor on the ring's directions,
    /// joined to `bottom` by a strip, then its wall and drill point.
    fn bore_in_flange(
        &self,
        mesh: &mut TriMesh,
        bottom: &[u32],
        b: &BoreSpec,
        root: &RootSpec,
        face: f64,
    ) {
        let rb = 0.5 * b.diameter;
        let mouth = self.new_ring(mesh, |_| rb, face);
        let floor = self.new_ring(mesh, |_| rb, face + b.depth);
        strip(mesh, bottom, &mouth, self.c);
        strip(mesh, &mouth, &floor, self.c);
        self.drill_point(mesh, &floor, b, root, face);
    }

    /// The bore's floor closed by a fan to the drill point's apex (on the floor's
    /// plane for a flat floor).
    fn drill_point(
        &self,
        mesh: &mut TriMesh,
        floor: &[u32],
        b: &BoreSpec,
        root: &RootSpec,
        face: f64,
    ) {
        let (c, z) = (self.c, face + b.depth + root.bore_point_depth());
        let apex = mesh.push_vertex(Point3::new(c.x, c.y, z));
        fan(mesh, floor, apex, c);
    }

    /// The root face without a bore: a fan from `bottom` to the centre.
    fn close_face(&self, mesh: &mut TriMesh, bottom: &[u32], face: f64) {
        let centre = mesh.push_vertex(Point3::new(self.c.x, self.c.y, face));
        fan(mesh, bottom, centre, self.c);
    }
}

/// The planar face between the loop `outer` and the loop `inner` inside it (both in the
/// root face's plane, any sense), facing down (-z, away from the blade): a constrained
/// Delaunay triangulation of the two loops with no added points, so its boundary is
/// the loops' own edges.
fn annulus(mesh: &mut TriMesh, outer: &[u32], inner: &[u32]) -> Result<(), MountError> {
    let ids: Vec<u32> = outer.iter().chain(inner).copied().collect();
    let pts: Vec<Point2<f64>> = ids
        .iter()
        .map(|&i| {
            let p = mesh.vertices[i as usize];
            Point2::new(p.x, p.y)
        })
        .collect();
    let loops = [0..outer.len(), outer.len()..ids.len()];
    let tris = crate::planar::triangulate(&pts, &loops).ok_or(MountError::BoreMeetsOutline)?;
    // Counter-clockwise in (x, y) faces +z; the root face faces -z.
    mesh.triangles
        .extend(tris.iter().map(|t| [ids[t[0]], ids[t[2]], ids[t[1]]]));
    Ok(())
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

/// A cross hole: its axis runs along y through the shank axis at height `z`; radius `r`,
/// mm.
#[derive(Debug, Clone, Copy)]
struct CrossHole {
    z: f64,
    r: f64,
}

/// Cuts cross holes through the skin's straight round shank (radius `r_shank` about
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
    holes: &[CrossHole],
) -> Result<(), MountError> {
    let band = Band::around(mesh, ring, holes)?;
    let unrolled = Unrolled::new(mesh, &band, c, r_shank);
    let mut cdt = BandPoints::default();
    cdt.add_boundary(&band, &unrolled);
    cdt.add_inner_grid(mesh, &band, &unrolled, holes, c);
    cdt.add_levels(mesh, &band, &unrolled, holes, c);
    let loops = cdt.add_hole_loops(mesh, &unrolled, holes);
    let faces = cdt.triangulate()?;
    remove_band(mesh, grid_vertices, &band);
    add_band_faces(mesh, &cdt, &faces, &loops, c);
    add_hole_walls(mesh, holes, &loops, c);
    Ok(())
}

/// The rows of the skin's grid that enclose every hole: rows `ja` (below the holes) to
/// `jb` (beyond them).
struct Band<'a> {
    /// The skin's root ring: column `i` starts at vertex `ring[i]`.
    ring: &'a [u32],
    /// Rows along the span.
    rows: usize,
    /// Height of each row (the root ring lies in planes z = const).
    zs: Vec<f64>,
    /// Last row wholly below the holes.
    ja: usize,
    /// First row wholly beyond the holes.
    jb: usize,
}

impl<'a> Band<'a> {
    fn around(mesh: &TriMesh, ring: &'a [u32], holes: &[CrossHole]) -> Result<Self, MountError> {
        let rows = (ring[1] - ring[0]) as usize;
        if rows < 2 {
            return Err(MountError::TooFewRows);
        }
        let zs: Vec<f64> = (0..rows)
            .map(|j| mesh.vertices[(ring[0] + j as u32) as usize].z)
            .collect();
        let z_lo = holes
            .iter()
            .map(|h| h.z - h.r)
            .fold(f64::INFINITY, f64::min);
        let z_hi = holes
            .iter()
            .map(|h| h.z + h.r)
            .fold(f64::NEG_INFINITY, f64::max);
        let Some(ja) = (0..rows).rev().find(|&j| zs[j] < z_lo) else {
            return Err(MountError::NoRowBelow);
        };
        let Some(jb) = (0..rows).find(|&j| zs[j] > z_hi) else {
            return Err(MountError::NoRowBeyond);
        };
        Ok(Band {
            ring,
            rows,
            zs,
            ja,
            jb,
        })
    }

    /// Columns around the section.
    fn columns(&self) -> usize {
        self.ring.len()
    }

    /// The grid vertex of column `i`, row `j`.
    fn vertex(&self, i: usize, j: usize) -> u32 {
        self.ring[i] + j as u32
    }

    /// The rows strictly between `ja` and `jb` with their heights.
    fn inner_rows(&self) -> impl DoubleEndedIterator<Item = (usize, f64)> + '_ {
        (self.ja + 1..self.jb).map(|j| (j, self.zs[j]))
    }
}

/// The band unrolled to `(u, z)` with `u = R theta`: columns by angle about the shank
/// axis, starting at the one farthest from the holes' ends (+-y), which stands at both
/// `u = 0` and `u = 2 pi R`.
struct Unrolled {
    c: Point3<f64>,
    r_shank: f64,
    /// Angle of each column (at row `ja`).
    th: Vec<f64>,
    /// The cut column.
    ks: usize,
    /// +1 when the columns run counter-clockwise, else -1.
    orient: f64,
}

impl Unrolled {
    fn new(mesh: &TriMesh, band: &Band<'_>, c: Point3<f64>, r_shank: f64) -> Self {
        let nu = band.columns();
        let th: Vec<f64> = (0..nu)
            .map(|i| theta(c, &mesh.vertices[band.vertex(i, band.ja) as usize]))
            .collect();
        let ks = (0..nu)
            .min_by(|&a, &b| th[a].sin().abs().total_cmp(&th[b].sin().abs()))
            .unwrap_or(0);
        let orient = if wrap(th[(ks + 1) % nu] - th[ks]) < std::f64::consts::PI {
            1.0
        } else {
            -1.0
        };
        Unrolled {
            c,
            r_shank,
            th,
            ks,
            orient,
        }
    }

    fn columns(&self) -> usize {
        self.th.len()
    }

    /// `u` of the angle `a`.
    fn u_of(&self, a: f64) -> f64 {
        self.r_shank * wrap(self.orient * (a - self.th[self.ks]))
    }

    /// `u` of a point on the shank.
    fn u_at(&self, p: &Point3<f64>) -> f64 {
        self.u_of(theta(self.c, p))
    }

    /// The grid column at step `t` from the cut.
    fn col(&self, t: usize) -> usize {
        (self.ks + t) % self.columns()
    }

    /// `u` of the column at step `t` from the cut (`t = columns()` is the cut again, at
    /// the right end).
    fn u_col(&self, t: usize) -> f64 {
        if t == 0 {
            0.0
        } else if t == self.columns() {
            self.r_shank * std::f64::consts::TAU
        } else {
            self.u_of(self.th[self.col(t)])
        }
    }
}

/// Angle of `p` about the shank axis through `c`.
fn theta(c: Point3<f64>, p: &Point3<f64>) -> f64 {
    (p.y - c.y).atan2(p.x - c.x)
}

/// `a` in `[0, 2 pi)`.
fn wrap(a: f64) -> f64 {
    a.rem_euclid(std::f64::consts::TAU)
}

/// Distance from a point to the nearest hole's rim, measured across x and z (the holes'
/// axes run along y): negative inside a hole.
fn clearance(holes: &[CrossHole], c: Point3<f64>, p: &Point3<f64>) -> f64 {
    holes
        .iter()
        .map(|h| ((p.x - c.x).powi(2) + (p.z - h.z).powi(2)).sqrt() - h.r)
        .fold(f64::INFINITY, f64::min)
}

/// Smallest spacing of the hole curves' points along z.
fn hole_spacing(holes: &[CrossHole]) -> f64 {
    let r_min = holes.iter().map(|h| h.r).fold(f64::INFINITY, f64::min);
    std::f64::consts::TAU * r_min / HOLE_STEPS as f64
}

/// The constrained triangulation's input: points in `(u, z)`, the mesh vertex each
/// stands for, and the constrained edges.
#[derive(Default)]
struct BandPoints {
    uz: Vec<Point2<f64>>,
    ids: Vec<u32>,
    edges: Vec<[usize; 2]>,
}

/// A hole's entry (+y) and exit (-y) loops: indices into [`BandPoints`] and the mesh
/// vertices.
struct HoleLoops {
    points: Vec<Vec<usize>>,
    vertices: Vec<Vec<u32>>,
}

impl BandPoints {
    fn push(&mut self, u: f64, z: f64, id: u32) -> usize {
        self.uz.push(Point2::new(u, z));
        self.ids.push(id);
        self.uz.len() - 1
    }

    /// Boundary loop: bottom row left to right, right side up, top row right to left,
    /// left side down; constrained edges all round.
    fn add_boundary(&mut self, band: &Band<'_>, un: &Unrolled) {
        let nu = band.columns();
        let (ja, jb) = (band.ja, band.jb);
        let mut boundary: Vec<usize> = Vec::new();
        for t in 0..=nu {
            boundary.push(self.push(un.u_col(t), band.zs[ja], band.vertex(un.col(t), ja)));
        }
        for (j, z) in band.inner_rows() {
            boundary.push(self.push(un.u_col(nu), z, band.vertex(un.col(0), j)));
        }
        for t in (0..=nu).rev() {
            boundary.push(self.push(un.u_col(t), band.zs[jb], band.vertex(un.col(t), jb)));
        }
        for (j, z) in band.inner_rows().rev() {
            boundary.push(self.push(0.0, z, band.vertex(un.col(0), j)));
        }
        for w in 0..boundary.len() {
            self.edges
                .push([boundary[w], boundary[(w + 1) % boundary.len()]]);
        }
    }

    /// Inner grid vertices clear of the holes.
    fn add_inner_grid(
        &mut self,
        mesh: &TriMesh,
        band: &Band<'_>,
        un: &Unrolled,
        holes: &[CrossHole],
        c: Point3<f64>,
    ) {
        let dz_min = hole_spacing(holes);
        for t in 1..band.columns() {
            for (j, z) in band.inner_rows() {
                let id = band.vertex(un.col(t), j);
                if clearance(holes, c, &mesh.vertices[id as usize]) > 0.5 * dz_min {
                    self.push(un.u_col(t), z, id);
                }
            }
        }
    }

    /// Extra levels between the rows, as dense as the hole's curve, so no triangle
    /// spans a wide angle (its chord would sink into the shank): new vertices on each
    /// column's straight line between the band's two rows, clear of the holes.
    fn add_levels(
        &mut self,
        mesh: &mut TriMesh,
        band: &Band<'_>,
        un: &Unrolled,
        holes: &[CrossHole],
        c: Point3<f64>,
    ) {
        let (ja, jb, zs) = (band.ja, band.jb, &band.zs);
        let dz = hole_spacing(holes).max((zs[jb] - zs[ja]) / 96.0);
        let levels = ((zs[jb] - zs[ja]) / dz).floor() as usize;
        for l in 1..levels {
            let z = zs[ja] + dz * l as f64;
            if (ja..=jb).any(|j| (zs[j] - z).abs() < 0.5 * dz) {
                continue;
            }
            let f = (z - zs[ja]) / (zs[jb] - zs[ja]);
            for t in 1..band.columns() {
                let (a, b) = (
                    mesh.vertices[band.vertex(un.col(t), ja) as usize],
                    mesh.vertices[band.vertex(un.col(t), jb) as usize],
                );
                let p = a + (b - a) * f;
                if clearance(holes, c, &p) > dz {
                    let id = mesh.push_vertex(p);
                    self.push(un.u_col(t), z, id);
                }
            }
        }
    }

    /// Entry (+y) and exit (-y) curves of each hole as constrained loops:
    /// `x' = r_h cos(phi)`, `z = z_c + r_h sin(phi)`, `y' = +-sqrt(R^2 - x'^2)` on the
    /// shank cylinder.
    fn add_hole_loops(
        &mut self,
        mesh: &mut TriMesh,
        un: &Unrolled,
        holes: &[CrossHole],
    ) -> HoleLoops {
        let (c, r_shank) = (un.c, un.r_shank);
        let mut loops = HoleLoops {
            points: Vec::new(),
            vertices: Vec::new(),
        };
        for (side, h) in holes.iter().flat_map(|h| [(1.0, h), (-1.0, h)]) {
            let mut lp = Vec::with_capacity(HOLE_STEPS);
            let mut li = Vec::with_capacity(HOLE_STEPS);
            for k in 0..HOLE_STEPS {
                let phi = std::f64::consts::TAU * k as f64 / HOLE_STEPS as f64;
                let xr = h.r * phi.cos();
                let yr = side * (r_shank * r_shank - xr * xr).max(0.0).sqrt();
                let p = Point3::new(c.x + xr, c.y + yr, h.z + h.r * phi.sin());
                let id = mesh.push_vertex(p);
                lp.push(self.push(un.u_at(&p), p.z, id));
                li.push(id);
            }
            for k in 0..HOLE_STEPS {
                self.edges.push([lp[k], lp[(k + 1) % HOLE_STEPS]]);
            }
            loops.points.push(lp);
            loops.vertices.push(li);
        }
        loops
    }

    /// The constrained Delaunay triangulation of the points: its triangles as point
    /// indices.
    fn triangulate(&self) -> Result<Vec<[usize; 3]>, MountError> {
        use spade::{ConstrainedDelaunayTriangulation, Point2 as SPoint, Triangulation};
        let verts: Vec<SPoint<f64>> = self.uz.iter().map(|p| SPoint::new(p.x, p.y)).collect();
        let n = verts.len();
        let mut conflict = false;
        let Ok(cdt) = ConstrainedDelaunayTriangulation::<SPoint<f64>>::try_bulk_load_cdt(
            verts,
            self.edges.clone(),
            |_| conflict = true,
        ) else {
            return Err(MountError::BandNotTriangulated);
        };
        if conflict || cdt.num_vertices() != n {
            return Err(MountError::OutlinesCrossGrid);
        }
        Ok(cdt
            .inner_faces()
            .map(|face| face.vertices().map(|v| v.fix().index()))
            .collect())
    }
}

/// Removes the band's old triangles: grid triangles with every vertex in rows
/// `ja..=jb` that reach inside the band.
fn remove_band(mesh: &mut TriMesh, grid_vertices: usize, band: &Band<'_>) {
    let (rows, ja, jb) = (band.rows, band.ja, band.jb);
    let row = |v: u32| (v as usize) % rows;
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
}

/// The band's new triangles, those inside a hole loop left out, facing away from the
/// shank axis.
fn add_band_faces(
    mesh: &mut TriMesh,
    cdt: &BandPoints,
    faces: &[[usize; 3]],
    loops: &HoleLoops,
    c: Point3<f64>,
) {
    let uz = &cdt.uz;
    let hole_polys: Vec<Vec<Point2<f64>>> = loops
        .points
        .iter()
        .map(|lp| lp.iter().map(|&k| uz[k]).collect())
        .collect();
    for &[a, b, cc] in faces {
        let cu = (uz[a].x + uz[b].x + uz[cc].x) / 3.0;
        let cz = (uz[a].y + uz[b].y + uz[cc].y) / 3.0;
        let q = Point2::new(cu, cz);
        if hole_polys
            .iter()
            .any(|poly| crate::planar::point_in_polygon(poly, &q))
        {
            continue;
        }
        let t = [cdt.ids[a], cdt.ids[b], cdt.ids[cc]];
        let centroid = Point3::from(
            (mesh.vertices[t[0] as usize].coords
                + mesh.vertices[t[1] as usize].coords
                + mesh.vertices[t[2] as usize].coords)
                / 3.0,
        );
        let outward = Vector3::new(centroid.x - c.x, centroid.y - c.y, 0.0);
        push_oriented(mesh, t, outward);
    }
}

/// Each hole's wall: straight segments from entry to exit, facing the hole's axis.
fn add_hole_walls(mesh: &mut TriMesh, holes: &[CrossHole], loops: &HoleLoops, c: Point3<f64>) {
    for (h, hole) in holes.iter().enumerate() {
        let (entry, exit) = (&loops.vertices[2 * h], &loops.vertices[2 * h + 1]);
        for k in 0..HOLE_STEPS {
            let k1 = (k + 1) % HOLE_STEPS;
            let p = mesh.vertices[entry[k] as usize];
            let q = mesh.vertices[entry[k1] as usize];
            let mid = Point3::from((p.coords + q.coords) * 0.5);
            let outward = Vector3::new(c.x - mid.x, 0.0, hole.z - mid.z);
            push_oriented(mesh, [entry[k], entry[k1], exit[k1]], outward);
            push_oriented(mesh, [entry[k], exit[k1], exit[k]], outward);
        }
    }
}
