//! What the self-intersection search may skip on a mesh built on a grid: groups of grid
//! cells proven, from the mesh's own coordinates, to be embedded.
//!
//! A tessellation's skin is a grid of cells, two triangles each; the search of
//! [`super::intersections`] would otherwise test every neighbouring pair of them, which on
//! a fine blade is most of its work. [`Grouping::on_grid`] reads the grid from the mesh
//! ([`GridLayout`]: vertex `i * vs.len() + j` is the grid point at parameters
//! `(us[i], vs[j])`), so it trusts no claim of the tessellator:
//!
//! * **Cells.** A triangle whose three corners are corners of one grid cell belongs to that
//!   cell. A cell is *complete* when exactly two active triangles belong to it and they
//!   are one of its two diagonal splits; every other triangle is *loose*. The trailing-edge
//!   strip, the caps, mounting features, cells collapsed by merged vertices and cells
//!   with a degenerate triangle are loose.
//! * **Windows.** Cells are grouped in blocks of [`BLOCK`] x [`BLOCK`]; a window is two by
//!   two neighbouring blocks. On a window whose cells are all complete, the mesh is a
//!   piecewise-linear map `F` from the window's parameter rectangle `D` (convex), with a
//!   constant Jacobian `J_t` (3 x 2) on each triangle `t`. Let `J0` be their mean and
//!   `C = J0^T J0`. If `|(J_t - J0) C^(-1/2)|_F <= 0.9` for every `t` (the Frobenius norm
//!   bounds the operator norm), then for any `x != y` in `D`, writing `w = C^(1/2) (x - y)`
//!   and `U = J0 C^(-1/2)` (orthonormal columns):
//!   `F(x) - F(y) = integral of J (x - y) along the segment = U w + (integral of M) w`
//!   with `|M| <= 0.9`, so `|F(x) - F(y)| >= 0.1 |w| > 0`: `F` is injective, and two
//!   triangles of the window meet only where they share a vertex or an edge (the argument
//!   of the inverse function theorem's proof, W. Rudin, *Principles of Mathematical
//!   Analysis*, 3rd ed., Theorem 9.24, from memory). The test is
//!   `trace((J_t - J0)^T (J_t - J0) C^-1) <= 0.81`, exact enough in double precision
//!   with that margin. Such a window is *certified*.
//! * **Skipped pairs.** Two triangles of complete cells whose blocks lie in one certified
//!   window are never tested; every other pair whose boxes overlap is (blocks of
//!   uncertified windows pairwise, loose triangles against everything).
//!
//! **Work**: one pass over the triangles to find the cells, and each cell's two
//! Jacobians computed once per window holding it (four windows at most): `O(n)`. On a
//! smooth skin nearly every window is certified, so the search is left with blocks (`2
//! BLOCK^2` triangles each) instead of triangles and with only the pairs of blocks that
//! are far apart on the grid but close in space (the two sides of a thin trailing edge),
//! those near loose triangles, and the windows too curved for the test (a coarse mesh's
//! leading edge).

use crate::mesh::TriMesh;
use nalgebra::Vector3;
use rayon::prelude::*;

/// Grid cells per block side.
pub(super) const BLOCK: usize = 4;

/// Largest squared Frobenius norm of `(J_t - J0) C^(-1/2)` in a certified window
/// (`0.9^2`; see the module docs).
const CERTIFY: f64 = 0.81;

/// The grid a mesh's vertices lie on: grid point `g = i * vs.len() + j`, at parameters
/// `(us[i], vs[j])` (both strictly increasing), is vertex `g`, or vertex `ids[g]` when
/// `ids` is given (`u32::MAX`: no vertex). The search checks which triangles really are
/// grid cells, so a wrong layout costs time, never a missed pair.
#[derive(Debug, Clone, Copy)]
pub struct GridLayout<'a> {
    /// Parameters of the grid's columns.
    pub us: &'a [f64],
    /// Parameters of the grid's rows.
    pub vs: &'a [f64],
    /// The vertex of each grid point, when they are not the first vertices in order.
    pub ids: Option<&'a [u32]>,
}

impl GridLayout<'_> {
    /// The vertex of grid point `g`, if any.
    fn vertex(&self, g: usize) -> Option<u32> {
        match self.ids {
            Some(ids) => ids.get(g).copied().filter(|&v| v != u32::MAX),
            None => Some(g as u32),
        }
    }
}

/// How a cell is split, from the corner each of its triangles leaves out
/// (corners `a = (i, j)`, `b = (i + 1, j)`, `c = (i + 1, j + 1)`, `d = (i, j + 1)`).
const SPLIT_AC: u32 = (1 << 1) | (1 << 3); // triangles a b c and a c d
const SPLIT_BD: u32 = 1 | (1 << 2); // triangles a b d and b c d
/// One triangle in a cell's tally (the low four bits mark left-out corners).
const ONE: u32 = 1 << 4;

/// A cell tally of exactly two triangles forming one of the cell's diagonal splits.
fn complete(tally: u32) -> bool {
    tally == 2 * ONE + SPLIT_AC || tally == 2 * ONE + SPLIT_BD
}

/// The search's items: blocks of complete grid cells and loose triangles, with the
/// certified windows.
pub(super) struct Grouping {
    /// Item `k`'s triangles are `tris[start[k]..start[k + 1]]`.
    start: Vec<u32>,
    tris: Vec<u32>,
    /// Items `0..block_of.len()` are blocks: their block index `bi * nbv + bj`.
    block_of: Vec<u32>,
    /// Blocks along `u` and along `v`.
    nb: [usize; 2],
    /// Windows along `u` and `v`; window `(wi, wj)` holds blocks `wi..=wi + 1` (clamped)
    /// by `wj..=wj + 1`.
    nw: [usize; 2],
    certified: Vec<bool>,
}

impl Grouping {
    /// Every `active` triangle its own item; nothing skipped.
    pub(super) fn loose(active: &[bool]) -> Grouping {
        let ids: Vec<u32> = (0..active.len() as u32)
            .filter(|&t| active[t as usize])
            .collect();
        Grouping {
            start: (0..=ids.len() as u32).collect(),
            tris: ids,
            block_of: Vec::new(),
            nb: [0, 0],
            nw: [0, 0],
            certified: Vec::new(),
        }
    }

    /// The items of the `active` triangles of `mesh` on `grid` (see the module docs);
    /// every triangle when the layout does not fit the mesh.
    pub(super) fn on_grid(mesh: &TriMesh, active: &[bool], grid: &GridLayout) -> Grouping {
        let (nu, nv) = (grid.us.len(), grid.vs.len());
        let increasing = |s: &[f64]| s.windows(2).all(|w| w[0] < w[1]);
        let fits = match grid.ids {
            Some(map) => {
                map.len() == nu * nv
                    && map
                        .iter()
                        .all(|&v| v == u32::MAX || (v as usize) < mesh.vertices.len())
            }
            None => nu * nv <= mesh.vertices.len(),
        };
        if nu < 3 || nv < 2 || !fits || !increasing(grid.us) || !increasing(grid.vs) {
            return Grouping::loose(active);
        }
        let cells = Cells::tally(mesh, active, grid);
        let nb = [(nu - 1).div_ceil(BLOCK), (nv - 1).div_ceil(BLOCK)];
        let nw = [
            nb[0].saturating_sub(1).max(1),
            nb[1].saturating_sub(1).max(1),
        ];
        let certified: Vec<bool> = (0..nw[0] * nw[1])
            .into_par_iter()
            .map(|w| cells.certify(mesh, grid, window_cells(w / nw[1], w % nw[1], nb, nu, nv)))
            .collect();
        // Blocks' triangles, block by block, then the loose ones.
        let per_block: Vec<Vec<u32>> = (0..nb[0] * nb[1])
            .into_par_iter()
            .map(|b| {
                let (bi, bj) = (b / nb[1], b % nb[1]);
                let mut out = Vec::new();
                for ci in bi * BLOCK..((bi + 1) * BLOCK).min(nu - 1) {
                    for cj in bj * BLOCK..((bj + 1) * BLOCK).min(nv - 1) {
                        let c = ci * (nv - 1) + cj;
                        if cells.complete(c) {
                            out.extend(cells.tri[c]);
                        }
                    }
                }
                out
            })
            .collect();
        let mut g = Grouping {
            start: vec![0],
            tris: Vec::with_capacity(mesh.triangles.len()),
            block_of: Vec::new(),
            nb,
            nw,
            certified,
        };
        for (b, list) in per_block.into_iter().enumerate() {
            if !list.is_empty() {
                g.tris.extend(list);
                g.start.push(g.tris.len() as u32);
                g.block_of.push(b as u32);
            }
        }
        for (t, _) in active.iter().enumerate().filter(|(_, &a)| a) {
            if !cells.owns(t) {
                g.tris.push(t as u32);
                g.start.push(g.tris.len() as u32);
            }
        }
        g
    }

    /// Number of items.
    pub(super) fn len(&self) -> usize {
        self.start.len() - 1
    }

    /// The triangles of item `k`.
    pub(super) fn tris(&self, k: u32) -> &[u32] {
        &self.tris[self.start[k as usize] as usize..self.start[k as usize + 1] as usize]
    }

    /// Whether no pair of triangles with one in item `x` and the other in item `y`
    /// (`x == y`: two of its own) needs a test: both are blocks of one certified window.
    pub(super) fn cleared(&self, x: u32, y: u32) -> bool {
        let (Some(&bx), Some(&by)) = (self.block_of.get(x as usize), self.block_of.get(y as usize))
        else {
            return false;
        };
        let nbv = self.nb[1];
        let (x, y) = (bx as usize, by as usize);
        let [(xi, yi), (xj, yj)] = [(x / nbv, y / nbv), (x % nbv, y % nbv)];
        // Windows holding both: starts from max - 1 to min, within range.
        let starts = |a: usize, b: usize, n: usize| {
            let (lo, hi) = (a.min(b), a.max(b));
            hi.saturating_sub(1)..=lo.min(n - 1)
        };
        if xi.abs_diff(yi) > 1 || xj.abs_diff(yj) > 1 {
            return false;
        }
        starts(xi, yi, self.nw[0])
            .any(|wi| starts(xj, yj, self.nw[1]).any(|wj| self.certified[wi * self.nw[1] + wj]))
    }

    /// Windows certified, of all windows (for tests and benchmarks).
    #[cfg(test)]
    pub(super) fn certified_share(&self) -> (usize, usize) {
        (
            self.certified.iter().filter(|&&c| c).count(),
            self.certified.len(),
        )
    }
}

/// The cells of window `(wi, wj)`: columns and rows of cells.
fn window_cells(
    wi: usize,
    wj: usize,
    nb: [usize; 2],
    nu: usize,
    nv: usize,
) -> [std::ops::Range<usize>; 2] {
    let span = |w: usize, n: usize, cells: usize| w * BLOCK..((w + 2).min(n) * BLOCK).min(cells);
    [span(wi, nb[0], nu - 1), span(wj, nb[1], nv - 1)]
}

/// Which triangles belong to which grid cell.
struct Cells {
    nv: usize,
    /// Per cell: triangles counted in units of [`ONE`], left-out corners in the low bits.
    tally: Vec<u32>,
    /// Per cell: its (first two) triangles.
    tri: Vec<[u32; 2]>,
    /// Per triangle: whether a complete cell owns it.
    owned: Vec<bool>,
}

impl Cells {
    /// Tallies the triangles of each cell, in parallel: each triangle adds itself to
    /// its cell atomically; a complete cell's two triangles are then put in order, so
    /// the result does not depend on the thread count.
    fn tally(mesh: &TriMesh, active: &[bool], grid: &GridLayout) -> Cells {
        use std::sync::atomic::{AtomicBool, AtomicU32, Ordering::Relaxed};
        let (nu, nv) = (grid.us.len(), grid.vs.len());
        let n_cells = (nu - 1) * (nv - 1);
        // The grid point of each vertex (u32::MAX: none).
        let point: Vec<u32> = match grid.ids {
            Some(map) => {
                let mut point = vec![u32::MAX; mesh.vertices.len()];
                for (g, &v) in map.iter().enumerate() {
                    if v != u32::MAX {
                        point[v as usize] = g as u32;
                    }
                }
                point
            }
            None => (0..mesh.vertices.len() as u32)
                .map(|v| if (v as usize) < nu * nv { v } else { u32::MAX })
                .collect(),
        };
        // The cell of a triangle whose corners are three corners of one cell, and the
        // corner it leaves out (as a bit).
        let cell_of = |t: usize, tri: &[u32; 3]| -> Option<(usize, u32)> {
            let g = tri.map(|v| point[v as usize]);
            if !active[t] || g.contains(&u32::MAX) {
                return None;
            }
            let ij = g.map(|g| (g as usize / nv, g as usize % nv));
            let i0 = ij.iter().map(|p| p.0).min()?;
            let j0 = ij.iter().map(|p| p.1).min()?;
            let mut seen = 0u32;
            for (i, j) in ij {
                let corner = match (i - i0, j - j0) {
                    (0, 0) => 0,
                    (1, 0) => 1,
                    (1, 1) => 2,
                    (0, 1) => 3,
                    _ => return None,
                };
                seen |= 1 << corner;
            }
            // Three distinct corners (active triangles have distinct vertices).
            let left_out = 0b1111 & !seen;
            (i0 + 1 < nu && j0 + 1 < nv && left_out.count_ones() == 1)
                .then_some((i0 * (nv - 1) + j0, left_out))
        };
        let tally: Vec<AtomicU32> = (0..n_cells).map(|_| AtomicU32::new(0)).collect();
        let slots: Vec<[AtomicU32; 2]> = (0..n_cells)
            .map(|_| [AtomicU32::new(u32::MAX), AtomicU32::new(u32::MAX)])
            .collect();
        mesh.triangles.par_iter().enumerate().for_each(|(t, tri)| {
            if let Some((c, left_out)) = cell_of(t, tri) {
                // A complete cell sees counts 0 then 1 here (its corner bits differ).
                let k = (tally[c].fetch_add(ONE + left_out, Relaxed) / ONE) as usize;
                if k < 2 {
                    slots[c][k].store(t as u32, Relaxed);
                }
            }
        });
        let tally: Vec<u32> = tally.into_iter().map(AtomicU32::into_inner).collect();
        let owned: Vec<AtomicBool> = (0..mesh.triangles.len())
            .map(|_| AtomicBool::new(false))
            .collect();
        let tri: Vec<[u32; 2]> = slots
            .into_par_iter()
            .enumerate()
            .map(|(c, [a, b])| {
                let (a, b) = (a.into_inner(), b.into_inner());
                if complete(tally[c]) {
                    owned[a as usize].store(true, Relaxed);
                    owned[b as usize].store(true, Relaxed);
                }
                [a.min(b), a.max(b)]
            })
            .collect();
        Cells {
            nv,
            tally,
            tri,
            owned: owned.into_iter().map(AtomicBool::into_inner).collect(),
        }
    }

    /// Exactly two triangles forming one of the cell's diagonal splits.
    fn complete(&self, c: usize) -> bool {
        complete(self.tally[c])
    }

    fn owns(&self, t: usize) -> bool {
        self.owned[t]
    }

    /// Whether the window of `cells` (columns, rows) is certified (module docs), with
    /// `J0` the Jacobian of the bilinear map through the window's corner vertices (any
    /// fixed `J0` serves the argument; this one needs no pass of its own).
    fn certify(
        &self,
        mesh: &TriMesh,
        grid: &GridLayout,
        cells: [std::ops::Range<usize>; 2],
    ) -> bool {
        let nv = self.nv;
        let [cols, rows] = cells;
        if cols.is_empty() || rows.is_empty() {
            return false;
        }
        // Every corner of a complete cell is a vertex; the window's cells are checked
        // complete before any corner is read.
        for ci in cols.clone() {
            for cj in rows.clone() {
                if !self.complete(ci * (nv - 1) + cj) {
                    return false;
                }
            }
        }
        let p = |i: usize, j: usize| {
            let v = grid.vertex(i * nv + j).unwrap_or(0);
            mesh.vertices[v as usize].coords
        };
        let (i0, i1, j0, j1) = (cols.start, cols.end, rows.start, rows.end);
        let (du, dv) = (grid.us[i1] - grid.us[i0], grid.vs[j1] - grid.vs[j0]);
        let ju = (p(i1, j0) + p(i1, j1) - p(i0, j0) - p(i0, j1)) / (2.0 * du);
        let jv = (p(i0, j1) + p(i1, j1) - p(i0, j0) - p(i1, j0)) / (2.0 * dv);
        // C = J0^T J0 and its inverse.
        let (c00, c01, c11) = (ju.dot(&ju), ju.dot(&jv), jv.dot(&jv));
        let det = c00 * c11 - c01 * c01;
        if !(det > 0.0) || !det.is_finite() {
            return false;
        }
        let (k00, k01, k11) = (c11 / det, -c01 / det, c00 / det);
        // |(J - J0) C^(-1/2)|_F^2 for J = [a, b] (columns along u and v).
        let within = |a: Vector3<f64>, b: Vector3<f64>| {
            let (x, y) = (a - ju, b - jv);
            x.dot(&x) * k00 + 2.0 * x.dot(&y) * k01 + y.dot(&y) * k11 <= CERTIFY
        };
        for ci in cols {
            let du = grid.us[ci + 1] - grid.us[ci];
            for cj in rows.clone() {
                let c = ci * (nv - 1) + cj;
                let dv = grid.vs[cj + 1] - grid.vs[cj];
                let (a, b) = (p(ci, cj), p(ci + 1, cj));
                let (c_, d) = (p(ci + 1, cj + 1), p(ci, cj + 1));
                // The two triangles' Jacobians (edge vectors over parameter steps).
                let (bottom, top) = ((b - a) / du, (c_ - d) / du);
                let (left, right) = ((d - a) / dv, (c_ - b) / dv);
                let ok = if self.tally[c] & SPLIT_AC == SPLIT_AC {
                    // a b c and a c d.
                    within(bottom, right) && within(top, left)
                } else {
                    // a b d and b c d.
                    within(bottom, left) && within(top, right)
                };
                if !ok {
                    return false;
                }
            }
        }
        true
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::check::intersections::self_intersections;
    use nalgebra::Point3;
    use std::f64::consts::TAU;

    /// An open tube on a grid (`nu` columns around, the last one back at the first
    /// angle's neighbour, not closed: column `nu - 1` stops short of column 0), radius
    /// `r(i, j)`, `nv` rows along z, split along the shorter diagonal; vertex
    /// `i * nv + j`.
    fn tube(
        nu: usize,
        nv: usize,
        r: impl Fn(usize, usize) -> f64,
    ) -> (TriMesh, Vec<f64>, Vec<f64>) {
        let us: Vec<f64> = (0..nu).map(|i| i as f64 / nu as f64).collect();
        let vs: Vec<f64> = (0..nv).map(|j| j as f64 / (nv - 1) as f64).collect();
        let mut m = TriMesh::new();
        for (i, u) in us.iter().enumerate() {
            for (j, v) in vs.iter().enumerate() {
                let th = TAU * u * 0.9;
                let rr = r(i, j);
                m.push_vertex(Point3::new(rr * th.cos(), rr * th.sin(), 3.0 * v));
            }
        }
        for i in 0..nu - 1 {
            for j in 0..nv - 1 {
                let q = [
                    i * nv + j,
                    (i + 1) * nv + j,
                    (i + 1) * nv + j + 1,
                    i * nv + j + 1,
                ]
                .map(|v| v as u32);
                if (i + j) % 2 == 0 {
                    m.triangles.push([q[0], q[1], q[2]]);
                    m.triangles.push([q[0], q[2], q[3]]);
                } else {
                    m.triangles.push([q[0], q[1], q[3]]);
                    m.triangles.push([q[1], q[2], q[3]]);
                }
            }
        }
        (m, us, vs)
    }

    /// The layout of a tube's grid (its points are its first vertices, in order).
    fn layout<'a>(us: &'a [f64], vs: &'a [f64]) -> GridLayout<'a> {
        GridLayout { us, vs, ids: None }
    }

    /// The general search (no certificate; checked against an exhaustive search in
    /// `intersections`).
    fn general(m: &TriMesh) -> Vec<[usize; 2]> {
        let active = vec![true; m.len()];
        self_intersections(m, &active, None)
    }

    #[test]
    fn a_smooth_grid_is_certified_and_the_search_finds_nothing() {
        let (m, us, vs) = tube(80, 40, |_, _| 1.0);
        let active = vec![true; m.len()];
        let grid = layout(&us, &vs);
        let g = Grouping::on_grid(&m, &active, &grid);
        let (ok, all) = g.certified_share();
        assert_eq!(ok, all, "every window of a smooth tube is certified");
        // Blocks only: 20 x 10 blocks of 4 x 4 cells (19 columns of cells in the last).
        assert_eq!(g.len(), 20 * 10);
        assert!(self_intersections(&m, &active, Some(&grid)).is_empty());
    }

    #[test]
    fn a_fold_inside_a_window_is_not_certified_and_is_found() {
        // Two vertices of one row, two columns apart, swapped: their triangles become
        // chords of the tube that cross its neighbouring chords.
        let (mut m, us, vs) = tube(40, 20, |_, _| 1.0);
        m.vertices.swap(10 * 20 + 10, 12 * 20 + 10);
        let active = vec![true; m.len()];
        let grid = layout(&us, &vs);
        let g = Grouping::on_grid(&m, &active, &grid);
        let (ok, all) = g.certified_share();
        assert!(ok > 0 && ok < all, "{ok} of {all}");
        let found = self_intersections(&m, &active, Some(&grid));
        assert!(!found.is_empty());
        assert_eq!(found, general(&m));
    }

    #[test]
    fn far_apart_cells_that_cross_are_found() {
        // The radius grows with the column so that the tube's last columns pass through
        // its first ones (a spiral wall cut by its own start).
        let (m, us, vs) = tube(60, 12, |i, _| 1.0 + 0.01 * i as f64);
        let mut m = m;
        // Wrap the spiral past a full turn: angles up to 1.2 turns.
        for i in 0..60 {
            for j in 0..12 {
                let p = &mut m.vertices[i * 12 + j];
                let r = (p.x * p.x + p.y * p.y).sqrt();
                let th = TAU * 1.2 * i as f64 / 60.0;
                let rr = if i > 45 {
                    1.0 + 0.3 * ((i - 45) as f64 / 14.0) - 0.2
                } else {
                    r
                };
                *p = Point3::new(rr * th.cos(), rr * th.sin(), p.z);
            }
        }
        let active = vec![true; m.len()];
        let grid = layout(&us, &vs);
        let (ok, all) = Grouping::on_grid(&m, &active, &grid).certified_share();
        assert!(ok > 0 && ok < all, "{ok} of {all}");
        let found = self_intersections(&m, &active, Some(&grid));
        assert!(!found.is_empty());
        assert_eq!(found, general(&m));
    }

    #[test]
    fn a_layout_that_does_not_fit_changes_nothing() {
        let (m, us, vs) = tube(30, 10, |i, j| 1.0 + 0.05 * ((i * 7 + j * 3) % 5) as f64);
        let active = vec![true; m.len()];
        // Rows and columns swapped: no triangle is a cell of this layout.
        let wrong = layout(&vs, &us);
        assert_eq!(self_intersections(&m, &active, Some(&wrong)), general(&m));
        // Too many vertices claimed: ignored.
        let long: Vec<f64> = (0..100).map(|k| k as f64).collect();
        let g = Grouping::on_grid(&m, &active, &layout(&long, &vs));
        assert_eq!(g.len(), m.len());
        let _ = us;
    }
}
