//! Warnings about a design that builds but may not be what its author meant.

use crate::design::Design;
use std::fmt;

/// A change between neighbouring stations steeper than a blade surface can follow
/// without risk of folding over itself: chord, sweep or prebend changing by more than
/// the radial step (45 degrees), or twist by more than 5 degrees per millimetre
/// (common practice for lofted surfaces; a warning, the solid checks decide).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SteepStep {
    /// Where the inner station is written (file and line, or key).
    pub from: String,
    /// Where the outer station is written.
    pub to: String,
    /// Radial step between them, mm.
    pub span: f64,
    /// What changes too fast, with the change.
    pub changes: Vec<StepChange>,
}

/// One quantity that changes too fast between two stations.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "what", content = "by")]
pub enum StepChange {
    /// Chord change, mm.
    Chord(f64),
    /// Sweep change, mm.
    Sweep(f64),
    /// Prebend change, mm.
    Prebend(f64),
    /// Twist change, degrees.
    Twist(f64),
}

impl fmt::Display for StepChange {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            StepChange::Chord(d) => write!(f, "chord changes by {d:.1} mm"),
            StepChange::Sweep(d) => write!(f, "sweep changes by {d:.1} mm"),
            StepChange::Prebend(d) => write!(f, "prebend changes by {d:.1} mm"),
            StepChange::Twist(d) => write!(f, "twist changes by {d:.1} degrees"),
        }
    }
}

impl fmt::Display for SteepStep {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let changes: Vec<String> = self.changes.iter().map(ToString::to_string).collect();
        write!(
            f,
            "{} -> {}: {} over {:.1} mm of span; a step this steep may fold the surface (add stations between, or check the values)",
            self.from,
            self.to,
            changes.join(" and "),
            self.span
        )
    }
}

/// Every steep step of the design's station table, root first.
pub fn steep_steps(design: &Design) -> Vec<SteepStep> {
    let mut out = Vec::new();
    for w in design.stations.windows(2) {
        let dr = w[1].radius - w[0].radius;
        let mut changes = Vec::new();
        for (make, a, b) in [
            (
                StepChange::Chord as fn(f64) -> StepChange,
                w[0].chord,
                w[1].chord,
            ),
            (StepChange::Sweep, w[0].sweep, w[1].sweep),
            (StepChange::Prebend, w[0].prebend, w[1].prebend),
        ] {
            if (b - a).abs() > dr {
                changes.push(make((b - a).abs()));
            }
        }
        let twist = (w[1].twist - w[0].twist).abs();
        if twist > 5.0 * dr {
            changes.push(StepChange::Twist(twist));
        }
        if !changes.is_empty() {
            out.push(SteepStep {
                from: w[0].origin.clone(),
                to: w[1].origin.clone(),
                span: dr,
                changes,
            });
        }
    }
    out
}
