//! Print advice for one pose: supports, brim, the trailing edge against the nozzle and the
//! layer direction, each with its reason in words.
//!
//! # Rules (common practice)
//! * **Supports** are needed when the overhang area ([`super::underside()`]) is larger than
//!   [`AdviceOptions::support_free_area`] (default 25 mm^2, about a 5 mm square: short
//!   bridges and small islands print without support).
//! * **Brim** is advised when the part stands more than [`AdviceOptions::brim_aspect`]
//!   (default 3) times taller than the side of a square of its bed contact,
//!   `height > 3 sqrt(contact area)`: a narrow footing under a tall part lifts or tips.
//!   A part with no contact at all rests on a point or a line and always gets one.
//! * **Trailing edge**: a nozzle lays lines about as wide as its bore or wider (line width
//!   100 to 120 % of the nozzle diameter), so an edge thinner than the nozzle diameter
//!   cannot be drawn and prints ragged or not at all; an edge under two nozzle diameters
//!   is a single line, which slicers drop unless thin walls are enabled.

use super::orient::Pose;
use super::Printer;

/// Thresholds of the advice.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct AdviceOptions {
    /// Largest overhang area printed without support, mm^2 (default 25, common practice).
    pub support_free_area: f64,
    /// Height to contact-width ratio above which a brim is advised (default 3, common
    /// practice).
    pub brim_aspect: f64,
}

impl AdviceOptions {
    /// The defaults.
    pub const DEFAULT: AdviceOptions = AdviceOptions {
        support_free_area: 25.0,
        brim_aspect: super::orient::BRIM_ASPECT,
    };
}

impl Default for AdviceOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// What the trailing edge needs from the nozzle.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TrailingEdgeAdvice {
    /// Thinnest trailing edge measured, mm.
    pub thinnest: f64,
    /// Span position of the thinnest edge, mm (blade frame z), when known.
    pub at: Option<f64>,
    /// Nozzle diameter, mm.
    pub nozzle: f64,
    /// True when the nozzle can draw the edge (thinnest >= nozzle).
    pub printable: bool,
    /// True when the edge is under two nozzle diameters: a single line.
    pub single_line: bool,
    /// Largest nozzle that draws the edge, mm (= the thinnest edge).
    pub largest_nozzle: f64,
    /// What to do, in words.
    pub why: String,
}

/// Advice for one pose.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PrintAdvice {
    /// True when supports are needed.
    pub supports: bool,
    /// Why (or why not).
    pub supports_why: String,
    /// True when a brim is advised.
    pub brim: bool,
    /// Why (or why not).
    pub brim_why: String,
    /// The layers against the span (blades only).
    pub layers_why: Option<String>,
    /// The trailing edge against the nozzle (when its thickness is known).
    pub trailing_edge: Option<TrailingEdgeAdvice>,
    /// Thresholds used.
    pub options: AdviceOptions,
}

/// Advice for printing a part in `pose` on `printer`. `thinnest_te` is the thinnest
/// trailing edge and its span position, mm (e.g. from [`super::Printability::min_te`]),
/// when the part is a blade.
pub fn advise(
    pose: &Pose,
    printer: &Printer,
    thinnest_te: Option<(f64, Option<f64>)>,
    opts: &AdviceOptions,
) -> PrintAdvice {
    let u = &pose.underside;
    let supports = u.overhang_area > opts.support_free_area;
    let supports_why = if supports {
        format!(
            "{:.0} mm^2 of the surface is steeper than the overhang limit above the first layer, more than the {:.0} mm^2 that short bridges and small islands manage without support (common practice)",
            u.overhang_area, opts.support_free_area
        )
    } else {
        format!(
            "{:.0} mm^2 of overhang, within the {:.0} mm^2 that short bridges and small islands manage without support (common practice)",
            u.overhang_area, opts.support_free_area
        )
    };
    let width = u.contact_area.max(0.0).sqrt();
    let brim = u.height > opts.brim_aspect * width;
    let brim_why = if u.contact_area <= 0.0 {
        "the part rests on a point or a line, with no area on the bed: use a brim (and check that it cannot tip)".to_string()
    } else if brim {
        format!(
            "{:.1} mm tall on {:.0} mm^2 of contact (a {:.1} mm square): more than {} times taller than its footing, which may lift or tip without a brim (common practice)",
            u.height, u.contact_area, width, opts.brim_aspect
        )
    } else {
        format!(
            "{:.1} mm tall on {:.0} mm^2 of contact (a {:.1} mm square): footing wide enough, no brim needed (common practice: at most {} times taller than the footing)",
            u.height, u.contact_area, width, opts.brim_aspect
        )
    };
    let layers_why = pose.span_to_layers_deg.map(|a| {
        format!(
            "the span is {a:.0} degrees from the layers: {} Layers bond less well than the filament is strong, so layers across the span are weakest in bending; check the strength with the stress estimate and follow licensed engineering practice",
            if a < 30.0 {
                "the layers run along the span, the strong way for bending."
            } else if a < 60.0 {
                "the layers run obliquely across the span; the bending stress acts partly across the layer boundaries."
            } else {
                "the layers run across the span; the bending stress acts across the layer boundaries."
            }
        )
    });
    let trailing_edge = thinnest_te.map(|(t, at)| te_advice(t, at, printer.nozzle));
    PrintAdvice {
        supports,
        supports_why,
        brim,
        brim_why,
        layers_why,
        trailing_edge,
        options: *opts,
    }
}

fn te_advice(thinnest: f64, at: Option<f64>, nozzle: f64) -> TrailingEdgeAdvice {
    let printable = thinnest >= nozzle;
    let single_line = thinnest < 2.0 * nozzle;
    let place = at.map(|z| format!(" at z = {z:.1} mm")).unwrap_or_default();
    let why = if !printable {
        format!(
            "the trailing edge is {thinnest:.2} mm thick{place}, thinner than the {nozzle:.2} mm nozzle, which lays lines at least about its own width: it prints ragged or not at all. Use a nozzle of at most {thinnest:.2} mm, or thicken the edge there to at least {nozzle:.2} mm (the printability finding for that part of the blade says how) (common practice)"
        )
    } else if single_line {
        format!(
            "the trailing edge is {thinnest:.2} mm thick{place}: one line of the {nozzle:.2} mm nozzle. Enable the slicer's thin-wall option so the edge is printed, or thicken it to {:.2} mm for two lines (common practice)",
            2.0 * nozzle
        )
    } else {
        format!(
            "the trailing edge is {thinnest:.2} mm thick{place}: at least two lines of the {nozzle:.2} mm nozzle (common practice)"
        )
    };
    TrailingEdgeAdvice {
        thinnest,
        at,
        nozzle,
        printable,
        single_line,
        largest_nozzle: thinnest,
        why,
    }
}
