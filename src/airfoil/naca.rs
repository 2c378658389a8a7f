//! NACA airfoil generators from the published equations.
//!
//! * 4-digit series: NACA Report 460 (Jacobs, Ward & Pinkerton, 1933). Designation
//!   `MPTT`: maximum camber `M`% of chord at `P`/10 of chord, thickness `TT`% of chord.
//! * Thickness is laid perpendicular to the mean line, as the reports define:
//!   `x_u = x - y_t sin(theta)`, `y_u = y_c + y_t cos(theta)`, lower with the signs flipped,
//!   `theta = atan(dy_c/dx)`.
//!
//! Generated outlines come out in the published frame, whose chord line runs from the
//! mean line's origin to the trailing edge (see [`published_section`]), and are
//! resampled like any imported section, so every source yields the same structure.

use super::resample::{cosine_stations, keep_frame, ResampleError};
use super::section::{ChordLine, Section};
use nalgebra::Point2;

/// Trailing-edge closure of the 4-digit thickness polynomial.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TrailingEdge {
    /// The report's coefficient `a4 = -0.1015`: a small blunt trailing edge.
    #[default]
    Open,
    /// The common closed variant `a4 = -0.1036`: a sharp trailing edge.
    Closed,
}

/// Half-thickness of the 4-digit series at chord station `x` for thickness ratio `t`
/// (NACA Report 460, thickness equation).
pub fn naca4_half_thickness(x: f64, t: f64, te: TrailingEdge) -> f64 {
    let a4 = match te {
        TrailingEdge::Open => -0.1015,
        TrailingEdge::Closed => -0.1036,
    };
    5.0 * t
        * (0.2969 * x.sqrt() - 0.1260 * x - 0.3516 * x * x + 0.2843 * x.powi(3) + a4 * x.powi(4))
}

/// 4-digit mean line `(y_c, dy_c/dx)` for maximum camber `m` at chord fraction `p`
/// (NACA Report 460).
pub fn naca4_mean_line(x: f64, m: f64, p: f64) -> (f64, f64) {
    if m == 0.0 || p == 0.0 {
        return (0.0, 0.0);
    }
    if x < p {
        (
            m / (p * p) * (2.0 * p * x - x * x),
            2.0 * m / (p * p) * (p - x),
        )
    } else {
        let q = (1.0 - p) * (1.0 - p);
        (
            m / q * ((1.0 - 2.0 * p) + 2.0 * p * x - x * x),
            2.0 * m / q * (p - x),
        )
    }
}

/// Parameters of a 4-digit section.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Naca4 {
    /// Maximum camber, fraction of chord.
    pub m: f64,
    /// Chord position of maximum camber, fraction of chord.
    pub p: f64,
    /// Maximum thickness, fraction of chord.
    pub t: f64,
    /// Trailing-edge closure.
    pub te: TrailingEdge,
}

impl Naca4 {
    /// Parses the four digits of a designation such as `2412`.
    pub fn from_digits(digits: &str, te: TrailingEdge) -> Option<Self> {
        if digits.len() != 4 || !digits.bytes().all(|b| b.is_ascii_digit()) {
            return None;
        }
        let d: Vec<f64> = digits.bytes().map(|b| (b - b'0') as f64).collect();
        let (m, p, t) = (d[0] / 100.0, d[1] / 10.0, (d[2] * 10.0 + d[3]) / 100.0);
        if t <= 0.0 || (m > 0.0) != (p > 0.0) {
            return None;
        }
        Some(Self { m, p, t, te })
    }

    /// Raw outline (loop order, upper first) from `n` cosine-spaced stations per side.
    pub fn raw_outline(&self, n: usize) -> Vec<Point2<f64>> {
        thickened_outline(n, self.t, self.te, |x| naca4_mean_line(x, self.m, self.p))
    }

    /// The section in its published frame, resampled to `n` points per side.
    pub fn section(&self, name: &str, n: usize) -> Result<Section, ResampleError> {
        published_section(name, &self.raw_outline(n.max(200) * 2))?.resample(n)
    }
}

/// The section of a generated raw outline (loop order) in the published frame of NACA
/// Reports 460 and 537: the chord line runs from the mean line's origin, where upper and
/// lower surface meet at `x = 0` (the thickness is zero there), to the trailing edge,
/// the midpoint `(1, y_c(1))` of the two trailing-edge points (thickness is laid off
/// symmetrically about the mean line). The raw outline is in that frame already
/// (`y_c(1) = 0`), except the reflexed 5-digit mean lines, whose rounded tabulated
/// `k2/k1` leave `|y_c(1)|` below 1e-4; a turn and scale about the origin puts their
/// trailing edge exactly on (1, 0). The coordinates are then kept as they are
/// ([`keep_frame`]); the chord line is [`ChordLine::Published`].
pub(crate) fn published_section(name: &str, raw: &[Point2<f64>]) -> Result<Section, ResampleError> {
    let (Some(first), Some(last)) = (raw.first(), raw.last()) else {
        return Err(ResampleError::TooFewPoints(0));
    };
    let te = nalgebra::center(first, last);
    let l2 = te.coords.norm_squared();
    if !(l2 > 0.0) || !l2.is_finite() {
        return Err(ResampleError::Degenerate);
    }
    // Multiplying by the complex conjugate of te / |te|^2 maps te to (1, 0) and keeps
    // the origin: the identity when te is (1, 0).
    let (c, s) = (te.x / l2, te.y / l2);
    let mapped: Vec<Point2<f64>> = raw
        .iter()
        .map(|p| Point2::new(c * p.x + s * p.y, c * p.y - s * p.x))
        .collect();
    Ok(keep_frame(name, &mapped)?.with_chord_line(ChordLine::Published))
}

/// Lays the 4-digit thickness distribution perpendicular to a mean line given as
/// `x -> (y_c, dy_c/dx)`, at `n` cosine-spaced stations per side; returns the raw loop
/// (upper trailing edge -> leading edge -> lower trailing edge), shared by the 4- and
/// 5-digit series (NACA Report 460; NACA Report 537).
pub(crate) fn thickened_outline(
    n: usize,
    t: f64,
    te: TrailingEdge,
    mean: impl Fn(f64) -> (f64, f64),
) -> Vec<Point2<f64>> {
    let xs = cosine_stations(n);
    let side = |sign: f64| -> Vec<Point2<f64>> {
        xs.iter()
            .map(|&x| {
                let yt = naca4_half_thickness(x, t, te);
                let (yc, dyc) = mean(x);
                let th = dyc.atan();
                Point2::new(x - sign * yt * th.sin(), yc + sign * yt * th.cos())
            })
            .collect()
    };
    let upper = side(1.0);
    let lower = side(-1.0);
    let mut pts: Vec<Point2<f64>> = upper.iter().rev().copied().collect();
    pts.extend(lower.iter().skip(1).copied());
    pts
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn naca0012_ordinates() {
        // Abbott & von Doenhoff, Theory of Wing Sections (Dover, 1959), Appendix I,
        // NACA 0012: y = 6.002 % at x = 30 %, 4.683 % at x = 10 % (from memory),
        // cross-checked here by the Report 460 equation.
        let t = 0.12;
        assert!((naca4_half_thickness(0.30, t, TrailingEdge::Open) - 0.06002).abs() < 5e-5);
        assert!((naca4_half_thickness(0.10, t, TrailingEdge::Open) - 0.04683).abs() < 5e-5);
        // Closed variant: zero thickness at the trailing edge (coefficients sum to ~0).
        assert!(naca4_half_thickness(1.0, t, TrailingEdge::Closed).abs() < 1e-4);
    }

    #[test]
    fn resampled_0012_is_symmetric() {
        let s = Naca4::from_digits("0012", TrailingEdge::Open)
            .unwrap()
            .section("naca0012", 60)
            .unwrap();
        let up = s.upper_le_to_te();
        let lo = s.lower_le_to_te();
        for (u, l) in up.iter().zip(lo) {
            assert!((u.y + l.y).abs() < 1e-9);
        }
    }
}
