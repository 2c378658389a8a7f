//! The root transition seen along the span: section outlines from the root face to the
//! tip, one picture.

use super::stack_svg;
use crate::blade::Blade;
use crate::props::Slice;

/// SVG picture of the section outlines seen from the tip (along the span): the root
/// face, `n` sections along the transition (at least 2: its two ends) and every
/// station, drawn at one scale with [`stack_svg`] (root blue to tip
/// grey), with the stacking axis marked where it passes through each of them. Without a
/// root it shows the stations alone.
pub fn transition_svg(blade: &Blade, n: usize) -> String {
    let mut radii = vec![blade.root_face()];
    if let Some(root) = blade.root() {
        let (a, b) = (
            blade.root_radius() - root.transition_length,
            blade.root_radius(),
        );
        let k = n.max(2) - 1;
        radii.extend((0..=k).map(|i| a + (b - a) * i as f64 / k as f64));
    }
    radii.extend(blade.station_radii().iter().copied());
    radii.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
    let slices: Vec<Slice> = radii
        .iter()
        .map(|&r| Slice {
            radius: r,
            loops: vec![blade
                .ring(r)
                .points
                .iter()
                .map(|p| nalgebra::Point2::new(p.x, p.y))
                .collect()],
        })
        .collect();
    let axis: Vec<nalgebra::Point2<f64>> = radii
        .iter()
        .map(|&r| {
            let p = blade.axis_point(r);
            nalgebra::Point2::new(p.x, p.y)
        })
        .collect();
    stack_svg("root transition", &slices, &axis, true)
}
