//! Trailing-edge thickening for printing: a sharp or thin trailing edge is opened to a
//! minimum thickness by a smooth blend over the aft part of the section.
//!
//! With `x_t` the position of maximum thickness, `g` the current and `g_min` the wanted
//! trailing-edge thickness, each surface moves away from the mean line by
//!
//! ```text
//! d(x) = (g_min - g) / 2 * S((x - x_t) / (1 - x_t)),   S(s) = s^2 (3 - 2 s)  (x > x_t)
//! ```
//!
//! and not at all ahead of `x_t`: the leading edge and the thickest point are untouched,
//! the slope is continuous at `x_t`, and the added area is `(g_min - g)(1 - x_t) / 2`
//! (the smoothstep `S` integrates to 1/2).

use super::blend::with_structure;
use super::error::SectionError;
use super::measures::{area_centroid, distributions, refined_max};
use super::section::Section;
use nalgebra::Point2;

/// The thickened section and what it changed.
#[derive(Debug, Clone, PartialEq)]
pub struct Thickened {
    /// The section with the thickened trailing edge (resampled structure).
    pub section: Section,
    /// Trailing-edge thickness before, fraction of chord.
    pub te_before: f64,
    /// Trailing-edge thickness after, fraction of chord.
    pub te_after: f64,
    /// Area before (of the resampled section), chord².
    pub area_before: f64,
    /// Area after, chord².
    pub area_after: f64,
}

impl Thickened {
    /// Added area, chord² (0 when the trailing edge was thick enough).
    pub fn area_change(&self) -> f64 {
        self.area_after - self.area_before
    }
}

/// Thickens the trailing edge to at least `min_te` (fraction of chord, in `[0, 0.1]`),
/// working on a resampling with `n` points per side. A trailing edge already at least
/// that thick is left as it is.
pub fn thicken_te(section: &Section, min_te: f64, n: usize) -> Result<Thickened, SectionError> {
    if !(0.0..=0.1).contains(&min_te) {
        return Err(SectionError::Parameter {
            what: "minimum trailing-edge thickness",
            value: min_te,
            fix: "give a fraction of chord between 0 and 0.1 (0.005 is 0.5 % of chord)",
        });
    }
    let r = with_structure(section, n)?;
    let (x, t, _) = distributions(&r);
    let (_, xt) = refined_max(&x, &t);
    let g = t[t.len() - 1];
    let (area_before, _) = area_centroid(r.points());
    let grow = (min_te - g).max(0.0);
    if grow == 0.0 {
        return Ok(Thickened {
            te_before: g,
            te_after: g,
            area_before,
            area_after: area_before,
            section: r,
        });
    }
    let up = r.upper_le_to_te();
    let lo = r.lower_le_to_te();
    let (mut nu, mut nl) = (Vec::with_capacity(n), Vec::with_capacity(n));
    for (u, l) in up.iter().zip(lo) {
        let s = if xt < 1.0 {
            ((u.x - xt) / (1.0 - xt)).clamp(0.0, 1.0)
        } else {
            0.0
        };
        let d = 0.5 * grow * s * s * (3.0 - 2.0 * s);
        nu.push(Point2::new(u.x, u.y + d));
        nl.push(Point2::new(l.x, l.y - d));
    }
    let out = Section::from_sides(section.name(), &nu, &nl)
        .map(|s| s.with_chord_line(section.chord_line()))
        .ok_or(SectionError::Incompatible {
            a: section.name().into(),
            b: section.name().into(),
        })?;
    let (area_after, _) = area_centroid(out.points());
    let te_after = nu[nu.len() - 1].y - nl[nl.len() - 1].y;
    Ok(Thickened {
        section: out,
        te_before: g,
        te_after,
        area_before,
        area_after,
    })
}
