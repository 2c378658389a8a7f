//! The surface model: one B-spline skin interpolating the placed sections.
//!
//! Parametrisation: `u` runs around the section from the upper trailing edge (`u = 0`)
//! over the leading edge (`u = u_le`) to the lower trailing edge (`u = 1`); `v` runs along
//! the span from the root face (`v = 0`) to the tip face (`v = 1`). The closed solid is
//! this skin plus, when the trailing edge is blunt, the ruled trailing-edge face between
//! the curves `u = 0` and `u = 1`, plus the planar root and tip caps bounded by the
//! curves `v = 0` and `v = 1` (each in a plane `z = const`, see [`crate::conventions`]).

use nalgebra::Point3;
use rayon::prelude::*;

/// A clamped, non-rational tensor-product B-spline surface.
#[derive(Debug, Clone, PartialEq)]
pub struct Skin {
    /// Degree in `u` (around the section).
    pub degree_u: usize,
    /// Degree in `v` (along the span).
    pub degree_v: usize,
    /// Clamped knot vector in `u` on [0, 1] (end knots repeated `degree_u + 1` times).
    pub knots_u: Vec<f64>,
    /// Clamped knot vector in `v` on [0, 1].
    pub knots_v: Vec<f64>,
    /// Control points, `control[i][j]`: `i` along `u`, `j` along `v`.
    pub control: Vec<Vec<Point3<f64>>>,
    /// Parameter of the leading edge (where upper and lower faces meet).
    pub u_le: f64,
}

/// Why a loft could not be built.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum LoftError {
    /// Fewer than two sections, or sections with different point counts.
    #[error("cannot loft: {0}")]
    BadInput(String),
    /// Two consecutive data points coincide, so no parameter can separate them.
    #[error("cannot loft: data points coincide ({0})")]
    Coincident(String),
}

impl Skin {
    /// Interpolates the sections `rings[l][k]` (`l` along the span, `k` around the
    /// section; every ring has the same count) with a bicubic B-spline (degree lowered
    /// where there are too few points), by global surface interpolation: averaged
    /// chord-length parameters, knots by averaging, one banded solve per ring and then
    /// one per column (Piegl & Tiller, *The NURBS Book*, 2nd ed., 1997, sections 9.2.1
    /// and 9.2.5, equations 9.5 and 9.8). `le_index` is the data index of the leading edge.
    pub fn interpolate(rings: &[Vec<Point3<f64>>], le_index: usize) -> Result<Skin, LoftError> {
        let m = rings.len();
        if m < 2 {
            return Err(LoftError::BadInput(format!(
                "{m} section(s); at least two are needed"
            )));
        }
        let n = rings[0].len();
        if n < 3 || rings.iter().any(|r| r.len() != n) {
            return Err(LoftError::BadInput(
                "sections have different point counts".into(),
            ));
        }
        let ubar = section_parameters(rings)?;
        let vbar = span_parameters(rings)?;
        let p = 3.min(n - 1);
        let q = 3.min(m - 1);
        let knots_u = averaged_knots(&ubar, p);
        let knots_v = averaged_knots(&vbar, q);
        // Curves around each ring: R[l][k].
        let bu = Banded::collocation(&knots_u, p, &ubar);
        let r = bu.solve_columns(m, |k, l| rings[l][k]);
        // Then along the span for each column k: control[k][l].
        let bv = Banded::collocation(&knots_v, q, &vbar);
        let control = bv.solve_columns(n, |l, k| r[l][k]);
        Ok(Skin {
            degree_u: p,
            degree_v: q,
            knots_u,
            knots_v,
            control,
            u_le: ubar[le_index.min(n - 1)],
        })
    }

    /// Surface point at `(u, v)`.
    pub fn eval(&self, u: f64, v: f64) -> Point3<f64> {
        let bu = Basis::at(&self.knots_u, self.degree_u, u);
        let bv = Basis::at(&self.knots_v, self.degree_v, v);
        self.eval_basis(&bu, &bv)
    }

    /// Surface point from precomputed basis values (fast grid evaluation).
    pub fn eval_basis(&self, bu: &Basis, bv: &Basis) -> Point3<f64> {
        let mut s = nalgebra::Vector3::zeros();
        for (a, nu) in bu.values().iter().enumerate() {
            let row = &self.control[bu.first + a];
            let mut t = nalgebra::Vector3::zeros();
            for (b, nv) in bv.values().iter().enumerate() {
                t += row[bv.first + b].coords * *nv;
            }
            s += t * *nu;
        }
        Point3::from(s)
    }

    /// Control points of the iso-curve `v = const` whose basis values are `bv`: a
    /// B-spline curve in `u` on [`Skin::knots_u`] of degree [`Skin::degree_u`] (evaluate
    /// it with [`eval_curve`]). Evaluating a grid through iso-curves costs `degree + 1`
    /// terms per point instead of `(degree + 1)²`.
    pub fn iso_v_control(&self, bv: &Basis) -> Vec<Point3<f64>> {
        self.control
            .iter()
            .map(|row| {
                let mut t = nalgebra::Vector3::zeros();
                for (b, nv) in bv.values().iter().enumerate() {
                    t += row[bv.first + b].coords * *nv;
                }
                Point3::from(t)
            })
            .collect()
    }

    /// Control points of the iso-curve `u = const` whose basis values are `bu`: a
    /// B-spline curve in `v` on [`Skin::knots_v`] of degree [`Skin::degree_v`].
    pub fn iso_u_control(&self, bu: &Basis) -> Vec<Point3<f64>> {
        let m = self.control[0].len();
        (0..m)
            .map(|j| {
                let mut t = nalgebra::Vector3::zeros();
                for (a, nu) in bu.values().iter().enumerate() {
                    t += self.control[bu.first + a][j].coords * *nu;
                }
                Point3::from(t)
            })
            .collect()
    }

    /// The iso-curve at `v` sampled at the given `u` values.
    pub fn iso_v(&self, v: f64, us: &[f64]) -> Vec<Point3<f64>> {
        let bv = Basis::at(&self.knots_v, self.degree_v, v);
        us.iter()
            .map(|&u| self.eval_basis(&Basis::at(&self.knots_u, self.degree_u, u), &bv))
            .collect()
    }

    /// True when the two trailing-edge curves (`u = 0` and `u = 1`) coincide: the trailing
    /// edge is sharp along the whole span.
    pub fn sharp_trailing_edge(&self) -> bool {
        let first = &self.control[0];
        let last = &self.control[self.control.len() - 1];
        first.iter().zip(last).all(|(a, b)| (a - b).norm() <= 1e-9)
    }

    /// +1 when `S_u x S_v` points out of the solid, -1 when it points in (the section
    /// loop runs clockwise seen from the tip, as after mirroring a blade).
    pub fn orientation(&self) -> f64 {
        // Signed area of the root curve projected on the section plane (x, y).
        let us: Vec<f64> = (0..=64).map(|i| i as f64 / 64.0).collect();
        let pts = self.iso_v(0.0, &us);
        let mut a = 0.0;
        for i in 0..pts.len() {
            let (p, q) = (pts[i], pts[(i + 1) % pts.len()]);
            a += p.x * q.y - q.x * p.y;
        }
        let tip = self.eval(0.5, 1.0).z - self.eval(0.5, 0.0).z;
        if (a > 0.0) == (tip > 0.0) {
            1.0
        } else {
            -1.0
        }
    }
}

/// Upper bounds of the second partial derivatives of a [`Skin`] over each pair of knot
/// spans, from the control points of the derivative surfaces.
///
/// The derivative `S_uu` of a B-spline surface is itself a B-spline surface, of degree
/// `(p - 2, q)`, whose control points are second differences of the surface's
/// (Piegl & Tiller, *The NURBS Book*, 2nd ed., 1997, section 3.4, equations 3.17 and
/// algorithm A3.5); likewise `S_uv` (degree `(p - 1, q - 1)`) and `S_vv`. B-spline basis
/// functions are non-negative and sum to one, so on a pair of knot spans each derivative
/// is a convex combination of the `(degree + 1)²` control points that act there, and
/// its length is at most the largest of their lengths (the convex hull property, NURBS
/// Book section 3.4, property P3.4 applied to the derivative surface).
#[derive(Debug, Clone)]
pub struct DerivativeBounds {
    knots_u: Vec<f64>,
    knots_v: Vec<f64>,
    p: usize,
    q: usize,
    /// Span counts (`n - p + 1` in u, `m - q + 1` in v).
    su: usize,
    sv: usize,
    /// `[max |S_uu|, max |S_uv|, max |S_vv|]` per span pair, `u` major.
    table: Vec<[f64; 3]>,
}

impl DerivativeBounds {
    /// `[max |S_uu|, max |S_uv|, max |S_vv|]` over the parameter rectangle
    /// `[u0, u1] x [v0, v1]` (every knot span pair it touches).
    pub fn over(&self, u0: f64, u1: f64, v0: f64, v1: f64) -> [f64; 3] {
        let (s0, s1) = (
            find_span(&self.knots_u, self.p, u0) - self.p,
            find_span(&self.knots_u, self.p, u1) - self.p,
        );
        let (t0, t1) = (
            find_span(&self.knots_v, self.q, v0) - self.q,
            find_span(&self.knots_v, self.q, v1) - self.q,
        );
        self.over_spans(s0..=s1, t0..=t1)
    }

    /// The bounds over ranges of span indices (0 = the first span of each direction),
    /// see [`DerivativeBounds::span_range`].
    pub fn over_spans(
        &self,
        su: std::ops::RangeInclusive<usize>,
        sv: std::ops::RangeInclusive<usize>,
    ) -> [f64; 3] {
        let mut m = [0.0f64; 3];
        for s in su {
            let row = &self.table[s.min(self.su - 1) * self.sv..][..self.sv];
            for t in sv.clone() {
                let e = row[t.min(self.sv - 1)];
                for k in 0..3 {
                    m[k] = m[k].max(e[k]);
                }
            }
        }
        m
    }

    /// The span indices (0-based) an interval `[a, b]` of `u` (`dir = 0`) or `v` (`dir =
    /// 1`) touches.
    pub fn span_range(&self, dir: usize, a: f64, b: f64) -> std::ops::RangeInclusive<usize> {
        let (k, p) = if dir == 0 {
            (&self.knots_u, self.p)
        } else {
            (&self.knots_v, self.q)
        };
        find_span(k, p, a) - p..=find_span(k, p, b) - p
    }
}

/// A control net (or one of its derivative nets) in one flat array, row major.
struct Net {
    cols: usize,
    v: Vec<nalgebra::Vector3<f64>>,
}

impl Net {
    fn rows(&self) -> usize {
        self.v.len() / self.cols
    }

    /// First-derivative control points along the rows (`dir = 0`, differences in the
    /// row index) or the columns (`dir = 1`): `d (P[i+1] - P[i]) / (k[i+d+1] - k[i+1])`,
    /// NURBS Book equation 3.17 (a zero knot difference gives a zero point).
    fn difference(&self, knots: &[f64], d: usize, dir: usize) -> Net {
        let factor = |i: usize| {
            let den = knots[i + d + 1] - knots[i + 1];
            if den > 0.0 {
                d as f64 / den
            } else {
                0.0
            }
        };
        let (rows, cols) = (self.rows(), self.cols);
        if dir == 0 {
            let mut v = Vec::with_capacity(rows.saturating_sub(1) * cols);
            for i in 0..rows.saturating_sub(1) {
                let f = factor(i);
                let (a, b) = (
                    &self.v[(i + 1) * cols..][..cols],
                    &self.v[i * cols..][..cols],
                );
                v.extend(a.iter().zip(b).map(|(a, b)| (a - b) * f));
            }
            Net { cols, v }
        } else {
            let out_cols = cols.saturating_sub(1);
            let f: Vec<f64> = (0..out_cols).map(factor).collect();
            let mut v = Vec::with_capacity(rows * out_cols);
            for i in 0..rows {
                let row = &self.v[i * cols..][..cols];
                v.extend(row.windows(2).zip(&f).map(|(w, &f)| (w[1] - w[0]) * f));
            }
            Net { cols: out_cols, v }
        }
    }

    /// The column count and the norms of the points.
    fn norms(&self) -> (usize, Vec<f64>) {
        (self.cols, self.v.iter().map(|x| x.norm()).collect())
    }
}

impl Skin {
    /// Bounds of the second partial derivatives per knot span pair (see
    /// [`DerivativeBounds`]). A direction of degree below two has zero second
    /// derivative along it.
    pub fn derivative_bounds(&self) -> DerivativeBounds {
        let (p, q) = (self.degree_u, self.degree_v);
        let n = self.control.len() - 1;
        let m = self.control[0].len() - 1;
        let (su, sv) = (n - p + 1, m - q + 1);
        // Derivative nets in flat arrays (`rows x cols`, row major), indexed like the
        // NURBS Book's P^(k,l)_{i,j} (equation 3.17 in each direction).
        let net = Net {
            cols: m + 1,
            v: self
                .control
                .iter()
                .flat_map(|r| r.iter().map(|c| c.coords))
                .collect(),
        };
        let du = net.difference(&self.knots_u, p, 0);
        let duu = (p >= 2).then(|| du.difference(&self.knots_u[1..], p - 1, 0).norms());
        let duv = (p >= 1 && q >= 1).then(|| du.difference(&self.knots_v, q, 1).norms());
        let dvv = (q >= 2).then(|| {
            net.difference(&self.knots_v, q, 1)
                .difference(&self.knots_v[1..], q - 1, 1)
                .norms()
        });
        // Largest of a net's norms over rows `is` and columns `js`.
        let window = |d: &Option<(usize, Vec<f64>)>,
                      is: std::ops::RangeInclusive<usize>,
                      js: std::ops::RangeInclusive<usize>| {
            let Some((cols, d)) = d else { return 0.0 };
            let mut mx = 0.0f64;
            for i in is {
                for j in js.clone() {
                    mx = mx.max(d[i * cols + j]);
                }
            }
            mx
        };
        let table: Vec<[f64; 3]> = (p..=n)
            .into_par_iter()
            .flat_map_iter(|s| {
                let (duu, duv, dvv) = (&duu, &duv, &dvv);
                (q..=m).map(move |t| {
                    // Active derivative control points on span (s, t): degree (p-a, q-b)
                    // functions on the knot vector without its first and last a knots.
                    [
                        window(duu, s - p..=s - 2.min(s), t - q..=t),
                        window(duv, s - p..=s - 1.min(s), t - q..=t - 1.min(t)),
                        window(dvv, s - p..=s, t - q..=t - 2.min(t)),
                    ]
                })
            })
            .collect();
        DerivativeBounds {
            knots_u: self.knots_u.clone(),
            knots_v: self.knots_v.clone(),
            p,
            q,
            su,
            sv,
            table,
        }
    }
}

/// The skin parameters `u` of the section points: chord-length parameters of every
/// ring, averaged over the rings (NURBS Book section 9.2.5). [`Skin::interpolate`]
/// passes through point `k` of ring `l` at `(u_k, v_l)`, with `v_l` from
/// [`span_parameters`].
///
/// # Errors
/// [`LoftError::Coincident`] when two neighbouring points of a ring coincide.
pub fn section_parameters(rings: &[Vec<Point3<f64>>]) -> Result<Vec<f64>, LoftError> {
    let m = rings.len();
    let n = rings.first().map_or(0, Vec::len);
    let mut ubar = vec![0.0; n];
    for ring in rings {
        let params =
            chord_params(ring).ok_or_else(|| LoftError::Coincident("around a section".into()))?;
        for (a, p) in ubar.iter_mut().zip(params) {
            *a += p / m as f64;
        }
    }
    Ok(ubar)
}

/// The skin parameters `v` of the rings: chord-length parameters of every column of
/// section points, averaged over the columns (NURBS Book section 9.2.5).
///
/// # Errors
/// [`LoftError::Coincident`] when two neighbouring rings have a point in common.
pub fn span_parameters(rings: &[Vec<Point3<f64>>]) -> Result<Vec<f64>, LoftError> {
    let m = rings.len();
    let n = rings.first().map_or(0, Vec::len);
    let mut vbar = vec![0.0; m];
    for k in 0..n {
        let column: Vec<Point3<f64>> = rings.iter().map(|r| r[k]).collect();
        let params =
            chord_params(&column).ok_or_else(|| LoftError::Coincident("along the span".into()))?;
        for (a, p) in vbar.iter_mut().zip(params) {
            *a += p / n as f64;
        }
    }
    Ok(vbar)
}

/// Chord-length parameters on [0, 1] of a polyline (NURBS Book eq. 9.5).
fn chord_params(points: &[Point3<f64>]) -> Option<Vec<f64>> {
    let mut acc = vec![0.0; points.len()];
    for i in 1..points.len() {
        acc[i] = acc[i - 1] + (points[i] - points[i - 1]).norm();
    }
    let total = acc[points.len() - 1];
    if !(total > 0.0) {
        return None;
    }
    // Coincident consecutive points would give a singular system.
    if acc.windows(2).any(|w| w[1] - w[0] <= total * 1e-13) {
        return None;
    }
    Some(acc.into_iter().map(|a| a / total).collect())
}

/// The skin's spanwise curves through each section point: for point `k` of every ring,
/// the cubic B-spline in `v` that [`Skin::interpolate`] would give on the same rings,
/// without the curves around the sections.
///
/// Interpolation is linear in the data and the skin interpolates each ring at the
/// section parameters `ubar` ([`section_parameters`]), so the skin's point at
/// `(ubar[k], v)` is this curve `k` at `v`: the spanwise interpolation of the points `k`
/// with the skin's own `v` knots (NURBS Book section 9.2.5, surface interpolation as
/// curve interpolations in each direction). Half the work of a skin, for callers that
/// only look at the section points.
#[derive(Debug, Clone)]
pub struct SpanCurves {
    /// Knot vector along the span (the skin's `knots_v`).
    pub knots_v: Vec<f64>,
    /// Degree along the span.
    pub degree_v: usize,
    /// Span parameters of the rings ([`span_parameters`]).
    pub vbar: Vec<f64>,
    /// Per section point `k`, the control points of its curve.
    pub control: Vec<Vec<Point3<f64>>>,
}

impl SpanCurves {
    /// The curves through `rings` (as [`Skin::interpolate`] takes them).
    ///
    /// # Errors
    /// As [`Skin::interpolate`].
    pub fn interpolate(rings: &[Vec<Point3<f64>>]) -> Result<SpanCurves, LoftError> {
        let m = rings.len();
        let n = rings.first().map_or(0, Vec::len);
        if m < 2 || n < 3 || rings.iter().any(|r| r.len() != n) {
            return Err(LoftError::BadInput(format!(
                "{m} section(s) of {n} points; at least two sections of equal point counts \
                 (three or more) are needed"
            )));
        }
        let vbar = span_parameters(rings)?;
        let q = 3.min(m - 1);
        let knots_v = averaged_knots(&vbar, q);
        let bv = Banded::collocation(&knots_v, q, &vbar);
        let control = bv.solve_columns(n, |l, k| rings[l][k]);
        Ok(SpanCurves {
            knots_v,
            degree_v: q,
            vbar,
            control,
        })
    }

    /// The section points at `v`.
    pub fn section_at(&self, v: f64) -> impl Iterator<Item = Point3<f64>> + '_ {
        let b = Basis::at(&self.knots_v, self.degree_v, v);
        self.control.iter().map(move |c| eval_curve(c, &b))
    }
}

/// Clamped knot vector by averaging (NURBS Book eq. 9.8).
fn averaged_knots(params: &[f64], p: usize) -> Vec<f64> {
    let n = params.len() - 1;
    let mut knots = vec![0.0; p + 1];
    for j in 1..=n.saturating_sub(p) {
        knots.push(params[j..j + p].iter().sum::<f64>() / p as f64);
    }
    knots.extend(std::iter::repeat_n(1.0, p + 1));
    knots
}

/// Highest degree of a [`Skin`] in either direction (bicubic).
pub const MAX_DEGREE: usize = 3;

/// Nonzero B-spline basis values at one parameter: `values()[a]` belongs to control index
/// `first + a` (NURBS Book algorithms A2.1 FindSpan and A2.2 BasisFuns). Held inline (no
/// allocation), for degrees up to [`MAX_DEGREE`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Basis {
    /// Index of the first control point with a nonzero basis function.
    pub first: usize,
    values: [f64; MAX_DEGREE + 1],
    len: usize,
}

impl Basis {
    /// Basis values of the clamped knot vector `knots` of degree `p` at `t` (clamped to
    /// the parameter range).
    ///
    /// # Panics
    /// When `p` exceeds [`MAX_DEGREE`] (a programming error: skins are at most bicubic).
    pub fn at(knots: &[f64], p: usize, t: f64) -> Basis {
        assert!(p <= MAX_DEGREE, "B-spline degree {p} above {MAX_DEGREE}");
        let n = knots.len() - p - 2; // last control index
        let span = find_span(knots, p, t);
        let t = t.clamp(knots[p], knots[n + 1]);
        let mut values = [0.0; MAX_DEGREE + 1];
        let mut left = [0.0; MAX_DEGREE + 1];
        let mut right = [0.0; MAX_DEGREE + 1];
        values[0] = 1.0;
        for j in 1..=p {
            left[j] = t - knots[span + 1 - j];
            right[j] = knots[span + j] - t;
            let mut saved = 0.0;
            for r in 0..j {
                let denom = right[r + 1] + left[j - r];
                let temp = if denom != 0.0 { values[r] / denom } else { 0.0 };
                values[r] = saved + right[r + 1] * temp;
                saved = left[j - r] * temp;
            }
            values[j] = saved;
        }
        Basis {
            first: span - p,
            values,
            len: p + 1,
        }
    }

    /// The `degree + 1` nonzero basis values (they sum to 1).
    pub fn values(&self) -> &[f64] {
        &self.values[..self.len]
    }
}

/// The knot span index `s` (`knots[s] <= t < knots[s + 1]`, within `[p, n]`) of a
/// clamped knot vector of degree `p`; `t` is clamped to the parameter range first (NURBS
/// Book algorithm A2.1).
pub fn find_span(knots: &[f64], p: usize, t: f64) -> usize {
    let n = knots.len() - p - 2; // last control index
    let t = t.clamp(knots[p], knots[n + 1]);
    if t >= knots[n + 1] {
        n
    } else {
        (knots.partition_point(|&k| k <= t) - 1).clamp(p, n)
    }
}

/// Point of the B-spline curve with control points `control` at the parameter whose
/// basis values are `b` (from [`Basis::at`] on the curve's knot vector).
pub fn eval_curve(control: &[Point3<f64>], b: &Basis) -> Point3<f64> {
    let mut s = nalgebra::Vector3::zeros();
    for (a, w) in b.values().iter().enumerate() {
        s += control[b.first + a].coords * *w;
    }
    Point3::from(s)
}

/// The banded collocation matrix of a curve interpolation, factored once (LU without
/// pivoting, which is stable for B-spline collocation matrices: they are totally
/// positive; de Boor, *A Practical Guide to Splines*, rev. ed. 2001, chapter XIII).
struct Banded {
    n: usize,
    /// Half bandwidth.
    w: usize,
    /// Dense band storage: row i holds columns i - w ..= i + w.
    a: Vec<f64>,
}

impl Banded {
    fn collocation(knots: &[f64], p: usize, params: &[f64]) -> Banded {
        let n = params.len();
        let w = p.max(1);
        let width = 2 * w + 1;
        let mut a = vec![0.0; n * width];
        for (i, &t) in params.iter().enumerate() {
            let b = Basis::at(knots, p, t);
            for (k, v) in b.values().iter().enumerate() {
                let j = b.first + k;
                if j + w >= i && j <= i + w {
                    a[i * width + (j + w - i)] = *v;
                }
            }
        }
        let mut me = Banded { n, w, a };
        me.factor();
        me
    }

    fn idx(&self, i: usize, j: usize) -> usize {
        i * (2 * self.w + 1) + (j + self.w - i)
    }

    fn factor(&mut self) {
        let (n, w) = (self.n, self.w);
        for k in 0..n {
            let pivot = self.a[self.idx(k, k)];
            for i in k + 1..(k + w + 1).min(n) {
                let f = self.a[self.idx(i, k)] / pivot;
                let li = self.idx(i, k);
                self.a[li] = f;
                for j in k + 1..(k + w + 1).min(n) {
                    let (ij, kj) = (self.idx(i, j), self.idx(k, j));
                    self.a[ij] -= f * self.a[kj];
                }
            }
        }
    }

    /// Solves `A x = b` for `columns` right-hand sides at once, `b[i]` of column `c`
    /// being `rhs(i, c)`; returns each column's solution. The columns are solved in
    /// blocks side by side, each block as rows of contiguous numbers, so every step of
    /// the elimination is one sweep over a block's row; every number goes through the
    /// same operations, in the same order, as a one-column solve.
    fn solve_columns(
        &self,
        columns: usize,
        rhs: impl Fn(usize, usize) -> Point3<f64> + Sync,
    ) -> Vec<Vec<Point3<f64>>> {
        /// Columns per block.
        const BLOCK: usize = 64;
        let starts: Vec<usize> = (0..columns).step_by(BLOCK).collect();
        let blocks: Vec<Vec<Vec<Point3<f64>>>> = starts
            .par_iter()
            .map(|&c0| {
                let cols = BLOCK.min(columns - c0);
                let mut b = vec![0.0; self.n * 3 * cols];
                for (i, row) in b.chunks_exact_mut(3 * cols).enumerate() {
                    for (c, x) in row.chunks_exact_mut(3).enumerate() {
                        x.copy_from_slice(rhs(i, c0 + c).coords.as_slice());
                    }
                }
                self.solve_rows(&mut b, 3 * cols);
                (0..cols)
                    .map(|c| {
                        b.chunks_exact(3 * cols)
                            .map(|row| Point3::new(row[3 * c], row[3 * c + 1], row[3 * c + 2]))
                            .collect()
                    })
                    .collect()
            })
            .collect();
        blocks.into_iter().flatten().collect()
    }

    /// Forward and back substitution on the rows of `b` (`n` rows of `width` numbers,
    /// each number one right-hand side), in place.
    fn solve_rows(&self, b: &mut [f64], width: usize) {
        let (n, w) = (self.n, self.w);
        let axpy = |x: &mut [f64], y: &[f64], f: f64| {
            for (x, y) in x.iter_mut().zip(y) {
                *x -= y * f;
            }
        };
        for i in 0..n {
            let (done, rest) = b.split_at_mut(i * width);
            let row = &mut rest[..width];
            for k in i.saturating_sub(w)..i {
                axpy(
                    row,
                    &done[k * width..(k + 1) * width],
                    self.a[self.idx(i, k)],
                );
            }
        }
        for i in (0..n).rev() {
            let (head, tail) = b.split_at_mut((i + 1) * width);
            let row = &mut head[i * width..];
            for j in i + 1..(i + w + 1).min(n) {
                let at = (j - i - 1) * width;
                axpy(row, &tail[at..at + width], self.a[self.idx(i, j)]);
            }
            let d = self.a[self.idx(i, i)];
            for x in row.iter_mut() {
                *x /= d;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ring(z: f64, r: f64, n: usize) -> Vec<Point3<f64>> {
        (0..n)
            .map(|k| {
                let a = std::f64::consts::TAU * k as f64 / (n - 1) as f64;
                Point3::new(r * a.cos(), r * a.sin(), z)
            })
            .collect()
    }

    #[test]
    fn interpolates_the_data_points() {
        // Global interpolation passes through every data point (NURBS Book 9.2.5).
        let rings: Vec<_> = (0..5)
            .map(|l| ring(10.0 * l as f64, 5.0 + l as f64, 41))
            .collect();
        let skin = Skin::interpolate(&rings, 20).unwrap();
        let ubar = chord_params(&rings[0]).unwrap();
        for (l, ring) in rings.iter().enumerate() {
            let v = l as f64 / 4.0; // equal spacing along the span here
            let pts = skin.iso_v(v, &ubar);
            for (a, b) in pts.iter().zip(ring) {
                assert!((a - b).norm() < 1e-9, "{a} {b}");
            }
        }
        assert!(skin.sharp_trailing_edge());
        assert_eq!(skin.orientation(), 1.0);
    }

    #[test]
    fn agrees_with_truck_evaluation() {
        // Independent reference: truck-geometry's B-spline surface evaluation.
        use truck_geometry::prelude::*;
        let rings: Vec<_> = (0..4)
            .map(|l| ring(7.0 * l as f64, 3.0 + 0.5 * l as f64, 17))
            .collect();
        let skin = Skin::interpolate(&rings, 8).unwrap();
        let cp: Vec<Vec<truck_geometry::prelude::Point3>> = skin
            .control
            .iter()
            .map(|row| {
                row.iter()
                    .map(|p| truck_geometry::prelude::Point3::new(p.x, p.y, p.z))
                    .collect()
            })
            .collect();
        let surf = BSplineSurface::new(
            (
                KnotVec::from(skin.knots_u.clone()),
                KnotVec::from(skin.knots_v.clone()),
            ),
            cp,
        );
        for i in 0..=10 {
            for j in 0..=10 {
                let (u, v) = (i as f64 / 10.0, j as f64 / 10.0);
                let a = skin.eval(u, v);
                let b = surf.subs(u, v);
                assert!((a.x - b.x).abs() + (a.y - b.y).abs() + (a.z - b.z).abs() < 1e-10);
            }
        }
    }
}
