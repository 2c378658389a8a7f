//! Top view of a plate as SVG, written by hand: bed outline, margin, part footprints,
//! labels and dimensions. Millimetres map to SVG user units one to one; the SVG y axis
//! points down, so printer y is drawn upward.

use super::layout::Plate;
use super::{Printer, Volume};
use crate::svg::escape;
use std::fmt::Write;

/// Numbers with two decimals, trailing zeros trimmed.
fn n(v: f64) -> String {
    let s = format!("{v:.2}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        "0".into()
    } else {
        s.into()
    }
}

/// The SVG document of one plate; `title` heads the drawing.
pub fn plate_svg(plate: &Plate, printer: &Printer, title: &str) -> String {
    let pad = 30.0;
    let m = printer.margin;
    // Bed extent in printer coordinates.
    let (x0, y0, x1, y1) = match printer.volume {
        Volume::Box { x, y, .. } => (0.0, 0.0, x, y),
        Volume::Round { diameter, .. } => {
            let r = 0.5 * diameter;
            (-r, -r, r, r)
        }
    };
    let (w, h) = (x1 - x0 + 2.0 * pad, y1 - y0 + 2.0 * pad);
    // Printer (x, y) to SVG (u, v).
    let u = |x: f64| x - x0 + pad;
    let v = |y: f64| y1 - y + pad;
    let font = ((x1 - x0).max(y1 - y0) / 45.0).max(2.0);
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{}mm" height="{}mm" viewBox="0 0 {} {}" font-family="sans-serif" font-size="{}">"#,
        n(w),
        n(h),
        n(w),
        n(h),
        n(font)
    );
    let _ = writeln!(s, "<title>{}</title>", escape(title));
    let _ = writeln!(
        s,
        r#"<rect x="0" y="0" width="{}" height="{}" fill="white"/>"#,
        n(w),
        n(h)
    );
    match printer.volume {
        Volume::Box { x, y, .. } => {
            let _ = writeln!(
                s,
                r##"<rect class="bed" x="{}" y="{}" width="{}" height="{}" fill="#f4f4f4" stroke="black" stroke-width="0.6"/>"##,
                n(u(0.0)),
                n(v(y)),
                n(x),
                n(y)
            );
            let _ = writeln!(
                s,
                r##"<rect class="margin" x="{}" y="{}" width="{}" height="{}" fill="none" stroke="#888" stroke-width="0.4" stroke-dasharray="3 2"/>"##,
                n(u(m)),
                n(v(y - m)),
                n(x - 2.0 * m),
                n(y - 2.0 * m)
            );
            let _ = writeln!(
                s,
                r#"<text x="{}" y="{}" text-anchor="middle">{} mm</text>"#,
                n(u(0.5 * x)),
                n(v(0.0) + 1.5 * font),
                n(x)
            );
            let _ = writeln!(
                s,
                r#"<text x="{}" y="{}" text-anchor="middle" transform="rotate(-90 {} {})">{} mm</text>"#,
                n(u(0.0) - 0.6 * font),
                n(v(0.5 * y)),
                n(u(0.0) - 0.6 * font),
                n(v(0.5 * y)),
                n(y)
            );
        }
        Volume::Round { diameter, .. } => {
            let r = 0.5 * diameter;
            let _ = writeln!(
                s,
                r##"<circle class="bed" cx="{}" cy="{}" r="{}" fill="#f4f4f4" stroke="black" stroke-width="0.6"/>"##,
                n(u(0.0)),
                n(v(0.0)),
                n(r)
            );
            let _ = writeln!(
                s,
                r##"<circle class="margin" cx="{}" cy="{}" r="{}" fill="none" stroke="#888" stroke-width="0.4" stroke-dasharray="3 2"/>"##,
                n(u(0.0)),
                n(v(0.0)),
                n(r - m)
            );
            let _ = writeln!(
                s,
                r#"<text x="{}" y="{}" text-anchor="middle">diameter {} mm</text>"#,
                n(u(0.0)),
                n(v(-r) + 1.5 * font),
                n(diameter)
            );
        }
    }
    for p in &plate.parts {
        let pts: Vec<String> = p
            .footprint
            .iter()
            .map(|q| format!("{},{}", n(u(q.x)), n(v(q.y))))
            .collect();
        let _ = writeln!(
            s,
            r##"<polygon class="part" points="{}" fill="#9ec5e8" fill-opacity="0.8" stroke="#1f4e79" stroke-width="0.4"/>"##,
            pts.join(" ")
        );
        let k = p.footprint.len().max(1) as f64;
        let cx = p.footprint.iter().map(|q| q.x).sum::<f64>() / k;
        let cy = p.footprint.iter().map(|q| q.y).sum::<f64>() / k;
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" text-anchor="middle">{}</text>"#,
            n(u(cx)),
            n(v(cy)),
            escape(&p.name)
        );
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" text-anchor="middle" font-size="{}">{} x {} x {} mm</text>"#,
            n(u(cx)),
            n(v(cy) + font),
            n(0.8 * font),
            n(p.size[0]),
            n(p.size[1]),
            n(p.size[2])
        );
    }
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}">{} (margin {} mm, clearance {} mm)</text>"#,
        n(pad),
        n(0.6 * pad),
        escape(title),
        n(m),
        n(printer.clearance)
    );
    s.push_str("</svg>\n");
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_markup() {
        assert_eq!(
            escape("a<b & \"c\" 'd'>"),
            "a&lt;b &amp; &quot;c&quot; &apos;d&apos;&gt;"
        );
    }
}
