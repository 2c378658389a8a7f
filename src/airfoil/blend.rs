//! Blending two sections and scaling a section to a target relative thickness. Both
//! work point by point on sections resampled to a common structure.

use super::error::SectionError;
use super::measures::{distributions, refined_max};
use super::section::{ChordLine, Section};
use nalgebra::Point2;

/// Default points per side when an operation has to resample.
pub const DEFAULT_POINTS: usize = 161;

/// The section resampled to `n` points per side (the same points when it already has
/// that structure: resampling is idempotent).
pub(crate) fn with_structure(s: &Section, n: usize) -> Result<Section, SectionError> {
    s.resample(n).map_err(|e| SectionError::shape(s.name(), e))
}

/// Blends two sections (in the section frame): `(1 - w) a + w b`, point by point, after resampling
/// both to `n` points per side. `w = 0` gives `a`, `w = 1` gives `b`; `w` must lie in
/// `[0, 1]`.
pub fn blend(a: &Section, b: &Section, w: f64, n: usize) -> Result<Section, SectionError> {
    if !(0.0..=1.0).contains(&w) {
        return Err(SectionError::Parameter {
            what: "blend weight",
            value: w,
            fix: "give a weight from 0 (first section) to 1 (second section)",
        });
    }
    let ra = with_structure(a, n)?;
    let rb = with_structure(b, n)?;
    if !ra.is_compatible(&rb) {
        return Err(SectionError::Incompatible {
            a: a.name().into(),
            b: b.name().into(),
        });
    }
    let name = if w == 0.0 {
        a.name().to_string()
    } else if w == 1.0 {
        b.name().to_string()
    } else {
        format!("{}~{}@{w}", a.name(), b.name())
    };
    // Both lie in the section frame; the blend's chord line is their common x axis, named
    // after the two only when they agree.
    let chord_line = if ra.chord_line() == rb.chord_line() {
        ra.chord_line()
    } else {
        ChordLine::Kept
    };
    let pb = rb.points();
    Ok(ra
        .map_points(|i, p| Point2::from(p.coords * (1.0 - w) + pb[i].coords * w))
        .with_name(name)
        .with_chord_line(chord_line))
}

impl Section {
    /// Scales the thickness about the mean line (camber kept) so that the maximum
    /// relative thickness becomes `target` (fraction of chord, in `(0, 0.5]`), on a
    /// resampling with `n` points per side.
    pub fn with_thickness(&self, target: f64, n: usize) -> Result<Section, SectionError> {
        if !(target > 0.0 && target <= 0.5) {
            return Err(SectionError::Parameter {
                what: "relative thickness",
                value: target,
                fix: "give a fraction of chord between 0 and 0.5 (0.12 for 12 %)",
            });
        }
        let r = with_structure(self, n)?;
        let (x, t, _) = distributions(&r);
        let (current, _) = refined_max(&x, &t);
        if current.is_nan() || current <= 0.0 {
            return Err(SectionError::Parameter {
                what: "current thickness",
                value: current,
                fix: "the section has no thickness to scale; check the outline",
            });
        }
        let k = target / current;
        let up = r.upper_le_to_te();
        let lo = r.lower_le_to_te();
        let (mut nu, mut nl) = (Vec::with_capacity(n), Vec::with_capacity(n));
        for (u, l) in up.iter().zip(lo) {
            let yc = 0.5 * (u.y + l.y);
            nu.push(Point2::new(u.x, yc + k * (u.y - yc)));
            nl.push(Point2::new(l.x, yc + k * (l.y - yc)));
        }
        Section::from_sides(self.name(), &nu, &nl)
            .map(|s| s.with_chord_line(self.chord_line()))
            .ok_or(SectionError::Incompatible {
                a: self.name().into(),
                b: self.name().into(),
            })
    }
}
