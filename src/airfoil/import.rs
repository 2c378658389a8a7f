//! Reading coordinate files in the two plain-text layouts of the trade.
//!
//! * **Loop**: one `x y` pair per line, from the trailing edge over the upper surface to
//!   the leading edge and back along the lower surface to the trailing edge (the reverse
//!   direction, and a loop starting at the leading edge, are recognised and fixed).
//! * **Sides**: a line with the two point counts (`upper lower`), then the upper surface
//!   and then the lower surface, each listed from the leading edge to the trailing edge.
//!
//! Both accept an optional name line first, blank lines, `#` comments (whole line or
//! trailing), separators of spaces, tabs, commas or semicolons, and CRLF or CR line ends.
//! The layout is detected from the data: a first data line of two whole numbers `>= 3`
//! whose sum equals the number of coordinate lines that follow is read as the counts.
//!
//! The outline is then brought into the section frame by the rule of
//! [`crate::conventions`] ("Section frame", see [`to_section_frame`]): coordinates
//! already normalised keep their own chord line and are taken as they are; any other
//! outline is normalised to its farthest point, and the section's
//! [`chord_line`](Section::chord_line) says so. Then it is checked: at least
//! [`MIN_POINTS`] distinct points, every point within the unit chord (with a margin of
//! [`RANGE_MARGIN`]), no self-intersection, each surface single-valued in x.

use super::error::SectionError;
use super::resample::{to_section_frame, Frame};
use super::section::Section;
use nalgebra::Point2;
use std::path::Path;

/// Fewest distinct points accepted in a section file.
pub const MIN_POINTS: usize = 10;

/// Margin (fraction of chord) by which a point in the section frame may lie outside
/// `0 <= x <= 1`.
pub const RANGE_MARGIN: f64 = 0.02;

/// Smallest enclosed area accepted, chord² (a 0.1 % thick section has about 7e-4).
pub const MIN_AREA: f64 = 1e-5;

/// Points per side of the trial resampling that checks each surface is single-valued.
const CHECK_POINTS: usize = 101;

/// The two file layouts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
pub enum Layout {
    /// One loop, trailing edge -> upper -> leading edge -> lower -> trailing edge.
    #[default]
    Loop,
    /// Point counts, then upper and lower surfaces, each from the leading edge.
    Sides,
}

/// A parsed file before it is brought into the section frame: the points in loop order with their line numbers.
#[derive(Debug, Clone, PartialEq)]
pub struct RawOutline {
    /// The name line, if the file has one.
    pub title: Option<String>,
    /// The layout found.
    pub layout: Layout,
    /// Points in loop order (upper trailing edge first when the file follows the layout).
    pub points: Vec<Point2<f64>>,
    /// File line (from 1) of each point.
    pub lines: Vec<usize>,
}

/// One coordinate line.
struct Row {
    x: f64,
    y: f64,
    line: usize,
}

/// Splits the text into the optional name line and the coordinate rows.
fn rows(text: &str, file: &str) -> Result<(Option<String>, Vec<Row>), SectionError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut title = None;
    let mut rows = Vec::new();
    let mut seen_content = false;
    let sep = if text.contains('\n') { '\n' } else { '\r' };
    for (i, raw_line) in text.split(sep).enumerate() {
        let line = i + 1;
        let content = raw_line.split('#').next().unwrap_or("").trim();
        if content.is_empty() {
            continue;
        }
        let tokens: Vec<&str> = content
            .split(|c: char| c.is_whitespace() || c == ',' || c == ';')
            .filter(|t| !t.is_empty())
            .collect();
        let values: Vec<Option<f64>> = tokens.iter().map(|t| t.parse::<f64>().ok()).collect();
        let numeric = values.iter().all(Option::is_some);
        if !seen_content && (!numeric || tokens.len() == 1) {
            title = Some(content.to_string());
            seen_content = true;
            continue;
        }
        seen_content = true;
        if !numeric {
            return Err(SectionError::NonNumeric {
                file: file.into(),
                line,
                text: content.into(),
            });
        }
        let values: Vec<f64> = values.into_iter().flatten().collect();
        if values.iter().any(|v| !v.is_finite()) {
            return Err(SectionError::NotFinite {
                file: file.into(),
                line,
                text: content.into(),
            });
        }
        if values.len() != 2 {
            return Err(SectionError::Layout {
                file: file.into(),
                line,
                reason: format!(
                    "the line holds {} number(s) where one `x y` pair is expected",
                    values.len()
                ),
            });
        }
        rows.push(Row {
            x: values[0],
            y: values[1],
            line,
        });
    }
    Ok((title, rows))
}

/// True when a value is a whole number usable as a point count.
fn count_like(v: f64) -> bool {
    v >= 3.0 && v.fract() == 0.0 && v < 1e7
}

/// Parses the text of a section file into a raw outline (no normalising). `file` names
/// the source in messages.
pub fn parse_raw(text: &str, file: &str) -> Result<RawOutline, SectionError> {
    let (title, rows) = rows(text, file)?;
    if rows.is_empty() {
        return Err(SectionError::Empty { file: file.into() });
    }
    let first = &rows[0];
    if count_like(first.x) && count_like(first.y) {
        let (nu, nl) = (first.x as usize, first.y as usize);
        let rest = rows.len() - 1;
        if nu + nl != rest {
            return Err(SectionError::Layout {
                file: file.into(),
                line: first.line,
                reason: format!(
                    "this line reads as point counts ({nu} upper + {nl} lower = {}) but {rest} coordinate lines follow; correct the counts, or remove the line if the file is one loop",
                    nu + nl
                ),
            });
        }
        let mut upper: Vec<&Row> = rows[1..=nu].iter().collect();
        let mut lower: Vec<&Row> = rows[nu + 1..].iter().collect();
        // Each side should run from the leading edge; accept either direction.
        for side in [&mut upper, &mut lower] {
            if side[0].x > side[side.len() - 1].x {
                side.reverse();
            }
        }
        let mut points = Vec::with_capacity(rest);
        let mut lines = Vec::with_capacity(rest);
        for r in upper.iter().rev().chain(lower.iter()) {
            points.push(Point2::new(r.x, r.y));
            lines.push(r.line);
        }
        return Ok(RawOutline {
            title,
            layout: Layout::Sides,
            points,
            lines,
        });
    }
    Ok(RawOutline {
        title,
        layout: Layout::Loop,
        points: rows.iter().map(|r| Point2::new(r.x, r.y)).collect(),
        lines: rows.iter().map(|r| r.line).collect(),
    })
}

/// Removes consecutive duplicate points (and closing repeats), keeping line numbers.
fn dedup_lines(raw: &RawOutline) -> (Vec<Point2<f64>>, Vec<usize>) {
    let mut pts: Vec<Point2<f64>> = Vec::with_capacity(raw.points.len());
    let mut lines = Vec::with_capacity(raw.points.len());
    let extent = raw
        .points
        .iter()
        .map(|p| p.coords.amax())
        .fold(0.0_f64, f64::max)
        .max(1e-300);
    for (&p, &l) in raw.points.iter().zip(&raw.lines) {
        if pts.last().is_none_or(|q| (p - q).norm() > 1e-12 * extent) {
            pts.push(p);
            lines.push(l);
        }
    }
    (pts, lines)
}

/// Cross product sign helper.
fn orient(a: Point2<f64>, b: Point2<f64>, c: Point2<f64>) -> f64 {
    (b - a).perp(&(c - a))
}

/// First pair of crossing segments of the closed polyline, as indices of their end
/// points. Segments that share an end point (by position) are not compared.
pub(crate) fn first_crossing(pts: &[Point2<f64>]) -> Option<(usize, usize)> {
    let n = pts.len();
    let mut segs: Vec<(usize, usize)> = (0..n.saturating_sub(1)).map(|i| (i, i + 1)).collect();
    if n > 2 && pts[0] != pts[n - 1] {
        segs.push((n - 1, 0));
    }
    // Sort by the left end of the bounding box to prune with a sweep.
    let minx = |s: &(usize, usize)| pts[s.0].x.min(pts[s.1].x);
    let maxx = |s: &(usize, usize)| pts[s.0].x.max(pts[s.1].x);
    segs.sort_by(|a, b| minx(a).total_cmp(&minx(b)));
    for (k, a) in segs.iter().enumerate() {
        let ax = maxx(a);
        for b in &segs[k + 1..] {
            if minx(b) > ax {
                break;
            }
            let (p, q, r, s) = (pts[a.0], pts[a.1], pts[b.0], pts[b.1]);
            if p == r || p == s || q == r || q == s {
                continue;
            }
            let (d1, d2) = (orient(p, q, r), orient(p, q, s));
            let (d3, d4) = (orient(r, s, p), orient(r, s, q));
            if d1 * d2 < 0.0 && d3 * d4 < 0.0 {
                let (i, j) = (a.1.max(a.0), b.1.max(b.0));
                return Some((i.min(j), i.max(j)));
            }
        }
    }
    None
}

/// Vertical extent of the points with `lo <= x <= hi` (0 when none).
fn band_extent(section: &Section, lo: f64, hi: f64) -> Option<f64> {
    let ys: Vec<f64> = section
        .points()
        .iter()
        .filter(|p| p.x >= lo && p.x <= hi)
        .map(|p| p.y)
        .collect();
    if ys.len() < 2 {
        return None;
    }
    let max = ys.iter().copied().fold(f64::MIN, f64::max);
    let min = ys.iter().copied().fold(f64::MAX, f64::min);
    Some(max - min)
}

/// True when the outline in the section frame is thicker near its trailing edge than near its
/// leading edge: the loop started at the leading edge instead.
fn looks_backwards(section: &Section) -> bool {
    match (
        band_extent(section, 0.02, 0.10),
        band_extent(section, 0.90, 0.98),
    ) {
        (Some(front), Some(back)) => back > front,
        _ => false,
    }
}

/// Re-orders a loop given from the leading edge round to the leading edge so that it
/// runs from the trailing edge instead: the point farthest from the start is the
/// trailing edge, or, when it and its farther neighbour form a segment facing the start
/// (a blunt trailing edge), that segment becomes the trailing-edge segment.
fn start_at_trailing_edge(pts: &[Point2<f64>], lines: &[usize]) -> (Vec<Point2<f64>>, Vec<usize>) {
    let n = pts.len();
    let start = pts[0];
    let m = if pts[0] == pts[n - 1] { n - 1 } else { n };
    let dist = |i: usize| (pts[i] - start).norm();
    let k = (0..m)
        .max_by(|&a, &b| dist(a).total_cmp(&dist(b)))
        .unwrap_or(0);
    let (prev, next) = ((k + m - 1) % m, (k + 1) % m);
    let j = if dist(prev) > dist(next) { prev } else { next };
    let blunt = dist(k) - dist(j) < 0.5 * (pts[k] - pts[j]).norm();
    let begin = if blunt && j == next { next } else { k };
    let mut p: Vec<Point2<f64>> = (0..m).map(|i| pts[(begin + i) % m]).collect();
    let mut l: Vec<usize> = (0..m).map(|i| lines[(begin + i) % m]).collect();
    if !blunt {
        p.push(pts[k]);
        l.push(lines[k]);
    }
    (p, l)
}

/// Brings a raw outline into the section frame (kept when already normalised, normalised
/// otherwise: [`to_section_frame`]) and checks it; `name` becomes the section's name.
pub fn normalize_raw(raw: &RawOutline, name: &str, file: &str) -> Result<Section, SectionError> {
    let (mut pts, mut lines) = dedup_lines(raw);
    if pts.len() < MIN_POINTS {
        return Err(SectionError::TooFewPoints {
            file: file.into(),
            count: pts.len(),
            min: MIN_POINTS,
        });
    }
    if let Some((i, j)) = first_crossing(&pts) {
        return Err(SectionError::SelfIntersecting {
            file: file.into(),
            line_a: lines[i],
            line_b: lines[j],
        });
    }
    let (mut section, mut frame) =
        to_section_frame(name, &pts).map_err(|e| SectionError::shape(file, e))?;
    if raw.layout == Layout::Loop && looks_backwards(&section) {
        // A loop that starts at the leading edge: start it at the trailing edge instead.
        (pts, lines) = start_at_trailing_edge(&pts, &lines);
        (section, frame) =
            to_section_frame(name, &pts).map_err(|e| SectionError::shape(file, e))?;
    }
    if section.area() < MIN_AREA {
        return Err(SectionError::shape(
            file,
            super::resample::ResampleError::NoArea(section.area()),
        ));
    }
    check_range(&pts, &lines, &frame, file)?;
    section
        .resample(CHECK_POINTS)
        .map_err(|e| SectionError::shape(file, e))?;
    Ok(section)
}

/// Every point within the unit chord in the section frame.
fn check_range(
    pts: &[Point2<f64>],
    lines: &[usize],
    frame: &Frame,
    file: &str,
) -> Result<(), SectionError> {
    for (&p, &line) in pts.iter().zip(lines) {
        let q = frame.map(p);
        if q.x < -RANGE_MARGIN || q.x > 1.0 + RANGE_MARGIN || q.y.abs() > 0.5 {
            return Err(SectionError::OutOfRange {
                file: file.into(),
                line,
                x: q.x,
                y: q.y,
            });
        }
    }
    Ok(())
}

/// Parses the text of a section file and brings it into the section frame. `file` names the source in messages
/// and, without directory and extension, becomes the section's name.
pub fn parse(text: &str, file: &str) -> Result<Section, SectionError> {
    let raw = parse_raw(text, file)?;
    let name = Path::new(file)
        .file_stem()
        .and_then(|s| s.to_str())
        .unwrap_or(file);
    normalize_raw(&raw, name, file)
}

/// Reads and parses a section file and brings it into the section frame.
pub fn read(path: &Path) -> Result<Section, SectionError> {
    let file = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|cause| SectionError::Io {
        file: file.clone(),
        cause,
    })?;
    let text = String::from_utf8_lossy(&bytes);
    parse(&text, &file)
}
