//! Mass and section properties, materials, and the spanwise stress estimate.
//!
//! * [`MassProps`]: volume, area, centre of mass and inertia of a closed mesh, exact for
//!   the mesh (divergence theorem).
//! * [`Material`] presets and the printed-part [`Fill`]: a shell of wall thickness (a true
//!   inward offset of the part's slices, [`inward_offset`]) plus infill; [`FilledMass`]
//!   gives the printed part's mass, centre of mass and inertia.
//! * [`Balance`]: static imbalance of a rotor made of several parts.
//! * [`SectionProps`]: area, centroid and second moments of a cut of the mesh by a plane
//!   `z = r` ([`Slice`], the mesh stage's slicer, re-exported here).
//! * [`StressTable`]: centrifugal and flap-bending stress along the span, safety factor and
//!   tip deflection. **An estimate, not a certification**: see [`CAUTIONS`].

//!
//! ```
//! use nalgebra::Point3;
//! use spanwright::mesh::TriMesh;
//! use spanwright::props::{MassProps, Material, SectionProps, Slice};
//!
//! // A unit-edge tetrahedron standing on the z = 0 plane (outward triangles).
//! let mut m = TriMesh::new();
//! for p in [[0.0, 0.0, 0.0], [10.0, 0.0, 0.0], [0.0, 10.0, 0.0], [0.0, 0.0, 10.0]] {
//!     m.push_vertex(Point3::new(p[0], p[1], p[2]));
//! }
//! m.triangles = vec![[0, 2, 1], [0, 1, 3], [0, 3, 2], [1, 2, 3]];
//! let pla = Material::preset("pla").unwrap();
//! let p = MassProps::of_mesh(&m, pla.density_g_mm3()).unwrap();
//! assert!((p.volume - 1000.0 / 6.0).abs() < 1e-9);
//! // The cut at half height is a right triangle with legs of 5 mm.
//! let s = SectionProps::of_slice(&Slice::cut(&m, 5.0).unwrap()).unwrap();
//! assert!((s.area - 12.5).abs() < 1e-9);
//! ```

mod balance;
mod mass;
mod material;
mod outboard;
mod section;
mod shell;
mod stress;

pub use crate::mesh::{Slice, SliceError};
pub use balance::Balance;
pub use mass::{MassProps, Principal};
pub use material::{Fill, Material, UnknownMaterial};
pub use outboard::Outboard;
pub use section::SectionProps;
pub use shell::{
    intersection, inward_offset, FilledMass, ShellError, ShellOptions, MAX_SLICES,
    OFFSET_ARC_TOLERANCE,
};
pub use stress::{
    span_radii, LoadCase, StressError, StressRow, StressTable, ThrustSpread, CAUTIONS,
};

/// Section properties at each radius (ascending or not); radii where the plane misses
/// the part are skipped. Errors when a cut does not close.
pub fn section_table(
    mesh: &crate::mesh::TriMesh,
    radii: &[f64],
) -> Result<Vec<SectionProps>, SliceError> {
    Ok(Slice::cut_many(mesh, radii)?
        .iter()
        .filter_map(SectionProps::of_slice)
        .collect())
}
