//! Printer fit: build volumes, orientation search, plate layouts, printability.

pub mod hull;
mod layout;
mod printability;
mod printer;
pub mod search;
mod stl_in;
mod svg;
pub mod yaw;

pub use layout::{layout, polygon_distance, Layout, LayoutOptions, Placed, Plate};
pub use printability::{
    printability, printability_of_outlines, slice, Cut, Printability, PrintabilityOptions,
};
pub use printer::{
    preset, preset_names, Printer, PrinterSpec, Volume, DEFAULT_CLEARANCE, DEFAULT_MARGIN,
    DEFAULT_MIN_FEATURE, DEFAULT_NOZZLE, PRESETS,
};
pub use search::{fit_part, score, Fit, FitOptions, Placement};
pub use stl_in::read_stl_part;
pub use svg::{escape, plate_svg};

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
    /// A part has no usable vertices.
    #[error("part \"{0}\" has no finite vertices; check the mesh file")]
    EmptyPart(String),
}
