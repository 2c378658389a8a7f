//! The sections stacked as seen from the tip (looking toward the root, along -z): x to
//! the right, y (downstream) up.
//!
//! Outlines are coloured in bands from the root (the first colour of
//! [`crate::svg::PALETTE`]) to the tip (its last colour); a legend on the right names the
//! radii of the outlines in each band.

use nalgebra::Point2;

use super::numbers::{fixed, number, Decimals};
use crate::props::Slice;
use crate::svg::{minmax, Svg, PALETTE};

/// Width of the legend column, px.
const LEGEND_WIDTH: f64 = 190.0;
/// Baseline of the legend's first line, px.
const LEGEND_TOP: f64 = 48.0;
/// Largest height of the outlines, px.
const MAX_DRAWING_HEIGHT: f64 = 440.0;
/// Radii per legend line.
const PER_LINE: usize = 3;

/// The palette colour of outline `i` of `n` (root first): bands from the first colour to
/// the last.
fn band(i: usize, n: usize) -> usize {
    (i * (PALETTE.len() - 1) / n.saturating_sub(1).max(1)).min(PALETTE.len() - 1)
}

/// Colour of the stacking axis in every picture.
pub const AXIS_COLOUR: &str = "#e6007e";

/// SVG of the cut outlines, all at the same scale, coloured from root to tip, with the
/// stacking axis seen end on: `axis` holds its (x, y) points root to tip (for example at
/// the cut radii), drawn as a line with a cross at each point; empty draws no axis.
pub fn stack_svg(name: &str, slices: &[Slice], axis: &[Point2<f64>], standalone: bool) -> String {
    let (w, m) = (760.0, 40.0);
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
    let title = format!("Sections seen from the tip: {name}");
    if xs.is_empty() {
        let h = 120.0;
        let mut svg = Svg::new(w, h);
        svg.text(w / 2.0, 20.0, 14.0, "middle", &title);
        svg.text(w / 2.0, h / 2.0, 12.0, "middle", "no sections");
        return svg.finish("Sections", standalone);
    }
    let (x0, x1) = minmax(&xs);
    let (y0, y1) = minmax(&ys);
    // The outlines fill the width left of the legend, at most MAX_DRAWING_HEIGHT tall;
    // the picture is as tall as the outlines or the legend, whichever is taller.
    let draw_w = w - 2.0 * m - LEGEND_WIDTH;
    let scale = (draw_w / (x1 - x0).max(1e-9)).min(MAX_DRAWING_HEIGHT / (y1 - y0).max(1e-9));
    let top = 50.0;
    let drawing_bottom = top + scale * (y1 - y0);
    let legend_bottom = LEGEND_TOP + legend_height(slices, !axis.is_empty());
    let h = (drawing_bottom.max(legend_bottom) + 40.0).ceil();
    let mut svg = Svg::new(w, h);
    svg.text(w / 2.0, 20.0, 14.0, "middle", &title);
    let cx = m + draw_w / 2.0 - scale * (x0 + x1) / 2.0;
    let cy = top + scale * y1;
    let map = |x: f64, y: f64| (cx + scale * x, cy - scale * y);
    // Axes through the rotor-axis point x = 0, y = 0.
    svg.dashed(map(x0, 0.0), map(x1, 0.0), "#aaaaaa");
    svg.dashed(map(0.0, y0), map(0.0, y1), "#aaaaaa");
    let n = slices.len();
    for (i, s) in slices.iter().enumerate() {
        // Root blue (first colour) through to tip grey (last colour).
        let colour = PALETTE[band(i, n)];
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
    legend(
        &mut svg,
        slices,
        !axis.is_empty(),
        w - LEGEND_WIDTH,
        LEGEND_TOP,
    );
    svg.text(
        m,
        h - 12.0,
        11.0,
        "start",
        &format!(
            "{n} sections from r = {} mm to {} mm; x chordwise (mm), y downstream (mm); scale {} px/mm",
            number(slices.first().map_or(0.0, |s| s.radius), Decimals::Mm),
            number(slices.last().map_or(0.0, |s| s.radius), Decimals::Mm),
            fixed(scale, 3)
        ),
    );
    svg.finish(&format!("Sections of {name}"), standalone)
}

/// The colour bands, root first: palette index and the radii of its outlines.
fn bands(slices: &[Slice]) -> Vec<(usize, Vec<f64>)> {
    let n = slices.len();
    let mut out: Vec<(usize, Vec<f64>)> = Vec::new();
    for (i, s) in slices.iter().enumerate() {
        let b = band(i, n);
        match out.last_mut() {
            Some((last, radii)) if *last == b => radii.push(s.radius),
            _ => out.push((b, vec![s.radius])),
        }
    }
    out
}

/// Height of the legend below its first baseline, px.
fn legend_height(slices: &[Slice], with_axis: bool) -> f64 {
    let lines: usize = bands(slices)
        .iter()
        .map(|(_, r)| r.len().div_ceil(PER_LINE))
        .sum();
    let bands = bands(slices).len();
    18.0 * (bands + usize::from(with_axis)) as f64 + 14.0 * (lines - bands) as f64
}

/// The legend at `(x, y)` (first baseline): a swatch per colour band with the radii of
/// its outlines, root first, then the stacking axis mark when it is drawn.
fn legend(svg: &mut Svg, slices: &[Slice], with_axis: bool, x: f64, y: f64) {
    svg.text(x, y, 11.0, "start", "outline at radius r (mm):");
    let mut row = y + 18.0;
    for (b, radii) in bands(slices) {
        svg.line((x, row - 4.0), (x + 22.0, row - 4.0), PALETTE[b], 2.0);
        let shown: Vec<String> = radii.iter().map(|&r| number(r, Decimals::Mm)).collect();
        let lines: Vec<&[String]> = shown.chunks(PER_LINE).collect();
        for (k, line) in lines.iter().enumerate() {
            let mut text = line.join(", ");
            if k + 1 < lines.len() {
                text.push(',');
            }
            svg.text(x + 28.0, row, 11.0, "start", &text);
            if k + 1 < lines.len() {
                row += 14.0;
            }
        }
        row += 18.0;
    }
    if with_axis {
        // One path (not two lines), so the picture's own crosses stay the only lines in
        // the axis colour.
        let (cx, cy) = (x + 11.0, row - 4.0);
        svg.segments(
            &[
                ((cx - 5.0, cy), (cx + 5.0, cy)),
                ((cx, cy - 5.0), (cx, cy + 5.0)),
            ],
            AXIS_COLOUR,
            1.2,
        );
        svg.text(x + 28.0, row, 11.0, "start", "stacking axis");
    }
}
