//! Every file of a pipeline outcome: each part in each requested format, staged in one
//! [`Batch`] so that the files appear together or not at all.
//!
//! STEP: each part's exact solid (see [`crate::brep`]): the blade with its root
//! features, each segment of a split blade (split faces, spar channel, pin holes; see
//! [`segment_spec`]), the hub, the one-piece rotor; the assembled rotor as an ISO 10303
//! assembly (one product per distinct part, an instance per blade). A blade that is
//! one segment with a spar channel (no split) carries the channel in its solid, and so
//! does the rotor built from it. A part whose features cannot be exact gets no STEP
//! file and a [`StepNote`] saying why.
//!
//! File names: `<part name>.<extension>` (`<part name>-ascii.stl` for ASCII STL), where
//! the part name is the design name plus its kind's suffix (see
//! [`crate::pipeline::PartKind::suffix`]).

use super::{
    step_assembly_text, step_text, write_mesh_to, ExportError, Format, MeshFormat, StepHeader,
};
use crate::atomic::Batch;
use crate::brep::{
    blade_solid, hub_solid, one_piece_solid, piece_solid, Bottom, BrepError, Cut, End, EndHole,
    PieceSpec, PrismHub, SkinOptions,
};
use crate::pipeline::{BuiltPart, Outcome, PartKind, Timings};
use crate::segment::Plan;
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
                    let text = timings.time("step", || part_step_text(outcome, part))?;
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

/// The STEP text of a part of `outcome` (exactly the bytes [`stage_outcome`] writes to
/// its file), or the note saying why it has none.
///
/// # Errors
/// [`ExportError`] from the exact-solid builder (a kernel refusal, a bad knot vector: a
/// bug) or the assembly writer.
pub fn part_step_text(
    outcome: &Outcome,
    part: &BuiltPart,
) -> Result<Result<String, StepNote>, ExportError> {
    let header = StepHeader::for_design(&part.name);
    let file = file_name(&part.name, Format::Step);
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
///
/// A part whose mesh the segment builder made (a segment, or the blade and rotor of a
/// one-segment plan) also gets a note, not an error, when the exact builder finds a
/// feature that does not fit ([`BrepError::BadFeature`], e.g. a split plane too close
/// to a knot of the skin for a STEP file to tell apart): its mesh passed its checks and
/// is written, and only its STEP file cannot be.
fn exact(outcome: &Outcome, part: &BuiltPart) -> Result<Result<Exact, StepNote>, ExportError> {
    let built = match part.kind {
        PartKind::Blade => blade(outcome).map(Exact::Solid),
        PartKind::Hub => hub(outcome).map(Exact::Solid),
        PartKind::Rotor => rotor(outcome),
        PartKind::OnePiece => one_piece(outcome).map(Exact::Solid),
        PartKind::Segment { index, .. } => segment(outcome, index).map(Exact::Solid),
    };
    match built {
        Ok(e) => Ok(Ok(e)),
        Err(e @ BrepError::NotExact { .. }) => Ok(Err(not_written(part, &e.to_string()))),
        Err(e @ BrepError::BadFeature { .. }) if from_segment_plan(outcome, part) => {
            Ok(Err(not_written(
                part,
                &format!(
                    "its exact solid cannot be built as the mesh has it: {e}; use the mesh files"
                ),
            )))
        }
        Err(e) => Err(e.into()),
    }
}

/// True when the part's mesh was made by the segment builder.
fn from_segment_plan(outcome: &Outcome, part: &BuiltPart) -> bool {
    match part.kind {
        PartKind::Segment { .. } => true,
        PartKind::Blade | PartKind::Rotor => one_segment(outcome).is_some(),
        PartKind::Hub | PartKind::OnePiece => false,
    }
}

/// The plan when the blade is one segment (not split, its mesh made by the segment
/// builder, e.g. to carry a spar channel).
fn one_segment(outcome: &Outcome) -> Option<&Plan> {
    outcome.segments.as_ref().filter(|p| p.count == 1)
}

/// The blade: segment 1 of 1 when the plan has one segment (its channel included), else
/// the blade with its root features.
fn blade(outcome: &Outcome) -> Result<Solid, BrepError> {
    if one_segment(outcome).is_some() {
        return segment(outcome, 1);
    }
    let b = &outcome.blade;
    blade_solid(&b.skin, b.blade.root(), b.blade.root_face())
}

/// Segment `index` (from 1) of the outcome's plan.
fn segment(outcome: &Outcome, index: usize) -> Result<Solid, BrepError> {
    let plan = outcome
        .segments
        .as_ref()
        .ok_or_else(|| missing("segment", "the outcome has no segment plan"))?;
    let spec = segment_spec(outcome, plan, index)?;
    piece_solid(&outcome.blade.skin, &spec, &SkinOptions::DEFAULT)
}

/// The exact solid's description of segment `index` (from 1) of `plan`, feature for
/// feature as [`crate::segment::mesh::build`] meshes it:
///
/// * ends: segment 1 starts at the skin's root end with the root's features
///   ([`PieceSpec::blade`]: flange, bore, cross holes), or with a plain cap when the
///   spar channel opens at the root face (the mesh then cuts no root features; the
///   channel planner opens it there only on a plain root face); every other segment
///   starts at its split plane `z = radius`; the last ends at the skin's tip end, the
///   others at the next split plane;
/// * spar channel (hole diameter = rod + clearance, on its axis): through a segment it
///   enters and leaves ([`Bottom::Through`]); from the low face to its end plus its
///   drill point where it ends inside; from the high face down to its blind start plus
///   the drill point where it starts inside; a channel that both starts and ends inside
///   one segment would be a closed cavity, which the mesh refuses too
///   ([`BrepError::NotExact`]);
/// * pin holes in each split face (pin + clearance, the joint's depth and drill point).
///
/// A drill point of axial depth `p` on a hole of radius `r` is the cone of included
/// angle `2 atan(r / p)` (so [`Bottom::point_depth`] gives `p` back); depth 0 is a flat
/// floor.
///
/// # Errors
/// [`BrepError::NotExact`] for the closed cavity; [`BrepError::BadFeature`] for an index
/// or plan that does not match (a bug).
pub fn segment_spec(outcome: &Outcome, plan: &Plan, index: usize) -> Result<PieceSpec, BrepError> {
    let count = plan.count;
    if index == 0
        || index > count
        || plan.splits.len() + 1 != count
        || plan.joints.len() != plan.splits.len()
    {
        return Err(missing(
            "segment",
            &format!(
                "segment {index} of a plan of {count} segments, {} splits and {} joints",
                plan.splits.len(),
                plan.joints.len()
            ),
        ));
    }
    let b = &outcome.blade;
    let s = index - 1;
    let root_face = b.blade.root_face();
    let z_lo = if s == 0 {
        root_face
    } else {
        plan.splits[s - 1].radius
    };
    let z_hi = (s + 1 < count).then(|| plan.splits[s].radius);
    let opens = plan.channel.as_ref().is_some_and(|c| c.opens_at_root);
    let mut spec = match (s, opens) {
        (0, true) => PieceSpec::whole(),
        (0, false) => PieceSpec::blade(b.blade.root(), root_face),
        _ => PieceSpec::between(Cut::Plane(z_lo), Cut::SkinEnd),
    };
    if let Some(z) = z_hi {
        spec.high = Cut::Plane(z);
    }
    if let Some(c) = &plan.channel {
        let enters = if s == 0 {
            c.opens_at_root
        } else {
            c.start < z_lo && c.end > z_lo
        };
        let leaves = z_hi.is_some_and(|z| c.start < z && c.end > z);
        let r = c.hole_radius();
        let hole = |end: End, depth: f64, bottom: Bottom| EndHole {
            end,
            centre: c.axis,
            diameter: c.hole_diameter,
            depth,
            bottom,
        };
        let point = drill_bottom(r, c.point_depth);
        match (enters, leaves, z_hi) {
            (true, true, _) => spec.end_holes.push(hole(End::Low, 0.0, Bottom::Through)),
            (true, false, _) => spec.end_holes.push(hole(End::Low, c.end - z_lo, point)),
            (false, true, Some(z)) => spec.end_holes.push(hole(End::High, z - c.start, point)),
            _ => {
                if c.start > z_lo && z_hi.is_none_or(|z| c.start < z) {
                    return Err(BrepError::NotExact {
                        feature: "spar channel",
                        reason: format!(
                            "it starts ({:.2} mm) and ends ({:.2} mm) inside segment {index}, a closed cavity no face opens to; split the blade between its start and end",
                            c.start, c.end
                        ),
                    });
                }
            }
        }
    }
    let sides = [(s.checked_sub(1), End::Low), (z_hi.map(|_| s), End::High)];
    for (k, end) in sides {
        let Some(j) = k.map(|k| &plan.joints[k]) else {
            continue;
        };
        let bottom = drill_bottom(0.5 * j.hole_diameter, j.point_depth);
        spec.end_holes.extend(j.pins.iter().map(|&centre| EndHole {
            end,
            centre,
            diameter: j.hole_diameter,
            depth: j.depth,
            bottom,
        }));
    }
    Ok(spec)
}

/// The bottom of a blind hole of radius `r` whose drill point is `depth` long along its
/// axis (0: flat): the cone's included angle is `2 atan(r / depth)`.
fn drill_bottom(r: f64, depth: f64) -> Bottom {
    if depth > 0.0 {
        Bottom::Point(2.0 * (r / depth).atan().to_degrees())
    } else {
        Bottom::Flat
    }
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

/// The STEP text of a prism of planar loops (a fit coupon, see
/// [`crate::brep::prism_solid`]): the same polyhedron as its mesh.
///
/// # Errors
/// [`ExportError`] when the loops do not bound a planar face.
pub fn prism_step_text(
    name: &str,
    loops: &[Vec<nalgebra::Point2<f64>>],
    length: f64,
) -> Result<String, ExportError> {
    let solid = crate::brep::prism_solid(loops, length)?;
    let header = StepHeader::for_design(name);
    let file = file_name(name, Format::Step);
    Ok(step_text(&[(name.to_string(), solid)], &header, &file))
}

fn not_written(part: &BuiltPart, reason: &str) -> StepNote {
    StepNote::NotWritten {
        part: part.name.clone(),
        reason: reason.to_string(),
    }
}
