//! Design input: the blade design table and its options, read from TOML or CSV,
//! validated, and converted to millimetres and degrees.
//!
//! Every later stage reads a [`Design`]; nothing downstream parses text again. Optional
//! tables that belong to later stages (root, tip, rotor, printer, material, ...) stay in
//! [`Design::tables`] and are read by their own module through [`Design::table`], so each
//! stage owns its keys and its validation while errors still name the key path.

use std::path::PathBuf;

/// Which way the rotor exchanges energy with the flow.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Flow {
    /// Extracts power from the flow (wind or water turbine).
    #[default]
    Turbine,
    /// Drives the flow (propeller, fan).
    Propeller,
}

/// Sense of rotation seen from upstream (the side the flow comes from).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Rotation {
    /// Counter-clockwise seen from upstream.
    #[default]
    Ccw,
    /// Clockwise seen from upstream.
    Cw,
}

/// One row of the design table, in millimetres and degrees.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Station {
    /// Distance from the rotor axis, mm.
    pub radius: f64,
    /// Chord length, mm.
    pub chord: f64,
    /// Twist, degrees; positive turns the leading edge toward upstream (see
    /// [`crate::conventions`]).
    pub twist: f64,
    /// Section name: a designation such as `naca2412` or a section file.
    pub section: String,
    /// Relative thickness (fraction of chord) to scale the section to, if given.
    pub thickness: Option<f64>,
    /// Chordwise offset of the stacking point (sweep), mm, positive toward the trailing edge.
    pub sweep: f64,
    /// Out-of-plane offset (prebend), mm, positive downstream.
    pub prebend: f64,
    /// Where the row came from (`file:line` for CSV, key path for TOML), for messages.
    pub origin: String,
}

/// Where the stacking axis passes through each section.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Stacking {
    /// Chord fraction of the stacking point (0.25 = aerodynamic centre, the default).
    pub chord_fraction: f64,
}

impl Default for Stacking {
    fn default() -> Self {
        Self {
            chord_fraction: 0.25,
        }
    }
}

/// Blade-wide options.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BladeOptions {
    /// Stacking axis position.
    pub stacking: Stacking,
    /// Flow mode (turbine or propeller).
    pub flow: Flow,
    /// Rotation sense seen from upstream.
    pub rotation: Rotation,
    /// Points per side each section is resampled to (default 120).
    pub points_per_side: usize,
    /// Largest allowed distance between mesh and exact surface, mm (default 0.01).
    pub tolerance: f64,
    /// Minimum trailing-edge thickness, mm, applied by thickening (default: none).
    pub min_te_thickness: Option<f64>,
}

impl Default for BladeOptions {
    fn default() -> Self {
        Self {
            stacking: Stacking::default(),
            flow: Flow::default(),
            rotation: Rotation::default(),
            points_per_side: 120,
            tolerance: 0.01,
            min_te_thickness: None,
        }
    }
}

/// A validated design, in millimetres and degrees.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// Design name (file stem when not given); names output files.
    pub name: String,
    /// The design file, when read from one; section files are looked up beside it.
    pub source: Option<PathBuf>,
    /// Stations, radius strictly increasing, at least two.
    pub stations: Vec<Station>,
    /// Blade-wide options.
    pub blade: BladeOptions,
    /// Factor from the file's length unit to millimetres (for the optional tables).
    pub length_to_mm: f64,
    /// Optional tables owned by later stages (`root`, `tip`, `rotor`, `printer`, ...).
    pub tables: toml::Table,
}
