//! Airfoil sections: the [`Section`] type, published generators, coordinate-file import
//! and export, resampling to a common point structure, measures, blending, thickness
//! scaling and trailing-edge thickening.
//!
//! ```
//! use spanwright::airfoil::{resolve, blend};
//! let a = resolve("naca0012", &[]).unwrap();
//! let b = resolve("NACA 0018", &[]).unwrap();
//! let mid = blend(&a, &b, 0.5, 101).unwrap();
//! let m = mid.measures().unwrap();
//! assert!((m.thickness - 0.15).abs() < 1e-4);
//! ```

mod blend;
mod designation;
mod error;
mod import;
mod measures;
mod naca;
mod naca5;
mod resample;
mod resolve;
mod section;
mod spline;
mod thicken;
mod write;

pub use blend::{blend, DEFAULT_POINTS};
pub use designation::{Designation, Parsed, GENERATED_POINTS};
pub use error::SectionError;
pub use import::{
    normalize_raw, parse, parse_raw, read, Layout, RawOutline, MIN_AREA, MIN_POINTS, RANGE_MARGIN,
};
pub use measures::{Measures, MEASURE_POINTS};
pub use naca::{naca4_half_thickness, naca4_mean_line, Naca4, TrailingEdge};
pub use naca5::Naca5;
pub use resample::{
    cosine_stations, is_normalised, keep_frame, normalize, normalize_with_frame, to_section_frame,
    Frame, ResampleError, LE_SNAP, NORMALISED_TOLERANCE,
};
pub use resolve::{find_file, resolve, EXTENSIONS};
pub use section::{ChordLine, Section};
pub use spline::Spline2;
pub use thicken::{thicken_te, Thickened};
pub use write::{to_text, write, DEFAULT_DECIMALS, MAX_DECIMALS, MIN_DECIMALS};
