//! The sections stacked as seen from the tip (looking toward the root, along -z): x to
//! the right, y (downstream) up.

use nalgebra::Point2;

use crate::props::Slice;
use crate::svg::{minmax, Svg, PALETTE};

/// Colour of the stacking axis in every picture.
pub const AXIS_COLOUR: &str = "#e6007e";

/// SVG of the cut outlines, all at the same scale, coloured from root to tip, with the
/// stacking axis seen end on: `axis` holds its (x, y) points root to tip (for example at
/// the cut radii), drawn as a line with a cross at each point; empty draws no axis.
pub fn stack_svg(name: &str, slices: &[Slice], axis: &[Point2<f64>], standalone: bool) -> String {
    let (w, h, m) = (760.0, 520.0, 40.0);
    let mut svg = Svg::new(w, h);
    svg.text(
        w / 2.0,
        20.0,
        14.0,
        "middle",
        &format!("Sections seen from the tip: {name}"),
    );
    let xs: Vec<f64> = slices
        .iter()
        .flat_map(|s| s.points().map(|p| p.x))
        .chain(axis.iter().map(|p| p.x))
        .collect();
    let ys: Vec<f64> = slices
        .iter()
        .flat_map(|s| s.points().map(|p| p.y))
        .chain(axis.iter().map(|p| p.y))
        .collect();
    if xs.is_empty() {
        svg.text(w / 2.0, h / 2.0, 12.0, "middle", "no sections");
        return svg.finish("Sections", standalone);
    }
    let (x0, x1) = minmax(&xs);
    let (y0, y1) = minmax(&ys);
    let scale =
        ((w - 2.0 * m) / (x1 - x0).max(1e-9)).min((h - 2.0 * m - 30.0) / (y1 - y0).max(1e-9));
    let cx = w / 2.0 - scale * (x0 + x1) / 2.0;
    let cy = (h + 20.0) / 2.0 + scale * (y0 + y1) / 2.0;
    let map = |x: f64, y: f64| (cx + scale * x, cy - scale * y);
    // Axes through the rotor-axis point x = 0, y = 0.
    svg.dashed(map(x0, 0.0), map(x1, 0.0), "#aaaaaa");
    svg.dashed(map(0.0, y0), map(0.0, y1), "#aaaaaa");
    let n = slices.len();
    for (i, s) in slices.iter().enumerate() {
        // Root blue (first colour) through to tip grey (last colour).
        let colour =
            PALETTE[(i * (PALETTE.len() - 1) / n.saturating_sub(1).max(1)).min(PALETTE.len() - 1)];
        for ring in &s.loops {
            let pts: Vec<(f64, f64)> = ring.iter().map(|p| map(p.x, p.y)).collect();
            svg.polyline(&pts, colour, 1.0, true);
        }
    }
    let marks: Vec<(f64, f64)> = axis.iter().map(|p| map(p.x, p.y)).collect();
    svg.polyline(&marks, AXIS_COLOUR, 1.2, false);
    for &(x, y) in &marks {
        svg.line((x - 5.0, y), (x + 5.0, y), AXIS_COLOUR, 1.2);
        svg.line((x, y - 5.0), (x, y + 5.0), AXIS_COLOUR, 1.2);
    }
    if !axis.is_empty() {
        svg.text(w - m, 44.0, 11.0, "end", "+ stacking axis");
    }
    svg.text(
        m,
        h - 12.0,
        11.0,
        "start",
        &format!(
            "{n} sections from r = {:.1} mm (blue) to {:.1} mm (grey); x chordwise (mm), y downstream (mm); scale {:.3} px/mm",
            slices.first().map_or(0.0, |s| s.radius),
            slices.last().map_or(0.0, |s| s.radius),
            scale
        ),
    );
    svg.finish(&format!("Sections of {name}"), standalone)
}
