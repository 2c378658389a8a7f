//! Assembling a report: mass properties of every part, balance, section table, stress
//! estimate and pictures.

use super::model::{BalanceSummary, PartSummary, Report, Units, SCHEMA_ID};
use super::preview::{render, Item, Marks, PreviewOptions};
use super::{planform_svg, stack_svg, stress_svg, three_view_svg};
use crate::blade::Blade;
use crate::check::CheckedPart;
use crate::design::{Rotation, Station};
use crate::mesh::TriMesh;
use crate::props::{
    section_table, span_radii, Balance, Fill, LoadCase, Material, Slice, SliceError, StressError,
    StressTable,
};

/// What a report is made from.
#[derive(Debug, Clone)]
pub struct ReportInput<'a> {
    /// Design or part name.
    pub name: String,
    /// Input file, when known.
    pub source: Option<String>,
    /// The parts; the first must be one whole blade in the blade frame for the section
    /// table and stress estimate (see [`crate::conventions`]).
    pub parts: &'a [CheckedPart],
    /// Design stations, for the planform picture and the section radii.
    pub stations: Option<&'a [Station]>,
    /// The blade the first part was built from, when known: its stacking axis is drawn
    /// and its stacking summarised.
    pub blade: Option<&'a Blade>,
    /// The rotor's sense of rotation, when known (a design's `blade.rotation`): the
    /// preview then draws it and the wind.
    pub rotation: Option<Rotation>,
    /// Material.
    pub material: Material,
    /// Fill model.
    pub fill: Fill,
    /// Operating point; no stress estimate when `None`.
    pub load: Option<LoadCase>,
    /// Extra radii for the section table, mm.
    pub extra_radii: Vec<f64>,
    /// Number of evenly spaced cuts for the stress estimate. Default 101.
    pub stress_cuts: usize,
    /// Number of outlines in the stacked-sections picture. Default 11.
    pub picture_cuts: usize,
}

/// The pictures of a report, as inline SVG documents.
#[derive(Debug, Clone, PartialEq)]
pub struct Pictures {
    /// Chord, twist and thickness against radius (only with design stations).
    pub planform: Option<String>,
    /// Sections seen from the tip.
    pub sections: String,
    /// Three views with overall dimensions.
    pub three_view: String,
    /// Stress and safety factor against radius (only with a load case).
    pub stress: Option<String>,
    /// Shaded 3-D preview of every part as placed (see [`super::preview`]), with the
    /// rotation sense and the wind when the rotation is known.
    pub preview: Option<PreviewPng>,
}

/// A PNG picture and its size.
#[derive(Debug, Clone, PartialEq)]
pub struct PreviewPng {
    /// The PNG file's bytes.
    pub png: Vec<u8>,
    /// Width, px.
    pub width: u32,
    /// Height, px.
    pub height: u32,
}

impl PreviewPng {
    /// The preview of `parts` as they are placed (blade frame), seen from
    /// [`PreviewOptions::DEFAULT`]'s view, with the marks of `rotation` when given (the
    /// arc just outside the parts' reach from the rotor axis).
    pub fn of_parts(parts: &[CheckedPart], rotation: Option<Rotation>) -> PreviewPng {
        let items: Vec<Item<'_>> = parts.iter().map(|p| Item::solid(p.mesh())).collect();
        let marks = rotation.map(|r| Marks::blade_frame(r, 0.0));
        let opts = PreviewOptions::DEFAULT;
        let image = render(&items, marks.as_ref(), &opts);
        PreviewPng {
            png: image.png(),
            width: image.width,
            height: image.height,
        }
    }
}

/// Why a report could not be made.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    /// No parts were given.
    #[error("nothing to report: no parts")]
    NoParts,
    /// A part encloses no volume.
    #[error("part `{0}` encloses no volume: its mesh is empty, open or inside-out (check and repair it)")]
    NoVolume(String),
    /// The first part crosses the rotor axis plane z = 0, so it is not one blade in the
    /// blade frame.
    #[error(
        "part `{part}` spans z = {min:.3} to {max:.3} mm: sections and stress need one blade \
         in the blade frame (span along +z from the rotor axis, root at small positive z; \
         see the conventions). Give a single blade, or put it first"
    )]
    NotABlade {
        /// Part name.
        part: String,
        /// Smallest z, mm.
        min: f64,
        /// Largest z, mm.
        max: f64,
    },
    /// A cut failed.
    #[error("part `{part}`: {source}")]
    Slice {
        /// Part name.
        part: String,
        /// The cut error.
        source: SliceError,
    },
    /// The stress estimate failed.
    #[error("part `{part}`: {source}")]
    Stress {
        /// Part name.
        part: String,
        /// The stress error.
        source: StressError,
    },
}

/// Steps reported to the progress callback.
pub const STEPS: u64 = 5;

/// Builds the report and its pictures. `progress(step, message)` is called before each of
/// the [`STEPS`] steps.
pub fn build(
    input: &ReportInput<'_>,
    progress: &mut dyn FnMut(u64, &str),
) -> Result<(Report, Pictures), ReportError> {
    let first = input.parts.first().ok_or(ReportError::NoParts)?;
    progress(0, "mass properties");
    let (parts, balance) = mass_summaries(input)?;
    progress(1, "section properties");
    let mesh = first.mesh();
    check_blade_frame(first)?;
    let sections = section_table(mesh, &section_radii(input, mesh)).map_err(slice_error(first))?;
    progress(2, "stress estimate");
    let stress = stress_estimate(input, first)?;
    progress(3, "pictures");
    let pictures = pictures(input, first, stress.as_ref())?;
    progress(4, "report");
    let report = Report {
        schema: SCHEMA_ID,
        name: input.name.clone(),
        source: input.source.clone(),
        generator: format!("spanwright {}", env!("CARGO_PKG_VERSION")),
        units: Units::default(),
        material: input.material.clone(),
        fill: input.fill,
        parts,
        balance,
        sections,
        stress,
        stacking: input.blade.map(Blade::stacking),
        segments: None,
        cautions: Report::cautions(),
    };
    Ok((report, pictures))
}

/// Every part's mass properties, and the balance of several.
fn mass_summaries(
    input: &ReportInput<'_>,
) -> Result<(Vec<PartSummary>, Option<BalanceSummary>), ReportError> {
    let mut parts = Vec::new();
    let mut props = Vec::new();
    for part in input.parts {
        let (s, p) = PartSummary::of_part(part, &input.material, input.fill)
            .ok_or_else(|| ReportError::NoVolume(part.name().to_string()))?;
        parts.push(s);
        props.push(p);
    }
    let balance = if props.len() > 1 {
        Balance::of_parts(&props).map(|b| BalanceSummary::from(&b))
    } else {
        None
    };
    Ok((parts, balance))
}

/// The blade lies at positive radii (in the blade frame).
fn check_blade_frame(first: &CheckedPart) -> Result<(), ReportError> {
    if let Some(bb) = first.mesh().bounding_box() {
        if bb.min.z < 0.0 {
            return Err(ReportError::NotABlade {
                part: first.name().to_string(),
                min: bb.min.z,
                max: bb.max.z,
            });
        }
    }
    Ok(())
}

/// Radii of the section table: the design's stations within the span (or 21 even
/// cuts), with the extra radii, sorted, each once.
fn section_radii(input: &ReportInput<'_>, mesh: &TriMesh) -> Vec<f64> {
    let span = span_radii(mesh, 2);
    let (r0, r1) = (span[0], span[1]);
    let mut radii: Vec<f64> = match input.stations {
        Some(st) if !st.is_empty() => st.iter().map(|s| s.radius.clamp(r0, r1)).collect(),
        _ => span_radii(mesh, 21),
    };
    radii.extend(input.extra_radii.iter().copied());
    radii.sort_by(f64::total_cmp);
    radii.dedup();
    radii
}

/// A cut of `part` that failed.
fn slice_error(part: &CheckedPart) -> impl Fn(SliceError) -> ReportError + '_ {
    move |source| ReportError::Slice {
        part: part.name().to_string(),
        source,
    }
}

/// The stress estimate of the first part, with a load case.
fn stress_estimate(
    input: &ReportInput<'_>,
    first: &CheckedPart,
) -> Result<Option<StressTable>, ReportError> {
    let Some(load) = &input.load else {
        return Ok(None);
    };
    let mesh = first.mesh();
    let table = StressTable::estimate(
        mesh,
        &span_radii(mesh, input.stress_cuts.max(3)),
        &input.material,
        input.fill,
        load,
    )
    .map_err(|source| ReportError::Stress {
        part: first.name().to_string(),
        source,
    })?;
    Ok(Some(table))
}

/// The report's pictures.
fn pictures(
    input: &ReportInput<'_>,
    first: &CheckedPart,
    stress: Option<&StressTable>,
) -> Result<Pictures, ReportError> {
    let mesh = first.mesh();
    let mut slices = Vec::new();
    for r in span_radii(mesh, input.picture_cuts.max(2)) {
        slices.push(Slice::cut(mesh, r).map_err(slice_error(first))?);
    }
    let axis = input.blade.map_or(Vec::new(), |b| b.stacking_axis(64));
    let axis_at_cuts: Vec<nalgebra::Point2<f64>> = match input.blade {
        Some(b) => slices
            .iter()
            .map(|s| {
                let p = b.axis_point(s.radius);
                nalgebra::Point2::new(p.x, p.y)
            })
            .collect(),
        None => Vec::new(),
    };
    Ok(Pictures {
        planform: input
            .stations
            .map(|st| planform_svg(&input.name, st, false)),
        sections: stack_svg(&input.name, &slices, &axis_at_cuts, false),
        three_view: three_view_svg(first.name(), mesh, &axis, false),
        stress: stress.map(|t| stress_svg(first.name(), t, false)),
        preview: Some(PreviewPng::of_parts(input.parts, input.rotation)),
    })
}
