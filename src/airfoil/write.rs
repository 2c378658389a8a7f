//! Writing sections in the two plain-text layouts read by [`parse`](super::parse).

use super::error::SectionError;
use super::import::Layout;
use super::section::Section;
use std::fmt::Write as _;
use std::path::Path;

/// Decimal places written by default: 1e-8 chord, far below any printer's resolution.
pub const DEFAULT_DECIMALS: usize = 8;

/// The section as text: the `title` line, then the points in `layout`, each coordinate
/// with `decimals` decimal places.
///
/// * [`Layout::Loop`]: all points from the upper trailing edge round to the lower one.
/// * [`Layout::Sides`]: a line with the two counts, the upper surface from the leading
///   edge, a blank line, the lower surface from the leading edge (the leading-edge point
///   is listed in both).
pub fn to_text(section: &Section, layout: Layout, title: &str, decimals: usize) -> String {
    let mut out = String::new();
    let title = title.replace(['\n', '\r'], " ");
    let _ = writeln!(out, "{title}");
    let put = |out: &mut String, p: &nalgebra::Point2<f64>| {
        let _ = writeln!(
            out,
            "{:>w$.d$} {:>w$.d$}",
            p.x,
            p.y,
            w = decimals + 4,
            d = decimals
        );
    };
    match layout {
        Layout::Loop => {
            for p in section.points() {
                put(&mut out, p);
            }
        }
        Layout::Sides => {
            let upper = section.upper_le_to_te();
            let lower = section.lower_le_to_te();
            let _ = writeln!(out, "{} {}", upper.len(), lower.len());
            let _ = writeln!(out);
            for p in &upper {
                put(&mut out, p);
            }
            let _ = writeln!(out);
            for p in lower {
                put(&mut out, p);
            }
        }
    }
    out
}

/// Writes [`to_text`] to `path`.
pub fn write(
    path: &Path,
    section: &Section,
    layout: Layout,
    title: &str,
    decimals: usize,
) -> Result<(), SectionError> {
    std::fs::write(path, to_text(section, layout, title, decimals)).map_err(|cause| {
        SectionError::Io {
            file: path.display().to_string(),
            cause,
        }
    })
}
