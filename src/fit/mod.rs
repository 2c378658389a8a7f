//! Printer fit: build volumes, orientation search, plate layouts, printability.
//!
//! * [`PrinterSpec`] / [`Printer`]: the build volume (box or round bed), margin from the
//!   walls and top, clearance between parts, nozzle and minimum feature size, in mm;
//!   generic size presets ([`PRESETS`]); read from a design file's `[printer]` table with
//!   `design.table_mm::<PrinterSpec>("printer")`.
//! * [`fit_part`]: does one part fit, in which orientation (angles and matrix), with what
//!   gaps; if not, the smallest overshoot found and a uniform scale that fits. The search
//!   is a branch and bound over "down" directions with the yaw solved exactly by rotating
//!   calipers; its angular-resolution guarantee and the exact check on every vertex are
//!   described in [`search`].
//! * [`fit_extents`]: only whether points fit (the same search, no pose chosen), and
//!   their extents in the orientation found; the segment planner asks it many times.
//! * [`layout`]: several parts on as few plates as the heuristic finds, clearance kept;
//!   [`plate_svg`] draws a plate seen from above.
//! * [`plan_job`]: a whole print job (every checked part a design produces, with its
//!   copies): each part fitted alone, every copy laid out, and a verdict that accounts
//!   for every copy; [`JobPlan::plate`] gives a plate's checked parts, placed, for the
//!   writers.
//! * [`orient`]: the pose a person would print, among those that fit: least overhang
//!   needing support ([`underside()`]), contact with the bed, layers along a blade's span
//!   (the main stress); the best few poses offered in [`Fit::orientation`] with their
//!   figures and why one was chosen; pose classes ([`PoseClass`]: root down, flat on
//!   the pressure side, on the leading edge, ...) can be asked for.
//! * [`advice`]: supports, brim and trailing edge against the nozzle, with reasons.
//! * [`printability`]: trailing-edge and section thickness along the whole span (shank,
//!   transition, stations, round tip) against the nozzle and the minimum feature size;
//!   [`printability_of_blade`] names the region of each shortfall and what would change it.
//!
//! ```
//! use spanwright::fit::{fit_part, FitOptions, PrinterSpec};
//! use spanwright::mesh::TriMesh;
//! use nalgebra::{Point3, Vector3};
//!
//! // A 100 x 4 x 4 mm bar (a closed box mesh) and a 80 x 80 x 10 mm volume: it fits only
//! // diagonally, lying down.
//! let bar = TriMesh::cuboid(Point3::origin(), Vector3::new(100.0, 4.0, 4.0));
//! let printer = PrinterSpec { volume: Some([80.0, 80.0, 10.0]), margin: Some(0.0), ..Default::default() }
//!     .resolve("example")?;
//! let fit = fit_part("bar", &bar, &printer, &FitOptions::DEFAULT)?;
//! assert!(fit.fits);
//! assert!(fit.size[0] > 60.0 && fit.size[1] > 60.0); // diagonal
//! # Ok::<(), spanwright::fit::FitError>(())
//! ```

pub mod advice;
pub mod hull;
mod job;
mod layout;
pub mod orient;
pub mod pose;
mod printability;
mod printer;
pub mod search;
mod stl_in;
mod svg;
pub mod underside;
pub mod yaw;

pub use advice::{advise, AdviceOptions, PrintAdvice, TrailingEdgeAdvice};
pub use job::{
    isometry, plan_job, FitFigures, JobItem, JobPlan, JobReport, PartFit, PlateItem, MAX_COPIES,
};
pub use layout::{layout, layout_fitted, polygon_distance, Layout, LayoutOptions, Placed, Plate};
pub use orient::{Choice, Orientation, Pose, PrintOptions, ScoreTerms};
pub use pose::{BladeAxes, PoseClass, UnknownPose};
pub use printability::{
    printability, printability_of_blade, printability_of_outlines, Cut, Printability,
    PrintabilityOptions, Shortfall, SpanLayout, SpanRegion, Zone,
};
pub use printer::{
    preset, preset_names, Printer, PrinterSpec, Volume, DEFAULT_CLEARANCE, DEFAULT_MARGIN,
    DEFAULT_MIN_FEATURE, DEFAULT_NOZZLE, PRESETS,
};
pub use search::{fit_extents, fit_part, Fit, FitOptions, Placement};
pub use stl_in::{parse_stl, read_stl_part};
pub use svg::plate_svg;
pub use underside::{underside, Underside, UndersideOptions};

/// Errors of the printer-fit stage.
#[derive(Debug, thiserror::Error)]
pub enum FitError {
    /// A printer description is wrong.
    #[error("{origin}: printer {key} = {value} {why}")]
    Printer {
        /// Where the description came from.
        origin: String,
        /// The key at fault.
        key: String,
        /// The value given.
        value: String,
        /// What is wrong and how to fix it.
        why: String,
    },
    /// An STL file cannot be read.
    #[error("{path}: {why}")]
    Stl {
        /// The file.
        path: String,
        /// What is wrong and how to fix it.
        why: String,
    },
    /// A triangle names a vertex the mesh does not have.
    #[error("part \"{part}\": triangle {triangle} names vertex {vertex}, but the mesh has {count} vertices; rebuild or repair the mesh")]
    BadIndex {
        /// The part.
        part: String,
        /// Index of the triangle.
        triangle: usize,
        /// The vertex index named.
        vertex: u32,
        /// Number of vertices in the mesh.
        count: usize,
    },
    /// A part has no usable vertices.
    #[error("part \"{0}\" has no finite vertices; check the mesh file")]
    EmptyPart(String),
}
