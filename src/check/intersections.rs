//! Self-intersection search: a uniform grid over triangle bounding boxes, then the exact
//! pair tests of [`super::tritri`].
//!
//! Each triangle is entered in every grid cell its bounding box overlaps; the entries are
//! sorted by cell, and the triangles of each cell are paired. A pair overlapping in
//! several cells is tested only in the cell holding the lowest corner of the intersection
//! of their boxes, so every pair is tested once without a hash set. Triangles whose box
//! spans very many cells (long cap triangles, say) are kept out of the grid and tested
//! against all others by box overlap.

use super::tritri::{corner_pair_meets, disjoint_pair_meets, edge_pair_meets};
use crate::mesh::TriMesh;
use nalgebra::Vector3;

/// At most this many cells along each axis.
const MAX_CELLS_PER_AXIS: f64 = 1024.0;
/// Triangles whose box spans more cells than this are tested outside the grid.
const MAX_CELLS_PER_TRIANGLE: u64 = 512;
/// Grid entries from which the pair tests are spread over threads.
const PARALLEL_ENTRIES: usize = 1 << 17;

#[derive(Clone, Copy)]
struct Boxed {
    min: [f64; 3],
    max: [f64; 3],
}

impl Boxed {
    fn overlaps(&self, o: &Boxed) -> bool {
        (0..3).all(|k| self.min[k] <= o.max[k] && o.min[k] <= self.max[k])
    }
}

/// All intersecting pairs `(i, j)`, `i < j`, sorted, among the triangles `t` with
/// `active[t]` (vertex indices in range, distinct, non-zero area). Pairs sharing an edge
/// count only when folded flat onto each other; pairs sharing one vertex count when they
/// meet anywhere else.
pub(crate) fn self_intersections(mesh: &TriMesh, active: &[bool]) -> Vec<[usize; 2]> {
    search(mesh, active, PARALLEL_ENTRIES)
}

/// [`self_intersections`], spreading the pair tests over threads from `parallel_from`
/// grid entries on.
fn search(mesh: &TriMesh, active: &[bool], parallel_from: usize) -> Vec<[usize; 2]> {
    let tris = &mesh.triangles;
    let ids: Vec<u32> = (0..tris.len() as u32)
        .filter(|&t| active[t as usize])
        .collect();
    if ids.len() < 2 {
        return Vec::new();
    }
    let boxes: Vec<Boxed> = tris
        .iter()
        .map(|t| {
            let mut b = Boxed {
                min: [f64::INFINITY; 3],
                max: [f64::NEG_INFINITY; 3],
            };
            for &i in t {
                if let Some(p) = mesh.vertices.get(i as usize) {
                    for k in 0..3 {
                        b.min[k] = b.min[k].min(p[k]);
                        b.max[k] = b.max[k].max(p[k]);
                    }
                }
            }
            b
        })
        .collect();

    // Grid: cells about the mean largest box side, capped per axis.
    let mut lo = [f64::INFINITY; 3];
    let mut hi = [f64::NEG_INFINITY; 3];
    let mut mean = 0.0;
    for &t in &ids {
        let b = &boxes[t as usize];
        for k in 0..3 {
            lo[k] = lo[k].min(b.min[k]);
            hi[k] = hi[k].max(b.max[k]);
        }
        mean += (0..3).map(|k| b.max[k] - b.min[k]).fold(0.0, f64::max);
    }
    mean /= ids.len() as f64;
    let extent = (0..3).map(|k| hi[k] - lo[k]).fold(0.0, f64::max);
    let h = mean.max(extent / MAX_CELLS_PER_AXIS).max(f64::MIN_POSITIVE);
    let dims: [u64; 3] = std::array::from_fn(|k| {
        (((hi[k] - lo[k]) / h) as u64 + 1).min(MAX_CELLS_PER_AXIS as u64 + 1)
    });
    let cell_of = |x: f64, k: usize| (((x - lo[k]) / h) as u64).min(dims[k] - 1);
    let cell_id = |c: [u64; 3]| c[0] + dims[0] * (c[1] + dims[1] * c[2]);

    // Entries (cell << 32 | triangle), and the triangles too large for the grid.
    let mut entries: Vec<u64> = Vec::with_capacity(ids.len() * 4);
    let mut big: Vec<u32> = Vec::new();
    for &t in &ids {
        let b = &boxes[t as usize];
        let c0: [u64; 3] = std::array::from_fn(|k| cell_of(b.min[k], k));
        let c1: [u64; 3] = std::array::from_fn(|k| cell_of(b.max[k], k));
        let n = (0..3).map(|k| c1[k] - c0[k] + 1).product::<u64>();
        if n > MAX_CELLS_PER_TRIANGLE {
            big.push(t);
            continue;
        }
        for z in c0[2]..=c1[2] {
            for y in c0[1]..=c1[1] {
                for x in c0[0]..=c1[0] {
                    entries.push((cell_id([x, y, z]) << 32) | t as u64);
                }
            }
        }
    }
    entries.sort_unstable();

    // Cell coordinates of each box's lowest corner: a pair is tested only in the cell of
    // the lowest corner of the overlap of the two boxes, which is the per-axis maximum.
    let low: Vec<[u16; 3]> = boxes
        .iter()
        .map(|b| {
            if b.min[0].is_finite() {
                std::array::from_fn(|k| cell_of(b.min[k], k) as u16)
            } else {
                [0; 3]
            }
        })
        .collect();
    // Split the sorted entries at cell boundaries and test the parts on separate threads.
    // Small meshes stay on this thread: spawning costs more than it saves.
    let parts = if entries.len() < parallel_from {
        1
    } else {
        std::thread::available_parallelism()
            .map_or(1, |n| n.get())
            .clamp(1, 8)
    };
    let mut cuts = vec![0];
    for p in 1..parts {
        let mut c = (entries.len() * p / parts).max(*cuts.last().unwrap_or(&0));
        while c > 0 && c < entries.len() && entries[c] >> 32 == entries[c - 1] >> 32 {
            c += 1;
        }
        cuts.push(c);
    }
    cuts.push(entries.len());
    let pairs_in = |run: &[u64]| -> Vec<[usize; 2]> {
        let mut found = Vec::new();
        let mut i = 0;
        while i < run.len() {
            let cell = run[i] >> 32;
            let mut j = i + 1;
            while j < run.len() && run[j] >> 32 == cell {
                j += 1;
            }
            let cc = [
                (cell % dims[0]) as u16,
                ((cell / dims[0]) % dims[1]) as u16,
                (cell / (dims[0] * dims[1])) as u16,
            ];
            for x in i..j {
                let a = run[x] as u32;
                let (ba, la) = (&boxes[a as usize], low[a as usize]);
                for &e in &run[x + 1..j] {
                    let b = e as u32;
                    let lb = low[b as usize];
                    if (0..3).any(|k| la[k].max(lb[k]) != cc[k]) || !ba.overlaps(&boxes[b as usize])
                    {
                        continue;
                    }
                    if pair_meets(mesh, tris[a as usize], tris[b as usize]) {
                        found.push([a.min(b) as usize, a.max(b) as usize]);
                    }
                }
            }
            i = j;
        }
        found
    };
    let mut found: Vec<[usize; 2]> = if parts == 1 {
        pairs_in(&entries)
    } else {
        std::thread::scope(|s| {
            let handles: Vec<_> = cuts
                .windows(2)
                .map(|w| {
                    let run = &entries[w[0]..w[1]];
                    s.spawn(move || pairs_in(run))
                })
                .collect();
            handles
                .into_iter()
                .flat_map(|h| h.join().unwrap_or_default())
                .collect()
        })
    };
    let test = |a: u32, b: u32, found: &mut Vec<[usize; 2]>| {
        if pair_meets(mesh, tris[a as usize], tris[b as usize]) {
            found.push([a.min(b) as usize, a.max(b) as usize]);
        }
    };
    // Large triangles against everything else (each unordered pair once).
    for (n, &a) in big.iter().enumerate() {
        let ba = &boxes[a as usize];
        for &b in &ids {
            if b == a || (big[..n].contains(&b)) {
                continue;
            }
            if ba.overlaps(&boxes[b as usize]) {
                test(a, b, &mut found);
            }
        }
    }
    found.sort_unstable();
    found.dedup();
    found
}

/// The exact test for one pair, by the number of shared vertex indices.
fn pair_meets(mesh: &TriMesh, a: [u32; 3], b: [u32; 3]) -> bool {
    let p = |i: u32| -> Vector3<f64> { mesh.vertices[i as usize].coords };
    let mut shared = 0;
    let mut ka = 0;
    let mut kb = 0;
    for (i, va) in a.iter().enumerate() {
        if let Some(j) = b.iter().position(|vb| vb == va) {
            shared += 1;
            ka = i;
            kb = j;
        }
    }
    match shared {
        0 => disjoint_pair_meets(&a.map(p), &b.map(p)),
        1 => {
            // Rotate both so the shared vertex comes first (keeps orientation).
            let ra = [a[ka], a[(ka + 1) % 3], a[(ka + 2) % 3]];
            let rb = [b[kb], b[(kb + 1) % 3], b[(kb + 2) % 3]];
            corner_pair_meets(&ra.map(p), &rb.map(p))
        }
        2 => {
            // Neighbours across an edge: rotate so the corner off the edge comes first.
            let off_a = (0..3).find(|&i| !b.contains(&a[i])).unwrap_or(0);
            let off_b = (0..3).find(|&j| !a.contains(&b[j])).unwrap_or(0);
            let ra = [a[off_a], a[(off_a + 1) % 3], a[(off_a + 2) % 3]];
            let rb = [b[off_b], b[(off_b + 1) % 3], b[(off_b + 2) % 3]];
            edge_pair_meets(&ra.map(p), &rb.map(p))
        }
        // Duplicates (reported as over-used edges).
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::Point3;
    use std::f64::consts::PI;

    /// A UV sphere with every vertex moved by up to `jitter` (deterministic LCG), plus one
    /// large triangle through the middle that spans many grid cells.
    fn crumpled(nu: u32, nv: u32, jitter: f64) -> TriMesh {
        let mut seed = 12345u64;
        let mut rnd = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (seed >> 11) as f64 / (1u64 << 53) as f64 - 0.5
        };
        let mut m = TriMesh::new();
        m.push_vertex(Point3::new(0.0, 0.0, 1.0));
        for j in 1..nv {
            let phi = PI * j as f64 / nv as f64;
            for i in 0..nu {
                let th = 2.0 * PI * i as f64 / nu as f64;
                let p = Point3::new(phi.sin() * th.cos(), phi.sin() * th.sin(), phi.cos());
                m.push_vertex(p + Vector3::new(rnd(), rnd(), rnd()) * jitter);
            }
        }
        m.push_vertex(Point3::new(0.0, 0.0, -1.0));
        let ring = |j: u32, i: u32| 1 + (j - 1) * nu + i % nu;
        let south = (m.vertices.len() - 1) as u32;
        for i in 0..nu {
            m.triangles.push([0, ring(1, i), ring(1, i + 1)]);
            m.triangles
                .push([south, ring(nv - 1, i + 1), ring(nv - 1, i)]);
        }
        for j in 1..nv - 1 {
            for i in 0..nu {
                let (a, b, c, d) = (
                    ring(j, i),
                    ring(j, i + 1),
                    ring(j + 1, i),
                    ring(j + 1, i + 1),
                );
                m.triangles.push([a, c, d]);
                m.triangles.push([a, d, b]);
            }
        }
        let a = m.push_vertex(Point3::new(-1.5, -1.5, 0.1));
        let b = m.push_vertex(Point3::new(1.5, -1.5, -0.1));
        let c = m.push_vertex(Point3::new(0.0, 1.5, 0.05));
        m.triangles.push([a, b, c]);
        m
    }

    #[test]
    fn grid_finds_exactly_the_pairs_of_an_exhaustive_search() {
        // Reference: testing every pair of triangles (no broad phase at all).
        let m = crumpled(40, 20, 0.08);
        let active = vec![true; m.len()];
        let mut all = Vec::new();
        for i in 0..m.len() {
            for j in i + 1..m.len() {
                if pair_meets(&m, m.triangles[i], m.triangles[j]) {
                    all.push([i, j]);
                }
            }
        }
        assert!(all.len() > 20, "the crumpled mesh should cross itself");
        // The large triangle cuts the sphere.
        assert!(all.iter().any(|p| p[1] == m.len() - 1));
        assert_eq!(search(&m, &active, usize::MAX), all);
        assert_eq!(search(&m, &active, 0), all);
        // And a smooth sphere has none.
        let smooth = crumpled(40, 20, 0.0);
        let inner: Vec<bool> = (0..smooth.len()).map(|t| t + 1 < smooth.len()).collect();
        assert!(search(&smooth, &inner, 0).is_empty());
    }
}
