//! Every file of a pipeline outcome: each part in each requested format, staged in one
//! [`Batch`] so that the files appear together or not at all.
//!
//! STEP: each part's exact solid (see [`crate::brep`]): the blade with its root
//! features, the hub, the one-piece rotor; the assembled rotor as an ISO 10303 assembly
//! (one product per distinct part, an instance per blade). A part whose features cannot
//! be exact gets no STEP file and a [`StepNote`] saying why.
//!
//! File names: `<part name>.<extension>` (`<part name>-ascii.stl` for ASCII STL), where
//! the part name is the design name plus its kind's suffix (see
//! [`crate::pipeline::PartKind::suffix`]).

use super::{
    step_assembly_text, step_text, write_mesh_to, ExportError, Format, MeshFormat, StepHeader,
};
use crate::atomic::Batch;
use crate::brep::{blade_solid, hub_solid, one_piece_solid, BrepError, PrismHub};
use crate::pipeline::{BuiltPart, Outcome, PartKind, Timings};
use nalgebra::Matrix4;
use std::fmt;
use std::path::Path;
use truck_modeling::Solid;

/// Why a part has no STEP file: the exact solid must be the part the mesh files
/// describe, so where it cannot be, no file is written and the user is told why.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "kind")]
pub enum StepNote {
    /// No STEP file was written for the part.
    NotWritten {
        /// The part.
        part: String,
        /// Why.
        reason: String,
    },
}

impl fmt::Display for StepNote {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            StepNote::NotWritten { part, reason } => {
                write!(f, "no STEP file for {part}: {reason}")
            }
        }
    }
}

/// The file name of `part` in `format`.
pub fn file_name(part: &str, format: Format) -> String {
    match format {
        Format::Mesh(MeshFormat::StlAscii) => format!("{part}-ascii.stl"),
        other => format!("{part}.{}", other.extension()),
    }
}

/// Stages every part of `outcome` in every format into `batch` under `dir`, timing each
/// writer into `timings`. Returns what the STEP files leave out.
///
/// # Errors
/// [`ExportError`] from a writer or the exact-solid builder.
pub fn stage_outcome(
    batch: &mut Batch,
    outcome: &Outcome,
    dir: &Path,
    formats: &[Format],
    timings: &mut Timings,
) -> Result<Vec<StepNote>, ExportError> {
    let mut notes = Vec::new();
    for part in &outcome.parts {
        for &format in formats {
            let path = dir.join(file_name(&part.name, format));
            match format {
                Format::Mesh(m) => {
                    timings.time(m.extension(), || stage_mesh(batch, &path, m, part))?;
                }
                Format::Step => {
                    let text = timings.time("step", || step_file(outcome, part, format))?;
                    match text {
                        Ok(text) => batch.write(&path, |w| w.write_all(text.as_bytes()))?,
                        Err(note) => notes.push(note),
                    }
                }
            }
        }
    }
    Ok(notes)
}

/// The STEP text of a part, or why there is none.
fn step_file(
    outcome: &Outcome,
    part: &BuiltPart,
    format: Format,
) -> Result<Result<String, StepNote>, ExportError> {
    let header = StepHeader::for_design(&part.name);
    let file = file_name(&part.name, format);
    Ok(match exact(outcome, part)? {
        Ok(Exact::Solid(solid)) => Ok(step_text(&[(part.name.clone(), solid)], &header, &file)),
        Ok(Exact::Assembly(products, instances)) => {
            Ok(step_assembly_text(&products, &instances, &header, &file)?)
        }
        Err(note) => Err(note),
    })
}

fn stage_mesh(
    batch: &mut Batch,
    path: &Path,
    format: MeshFormat,
    part: &BuiltPart,
) -> Result<(), ExportError> {
    let name = match &part.bodies[..] {
        [one] => one.name().to_string(),
        _ => part.name.clone(),
    };
    Ok(batch.write(path, |w| write_mesh_to(w, format, &name, &part.bodies))?)
}

/// The exact solid(s) of a part, as one STEP file's content.
enum Exact {
    /// One solid (a plain STEP solid).
    Solid(Solid),
    /// An assembly: products and placed instances (product index, placement).
    Assembly(Vec<(String, Solid)>, Vec<(usize, Matrix4<f64>)>),
}

/// The exact solid of a part, built from the same skin and feature dimensions as its
/// mesh; a feature that cannot be exact becomes a note and no file.
fn exact(outcome: &Outcome, part: &BuiltPart) -> Result<Result<Exact, StepNote>, ExportError> {
    if let Some(reason) = joint_features(outcome, part) {
        return Ok(Err(not_written(part, &reason)));
    }
    let built = match part.kind {
        PartKind::Blade => blade(outcome).map(Exact::Solid),
        PartKind::Hub => hub(outcome).map(Exact::Solid),
        PartKind::Rotor => rotor(outcome),
        PartKind::OnePiece => one_piece(outcome).map(Exact::Solid),
        PartKind::Segment { index, count } => return Ok(Err(segment_note(part, index, count))),
    };
    match built {
        Ok(e) => Ok(Ok(e)),
        Err(e @ BrepError::NotExact { .. }) => Ok(Err(not_written(part, &e.to_string()))),
        Err(e) => Err(e.into()),
    }
}

fn blade(outcome: &Outcome) -> Result<Solid, BrepError> {
    let b = &outcome.blade;
    blade_solid(&b.skin, b.blade.root(), b.blade.root_face())
}

fn hub(outcome: &Outcome) -> Result<Solid, BrepError> {
    let hub = outcome
        .rotor
        .as_ref()
        .and_then(|r| r.hub.as_ref())
        .ok_or_else(|| missing("hub", "the outcome has no hub"))?;
    hub_solid(hub)
}

/// The rotor as an assembly: the blade product placed once per blade, the hub once.
fn rotor(outcome: &Outcome) -> Result<Exact, BrepError> {
    let rotor = outcome
        .rotor
        .as_ref()
        .ok_or_else(|| missing("rotor", "the outcome has no rotor placements"))?;
    let name = &outcome.blade.name;
    let mut products = vec![(format!("{name}-blade"), blade(outcome)?)];
    let mut instances: Vec<(usize, Matrix4<f64>)> =
        rotor.transforms.iter().map(|m| (0, *m)).collect();
    if rotor.hub.is_some() {
        products.push((format!("{name}-hub"), hub(outcome)?));
        instances.push((1, Matrix4::identity()));
    }
    Ok(Exact::Assembly(products, instances))
}

fn one_piece(outcome: &Outcome) -> Result<Solid, BrepError> {
    let b = &outcome.blade;
    let rotor = outcome
        .rotor
        .as_ref()
        .ok_or_else(|| missing("one-piece rotor", "the outcome has no rotor placements"))?;
    let spec = rotor.spec.one_piece.as_ref().ok_or_else(|| {
        missing(
            "one-piece rotor",
            "the rotor has no [rotor.one-piece] table",
        )
    })?;
    let ring: Vec<nalgebra::Point3<f64>> = b
        .tessellation
        .root_ring
        .iter()
        .map(|&i| b.mesh().vertices[i as usize])
        .collect();
    let hub = PrismHub::new(
        &ring,
        b.blade.root_face(),
        &rotor.spec,
        rotor.rotation,
        spec,
    );
    one_piece_solid(&b.skin, &rotor.transforms, &hub)
}

fn missing(feature: &str, problem: &str) -> BrepError {
    BrepError::BadFeature {
        feature: feature.to_string(),
        problem: problem.to_string(),
        fix: "this is a bug: please report it with the design file".to_string(),
    }
}

/// A segment gets no STEP file yet: its exact solid (split faces with the pin holes
/// and the channel as inner loops) is not built, and a STEP file must never differ from
/// the mesh.
fn segment_note(part: &BuiltPart, index: usize, count: usize) -> StepNote {
    not_written(
        part,
        &format!("the exact solid of segment {index} of {count} (split faces, spar channel, pin holes) is not built yet; use the mesh files"),
    )
}

/// Why a blade or rotor part whose mesh carries the spar channel gets no STEP file (the
/// exact solid would lack the channel), or `None`.
fn joint_features(outcome: &Outcome, part: &BuiltPart) -> Option<String> {
    let plan = outcome.segments.as_ref()?;
    let carries = plan.count == 1 && plan.channel.is_some();
    (carries && matches!(part.kind, PartKind::Blade | PartKind::Rotor)).then(|| {
        "the blade's mesh carries the spar channel, which its exact solid does not have yet; use the mesh files".to_string()
    })
}

fn not_written(part: &BuiltPart, reason: &str) -> StepNote {
    StepNote::NotWritten {
        part: part.name.clone(),
        reason: reason.to_string(),
    }
}
