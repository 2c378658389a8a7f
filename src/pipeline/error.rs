//! [`PipelineError`]: why the pipeline stopped, typed by stage, and which of them are
//! failed checks (exit 1) rather than bad input (exit 2).

use super::sections::StationSectionError;
use super::warnings::SteepStep;
use crate::assembly::HandReport;
use crate::blade::BladeError;
use crate::check::{Interference, Rejected};
use crate::design::{DesignError, Problem};
use crate::loft::LoftError;
use crate::mount::MountError;
use crate::tessellate::TessellateError;
use std::fmt;

/// Why the pipeline stopped.
#[derive(Debug, thiserror::Error)]
pub enum PipelineError {
    /// The design or one of its optional tables is malformed (every problem listed, with
    /// file and line or key).
    #[error(transparent)]
    Design(#[from] DesignError),
    /// One or more station sections could not be found, read or shaped; every one is
    /// listed with its station.
    #[error("{}", SectionList(.0))]
    Sections(Vec<StationSectionError>),
    /// The blade could not be built from the stations and the root and tip tables.
    #[error(transparent)]
    Blade(#[from] BladeError),
    /// A `[root]` or `[tip]` value the blade cannot be built with: the cause, and the
    /// problem naming the design file, line and key (what is shown).
    #[error("{problem}")]
    Table {
        /// The file, line and key, with the cause's message and fix.
        problem: Box<Problem>,
        /// Why the blade cannot be built.
        cause: BladeError,
    },
    /// A mounting feature could not be cut into the blade's mesh.
    #[error(transparent)]
    Mount(#[from] MountError),
    /// The skin could not be lofted.
    #[error(transparent)]
    Loft(#[from] LoftError),
    /// The skin could not be tessellated.
    #[error(transparent)]
    Tessellate(#[from] TessellateError),
    /// The mesh the tolerance asks for would not fit this machine's memory: refused
    /// before any meshing, with the estimate.
    #[error("at a tolerance of {tolerance} mm the blade's mesh would have about {} triangles and need about {} of memory, more than the {} this machine has free; give a coarser tolerance (about {suggest:.2e} mm fits, `--tolerance` or [blade] tolerance): the mesh grows with 1 / tolerance", millions(.triangles), in_bytes(.bytes), in_bytes(.available))]
    TooLarge {
        /// The tolerance asked for, mm.
        tolerance: f64,
        /// Estimated triangles.
        triangles: f64,
        /// Estimated peak memory, bytes.
        bytes: f64,
        /// Memory available, bytes.
        available: f64,
        /// A tolerance whose estimate fits, mm.
        suggest: f64,
    },
    /// A built part failed its solid checks; `likely_causes` are the design's steep
    /// station steps, when it has any.
    #[error("{rejected}{}", Causes(.likely_causes))]
    Rejected {
        /// The part and its graded findings.
        rejected: Rejected,
        /// Station steps steep enough to fold the surface.
        likely_causes: Vec<SteepStep>,
    },
    /// Bodies of an assembly meet: each pair with its crossing triangles.
    #[error("the bodies of '{part}' cross or touch; nothing was written:\n{}\nMove them apart: blades that meet each other need fewer blades (rotor.blades), a narrower root chord or the first station farther out; a hub that meets the blades needs rotor.hub.diameter checked against the blades' root face or sockets for the shanks (rotor.hub.sockets = true); rotor.cone and rotor.pitch move both", Lines(.found))]
    Interference {
        /// The assembly.
        part: String,
        /// Every pair of bodies that meets.
        found: Vec<Interference>,
    },
    /// The blade could not be split, or its channel or pins not placed.
    #[error(transparent)]
    Segment(crate::segment::SegmentError),
    /// A placed blade turns the wrong way or faces the wrong side.
    #[error("the rotation-sense check failed; nothing was written:\n{0}")]
    Hand(Box<HandReport>),
}

impl PipelineError {
    /// True when a built part failed a check (exit code 1): the input was read and
    /// understood, but what it describes is not a valid solid or assembly. Everything
    /// else is bad input (exit code 2).
    pub fn is_failed_check(&self) -> bool {
        match self {
            PipelineError::Segment(e) => e.is_failed_check(),
            other => matches!(
                other,
                PipelineError::Rejected { .. }
                    | PipelineError::Interference { .. }
                    | PipelineError::Hand(_)
            ),
        }
    }
}

struct SectionList<'a>(&'a [StationSectionError]);

impl fmt::Display for SectionList<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (k, e) in self.0.iter().enumerate() {
            if k > 0 {
                writeln!(f)?;
            }
            write!(f, "{e}")?;
        }
        Ok(())
    }
}

struct Causes<'a>(&'a [SteepStep]);

impl fmt::Display for Causes<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for s in self.0 {
            write!(f, "\nlikely cause: {s}")?;
        }
        Ok(())
    }
}

struct Lines<'a>(&'a [Interference]);

impl fmt::Display for Lines<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (k, i) in self.0.iter().enumerate() {
            if k > 0 {
                writeln!(f)?;
            }
            write!(f, "{i}")?;
        }
        Ok(())
    }
}

/// A count in words: "3.2 million".
fn millions(n: &f64) -> String {
    if *n >= 1e6 {
        format!("{:.1} million", n / 1e6)
    } else {
        format!("{n:.0}")
    }
}

/// A byte count in GB or MB.
fn in_bytes(b: &f64) -> String {
    if *b >= 1e9 {
        format!("{:.1} GB", b / 1e9)
    } else {
        format!("{:.0} MB", b / 1e6)
    }
}
