//! The report data: what the JSON report holds (schema: `src/report/schema.json`,
//! also available as [`SCHEMA`]) and what the HTML report shows.

use crate::blade::StackingSummary;
use crate::check::CheckedPart;
use crate::props::{
    Balance, Fill, FilledMass, MassProps, Material, SectionProps, ShellOptions, StressTable,
    CAUTIONS,
};

/// Schema identifier written into every JSON report; bumped on incompatible changes.
pub const SCHEMA_ID: &str = "spanwright-report/1";

/// The JSON Schema (draft 2020-12) of the JSON report.
pub const SCHEMA: &str = include_str!("schema.json");

/// Units used throughout the report.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Units {
    /// Lengths: "mm".
    pub length: &'static str,
    /// Masses: "g".
    pub mass: &'static str,
    /// Forces: "N".
    pub force: &'static str,
    /// Stresses and moduli: "MPa".
    pub stress: &'static str,
    /// Angles: "deg".
    pub angle: &'static str,
}

impl Default for Units {
    fn default() -> Self {
        Units {
            length: "mm",
            mass: "g",
            force: "N",
            stress: "MPa",
            angle: "deg",
        }
    }
}

/// Mass properties of one part, with the fill model applied.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PartSummary {
    /// Part name.
    pub name: String,
    /// Triangle count of the mesh.
    pub triangles: usize,
    /// Enclosed volume, mm^3.
    pub volume: f64,
    /// Surface area, mm^2.
    pub area: f64,
    /// Material fraction of the volume from the fill model, 0..=1.
    pub fill_fraction: f64,
    /// Mass, g.
    pub mass: f64,
    /// Centre of mass, mm.
    pub centroid: [f64; 3],
    /// Inertia tensor about the centre of mass, g mm^2, rows.
    pub inertia: [[f64; 3]; 3],
    /// Principal moments, g mm^2, ascending.
    pub principal_moments: [f64; 3],
    /// Unit principal axes, in the order of the moments.
    pub principal_axes: [[f64; 3]; 3],
    /// Moment of inertia about the rotor axis (y through the origin), g mm^2.
    pub inertia_rotor_axis: f64,
    /// Bounding box smallest corner, mm.
    pub bbox_min: [f64; 3],
    /// Bounding box largest corner, mm.
    pub bbox_max: [f64; 3],
}

impl PartSummary {
    /// Summary of `part` made of `material` with `fill`; `None` when it encloses no volume.
    pub fn of_part(
        part: &CheckedPart,
        material: &Material,
        fill: Fill,
    ) -> Option<(PartSummary, MassProps)> {
        let filled = FilledMass::of_mesh(
            part.mesh(),
            material.density_g_mm3(),
            fill,
            &ShellOptions::DEFAULT,
        )
        .ok()?;
        let (fraction, p) = (filled.fraction, filled.props);
        let pr = p.principal();
        let bb = part.mesh().bounding_box()?;
        let row = |i: usize| [p.inertia[(i, 0)], p.inertia[(i, 1)], p.inertia[(i, 2)]];
        Some((
            PartSummary {
                name: part.name().to_string(),
                triangles: part.mesh().len(),
                volume: p.volume,
                area: p.area,
                fill_fraction: fraction,
                mass: p.mass,
                centroid: [p.centroid.x, p.centroid.y, p.centroid.z],
                inertia: [row(0), row(1), row(2)],
                principal_moments: pr.moments,
                principal_axes: pr.axes.map(|a| [a.x, a.y, a.z]),
                inertia_rotor_axis: p.inertia_about_rotor_axis(),
                bbox_min: [bb.min.x, bb.min.y, bb.min.z],
                bbox_max: [bb.max.x, bb.max.y, bb.max.z],
            },
            p,
        ))
    }
}

/// Static balance of all parts together (see [`Balance`]).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BalanceSummary {
    /// Mass of each part, g.
    pub masses: Vec<f64>,
    /// Total mass, g.
    pub total_mass: f64,
    /// Centre of mass of all parts, mm.
    pub centroid: [f64; 3],
    /// Distance of the total centre of mass from the rotor axis, mm.
    pub offset: f64,
    /// Static imbalance, g mm.
    pub imbalance: f64,
    /// Heaviest minus lightest part, g.
    pub mass_spread: f64,
    /// Index of the heaviest part.
    pub heaviest: usize,
    /// Index of the lightest part.
    pub lightest: usize,
}

impl From<&Balance> for BalanceSummary {
    fn from(b: &Balance) -> Self {
        BalanceSummary {
            masses: b.masses.clone(),
            total_mass: b.total_mass,
            centroid: [b.centroid.x, b.centroid.y, b.centroid.z],
            offset: b.offset,
            imbalance: b.imbalance,
            mass_spread: b.mass_spread,
            heaviest: b.heaviest,
            lightest: b.lightest,
        }
    }
}

/// The whole report.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Report {
    /// [`SCHEMA_ID`].
    pub schema: &'static str,
    /// Design or part name.
    pub name: String,
    /// Input file, when known.
    pub source: Option<String>,
    /// Version of spanwright that wrote the report.
    pub generator: String,
    /// Units of every number.
    pub units: Units,
    /// Material.
    pub material: Material,
    /// Fill model.
    pub fill: Fill,
    /// One entry per part.
    pub parts: Vec<PartSummary>,
    /// Static balance of all parts together (only with two or more parts).
    pub balance: Option<BalanceSummary>,
    /// Section properties of the first part along the span.
    pub sections: Vec<SectionProps>,
    /// Stress estimate of the first part (only when a speed or wind is given).
    pub stress: Option<StressTable>,
    /// Stacking rule of the first part and how far its section centroids sit off the
    /// stacking axis (only when the report is made from a design).
    pub stacking: Option<StackingSummary>,
    /// The segments of a split blade: masses, net sections at the joints and the stress
    /// there (only when the report is made from a design whose blade is split).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub segments: Option<super::joints::SegmentsSummary>,
    /// Cautions.
    pub cautions: Vec<String>,
}

impl Report {
    /// The cautions every report carries.
    pub fn cautions() -> Vec<String> {
        CAUTIONS.iter().map(|s| s.to_string()).collect()
    }
}
