//! Printer description: build volume, margins, clearance, nozzle and feature sizes.
//!
//! The printer coordinate frame (millimetres): the bed is the plane z = 0, parts stand on
//! it and grow toward +z. A box volume spans `0 <= x <= X`, `0 <= y <= Y`,
//! `0 <= z <= Z`; a round bed is centred on the origin, `x^2 + y^2 <= (D/2)^2`,
//! `0 <= z <= H`. The margin is kept from every side wall and from the top; the bed
//! itself (z = 0) is where parts rest.

use super::FitError;

/// Shape of the build volume, in millimetres.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "shape")]
pub enum Volume {
    /// Rectangular bed with a box-shaped volume.
    Box {
        /// Bed length along x, mm.
        x: f64,
        /// Bed length along y, mm.
        y: f64,
        /// Build height along z, mm.
        z: f64,
    },
    /// Round bed (centred on the origin) with a cylindrical volume.
    Round {
        /// Bed diameter, mm.
        diameter: f64,
        /// Build height, mm.
        height: f64,
    },
}

/// A resolved printer: every length in millimetres, validated.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Printer {
    /// Build volume.
    pub volume: Volume,
    /// Distance kept from the side walls and the top of the volume, mm (default 5).
    pub margin: f64,
    /// Gap kept between parts on one plate, mm (default 5).
    pub clearance: f64,
    /// Nozzle diameter, mm (default 0.4).
    pub nozzle: f64,
    /// Smallest wall the printer makes reliably, mm (default 0.8: two lines of a 0.4 mm
    /// nozzle, common practice).
    pub min_feature: f64,
}

/// Default margin from the walls, mm (common practice: clips and the nozzle's reach).
pub const DEFAULT_MARGIN: f64 = 5.0;
/// Default clearance between parts, mm (common practice).
pub const DEFAULT_CLEARANCE: f64 = 5.0;
/// Default nozzle diameter, mm (the most common size; common practice).
pub const DEFAULT_NOZZLE: f64 = 0.4;
/// Default minimum feature size, mm (two extrusion lines; common practice).
pub const DEFAULT_MIN_FEATURE: f64 = 0.8;

/// Generic size presets, named by size only: `(name, volume)`.
pub const PRESETS: [(&str, Volume); 4] = [
    (
        "small-180",
        Volume::Box {
            x: 180.0,
            y: 180.0,
            z: 180.0,
        },
    ),
    (
        "medium-220",
        Volume::Box {
            x: 220.0,
            y: 220.0,
            z: 250.0,
        },
    ),
    (
        "large-300",
        Volume::Box {
            x: 300.0,
            y: 300.0,
            z: 400.0,
        },
    ),
    (
        "round-200",
        Volume::Round {
            diameter: 200.0,
            height: 300.0,
        },
    ),
];

/// The names of the presets, for messages.
pub fn preset_names() -> String {
    PRESETS
        .iter()
        .map(|(n, _)| *n)
        .collect::<Vec<_>>()
        .join(", ")
}

/// The volume of a preset by name.
pub fn preset(name: &str) -> Option<Volume> {
    PRESETS.iter().find(|(n, _)| *n == name).map(|(_, v)| *v)
}

/// A printer as written in a design file's `[printer]` table or assembled from
/// command-line options. Lengths are in the file's unit (read it with `Design::table_mm`, which converts them).
///
/// ```toml
/// [printer]
/// preset = "medium-220"    # or: volume = [220, 220, 250]  or: diameter = 200, height = 300
/// margin = 5
/// clearance = 5
/// nozzle = 0.4
/// min-feature = 0.8
/// ```
#[derive(Debug, Clone, Default, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct PrinterSpec {
    /// A preset name (see [`PRESETS`]); explicit sizes override it.
    pub preset: Option<String>,
    /// Box volume `[x, y, z]`.
    pub volume: Option<[f64; 3]>,
    /// Round bed diameter (with `height`).
    pub diameter: Option<f64>,
    /// Round volume height (with `diameter`).
    pub height: Option<f64>,
    /// Margin from walls and top (default [`DEFAULT_MARGIN`] mm).
    pub margin: Option<f64>,
    /// Clearance between parts (default [`DEFAULT_CLEARANCE`] mm).
    pub clearance: Option<f64>,
    /// Nozzle diameter (default [`DEFAULT_NOZZLE`] mm).
    pub nozzle: Option<f64>,
    /// Minimum feature size (default [`DEFAULT_MIN_FEATURE`] mm).
    pub min_feature: Option<f64>,
}

/// Presets are already in millimetres and are not scaled.
impl crate::design::Lengths for PrinterSpec {
    fn to_mm(self, factor: f64) -> PrinterSpec {
        let s = |v: Option<f64>| v.map(|v| v * factor);
        PrinterSpec {
            preset: self.preset,
            volume: self.volume.map(|v| v.map(|c| c * factor)),
            diameter: s(self.diameter),
            height: s(self.height),
            margin: s(self.margin),
            clearance: s(self.clearance),
            nozzle: s(self.nozzle),
            min_feature: s(self.min_feature),
        }
    }
}

impl PrinterSpec {
    /// Fills unset fields from `other` (this one wins).
    pub fn or(&self, other: &PrinterSpec) -> PrinterSpec {
        PrinterSpec {
            preset: self.preset.clone().or_else(|| other.preset.clone()),
            volume: self.volume.or(other.volume),
            diameter: self.diameter.or(other.diameter),
            height: self.height.or(other.height),
            margin: self.margin.or(other.margin),
            clearance: self.clearance.or(other.clearance),
            nozzle: self.nozzle.or(other.nozzle),
            min_feature: self.min_feature.or(other.min_feature),
        }
    }

    /// Validates and resolves to a [`Printer`] in millimetres. `origin` names where the
    /// spec came from (a file and table, or "command line") for messages.
    pub fn resolve(&self, origin: &str) -> Result<Printer, FitError> {
        let bad = |key: &str, value: String, why: &str| FitError::Printer {
            origin: origin.to_string(),
            key: key.to_string(),
            value,
            why: why.to_string(),
        };
        let positive = |key: &str, v: f64| -> Result<f64, FitError> {
            if v.is_finite() && v > 0.0 {
                Ok(v)
            } else {
                Err(bad(key, v.to_string(), "must be a positive length"))
            }
        };
        let non_negative = |key: &str, v: f64| -> Result<f64, FitError> {
            if v.is_finite() && v >= 0.0 {
                Ok(v)
            } else {
                Err(bad(key, v.to_string(), "must be zero or a positive length"))
            }
        };
        let mut volume = match &self.preset {
            Some(name) => Some(preset(name).ok_or_else(|| {
                bad(
                    "preset",
                    format!("\"{name}\""),
                    &format!("is not a known preset; use one of {}", preset_names()),
                )
            })?),
            None => None,
        };
        match (self.volume, self.diameter, self.height) {
            (Some(_), Some(_), _) => {
                return Err(bad(
                    "volume",
                    "with diameter".into(),
                    "give either volume = [x, y, z] (box) or diameter and height (round bed)",
                ))
            }
            (Some([x, y, z]), None, _) => {
                volume = Some(Volume::Box {
                    x: positive("volume[0]", x)?,
                    y: positive("volume[1]", y)?,
                    z: positive("volume[2]", z)?,
                })
            }
            (None, Some(d), Some(h)) => {
                volume = Some(Volume::Round {
                    diameter: positive("diameter", d)?,
                    height: positive("height", h)?,
                })
            }
            (None, Some(d), None) => {
                return Err(bad(
                    "height",
                    "missing".into(),
                    &format!("a round bed (diameter = {d}) also needs height"),
                ))
            }
            (None, None, Some(h)) => {
                return Err(bad(
                    "diameter",
                    "missing".into(),
                    &format!("height = {h} alone is not a volume; add diameter (round bed) or use volume = [x, y, z]"),
                ))
            }
            (None, None, None) => {}
        }
        let volume = volume.ok_or_else(|| {
            bad(
                "volume",
                "missing".into(),
                &format!(
                    "give a preset ({}), volume = [x, y, z] or diameter and height",
                    preset_names()
                ),
            )
        })?;
        let printer = Printer {
            volume,
            margin: non_negative("margin", self.margin.unwrap_or(DEFAULT_MARGIN))?,
            clearance: non_negative("clearance", self.clearance.unwrap_or(DEFAULT_CLEARANCE))?,
            nozzle: positive("nozzle", self.nozzle.unwrap_or(DEFAULT_NOZZLE))?,
            min_feature: positive(
                "min-feature",
                self.min_feature.unwrap_or(DEFAULT_MIN_FEATURE),
            )?,
        };
        let (a, b, h) = printer.available();
        if a <= 0.0 || b <= 0.0 || h <= 0.0 {
            return Err(bad(
                "margin",
                printer.margin.to_string(),
                "leaves no room inside the build volume; use a smaller margin",
            ));
        }
        Ok(printer)
    }
}

impl Printer {
    /// Space available to a part after the margin, mm: `(x, y, z)` for a box, `(diameter,
    /// diameter, height)` for a round bed.
    pub fn available(&self) -> (f64, f64, f64) {
        let m = self.margin;
        match self.volume {
            Volume::Box { x, y, z } => (x - 2.0 * m, y - 2.0 * m, z - m),
            Volume::Round { diameter, height } => {
                (diameter - 2.0 * m, diameter - 2.0 * m, height - m)
            }
        }
    }

    /// Centre of the bed in printer coordinates, mm.
    pub fn bed_centre(&self) -> (f64, f64) {
        match self.volume {
            Volume::Box { x, y, .. } => (0.5 * x, 0.5 * y),
            Volume::Round { .. } => (0.0, 0.0),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn presets_and_overrides() {
        let p = PrinterSpec {
            preset: Some("small-180".into()),
            margin: Some(2.0),
            ..Default::default()
        }
        .resolve("test")
        .unwrap();
        assert_eq!(p.available(), (176.0, 176.0, 178.0));
        let round = PrinterSpec {
            diameter: Some(200.0),
            height: Some(100.0),
            ..Default::default()
        }
        .resolve("test")
        .unwrap();
        assert!(matches!(round.volume, Volume::Round { .. }));
    }

    #[test]
    fn reads_toml_table_with_our_keys() {
        let spec: PrinterSpec =
            toml::from_str("volume = [8.5, 8.5, 9.0]\nmargin = 0.2\nmin-feature = 0.04\n").unwrap();
        // Inches to millimetres: 25.4 mm per inch (exact by definition, NIST SP 811).
        let p = crate::design::Lengths::to_mm(spec.clone(), 25.4)
            .resolve("t")
            .unwrap();
        assert!(matches!(p.volume, Volume::Box { x, .. } if (x - 215.9).abs() < 1e-9));
        assert!((p.margin - 5.08).abs() < 1e-12 && (p.min_feature - 1.016).abs() < 1e-12);
        let e = toml::from_str::<PrinterSpec>("bed-size = 3")
            .unwrap_err()
            .to_string();
        assert!(e.contains("bed-size"), "{e}");
    }

    #[test]
    fn errors_name_key_and_fix() {
        let e = PrinterSpec {
            preset: Some("medium".into()),
            ..Default::default()
        }
        .resolve("design.toml [printer]")
        .unwrap_err()
        .to_string();
        assert!(e.contains("preset") && e.contains("medium-220"), "{e}");
        let e = PrinterSpec {
            volume: Some([100.0, -1.0, 100.0]),
            ..Default::default()
        }
        .resolve("x")
        .unwrap_err()
        .to_string();
        assert!(e.contains("volume[1]") && e.contains("-1"), "{e}");
        let e = PrinterSpec {
            volume: Some([10.0, 10.0, 10.0]),
            margin: Some(6.0),
            ..Default::default()
        }
        .resolve("x")
        .unwrap_err()
        .to_string();
        assert!(e.contains("margin"), "{e}");
    }
}
