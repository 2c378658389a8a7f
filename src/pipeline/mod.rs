//! The one orchestrator: from a design, every part it asks for, each checked.
//!
//! ```text
//! design ──> sections ──> blade model ──> skin ──> mesh (+ mounting features)
//!                                                    │
//!   [segments], [spar-channel] ──> segments (plan, channel, pins, meshes) ──┤
//!        [rotor] ──> assembly (placements, hub, one-piece) ──> checks ──> Outcome
//! ```
//!
//! [`run`] returns an [`Outcome`]: the built blade's stages (for reports and the exact
//! solid), the parts as [`BuiltPart`]s of a [`PartKind`] whose bodies are
//! [`crate::check::CheckedPart`]s (the only kind of part a writer accepts), the rotor
//! placements, and warnings for the user. A part that fails its checks is an error
//! ([`PipelineError::is_failed_check`]), never part of an outcome.
//!
//! ```no_run
//! let design = spanwright::design::load(std::path::Path::new("examples/garden-turbine.toml"))?;
//! let outcome = spanwright::pipeline::run(&design, &Default::default())?;
//! for part in &outcome.parts {
//!     println!("{}: {} bodies", part.name, part.bodies.len());
//! }
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

mod blade;
mod error;
mod job;
mod parts;
mod sections;
mod timings;
mod warnings;

pub use blade::{build_blade, build_blade_timed, check_work, BuiltBlade};
pub use error::PipelineError;
pub use job::design_job;
pub use parts::{BuiltPart, PartKind};
pub use sections::{resolve_sections, section_dirs, StationSectionError, TeChange};
pub use timings::Timings;
pub use warnings::{steep_steps, SteepStep, StepChange};

use crate::assembly::{assemble, BladeFacts, Rotor, RotorSpec};
use crate::check::CheckedPart;
use crate::design::{Design, DesignError};
use crate::fit::{FitError, Printer, PrinterSpec};
use crate::segment::{
    segment, ChannelSpec, DowelSpec, Plan, Request, SegmentInput, SegmentsSpec, Split,
};

/// Options that override the design for one run.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Options {
    /// Mesh tolerance, mm (default: the design's).
    pub tolerance: Option<f64>,
    /// Build the blade only, even when the design has a `[rotor]` table.
    pub blade_only: bool,
    /// Where to split the blade, overriding the design's `[segments] split` (the
    /// command line's `--split`).
    pub split: Option<Split>,
    /// The printer segments must fit, overriding the design's `[printer]` table (the
    /// command line's printer options).
    pub printer: Option<Printer>,
}

/// Everything a run made.
#[derive(Debug, Clone)]
pub struct Outcome {
    /// The blade's stages: sections, blade model, skin, tessellation.
    pub blade: BuiltBlade,
    /// Every part the design asks for, blade first, each checked.
    pub parts: Vec<BuiltPart>,
    /// The rotor's placements and hub, when the design has a `[rotor]` table.
    pub rotor: Option<Rotor>,
    /// How the blade was split, its spar channel and joints, when the design (or
    /// [`Options::split`]) asks for segments or a channel.
    pub segments: Option<Plan>,
    /// Station steps steep enough to fold the surface (the checks passed anyway).
    pub warnings: Vec<SteepStep>,
    /// Seconds per stage.
    pub timings: Timings,
}

impl Outcome {
    /// The first part of a kind.
    pub fn part(&self, kind: PartKind) -> Option<&BuiltPart> {
        self.parts.iter().find(|p| p.kind == kind)
    }

    /// The checked blade (in the blade frame).
    pub fn blade_part(&self) -> &CheckedPart {
        &self.parts[0].bodies[0]
    }

    /// The segments of a split blade, root first (empty when it is not split).
    pub fn segment_parts(&self) -> Vec<&BuiltPart> {
        self.parts
            .iter()
            .filter(|p| matches!(p.kind, PartKind::Segment { .. }))
            .collect()
    }

    /// What goes to the printer, each with how many copies: the one-piece rotor when the
    /// design asks for one; else the blade (or each of its segments when it is split)
    /// once per blade of the rotor (once without a rotor), and the hub.
    pub fn print_set(&self) -> Vec<(PartKind, &CheckedPart, usize)> {
        if let Some(whole) = self.part(PartKind::OnePiece) {
            return whole.bodies.iter().map(|b| (whole.kind, b, 1)).collect();
        }
        let blades = self.rotor.as_ref().map_or(1, |r| r.transforms.len());
        let segments = self.segment_parts();
        let mut out: Vec<(PartKind, &CheckedPart, usize)> = if segments.is_empty() {
            vec![(PartKind::Blade, self.blade_part(), blades)]
        } else {
            segments
                .iter()
                .map(|p| (p.kind, &p.bodies[0], blades))
                .collect()
        };
        if let Some(hub) = self.part(PartKind::Hub) {
            out.extend(hub.bodies.iter().map(|b| (hub.kind, b, 1)));
        }
        out
    }
}

/// Runs the whole job: builds the blade, assembles the rotor the design asks for, checks
/// every part.
///
/// # Errors
/// [`PipelineError`]: bad input from any stage, or a part that fails its checks
/// ([`PipelineError::is_failed_check`]).
pub fn run(design: &Design, opts: &Options) -> Result<Outcome, PipelineError> {
    let mut timings = Timings::default();
    let warnings = steep_steps(design);
    let blade = build_blade_timed(design, opts, &mut timings)?;
    let rotor_spec = read_rotor(design)?;
    let request = segment_request(design, opts)?;
    if let (Some(_), Some(r)) = (&request, &rotor_spec) {
        if r.one_piece.is_some() && !opts.blade_only {
            return Err(DesignError::one(design.problem(
                "rotor.one-piece",
                "a one-piece rotor prints whole; it cannot also be split or carry a spar channel ([segments], [spar-channel]): remove one of them",
            ))
            .into());
        }
    }
    let segmented = match &request {
        Some(req) => Some(timings.time("segments", || {
            segment(
                &SegmentInput {
                    blade: &blade.blade,
                    skin: &blade.skin,
                    us: &blade.tessellation.us,
                    vs: &blade.tessellation.vs,
                    mesh: blade.mesh(),
                    tolerance: blade.tolerance,
                },
                req,
            )
            .map_err(|e| parts::segment_error(design, e))
        })?),
        None => None,
    };
    let (mut parts, plan) = match segmented {
        // One segment: the whole blade, carrying its channel when it has one.
        Some(s) if s.segments.len() == 1 => {
            let whole = s.segments.into_iter().next().expect("one segment");
            let part = timings.time("checks", || {
                parts::checked(
                    crate::mesh::Part {
                        name: blade.name.clone(),
                        mesh: whole.mesh,
                    },
                    whole.genus,
                    &warnings,
                )
            })?;
            let built = BuiltPart {
                kind: PartKind::Blade,
                name: blade.name.clone(),
                bodies: vec![part],
            };
            (vec![built], Some(s.plan))
        }
        Some(s) => {
            let mut list = vec![timings.time("checks", || parts::blade_part(&blade, &warnings))?];
            let segs = timings.time("segment checks", || {
                parts::segment_parts(&blade.name, s.segments, &warnings)
            })?;
            list.extend(segs);
            (list, Some(s.plan))
        }
        None => (
            vec![timings.time("checks", || parts::blade_part(&blade, &warnings))?],
            None,
        ),
    };
    let rotor = match rotor_spec {
        Some(spec) if !opts.blade_only => {
            let facts = blade_facts(design, &blade);
            let rotor = assemble(&spec, &facts).map_err(|e| parts::in_design(design, e))?;
            let assembled = timings.time("rotor", || {
                parts::rotor_parts(&blade.name, &parts[0].bodies[0], &rotor, blade.tolerance)
            })?;
            parts.extend(assembled);
            if let Some(one) = &spec.one_piece {
                let whole = timings.time("one-piece rotor", || {
                    parts::one_piece_part(&blade, &facts, &rotor, one, design)
                })?;
                parts.push(whole);
            }
            Some(rotor)
        }
        _ => None,
    };
    Ok(Outcome {
        blade,
        parts,
        rotor,
        segments: plan,
        warnings,
        timings,
    })
}

/// What the design and the options ask of the segment stage: `None` when they ask for
/// neither a split nor a spar channel.
///
/// # Errors
/// [`PipelineError::Design`] naming the key.
pub fn segment_request(design: &Design, opts: &Options) -> Result<Option<Request>, PipelineError> {
    let table = design.table_mm::<SegmentsSpec>("segments")?;
    let channel = design.table_mm::<ChannelSpec>("spar-channel")?;
    let split = opts
        .split
        .clone()
        .or_else(|| table.as_ref().map(|t| t.split.clone()))
        .unwrap_or(Split::None);
    if matches!(split, Split::None) && channel.is_none() {
        return Ok(None);
    }
    let mut segments = table.unwrap_or(SegmentsSpec {
        split: Split::None,
        max_count: crate::segment::spec::DEFAULT_MAX_COUNT,
        min_wall: 0.8,
        dowels: DowelSpec::default(),
    });
    segments.split = split;
    let printer = match opts.printer {
        Some(p) => Some(p),
        None => design_printer(design)?,
    };
    Ok(Some(Request {
        segments,
        channel,
        printer,
    }))
}

/// The design's `[printer]` table, resolved, when it has one.
///
/// # Errors
/// [`PipelineError::Design`] naming the key.
pub fn design_printer(design: &Design) -> Result<Option<Printer>, PipelineError> {
    let Some(spec) = design.table_mm::<PrinterSpec>("printer")? else {
        return Ok(None);
    };
    let origin = format!("{} [printer]", design.file().display());
    spec.resolve(&origin).map(Some).map_err(|e| match e {
        FitError::Printer {
            key, value, why, ..
        } => DesignError::one(design.problem(&format!("printer.{key}"), format!("{value} {why}")))
            .into(),
        other => DesignError::one(design.problem("printer", other.to_string())).into(),
    })
}

/// The design's `[rotor]` table in mm, when it has one.
///
/// # Errors
/// [`PipelineError::Design`] naming the key.
pub fn read_rotor(design: &Design) -> Result<Option<RotorSpec>, PipelineError> {
    Ok(design.table_mm::<RotorSpec>("rotor")?)
}

/// What the assembly needs to know of the built blade.
pub fn blade_facts(design: &Design, built: &BuiltBlade) -> BladeFacts {
    let first = design.stations.first();
    BladeFacts {
        rotation: design.blade.rotation,
        flow: design.blade.flow,
        root: built.blade.root().cloned(),
        root_face: built.blade.root_face(),
        shank_offset: first.map_or(0.0, |st| st.sweep.hypot(st.prebend)),
        station_radii: built.blade.station_radii().to_vec(),
        tolerance: built.tolerance,
    }
}
