//! A parametric natural cubic spline through 2D points, parametrised by cumulative chord
//! length (a discrete arc length). Used to find the true leading edge and to resample
//! sections.
//!
//! Method: natural cubic spline interpolation, one tridiagonal solve per coordinate
//! (Burden & Faires, *Numerical Analysis*, 9th ed., section 3.5, Algorithm 3.4).

use nalgebra::{Point2, Vector2};

/// A C2 cubic spline curve through the given points.
#[derive(Debug, Clone)]
pub struct Spline2 {
    s: Vec<f64>,
    p: Vec<Point2<f64>>,
    /// Second derivatives at the knots, per coordinate.
    m: Vec<Vector2<f64>>,
}

impl Spline2 {
    /// Fits the spline. Consecutive duplicate points must be removed by the caller; `None`
    /// when fewer than two distinct points remain or two consecutive points coincide.
    pub fn fit(points: &[Point2<f64>]) -> Option<Self> {
        let n = points.len();
        if n < 2 {
            return None;
        }
        let mut s = Vec::with_capacity(n);
        s.push(0.0);
        for w in points.windows(2) {
            let d = (w[1] - w[0]).norm();
            if d.is_nan() || d <= 0.0 || !d.is_finite() {
                return None;
            }
            s.push(s[s.len() - 1] + d);
        }
        // Natural end conditions; the interior second derivatives solve a tridiagonal
        // system, eliminated in place (Thomas algorithm). Row r belongs to point r + 1;
        // its sub- and super-diagonal are the neighbouring parameter steps.
        let mut m = vec![Vector2::zeros(); n];
        if n > 2 {
            let k = n - 2;
            let mut diag = Vec::with_capacity(k);
            for i in 1..n - 1 {
                let h0 = s[i] - s[i - 1];
                let h1 = s[i + 1] - s[i];
                diag.push(2.0 * (h0 + h1));
                m[i] = ((points[i + 1] - points[i]) / h1 - (points[i] - points[i - 1]) / h0) * 6.0;
            }
            for r in 1..k {
                let sub = s[r + 1] - s[r];
                let w = sub / diag[r - 1];
                diag[r] -= w * sub;
                let prev = m[r];
                m[r + 1] -= prev * w;
            }
            m[k] /= diag[k - 1];
            for r in (0..k - 1).rev() {
                let next = m[r + 2];
                m[r + 1] = (m[r + 1] - next * (s[r + 2] - s[r + 1])) / diag[r];
            }
        }
        Some(Self {
            s,
            p: points.to_vec(),
            m,
        })
    }

    /// Total parameter length.
    pub fn length(&self) -> f64 {
        self.s[self.s.len() - 1]
    }

    /// Parameter values of the data points.
    pub fn knots(&self) -> &[f64] {
        &self.s
    }

    fn span(&self, t: f64) -> usize {
        let n = self.s.len();
        match self.s.partition_point(|&v| v <= t) {
            0 => 0,
            i if i >= n => n - 2,
            i => i - 1,
        }
    }

    /// Point at parameter `t` (clamped to the curve).
    pub fn eval(&self, t: f64) -> Point2<f64> {
        self.eval_with_derivative(t).0
    }

    /// Point and first derivative at parameter `t`.
    pub fn eval_with_derivative(&self, t: f64) -> (Point2<f64>, Vector2<f64>) {
        let t = t.clamp(0.0, self.length());
        let i = self.span(t);
        let h = self.s[i + 1] - self.s[i];
        let a = (self.s[i + 1] - t) / h;
        let b = (t - self.s[i]) / h;
        let (p0, p1) = (self.p[i].coords, self.p[i + 1].coords);
        let (m0, m1) = (self.m[i], self.m[i + 1]);
        let pos = p0 * a + p1 * b + (m0 * (a * a * a - a) + m1 * (b * b * b - b)) * (h * h / 6.0);
        let der = (p1 - p0) / h + (m1 * (3.0 * b * b - 1.0) - m0 * (3.0 * a * a - 1.0)) * (h / 6.0);
        (Point2::from(pos), der)
    }
}

impl Spline2 {
    /// Second derivative at parameter `t` (clamped to the curve), for curvature.
    pub fn second_derivative(&self, t: f64) -> Vector2<f64> {
        let t = t.clamp(0.0, self.length());
        let i = self.span(t);
        let h = self.s[i + 1] - self.s[i];
        let a = (self.s[i + 1] - t) / h;
        let b = (t - self.s[i]) / h;
        self.m[i] * a + self.m[i + 1] * b
    }

    /// Curvature (1 / radius, signed, positive turning left) at parameter `t`.
    pub fn curvature(&self, t: f64) -> f64 {
        let (_, d) = self.eval_with_derivative(t);
        let dd = self.second_derivative(t);
        (d.x * dd.y - d.y * dd.x) / d.norm().powi(3)
    }

    /// Point of span `i` (between knots `i` and `i + 1`) whose x equals `x`, found by
    /// Newton's method safeguarded by bisection on the local parameter. When `x` lies
    /// outside the x range of the span's end points, the nearer end point is returned.
    /// Spans are indexed like [`Spline2::knots`]; `i` must be below `knots().len() - 1`.
    pub fn point_at_x_in_span(&self, i: usize, x: f64) -> Point2<f64> {
        let i = i.min(self.s.len() - 2);
        let h = self.s[i + 1] - self.s[i];
        let k = h * h / 6.0;
        let (p0, p1) = (self.p[i].coords, self.p[i + 1].coords);
        let (m0, m1) = (self.m[i], self.m[i + 1]);
        let pos = |u: f64| {
            let (a, b) = (1.0 - u, u);
            p0 * a + p1 * b + (m0 * (a * a * a - a) + m1 * (b * b * b - b)) * k
        };
        let f0 = p0.x - x;
        let f1 = p1.x - x;
        if f0 == 0.0 {
            return Point2::from(p0);
        }
        if f1 == 0.0 {
            return Point2::from(p1);
        }
        if (f0 < 0.0) == (f1 < 0.0) {
            return Point2::from(if f0.abs() <= f1.abs() { p0 } else { p1 });
        }
        let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
        let mut u = f0 / (f0 - f1);
        for _ in 0..60 {
            let (a, b) = (1.0 - u, u);
            let f = p0.x * a + p1.x * b + (m0.x * (a * a * a - a) + m1.x * (b * b * b - b)) * k - x;
            // 1e-15 chord in x: far below any use, and saves the confirming iteration.
            if f.abs() < 1e-15 {
                break;
            }
            let d = p1.x - p0.x + (m1.x * (3.0 * b * b - 1.0) - m0.x * (3.0 * a * a - 1.0)) * k;
            if (f < 0.0) == (f0 < 0.0) {
                lo = u;
            } else {
                hi = u;
            }
            let step = f / d;
            let next = u - step;
            u = if d != 0.0 && next > lo && next < hi {
                next
            } else {
                0.5 * (lo + hi)
            };
            if hi - lo < 1e-15 || step.abs() < 1e-14 {
                break;
            }
        }
        Point2::from(pos(u))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn passes_through_points_and_reproduces_a_line() {
        // A natural cubic spline reproduces straight lines exactly (its second
        // derivatives vanish): common practice, follows from the construction.
        let pts: Vec<_> = [0.0, 0.3, 1.0, 1.7, 3.0]
            .iter()
            .map(|&x| Point2::new(x, 2.0 * x + 1.0))
            .collect();
        let sp = Spline2::fit(&pts).unwrap();
        for (k, p) in sp.knots().iter().zip(&pts) {
            assert!((sp.eval(*k) - p).norm() < 1e-12);
        }
        let q = sp.eval(1.234);
        assert!((q.y - (2.0 * q.x + 1.0)).abs() < 1e-12);
    }

    #[test]
    fn circle_is_close() {
        // 64 points on a unit circle: a cubic spline's error is O(h^4); h = 0.1 gives
        // well under 1e-5 (Burden & Faires, 9th ed., Theorem 3.13 bound for clamped
        // splines; interior points of a natural spline behave alike).
        let pts: Vec<_> = (0..=64)
            .map(|i| {
                let a = std::f64::consts::PI * i as f64 / 64.0;
                Point2::new(a.cos(), a.sin())
            })
            .collect();
        let sp = Spline2::fit(&pts).unwrap();
        for j in 0..400 {
            let t = sp.length() * (0.1 + 0.8 * j as f64 / 400.0);
            assert!((sp.eval(t).coords.norm() - 1.0).abs() < 1e-5);
        }
    }
}
