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
//! ```
//! use spanwright::assembly::HandOptions;
//! let design = spanwright::design::load(std::path::Path::new("examples/desk-fan.toml"))?;
//! let rotor = spanwright::pipeline::build_rotor(&design, &Default::default())?;
//! assert_eq!(rotor.blades.len(), 5);
//! for report in rotor.check_hand(&HandOptions::DEFAULT) {
//!     assert!(report.is_ok(), "{report}");
//! }
//! println!("{:.0} mm³ in {} bodies", rotor.envelope().signed_volume(), rotor.parts().len());
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use super::hand::{check_hand, hand_radii, HandOptions, HandReport};
use super::hub::{Hub, HubSpec};
use crate::design::{Design, DesignError, Flow, Rotation};
use crate::mesh::{Part, TriMesh};
use crate::pipeline::Model;
use nalgebra::{Matrix4, Rotation3, Translation3, Vector3};
use serde::Deserialize;

/// The `[rotor]` table of a design file (lengths in the file's unit until
/// [`RotorSpec::to_mm`]; angles always in degrees, whatever the file's angle unit).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct RotorSpec {
    /// Number of blades (at least 1).
    pub blades: u32,
    /// Hub radius, mm.
    pub hub_radius: f64,
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

impl RotorSpec {
    /// Converts every length by `k` (file unit to mm).
    pub fn to_mm(mut self, k: f64) -> Self {
        self.hub_radius *= k;
        self.hub = self.hub.map(|h| h.to_mm(k));
        self.one_piece = self.one_piece.map(|o| o.to_mm(k));
        self
    }

    /// Reads and validates the design's `[rotor]` table (in mm); `Ok(None)` without one.
    /// Problems name `rotor.<key>` in the design's file.
    pub fn from_design(design: &Design) -> Result<Option<RotorSpec>, DesignError> {
        let Some(spec) = design.table::<RotorSpec>("rotor")? else {
            return Ok(None);
        };
        let spec = spec.to_mm(design.length_to_mm);
        spec.validate(design)?;
        Ok(Some(spec))
    }

    /// Checks the values (lengths in mm).
    pub fn validate(&self, design: &Design) -> Result<(), DesignError> {
        let bad = |key: &str, msg: String| Err(DesignError::one(design.problem(key, msg)));
        if self.blades < 1 || self.blades > MAX_BLADES {
            return bad(
                "rotor.blades",
                format!(
                    "{} blades: give a whole number from 1 to {MAX_BLADES}",
                    self.blades
                ),
            );
        }
        if !(self.hub_radius > 0.0 && self.hub_radius.is_finite()) {
            return bad(
                "rotor.hub-radius",
                format!(
                    "{} is not a positive number of millimetres; give the hub's radius",
                    self.hub_radius
                ),
            );
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
        if let Some(h) = &self.hub {
            h.resolve(self, design.blade.rotation, design)?;
        }
        Ok(())
    }
}

/// An assembled rotor in rotor coordinates (mm).
#[derive(Debug, Clone)]
pub struct Rotor {
    /// Design name.
    pub name: String,
    /// The rotor settings (mm, degrees).
    pub spec: RotorSpec,
    /// Rotation sense seen from upstream.
    pub rotation: Rotation,
    /// Flow mode.
    pub flow: Flow,
    /// The placed blades, in order of azimuth (in the sense of rotation).
    pub blades: Vec<Part>,
    /// The rigid transform placing blade `k` (blade frame to rotor coordinates).
    pub transforms: Vec<Matrix4<f64>>,
    /// The hub body, when asked for.
    pub hub: Option<Part>,
    /// The hub's geometry, when asked for (for its genus and exact volume).
    pub hub_shape: Option<Hub>,
    /// The design's station radii, mm (where [`Rotor::check_hand`] looks).
    pub station_radii: Vec<f64>,
    /// Genus of each blade (one per cross hole through its shank).
    pub blade_genus: u32,
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

/// Assembles the rotor of a built blade: blades placed by [`blade_transform`] (cone
/// pivot at the blade's root face) and the hub body when the spec has one, meshed to
/// `blade_opts.tolerance`. Hub problems name `rotor.hub.<key>` in `design`'s file.
pub fn assemble(
    model: &Model,
    spec: &RotorSpec,
    blade_opts: &crate::design::BladeOptions,
    design: &Design,
) -> Result<Rotor, DesignError> {
    let name = model.name.as_str();
    let (blades, transforms) = place_blades(
        &model.part(),
        spec,
        blade_opts.rotation,
        model.blade.root_face(),
    );
    let hub_shape = match &spec.hub {
        Some(h) => Some(h.resolve(spec, blade_opts.rotation, design)?),
        None => None,
    };
    let hub = hub_shape
        .as_ref()
        .map(|h| h.part(name, blade_opts.tolerance));
    Ok(Rotor {
        name: name.to_string(),
        spec: spec.clone(),
        rotation: blade_opts.rotation,
        flow: blade_opts.flow,
        blades,
        transforms,
        hub,
        hub_shape,
        station_radii: model.blade.station_radii().to_vec(),
        blade_genus: model.expected_genus(),
    })
}

impl Rotor {
    /// The rotation-sense and flow-side check of every placed blade (see
    /// [`super::hand`]), at the stations strictly inside the span and midway between
    /// stations ([`super::hand_radii`]).
    pub fn check_hand(&self, opts: &HandOptions) -> Vec<HandReport> {
        let radii = hand_radii(&self.station_radii);
        self.blades
            .iter()
            .zip(&self.transforms)
            .map(|(p, m)| check_hand(&p.mesh, m, &radii, self.rotation, self.flow, opts))
            .collect()
    }

    /// Every body: the blades, then the hub (one object each in multi-body files).
    pub fn parts(&self) -> Vec<Part> {
        let mut out = self.blades.clone();
        out.extend(self.hub.clone());
        out
    }

    /// The genus each body of [`Rotor::parts`] must have, in the same order, for
    /// [`crate::check::CheckOptions::with_expected_genus`]: for a blade one per cross
    /// hole through its shank (its bore is blind), the hub's through-holes for the hub.
    pub fn expected_genus(&self) -> Vec<u32> {
        let mut out = vec![self.blade_genus; self.blades.len()];
        out.extend(self.hub_shape.as_ref().map(Hub::genus));
        out
    }

    /// All bodies in one mesh, for printer-fit checks only: the bodies are appended, not
    /// united, so where blades and hub overlap the mesh is not a single valid solid.
    pub fn envelope(&self) -> TriMesh {
        let mut m = TriMesh::new();
        for p in self.parts() {
            m.append(&p.mesh);
        }
        m
    }
}
