//! Drafting a station table from optimum-rotor theory. This happens *before* the
//! pipeline: its output is a design table (CSV) that `design` reads like any other.
//!
//! [`draft`] turns a [`DraftSpec`] (tip and inner radius, blades, tip speed ratio, the
//! section's design lift coefficient and angle of attack) into a [`DraftTable`] of
//! stations, with the ideal power coefficient and graded [`Remark`]s. The formulas live
//! in [`optimum`]; [`bem`] estimates the power of the blade as written; [`Line`] is the
//! least-squares straight line used to linearise chord and twist.

pub mod bem;
mod line;
pub mod optimum;
mod remark;
mod spec;
mod table;

pub use line::Line;
pub use remark::{index_list, Remark, Severity};
pub use spec::{
    BadValue, DraftSpec, LinearRange, Method, Spacing, DEFAULT_MIN_CHORD_FRACTION, DEFAULT_SECTION,
    DEFAULT_STALL_ALPHA, DEFAULT_STATIONS,
};
pub use table::{
    draft, rotor_rpm, station_radii, DraftError, DraftStation, DraftTable, CL_HIGH, CSV_HEADER,
    LINE_SAMPLES, TIP_SPEED_CAUTION, TSR_SMALL_TURBINE, TSR_USUAL, TWIST_LIMIT,
};
