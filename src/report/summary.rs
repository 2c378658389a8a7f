//! The summary of a run over a design's variants (see [`crate::design::variants`]): one
//! row per variant, written as CSV and JSON.
//!
//! Columns (units in the names):
//!
//! | column | meaning |
//! |--------|---------|
//! | `variant` | the variant's name |
//! | `folder` | where its files are, relative to the output folder |
//! | `tip_radius_mm` | the blade's tip radius (its mesh's largest z) |
//! | `rotation` | `ccw` or `cw`, seen from upstream |
//! | `blade_volume_mm3` | the blade's enclosed volume |
//! | `material` | the material the mass is computed with |
//! | `blade_mass_g` | one blade's mass with the fill model (walls and infill) |
//! | `safety_factor` | the smallest safety factor along the span; empty without a load case |
//! | `fits` | `true` when every part to print fits the design's `[printer]` on its plates; empty without a printer |
//! | `segments` | pieces each blade is printed in (1: whole) |
//! | `seconds` | wall time of the variant's run |
//!
//! Every value but `seconds` is the same on every run of the same input; `seconds` is
//! there to compare the variants' cost and is the one column that changes between runs.

use serde::Serialize;

use crate::design::{Design, Rotation};
use crate::fit::{plan_job, FitError, JobItem, LayoutOptions, PrintabilityOptions, PrinterSpec};
use crate::pipeline::Outcome;
use crate::props::{Fill, FilledMass, MassProps, Material, ShellOptions, StressTable};

/// One variant's row of the summary.
#[derive(Debug, Clone, PartialEq, Serialize, serde::Deserialize)]
pub struct SummaryRow {
    /// The variant's name.
    pub variant: String,
    /// Its folder, relative to the output folder.
    pub folder: String,
    /// Tip radius, mm.
    pub tip_radius_mm: f64,
    /// Sense of rotation seen from upstream.
    pub rotation: Rotation,
    /// Enclosed volume of one blade, mm³.
    pub blade_volume_mm3: f64,
    /// Material key of the mass (`pla`, `petg`, ...).
    pub material: String,
    /// Mass of one blade with the fill model, g.
    pub blade_mass_g: f64,
    /// Smallest safety factor along the span (`None` without a load case).
    pub safety_factor: Option<f64>,
    /// Whether everything to print fits the printer (`None` without a printer).
    pub fits: Option<bool>,
    /// Pieces each blade is printed in (1: whole).
    pub segments: usize,
    /// Wall time of the variant's run, s.
    pub seconds: f64,
}

/// Why a row could not be made.
#[derive(Debug, thiserror::Error)]
pub enum SummaryError {
    /// The blade encloses no volume (a bug: built parts are checked).
    #[error("the blade of {0} encloses no volume")]
    NoVolume(String),
    /// The design's `[printer]` table is wrong.
    #[error(transparent)]
    Design(#[from] crate::design::DesignError),
    /// The printer cannot be resolved or the job not planned.
    #[error(transparent)]
    Fit(#[from] FitError),
}

impl SummaryRow {
    /// The row of a built variant: `design` and its `outcome`, the blade's mass with
    /// `material` and `fill`, the smallest safety factor of `stress` when given, whether
    /// the print set fits the design's `[printer]` when it has one (its plates planned as
    /// [`crate::fit::plan_job`] does with the default options). `seconds` starts at 0:
    /// set it when the variant's work is done.
    ///
    /// # Errors
    /// [`SummaryError`].
    pub fn of(
        variant: &str,
        folder: &str,
        design: &Design,
        outcome: &Outcome,
        material: &Material,
        fill: Fill,
        stress: Option<&StressTable>,
    ) -> Result<SummaryRow, SummaryError> {
        let blade = outcome.blade_part();
        let mesh = blade.mesh();
        let solid = MassProps::of_mesh(mesh, material.density_g_mm3())
            .ok_or_else(|| SummaryError::NoVolume(design.name.clone()))?;
        let printed =
            FilledMass::of_mesh(mesh, material.density_g_mm3(), fill, &ShellOptions::DEFAULT)
                .map_err(|_| SummaryError::NoVolume(design.name.clone()))?;
        let tip = mesh.bounding_box().map_or(0.0, |b| b.max.z);
        Ok(SummaryRow {
            variant: variant.to_string(),
            folder: folder.to_string(),
            tip_radius_mm: tip,
            rotation: design.blade.rotation,
            blade_volume_mm3: solid.volume,
            material: material.key.clone(),
            blade_mass_g: printed.props.mass,
            safety_factor: stress.map(|t| t.min_safety_factor),
            fits: fits(design, outcome)?,
            segments: outcome.segments.as_ref().map_or(1, |p| p.count),
            seconds: 0.0,
        })
    }
}

/// Whether the outcome's print set fits the design's `[printer]`, when it has one.
fn fits(design: &Design, outcome: &Outcome) -> Result<Option<bool>, SummaryError> {
    let Some(spec) = design.table_mm::<PrinterSpec>("printer")? else {
        return Ok(None);
    };
    let origin = format!("{} [printer]", design.file().display());
    let printer = spec.resolve(&origin)?;
    let job: Vec<JobItem<'_>> = crate::pipeline::design_job(outcome, design, None, None);
    let plan = plan_job(
        &job,
        &printer,
        &LayoutOptions::DEFAULT,
        &PrintabilityOptions::DEFAULT,
    )?;
    Ok(Some(plan.report.fits))
}

/// The rows as CSV (RFC 4180: a header line, then one line per row; empty cells for
/// values that do not apply).
pub fn summary_csv(rows: &[SummaryRow]) -> String {
    let mut w = csv::WriterBuilder::new()
        .terminator(csv::Terminator::CRLF)
        .from_writer(Vec::new());
    for row in rows {
        // Serialising plain values into memory cannot fail.
        let _ = w.serialize(row);
    }
    if rows.is_empty() {
        let _ = w.write_record(COLUMNS);
    }
    let bytes = w.into_inner().unwrap_or_default();
    String::from_utf8(bytes).unwrap_or_default()
}

/// The column names, in order.
pub const COLUMNS: [&str; 11] = [
    "variant",
    "folder",
    "tip_radius_mm",
    "rotation",
    "blade_volume_mm3",
    "material",
    "blade_mass_g",
    "safety_factor",
    "fits",
    "segments",
    "seconds",
];

/// The rows as a JSON array of objects (the CSV's columns as keys, `null` for values
/// that do not apply), pretty-printed with a final newline.
pub fn summary_json(rows: &[SummaryRow]) -> String {
    let mut s = serde_json::to_string_pretty(rows).unwrap_or_else(|_| "[]".into());
    s.push('\n');
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(name: &str, sf: Option<f64>, fits: Option<bool>) -> SummaryRow {
        SummaryRow {
            variant: name.into(),
            folder: name.into(),
            tip_radius_mm: 292.5,
            rotation: Rotation::Cw,
            blade_volume_mm3: 50391.25,
            material: "pla".into(),
            blade_mass_g: 38.19,
            safety_factor: sf,
            fits,
            segments: 0,
            seconds: 1.5,
        }
    }

    #[test]
    fn csv_has_the_columns_and_empty_cells() {
        let csv = summary_csv(&[
            row("a", Some(3.5), None),
            row("b, \"big\"", None, Some(true)),
        ]);
        let mut lines = csv.split("\r\n");
        assert_eq!(lines.next(), Some(COLUMNS.join(",").as_str()));
        assert_eq!(
            lines.next(),
            Some("a,a,292.5,cw,50391.25,pla,38.19,3.5,,0,1.5")
        );
        // RFC 4180, 2.6-2.7: a field with a comma or quote is quoted, quotes doubled.
        assert_eq!(
            lines.next(),
            Some("\"b, \"\"big\"\"\",\"b, \"\"big\"\"\",292.5,cw,50391.25,pla,38.19,,true,0,1.5")
        );
        assert_eq!(summary_csv(&[]), format!("{}\r\n", COLUMNS.join(",")));
    }
}
