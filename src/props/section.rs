//! Properties of a cut section: area, centroid, second moments, principal axes.
//!
//! Closed-form polygon integrals (Green's theorem): for each edge `(x_i, y_i) ->
//! (x_j, y_j)` with `c = x_i y_j - x_j y_i`,
//! `A = sum c / 2`, `Qx = integral(y dA) = sum c (y_i + y_j) / 6`,
//! `integral(y^2 dA) = sum c (y_i^2 + y_i y_j + y_j^2) / 12`,
//! `integral(x y dA) = sum c (x_i y_j + 2 x_i y_i + 2 x_j y_j + x_j y_i) / 24`.
//! Holes (clockwise loops) subtract by themselves.

use nalgebra::Point2;

use crate::mesh::Slice;

/// Section properties at one radius. Lengths in mm, second moments in mm^4.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct SectionProps {
    /// Plane position `z`, mm.
    pub radius: f64,
    /// Number of closed loops in the cut (1 for a plain solid blade).
    pub loops: usize,
    /// Area, mm^2.
    pub area: f64,
    /// Perimeter (all loops), mm.
    pub perimeter: f64,
    /// Centroid x (chordwise), mm.
    pub cx: f64,
    /// Centroid y (along the rotor axis), mm.
    pub cy: f64,
    /// Second moment about the centroidal axis parallel to x, `integral((y - cy)^2 dA)`, mm^4.
    pub ixx: f64,
    /// Second moment about the centroidal axis parallel to y, `integral((x - cx)^2 dA)`, mm^4.
    pub iyy: f64,
    /// Product of area, `integral((x - cx)(y - cy) dA)`, mm^4.
    pub ixy: f64,
    /// Largest principal second moment, mm^4.
    pub i1: f64,
    /// Smallest principal second moment, mm^4.
    pub i2: f64,
    /// Angle of the principal axis of `i1` from the x axis toward y, degrees.
    pub angle: f64,
    /// Polar moment `ixx + iyy`, mm^4. For torsion of a thin closed section this
    /// overestimates the stiffness (the torsion constant is smaller): an estimate only.
    pub polar: f64,
}

impl SectionProps {
    /// Properties of closed loops (material on the left of each loop). `None` when the
    /// loops enclose no positive area.
    pub fn of_loops(radius: f64, loops: &[Vec<Point2<f64>>]) -> Option<SectionProps> {
        // Shift to a reference point for precision.
        let n = loops.iter().map(Vec::len).sum::<usize>();
        if n < 3 {
            return None;
        }
        let o = loops
            .iter()
            .flatten()
            .fold(nalgebra::Vector2::zeros(), |s, p| s + p.coords)
            / n as f64;
        let (mut a, mut qx, mut qy, mut sxx, mut syy, mut sxy, mut per) =
            (0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
        for ring in loops {
            for (i, p) in ring.iter().enumerate() {
                let q = ring[(i + 1) % ring.len()];
                let (xi, yi) = (p.x - o.x, p.y - o.y);
                let (xj, yj) = (q.x - o.x, q.y - o.y);
                let c = xi * yj - xj * yi;
                a += c;
                qx += c * (yi + yj);
                qy += c * (xi + xj);
                sxx += c * (yi * yi + yi * yj + yj * yj);
                syy += c * (xi * xi + xi * xj + xj * xj);
                sxy += c * (xi * yj + 2.0 * xi * yi + 2.0 * xj * yj + xj * yi);
                per += (q - p).norm();
            }
        }
        let area = a / 2.0;
        if !(area.is_finite() && area > 0.0) {
            return None;
        }
        let (cxr, cyr) = (qy / 6.0 / area, qx / 6.0 / area);
        let ixx = sxx / 12.0 - area * cyr * cyr;
        let iyy = syy / 12.0 - area * cxr * cxr;
        let ixy = sxy / 24.0 - area * cxr * cyr;
        let mean = 0.5 * (ixx + iyy);
        let r = (0.5 * (ixx - iyy)).hypot(ixy);
        // I(phi) = ixx cos^2 + iyy sin^2 - 2 ixy sin cos is largest at this angle.
        let angle = 0.5 * (-2.0 * ixy).atan2(ixx - iyy);
        Some(SectionProps {
            radius,
            loops: loops.len(),
            area,
            perimeter: per,
            cx: cxr + o.x,
            cy: cyr + o.y,
            ixx,
            iyy,
            ixy,
            i1: mean + r,
            i2: mean - r,
            angle: angle.to_degrees(),
            polar: ixx + iyy,
        })
    }

    /// Properties of a mesh cut (see [`Slice::cut`]).
    pub fn of_slice(slice: &Slice) -> Option<SectionProps> {
        Self::of_loops(slice.radius, &slice.loops)
    }

    /// Second moment that resists bending in the y direction (flapwise, along the rotor
    /// axis) when the moment acts about x only: `(ixx iyy - ixy^2) / iyy`, mm^4 (equal to
    /// `ixx` for a section symmetric about either axis).
    pub fn flap_stiffness(&self) -> f64 {
        if self.iyy > 0.0 {
            (self.ixx * self.iyy - self.ixy * self.ixy) / self.iyy
        } else {
            self.ixx
        }
    }

    /// Bending stress coefficients for a moment `m` (N mm) bending the section toward
    /// +y (a load toward +y outboard): returns `(b, c)` with stress
    /// `sigma = b (x - cx) + c (y - cy)` in MPa. Plane sections stay plane; no moment about
    /// the y axis (unsymmetrical bending, any mechanics of materials text).
    pub fn flap_bending(&self, m: f64) -> (f64, f64) {
        // integral(sigma x) = b iyy + c ixy = 0; integral(sigma y) = b ixy + c ixx = -m.
        let det = self.ixx * self.iyy - self.ixy * self.ixy;
        if det <= 0.0 {
            return (0.0, 0.0);
        }
        (m * self.ixy / det, -m * self.iyy / det)
    }
}
