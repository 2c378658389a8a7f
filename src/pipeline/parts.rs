//! The parts a design asks for, each checked: the blade; with a `[rotor]` table the hub,
//! the assembled rotor (every body placed, checked against the others and for its
//! rotation sense) and the one-piece rotor.

use super::{BuiltBlade, PipelineError, SteepStep};
use crate::assembly::{
    one_piece, rigid, AssemblyError, BladeFacts, HandOptions, OnePieceBlade, OnePieceSpec, Rotor,
};
use crate::check::{certify_on_grid, interferences, CheckOptions, CheckedPart, GridLayout};
use crate::design::{Design, DesignError};
use crate::mesh::Part;
use crate::segment::{SegmentError, SegmentMesh};
use serde::Serialize;

/// What a built part is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PartKind {
    /// One blade in the blade frame (`<name>.*`).
    Blade,
    /// The hub body in rotor coordinates (`<name>-hub.*`).
    Hub,
    /// The assembled rotor: every blade placed and the hub, separate bodies
    /// (`<name>-rotor.*`).
    Rotor,
    /// Blades and hub as one solid (`<name>-rotor-one-piece.*`).
    OnePiece,
    /// One spanwise segment of a blade split for the printer
    /// (`<name>-segment-<index>-of-<count>.*`). The segments of one blade serve every
    /// blade of the rotor (they are the same), so each is printed once per blade.
    Segment {
        /// Position from the root, from 1.
        index: usize,
        /// Segments per blade.
        count: usize,
    },
}

impl PartKind {
    /// The suffix this kind adds to the design name in file names.
    pub fn suffix(self) -> String {
        match self {
            PartKind::Blade => String::new(),
            PartKind::Hub => "-hub".into(),
            PartKind::Rotor => "-rotor".into(),
            PartKind::OnePiece => "-rotor-one-piece".into(),
            PartKind::Segment { index, count } => format!("-segment-{index}-of-{count}"),
        }
    }

    /// A short description for people.
    pub fn describe(self) -> &'static str {
        match self {
            PartKind::Blade => "blade",
            PartKind::Hub => "hub",
            PartKind::Rotor => "assembled rotor",
            PartKind::OnePiece => "one-piece rotor",
            PartKind::Segment { .. } => "blade segment",
        }
    }
}

/// One part of the outcome: what it is, the name its files take, and its bodies, each
/// checked (one body, or several for the assembled rotor: separate solids that have
/// been checked not to meet).
#[derive(Debug, Clone)]
pub struct BuiltPart {
    /// What the part is.
    pub kind: PartKind,
    /// File stem: the design name plus the kind's suffix.
    pub name: String,
    /// The checked bodies.
    pub bodies: Vec<CheckedPart>,
}

/// Checks a part with the genus its features imply.
pub(super) fn checked(
    part: Part,
    genus: u32,
    likely_causes: &[SteepStep],
) -> Result<CheckedPart, PipelineError> {
    checked_on_grid(part, genus, likely_causes, None)
}

/// [`checked`] for a part whose first vertices lie on `grid` (a tessellation's grid).
pub(super) fn checked_on_grid(
    part: Part,
    genus: u32,
    likely_causes: &[SteepStep],
    grid: Option<&GridLayout>,
) -> Result<CheckedPart, PipelineError> {
    certify_on_grid(
        part,
        &CheckOptions::DEFAULT.with_expected_genus(Some(genus)),
        grid,
    )
    .map_err(|rejected| PipelineError::Rejected {
        rejected,
        likely_causes: likely_causes.to_vec(),
    })
}

/// The blade part, checked.
pub(super) fn blade_part(
    built: &BuiltBlade,
    likely_causes: &[SteepStep],
) -> Result<BuiltPart, PipelineError> {
    let grid = GridLayout {
        us: &built.tessellation.us,
        vs: &built.tessellation.vs,
        ids: built.tessellation.grid_ids.as_deref(),
    };
    let body = checked_on_grid(
        built.part(),
        built.expected_genus(),
        likely_causes,
        Some(&grid),
    )?;
    Ok(BuiltPart {
        kind: PartKind::Blade,
        name: built.name.clone(),
        bodies: vec![body],
    })
}

/// The hub part and the assembled rotor: the checked blade placed once per blade, the
/// hub checked on its own, no two bodies meeting, and every placed blade turning the
/// way the design says.
pub(super) fn rotor_parts(
    name: &str,
    blade: &CheckedPart,
    rotor: &Rotor,
    tolerance: f64,
) -> Result<Vec<BuiltPart>, PipelineError> {
    let mut out = Vec::new();
    let mut bodies: Vec<CheckedPart> = rotor
        .transforms
        .iter()
        .enumerate()
        .map(|(k, m)| blade.placed(format!("{name}-blade-{}", k + 1), &rigid(m)))
        .collect();
    let placed: Vec<&crate::mesh::TriMesh> = bodies.iter().map(CheckedPart::mesh).collect();
    if let Some(bad) = rotor
        .check_hand(&placed, &HandOptions::DEFAULT)
        .into_iter()
        .find(|h| !h.is_ok())
    {
        return Err(PipelineError::Hand(Box::new(bad)));
    }
    if let Some(hub) = &rotor.hub {
        let hub_part = Part {
            name: format!("{name}-hub"),
            mesh: hub.mesh(tolerance),
        };
        let hub_body = checked(hub_part, hub.genus(), &[])?;
        bodies.push(hub_body.clone());
        out.push(BuiltPart {
            kind: PartKind::Hub,
            name: format!("{name}-hub"),
            bodies: vec![hub_body],
        });
    }
    let named: Vec<(&str, &crate::mesh::TriMesh)> =
        bodies.iter().map(|b| (b.name(), b.mesh())).collect();
    let found = interferences(&named, CheckOptions::DEFAULT.max_listed);
    if !found.is_empty() {
        return Err(PipelineError::Interference {
            part: format!("{name}-rotor"),
            found,
        });
    }
    out.push(BuiltPart {
        kind: PartKind::Rotor,
        name: format!("{name}-rotor"),
        bodies,
    });
    Ok(out)
}

/// The one-piece rotor: blades joined by a prismatic hub, checked (genus 1 with a
/// central bore).
pub(super) fn one_piece_part(
    built: &BuiltBlade,
    facts: &BladeFacts,
    rotor: &Rotor,
    spec: &OnePieceSpec,
    design: &Design,
) -> Result<BuiltPart, PipelineError> {
    let blade = OnePieceBlade {
        name: &built.name,
        mesh: built.mesh(),
        root_ring: &built.tessellation.root_ring,
        root_cap: built.tessellation.root_cap.clone(),
        facts,
    };
    let part = one_piece(&blade, &rotor.spec, spec).map_err(|e| in_design(design, e))?;
    let name = part.name.clone();
    let body = checked(part, u32::from(spec.bore.is_some()), &[])?;
    Ok(BuiltPart {
        kind: PartKind::OnePiece,
        name,
        bodies: vec![body],
    })
}

/// The segments of a split blade, each checked with the genus its holes give it
/// (checked two at a time: the checks of one segment do not depend on another's).
pub(super) fn segment_parts(
    name: &str,
    segments: Vec<SegmentMesh>,
    likely_causes: &[SteepStep],
) -> Result<Vec<BuiltPart>, PipelineError> {
    let jobs: Vec<(PartKind, Part, u32)> = segments
        .into_iter()
        .map(|s| {
            let kind = PartKind::Segment {
                index: s.index,
                count: s.count,
            };
            let part = Part {
                name: format!("{name}{}", kind.suffix()),
                mesh: s.mesh,
            };
            (kind, part, s.genus)
        })
        .collect();
    let half = jobs.len().div_ceil(2);
    let mut jobs = jobs;
    let second = jobs.split_off(half);
    let run = |list: Vec<(PartKind, Part, u32)>| -> Result<Vec<BuiltPart>, PipelineError> {
        list.into_iter()
            .map(|(kind, part, genus)| {
                let name = part.name.clone();
                Ok(BuiltPart {
                    kind,
                    name,
                    bodies: vec![checked(part, genus, likely_causes)?],
                })
            })
            .collect()
    };
    let (a, b) = std::thread::scope(|scope| {
        let other = scope.spawn(|| run(second));
        let mine = run(jobs);
        (mine, other.join())
    });
    let mut out = a?;
    out.extend(b.unwrap_or_else(|p| std::panic::resume_unwind(p))?);
    Ok(out)
}

/// A segment error: bad keys as problems of the design file, with their lines.
pub(super) fn segment_error(design: &Design, e: SegmentError) -> PipelineError {
    match e {
        SegmentError::Key { key, message } => {
            DesignError::one(design.problem(&key, message)).into()
        }
        other => PipelineError::Segment(other),
    }
}

/// An assembly error as a problem of the design file, with its line.
pub(super) fn in_design(design: &Design, e: AssemblyError) -> PipelineError {
    DesignError::one(design.problem(&e.key, e.message)).into()
}
