//! A proven upper bound of the distance from the exact surface to the mesh, per grid
//! cell, from surface samples plus a margin from second derivatives.
//!
//! **The bound.** Take one grid cell `[u0, u1] x [v0, v1]` (sides `du`, `dv`) with its
//! two mesh triangles. Sample the surface `S` on a `k x k` sub-grid of the cell and split
//! each sub-square into two sub-triangles (along either diagonal). On a sub-triangle with corners `y_1, y_2, y_3`
//! (legs `du/k`, `dv/k`), write `S = L + E` with `L` the linear interpolant of `S` at the
//! corners, and let `T` be either of the cell's two mesh triangles. Then:
//!
//! * the distance to the convex set `T` is a convex function, so
//!   `dist(L(x), T) <= max_i dist(S(y_i), T)`;
//! * by Taylor's theorem with integral remainder at `x`, with `M_..` bounds of `|S_uu|`,
//!   `|S_uv|`, `|S_vv|` on the cell and any `α > 0`,
//!   `|D²S[w, w]| <= Q(w) = A w_u² + B w_v²` where `A = M_uu + α M_uv` and
//!   `B = M_vv + M_uv / α` (from `2|w_u w_v| <= α w_u² + w_v² / α`), so
//!   `|E(x)| <= ½ Σ λ_i Q(y_i - x) = ½ (Σ λ_i Q(y_i) - Q(x))`, the linear interpolation
//!   error of `Q`, which on a right triangle with legs `δu`, `δv` is at most
//!   `(A δu² + B δv²) / 4`. With `α = dv / du` this is
//!   `|E| <= (M_uu du² + 2 M_uv du dv + M_vv dv²) / (8 k²)`.
//!
//! Every point `S(x)` of the cell's surface is `L(x) + E(x)` for the sub-triangle holding
//! `x`, and `T` is part of the mesh, so it lies within
//! `max over sub-triangles of (min over T of max over corners of dist(S(y_i), T))`
//! `+ (M_uu du² + 2 M_uv du dv + M_vv dv²) / (8 k²)` of the mesh. The `M` bounds
//! come from the control points of the derivative surfaces
//! ([`crate::loft::DerivativeBounds`]), so the bound holds for every point of the cell,
//! not just the sampled ones; `k = 1` (no samples) gives the pure curvature bound. The
//! trailing-edge face (the ruled surface between the curves `u = 1` and `u = 0`, a
//! degree-1 by degree-`q` B-spline) and its strip of triangles are bounded the same way.
//! The planar caps lie in their planes; they differ from the exact end faces only by the
//! slivers between boundary chords and boundary curves, which the cells along the ends
//! already bound.
//!
//! A cell is certified by the cheapest bound that meets the target: the curvature bound
//! first, then samples with `k = 2, 4, 8`.

use super::{cell_split, closest_on_triangle};
use crate::loft::{Basis, DerivativeBounds, Skin};
use nalgebra::{Point3, Vector3};
use rayon::prelude::*;

/// Finest sub-grid the tessellation certifies with (samples per cell side).
pub(crate) const K_MAX: usize = 8;
/// Finest sub-grid [`max_deviation`] uses to tighten the bound.
const K_REPORT: usize = 16;

/// Bounds the cells of a skin and of its trailing-edge face.
pub(crate) struct Certifier<'a> {
    skin: &'a Skin,
    parts: std::sync::Arc<Derivatives>,
}

/// The second-derivative bounds of a skin and of its trailing-edge face (computed once
/// per skin: the tessellation keeps them for the deviation measurement).
#[derive(Debug)]
pub(crate) struct Derivatives {
    bounds: DerivativeBounds,
    te: Option<(Skin, DerivativeBounds)>,
}

/// The trailing-edge face as a surface: ruled (degree 1) from the curve `u = 1` (at
/// `s = 0`) to the curve `u = 0` (at `s = 1`), the order of the mesh strip's corners.
/// `None` when the trailing edge is sharp.
pub(crate) fn trailing_edge_face(skin: &Skin) -> Option<Skin> {
    if skin.sharp_trailing_edge() {
        return None;
    }
    Some(Skin {
        degree_u: 1,
        degree_v: skin.degree_v,
        knots_u: vec![0.0, 0.0, 1.0, 1.0],
        knots_v: skin.knots_v.clone(),
        control: vec![
            skin.control[skin.control.len() - 1].clone(),
            skin.control[0].clone(),
        ],
        u_le: 0.5,
    })
}

impl<'a> Certifier<'a> {
    pub(crate) fn new(skin: &'a Skin) -> Self {
        let te = trailing_edge_face(skin).map(|f| {
            let b = f.derivative_bounds();
            (f, b)
        });
        Certifier {
            skin,
            parts: std::sync::Arc::new(Derivatives {
                bounds: skin.derivative_bounds(),
                te,
            }),
        }
    }

    /// The certifier of `skin` reusing bounds computed for it before, if any.
    fn reusing(skin: &'a Skin, known: Option<&KnownBounds>) -> Self {
        match known.and_then(|k| k.derivatives.clone()) {
            Some(parts) => Certifier { skin, parts },
            None => Certifier::new(skin),
        }
    }

    /// Its derivative bounds, for [`KnownBounds`].
    pub(crate) fn derivatives(&self) -> std::sync::Arc<Derivatives> {
        self.parts.clone()
    }

    /// Certified bound of grid cell `(i, j)` (`points` as in [`super::grid::Grid`]), the
    /// largest distance a sample of it has to its triangles (0 when none was taken), and
    /// which of its directions (`u`, `v`) to halve when the bound is above `target`:
    /// those whose curvature terms carry at least a third of the bound's curvature term.
    ///
    /// With `give_up`, a cell stops sampling once no finer sub-grid can meet `target`
    /// (see [`Cell::certify`]): it will be split anyway, and its bound is the best found
    /// so far (proven, not the tightest).
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn cell(
        &self,
        us: &[f64],
        vs: &[f64],
        points: &[Point3<f64>],
        spans: &Spans,
        i: usize,
        j: usize,
        target: f64,
        give_up: bool,
    ) -> (f64, f64, [bool; 2]) {
        let cell = self.skin_cell(us, vs, points, spans, i, j);
        let r = cell.certify(target, 2, K_MAX, give_up);
        (r.0, r.1, cell.directions())
    }

    /// Certified bound of row `j` of the trailing-edge strip and its largest sampled
    /// distance (both 0 when the trailing edge is sharp).
    pub(crate) fn strip_row(
        &self,
        us: &[f64],
        vs: &[f64],
        points: &[Point3<f64>],
        j: usize,
        target: f64,
    ) -> (f64, f64) {
        self.strip_cell(us, vs, points, j)
            .map_or((0.0, 0.0), |c| c.certify(target, 2, K_MAX, false))
    }

    /// The knot spans each grid interval of `us` and of `vs` touches (found once per
    /// grid, not per cell).
    pub(crate) fn spans(&self, us: &[f64], vs: &[f64]) -> Spans {
        let of = |dir: usize, t: &[f64]| {
            t.windows(2)
                .map(|w| self.parts.bounds.span_range(dir, w[0], w[1]))
                .collect()
        };
        Spans {
            u: of(0, us),
            v: of(1, vs),
        }
    }

    /// Skin cell `(i, j)` with the mesh corners over it.
    fn skin_cell(
        &self,
        us: &[f64],
        vs: &[f64],
        points: &[Point3<f64>],
        spans: &Spans,
        i: usize,
        j: usize,
    ) -> Cell<'a> {
        let nv = vs.len();
        Cell {
            skin: self.skin,
            u: [us[i], us[i + 1]],
            v: [vs[j], vs[j + 1]],
            corners: [
                points[i * nv + j],
                points[(i + 1) * nv + j],
                points[(i + 1) * nv + j + 1],
                points[i * nv + j + 1],
            ],
            m: self
                .parts
                .bounds
                .over_spans(spans.u[i].clone(), spans.v[j].clone()),
        }
    }

    fn strip_cell<'b>(
        &'b self,
        us: &[f64],
        vs: &[f64],
        points: &[Point3<f64>],
        j: usize,
    ) -> Option<Cell<'b>> {
        let (face, bounds) = self.parts.te.as_ref()?;
        let (nu, nv) = (us.len(), vs.len());
        Some(Cell {
            skin: face,
            m: bounds.over(0.0, 1.0, vs[j], vs[j + 1]),
            u: [0.0, 1.0],
            v: [vs[j], vs[j + 1]],
            corners: [
                points[(nu - 1) * nv + j],
                points[j],
                points[j + 1],
                points[(nu - 1) * nv + j + 1],
            ],
        })
    }
}

/// The knot spans (0-based, see [`DerivativeBounds::span_range`]) each interval of a
/// grid's `us` and `vs` touches.
pub(crate) struct Spans {
    u: Vec<std::ops::RangeInclusive<usize>>,
    v: Vec<std::ops::RangeInclusive<usize>>,
}

/// One cell of a surface with the mesh corners over it.
struct Cell<'a> {
    skin: &'a Skin,
    u: [f64; 2],
    v: [f64; 2],
    /// Mesh vertices at `(u0, v0)`, `(u1, v0)`, `(u1, v1)`, `(u0, v1)`.
    corners: [Point3<f64>; 4],
    /// `[M_uu, M_uv, M_vv]`: bounds of the second derivatives over the cell
    /// ([`DerivativeBounds`]).
    m: [f64; 3],
}

impl Cell<'_> {
    /// The curvature term `(M_uu du² + 2 M_uv du dv + M_vv dv²) / 8` of the bound
    /// (`k = 1`).
    fn curvature_term(&self) -> f64 {
        let [muu, muv, mvv] = self.m;
        let (du, dv) = (self.u[1] - self.u[0], self.v[1] - self.v[0]);
        (muu * du * du + 2.0 * muv * du * dv + mvv * dv * dv) / 8.0
    }

    /// Which directions dominate the curvature term: `[u, v]`.
    fn directions(&self) -> [bool; 2] {
        let [muu, muv, mvv] = self.m;
        let (du, dv) = (self.u[1] - self.u[0], self.v[1] - self.v[0]);
        let (tu, tv) = (muu * du * du + muv * du * dv, mvv * dv * dv + muv * du * dv);
        [tu >= 0.5 * tv, tv >= 0.5 * tu]
    }

    /// The smallest bound found, trying the curvature bound and then sub-grids of `k`
    /// from `k_from` doubling to `k_to` until one meets `target`; also the largest
    /// distance from a sample to the mesh (a lower bound of the cell's deviation; 0 when
    /// no samples were taken).
    ///
    /// With `give_up`, stops as soon as no finer sub-grid up to `k_to` can meet `target`:
    /// a sub-grid's sampled part is at least the largest distance of any sample taken so
    /// far (its samples include the coarser ones'), so its bound is at least that plus
    /// `raw / k_to²`. The bound returned is then the best found so far: still a proven
    /// bound, above `target`.
    fn certify(&self, target: f64, k_from: usize, k_to: usize, give_up: bool) -> (f64, f64) {
        let raw = self.curvature_term();
        let mut best = raw;
        let mut lower: f64 = 0.0;
        let mut k = k_from;
        while best > target && k <= k_to {
            let (s, l) = self.sampled(k);
            lower = lower.max(l);
            best = best.min(s + raw / (k * k) as f64);
            if give_up && lower + raw / (k_to * k_to) as f64 > target {
                break;
            }
            k *= 2;
        }
        (best, lower)
    }

    /// The sampled part of the bound on a `k x k` sub-grid: the largest, over the
    /// sub-triangles, of the best of the three corner measures of the module docs.
    fn sampled(&self, k: usize) -> (f64, f64) {
        let c = &self.corners;
        let split = cell_split(&c[0], &c[1], &c[2], &c[3]);
        let hinge = Hinge::of(c, split);
        let s = self.skin;
        let at = |knots: &[f64], p: usize, r: [f64; 2], a: usize| {
            let t = if a == k {
                r[1]
            } else {
                r[0] + (r[1] - r[0]) * a as f64 / k as f64
            };
            Basis::at(knots, p, t)
        };
        let vb: Vec<Basis> = (0..=k)
            .map(|b| at(&s.knots_v, s.degree_v, self.v, b))
            .collect();
        let mut samples = Vec::with_capacity((k + 1) * (k + 1));
        for a in 0..=k {
            let bu = at(&s.knots_u, s.degree_u, self.u, a);
            for (b, bv) in vb.iter().enumerate() {
                let q = match (a == 0, a == k, b == 0, b == k) {
                    (true, _, true, _) => c[0],
                    (_, true, true, _) => c[1],
                    (_, true, _, true) => c[2],
                    (true, _, _, true) => c[3],
                    _ => s.eval_basis(&bu, bv),
                };
                samples.push(Sample::new(&q, c, split, &hinge));
            }
        }
        let lower = samples.iter().fold(0.0, |m: f64, s| m.max(s.d[s.side]));
        let at_s = |(a, b): (usize, usize)| &samples[a * (k + 1) + b];
        let mut worst: f64 = 0.0;
        for a in 0..k {
            for b in 0..k {
                // Either diagonal covers the sub-square; take the better one.
                let (p00, p10, p11, p01) = ((a, b), (a + 1, b), (a + 1, b + 1), (a, b + 1));
                let part = |t: [(usize, usize); 3]| hinge.measure(t.map(at_s));
                let ac = part([p00, p10, p11]).max(part([p00, p11, p01]));
                let bd = part([p00, p10, p01]).max(part([p10, p11, p01]));
                worst = worst.max(ac.min(bd));
            }
        }
        (worst, lower)
    }
}

/// The edge two cell triangles share, with what is needed to bound the distance from a
/// triangle spanning it to the mesh (see the module docs).
struct Hinge {
    origin: Point3<f64>,
    /// Unit direction of the shared edge.
    dir: Vector3<f64>,
    /// `|n1 - n2| = 2 sin(θ / 2)` for the unit normals and the fold angle `θ`.
    fold: f64,
    /// True when the two triangles unfolded into one plane form a convex quadrilateral.
    convex: bool,
}

impl Hinge {
    fn of(c: &[Point3<f64>; 4], split: [[usize; 3]; 2]) -> Hinge {
        let [t1, t2] = split;
        // Shared corners, and the corner of each triangle off the shared edge.
        let (e0, e1, w1, w2) = if t1 == [0, 1, 2] {
            (c[0], c[2], c[1], c[3])
        } else {
            (c[1], c[3], c[0], c[2])
        };
        let normal = |t: [usize; 3]| {
            (c[t[1]] - c[t[0]])
                .cross(&(c[t[2]] - c[t[0]]))
                .try_normalize(0.0)
        };
        let edge = e1 - e0;
        let len = edge.norm();
        let (Some(n1), Some(n2), Some(dir)) = (normal(t1), normal(t2), edge.try_normalize(0.0))
        else {
            return Hinge {
                origin: e0,
                dir: Vector3::zeros(),
                fold: 0.0,
                convex: false,
            };
        };
        // Unfolded: the shared edge on the x axis, each wing at its distance from the
        // edge on its own side; convex when the segment between the wings crosses the
        // edge between its ends.
        let (x1, x2) = ((w1 - e0).dot(&dir), (w2 - e0).dot(&dir));
        let (r1, r2) = ((w1 - e0).cross(&dir).norm(), (w2 - e0).cross(&dir).norm());
        let convex = r1 + r2 > 0.0 && {
            let x = x1 + (x2 - x1) * r1 / (r1 + r2);
            (0.0..=len).contains(&x)
        };
        Hinge {
            origin: e0,
            dir,
            fold: (n1 - n2).norm(),
            convex,
        }
    }

    /// Distance from `p` to the line of the shared edge.
    fn reach(&self, p: &Point3<f64>) -> f64 {
        (p - self.origin).cross(&self.dir).norm()
    }

    /// The bound for one sub-triangle from its corner samples: the best of "all on the
    /// first triangle", "all on the second", and "each on its nearer triangle, plus the
    /// hinge gap".
    fn measure(&self, corners: [&Sample; 3]) -> f64 {
        let mut m = [0.0f64; 3];
        let mut reach = [0.0f64; 2]; // largest reach of the samples nearer each triangle
        let mut sides = [false; 2];
        for s in corners {
            m[0] = m[0].max(s.d[0]);
            m[1] = m[1].max(s.d[1]);
            m[2] = m[2].max(s.d[s.side]);
            reach[s.side] = reach[s.side].max(s.reach);
            sides[s.side] = true;
        }
        let mixed = if !(sides[0] && sides[1]) {
            m[2]
        } else if self.convex {
            m[2] + 2.0 * self.fold * reach[0].min(reach[1])
        } else {
            f64::INFINITY
        };
        m[0].min(m[1]).min(mixed)
    }
}

/// One surface sample against the two cell triangles.
struct Sample {
    /// Distances to the two triangles.
    d: [f64; 2],
    /// The nearer triangle (0 or 1).
    side: usize,
    /// Distance of its nearest point on that triangle from the shared edge's line.
    reach: f64,
}

impl Sample {
    fn new(q: &Point3<f64>, c: &[Point3<f64>; 4], split: [[usize; 3]; 2], hinge: &Hinge) -> Sample {
        let near = split.map(|t| closest_on_triangle(q, &c[t[0]], &c[t[1]], &c[t[2]]));
        let d = near.map(|p| (q - p).norm());
        let side = usize::from(d[1] < d[0]);
        Sample {
            d,
            side,
            reach: hinge.reach(&near[side]),
        }
    }
}

/// A proven upper bound of the distance from the skin (and the trailing-edge face, when
/// blunt) to the grid mesh on `us x vs`, mm (see the module docs for the method).
///
/// Every cell is first bounded with a `k x k` sub-grid (`k` at least 2); the cells whose
/// bound is still above the largest sampled distance anywhere are refined with finer
/// sub-grids (up to 16 x 16), so the result is close to the true largest distance: the
/// margin over the samples shrinks as `1 / k²`. An independent sampling of the surface
/// can never find a larger distance.
pub fn max_deviation(skin: &Skin, us: &[f64], vs: &[f64], k: usize) -> f64 {
    mesh_deviation(skin, us, vs, &super::grid::eval_grid(skin, us, vs), k)
}

/// [`max_deviation`] for the mesh whose grid vertices are `points` (`points[i *
/// vs.len() + j]`, at `(us[i], vs[j])` or moved onto the vertex it merged into, see
/// [`super::merge_distance`]): each cell is bounded against the triangles on its actual
/// corners. A cell collapsed by merging is bounded against its degenerate triangles,
/// which are edges of the neighbouring triangles, so the bound holds for the mesh.
pub fn mesh_deviation(
    skin: &Skin,
    us: &[f64],
    vs: &[f64],
    points: &[Point3<f64>],
    k: usize,
) -> f64 {
    measure(skin, us, vs, points, k, None)
}

/// Bounds already certified for the cells of a grid: per cell (skin cells `u` major,
/// then the trailing-edge strip's rows) a proven bound against the cell's mesh
/// triangles and the largest distance a sample of the cell had to them (rounded down to
/// single precision, so still reached).
#[derive(Debug, Clone, Default)]
pub struct KnownBounds {
    /// Per cell, a proven bound, mm.
    pub cells: Vec<f64>,
    /// Per cell, the largest sampled distance, mm.
    pub lower: Vec<f32>,
    /// The skin's derivative bounds the cells were certified with.
    pub(crate) derivatives: Option<std::sync::Arc<Derivatives>>,
}

impl KnownBounds {
    /// Forgets cell `c` (its triangles changed): it will be bounded again.
    pub fn forget(&mut self, c: usize) {
        if let (Some(b), Some(l)) = (self.cells.get_mut(c), self.lower.get_mut(c)) {
            *b = f64::INFINITY;
            *l = 0.0;
        }
    }

    /// The largest sampled distance over the cells, mm.
    pub fn floor(&self) -> f64 {
        self.lower
            .iter()
            .fold(0.0, |m: f64, &l| m.max(f64::from(l)))
    }
}

/// [`mesh_deviation`] using the bounds the tessellation already certified: a cell whose
/// known bound is at most the known floor cannot raise the result (some sample already
/// reaches the floor), so only the other cells are bounded again. Same method and
/// guarantee as [`mesh_deviation`]; less work where most cells were certified well inside
/// the tolerance.
pub fn mesh_deviation_known(
    skin: &Skin,
    us: &[f64],
    vs: &[f64],
    points: &[Point3<f64>],
    k: usize,
    known: &KnownBounds,
) -> f64 {
    measure(skin, us, vs, points, k, Some(known))
}

fn measure(
    skin: &Skin,
    us: &[f64],
    vs: &[f64],
    points: &[Point3<f64>],
    k: usize,
    known: Option<&KnownBounds>,
) -> f64 {
    let k = k.max(2);
    let cert = Certifier::reusing(skin, known);
    let spans = cert.spans(us, vs);
    let (nu, nv) = (us.len(), vs.len());
    // Cells are made on the fly from their index (skin cells column by column, then the
    // trailing-edge strip's rows): a list of them would hold four corners per cell, more
    // than the mesh itself.
    let skin_cells = (nu - 1) * (nv - 1);
    let cell = |c: usize| -> Option<Cell> {
        if c >= skin_cells {
            return cert.strip_cell(us, vs, points, c - skin_cells);
        }
        let (i, j) = (c / (nv - 1), c % (nv - 1));
        Some(cert.skin_cell(us, vs, points, &spans, i, j))
    };
    let cells = skin_cells + nv - 1;
    let known_floor = known.map_or(0.0, KnownBounds::floor);
    let settled =
        |c: usize| known.and_then(|kb| kb.cells.get(c).copied().filter(|&b| b <= known_floor));
    let first: Vec<(f64, f64)> = (0..cells)
        .into_par_iter()
        .map(|c| match settled(c) {
            Some(b) => (b, 0.0),
            None => cell(c).map_or((0.0, 0.0), |c| c.certify(f64::NEG_INFINITY, k, k, false)),
        })
        .collect();
    // The largest distance any sample has to its cell's triangles: no bound can be
    // below it.
    let floor = first.iter().fold(known_floor, |m: f64, b| m.max(b.1));
    first
        .par_iter()
        .enumerate()
        .map(|(c, &(b, _))| match cell(c) {
            Some(c) if b > floor && 2 * k <= K_REPORT => {
                b.min(c.certify(floor, 2 * k, K_REPORT, false).0)
            }
            _ => b,
        })
        .reduce(|| 0.0, f64::max)
}
