//! Airfoil sections: the [`Section`] type, published generators, coordinate-file import,
//! resampling to a common point structure, measures, blending and trailing-edge
//! thickening.

mod naca;
mod resample;
mod section;
mod spline;

pub use naca::{naca4_half_thickness, naca4_mean_line, Naca4, TrailingEdge};
pub use resample::{cosine_stations, normalize, ResampleError};
pub use section::Section;
pub use spline::Spline2;
