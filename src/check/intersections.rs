//! Self-intersection search: a bounding volume hierarchy over items (blocks of grid cells
//! and loose triangles, see [`super::grid`]), traversed against itself, then the exact
//! pair tests of [`super::tritri`].
//!
//! **Items.** Without a grid every triangle is its own item. With one, the triangles of
//! complete grid cells are grouped in blocks, and pairs of blocks lying in one window the
//! grid certificate proves embedded are never tested.
//!
//! **Hierarchy.** The items are ordered along a Morton (Z-order) curve through the
//! centres of their bounding boxes (G. M. Morton, IBM technical report, 1966; the
//! ordering used by linear BVH builders, Lauterbach et al., "Fast BVH Construction on
//! GPUs", Eurographics 2009), cut into leaves of [`LEAF`] consecutive items, and a
//! balanced binary tree of boxes is built over the leaves. Spatially close items end up
//! in nearby leaves whatever their shape, so the long thin triangles of a blade and long
//! cap triangles need no tuning.
//!
//! **Traversal.** Every unordered pair of items is met exactly once: a node's pairs are
//! its two children's own pairs plus the pairs across them, and a pair of nodes is only
//! descended when their boxes overlap. At the leaves, a pair of items whose boxes overlap
//! and which the grid does not clear is a candidate. **Exact phase**: for each candidate,
//! the triangles of each item meeting the other item's box, and among those the pairs
//! whose triangle boxes overlap, get the exact test.
//!
//! **Work**: `O(n log n)` to build for `n` items (a sort), and for the traversal one box
//! test per pair of overlapping nodes plus one exact test per pair of overlapping
//! triangle boxes left: `O(n log n)` at most for a surface mesh whose triangles are small
//! against the part (each triangle's box meets a bounded number of others), close to
//! `O(n)` in practice (see `benches/check.rs`). A triangle reaching across the part (a
//! cap triangle) costs the nodes its box meets. With a certified grid the items are
//! blocks of `2 BLOCK^2` triangles and the neighbouring pairs, most of the exact tests of
//! a fine mesh, are skipped. The work is split over threads at the top of the tree and
//! over the candidates; the result is the same on any number of threads.

use super::grid::{GridLayout, Grouping};
use super::tritri::{corner_pair_meets, disjoint_pair_meets, edge_pair_meets};
use crate::mesh::{f32_above, f32_below, TriMesh};
use nalgebra::Vector3;

/// Triangles per leaf.
const LEAF: usize = 4;
/// Tree levels below the root whose subtrees are handed to separate tasks.
const PARALLEL_LEVELS: u32 = 10;
/// Fewest leaves under a node for its subtrees to be handed to separate tasks (below
/// that a task costs more than the work it moves).
const PARALLEL_LEAVES: usize = 64;

/// An axis-aligned box in single precision, rounded outward from the double-precision
/// coordinates it bounds, so it always contains them: two boxes that overlap in double
/// precision overlap here too (half the memory of a double-precision box, and no pair
/// is ever missed; the exact tests run on the mesh's own coordinates).
#[derive(Clone, Copy)]
struct Boxed {
    min: [f32; 3],
    max: [f32; 3],
}

impl Boxed {
    const EMPTY: Boxed = Boxed {
        min: [f32::INFINITY; 3],
        max: [f32::NEG_INFINITY; 3],
    };

    fn overlaps(&self, o: &Boxed) -> bool {
        (0..3).all(|k| self.min[k] <= o.max[k] && o.min[k] <= self.max[k])
    }

    fn union(&self, o: &Boxed) -> Boxed {
        Boxed {
            min: std::array::from_fn(|k| self.min[k].min(o.min[k])),
            max: std::array::from_fn(|k| self.max[k].max(o.max[k])),
        }
    }
}

/// All intersecting pairs `(i, j)`, `i < j`, sorted, among the triangles `t` with
/// `active[t]` (vertex indices in range, distinct, non-zero area). Pairs sharing an edge
/// count only when folded flat onto each other; pairs sharing one vertex count when they
/// meet anywhere else.
///
/// With a `grid` (the layout of the mesh's first vertices, see [`super::grid`]), pairs
/// proven apart by the grid's certified windows are skipped; the result is the same.
pub(crate) fn self_intersections(
    mesh: &TriMesh,
    active: &[bool],
    grid: Option<&GridLayout>,
) -> Vec<[usize; 2]> {
    let items = match grid {
        Some(g) => Grouping::on_grid(mesh, active, g),
        None => Grouping::loose(active),
    };
    search(mesh, &items)
}

/// Spreads the 10 low bits of `x` to every third bit.
fn spread(x: u64) -> u64 {
    let mut x = x & 0x1f_ffff;
    x = (x | (x << 32)) & 0x1f_0000_0000_ffff;
    x = (x | (x << 16)) & 0x1f_0000_ff00_00ff;
    x = (x | (x << 8)) & 0x100f_00f0_0f00_f00f;
    x = (x | (x << 4)) & 0x10c3_0c30_c30c_30c3;
    x = (x | (x << 2)) & 0x1249_2492_4924_9249;
    x
}

/// The hierarchy: triangles in Morton order and a complete binary tree of boxes over
/// their leaves (node 1 is the root, node `i` has children `2i` and `2i + 1`, leaf `l`
/// is node `first_leaf + l`).
struct Bvh {
    order: Vec<u32>,
    boxes: Vec<Boxed>,
    first_leaf: usize,
}

impl Bvh {
    /// The hierarchy over every item of `item_boxes`.
    fn build(item_boxes: &[Boxed]) -> Bvh {
        use rayon::prelude::*;
        let (lo, hi) = item_boxes
            .par_iter()
            .map(|b| (b.min.map(f64::from), b.max.map(f64::from)))
            .reduce(
                || ([f64::INFINITY; 3], [f64::NEG_INFINITY; 3]),
                |a, b| {
                    (
                        std::array::from_fn(|k| a.0[k].min(b.0[k])),
                        std::array::from_fn(|k| a.1[k].max(b.1[k])),
                    )
                },
            );
        let scale: [f64; 3] = std::array::from_fn(|k| {
            let e = hi[k] - lo[k];
            if e > 0.0 {
                ((1u64 << 21) - 1) as f64 / e
            } else {
                0.0
            }
        });
        let mut keyed: Vec<(u64, u32)> = item_boxes
            .par_iter()
            .enumerate()
            .map(|(t, b)| {
                let t = t as u32;
                let centre = |k: usize| 0.5 * (f64::from(b.min[k]) + f64::from(b.max[k]));
                let q = |k: usize| ((centre(k) - lo[k]) * scale[k]) as u64;
                (spread(q(0)) | (spread(q(1)) << 1) | (spread(q(2)) << 2), t)
            })
            .collect();
        keyed.par_sort_unstable();
        let order: Vec<u32> = keyed.into_iter().map(|(_, t)| t).collect();
        let leaves = order.len().div_ceil(LEAF);
        let first_leaf = leaves.next_power_of_two();
        let mut boxes = vec![Boxed::EMPTY; 2 * first_leaf];
        boxes[first_leaf..first_leaf + leaves]
            .par_iter_mut()
            .zip(order.par_chunks(LEAF))
            .for_each(|(b, chunk)| {
                *b = chunk
                    .iter()
                    .fold(Boxed::EMPTY, |acc, &t| acc.union(&item_boxes[t as usize]));
            });
        for i in (1..first_leaf).rev() {
            boxes[i] = boxes[2 * i].union(&boxes[2 * i + 1]);
        }
        Bvh {
            order,
            boxes,
            first_leaf,
        }
    }

    /// Leaves under a node `level` levels below the root.
    fn leaves_under(&self, level: u32) -> usize {
        self.first_leaf >> level.min(63)
    }

    /// The items of leaf node `i`.
    fn leaf(&self, i: usize) -> &[u32] {
        let l = i - self.first_leaf;
        let start = (l * LEAF).min(self.order.len());
        &self.order[start..(start + LEAF).min(self.order.len())]
    }
}

/// The traversal over the items (blocks of grid cells and loose triangles): the pairs
/// of items whose boxes overlap and which the grouping does not clear. Two single
/// triangles get their exact test at once; pairs with a block wait for the exact phase.
struct Pairs<'a> {
    bvh: &'a Bvh,
    items: &'a Grouping,
    item_boxes: &'a [Boxed],
    mesh: &'a TriMesh,
}

/// What the traversal found: meeting triangle pairs, and candidate item pairs.
#[derive(Default)]
struct Found {
    pairs: Vec<[usize; 2]>,
    candidates: Vec<[u32; 2]>,
}

impl Found {
    fn extend(&mut self, other: Found) {
        self.pairs.extend(other.pairs);
        self.candidates.extend(other.candidates);
    }
}

impl Pairs<'_> {
    /// Items `x` and `y` (`x == y`: the item's own pairs), unless their boxes are apart
    /// or the grouping clears them.
    fn test(&self, x: u32, y: u32, found: &mut Found) {
        if (x != y && !self.item_boxes[x as usize].overlaps(&self.item_boxes[y as usize]))
            || self.items.cleared(x, y)
            || (x == y && self.items.tris(x).len() < 2)
        {
            return;
        }
        match (self.items.tris(x), self.items.tris(y)) {
            (&[a], &[b]) => found.pairs.extend(meeting(self.mesh, a, b)),
            _ => found.candidates.push([x, y]),
        }
    }
    /// Pairs within node `i`.
    fn within(&self, i: usize, level: u32, found: &mut Found) {
        if self.bvh.boxes[i].min[0] > self.bvh.boxes[i].max[0] {
            return; // empty
        }
        if i >= self.bvh.first_leaf {
            let l = self.bvh.leaf(i);
            for (x, &a) in l.iter().enumerate() {
                for &b in &l[x..] {
                    self.test(a, b, found);
                }
            }
            return;
        }
        if level < PARALLEL_LEVELS && self.bvh.leaves_under(level) >= PARALLEL_LEAVES {
            let (mut f1, mut f2, mut f3) = (Found::default(), Found::default(), Found::default());
            rayon::join(
                || {
                    rayon::join(
                        || self.within(2 * i, level + 1, &mut f1),
                        || self.within(2 * i + 1, level + 1, &mut f2),
                    )
                },
                || self.across(2 * i, 2 * i + 1, level + 1, &mut f3),
            );
            found.extend(f1);
            found.extend(f2);
            found.extend(f3);
        } else {
            self.within(2 * i, level + 1, found);
            self.within(2 * i + 1, level + 1, found);
            self.across(2 * i, 2 * i + 1, level + 1, found);
        }
    }

    /// Pairs with one triangle under node `a` and the other under node `b` (same level).
    fn across(&self, a: usize, b: usize, level: u32, found: &mut Found) {
        if !self.bvh.boxes[a].overlaps(&self.bvh.boxes[b]) {
            return;
        }
        if a >= self.bvh.first_leaf {
            for &x in self.bvh.leaf(a) {
                for &y in self.bvh.leaf(b) {
                    self.test(x, y, found);
                }
            }
            return;
        }
        let kids = [
            (2 * a, 2 * b),
            (2 * a, 2 * b + 1),
            (2 * a + 1, 2 * b),
            (2 * a + 1, 2 * b + 1),
        ];
        if level < PARALLEL_LEVELS && self.bvh.leaves_under(level) >= PARALLEL_LEAVES {
            let mut parts: [Found; 4] = Default::default();
            let [p0, p1, p2, p3] = &mut parts;
            rayon::join(
                || {
                    rayon::join(
                        || self.across(kids[0].0, kids[0].1, level + 1, p0),
                        || self.across(kids[1].0, kids[1].1, level + 1, p1),
                    )
                },
                || {
                    rayon::join(
                        || self.across(kids[2].0, kids[2].1, level + 1, p2),
                        || self.across(kids[3].0, kids[3].1, level + 1, p3),
                    )
                },
            );
            for p in parts {
                found.extend(p);
            }
        } else {
            for (x, y) in kids {
                self.across(x, y, level + 1, found);
            }
        }
    }
}

fn search(mesh: &TriMesh, items: &Grouping) -> Vec<[usize; 2]> {
    use rayon::prelude::*;
    if items.len() == 0 {
        return Vec::new();
    }
    // An item's box is the union of its triangles' (rounding outward commutes with
    // taking the smallest and largest).
    let item_boxes: Vec<Boxed> = (0..items.len() as u32)
        .into_par_iter()
        .map(|k| {
            items
                .tris(k)
                .iter()
                .fold(Boxed::EMPTY, |acc, &t| acc.union(&tri_box(mesh, t)))
        })
        .collect();
    let bvh = Bvh::build(&item_boxes);
    let pairs = Pairs {
        bvh: &bvh,
        items,
        item_boxes: &item_boxes,
        mesh,
    };
    let mut traversal = Found::default();
    pairs.within(1, 0, &mut traversal);
    let Found {
        pairs: mut found,
        candidates,
    } = traversal;
    let exact = Exact::new(mesh, items, &item_boxes, &candidates);
    found.par_extend(
        candidates
            .par_iter()
            .flat_map_iter(|&[x, y]| exact.pairs(x, y)),
    );
    found.sort_unstable();
    found.dedup();
    found
}

/// The exact tests of the candidate item pairs, with the boxes of the triangles of the
/// items taking part (computed once each).
struct Exact<'a> {
    mesh: &'a TriMesh,
    items: &'a Grouping,
    item_boxes: &'a [Boxed],
    /// Per item: where its triangles' boxes start in `boxes` (`u32::MAX`: not needed).
    first: Vec<u32>,
    boxes: Vec<Boxed>,
}

impl<'a> Exact<'a> {
    fn new(
        mesh: &'a TriMesh,
        items: &'a Grouping,
        item_boxes: &'a [Boxed],
        candidates: &[[u32; 2]],
    ) -> Exact<'a> {
        use rayon::prelude::*;
        let mut first = vec![u32::MAX; items.len()];
        let mut taking_part = vec![false; items.len()];
        for &k in candidates.iter().flatten() {
            taking_part[k as usize] = true;
        }
        let involved: Vec<u32> = (0..items.len() as u32)
            .filter(|&k| taking_part[k as usize])
            .collect();
        let mut total = 0u32;
        for &k in &involved {
            first[k as usize] = total;
            total += items.tris(k).len() as u32;
        }
        let boxes: Vec<Boxed> = involved
            .par_iter()
            .flat_map_iter(|&k| items.tris(k).iter().map(|&t| tri_box(mesh, t)))
            .collect();
        Exact {
            mesh,
            items,
            item_boxes,
            first,
            boxes,
        }
    }

    /// The boxes of item `k`'s triangles.
    fn boxes_of(&self, k: u32) -> &[Boxed] {
        let start = self.first[k as usize] as usize;
        &self.boxes[start..start + self.items.tris(k).len()]
    }

    /// The meeting pairs with one triangle in item `x` and the other in item `y`
    /// (`x == y`: two of its own).
    fn pairs(&self, x: u32, y: u32) -> Vec<[usize; 2]> {
        let mut found = Vec::new();
        let (tx, bx) = (self.items.tris(x), self.boxes_of(x));
        if x == y {
            for a in 0..tx.len() {
                for b in a + 1..tx.len() {
                    if bx[a].overlaps(&bx[b]) {
                        self.exact(tx[a], tx[b], &mut found);
                    }
                }
            }
            return found;
        }
        let (ty, by) = (self.items.tris(y), self.boxes_of(y));
        // Only the triangles meeting the other item's box.
        let near = |tris: &[u32], boxes: &[Boxed], other: u32| -> Vec<(u32, Boxed)> {
            let ob = self.item_boxes[other as usize];
            tris.iter()
                .zip(boxes)
                .filter(|(_, b)| b.overlaps(&ob))
                .map(|(&t, &b)| (t, b))
                .collect()
        };
        let ny = near(ty, by, x);
        for (a, ba) in near(tx, bx, y) {
            for &(b, ref bb) in &ny {
                if ba.overlaps(bb) {
                    self.exact(a, b, &mut found);
                }
            }
        }
        found
    }

    fn exact(&self, a: u32, b: u32, found: &mut Vec<[usize; 2]>) {
        found.extend(meeting(self.mesh, a, b));
    }
}

/// Triangles `a` and `b` as a sorted pair when they meet where they should not.
fn meeting(mesh: &TriMesh, a: u32, b: u32) -> Option<[usize; 2]> {
    let tris = &mesh.triangles;
    pair_meets(mesh, tris[a as usize], tris[b as usize])
        .then(|| [a.min(b) as usize, a.max(b) as usize])
}

/// Triangle `t`'s box, rounded outward to single precision.
fn tri_box(mesh: &TriMesh, t: u32) -> Boxed {
    let v = &mesh.vertices;
    let tri = mesh.triangles[t as usize];
    let range = |k: usize| min_max(tri.map(|i| v[i as usize][k]));
    Boxed {
        min: std::array::from_fn(|k| f32_below(range(k).0)),
        max: std::array::from_fn(|k| f32_above(range(k).1)),
    }
}

/// The smallest and largest of three numbers.
fn min_max(x: [f64; 3]) -> (f64, f64) {
    (x[0].min(x[1]).min(x[2]), x[0].max(x[1]).max(x[2]))
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
    fn hierarchy_finds_exactly_the_pairs_of_an_exhaustive_search() {
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
        assert_eq!(self_intersections(&m, &active, None), all);
        assert_eq!(self_intersections(&m, &active, None), all);
        // And a smooth sphere has none.
        let smooth = crumpled(40, 20, 0.0);
        let inner: Vec<bool> = (0..smooth.len()).map(|t| t + 1 < smooth.len()).collect();
        assert!(self_intersections(&smooth, &inner, None).is_empty());
    }
}
