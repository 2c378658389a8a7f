//! A cheap prediction of the tessellation's size, before any of it is built, so a caller
//! can refuse absurd work (a tolerance of a nanometre, a blade a kilometre long) with the
//! figure in hand.
//!
//! **Method.** A chord of a curve over a parameter step `h` strays from the curve by
//! about `|C''⊥| h² / 8` (the sagitta; `C''⊥` is the part of the second derivative
//! normal to the curve). Keeping that within the chord tolerance `τ` needs
//! `n = ∫ sqrt(|C''⊥| / (8 τ)) dt` intervals along the curve. The grid's columns must
//! serve every row, so the column count is that integral over `u` of the largest
//! integrand across `v`, and likewise the row count; the triangle count is twice their
//! product (plus the caps). The tolerance is the one the grid's first phase uses (half
//! the mesh tolerance, and a quarter of the local thickness aft of the leading edge);
//! the skin is sampled at every knot span of `u` and 64 stations along `v`, whatever the
//! tolerance, so the cost does not grow with the answer.
//!
//! **Accuracy.** Bisection can only halve intervals, so it overshoots the ideal density
//! by a factor between 1 and 2 in each direction, and the certification phase adds some
//! rows and columns; [`CALIBRATION`] is the measured mean of those effects. Against the
//! real tessellation of the blades in `tests/tessellation.rs` from 0.1 mm to 0.0005 mm,
//! the estimate is within a factor 1.5 of the real triangle count.

use super::grid::uniform;
use crate::loft::Skin;
use nalgebra::{Point3, Vector3};

/// Ratio of real to ideal triangle counts, measured (see the module docs).
pub const CALIBRATION: f64 = 2.0;

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

/// Central second difference and first difference of the surface along one direction.
fn derivatives(skin: &Skin, u: f64, v: f64, dir: usize, h: f64) -> (Vector3<f64>, Vector3<f64>) {
    let at = |t: f64| -> Point3<f64> {
        if dir == 0 {
            skin.eval(t, v)
        } else {
            skin.eval(u, t)
        }
    };
    let t = if dir == 0 { u } else { v };
    let (lo, hi) = ((t - h).max(0.0), (t + h).min(1.0));
    let mid = 0.5 * (lo + hi);
    let step = 0.5 * (hi - lo);
    let (a, b, c) = (at(lo), at(mid), at(hi));
    (
        (c - a) / (2.0 * step),
        (a - 2.0 * b.coords + c.coords).coords / (step * step),
    )
}

/// Ideal interval count along `dir` for the chord tolerance `tau`: the integral over the
/// `dir` parameter of the largest `sqrt(|C''⊥| / (8 τ))` across the `others` lines.
fn count(skin: &Skin, dir: usize, params: &[f64], others: &[f64], tau: f64) -> f64 {
    let u_le = skin.u_le;
    let mut n = 0.0;
    for w in params.windows(2) {
        let (t, h) = (0.5 * (w[0] + w[1]), w[1] - w[0]);
        if h <= 0.0 {
            continue;
        }
        let mut worst: f64 = 0.0;
        for &o in others {
            let (u, v) = if dir == 0 { (t, o) } else { (o, t) };
            let (d1, d2) = derivatives(skin, u, v, dir, 0.25 * h);
            let len = d1.norm();
            let normal = if len > 0.0 {
                let tan = d1 / len;
                (d2 - tan * d2.dot(&tan)).norm()
            } else {
                d2.norm()
            };
            let mut limit = tau;
            if dir == 0 && (t - u_le).abs() > 0.25 * u_le.min(1.0 - u_le) {
                let m = if t <= u_le {
                    1.0 - (1.0 - u_le) * t / u_le
                } else {
                    u_le * (1.0 - t) / (1.0 - u_le)
                };
                limit = limit.min(0.25 * (skin.eval(t, v) - skin.eval(m, v)).norm());
            }
            worst = worst.max((normal / (8.0 * limit.max(f64::MIN_POSITIVE))).sqrt());
        }
        n += worst * h;
    }
    n
}

/// Predicts the size of [`super::tessellate`]'s mesh of `skin` at `tolerance` (mm), in
/// a time that does not depend on the tolerance (see the module docs for the method
/// and its accuracy). A non-positive tolerance gives infinite figures.
pub fn estimate(skin: &Skin, tolerance: f64) -> WorkEstimate {
    if !(tolerance > 0.0) {
        return WorkEstimate {
            columns: f64::INFINITY,
            rows: f64::INFINITY,
            triangles: f64::INFINITY,
            peak_bytes: f64::INFINITY,
        };
    }
    let tau = 0.5 * tolerance;
    // Every distinct knot of u with the midpoints between (the sections' own point
    // spacing), and 64 even steps along v plus the knots of v.
    let mut us: Vec<f64> = Vec::new();
    for w in skin.knots_u.windows(2) {
        if w[1] > w[0] {
            us.extend([w[0], 0.5 * (w[0] + w[1])]);
        }
    }
    us.push(1.0);
    let mut vs = uniform(0.0, 1.0, 64);
    vs.extend(skin.knots_v.iter().copied());
    vs.sort_by(f64::total_cmp);
    vs.dedup();
    let v_lines = uniform(0.0, 1.0, 16);
    let u_lines: Vec<f64> = us.iter().step_by(4).copied().collect();
    let columns = count(skin, 0, &us, &v_lines, tau).max(16.0) * CALIBRATION.sqrt();
    let rows = count(skin, 1, &vs, &u_lines, tau).max(4.0) * CALIBRATION.sqrt();
    let triangles = 2.0 * columns * rows + 2.0 * columns;
    WorkEstimate {
        columns,
        rows,
        triangles,
        peak_bytes: triangles * BYTES_PER_TRIANGLE,
    }
}
