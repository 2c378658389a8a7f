//! Planform picture: chord, twist and relative thickness against radius.

use crate::design::Station;
use crate::svg::{Chart, Series, Svg};

/// Relative thickness of a station (fraction of chord): the station's own value, else
/// the last two digits of a NACA 4-digit designation (`naca2412` -> 0.12), else `None`.
pub fn station_thickness(s: &Station) -> Option<f64> {
    if let Some(t) = s.thickness {
        return Some(t);
    }
    let name = s.section.trim().to_ascii_lowercase();
    let digits = name
        .strip_prefix("naca")?
        .trim_start_matches([' ', '-', '_']);
    if digits.len() == 4 && digits.bytes().all(|b| b.is_ascii_digit()) {
        digits[2..].parse::<f64>().ok().map(|t| t / 100.0)
    } else {
        None
    }
}

/// The planform SVG (standalone document when `standalone`).
pub fn planform_svg(name: &str, stations: &[Station], standalone: bool) -> String {
    let (w, h) = (760.0, 660.0);
    let mut svg = Svg::new(w, h);
    let pts = |f: &dyn Fn(&Station) -> Option<f64>| -> Vec<(f64, f64)> {
        stations
            .iter()
            .filter_map(|s| f(s).map(|v| (s.radius, v)))
            .collect()
    };
    let charts = [
        ("Chord", "chord (mm)", pts(&|s| Some(s.chord))),
        ("Twist", "twist (deg)", pts(&|s| Some(s.twist))),
        (
            "Relative thickness",
            "thickness (% chord)",
            pts(&|s| station_thickness(s).map(|t| t * 100.0)),
        ),
    ];
    for (i, (title, unit, points)) in charts.into_iter().enumerate() {
        Chart {
            title: format!("{title}: {name}"),
            x_label: "radius (mm)".into(),
            y_label: unit.into(),
            series: vec![Series {
                name: title.to_lowercase(),
                points,
                dashed: false,
            }],
            y_zero: i != 1,
        }
        .draw(&mut svg, 0.0, i as f64 * 220.0, w, 220.0);
    }
    svg.finish(&format!("Planform of {name}"), standalone)
}
