//! Geometric measures of a section: thickness, camber, trailing-edge thickness,
//! leading-edge radius, area and centroid.

use super::resample::ResampleError;
use super::section::Section;
use super::spline::Spline2;
use nalgebra::Point2;

/// Points per side of the resampling on which thickness and camber are measured.
pub const MEASURE_POINTS: usize = 401;

/// Measures of a unit-chord section (all lengths in chord units, areas in chord²).
/// Thickness and camber are taken at equal x on both surfaces, perpendicular to the
/// section's chord line (the x axis; which line that is, [`Section::chord_line`] says),
/// as the NACA tables list ordinates at common stations (Abbott & von Doenhoff, *Theory
/// of Wing Sections*, Dover 1959, Appendices I and II), from a resampling with
/// [`MEASURE_POINTS`] per side; the maxima are refined by a parabola through the three
/// best stations. On a generated NACA section in its published frame they give the
/// designation's camber and thickness (4.0 % at 40 % and 12.0 % for a 4412).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Measures {
    /// Maximum thickness, fraction of chord.
    pub thickness: f64,
    /// Chord position of the maximum thickness, fraction of chord.
    pub thickness_at: f64,
    /// Maximum camber (signed, largest magnitude of the mean line), fraction of chord.
    pub camber: f64,
    /// Chord position of the maximum camber (0 for a symmetric section).
    pub camber_at: f64,
    /// Trailing-edge thickness: distance between the two trailing-edge points.
    pub te_thickness: f64,
    /// The leading-edge point (the outline's foremost point), chord units: (0, 0) when
    /// the chord line was drawn to the farthest point, a little ahead of and above it on
    /// a cambered section in its published frame.
    pub leading_edge: Point2<f64>,
    /// Leading-edge radius estimate: radius of curvature of the outline's spline at the
    /// leading edge.
    pub le_radius: f64,
    /// Enclosed area (polygon through the section's own points), chord².
    pub area: f64,
    /// Centroid of the enclosed area, chord units.
    pub centroid: Point2<f64>,
}

/// Largest value of `v` over the stations `x`, refined by the parabola through the best
/// station and its neighbours. Returns `(value, x)`.
pub(crate) fn refined_max(x: &[f64], v: &[f64]) -> (f64, f64) {
    let (i, _) = v
        .iter()
        .enumerate()
        .fold((0, f64::MIN), |a, (i, &b)| if b > a.1 { (i, b) } else { a });
    if i == 0 || i + 1 >= v.len() {
        return (v[i], x[i]);
    }
    let (x0, x1, x2) = (x[i - 1], x[i], x[i + 1]);
    let (y0, y1, y2) = (v[i - 1], v[i], v[i + 1]);
    // Newton divided differences of the interpolating parabola.
    let d01 = (y1 - y0) / (x1 - x0);
    let d12 = (y2 - y1) / (x2 - x1);
    let a = (d12 - d01) / (x2 - x0);
    if a >= 0.0 {
        return (y1, x1);
    }
    let b = d01 - a * (x0 + x1);
    let xm = (-b / (2.0 * a)).clamp(x0, x2);
    let ym = y0 + (xm - x0) * (d01 + a * (xm - x1));
    (ym, xm)
}

/// Stations, thickness and mean line of a resampled section (same x on both sides).
pub(crate) fn distributions(s: &Section) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
    let up = s.upper_le_to_te();
    let lo = s.lower_le_to_te();
    let x: Vec<f64> = up.iter().map(|p| p.x).collect();
    let t: Vec<f64> = up.iter().zip(lo).map(|(u, l)| u.y - l.y).collect();
    let c: Vec<f64> = up.iter().zip(lo).map(|(u, l)| 0.5 * (u.y + l.y)).collect();
    (x, t, c)
}

/// Area and centroid of the closed polygon (shoelace formula and its first moments).
pub(crate) fn area_centroid(p: &[Point2<f64>]) -> (f64, Point2<f64>) {
    let n = p.len();
    let (mut a, mut cx, mut cy) = (0.0, 0.0, 0.0);
    for i in 0..n {
        let (q, r) = (p[i], p[(i + 1) % n]);
        let cross = q.x * r.y - r.x * q.y;
        a += cross;
        cx += (q.x + r.x) * cross;
        cy += (q.y + r.y) * cross;
    }
    let a = 0.5 * a;
    if a == 0.0 {
        return (0.0, Point2::origin());
    }
    (a.abs(), Point2::new(cx / (6.0 * a), cy / (6.0 * a)))
}

impl Section {
    /// Measures of a section in the section frame (see [`Measures`]).
    pub fn measures(&self) -> Result<Measures, ResampleError> {
        let r = self.resample(MEASURE_POINTS)?;
        let (x, t, c) = distributions(&r);
        let (thickness, thickness_at) = refined_max(&x, &t);
        let neg: Vec<f64> = c.iter().map(|v| -v).collect();
        let (cmax, cmax_at) = refined_max(&x, &c);
        let (cmin, cmin_at) = refined_max(&x, &neg);
        let (mut camber, mut camber_at) = if cmax >= cmin {
            (cmax, cmax_at)
        } else {
            (-cmin, cmin_at)
        };
        if camber.abs() < 1e-7 {
            camber = 0.0;
            camber_at = 0.0;
        }
        // Leading-edge curvature of the spline through the resampled points.
        let pts = r.points();
        let le_radius = Spline2::fit(pts)
            .map(|sp| {
                let k = sp.curvature(sp.knots()[r.leading_edge_index()]);
                if k.abs() > 0.0 {
                    1.0 / k.abs()
                } else {
                    f64::INFINITY
                }
            })
            .unwrap_or(0.0);
        let (area, centroid) = area_centroid(self.points());
        let le = self.points()[self.leading_edge_index()];
        Ok(Measures {
            leading_edge: le,
            thickness,
            thickness_at,
            camber,
            camber_at,
            te_thickness: self.te_gap(),
            le_radius,
            area,
            centroid,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parabola_vertex_is_exact_for_a_parabola() {
        // y = 1 - (x - 0.3)^2 sampled unevenly: the refinement returns the vertex exactly
        // (elementary algebra).
        let x = [0.0, 0.1, 0.25, 0.45, 0.6];
        let v: Vec<f64> = x.iter().map(|x| 1.0 - (x - 0.3) * (x - 0.3)).collect();
        let (m, at) = refined_max(&x, &v);
        assert!((m - 1.0).abs() < 1e-12 && (at - 0.3).abs() < 1e-12);
    }

    #[test]
    fn unit_square_centroid() {
        let p = [
            Point2::new(0.0, 0.0),
            Point2::new(1.0, 0.0),
            Point2::new(1.0, 1.0),
            Point2::new(0.0, 1.0),
        ];
        let (a, c) = area_centroid(&p);
        assert!((a - 1.0).abs() < 1e-15 && (c - Point2::new(0.5, 0.5)).norm() < 1e-15);
    }
}
