//! Material presets and the printed-part fill model.
//!
//! Every number here is a **typical value, common practice** (recalled from memory of
//! suppliers' data sheets), not a specification: grades, suppliers, printers and print
//! settings change them widely. Printed parts are weaker than the bulk material and
//! anisotropic: layer bonding (loads across layers) often reaches only a fraction of the
//! in-layer strength. Measure your own parts or use the supplier's data for design work.

use std::fmt;
use std::str::FromStr;

/// A material: density, strength and stiffness (typical values, see the module docs).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Material {
    /// Short key used on the command line (`pla`, `petg`, ...).
    pub key: String,
    /// Human-readable name.
    pub name: String,
    /// Density of the solid material, g/cm^3.
    pub density: f64,
    /// Strength used as the allowable stress before the safety factor, MPa: the tensile
    /// strength for plastics, the tensile yield strength for metals.
    pub strength: f64,
    /// Young's modulus, MPa.
    pub modulus: f64,
    /// Where the numbers come from and how far to trust them.
    pub note: String,
}

/// Note attached to every preset.
const PRESET_NOTE: &str = "typical value, common practice (from memory of data sheets); \
printed parts are weaker than bulk material and anisotropic (weakest across layers)";

/// Presets: key, name, density g/cm^3, strength MPa, modulus MPa (typical values, common
/// practice, from memory).
const PRESETS: [(&str, &str, f64, f64, f64); 7] = [
    ("pla", "PLA", 1.24, 50.0, 3500.0),
    ("petg", "PETG", 1.27, 50.0, 2100.0),
    ("abs", "ABS", 1.04, 40.0, 2200.0),
    ("asa", "ASA", 1.07, 45.0, 2100.0),
    ("pa12", "Nylon (PA12)", 1.01, 48.0, 1700.0),
    ("pc", "Polycarbonate (PC)", 1.20, 65.0, 2300.0),
    (
        "al6061",
        "Aluminium 6061-T6 (yield strength)",
        2.70,
        276.0,
        68_900.0,
    ),
];

impl Material {
    /// All presets.
    pub fn presets() -> Vec<Material> {
        PRESETS
            .iter()
            .map(|&(key, name, density, strength, modulus)| Material {
                key: key.into(),
                name: name.into(),
                density,
                strength,
                modulus,
                note: PRESET_NOTE.into(),
            })
            .collect()
    }

    /// The preset with this key (case-insensitive; `nylon` is accepted for `pa12`,
    /// `aluminium`/`aluminum` for `al6061`).
    pub fn preset(key: &str) -> Option<Material> {
        let k = key.trim().to_ascii_lowercase();
        let k = match k.as_str() {
            "nylon" => "pa12",
            "aluminium" | "aluminum" | "6061" => "al6061",
            other => other,
        };
        Self::presets().into_iter().find(|m| m.key == k)
    }

    /// Density in g/mm^3 (the unit [`crate::props::MassProps::of_mesh`] expects).
    pub fn density_g_mm3(&self) -> f64 {
        self.density * 1e-3
    }
}

/// Error for an unknown material key.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("unknown material `{0}`; use one of: pla, petg, abs, asa, pa12 (nylon), pc, al6061")]
pub struct UnknownMaterial(pub String);

impl FromStr for Material {
    type Err = UnknownMaterial;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Material::preset(s).ok_or_else(|| UnknownMaterial(s.to_string()))
    }
}

impl fmt::Display for Material {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{} ({} g/cm3, {} MPa, E = {} MPa)",
            self.name, self.density, self.strength, self.modulus
        )
    }
}

/// How a printed part is filled: a solid shell of wall thickness plus a partial infill.
///
/// The shell is the material within `wall` of the surface, found by a true inward offset
/// of the part's slices ([`crate::props::FilledMass`] for a part,
/// [`Fill::fraction_of_section`] for a cut); the rest is filled to `infill`.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Fill {
    /// Wall (perimeter plus top/bottom skin) thickness, mm. Default 1.2.
    pub wall: f64,
    /// Infill volume fraction inside the shell, 0..=1. Default 0.2.
    pub infill: f64,
}

impl Fill {
    /// A fully solid part (machined or 100 % infill).
    pub const SOLID: Fill = Fill {
        wall: 0.0,
        infill: 1.0,
    };

    /// Default: 1.2 mm walls, 20 % infill (common practice).
    pub const DEFAULT: Fill = Fill {
        wall: 1.2,
        infill: 0.2,
    };
}

impl Default for Fill {
    fn default() -> Self {
        Fill::DEFAULT
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn presets_by_key() {
        assert!(Material::preset("Nylon").is_some());
        assert!("wood".parse::<Material>().is_err());
    }
}
