//! NACA 5-digit sections: the 4-digit thickness distribution on the 5-digit mean lines
//! of NACA Report 537 (Jacobs & Pinkerton, 1935).
//!
//! Designation `LPQTT`: design lift coefficient `0.15 L`, maximum camber at `P/20` of
//! chord, `Q = 0` standard or `1` reflexed mean line, thickness `TT`% of chord. The mean
//! line is tabulated for a design lift coefficient of 0.3 (`L = 2`) and scales linearly
//! with it.
//!
//! Standard mean line (Abbott & von Doenhoff, *Theory of Wing Sections*, Dover 1959,
//! section 6.5):
//!
//! ```text
//! y_c = k1/6 (x^3 - 3 m x^2 + m^2 (3 - m) x)    0 <= x < m
//! y_c = k1 m^3 / 6 (1 - x)                      m <= x <= 1
//! ```

use super::naca::{published_section, thickened_outline, TrailingEdge};
use super::resample::ResampleError;
use super::section::Section;
use nalgebra::Point2;

/// `(p, m, k1)` of the standard mean lines 210 to 250 (camber position, the `m` of the
/// equations, `k1`), for a design lift coefficient of 0.3. NACA Report 537; values as in
/// Abbott & von Doenhoff, section 6.5.
const STANDARD: [(f64, f64, f64); 5] = [
    (0.05, 0.0580, 361.400),
    (0.10, 0.1260, 51.640),
    (0.15, 0.2025, 15.957),
    (0.20, 0.2900, 6.643),
    (0.25, 0.3910, 3.230),
];

/// `(p, m, k1, k2/k1)` of the reflexed mean lines 221 to 251 (common published table).
// 0.3180 is a tabulated m, not an approximation of 1/pi.
#[allow(clippy::approx_constant)]
const REFLEXED: [(f64, f64, f64, f64); 4] = [
    (0.10, 0.1300, 51.990, 0.000764),
    (0.15, 0.2170, 15.793, 0.00677),
    (0.20, 0.3180, 6.520, 0.0303),
    (0.25, 0.4410, 3.191, 0.1355),
];

/// Parameters of a 5-digit section.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Naca5 {
    /// Design lift coefficient (0.3 for the `2..` series).
    pub cl: f64,
    /// Chord position of maximum camber, fraction of chord (0.05 to 0.25).
    pub p: f64,
    /// The mean line's `m` (chord fraction where the cubic part ends).
    pub m: f64,
    /// The mean line's `k1` at a design lift coefficient of 0.3.
    pub k1: f64,
    /// `k2/k1` of a reflexed mean line; `None` for the standard mean line.
    pub k2_over_k1: Option<f64>,
    /// Maximum thickness, fraction of chord.
    pub t: f64,
    /// Trailing-edge closure of the thickness polynomial.
    pub te: TrailingEdge,
}

impl Naca5 {
    /// Parses the five digits of a designation such as `23012` (standard) or `23112`
    /// (reflexed). `None` when the digits name no tabulated mean line.
    pub fn from_digits(digits: &str, te: TrailingEdge) -> Option<Self> {
        if digits.len() != 5 || !digits.bytes().all(|b| b.is_ascii_digit()) {
            return None;
        }
        let d: Vec<u32> = digits.bytes().map(|b| (b - b'0') as u32).collect();
        let (l, p, q) = (d[0], d[1], d[2]);
        let t = (d[3] * 10 + d[4]) as f64 / 100.0;
        if l == 0 || t <= 0.0 {
            return None;
        }
        let cl = 0.15 * l as f64;
        let (pp, m, k1, k2) = match q {
            0 => {
                let (pp, m, k1) = *STANDARD.get((p as usize).checked_sub(1)?)?;
                (pp, m, k1, None)
            }
            1 => {
                let (pp, m, k1, r) = *REFLEXED.get((p as usize).checked_sub(2)?)?;
                (pp, m, k1, Some(r))
            }
            _ => return None,
        };
        Some(Self {
            cl,
            p: pp,
            m,
            k1,
            k2_over_k1: k2,
            t,
            te,
        })
    }

    /// Mean line `(y_c, dy_c/dx)` at chord station `x`.
    pub fn mean_line(&self, x: f64) -> (f64, f64) {
        let (m, k1) = (self.m, self.k1);
        let scale = self.cl / 0.3;
        let (y, dy) = match self.k2_over_k1 {
            None => {
                if x < m {
                    (
                        k1 / 6.0 * (x.powi(3) - 3.0 * m * x * x + m * m * (3.0 - m) * x),
                        k1 / 6.0 * (3.0 * x * x - 6.0 * m * x + m * m * (3.0 - m)),
                    )
                } else {
                    (k1 * m.powi(3) / 6.0 * (1.0 - x), -k1 * m.powi(3) / 6.0)
                }
            }
            Some(r) => {
                let c = r * (1.0 - m).powi(3) + m.powi(3);
                if x < m {
                    (
                        k1 / 6.0 * ((x - m).powi(3) - c * x + m.powi(3)),
                        k1 / 6.0 * (3.0 * (x - m).powi(2) - c),
                    )
                } else {
                    (
                        k1 / 6.0 * (r * (x - m).powi(3) - c * x + m.powi(3)),
                        k1 / 6.0 * (3.0 * r * (x - m).powi(2) - c),
                    )
                }
            }
        };
        (scale * y, scale * dy)
    }

    /// Raw outline (loop order, upper first) from `n` cosine-spaced stations per side.
    pub fn raw_outline(&self, n: usize) -> Vec<Point2<f64>> {
        thickened_outline(n, self.t, self.te, |x| self.mean_line(x))
    }

    /// The section in its published frame, resampled to `n` points per side.
    pub fn section(&self, name: &str, n: usize) -> Result<Section, ResampleError> {
        published_section(name, &self.raw_outline(n.max(200) * 2))?.resample(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn standard_mean_line_is_continuous_and_peaks_at_p() {
        for digits in ["21012", "22012", "23012", "24012", "25012"] {
            let s = Naca5::from_digits(digits, TrailingEdge::Open).unwrap();
            let (a, _) = s.mean_line(s.m - 1e-12);
            let (b, _) = s.mean_line(s.m);
            assert!((a - b).abs() < 1e-9, "{digits}");
            // Slope zero at p: the tabulated m and k1 are chosen so (Report 537).
            let (_, d) = s.mean_line(s.p);
            assert!(d.abs() < 2e-3, "{digits} slope {d}");
            assert!(s.mean_line(1.0).0.abs() < 1e-12);
        }
    }

    #[test]
    fn reflexed_mean_line_ends_at_zero() {
        for digits in ["22112", "23112", "24112", "25112"] {
            let s = Naca5::from_digits(digits, TrailingEdge::Open).unwrap();
            assert!(s.mean_line(0.0).0.abs() < 1e-12);
            assert!(
                s.mean_line(1.0).0.abs() < 1e-4,
                "{digits} {:?}",
                s.mean_line(1.0)
            );
        }
    }

    #[test]
    fn rejects_untabulated() {
        assert!(Naca5::from_digits("26012", TrailingEdge::Open).is_none());
        assert!(Naca5::from_digits("21112", TrailingEdge::Open).is_none());
        assert!(Naca5::from_digits("23212", TrailingEdge::Open).is_none());
        assert!(Naca5::from_digits("03012", TrailingEdge::Open).is_none());
    }
}
