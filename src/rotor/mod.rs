//! Rotors: assembly, rotation sense, hub body, and design tables from optimum-rotor theory.
//!
//! Design tables: [`draft`] turns a [`DraftSpec`] (tip and hub radius, blades, tip speed
//! ratio, the section's design lift coefficient and angle of attack) into a
//! [`DraftTable`] of stations, with the ideal power coefficient and graded [`Remark`]s.
//! The formulas live in [`optimum`]; [`bem`] estimates the power of the blade as written.

mod assembly;
pub mod bem;
mod draft;
mod hand;
mod hub;
mod line;
mod onepiece;
pub mod optimum;
mod remark;
mod spec;

pub use assembly::{assemble, blade_transform, place_blades, Rotor, RotorSpec, MAX_BLADES};
pub use draft::{
    draft, rotor_rpm, station_radii, DraftError, DraftStation, DraftTable, CL_HIGH, CSV_HEADER,
    LINE_SAMPLES, TIP_SPEED_CAUTION, TSR_SMALL_TURBINE, TSR_USUAL, TWIST_LIMIT,
};
pub use hand::{
    check_hand, hand_description, hand_radii, HandOptions, HandReport, Side, StationHand,
};
pub use hub::{circle_sides, socket_volume, Hub, HubSpec, Sockets};
pub use line::Line;
pub use onepiece::{one_piece, OnePieceSpec};
pub use remark::{index_list, Grade, Remark};
pub use spec::{
    DraftSpec, LinearRange, Method, Problem, Spacing, DEFAULT_MIN_CHORD_FRACTION, DEFAULT_SECTION,
    DEFAULT_STALL_ALPHA, DEFAULT_STATIONS,
};
