//! Building the segments' meshes, watertight by construction.
//!
//! The skin is tessellated on the blade's own grid with a row forced at each split
//! radius ([`crate::tessellate::with_rows`]); those rows' vertices are put exactly on
//! their planes `z = r`. A segment is the band of skin cells between two split rows (the
//! trailing-edge strip included), closed by planar caps on the split rows' own vertices,
//! so neighbouring segments' faces are the same polygon. The root segment keeps the
//! root as built (cap or mounting features, see [`crate::mount`]); the last keeps the tip
//! cap.
//!
//! Holes: each cap is triangulated with the holes that meet it as inner loops
//! ([`crate::planar::triangulate`]); a hole's wall is a tube of straight segments
//! parallel to the span on the same loop vertices, ending in a drill-point cone (or a
//! flat bottom), or, for the channel through a whole segment, at the loop of the other
//! cap (each such channel adds one to the segment's genus). Hole loops are regular
//! polygons inscribed in the hole's circle with enough sides that the polygon stays
//! within the mesh tolerance of the circle ([`sides`]).

use super::channel::Channel;
use super::dowels::Joint;
use super::SegmentError;
use crate::loft::Skin;
use crate::mesh::TriMesh;
use crate::root::RootSpec;
use crate::tessellate::{merge_distance, mesh_from_grid, row_ring, with_rows};
use nalgebra::{Point2, Point3, Vector3};

/// One segment's mesh and what it is.
#[derive(Debug, Clone)]
pub struct SegmentMesh {
    /// Position from the root, from 1.
    pub index: usize,
    /// Number of segments of the blade.
    pub count: usize,
    /// Radius of its inner end (the root face or a split), mm.
    pub from: f64,
    /// Radius of its outer end (a split or the tip end), mm.
    pub to: f64,
    /// The closed mesh.
    pub mesh: TriMesh,
    /// Its genus: through-channels and the root's cross holes.
    pub genus: u32,
    /// Points whose convex hull is the segment's: each grid row's outline hull and the
    /// root features' vertices (for the printer fit).
    pub hull: Vec<Point3<f64>>,
}

/// What the builder reads of the blade.
#[derive(Debug, Clone, Copy)]
pub struct BuildInput<'a> {
    /// The surface model.
    pub skin: &'a Skin,
    /// Grid columns.
    pub us: &'a [f64],
    /// Grid rows (the blade's, before the splits).
    pub vs: &'a [f64],
    /// The root table, when there is one.
    pub root: Option<&'a RootSpec>,
    /// Radius of the root face, mm.
    pub root_face: f64,
    /// Mesh tolerance, mm.
    pub tolerance: f64,
}

/// Sides of a hole polygon of `radius` whose edges stay within `tolerance` of the
/// circle: the sagitta `r (1 - cos(pi / n))` at most the tolerance (elementary
/// geometry), at least 12, a multiple of 4, at most 256.
pub fn sides(radius: f64, tolerance: f64) -> usize {
    let t = (tolerance / radius).min(1.0);
    let n = (std::f64::consts::PI / (1.0 - t).acos()).ceil() as usize;
    n.div_ceil(4).clamp(3, 64) * 4
}

/// A hole meeting a cap.
#[derive(Debug, Clone, Copy)]
struct Hole {
    centre: Point2<f64>,
    radius: f64,
    /// Which hole of the segment (a through channel meets both caps with one id).
    id: usize,
}

/// A hole's path into the segment.
#[derive(Debug, Clone, Copy)]
enum Bore {
    /// From the cap at `z` in direction `dir` (+1 up, -1 down), `depth` deep, then a
    /// drill point `point` long (0: flat).
    Blind {
        z: f64,
        dir: f64,
        depth: f64,
        point: f64,
    },
    /// From one cap to the other.
    Through,
}

/// Builds every segment: `splits` sorted, strictly inside the skin; `joints` one per
/// split in the same order.
///
/// # Errors
/// [`SegmentError::Mesh`] when a cap cannot be triangulated (a hole crossing the
/// outline), or an error of the skin's tessellation or mounting features.
pub fn build(
    input: &BuildInput<'_>,
    splits: &[f64],
    channel: Option<&Channel>,
    joints: &[Joint],
) -> Result<Vec<SegmentMesh>, SegmentError> {
    let blade = SplitBlade::mesh(input, splits, channel)?;
    let bands = blade.bands()?;
    bands
        .into_iter()
        .enumerate()
        .map(|(s, tris)| blade.segment(s, &tris, channel, joints))
        .collect()
}

/// The whole blade's mesh with a row of vertices on each split plane, before it is cut
/// into segments.
struct SplitBlade<'a> {
    input: &'a BuildInput<'a>,
    /// The split radii, mm.
    splits: &'a [f64],
    /// The grid row on each split plane.
    rows: Vec<usize>,
    /// The shared mesh: the grid (column-major, `nv` rows a column), then the root's
    /// features and the tip cap's interior points.
    mesh: TriMesh,
    /// The skin's root ring.
    root_ring: Vec<u32>,
    /// The root cap's triangles, left out when the spar channel opens at the root face.
    skip_root_cap: Option<std::ops::Range<usize>>,
    /// Whether the spar channel opens at the root face.
    opens: bool,
    nu: usize,
    nv: usize,
}

impl<'a> SplitBlade<'a> {
    /// Tessellates the skin with a row on each split plane and adds the root's mounting
    /// features (unless the channel opens at the root face).
    fn mesh(
        input: &'a BuildInput<'a>,
        splits: &'a [f64],
        channel: Option<&Channel>,
    ) -> Result<Self, SegmentError> {
        let (vs, rows) = with_rows(input.skin, input.vs, splits).ok_or_else(|| {
            SegmentError::mesh("a split radius lies outside the skin".to_string())
        })?;
        let (mut mesh, root_ring, root_cap) =
            mesh_from_grid(input.skin, input.us, &vs, merge_distance(input.tolerance))?;
        let (nu, nv) = (input.us.len(), vs.len());
        for (&j, &r) in rows.iter().zip(splits) {
            for i in 0..nu {
                mesh.vertices[i * nv + j].z = r;
            }
        }
        let opens = channel.is_some_and(|c| c.opens_at_root);
        let mut skip_root_cap = None;
        if opens {
            skip_root_cap = Some(root_cap.clone());
        } else if let Some(root) = input.root {
            crate::mount::add_mount_features(
                &mut mesh,
                &root_ring,
                root_cap.clone(),
                root,
                input.root_face,
            )?;
        }
        Ok(SplitBlade {
            input,
            splits,
            rows,
            mesh,
            root_ring,
            skip_root_cap,
            opens,
            nu,
            nv,
        })
    }

    /// Number of segments.
    fn count(&self) -> usize {
        self.splits.len() + 1
    }

    /// Number of grid vertices.
    fn grid(&self) -> usize {
        self.nu * self.nv
    }

    /// The triangles of each segment, in the shared mesh's order.
    fn bands(&self) -> Result<Vec<Vec<[u32; 3]>>, SegmentError> {
        let mut bands: Vec<Vec<[u32; 3]>> = vec![Vec::new(); self.count()];
        for (t, tri) in self.mesh.triangles.iter().enumerate() {
            if self.skip_root_cap.as_ref().is_some_and(|r| r.contains(&t)) {
                continue;
            }
            bands[self.band_of(tri)?].push(*tri);
        }
        Ok(bands)
    }

    /// Band of a triangle: the number of split rows below its highest grid row.
    fn band_of(&self, tri: &[u32; 3]) -> Result<usize, SegmentError> {
        let (grid, nv) = (self.grid(), self.nv);
        let top = tri
            .iter()
            .filter(|&&v| (v as usize) < grid)
            .map(|&v| v as usize % nv)
            .max();
        match top {
            Some(row) if tri.iter().all(|&v| (v as usize) < grid) => {
                Ok(self.rows.iter().filter(|&&j| j < row).count())
            }
            // Vertices off the grid: mounting features at the root (the root segment:
            // planning keeps splits beyond them), or interior points of the tip cap
            // (in the tip's plane, so in the last segment).
            _ => {
                let tip_z = self.mesh.vertices[nv - 1].z;
                let zmax = tri
                    .iter()
                    .map(|&v| self.mesh.vertices[v as usize].z)
                    .fold(f64::NEG_INFINITY, f64::max);
                let band = self.splits.iter().filter(|&&r| zmax > r).count();
                let at_tip = (zmax - tip_z).abs() <= 1e-9 * tip_z.abs().max(1.0);
                if band > 0 && !at_tip {
                    return Err(SegmentError::mesh(format!(
                        "a root feature reaches beyond the first split at {:.2} mm",
                        self.splits[0]
                    )));
                }
                Ok(band)
            }
        }
    }

    /// Where segment `s` (from 0) ends.
    fn ends(&self, s: usize) -> Ends {
        let lo = if s == 0 { None } else { Some(s - 1) };
        let hi = (s + 1 < self.count()).then_some(s);
        Ends {
            s,
            lo,
            hi,
            z_lo: lo.map_or(self.input.root_face, |k| self.splits[k]),
            z_hi: hi.map_or(f64::INFINITY, |k| self.splits[k]),
        }
    }

    /// Segment `s` (from 0) from its band's triangles: the band, its caps with the
    /// holes that meet them, and the holes' walls.
    fn segment(
        &self,
        s: usize,
        tris: &[[u32; 3]],
        channel: Option<&Channel>,
        joints: &[Joint],
    ) -> Result<SegmentMesh, SegmentError> {
        let ends = self.ends(s);
        let mut b = Local::new(&self.mesh);
        for t in tris {
            let tri = t.map(|v| b.v(v));
            b.out.triangles.push(tri);
        }
        let mut holes = EndHoles::default();
        if let Some(c) = channel {
            holes.add_channel(c, &ends)?;
        }
        holes.add_pins(joints, &ends);
        let (loops_lo, loops_hi) = self.caps(&mut b, &ends, &holes)?;
        holes.bore(&mut b, &loops_lo, &loops_hi);
        let root_genus = if s == 0 {
            self.input.root.map_or(0, RootSpec::genus)
        } else {
            0
        };
        let to = if ends.hi.is_some() {
            ends.z_hi
        } else {
            b.out
                .vertices
                .iter()
                .map(|p| p.z)
                .fold(f64::NEG_INFINITY, f64::max)
        };
        Ok(SegmentMesh {
            index: s + 1,
            count: self.count(),
            from: ends.z_lo,
            to,
            mesh: b.out,
            genus: holes.through + root_genus,
            hull: self.hull(&ends),
        })
    }

    /// The loop of grid row `j`'s vertices (without the closing repeat).
    fn ring_at(&self, j: usize) -> Vec<u32> {
        row_ring(&self.mesh.vertices, self.nu, self.nv, j)
    }

    /// The segment's caps: at its lower end (a split, or the root face when the
    /// channel opens there) and at its upper end (a split). Returns each cap's hole
    /// loops.
    fn caps(
        &self,
        b: &mut Local<'_>,
        ends: &Ends,
        holes: &EndHoles,
    ) -> Result<(HoleLoops, HoleLoops), SegmentError> {
        let tol = self.input.tolerance;
        let mut loops_lo = Vec::new();
        let mut loops_hi = Vec::new();
        if ends.s == 0 {
            if self.opens {
                let ring: Vec<u32> = self.root_ring.iter().map(|&v| b.v(v)).collect();
                loops_lo = b.cap(&ring, self.input.root_face, &holes.lower, false, tol)?;
            }
        } else {
            let ring: Vec<u32> = self
                .ring_at(self.rows[ends.s - 1])
                .iter()
                .map(|&v| b.v(v))
                .collect();
            loops_lo = b.cap(&ring, ends.z_lo, &holes.lower, false, tol)?;
        }
        if ends.hi.is_some() {
            let ring: Vec<u32> = self
                .ring_at(self.rows[ends.s])
                .iter()
                .map(|&v| b.v(v))
                .collect();
            loops_hi = b.cap(&ring, ends.z_hi, &holes.upper, true, tol)?;
        }
        Ok((loops_lo, loops_hi))
    }

    /// Points whose convex hull is the segment's: each grid row's outline hull, and
    /// for the root segment the root's features.
    fn hull(&self, ends: &Ends) -> Vec<Point3<f64>> {
        let (nu, nv) = (self.nu, self.nv);
        let first_row = if ends.s == 0 {
            0
        } else {
            self.rows[ends.s - 1]
        };
        let last_row = if ends.hi.is_some() {
            self.rows[ends.s]
        } else {
            nv - 1
        };
        let mut hull: Vec<Point3<f64>> = Vec::new();
        for j in first_row..=last_row {
            let pts: Vec<nalgebra::Point2<f64>> = (0..nu)
                .map(|i| {
                    let p = self.mesh.vertices[i * nv + j];
                    nalgebra::Point2::new(p.x, p.y)
                })
                .collect();
            let z = self.mesh.vertices[j].z;
            hull.extend(
                crate::fit::hull::convex_hull(&pts)
                    .into_iter()
                    .map(|p| Point3::new(p[0], p[1], z)),
            );
        }
        if ends.s == 0 {
            // The root's features (a flange reaches beyond the skin); the tip cap's
            // interior points lie inside the tip row's outline and another segment.
            hull.extend(
                self.mesh.vertices[self.grid()..]
                    .iter()
                    .filter(|p| p.z <= ends.z_hi)
                    .copied(),
            );
        }
        hull
    }
}

/// Where a segment ends.
struct Ends {
    /// The segment, from 0.
    s: usize,
    /// The split at its lower end (none for the root segment).
    lo: Option<usize>,
    /// The split at its upper end (none for the last segment).
    hi: Option<usize>,
    /// Radius of its lower end (the root face for the root segment), mm.
    z_lo: f64,
    /// Radius of its upper end (infinite for the last segment), mm.
    z_hi: f64,
}

/// Each hole's loop of vertices on a cap, with the hole's id.
type HoleLoops = Vec<(usize, Vec<u32>)>;

/// The holes meeting a segment's two caps.
#[derive(Default)]
struct EndHoles {
    /// Holes entering from the lower cap.
    lower: Vec<(Hole, Bore)>,
    /// Holes entering from the upper cap.
    upper: Vec<(Hole, Bore)>,
    /// Number of through channels.
    through: u32,
}

impl EndHoles {
    /// The spar channel's hole at either end of the segment: through, blind from one
    /// end, or none.
    fn add_channel(&mut self, c: &Channel, ends: &Ends) -> Result<(), SegmentError> {
        let (z_lo, z_hi) = (ends.z_lo, ends.z_hi);
        let enters = if ends.s == 0 {
            c.opens_at_root
        } else {
            c.start < z_lo && c.end > z_lo
        };
        let leaves = ends.hi.is_some() && c.start < z_hi && c.end > z_hi;
        let hole = Hole {
            centre: c.axis_point(),
            radius: c.hole_radius(),
            id: 0,
        };
        match (enters, leaves) {
            (true, true) => {
                self.lower.push((hole, Bore::Through));
                self.upper.push((hole, Bore::Through));
                self.through += 1;
            }
            (true, false) => self.lower.push((
                hole,
                Bore::Blind {
                    z: z_lo,
                    dir: 1.0,
                    depth: c.end - z_lo,
                    point: c.point_depth,
                },
            )),
            (false, true) => self.upper.push((
                hole,
                Bore::Blind {
                    z: z_hi,
                    dir: -1.0,
                    depth: z_hi - c.start,
                    point: c.point_depth,
                },
            )),
            (false, false) => {
                if c.start > z_lo && c.start < z_hi {
                    return Err(SegmentError::mesh(format!(
                        "the spar channel would be a closed cavity in segment {} (no split between its start {:.2} mm and its end {:.2} mm)",
                        ends.s + 1,
                        c.start,
                        c.end
                    )));
                }
            }
        }
        Ok(())
    }

    /// The joints' pin holes at each end that is a split.
    fn add_pins(&mut self, joints: &[Joint], ends: &Ends) {
        for (side, k, dir, z) in [
            (&mut self.lower, ends.lo, 1.0, ends.z_lo),
            (&mut self.upper, ends.hi, -1.0, ends.z_hi),
        ] {
            let Some(k) = k else { continue };
            let j = &joints[k];
            for (n, p) in j.pins.iter().enumerate() {
                side.push((
                    Hole {
                        centre: Point2::new(p[0], p[1]),
                        radius: 0.5 * j.hole_diameter,
                        id: 1 + n,
                    },
                    Bore::Blind {
                        z,
                        dir,
                        depth: j.depth,
                        point: j.point_depth,
                    },
                ));
            }
        }
    }

    /// The holes' walls from the caps' loops: blind holes from either cap, then the
    /// through channels from the lower cap's loop to the upper's.
    fn bore(&self, b: &mut Local<'_>, loops_lo: &HoleLoops, loops_hi: &HoleLoops) {
        for (list, loops) in [(&self.lower, loops_lo), (&self.upper, loops_hi)] {
            for ((hole, bore), (_, ids)) in list.iter().zip(loops.iter()) {
                if let Bore::Blind {
                    z,
                    dir,
                    depth,
                    point,
                } = *bore
                {
                    b.blind(ids, hole, z, dir, depth, point);
                }
            }
        }
        for ((hole, bore), (_, ids)) in self.lower.iter().zip(loops_lo) {
            if let Bore::Through = bore {
                if let Some((_, top)) = loops_hi.iter().find(|(id, _)| *id == hole.id) {
                    b.tube(ids, top, hole);
                }
            }
        }
    }
}

/// A segment's own mesh, taking vertices from the shared one as they are used.
struct Local<'a> {
    shared: &'a TriMesh,
    map: Vec<u32>,
    out: TriMesh,
}

impl<'a> Local<'a> {
    fn new(shared: &'a TriMesh) -> Self {
        Local {
            shared,
            map: vec![u32::MAX; shared.vertices.len()],
            out: TriMesh::new(),
        }
    }

    /// The local index of shared vertex `g`.
    fn v(&mut self, g: u32) -> u32 {
        let m = &mut self.map[g as usize];
        if *m == u32::MAX {
            *m = self.out.push_vertex(self.shared.vertices[g as usize]);
        }
        *m
    }

    /// A planar cap at `z` on the loop `ring` (local indices) with `holes` as inner
    /// loops; facing +z when `up`. Returns each hole's loop of new vertices (counter-
    /// clockwise seen from +z, starting at angle 0), with its id.
    fn cap(
        &mut self,
        ring: &[u32],
        z: f64,
        holes: &[(Hole, Bore)],
        up: bool,
        tol: f64,
    ) -> Result<Vec<(usize, Vec<u32>)>, SegmentError> {
        let mut pts: Vec<Point2<f64>> = ring
            .iter()
            .map(|&i| {
                let p = self.out.vertices[i as usize];
                Point2::new(p.x, p.y)
            })
            .collect();
        let mut ids: Vec<u32> = ring.to_vec();
        let mut loops = Vec::with_capacity(1 + holes.len());
        loops.push(0..ring.len());
        let mut out = Vec::new();
        for (h, _) in holes {
            let n = sides(h.radius, tol);
            let start = pts.len();
            let mut lp = Vec::with_capacity(n);
            for k in 0..n {
                let a = std::f64::consts::TAU * k as f64 / n as f64;
                let q = Point2::new(
                    h.centre.x + h.radius * a.cos(),
                    h.centre.y + h.radius * a.sin(),
                );
                let id = self.out.push_vertex(Point3::new(q.x, q.y, z));
                pts.push(q);
                ids.push(id);
                lp.push(id);
            }
            loops.push(start..pts.len());
            out.push((h.id, lp));
        }
        let tris = crate::planar::triangulate(&pts, &loops).ok_or_else(|| {
            SegmentError::mesh(format!(
                "the face at {z:.2} mm could not be triangulated with its holes (a hole meets the outline or another hole)"
            ))
        })?;
        for [a, b, c] in tris {
            let t = if up {
                [ids[a], ids[b], ids[c]]
            } else {
                [ids[a], ids[c], ids[b]]
            };
            self.out.triangles.push(t);
        }
        Ok(out)
    }

    /// A triangle facing `toward` (a vector its normal should agree with).
    fn push(&mut self, t: [u32; 3], toward: Vector3<f64>) {
        let [a, b, c] = t.map(|i| self.out.vertices[i as usize]);
        let n = (b - a).cross(&(c - a));
        if n.norm_squared() == 0.0 {
            return;
        }
        self.out.triangles.push(if n.dot(&toward) >= 0.0 {
            t
        } else {
            [t[0], t[2], t[1]]
        });
    }

    /// Direction from a triangle's centroid to the point `q`.
    fn toward(&self, t: [u32; 3], q: Point3<f64>) -> Vector3<f64> {
        let c = t.iter().fold(Vector3::zeros(), |s, &i| {
            s + self.out.vertices[i as usize].coords
        }) / 3.0;
        q.coords - c
    }

    /// A blind hole's wall and bottom from the loop `top` at `z` (module docs).
    fn blind(&mut self, top: &[u32], hole: &Hole, z: f64, dir: f64, depth: f64, point: f64) {
        let n = top.len();
        let zb = z + dir * depth;
        let bottom: Vec<u32> = top
            .iter()
            .map(|&i| {
                let p = self.out.vertices[i as usize];
                self.out.push_vertex(Point3::new(p.x, p.y, zb))
            })
            .collect();
        // Every face of the hole faces its inside: a point on the axis halfway down.
        let q = Point3::new(hole.centre.x, hole.centre.y, z + 0.5 * dir * depth);
        for k in 0..n {
            let k1 = (k + 1) % n;
            for t in [
                [top[k], top[k1], bottom[k1]],
                [top[k], bottom[k1], bottom[k]],
            ] {
                let d = self.toward(t, q);
                self.push(t, d);
            }
        }
        let apex =
            self.out
                .push_vertex(Point3::new(hole.centre.x, hole.centre.y, zb + dir * point));
        for k in 0..n {
            let t = [bottom[k], bottom[(k + 1) % n], apex];
            let d = self.toward(t, q);
            self.push(t, d);
        }
    }

    /// A through hole's wall between the loops `a` and `b` (same angles).
    fn tube(&mut self, a: &[u32], b: &[u32], hole: &Hole) {
        let n = a.len();
        for k in 0..n {
            let k1 = (k + 1) % n;
            for t in [[a[k], a[k1], b[k1]], [a[k], b[k1], b[k]]] {
                let c = t.iter().fold(Vector3::zeros(), |s, &i| {
                    s + self.out.vertices[i as usize].coords
                }) / 3.0;
                let d = Vector3::new(hole.centre.x - c.x, hole.centre.y - c.y, 0.0);
                self.push(t, d);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::sides;

    #[test]
    fn hole_polygons_stay_within_the_tolerance() {
        // Elementary geometry: the sagitta of a chord subtending 2 pi / n on a circle of
        // radius r is r (1 - cos(pi / n)).
        for (r, tol) in [(3.1, 0.01), (1.6, 0.01), (10.0, 0.001), (0.5, 0.2)] {
            let n = sides(r, tol);
            let sag = r * (1.0 - (std::f64::consts::PI / n as f64).cos());
            assert!(
                sag <= tol + 1e-12 || n == 256,
                "r {r} tol {tol}: n {n}, sagitta {sag}"
            );
            assert!(n.is_multiple_of(4) && n >= 12);
        }
    }
}
