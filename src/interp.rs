//! Spanwise interpolation of station values (chord, twist, thickness, offsets), by one of
//! two laws a design chooses ([`Law`], the design key `blade.spanwise`):
//!
//! * [`Law::Smooth`] (the default), [`Monotone`]: a monotone piecewise cubic Hermite
//!   interpolant (PCHIP): C1, passes through every station, and never overshoots: between
//!   two stations the value stays within their range, so a chord or thickness can not dip
//!   or bulge between stations.
//! * [`Law::Linear`], [`Linear`]: straight lines between stations (C0, kinks at the
//!   stations), for a planform meant as straight segments, as many printed tables are.
//!
//! [`Curve`] is either, chosen by the law.
//!
//! The monotone cubic:
//! Method: F. N. Fritsch & R. E. Carlson, "Monotone Piecewise Cubic Interpolation",
//! SIAM J. Numer. Anal. 17(2), 1980, with the harmonic-mean slopes of Fritsch & Butland
//! (1984) as used by many numerical libraries.
//!
//! The Hermite segments are evaluated through the `splines` crate's cubic Bézier keys,
//! so the interpolant is an ordinary `splines::Spline` that callers can sample.

use splines::{Interpolation, Key, Spline};

/// How station values vary between stations.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Law {
    /// Monotone cubic ([`Monotone`]): smooth (C1), never overshooting a station's
    /// neighbours.
    #[default]
    Smooth,
    /// Straight lines between stations ([`Linear`]).
    Linear,
}

impl Law {
    /// Names accepted in design files (`blade.spanwise`).
    pub const NAMES: [&'static str; 2] = ["smooth", "linear"];

    /// Reads a law's name (case-insensitive).
    pub fn parse(name: &str) -> Option<Law> {
        match name.trim().to_ascii_lowercase().as_str() {
            "smooth" => Some(Law::Smooth),
            "linear" => Some(Law::Linear),
            _ => None,
        }
    }

    /// The name as written in a design file.
    pub fn name(self) -> &'static str {
        match self {
            Law::Smooth => "smooth",
            Law::Linear => "linear",
        }
    }

    /// A description for summaries: `smooth (monotone cubic between stations)`.
    pub fn describe(self) -> &'static str {
        match self {
            Law::Smooth => "smooth (monotone cubic between stations)",
            Law::Linear => "linear (straight lines between stations)",
        }
    }
}

impl std::fmt::Display for Law {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// Checks interpolation data: at least two points, equal lengths, finite values, `x`
/// strictly increasing.
fn valid(x: &[f64], y: &[f64]) -> bool {
    x.len() >= 2
        && y.len() == x.len()
        && x.iter().chain(y).all(|v| v.is_finite())
        && x.windows(2).all(|w| w[1] > w[0])
}

/// Straight lines through `(x_i, y_i)` with strictly increasing `x`. Outside
/// `[x_0, x_n]` the end values are held (no extrapolation).
#[derive(Debug, Clone)]
pub struct Linear {
    x: Vec<f64>,
    y: Vec<f64>,
}

impl Linear {
    /// Builds the interpolant; `None` for the same data [`Monotone::new`] refuses.
    pub fn new(x: &[f64], y: &[f64]) -> Option<Self> {
        valid(x, y).then(|| Self {
            x: x.to_vec(),
            y: y.to_vec(),
        })
    }

    /// Value at `x`.
    pub fn eval(&self, x: f64) -> f64 {
        let n = self.x.len();
        if x <= self.x[0] {
            return self.y[0];
        }
        if x >= self.x[n - 1] {
            return self.y[n - 1];
        }
        // The segment [x_i, x_{i+1}] holding x.
        let i = self.x.partition_point(|&xi| xi <= x).clamp(1, n - 1) - 1;
        let t = (x - self.x[i]) / (self.x[i + 1] - self.x[i]);
        self.y[i] + t * (self.y[i + 1] - self.y[i])
    }
}

/// A spanwise curve by either [`Law`].
#[derive(Debug, Clone)]
pub enum Curve {
    /// Monotone cubic.
    Smooth(Monotone),
    /// Straight lines.
    Linear(Linear),
}

impl Curve {
    /// The curve of `law` through the points; `None` as [`Monotone::new`].
    pub fn new(law: Law, x: &[f64], y: &[f64]) -> Option<Curve> {
        match law {
            Law::Smooth => Monotone::new(x, y).map(Curve::Smooth),
            Law::Linear => Linear::new(x, y).map(Curve::Linear),
        }
    }

    /// Value at `x` (end values held outside the stations).
    pub fn eval(&self, x: f64) -> f64 {
        match self {
            Curve::Smooth(m) => m.eval(x),
            Curve::Linear(l) => l.eval(x),
        }
    }

    /// The law of this curve.
    pub fn law(&self) -> Law {
        match self {
            Curve::Smooth(_) => Law::Smooth,
            Curve::Linear(_) => Law::Linear,
        }
    }
}

/// A monotone C1 interpolant through `(x_i, y_i)` with strictly increasing `x`.
/// Outside `[x_0, x_n]` the end values are held (no extrapolation).
#[derive(Debug, Clone)]
pub struct Monotone {
    spline: Spline<f64, f64>,
    first: (f64, f64),
    last: (f64, f64),
}

impl Monotone {
    /// Builds the interpolant; `None` when fewer than two points are given, lengths differ,
    /// a value is not finite, or `x` is not strictly increasing.
    pub fn new(x: &[f64], y: &[f64]) -> Option<Self> {
        let n = x.len();
        if !valid(x, y) {
            return None;
        }
        let controls = hermite_controls(x, y);
        let keys = (0..n)
            .map(|i| {
                Key::new(
                    x[i],
                    y[i],
                    Interpolation::StrokeBezier(controls[i].0, controls[i].1),
                )
            })
            .collect();
        Some(Self {
            spline: Spline::from_vec(keys),
            first: (x[0], y[0]),
            last: (x[n - 1], y[n - 1]),
        })
    }

    /// Value at `x`.
    pub fn eval(&self, x: f64) -> f64 {
        if x <= self.first.0 {
            self.first.1
        } else if x >= self.last.0 {
            self.last.1
        } else {
            self.spline.clamped_sample(x).unwrap_or(self.last.1)
        }
    }
}

/// The Bézier control values of the monotone cubic through `(x_i, y_i)` (data already
/// [`valid`]): for each point, its incoming and outgoing inner control values. A cubic
/// Hermite segment is the cubic Bézier with inner control points `y_i + d_i h_i / 3` and
/// `y_{i+1} - d_{i+1} h_i / 3`; the ends hold their own value where they have no segment.
fn hermite_controls(x: &[f64], y: &[f64]) -> Vec<(f64, f64)> {
    let n = x.len();
    let h: Vec<f64> = x.windows(2).map(|w| w[1] - w[0]).collect();
    let delta: Vec<f64> = (0..n - 1).map(|i| (y[i + 1] - y[i]) / h[i]).collect();
    let mut d = vec![0.0; n];
    if n == 2 {
        d = vec![delta[0]; 2];
    } else {
        for i in 1..n - 1 {
            if delta[i - 1] * delta[i] > 0.0 {
                // Weighted harmonic mean (Fritsch & Butland).
                let w1 = 2.0 * h[i] + h[i - 1];
                let w2 = h[i] + 2.0 * h[i - 1];
                d[i] = (w1 + w2) / (w1 / delta[i - 1] + w2 / delta[i]);
            }
        }
        d[0] = end_slope(h[0], h[1], delta[0], delta[1]);
        d[n - 1] = end_slope(h[n - 2], h[n - 3], delta[n - 2], delta[n - 3]);
    }
    (0..n)
        .map(|i| {
            let incoming = if i > 0 {
                y[i] - d[i] * h[i - 1] / 3.0
            } else {
                y[i]
            };
            let outgoing = if i + 1 < n {
                y[i] + d[i] * h[i] / 3.0
            } else {
                y[i]
            };
            (incoming, outgoing)
        })
        .collect()
}

/// Many spanwise curves over the same stations, by one [`Law`], evaluated together: one
/// segment search per abscissa for all of them (a section's hundreds of ordinates share
/// their stations). Each curve gives the same value, to the bit, as its own [`Curve`]:
/// the same control values and the same evaluation formulas (the `splines` crate's cubic
/// Bézier for [`Law::Smooth`], [`Linear::eval`]'s for [`Law::Linear`]).
#[derive(Debug, Clone)]
pub struct Bundle {
    law: Law,
    x: Vec<f64>,
    /// Curves per segment.
    count: usize,
    /// Segment-major: for segment `i` and curve `k`, `[y_i, u, v, y_{i+1}]` at
    /// `4 (i count + k)` (the Bézier controls; a straight segment ignores `u`, `v`).
    controls: Vec<f64>,
}

impl Bundle {
    /// The curves through `columns[k]` (one value per station, `x` strictly increasing);
    /// `None` for the data [`Curve::new`] refuses in any column.
    pub fn new(law: Law, x: &[f64], columns: &[Vec<f64>]) -> Option<Bundle> {
        let n = x.len();
        let count = columns.len();
        if columns.iter().any(|y| !valid(x, y)) || n < 2 {
            return None;
        }
        let mut controls = vec![0.0; 4 * (n - 1) * count];
        for (k, y) in columns.iter().enumerate() {
            let c = match law {
                Law::Smooth => hermite_controls(x, y),
                Law::Linear => y.iter().map(|&v| (v, v)).collect(),
            };
            for i in 0..n - 1 {
                let at = 4 * (i * count + k);
                controls[at..at + 4].copy_from_slice(&[y[i], c[i].1, c[i + 1].0, y[i + 1]]);
            }
        }
        Some(Bundle {
            law,
            x: x.to_vec(),
            count,
            controls,
        })
    }

    /// How many curves.
    pub fn len(&self) -> usize {
        self.count
    }

    /// Whether there are no curves.
    pub fn is_empty(&self) -> bool {
        self.count == 0
    }

    /// Every curve's value at `x`, in column order (end values held outside the stations).
    pub fn eval(&self, x: f64) -> impl ExactSizeIterator<Item = f64> + '_ {
        let n = self.x.len();
        // At or beyond an end, that end's value: the first segment's start, the last
        // segment's end (control 0 or 3).
        let held = if x <= self.x[0] {
            Some(0)
        } else if x >= self.x[n - 1] {
            Some(3)
        } else {
            None
        };
        // The segment [x_i, x_{i+1}) holding x, as the `splines` crate and
        // `Linear::eval` find it.
        let i = self.x.partition_point(|&xi| xi <= x).clamp(1, n - 1) - 1;
        let t = (x - self.x[i]) / (self.x[i + 1] - self.x[i]);
        let (one_t, law) = (1.0 - t, self.law);
        let (one_t2, t2) = (one_t * one_t, t * t);
        let one_t3 = one_t2 * one_t;
        let segment = &self.controls[4 * i * self.count..4 * (i + 1) * self.count];
        (0..self.count).map(move |k| {
            if let Some(end) = held {
                return segment[4 * k + end];
            }
            let [a, u, v, b] = [
                segment[4 * k],
                segment[4 * k + 1],
                segment[4 * k + 2],
                segment[4 * k + 3],
            ];
            match law {
                Law::Smooth => a * one_t3 + (u * one_t2 * t + v * one_t * t2) * 3. + b * t2 * t,
                Law::Linear => a + t * (b - a),
            }
        })
    }
}

/// Shape-preserving three-point end slope (Fritsch & Carlson end condition as given by
/// C. Moler, *Numerical Computing with MATLAB*, 2004, section 3.4).
fn end_slope(h0: f64, h1: f64, del0: f64, del1: f64) -> f64 {
    let d = ((2.0 * h0 + h1) * del0 - h0 * del1) / (h0 + h1);
    if d.signum() != del0.signum() || del0 == 0.0 {
        0.0
    } else if del0.signum() != del1.signum() && d.abs() > 3.0 * del0.abs() {
        3.0 * del0
    } else {
        d
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn passes_through_points_and_reproduces_lines() {
        // A Hermite interpolant with exact slopes reproduces a straight line
        // (harmonic mean of equal slopes is that slope): common practice.
        let x = [0.0, 1.0, 1.5, 4.0, 7.0];
        let y: Vec<f64> = x.iter().map(|v| 3.0 - 0.5 * v).collect();
        let m = Monotone::new(&x, &y).unwrap();
        for (a, b) in x.iter().zip(&y) {
            assert!((m.eval(*a) - b).abs() < 1e-12);
        }
        for k in 0..100 {
            let t = 7.0 * k as f64 / 99.0;
            assert!((m.eval(t) - (3.0 - 0.5 * t)).abs() < 1e-12);
        }
    }

    #[test]
    fn linear_law_is_the_chord_between_stations() {
        // Linear interpolation: y = y_i + (x - x_i) (y_{i+1} - y_i) / (x_{i+1} - x_i)
        // (elementary); the midpoint of each segment is the mean of its ends.
        let x = [0.0, 1.0, 4.0, 5.0];
        let y = [2.0, 4.0, -2.0, 7.0];
        let l = Curve::new(Law::Linear, &x, &y).unwrap();
        assert_eq!(l.law(), Law::Linear);
        for w in 0..3 {
            let mid = 0.5 * (x[w] + x[w + 1]);
            assert!((l.eval(mid) - 0.5 * (y[w] + y[w + 1])).abs() < 1e-12);
            assert!((l.eval(x[w]) - y[w]).abs() < 1e-12);
        }
        assert!(
            (l.eval(2.5) - 1.0).abs() < 1e-12,
            "halfway along [1, 4]: {}",
            l.eval(2.5)
        );
        assert_eq!(l.eval(-1.0), 2.0);
        assert_eq!(l.eval(9.0), 7.0);
        assert!(Linear::new(&[0.0, 0.0], &[1.0, 2.0]).is_none());
        assert_eq!(Law::parse(" Linear "), Some(Law::Linear));
        assert_eq!(Law::parse("cubic"), None);
    }

    #[test]
    fn bundle_gives_each_curves_value_to_the_bit() {
        // A bundle is only a faster way to evaluate the curves it holds: compared with
        // each column's own `Curve` (and through it the `splines` crate) at the stations,
        // between them, and outside them.
        let x = [0.0, 1.0, 2.5, 3.0, 7.0];
        let columns = vec![
            vec![10.0, 10.0, 4.0, 4.0, 3.9],
            vec![-1.0, 2.0, 0.5, 0.7, 9.0],
            vec![0.3, 0.3, 0.3, 0.3, 0.3],
        ];
        for law in [Law::Smooth, Law::Linear] {
            let bundle = Bundle::new(law, &x, &columns).unwrap();
            assert_eq!(bundle.len(), 3);
            let curves: Vec<Curve> = columns
                .iter()
                .map(|y| Curve::new(law, &x, y).unwrap())
                .collect();
            for k in -20..=160 {
                let at = k as f64 * 0.05;
                let got: Vec<f64> = bundle.eval(at).collect();
                for (g, c) in got.iter().zip(&curves) {
                    assert_eq!(g.to_bits(), c.eval(at).to_bits(), "{law} at {at}");
                }
            }
        }
        assert!(Bundle::new(Law::Smooth, &x, &[vec![1.0, 2.0]]).is_none());
        assert!(Bundle::new(Law::Smooth, &[0.0, 0.0], &[vec![1.0, 2.0]]).is_none());
    }

    #[test]
    fn never_overshoots() {
        // Fritsch & Carlson (1980): monotone data give a monotone interpolant; a flat step
        // stays flat.
        let x = [0.0, 1.0, 2.0, 3.0, 3.2, 6.0];
        let y = [10.0, 10.0, 4.0, 4.0, 3.9, 0.5];
        let m = Monotone::new(&x, &y).unwrap();
        let mut prev = f64::INFINITY;
        for k in 0..=600 {
            let v = m.eval(6.0 * k as f64 / 600.0);
            assert!(v <= prev + 1e-12, "not monotone at {k}");
            prev = v;
        }
        for k in 0..=100 {
            let v = m.eval(2.0 + k as f64 / 100.0);
            assert!((v - 4.0).abs() < 1e-12);
        }
    }
}
