//! Every file of a pipeline outcome: each part in each requested format, staged in one
//! [`Batch`] so that the files appear together or not at all.
//!
//! File names: `<part name>.<extension>` (`<part name>-ascii.stl` for ASCII STL), where
//! the part name is the design name plus its kind's suffix (see
//! [`crate::pipeline::PartKind::suffix`]).

use super::{step_solid, step_text, write_mesh_to, ExportError, Format, MeshFormat, StepHeader};
use crate::atomic::Batch;
use crate::pipeline::{BuiltPart, Outcome, PartKind, Timings};
use std::fmt;
use std::path::Path;
use truck_modeling::Solid;

/// What a STEP file leaves out, or why a part has none: the exact solid must be the part
/// the mesh files describe, so where it cannot be, the user is told.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "kind")]
pub enum StepNote {
    /// The exact solid lacks features that the mesh files have.
    MissingFeatures {
        /// The part.
        part: String,
        /// The features, in words.
        features: Vec<String>,
    },
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
            StepNote::MissingFeatures { part, features } => write!(
                f,
                "the STEP solid of {part} carries the skin (shank, transition, blade, tip) but not the {} (mesh files only)",
                features.join(", ")
            ),
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
                    let solids = timings.time("step", || step_solids(outcome, part))?;
                    match solids {
                        Ok(solids) => {
                            let text = step_text(
                                &solids,
                                &StepHeader::for_design(&part.name),
                                &file_name(&part.name, format),
                            );
                            batch.write(&path, |w| w.write_all(text.as_bytes()))?;
                            notes.extend(missing_features(outcome, part));
                        }
                        Err(note) => notes.push(note),
                    }
                }
            }
        }
    }
    Ok(notes)
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

/// The exact solids of a part (name, solid), or why it has none.
fn step_solids(
    outcome: &Outcome,
    part: &BuiltPart,
) -> Result<Result<Vec<(String, Solid)>, StepNote>, ExportError> {
    if let Some(reason) = joint_features(outcome, part) {
        return Ok(Err(not_written(part, &reason)));
    }
    match part.kind {
        PartKind::Blade => Ok(Ok(vec![(
            part.name.clone(),
            step_solid(&outcome.blade.skin)?,
        )])),
        PartKind::Rotor => {
            let Some(rotor) = &outcome.rotor else {
                return Ok(Err(not_written(
                    part,
                    "the outcome has no rotor placements",
                )));
            };
            let solid = step_solid(&outcome.blade.skin)?;
            let placed = rotor
                .transforms
                .iter()
                .enumerate()
                .map(|(k, m)| {
                    let cols: [[f64; 4]; 4] =
                        std::array::from_fn(|c| std::array::from_fn(|r| m[(r, c)]));
                    let placed = truck_modeling::builder::transformed(
                        &solid,
                        truck_modeling::Matrix4::from(cols),
                    );
                    (format!("{}-blade-{}", outcome.blade.name, k + 1), placed)
                })
                .collect();
            Ok(Ok(placed))
        }
        PartKind::Hub => Ok(Err(not_written(
            part,
            "the hub's exact solid is not built yet; use the mesh files",
        ))),
        PartKind::OnePiece => Ok(Err(not_written(
            part,
            "the one-piece rotor's exact solid is not built yet; use the mesh files",
        ))),
        PartKind::Segment { index, count } => segment_solids(outcome, part, index, count),
    }
}

/// The exact solid of a blade segment: the skin between its split planes, the planar
/// split faces (with the pin holes and the channel as inner loops), the holes' cylinders
/// and drill-point cones. This is the hook for the B-rep builders of issue 13; until
/// they exist no STEP file is written for a segment, never one that differs from its
/// mesh.
fn segment_solids(
    _outcome: &Outcome,
    part: &BuiltPart,
    index: usize,
    count: usize,
) -> Result<Result<Vec<(String, Solid)>, StepNote>, ExportError> {
    Ok(Err(not_written(
        part,
        &format!("the exact solid of segment {index} of {count} (split faces, spar channel, pin holes) is not built yet; use the mesh files"),
    )))
}

/// Why a blade or rotor part whose mesh carries the spar channel gets no STEP file (the
/// skin solid would lack the channel), or `None`.
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

/// The mesh features a blade's (or rotor's) STEP solid lacks.
fn missing_features(outcome: &Outcome, part: &BuiltPart) -> Option<StepNote> {
    let mut features: Vec<String> = outcome
        .blade
        .blade
        .root()
        .map(|r| {
            r.mesh_only_features()
                .into_iter()
                .map(String::from)
                .collect()
        })
        .unwrap_or_default();
    if part.kind == PartKind::Rotor && outcome.rotor.as_ref().is_some_and(|r| r.hub.is_some()) {
        features.push("hub".into());
    }
    (!features.is_empty()).then(|| StepNote::MissingFeatures {
        part: part.name.clone(),
        features,
    })
}
