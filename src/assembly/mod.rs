//! Assembling built blades into a rotor. This happens *after* the pipeline has built and
//! checked the blade: placement about the rotor axis (pitch, cone, azimuth), the hub
//! body with its shank sockets, the one-piece rotor, and the rotation-sense check.

mod hand;
mod hub;
mod onepiece;
mod rotor;

pub use hand::{
    check_hand, hand_description, hand_radii, HandOptions, HandReport, Side, StationHand,
};
pub use hub::{circle_sides, socket_volume, Hub, HubSpec, Sockets};
pub use onepiece::{one_piece, OnePieceBlade, OnePieceSpec};
pub use rotor::{
    assemble, blade_transform, place_blades, rigid, AssemblyError, BladeFacts, Rotor, RotorSpec,
    MAX_BLADES,
};
