//! The exact closed solid of a bare blade skin (no root features), kept for callers that
//! have only a [`Skin`]; [`crate::brep`] builds every part with its features.

use super::ExportError;
use crate::brep::{piece_solid, PieceSpec, SkinOptions};
use crate::loft::Skin;
use truck_modeling::Solid;

/// Tolerances of [`step_solid_with`] (the skin's: see [`SkinOptions`]).
pub type BrepOptions = SkinOptions;

/// [`step_solid_with`] with [`BrepOptions::DEFAULT`].
///
/// # Errors
/// See [`step_solid_with`].
pub fn step_solid(skin: &Skin) -> Result<Solid, ExportError> {
    step_solid_with(skin, &BrepOptions::DEFAULT)
}

/// The closed solid bounded by `skin` and planar caps at its two ends: the skin split at
/// `u_le` into an upper and a lower B-spline face, a ruled trailing-edge face when the
/// trailing edge is blunt, planar root and tip caps; every face facing outward, graded
/// closed by the kernel. This is [`crate::brep::piece_solid`] with
/// [`PieceSpec::whole`]; for the blade with its root features use
/// [`crate::brep::blade_solid`].
///
/// # Errors
/// [`ExportError::Solid`] with the [`crate::brep::BrepError`].
pub fn step_solid_with(skin: &Skin, opts: &BrepOptions) -> Result<Solid, ExportError> {
    Ok(piece_solid(skin, &PieceSpec::whole(), opts)?)
}
