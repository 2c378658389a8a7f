//! The surface model: one B-spline skin interpolating the placed sections.
//!
//! Parametrisation: `u` runs around the section from the upper trailing edge (`u = 0`)
//! over the leading edge (`u = u_le`) to the lower trailing edge (`u = 1`); `v` runs along
//! the span from the root face (`v = 0`) to the tip face (`v = 1`). The closed solid is
//! this skin plus, when the trailing edge is blunt, the ruled trailing-edge face between
//! the curves `u = 0` and `u = 1`, plus the planar root and tip caps bounded by the
//! curves `v = 0` and `v = 1` (each in a plane `z = const`, see [`crate::conventions`]).

use nalgebra::Point3;

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
