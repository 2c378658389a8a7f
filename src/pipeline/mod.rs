//! The one orchestrator: from a design, every part it asks for, each checked.
//!
//! ```text
//! design ──> sections ──> blade model ──> skin ──> mesh (+ mounting features)
//!                                                    │
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
mod parts;
mod sections;
mod timings;
mod warnings;

pub use blade::{build_blade, build_blade_timed, BuiltBlade};
pub use error::PipelineError;
pub use parts::{BuiltPart, PartKind};
pub use sections::{resolve_sections, section_dirs, StationSectionError, TeChange};
pub use timings::Timings;
pub use warnings::{steep_steps, SteepStep, StepChange};

use crate::assembly::{assemble, BladeFacts, Rotor, RotorSpec};
use crate::check::CheckedPart;
use crate::design::Design;

/// Options that override the design for one run.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Options {
    /// Mesh tolerance, mm (default: the design's).
    pub tolerance: Option<f64>,
    /// Build the blade only, even when the design has a `[rotor]` table.
    pub blade_only: bool,
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

    /// What goes to the printer, each with how many copies: the one-piece rotor when the
    /// design asks for one; else the blade once per blade of the rotor (once without a
    /// rotor) and the hub.
    pub fn print_set(&self) -> Vec<(PartKind, &CheckedPart, usize)> {
        if let Some(whole) = self.part(PartKind::OnePiece) {
            return whole.bodies.iter().map(|b| (whole.kind, b, 1)).collect();
        }
        let blades = self.rotor.as_ref().map_or(1, |r| r.transforms.len());
        let mut out = vec![(PartKind::Blade, self.blade_part(), blades)];
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
    let mut parts = vec![timings.time("checks", || parts::blade_part(&blade, &warnings))?];
    let rotor = match read_rotor(design)? {
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
        warnings,
        timings,
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
