//! Mass and section properties, materials, and the spanwise stress estimate.
//!
//! * [`MassProps`]: volume, area, centre of mass and inertia of a closed mesh, exact for
//!   the mesh (divergence theorem).
//! * [`Material`] presets and the printed-part [`Fill`] model.
//! * [`Balance`]: static imbalance of a rotor made of several parts.
//! * [`Slice`] and [`SectionProps`]: cuts of the mesh by planes `z = r` and their area,
//!   centroid and second moments.
//! * [`Stress`]: centrifugal and flap-bending stress along the span, safety factor and
//!   tip deflection. **An estimate, not a certification**: see [`CAUTIONS`].

mod balance;
mod mass;
mod material;
mod outboard;
mod section;
mod slice;
mod stress;

pub use balance::Balance;
pub use mass::{MassProps, Principal};
pub use material::{Fill, Material, UnknownMaterial};
pub use outboard::Outboard;
pub use section::SectionProps;
pub use slice::{Slice, SliceError};
pub use stress::{
    span_radii, LoadCase, StressError, StressRow, StressTable, ThrustSpread, CAUTIONS,
};

/// Section properties at each radius (ascending or not); radii where the plane misses
/// the part are skipped. Errors when a cut does not close.
pub fn section_table(
    mesh: &crate::mesh::TriMesh,
    radii: &[f64],
) -> Result<Vec<SectionProps>, SliceError> {
    let mut out = Vec::with_capacity(radii.len());
    for &r in radii {
        if let Some(p) = SectionProps::of_slice(&Slice::cut(mesh, r)?) {
            out.push(p);
        }
    }
    Ok(out)
}
