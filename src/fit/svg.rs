//! Top view of a plate as SVG, written by hand: bed outline, margin, part footprints,
//! labels and dimensions. Millimetres map to SVG user units one to one; the SVG y axis
//! points down, so printer y is drawn upward.

use super::layout::{Placed, Plate};
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
    let view = View::of(printer);
    let mut s = String::new();
    view.open(&mut s, title);
    let m = printer.margin;
    match printer.volume {
        Volume::Box { x, y, .. } => view.box_bed(&mut s, x, y, m),
        Volume::Round { diameter, .. } => view.round_bed(&mut s, diameter, m),
    }
    for p in &plate.parts {
        view.part(&mut s, p);
    }
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}">{} (margin {} mm, clearance {} mm)</text>"#,
        n(view.pad),
        n(0.6 * view.pad),
        escape(title),
        n(m),
        n(printer.clearance)
    );
    s.push_str("</svg>\n");
    s
}

/// The drawing's frame: the bed's extent in printer coordinates with a border, and
/// the font size.
struct View {
    x0: f64,
    y1: f64,
    /// Border around the bed, mm.
    pad: f64,
    /// Drawing width and height, mm.
    w: f64,
    h: f64,
    font: f64,
}

impl View {
    fn of(printer: &Printer) -> View {
        let pad = 30.0;
        let (x0, y0, x1, y1) = match printer.volume {
            Volume::Box { x, y, .. } => (0.0, 0.0, x, y),
            Volume::Round { diameter, .. } => {
                let r = 0.5 * diameter;
                (-r, -r, r, r)
            }
        };
        View {
            x0,
            y1,
            pad,
            w: x1 - x0 + 2.0 * pad,
            h: y1 - y0 + 2.0 * pad,
            font: ((x1 - x0).max(y1 - y0) / 45.0).max(2.0),
        }
    }

    /// SVG u of printer x.
    fn u(&self, x: f64) -> f64 {
        x - self.x0 + self.pad
    }

    /// SVG v of printer y (drawn upward).
    fn v(&self, y: f64) -> f64 {
        self.y1 - y + self.pad
    }

    /// The `<svg>` element, title and white background.
    fn open(&self, s: &mut String, title: &str) {
        let (w, h) = (self.w, self.h);
        let _ = writeln!(
            s,
            r#"<svg xmlns="http://www.w3.org/2000/svg" width="{}mm" height="{}mm" viewBox="0 0 {} {}" font-family="sans-serif" font-size="{}">"#,
            n(w),
            n(h),
            n(w),
            n(h),
            n(self.font)
        );
        let _ = writeln!(s, "<title>{}</title>", escape(title));
        let _ = writeln!(
            s,
            r#"<rect x="0" y="0" width="{}" height="{}" fill="white"/>"#,
            n(w),
            n(h)
        );
    }

    /// An `x` by `y` box bed with its margin `m` and dimensions.
    fn box_bed(&self, s: &mut String, x: f64, y: f64, m: f64) {
        let font = self.font;
        let _ = writeln!(
            s,
            r##"<rect class="bed" x="{}" y="{}" width="{}" height="{}" fill="#f4f4f4" stroke="black" stroke-width="0.6"/>"##,
            n(self.u(0.0)),
            n(self.v(y)),
            n(x),
            n(y)
        );
        let _ = writeln!(
            s,
            r##"<rect class="margin" x="{}" y="{}" width="{}" height="{}" fill="none" stroke="#888" stroke-width="0.4" stroke-dasharray="3 2"/>"##,
            n(self.u(m)),
            n(self.v(y - m)),
            n(x - 2.0 * m),
            n(y - 2.0 * m)
        );
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" text-anchor="middle">{} mm</text>"#,
            n(self.u(0.5 * x)),
            n(self.v(0.0) + 1.5 * font),
            n(x)
        );
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" text-anchor="middle" transform="rotate(-90 {} {})">{} mm</text>"#,
            n(self.u(0.0) - 0.6 * font),
            n(self.v(0.5 * y)),
            n(self.u(0.0) - 0.6 * font),
            n(self.v(0.5 * y)),
            n(y)
        );
    }

    /// A round bed of `diameter` with its margin `m` and dimension.
    fn round_bed(&self, s: &mut String, diameter: f64, m: f64) {
        let r = 0.5 * diameter;
        let _ = writeln!(
            s,
            r##"<circle class="bed" cx="{}" cy="{}" r="{}" fill="#f4f4f4" stroke="black" stroke-width="0.6"/>"##,
            n(self.u(0.0)),
            n(self.v(0.0)),
            n(r)
        );
        let _ = writeln!(
            s,
            r##"<circle class="margin" cx="{}" cy="{}" r="{}" fill="none" stroke="#888" stroke-width="0.4" stroke-dasharray="3 2"/>"##,
            n(self.u(0.0)),
            n(self.v(0.0)),
            n(r - m)
        );
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" text-anchor="middle">diameter {} mm</text>"#,
            n(self.u(0.0)),
            n(self.v(-r) + 1.5 * self.font),
            n(diameter)
        );
    }

    /// A part's footprint with its name and size at the footprint's vertex mean.
    fn part(&self, s: &mut String, p: &Placed) {
        let pts: Vec<String> = p
            .footprint
            .iter()
            .map(|q| format!("{},{}", n(self.u(q.x)), n(self.v(q.y))))
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
            n(self.u(cx)),
            n(self.v(cy)),
            escape(&p.name)
        );
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" text-anchor="middle" font-size="{}">{} x {} x {} mm</text>"#,
            n(self.u(cx)),
            n(self.v(cy) + self.font),
            n(0.8 * self.font),
            n(p.size[0]),
            n(p.size[1]),
            n(p.size[2])
        );
    }
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
