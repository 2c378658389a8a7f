//! # spanwright
//!
//! Turns a rotor blade's design table into watertight, printable and machinable solids.
//!
//! The library is a one-way pipeline; each stage is one module:
//!
//! ```text
//! design (TOML/CSV, validated, units)
//!   -> airfoil (sections: generators, import, resampling, blending)
//!   -> blade (spanwise interpolation, stacking, twist, root and tip)
//!   -> loft (one B-spline skin through the placed sections)
//!   -> consumers: tessellate (watertight mesh), export (STL, 3MF, OBJ, STEP),
//!                 check (manifold, orientation, self-intersection), fit (printer),
//!                 props (mass, sections, stress), report (SVG, HTML, JSON)
//! ```
//!
//! Geometric conventions (blade frame, twist sign, rotation sense, section orientation)
//! are written once, in [`conventions`].

pub mod airfoil;
pub mod assembly;
pub mod atomic;
pub mod blade;
pub mod brep;
pub mod check;
pub mod conventions;
pub mod coupon;
pub mod design;
pub mod draft;
pub mod export;
pub mod fit;
pub mod interp;
pub mod loft;
pub mod mesh;
pub mod mount;
pub mod parallel;
pub mod pipeline;
pub mod planar;
pub mod props;
pub mod report;
pub mod rings;
pub mod root;
pub mod segment;
pub mod svg;
pub mod tessellate;
