//! A small SVG writer: documents, escaped text, polylines and line charts.
//!
//! Hand-written SVG 1.1 (no scripts, no external references), so the files open in any
//! browser and embed inline in HTML.

use std::fmt::Write;

/// Escapes text for XML content and attribute values; control characters that XML 1.0
/// forbids become spaces.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            c if (c as u32) < 0x20 && c != '\t' && c != '\n' => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// A line segment between two points, px.
pub type Segment = ((f64, f64), (f64, f64));

/// An SVG document being built. Coordinates in SVG user units (pixels), y down.
#[derive(Debug, Clone)]
pub struct Svg {
    width: f64,
    height: f64,
    body: String,
}

/// Colours used for series, in order.
pub const PALETTE: [&str; 6] = [
    "#1f5fa8", "#c0392b", "#2e8b57", "#8e44ad", "#d35400", "#555555",
];

impl Svg {
    /// An empty document of the given size, px.
    pub fn new(width: f64, height: f64) -> Svg {
        Svg {
            width,
            height,
            body: String::new(),
        }
    }

    /// Width, px.
    pub fn width(&self) -> f64 {
        self.width
    }

    /// Height, px.
    pub fn height(&self) -> f64 {
        self.height
    }

    /// Adds a text label at (x, y); `anchor` is `start`, `middle` or `end`.
    pub fn text(&mut self, x: f64, y: f64, size: f64, anchor: &str, s: &str) {
        let _ = writeln!(
            self.body,
            r#"<text x="{x:.2}" y="{y:.2}" font-size="{size}" text-anchor="{anchor}" font-family="sans-serif">{}</text>"#,
            escape(s)
        );
    }

    /// Adds a line segment.
    pub fn line(&mut self, a: (f64, f64), b: (f64, f64), stroke: &str, width: f64) {
        let _ = writeln!(
            self.body,
            r#"<line x1="{:.2}" y1="{:.2}" x2="{:.2}" y2="{:.2}" stroke="{stroke}" stroke-width="{width}"/>"#,
            a.0, a.1, b.0, b.1
        );
    }

    /// Adds a dashed line segment.
    pub fn dashed(&mut self, a: (f64, f64), b: (f64, f64), stroke: &str) {
        let _ = writeln!(
            self.body,
            r#"<line x1="{:.2}" y1="{:.2}" x2="{:.2}" y2="{:.2}" stroke="{stroke}" stroke-width="1" stroke-dasharray="5,4"/>"#,
            a.0, a.1, b.0, b.1
        );
    }

    /// Adds an open (`closed = false`) or closed polyline.
    pub fn polyline(&mut self, pts: &[(f64, f64)], stroke: &str, width: f64, closed: bool) {
        if pts.len() < 2 {
            return;
        }
        let tag = if closed { "polygon" } else { "polyline" };
        let mut d = String::with_capacity(pts.len() * 16);
        for (x, y) in pts {
            let _ = write!(d, "{x:.2},{y:.2} ");
        }
        let _ = writeln!(
            self.body,
            r#"<{tag} points="{}" fill="none" stroke="{stroke}" stroke-width="{width}" stroke-linejoin="round"/>"#,
            d.trim_end()
        );
    }

    /// Adds a batch of segments as one path (cheap for many edges).
    pub fn segments(&mut self, segs: &[Segment], stroke: &str, width: f64) {
        if segs.is_empty() {
            return;
        }
        let mut d = String::with_capacity(segs.len() * 32);
        for (a, b) in segs {
            let _ = write!(d, "M{:.2} {:.2}L{:.2} {:.2}", a.0, a.1, b.0, b.1);
        }
        let _ = writeln!(
            self.body,
            r#"<path d="{d}" fill="none" stroke="{stroke}" stroke-width="{width}" stroke-linecap="round"/>"#
        );
    }

    /// Adds a rectangle outline.
    pub fn rect(&mut self, x: f64, y: f64, w: f64, h: f64, stroke: &str) {
        let _ = writeln!(
            self.body,
            r#"<rect x="{x:.2}" y="{y:.2}" width="{w:.2}" height="{h:.2}" fill="none" stroke="{stroke}" stroke-width="1"/>"#
        );
    }

    /// The finished document (with XML declaration when `standalone`, for files; without
    /// for inline HTML).
    pub fn finish(&self, title: &str, standalone: bool) -> String {
        let mut s = String::new();
        if standalone {
            s.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
        }
        let _ = writeln!(
            s,
            r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}">"#,
            w = self.width,
            h = self.height
        );
        let _ = writeln!(s, "<title>{}</title>", escape(title));
        let _ = writeln!(
            s,
            r#"<rect x="0" y="0" width="{}" height="{}" fill="white"/>"#,
            self.width, self.height
        );
        s.push_str(&self.body);
        s.push_str("</svg>\n");
        s
    }
}

/// "Nice" tick values covering `[lo, hi]` (about `n` of them).
pub fn ticks(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    if !(lo.is_finite() && hi.is_finite()) || hi <= lo {
        return vec![lo];
    }
    let raw = (hi - lo) / n.max(1) as f64;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0]
        .iter()
        .map(|f| f * mag)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * mag);
    let first = (lo / step).ceil() * step;
    let mut out = Vec::new();
    let mut v = first;
    while v <= hi + step * 1e-9 {
        out.push(if v.abs() < step * 1e-9 { 0.0 } else { v });
        v += step;
    }
    out
}

/// Formats a tick label compactly.
pub fn label(v: f64) -> String {
    if v == 0.0 {
        "0".into()
    } else if v.abs() >= 1000.0 || v.abs() < 0.01 {
        format!("{v:.3e}")
    } else {
        let s = format!("{v:.3}");
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    }
}

/// One data series of a line chart.
#[derive(Debug, Clone)]
pub struct Series {
    /// Legend text.
    pub name: String,
    /// Points (x, y) in data units; non-finite values break the line.
    pub points: Vec<(f64, f64)>,
    /// Dashed line (for limits and reference values).
    pub dashed: bool,
}

/// A line chart in a rectangle of an [`Svg`]: axes, ticks, series and legend.
#[derive(Debug, Clone)]
pub struct Chart {
    /// Title above the plot.
    pub title: String,
    /// x-axis label with unit.
    pub x_label: String,
    /// y-axis label with unit.
    pub y_label: String,
    /// Series to draw.
    pub series: Vec<Series>,
    /// Force the y range to include 0.
    pub y_zero: bool,
}

impl Chart {
    /// Draws the chart in the box `(x, y, w, h)` of `svg`.
    pub fn draw(&self, svg: &mut Svg, x: f64, y: f64, w: f64, h: f64) {
        // Title, then one legend row, then the plot.
        let (l, r, t, b) = (x + 62.0, x + w - 12.0, y + 50.0, y + h - 40.0);
        let finite = |v: &f64| v.is_finite();
        let xs: Vec<f64> = self
            .series
            .iter()
            .flat_map(|s| s.points.iter().map(|p| p.0))
            .filter(finite)
            .collect();
        let ys: Vec<f64> = self
            .series
            .iter()
            .flat_map(|s| s.points.iter().map(|p| p.1))
            .filter(finite)
            .collect();
        svg.text(x + w / 2.0, y + 16.0, 14.0, "middle", &self.title);
        svg.rect(l, t, r - l, b - t, "#999999");
        if xs.is_empty() || ys.is_empty() {
            svg.text((l + r) / 2.0, (t + b) / 2.0, 12.0, "middle", "no data");
            return;
        }
        let (mut x0, mut x1) = minmax(&xs);
        let (mut y0, mut y1) = minmax(&ys);
        if self.y_zero {
            y0 = y0.min(0.0);
            y1 = y1.max(0.0);
        }
        if x1 - x0 <= 0.0 {
            x0 -= 1.0;
            x1 += 1.0;
        }
        if y1 - y0 <= 0.0 {
            let d = y0.abs().max(1.0) * 0.1;
            y0 -= d;
            y1 += d;
        }
        let pad = (y1 - y0) * 0.05;
        let (y0, y1) = (y0 - pad, y1 + pad);
        let sx = |v: f64| l + (v - x0) / (x1 - x0) * (r - l);
        let sy = |v: f64| b - (v - y0) / (y1 - y0) * (b - t);
        for tv in ticks(x0, x1, 6) {
            svg.line((sx(tv), b), (sx(tv), b + 4.0), "#333333", 1.0);
            svg.text(sx(tv), b + 16.0, 10.0, "middle", &label(tv));
        }
        for tv in ticks(y0, y1, 5) {
            svg.line((l - 4.0, sy(tv)), (l, sy(tv)), "#333333", 1.0);
            svg.line((l, sy(tv)), (r, sy(tv)), "#eeeeee", 1.0);
            svg.text(l - 6.0, sy(tv) + 3.0, 10.0, "end", &label(tv));
        }
        svg.text((l + r) / 2.0, b + 32.0, 11.0, "middle", &self.x_label);
        svg.text(l, t - 4.0, 10.0, "start", &self.y_label);
        for (i, s) in self.series.iter().enumerate() {
            let colour = PALETTE[i % PALETTE.len()];
            // Break the line at non-finite points.
            for run in s.points.split(|p| !(p.0.is_finite() && p.1.is_finite())) {
                let pts: Vec<(f64, f64)> = run.iter().map(|p| (sx(p.0), sy(p.1))).collect();
                if s.dashed {
                    for wnd in pts.windows(2) {
                        svg.dashed(wnd[0], wnd[1], colour);
                    }
                } else {
                    svg.polyline(&pts, colour, 1.6, false);
                }
            }
            let (lx, ly) = (l + 150.0 * i as f64, y + 32.0);
            if s.dashed {
                svg.dashed((lx, ly - 4.0), (lx + 20.0, ly - 4.0), colour);
            } else {
                svg.line((lx, ly - 4.0), (lx + 20.0, ly - 4.0), colour, 2.0);
            }
            svg.text(lx + 24.0, ly, 10.0, "start", &s.name);
        }
    }
}

/// Smallest and largest of a non-empty slice.
pub fn minmax(v: &[f64]) -> (f64, f64) {
    v.iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| {
            (a.min(x), b.max(x))
        })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ticks_cover_the_range_with_round_steps() {
        let t = ticks(37.0, 281.0, 6);
        assert_eq!(t, vec![50.0, 100.0, 150.0, 200.0, 250.0]);
        let t = ticks(-0.3, 0.7, 5);
        assert!(t.contains(&0.0) && t.len() >= 4);
        assert_eq!(ticks(1.0, 1.0, 5), vec![1.0]);
        assert_eq!(escape("a<b & \"c\""), "a&lt;b &amp; &quot;c&quot;");
        assert_eq!(label(12.5), "12.5");
        assert_eq!(label(0.0), "0");
    }
}
