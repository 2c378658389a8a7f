//! A built design's print job: what of the outcome goes to the printer, and how each
//! part's pose is chosen (the printer-fit stage plans it, see [`crate::fit::plan_job`]).

use super::{Outcome, PartKind};
use crate::design::Design;
use crate::fit::{BladeAxes, JobItem, PoseClass, PrintOptions, SpanLayout};

/// What goes to the printer for a built design: the outcome's print set (the one-piece
/// rotor; or the blade, or each of its segments, once per blade and the hub), the blade's
/// pose chosen with its axes (a segment's too: its span axis is the blade's) and, for a
/// whole blade, its span regions; `pose` when given; `copies` overrides the count of the
/// blade (or of each segment).
pub fn design_job<'a>(
    outcome: &'a Outcome,
    design: &Design,
    copies: Option<usize>,
    pose: Option<PoseClass>,
) -> Vec<JobItem<'a>> {
    let axes = BladeAxes::of_design(design);
    let span = SpanLayout::of_blade(&outcome.blade.blade, design.blade.min_te_thickness);
    outcome
        .print_set()
        .into_iter()
        .map(|(kind, part, n)| {
            let whole = kind == PartKind::Blade;
            let blade = whole || matches!(kind, PartKind::Segment { .. });
            JobItem {
                part,
                copies: if blade { copies.unwrap_or(n) } else { n },
                print: PrintOptions {
                    axes: blade.then_some(axes),
                    pose: if blade { pose } else { None },
                    ..PrintOptions::DEFAULT
                },
                span: whole.then_some(span),
            }
        })
        .collect()
}
