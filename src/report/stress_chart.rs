//! Stress and safety factor against radius.

use super::numbers::{number, Decimals as D};
use crate::props::StressTable;
use crate::svg::{Chart, Series, Svg};

/// SVG with two charts: stresses (centrifugal, largest tension, largest compression,
/// allowable) and the safety factor (with the required value) against radius.
pub fn stress_svg(name: &str, table: &StressTable, standalone: bool) -> String {
    let (w, h) = (760.0, 520.0);
    let mut svg = Svg::new(w, h);
    let r: Vec<f64> = table.rows.iter().map(|row| row.section.radius).collect();
    let series = |label: &str, f: &dyn Fn(usize) -> f64, dashed: bool| Series {
        name: label.into(),
        points: (0..r.len()).map(|i| (r[i], f(i))).collect(),
        dashed,
    };
    let allow = table.material.strength / table.load.safety_factor;
    Chart {
        title: format!(
            "Stress at {} rpm, {} m/s: {name} ({})",
            number(table.load.rpm, D::Rpm),
            number(table.load.wind, D::MPerS),
            table.material.name
        ),
        x_label: "radius (mm)".into(),
        y_label: "stress (MPa)".into(),
        series: vec![
            series("largest tension", &|i| table.rows[i].max_tension, false),
            series(
                "largest compression",
                &|i| table.rows[i].max_compression,
                false,
            ),
            series("centrifugal", &|i| table.rows[i].centrifugal_stress, false),
            series("allowable", &|_| allow, true),
        ],
        y_zero: true,
    }
    .draw(&mut svg, 0.0, 0.0, w, 260.0);
    // Cap the plotted factor so an unloaded tip does not flatten the curve.
    let cap = (table.load.safety_factor * 10.0).max(10.0);
    Chart {
        title: format!(
            "Safety factor (smallest {} at r = {} mm)",
            number(table.min_safety_factor, D::Ratio),
            number(table.critical_radius, D::Mm)
        ),
        x_label: "radius (mm)".into(),
        y_label: format!("strength / stress (shown up to {cap})"),
        series: vec![
            series(
                "safety factor",
                &|i| table.rows[i].safety_factor.min(cap),
                false,
            ),
            series("required", &|_| table.load.safety_factor, true),
        ],
        y_zero: true,
    }
    .draw(&mut svg, 0.0, 260.0, w, 260.0);
    svg.finish(&format!("Stress of {name}"), standalone)
}
