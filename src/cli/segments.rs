//! The segment plan in words, for `build` and `fit`.

use spanwright::fit::Volume;
use spanwright::segment::{AxisRule, Plan};
use std::fmt::Write as _;

/// Printed with every split blade: the joint's strength is not the plastic's alone.
pub const JOINT_CAUTION: &str = "Caution: a split blade is only as strong as its joints. The joint's strength depends on the rod (or tube), the glue and how well they bond to the print, none of which is modelled here; the pins only align the segments. Test a glued joint to failure before trusting it, keep the rod long, and follow local codes and licensed engineering practice before running a rotor.";

/// Lines describing the plan (indented by two spaces), ending with the caution when the
/// blade is split.
pub fn lines(plan: &Plan, name: &str) -> String {
    let mut s = String::new();
    if plan.count > 1 {
        let printer = plan.printer.map(|p| match p.volume {
            Volume::Box { x, y, z } => format!("the {x} x {y} x {z} mm printer"),
            Volume::Round { diameter, height } => {
                format!("the round {diameter} x {height} mm printer")
            }
        });
        let _ = writeln!(
            s,
            "  segments: {} per blade{}",
            plan.count,
            match (&printer, plan.automatic) {
                (Some(p), true) =>
                    format!(", the fewest that fit {p} ({} fit searches)", plan.searches),
                (Some(p), false) => format!(" at the radii given, each checked against {p}"),
                (None, _) => " at the radii given (no printer to check them against)".into(),
            }
        );
        for (k, split) in plan.splits.iter().enumerate() {
            let _ = writeln!(s, "  split {} at {split}", k + 1);
        }
        for j in &plan.joints {
            let pins: Vec<String> = j
                .pins
                .iter()
                .map(|p| format!("({:.2}, {:.2})", p[0], p[1]))
                .collect();
            let _ = writeln!(
                s,
                "  joint {} at {:.1} mm: {} pins of {} mm in {:.2} mm holes, {} mm deep each side, at {}{}; smallest wall {:.2} mm",
                j.index,
                j.radius,
                j.pins.len(),
                j.pin_diameter,
                j.hole_diameter,
                j.depth,
                pins.join(", "),
                if j.channel { " and the rod" } else { "" },
                j.smallest_wall
            );
        }
    }
    if let Some(c) = &plan.channel {
        let _ = writeln!(
            s,
            "  spar channel: {:.2} mm hole for a {} mm rod along the span through ({:.2}, {:.2}) ({}), from {:.1} mm ({}) to {:.1} mm (blind end; the wall holds to {:.1} mm); cut the rod to {:.1} mm; smallest wall {:.2} mm at {:.1} mm",
            c.hole_diameter,
            c.rod_diameter,
            c.axis[0],
            c.axis[1],
            match c.rule {
                AxisRule::Given => "given",
                AxisRule::Farthest => "the axis that reaches farthest with the wall kept",
            },
            c.start,
            if c.opens_at_root {
                "open at the root face"
            } else {
                "blind, the rod goes in from the first split face"
            },
            c.end,
            c.reach,
            c.rod_length,
            c.smallest_wall,
            c.smallest_wall_at
        );
    }
    if plan.count > 1 {
        for (k, f) in plan.fits.iter().enumerate() {
            let _ = writeln!(
                s,
                "  segment {} of {}: {} the printer, {:.1} x {:.1} x {:.1} mm on the bed",
                k + 1,
                plan.count,
                if f.fits { "fits" } else { "DOES NOT FIT" },
                f.size[0],
                f.size[1],
                f.size[2]
            );
        }
        let _ = writeln!(
            s,
            "  print the segments ({name}-segment-k-of-{}.*) once per blade; {name}.* is the whole blade as assembled, without the joints' holes",
            plan.count
        );
        let _ = writeln!(s, "  {JOINT_CAUTION}");
    }
    s
}
