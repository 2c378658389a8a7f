//! Choosing the grid: rows and columns by bisection of grid-line chords (phase 1), then
//! every cell certified by the deviation bound of [`super::bound`] (phase 2).
//!
//! Work: phase 1 tests each interval of one direction against every grid line of the
//! other, once (an interval that passed is only tested again against lines added since),
//! so it costs a few curve evaluations per final grid cell; phase 2 certifies each cell
//! once, and after a split only the cells of the split rows and columns again. Both
//! phases run their intervals or cells in parallel and gather results in order.

use super::bound::{Certifier, KnownBounds};
use super::{dist_to_segment, TessellationOptions};
use crate::loft::{eval_curve, Basis, Skin};
use crate::mesh::f32_below;
use nalgebra::Point3;
use rayon::prelude::*;

/// A chosen grid with its evaluated points and certified deviation bound.
pub(crate) struct Grid {
    /// Parameters around the section.
    pub us: Vec<f64>,
    /// Parameters along the span.
    pub vs: Vec<f64>,
    /// Surface points, `points[i * vs.len() + j]` at `(us[i], vs[j])`; the end rows lie
    /// exactly in their cap planes.
    pub points: Vec<Point3<f64>>,
    /// Largest certified bound of the distance from the skin (and the trailing-edge
    /// face) to the mesh on this grid, mm.
    pub deviation: f64,
    /// The certified bound of every cell and the largest sampled distance.
    pub known: KnownBounds,
}

/// Basis values of one direction at the given parameters.
pub(crate) fn bases(skin: &Skin, dir: usize, params: &[f64]) -> Vec<Basis> {
    let (knots, p) = knots(skin, dir);
    params.iter().map(|&t| Basis::at(knots, p, t)).collect()
}

fn knots(skin: &Skin, dir: usize) -> (&[f64], usize) {
    if dir == 0 {
        (&skin.knots_u, skin.degree_u)
    } else {
        (&skin.knots_v, skin.degree_v)
    }
}

/// The surface at every grid node, `u` major, through iso-curves `u = const` (one
/// column at a time, in parallel). The end rows are snapped into their cap planes (the
/// clamped end control points share one `z`; this removes the rounding of the basis sum).
pub(crate) fn eval_grid(skin: &Skin, us: &[f64], vs: &[f64]) -> Vec<Point3<f64>> {
    let ub = bases(skin, 0, us);
    let vb = bases(skin, 1, vs);
    let nv = vs.len();
    let (z0, z1) = (
        skin.control[0][0].z,
        skin.control[0][skin.control[0].len() - 1].z,
    );
    let mut points = vec![Point3::origin(); us.len() * nv];
    points
        .par_chunks_mut(nv)
        .zip(ub.par_iter())
        .for_each(|(column, bu)| {
            let c = skin.iso_u_control(bu);
            for (p, bv) in column.iter_mut().zip(&vb) {
                *p = eval_curve(&c, bv);
            }
            column[0].z = z0;
            column[nv - 1].z = z1;
        });
    points
}

/// Uniform subdivision of `[a, b]` into `k` intervals (end points included).
pub(crate) fn uniform(a: f64, b: f64, k: usize) -> Vec<f64> {
    (0..=k).map(|i| a + (b - a) * i as f64 / k as f64).collect()
}

/// The parameter on the opposite surface at about the same chord station: maps the
/// upper side `[0, u_le]` linearly onto the lower side `[1, u_le]` and back (trailing
/// edge to trailing edge, leading edge to leading edge).
fn mirror_u(u: f64, u_le: f64) -> f64 {
    if u <= u_le {
        1.0 - (1.0 - u_le) * u / u_le
    } else {
        u_le * (1.0 - u) / (1.0 - u_le)
    }
}

/// Phase 1 for one direction: the intervals of `params` against the grid lines of the
/// other direction (given as iso-curve control points).
struct Refiner<'a> {
    skin: &'a Skin,
    dir: usize,
    /// Iso-curves of every line of the other direction.
    lines: &'a [Vec<Point3<f64>>],
    /// Indices of the lines added since the last refinement of this direction.
    new_lines: &'a [usize],
    tol: f64,
    max_depth: u32,
}

impl Refiner<'_> {
    /// True when the chord of `[t0, t1]` strays more than the tolerance from the curve
    /// on one of the lines (tested at the quarter points); aft of the leading-edge
    /// region a chord must also stay well inside the local thickness, or near a thin
    /// trailing edge it could cut through the opposite surface.
    fn needs_split(&self, t0: f64, t1: f64, only_new: bool) -> bool {
        let (knots, p) = knots(self.skin, self.dir);
        let at = |t: f64| Basis::at(knots, p, t);
        let (b0, b1) = (at(t0), at(t1));
        let tests = [0.25, 0.5, 0.75].map(|f| at(t0 + f * (t1 - t0)));
        let mid = 0.5 * (t0 + t1);
        let u_le = self.skin.u_le;
        let mirror = (self.dir == 0 && (mid - u_le).abs() > 0.25 * u_le.min(1.0 - u_le))
            .then(|| at(mirror_u(mid, u_le)));
        let fails = |c: &Vec<Point3<f64>>| {
            let (a, b) = (eval_curve(c, &b0), eval_curve(c, &b1));
            let limit = match &mirror {
                Some(mb) => self
                    .tol
                    .min(0.25 * (eval_curve(c, &tests[1]) - eval_curve(c, mb)).norm()),
                None => self.tol,
            };
            tests
                .iter()
                .any(|tb| dist_to_segment(&eval_curve(c, tb), &a, &b) > limit)
        };
        if only_new {
            self.new_lines.iter().any(|&l| fails(&self.lines[l]))
        } else {
            self.lines.iter().any(fails)
        }
    }

    /// Bisects `[t0, t1]` until its pieces pass, pushing the inserted parameters in order.
    fn bisect(&self, t0: f64, t1: f64, depth: u32, only_new: bool, out: &mut Vec<f64>) {
        if depth >= self.max_depth || t1 - t0 < 1e-9 || !self.needs_split(t0, t1, only_new) {
            return;
        }
        let mid = 0.5 * (t0 + t1);
        self.bisect(t0, mid, depth + 1, false, out);
        out.push(mid);
        self.bisect(mid, t1, depth + 1, false, out);
    }

    /// Refined parameters, or `None` when nothing was split. Intervals of a previous
    /// round (`verified`) are tested against the new lines only.
    fn refine(&self, params: &[f64], verified: bool) -> Option<Vec<f64>> {
        let inserted: Vec<Vec<f64>> = params
            .par_windows(2)
            .map(|w| {
                let mut out = Vec::new();
                self.bisect(w[0], w[1], 0, verified, &mut out);
                out
            })
            .collect();
        if inserted.iter().all(Vec::is_empty) {
            return None;
        }
        let mut next =
            Vec::with_capacity(params.len() + inserted.iter().map(Vec::len).sum::<usize>());
        for (t, ins) in params.iter().zip(&inserted) {
            next.push(*t);
            next.extend_from_slice(ins);
        }
        next.push(params[params.len() - 1]);
        Some(next)
    }
}

/// Iso-curves along the lines `params` of direction `dir` (curves in the other
/// direction).
fn iso_curves(skin: &Skin, dir: usize, params: &[f64]) -> Vec<Vec<Point3<f64>>> {
    bases(skin, dir, params)
        .par_iter()
        .map(|b| {
            if dir == 0 {
                skin.iso_u_control(b)
            } else {
                skin.iso_v_control(b)
            }
        })
        .collect()
}

/// Indices of the entries of `all` (sorted) that are not in `old` (sorted, a subset).
fn added(all: &[f64], old: &[f64]) -> Vec<usize> {
    let mut out = Vec::new();
    let mut k = 0;
    for (i, t) in all.iter().enumerate() {
        if k < old.len() && old[k] == *t {
            k += 1;
        } else {
            out.push(i);
        }
    }
    out
}

/// Phase 1: grid lines by chord bisection, alternating directions until both settle
/// (grid lines added in one direction can reveal chord error in the other).
fn chord_grid(skin: &Skin, opts: &TessellationOptions) -> (Vec<f64>, Vec<f64>) {
    let tol = 0.5 * opts.tolerance;
    let mut us = uniform(0.0, skin.u_le, 8);
    us.extend(uniform(skin.u_le, 1.0, 8).into_iter().skip(1));
    let mut vs = uniform(0.0, 1.0, 4);
    // The lines each direction was last verified against.
    let (mut vs_seen, mut us_seen): (Vec<f64>, Vec<f64>) = (Vec::new(), Vec::new());
    for _ in 0..4 {
        let mut changed = false;
        for dir in [0, 1] {
            let (params, other, seen) = if dir == 0 {
                (&mut us, &vs, &mut vs_seen)
            } else {
                (&mut vs, &us, &mut us_seen)
            };
            let new_lines = added(other, seen);
            let verified = !seen.is_empty();
            if verified && new_lines.is_empty() {
                continue;
            }
            let lines = iso_curves(skin, 1 - dir, other);
            let r = Refiner {
                skin,
                dir,
                lines: &lines,
                new_lines: &new_lines,
                tol,
                max_depth: opts.max_depth,
            };
            if let Some(next) = r.refine(params, verified) {
                *params = next;
                changed = true;
            }
            seen.clone_from(other);
        }
        if !changed {
            break;
        }
    }
    (us, vs)
}

/// Midpoints inserted after the flagged intervals; also returns, per new interval, the
/// old interval it copies (`None` for the halves of a split one).
fn split_intervals(params: &[f64], split: &[bool]) -> (Vec<f64>, Vec<Option<usize>>) {
    let mut out = Vec::with_capacity(params.len() * 2);
    let mut from = Vec::with_capacity(params.len() * 2);
    for i in 0..params.len() {
        out.push(params[i]);
        if i + 1 < params.len() {
            if split[i] {
                out.push(0.5 * (params[i] + params[i + 1]));
                from.extend([None, None]);
            } else {
                from.push(Some(i));
            }
        }
    }
    (out, from)
}

/// Chooses the grid: phase 1 (chords), then phase 2: every cell's deviation bound is
/// certified within the tolerance, and the rows and columns of any cell that fails are
/// split, until all pass or `max_depth` rounds have run.
pub(crate) fn grid(skin: &Skin, opts: &TessellationOptions) -> Grid {
    let tol = opts.tolerance;
    let (mut us, mut vs) = chord_grid(skin, opts);
    let cert = Certifier::new(skin);
    // Certified bounds per cell (`u` major) and per trailing-edge strip row; NaN = to do.
    let mut cells: Vec<f64> = vec![f64::NAN; (us.len() - 1) * (vs.len() - 1)];
    // The largest sampled distance per cell and per strip row.
    let mut lower: Vec<f64> = vec![0.0; cells.len()];
    let mut strip_lower: Vec<f64> = vec![0.0; vs.len() - 1];
    // Directions to halve, per cell.
    let mut dirs: Vec<[bool; 2]> = vec![[true; 2]; cells.len()];
    let mut strip: Vec<f64> = vec![f64::NAN; vs.len() - 1];
    let mut round = 0;
    loop {
        let points = eval_grid(skin, &us, &vs);
        let nv = vs.len();
        let spans = cert.spans(&us, &vs);
        let todo: Vec<usize> = (0..cells.len()).filter(|&c| cells[c].is_nan()).collect();
        let found: Vec<(f64, f64, [bool; 2])> = todo
            .par_iter()
            .map(|&c| {
                let (i, j) = (c / (nv - 1), c % (nv - 1));
                cert.cell(&us, &vs, &points, &spans, i, j, tol, round < opts.max_depth)
            })
            .collect();
        for (&c, (b, l, d)) in todo.iter().zip(found) {
            cells[c] = b;
            lower[c] = l;
            dirs[c] = d;
        }
        let todo_rows: Vec<usize> = (0..strip.len()).filter(|&j| strip[j].is_nan()).collect();
        let found: Vec<(f64, f64)> = todo_rows
            .par_iter()
            .map(|&j| cert.strip_row(&us, &vs, &points, j, tol))
            .collect();
        for (&j, (b, l)) in todo_rows.iter().zip(found) {
            strip[j] = b;
            strip_lower[j] = l;
        }
        let mut split_u = vec![false; us.len() - 1];
        let mut split_v = vec![false; vs.len() - 1];
        for (c, &b) in cells.iter().enumerate() {
            if b > tol {
                split_u[c / (nv - 1)] |= dirs[c][0];
                split_v[c % (nv - 1)] |= dirs[c][1];
            }
        }
        for (j, &b) in strip.iter().enumerate() {
            if b > tol {
                split_v[j] = true;
            }
        }
        // Intervals too short to halve stay (as in phase 1).
        for (s, w) in split_u.iter_mut().zip(us.windows(2)) {
            *s &= w[1] - w[0] >= 1e-9;
        }
        for (s, w) in split_v.iter_mut().zip(vs.windows(2)) {
            *s &= w[1] - w[0] >= 1e-9;
        }
        let any = split_u.iter().chain(&split_v).any(|&s| s);
        if !any || round >= opts.max_depth {
            let deviation = cells.iter().chain(&strip).fold(0.0, |m: f64, &b| m.max(b));
            cells.extend(strip);
            let lower = lower
                .iter()
                .chain(&strip_lower)
                .map(|&l| f32_below(l))
                .collect();
            return Grid {
                us,
                vs,
                points,
                deviation,
                known: KnownBounds {
                    cells,
                    lower,
                    derivatives: Some(cert.derivatives()),
                },
            };
        }
        round += 1;
        let (nus, from_u) = split_intervals(&us, &split_u);
        let (nvs, from_v) = split_intervals(&vs, &split_v);
        let mut next = vec![f64::NAN; from_u.len() * from_v.len()];
        let mut next_lower = vec![0.0; next.len()];
        let mut next_dirs = vec![[true; 2]; next.len()];
        for (i, fu) in from_u.iter().enumerate() {
            let Some(oi) = fu else { continue };
            for (j, fv) in from_v.iter().enumerate() {
                if let Some(oj) = fv {
                    next[i * from_v.len() + j] = cells[oi * (nv - 1) + oj];
                    next_lower[i * from_v.len() + j] = lower[oi * (nv - 1) + oj];
                    next_dirs[i * from_v.len() + j] = dirs[oi * (nv - 1) + oj];
                }
            }
        }
        dirs = next_dirs;
        strip = from_v
            .iter()
            .map(|f| f.map_or(f64::NAN, |j| strip[j]))
            .collect();
        strip_lower = from_v
            .iter()
            .map(|f| f.map_or(0.0, |j| strip_lower[j]))
            .collect();
        cells = next;
        lower = next_lower;
        us = nus;
        vs = nvs;
    }
}
