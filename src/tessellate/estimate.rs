//! A cheap prediction of the tessellation's size, before any of it is built, so a caller
//! can refuse absurd work (a tolerance of a nanometre, a blade a kilometre long) with the
//! figure in hand.
//!
//! **Method.** A chord of a curve over a parameter step `h` strays from the curve by
//! about `|C''⊥| h² / 8` (the sagitta; `C''⊥` is the part of the second derivative
//! normal to the curve), and a grid cell's two triangles stray from a surface by about
//! `(k_u du² + 2 k_uv du dv + k_v dv²) / 8` (normal curvatures `k_u`, `k_v` and twist
//! `k_uv`). The skin is sampled on a grid of its own knots (thinned to at most 128 by
//! 64, plus even parameters, whatever the tolerance, so the cost does not grow with the
//! answer) and differentiated there.
//! Columns: at each `u`, the density `sqrt(k_u / (8 τ))` that keeps chords within the
//! chord tolerance `τ` on the worst row (`τ` as the grid's first phase uses it: half the
//! tolerance, and a quarter of the local thickness aft of the leading edge); rows
//! likewise along `v`. Where those spacings break the cell criterion (the twist term),
//! both shrink by the factor that restores it. The column and row counts are the
//! integrals of the densities, and the triangle count is twice their product plus the
//! caps.
//!
//! **Accuracy.** Bisection can only halve intervals, so it overshoots the ideal density
//! by a factor between 1 and 2 in each direction; [`CALIBRATION`] is the measured mean
//! of that. Against the real tessellation of a ten-station test blade, the demo turbine
//! and the desk fan blade from 0.03 mm to 0.001 mm the estimate is within a factor
//! 1.3 of the real triangle count (the grid's count over the estimate measured from 0.77
//! to 1.07; thinning the samples from 512 by 256 moved the worst case from 0.79); coarse
//! meshes of a few hundred triangles, where the starting grid's minimum counts dominate,
//! within 1.6.
//! `tests/tessellation.rs` checks a factor 1.5 across tolerances.

use super::grid::{eval_grid, uniform};
use crate::loft::Skin;
use nalgebra::{Point3, Vector3};
use rayon::prelude::*;

/// Ratio of real to ideal triangle counts, measured (see the module docs).
pub const CALIBRATION: f64 = 1.75;

/// Peak memory per triangle of a build (tessellation, checks and the STL writer),
/// measured as peak resident memory over triangle count of release builds of
/// 0.3 to 1.5 million triangles, bytes.
pub const BYTES_PER_TRIANGLE: f64 = 150.0;

/// The predicted size of a tessellation.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct WorkEstimate {
    /// Grid columns (around the section).
    pub columns: f64,
    /// Grid rows (along the span).
    pub rows: f64,
    /// Triangles of the closed mesh.
    pub triangles: f64,
    /// Peak memory of building, checking and writing it, bytes.
    pub peak_bytes: f64,
}

/// First and second differences at sample `k` of a sequence sampled at `t` (non-uniform
/// three-point formulas; one-sided at the ends, taken from the nearest inner sample).
fn differences(
    t: &[f64],
    f: impl Fn(usize) -> Vector3<f64>,
    k: usize,
) -> (Vector3<f64>, Vector3<f64>) {
    let n = t.len();
    let k = k.clamp(1, n - 2);
    let (h1, h2) = (t[k] - t[k - 1], t[k + 1] - t[k]);
    let (f0, f1, f2) = (f(k - 1), f(k), f(k + 1));
    let d1 = (f2 - f0) / (h1 + h2);
    let d2 = ((f2 - f1) * h1 - (f1 - f0) * h2) * (2.0 / (h1 * h2 * (h1 + h2)));
    (d1, d2)
}

/// Length of the part of `d2` normal to the direction `d1`.
fn normal_part(d1: &Vector3<f64>, d2: &Vector3<f64>) -> f64 {
    match d1.try_normalize(0.0) {
        Some(t) => (d2 - t * d2.dot(&t)).norm(),
        None => d2.norm(),
    }
}

/// Sorted distinct parameters: the distinct knots, with at most `max` of them (evenly
/// thinned), plus `extra`.
fn samples(knots: &[f64], max: usize, extra: &[f64]) -> Vec<f64> {
    let mut k: Vec<f64> = knots.to_vec();
    k.dedup();
    let step = k.len().div_ceil(max).max(1);
    let mut out: Vec<f64> = k.iter().step_by(step).copied().collect();
    out.extend_from_slice(extra);
    out.push(1.0);
    out.sort_by(f64::total_cmp);
    out.dedup();
    out
}

/// Predicts the size of [`super::tessellate`]'s mesh of `skin` at `tolerance` (mm), in
/// a time that does not depend on the tolerance (see the module docs for the method
/// and its accuracy). A non-positive tolerance gives infinite figures.
pub fn estimate(skin: &Skin, tolerance: f64) -> WorkEstimate {
    if !(tolerance > 0.0) || !tolerance.is_finite() {
        return WorkEstimate {
            columns: f64::INFINITY,
            rows: f64::INFINITY,
            triangles: f64::INFINITY,
            peak_bytes: f64::INFINITY,
        };
    }
    let s = SampleGrid::of(skin, tolerance);
    let local: Vec<Local> = (0..s.nu * s.nv)
        .into_par_iter()
        .map(|c| s.local(c / s.nv, c % s.nv))
        .collect();
    let (du_density, dv_density) = s.densities(&local, tolerance);
    let columns = integrate(&s.us, &du_density) * CALIBRATION.sqrt();
    let rows = integrate(&s.vs, &dv_density) * CALIBRATION.sqrt();
    let triangles = 2.0 * columns * rows + 2.0 * columns;
    WorkEstimate {
        columns,
        rows,
        triangles,
        peak_bytes: triangles * BYTES_PER_TRIANGLE,
    }
}

/// The surface sampled at (thinned) knots and a few even parameters.
struct SampleGrid<'a> {
    skin: &'a Skin,
    /// Half the tolerance: the chord part of the budget, mm.
    tau: f64,
    us: Vec<f64>,
    vs: Vec<f64>,
    nu: usize,
    nv: usize,
    /// Points, column-major (`nv` a column).
    grid: Vec<Point3<f64>>,
}

/// What one sample asks of the grid.
#[derive(Debug, Clone, Copy)]
struct Local {
    /// The chord limit, mm ([`SampleGrid::chord_limit`]).
    limit: f64,
    /// Normal curvature along u.
    ku: f64,
    /// Normal curvature along v.
    kv: f64,
    /// The twist term.
    kuv: f64,
}

impl<'a> SampleGrid<'a> {
    fn of(skin: &'a Skin, tolerance: f64) -> Self {
        let us = samples(&skin.knots_u, 128, &uniform(0.0, 1.0, 16));
        let vs = samples(&skin.knots_v, 64, &uniform(0.0, 1.0, 32));
        let (nu, nv) = (us.len(), vs.len());
        let grid = eval_grid(skin, &us, &vs);
        SampleGrid {
            skin,
            tau: 0.5 * tolerance,
            us,
            vs,
            nu,
            nv,
            grid,
        }
    }

    fn at(&self, i: usize, j: usize) -> Vector3<f64> {
        self.grid[i * self.nv + j].coords
    }

    /// The chord limit, the normal curvatures along u and v, and the twist at sample
    /// `(i, j)`.
    fn local(&self, i: usize, j: usize) -> Local {
        let (us, vs, nu, nv) = (&self.us, &self.vs, self.nu, self.nv);
        let at = |i: usize, j: usize| self.at(i, j);
        let (su, suu) = differences(us, |k| at(k, j), i);
        let (sv, svv) = differences(vs, |k| at(i, k), j);
        let (ci, cj) = (i.clamp(1, nu - 2), j.clamp(1, nv - 2));
        let suv = (at(ci + 1, cj + 1) - at(ci + 1, cj - 1) - at(ci - 1, cj + 1)
            + at(ci - 1, cj - 1))
            / ((us[ci + 1] - us[ci - 1]) * (vs[cj + 1] - vs[cj - 1]));
        let n = su
            .cross(&sv)
            .try_normalize(0.0)
            .unwrap_or_else(Vector3::zeros);
        Local {
            limit: self.chord_limit(i, j),
            ku: normal_part(&su, &suu),
            kv: normal_part(&sv, &svv),
            kuv: suv.dot(&n).abs(),
        }
    }

    /// Half the tolerance, and aft of the leading edge a quarter of the local
    /// thickness, floored at a tenth of that.
    fn chord_limit(&self, i: usize, j: usize) -> f64 {
        let (us, nu, nv) = (&self.us, self.nu, self.nv);
        let u_le = self.skin.u_le;
        let tau = self.tau;
        let mut limit = tau;
        let t = us[i];
        if (t - u_le).abs() > 0.25 * u_le.min(1.0 - u_le) {
            let m = if t <= u_le {
                1.0 - (1.0 - u_le) * t / u_le
            } else {
                u_le * (1.0 - t) / (1.0 - u_le)
            };
            // The opposite surface at the nearest sample of the mirrored parameter.
            let k = us.partition_point(|&x| x < m).min(nu - 1);
            limit = limit.min(0.25 * (self.grid[i * nv + j] - self.grid[k * nv + j]).norm());
        }
        // At a knife trailing edge the thickness, and so this limit, goes to zero in a
        // band far narrower than a sample interval: the grid refines only that band (to
        // its depth limit), so the estimate floors the limit at a tenth of the chord
        // tolerance rather than spread an unbounded density over the whole interval.
        limit.max(0.1 * tau)
    }

    /// Column densities at each u sample and row densities at each v sample: the
    /// chord densities (worst row or column; at least the starting grid's 16 columns
    /// and 4 rows), raised where the twist term breaks the cell criterion.
    fn densities(&self, local: &[Local], tolerance: f64) -> (Vec<f64>, Vec<f64>) {
        let (nu, nv) = (self.nu, self.nv);
        let du_chord: Vec<f64> = (0..nu)
            .map(|i| {
                (0..nv)
                    .map(|j| {
                        let l = local[i * nv + j];
                        (l.ku / (8.0 * l.limit)).sqrt()
                    })
                    .fold(16.0, f64::max)
            })
            .collect();
        let dv_chord: Vec<f64> = (0..nv)
            .map(|j| {
                (0..nu)
                    .map(|i| {
                        let l = local[i * nv + j];
                        (l.kv / (8.0 * l.limit)).sqrt()
                    })
                    .fold(4.0, f64::max)
            })
            .collect();
        // The cell criterion (ku du² + 2 kuv du dv + kv dv²) / 8 <= tolerance: where the
        // chord spacings break it (the twist term), both spacings shrink by the same
        // factor.
        let shrink = |i: usize, j: usize| {
            let Local { ku, kv, kuv, .. } = local[i * nv + j];
            let (du, dv) = (1.0 / du_chord[i], 1.0 / dv_chord[j]);
            let e = (ku * du * du + 2.0 * kuv * du * dv + kv * dv * dv) / 8.0;
            if e > tolerance {
                (tolerance / e).sqrt()
            } else {
                1.0
            }
        };
        let du_density: Vec<f64> = (0..nu)
            .map(|i| du_chord[i] / (0..nv).map(|j| shrink(i, j)).fold(1.0, f64::min))
            .collect();
        let dv_density: Vec<f64> = (0..nv)
            .map(|j| dv_chord[j] / (0..nu).map(|i| shrink(i, j)).fold(1.0, f64::min))
            .collect();
        (du_density, dv_density)
    }
}

/// The integral of the density `d` sampled at `t`, each interval at its larger end.
fn integrate(t: &[f64], d: &[f64]) -> f64 {
    t.windows(2)
        .zip(d.windows(2))
        .map(|(w, e)| (w[1] - w[0]) * e[0].max(e[1]))
        .sum()
}
