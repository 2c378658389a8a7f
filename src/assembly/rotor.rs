//! Rotor assembly: the built blade pitched, coned and copied about the rotor axis.
//!
//! Rotor coordinates are the blade frame of [`crate::conventions`] with the rotor axis
//! along y (flow toward +y). Blade `k` (from 0) is placed by the rigid transform
//!
//! ```text
//! T_k = A(phi_k) * C(cone) * P(pitch)
//! P: rotation about the span axis (z, through the stacking axis) by +pitch for a
//!    counter-clockwise rotor, -pitch for a clockwise one: positive pitch turns the
//!    leading edge upstream, like twist.
//! C: rotation about the line through (0, 0, pivot) parallel to x, tilting the span
//!    toward +y (downstream) by the cone angle; pivot = the blade's root face radius.
//! A: rotation about the rotor axis in the sense of rotation (about -y for
//!    counter-clockwise seen from upstream, +y for clockwise) by
//!    phi_k = azimuth-offset + k * 360 / blades.
//! ```
//!
//! With these choices the clockwise rotor is exactly the mirror image (x -> -x) of the
//! counter-clockwise one, blade by blade.
//!
//! The assembly takes plain values from the stages below it (the blade's
//! [`BladeFacts`] and, for placing bodies, its mesh); the pipeline reads the design's
//! `[rotor]` table, asks for the assembly, checks every body and names design keys in
//! errors ([`AssemblyError::key`]).
//!
//! ```
//! let design = spanwright::design::load(std::path::Path::new("examples/desk-fan.toml"))?;
//! let outcome = spanwright::pipeline::run(&design, &Default::default())?;
//! let rotor = outcome.rotor.as_ref().expect("the desk fan has a [rotor] table");
//! assert_eq!(rotor.transforms.len(), 5);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use super::hand::{check_hand, hand_radii, HandOptions, HandReport};
use super::hub::{Hub, HubSpec};
use crate::design::Lengths;
use crate::design::{Flow, Rotation};
use crate::mesh::{Part, TriMesh};
use crate::root::RootSpec;
use nalgebra::{IsometryMatrix3, Matrix4, Rotation3, Translation3, Vector3};
use rayon::prelude::*;
use serde::Deserialize;

/// A rotor setting that cannot be assembled: the design key at fault (as written in a
/// design file, e.g. `rotor.hub.bore`) and what is wrong with how to fix it. The
/// pipeline turns it into a design problem naming the file and line.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{key}: {message}")]
pub struct AssemblyError {
    /// Key path in the design file.
    pub key: String,
    /// What is wrong and how to fix it.
    pub message: String,
}

impl AssemblyError {
    /// An error at `key`.
    pub fn new(key: &str, message: impl Into<String>) -> Self {
        Self {
            key: key.to_string(),
            message: message.into(),
        }
    }
}

/// What the assembly needs to know of the built blade, as plain values (mm, degrees).
#[derive(Debug, Clone, PartialEq)]
pub struct BladeFacts {
    /// Rotation sense seen from upstream.
    pub rotation: Rotation,
    /// Flow mode.
    pub flow: Flow,
    /// The blade's root table, when it has one (mm).
    pub root: Option<RootSpec>,
    /// Radius of the blade's root face, mm.
    pub root_face: f64,
    /// Distance of the first station's stacking point from the stacking axis (its sweep
    /// and prebend), mm: where the shank is centred.
    pub shank_offset: f64,
    /// The design's station radii, mm.
    pub station_radii: Vec<f64>,
    /// Mesh tolerance, mm.
    pub tolerance: f64,
}

/// The `[rotor]` table of a design file (lengths in the file's unit until
/// [`RotorSpec::to_mm`]; angles always in degrees, whatever the file's angle unit).
///
/// | key | default | meaning |
/// |-----|---------|---------|
/// | `blades` | required | number of blades, 1 to [`MAX_BLADES`] (one blade needs a counterweight spanwright does not make: see [`Rotor::notes`]) |
/// | `pitch` | 0 | collective pitch added to the twist, degrees, within ±90 |
/// | `cone` | 0 | precone, degrees, within ±45 |
/// | `azimuth-offset` | 0 | angle of the first blade, degrees |
/// | `[rotor.hub]` | none | a hub disc, see [`HubSpec`] |
/// | `[rotor.one-piece]` | none | blades and hub as one solid, see [`super::OnePieceSpec`] |
/// | `hub-radius` | | **no longer needed**: the blades join the hub at their own root face (the first station, or the root face of a `[root]` shank); still read, it must equal that radius and gives a note to remove it |
///
/// Where the blades join the hub is the blade's root face, from the stations and
/// `[root]`; the hub disc's size is `rotor.hub.diameter`. Each has one name.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct RotorSpec {
    /// Number of blades (at least 1).
    pub blades: u32,
    /// Deprecated and not needed: the radius where the blades join the hub, which is the
    /// blade's root face. When given it must equal the root face (checked by
    /// [`RotorSpec::validate`]), mm.
    #[serde(default)]
    pub hub_radius: Option<f64>,
    /// Collective pitch added to the twist, degrees (default 0); positive turns the
    /// leading edge upstream.
    #[serde(default)]
    pub pitch: f64,
    /// Precone, degrees (default 0); positive tilts the blades downstream (+y).
    #[serde(default)]
    pub cone: f64,
    /// Angle of the first blade from +z, in the sense of rotation, degrees (default 0).
    #[serde(default)]
    pub azimuth_offset: f64,
    /// Optional hub body.
    pub hub: Option<HubSpec>,
    /// Optional one-piece print: blades joined by a prismatic hub.
    pub one_piece: Option<super::onepiece::OnePieceSpec>,
}

/// Largest blade count accepted (a sanity bound, not a design rule).
pub const MAX_BLADES: u32 = 64;

impl Lengths for RotorSpec {
    fn to_mm(mut self, k: f64) -> Self {
        self.hub_radius = self.hub_radius.map(|r| r * k);
        self.hub = self.hub.map(|h| h.to_mm(k));
        self.one_piece = self.one_piece.map(|o| o.to_mm(k));
        self
    }
}

impl RotorSpec {
    /// Checks the values (lengths in mm) against the blade, and resolves the hub: the
    /// hub's geometry when the spec asks for one.
    ///
    /// # Errors
    /// [`AssemblyError`] naming the key at fault.
    pub fn validate(&self, blade: &BladeFacts) -> Result<Option<Hub>, AssemblyError> {
        let bad = |key: &str, msg: String| Err(AssemblyError::new(key, msg));
        if self.blades < 1 || self.blades > MAX_BLADES {
            return bad(
                "rotor.blades",
                format!(
                    "{} blades: give a whole number from 1 to {MAX_BLADES}",
                    self.blades
                ),
            );
        }
        if let Some(h) = self.hub_radius {
            let face = blade.root_face;
            if !((h - face).abs() <= joint_slack(blade)) {
                return bad(
                    "rotor.hub-radius",
                    format!(
                        "{h} mm, but the blades join the hub at their root face, {face:.3} mm \
                         from the axis ({}); this key is no longer needed: remove it (to move \
                         the blades, move the stations{})",
                        root_face_words(blade),
                        if blade.root.is_some() {
                            " or change root.shank-length"
                        } else {
                            ""
                        }
                    ),
                );
            }
        }
        if !(self.pitch.abs() < 90.0) {
            return bad(
                "rotor.pitch",
                format!(
                    "{} degrees: give a collective pitch between -90 and 90 degrees",
                    self.pitch
                ),
            );
        }
        if !(self.cone.abs() < 45.0) {
            return bad(
                "rotor.cone",
                format!(
                    "{} degrees: give a cone angle between -45 and 45 degrees",
                    self.cone
                ),
            );
        }
        if !self.azimuth_offset.is_finite() {
            return bad(
                "rotor.azimuth-offset",
                format!("{}: give an angle in degrees", self.azimuth_offset),
            );
        }
        match &self.hub {
            Some(h) => h.resolve(self, blade).map(Some),
            None => Ok(None),
        }
    }
}

/// How far the deprecated `rotor.hub-radius` may be from the root face and still mean it:
/// the mesh tolerance (a value written to the tolerance), at least 1e-6 of the radius.
fn joint_slack(blade: &BladeFacts) -> f64 {
    blade.tolerance.max(1e-6 * blade.root_face.abs().max(1.0))
}

/// Where the root face comes from, in the design's words.
pub(crate) fn root_face_words(blade: &BladeFacts) -> &'static str {
    if blade.root.is_some() {
        "the first station less root.transition-length and root.shank-length"
    } else {
        "the first station's radius"
    }
}

impl RotorSpec {
    /// Notes for the user about this rotor (print them with the build summary): a
    /// deprecated key to remove, and the caution a one-blade rotor needs.
    pub fn notes(&self) -> Vec<String> {
        let mut notes = Vec::new();
        if self.hub_radius.is_some() {
            notes.push(
                "rotor.hub-radius is no longer needed (the blades join the hub at their root \
                 face, and the disc's size is rotor.hub.diameter): remove it"
                    .to_string(),
            );
        }
        if self.blades == 1 {
            notes.push(
                "caution: a one-blade rotor is out of balance by the blade's own weight; it \
                 needs a counterweight opposite the blade, which spanwright does not make. \
                 Balance the real rotor before it runs, and follow local codes and licensed \
                 engineering practice"
                    .to_string(),
            );
        }
        notes
    }
}

/// An assembled rotor in rotor coordinates (mm): where each blade goes and the hub.
#[derive(Debug, Clone)]
pub struct Rotor {
    /// The rotor settings (mm, degrees).
    pub spec: RotorSpec,
    /// Rotation sense seen from upstream.
    pub rotation: Rotation,
    /// Flow mode.
    pub flow: Flow,
    /// The rigid transform placing blade `k` (blade frame to rotor coordinates), in
    /// order of azimuth (in the sense of rotation).
    pub transforms: Vec<Matrix4<f64>>,
    /// The hub's geometry, when asked for.
    pub hub: Option<Hub>,
    /// The design's station radii, mm (where [`Rotor::check_hand`] looks).
    pub station_radii: Vec<f64>,
    /// Notes for the user ([`RotorSpec::notes`]): deprecated keys and cautions.
    pub notes: Vec<String>,
}

/// The rigid transform of blade `k` (see the module docs); `pivot` is the cone pivot's
/// radius, mm.
pub fn blade_transform(spec: &RotorSpec, rotation: Rotation, pivot: f64, k: u32) -> Matrix4<f64> {
    let sense = match rotation {
        Rotation::Ccw => 1.0,
        Rotation::Cw => -1.0,
    };
    let pitch = Rotation3::from_axis_angle(&Vector3::z_axis(), sense * spec.pitch.to_radians());
    // Rotation about +x by -cone sends +z toward +y.
    let cone = Translation3::new(0.0, 0.0, pivot).to_homogeneous()
        * Rotation3::from_axis_angle(&Vector3::x_axis(), -spec.cone.to_radians()).to_homogeneous()
        * Translation3::new(0.0, 0.0, -pivot).to_homogeneous();
    let phi = spec.azimuth_offset + 360.0 * f64::from(k) / f64::from(spec.blades.max(1));
    // Counter-clockwise seen from upstream is a rotation about -y.
    let azimuth = Rotation3::from_axis_angle(&Vector3::y_axis(), -sense * phi.to_radians());
    azimuth.to_homogeneous() * cone * pitch.to_homogeneous()
}

/// Places copies of `blade` (in the blade frame) about the rotor axis.
pub fn place_blades(
    blade: &Part,
    spec: &RotorSpec,
    rotation: Rotation,
    pivot: f64,
) -> (Vec<Part>, Vec<Matrix4<f64>>) {
    (0..spec.blades)
        .map(|k| {
            let m = blade_transform(spec, rotation, pivot, k);
            let part = Part {
                name: format!("{}-blade-{}", blade.name, k + 1),
                mesh: blade.mesh.transformed(&m),
            };
            (part, m)
        })
        .unzip()
}

/// Assembles the rotor of a blade: blades placed by [`blade_transform`] (cone pivot at
/// the blade's root face) and the hub when the spec has one.
///
/// # Errors
/// [`AssemblyError`] naming the `[rotor]` key at fault.
pub fn assemble(spec: &RotorSpec, blade: &BladeFacts) -> Result<Rotor, AssemblyError> {
    let hub = spec.validate(blade)?;
    let transforms = (0..spec.blades)
        .map(|k| blade_transform(spec, blade.rotation, blade.root_face, k))
        .collect();
    Ok(Rotor {
        spec: spec.clone(),
        rotation: blade.rotation,
        flow: blade.flow,
        transforms,
        hub,
        station_radii: blade.station_radii.clone(),
        notes: spec.notes(),
    })
}

/// A rigid transform (rotation and translation, as [`blade_transform`] makes) as an
/// isometry. The 3 x 3 block is taken as it is: it is a rotation by construction.
pub fn rigid(m: &Matrix4<f64>) -> IsometryMatrix3<f64> {
    IsometryMatrix3::from_parts(
        Translation3::new(m[(0, 3)], m[(1, 3)], m[(2, 3)]),
        Rotation3::from_matrix_unchecked(m.fixed_view::<3, 3>(0, 0).into_owned()),
    )
}

impl Rotor {
    /// The rotation-sense and flow-side check of every placed blade mesh (`placed[k]`
    /// is the blade placed by `transforms[k]`; see `check_hand`), at the stations
    /// strictly inside the span and midway between stations ([`super::hand_radii`]).
    pub fn check_hand(&self, placed: &[&TriMesh], opts: &HandOptions) -> Vec<HandReport> {
        let radii = hand_radii(&self.station_radii);
        // The blades side by side, reported in order.
        placed
            .par_iter()
            .zip(&self.transforms)
            .map(|(mesh, m)| check_hand(mesh, m, &radii, self.rotation, self.flow, opts))
            .collect()
    }
}
