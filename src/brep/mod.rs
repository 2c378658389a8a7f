//! Exact solids (truck B-rep) of every part the mesh builders make, for STEP: the blade
//! with its root features, pieces of a blade cut by planes with channels and pin holes,
//! the hub and the one-piece rotor.
//!
//! A part is a piece of skin plus a list of features ([`PieceSpec`]):
//!
//! * **Skin** between two ends ([`Cut`]): the skin's own root and tip, or planes
//!   `z = const` normal to the span axis. The lofter's skin meets every such plane in an
//!   iso-curve, so a split face is an exact planar face (see [`Cut`]).
//! * **End holes** ([`EndHole`]) along the span axis from a planar end face: a bore, a
//!   spar channel, a pin hole; blind with a flat floor or a drill-point cone, or through
//!   to the other end face ([`Bottom`]).
//! * **Cross holes** ([`CrossHole`]) through the skin along the rotor axis (y).
//! * **Flange** ([`Flange`]) at the skin's root: plate and fillet.
//!
//! ```no_run
//! use spanwright::brep::{piece_solid, Bottom, Cut, End, EndHole, PieceSpec, SkinOptions};
//! # fn demo(skin: &spanwright::loft::Skin) -> Result<(), spanwright::brep::BrepError> {
//! // The segment between z = 120 and z = 240 mm, a 6 mm spar channel through it and a
//! // 3 mm pin hole, 8 mm deep with a 118 degree point, in its lower split face.
//! let spec = PieceSpec {
//!     end_holes: vec![
//!         EndHole { end: End::Low, centre: [0.0, 0.0], diameter: 6.0, depth: 0.0,
//!                   bottom: Bottom::Through },
//!         EndHole { end: End::Low, centre: [12.0, 0.5], diameter: 3.0, depth: 8.0,
//!                   bottom: Bottom::Point(118.0) },
//!     ],
//!     ..PieceSpec::between(Cut::Plane(120.0), Cut::Plane(240.0))
//! };
//! let solid = piece_solid(skin, &spec, &SkinOptions::DEFAULT)?;
//! # Ok(()) }
//! ```
//!
//! **Exact** means: every surface is the mesh's own surface, not an approximation of it.
//! The skin is the lofted B-spline itself (cut by knot insertion); circles, cylinders,
//! cones and the fillet are rational B-splines, which represent them exactly. The one
//! approximation is where a cylinder meets the lofted skin or another cylinder at an
//! angle (cross holes, hub sockets): that intersection curve has no closed form, so its
//! edge is a B-spline within 1e-7 mm of it, ten times finer than the file's stated
//! uncertainty (1e-6 mm), as in every CAD exchange. What cannot be built the way the
//! mesh has it is refused with [`BrepError::NotExact`], and the caller must then refuse
//! STEP for the part.
//!
//! Every solid returned is graded closed by truck (each edge used by exactly two faces,
//! in opposite senses), every face faces outward, and every knot vector is one a STEP
//! reader reads as written ([`check_knots`]). After writing, [`edge_uses`] checks a
//! shell read back from the file the same way.
//!
//! # Parts and their builders
//!
//! | part | builder | mesh it matches |
//! |---|---|---|
//! | blade (skin, flat, round or flat tip, flange, bore, cross holes) | [`blade_solid`] = [`piece_solid`] with [`PieceSpec::blade`] | [`crate::pipeline::run`] |
//! | any span piece of a blade (segments) | [`piece_solid`] | the segment builder's |
//! | hub (sockets, bore, bolt holes) | [`hub_solid`] | [`crate::assembly::Hub::mesh`] |
//! | one-piece rotor | [`one_piece_solid`] with [`PrismHub::new`] | [`crate::assembly::one_piece`] |
//! | fit coupon (a prism of planar loops) | [`prism_solid`] | [`crate::coupon::prism`] |
//!
//! Parts go to STEP through [`crate::export::write_step`] (one part per file) or
//! [`crate::export::write_step_assembly`] (products and placed instances).
//!
//! # Segments
//!
//! A segment is `PieceSpec::between(Cut::Plane(z0), Cut::Plane(z1))` (or
//! `Cut::SkinEnd` at the root or tip end) with its features: a spar channel is an
//! [`EndHole`] with [`Bottom::Through`] (or blind, [`Bottom::Flat`] /
//! [`Bottom::Point`], from either end), pin holes are blind [`EndHole`]s in a split face
//! ([`End::Low`] or [`End::High`]), and the root segment takes the root features of
//! [`PieceSpec::blade`]. Checks made here: every end hole stays inside the section
//! along its whole length, holes do not meet each other, split planes lie inside the
//! skin. A split plane closer than about 2e-6 (in the skin's span parameter) to a knot
//! of the skin is refused with the distance to move it, since a STEP file cannot tell
//! such knots apart. Wall thicknesses (printability) are the mesh builder's checks.

mod check;
mod cross;
mod error;
mod face;
mod geom;
mod hole;
mod hub;
mod knots;
mod onepiece;
mod piece;
mod prism;
mod skin;

pub use check::{edge_uses, EdgeUse};
pub use cross::CrossHole;
pub use error::BrepError;
pub use hole::Bottom;
pub use hub::hub_solid;
pub use knots::{check_knot_vector, check_knots};
pub use onepiece::{one_piece_solid, PrismHub};
pub use piece::{blade_solid, piece_solid, End, EndHole, Flange, PieceSpec};
pub use prism::prism_solid;
pub use skin::{Cut, SkinOptions};
