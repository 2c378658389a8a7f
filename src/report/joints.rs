//! A split blade in the report: the mass of each segment, the net section at each joint
//! (the split face with the pin holes and the channel removed) and the stress there.
//!
//! The net section is the cut of the segment below the joint by the split plane itself
//! ([`Slice::cut`] at the joint's radius: its top face, holes included as clockwise
//! loops that subtract, see [`crate::props::SectionProps`]). The loads at the joint are
//! the whole blade's ([`StressTable::estimate`] at the joint's radius: the centrifugal
//! force of everything outboard and the flapwise bending moment of the thrust outboard);
//! the stresses are those loads on the net section, the same way the estimate treats
//! any section (fill fraction, unsymmetrical bending at the loops' points). They are
//! stresses in the printed plastic of the glued face only: what the rod, the pins and
//! the glue carry is not modelled, hence [`JOINT_CAUTIONS`].

use super::model::PartSummary;
use super::ReportError;
use crate::check::CheckedPart;
use crate::props::{Fill, LoadCase, Material, SectionProps, Slice, StressTable};
use crate::segment::Plan;

/// Cautions printed with every split blade's report.
pub const JOINT_CAUTIONS: [&str; 2] = [
    "A split blade is only as strong as its joints: the joint's strength depends on the rod (or tube), the glue and how well they bond to the print, none of which is modelled here. The net-section stress is the plastic's share only; the pins align, they do not carry load.",
    "Test a glued joint to failure before trusting it, inspect the joints for cracks before every run, and follow local codes and licensed engineering practice.",
];

/// The segments of a split blade in the report.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SegmentsSummary {
    /// Mass properties of each segment, root first (with the fill model).
    pub segments: Vec<PartSummary>,
    /// Each joint's sections and stress.
    pub joints: Vec<JointSection>,
    /// The rod's diameter and length to cut, mm, when there is a spar channel.
    pub rod: Option<[f64; 2]>,
    /// [`JOINT_CAUTIONS`].
    pub cautions: Vec<String>,
}

/// One joint: the blade's section there, the net section of its split face, and the
/// stress on that net section.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct JointSection {
    /// Joint number from the root, from 1.
    pub joint: usize,
    /// Radius of the split plane, mm.
    pub radius: f64,
    /// The whole blade's section there (no holes).
    pub gross: SectionProps,
    /// The split face with the holes removed.
    pub net: SectionProps,
    /// Holes in the face (pins and the channel).
    pub holes: usize,
    /// The stress there (only with a load case).
    pub stress: Option<JointStress>,
}

/// Loads and stresses at a joint's net section (MPa, N, N mm).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct JointStress {
    /// Centrifugal force of the blade outboard, N.
    pub centrifugal_force: f64,
    /// Flapwise bending moment, N mm.
    pub bending_moment: f64,
    /// Material fraction of the net section (shell plus infill).
    pub fill: f64,
    /// Centrifugal stress on the net section, MPa.
    pub centrifugal_stress: f64,
    /// Largest tension on the net section, MPa.
    pub max_tension: f64,
    /// Largest compression on the net section, MPa (positive).
    pub max_compression: f64,
    /// Material strength over the largest stress (infinite without load).
    pub safety_factor: f64,
}

/// The segments' summary: `blade` is the whole blade (blade frame), `segments` its
/// segments root first, `plan` their plan.
///
/// # Errors
/// [`ReportError`] when a part encloses no volume or a cut fails.
pub fn segments_summary(
    blade: &CheckedPart,
    segments: &[&CheckedPart],
    plan: &Plan,
    material: &Material,
    fill: Fill,
    load: Option<&LoadCase>,
) -> Result<SegmentsSummary, ReportError> {
    let mut parts = Vec::with_capacity(segments.len());
    for s in segments {
        let (summary, _) = PartSummary::of_part(s, material, fill)
            .ok_or_else(|| ReportError::NoVolume(s.name().to_string()))?;
        parts.push(summary);
    }
    let slice_err = |part: &str| {
        let part = part.to_string();
        move |source| ReportError::Slice { part, source }
    };
    let mut joints = Vec::with_capacity(plan.joints.len());
    for (k, j) in plan.joints.iter().enumerate() {
        let below = segments
            .get(k)
            .ok_or_else(|| ReportError::NoVolume(format!("segment {}", k + 1)))?;
        let face = Slice::cut(below.mesh(), j.radius).map_err(slice_err(below.name()))?;
        let whole = Slice::cut(blade.mesh(), j.radius).map_err(slice_err(blade.name()))?;
        let (Some(net), Some(gross)) = (
            SectionProps::of_slice(&face),
            SectionProps::of_slice(&whole),
        ) else {
            return Err(ReportError::NoVolume(below.name().to_string()));
        };
        let stress = match load {
            Some(l) => {
                let table = StressTable::estimate(blade.mesh(), &[j.radius], material, fill, l)
                    .map_err(|source| ReportError::Stress {
                        part: blade.name().to_string(),
                        source,
                    })?;
                table.rows.first().map(|row| {
                    let f = fill.fraction_of_section(&face.loops);
                    let sc = row.centrifugal_force / net.area / f;
                    let (b, c) = net.flap_bending(row.bending_moment);
                    let (mut hi, mut lo) = (sc, sc);
                    for p in face.points() {
                        let s = sc + (b * (p.x - net.cx) + c * (p.y - net.cy)) / f;
                        hi = hi.max(s);
                        lo = lo.min(s);
                    }
                    let worst = hi.abs().max(lo.abs());
                    JointStress {
                        centrifugal_force: row.centrifugal_force,
                        bending_moment: row.bending_moment,
                        fill: f,
                        centrifugal_stress: sc,
                        max_tension: hi.max(0.0),
                        max_compression: (-lo).max(0.0),
                        safety_factor: if worst > 0.0 {
                            material.strength / worst
                        } else {
                            f64::INFINITY
                        },
                    }
                })
            }
            None => None,
        };
        joints.push(JointSection {
            joint: j.index,
            radius: j.radius,
            gross,
            net,
            holes: face.loops.len().saturating_sub(1),
            stress,
        });
    }
    Ok(SegmentsSummary {
        segments: parts,
        joints,
        rod: plan
            .channel
            .as_ref()
            .map(|c| [c.rod_diameter, c.rod_length]),
        cautions: JOINT_CAUTIONS.iter().map(|s| s.to_string()).collect(),
    })
}
