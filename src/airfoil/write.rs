//! Writing sections in the two plain-text layouts read by [`parse`](super::parse).
//!
//! Whatever is written reads back: [`to_text`] refuses fewer than [`MIN_DECIMALS`] or
//! more than [`MAX_DECIMALS`] decimal places, and parses its own text before handing it
//! out, so a file it returns is one the reader accepts, in the same frame (a section in
//! the section frame is written in it, and read back kept as given, see
//! [`crate::conventions`], "Section frame").

use super::error::SectionError;
use super::import::{parse, Layout};
use super::resample::LE_SNAP;
use super::section::{ChordLine, Section};
use std::fmt::Write as _;
use std::path::Path;

/// Decimal places written by default: 1e-8 chord, far below any printer's resolution.
pub const DEFAULT_DECIMALS: usize = 8;

/// Fewest decimal places written: 4. Rounding moves a coordinate by at most half a unit
/// of the last place, 5e-5 chord with 4 places, which stays within the resampling shape
/// tolerance [`LE_SNAP`] (1e-4 chord; 0.01 mm on a 100 mm chord); with 3 places the
/// leading-edge radius of a 12 % section (1.6 % chord) is drawn from a handful of
/// distinct points, and with 0 every point becomes (0, 0) or (1, 0).
pub const MIN_DECIMALS: usize = 4;

/// Most decimal places written: 15, about the last digit an `f64` holds for numbers
/// near 1.
pub const MAX_DECIMALS: usize = 15;

/// The text without checks.
fn format_text(section: &Section, layout: Layout, title: &str, decimals: usize) -> String {
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

/// Why `text` would not read back as the section it was written from, if it would not:
/// the reader refuses it, or reads it in another frame (re-normalised instead of kept).
fn read_back_problem(text: &str) -> Option<String> {
    match parse(text, "written section") {
        Err(e) => Some(format!("the reader would refuse the file ({e})")),
        Ok(back) => match back.chord_line() {
            ChordLine::Normalised(_) => Some(
                "the rounded coordinates no longer lie in the section frame, so the reader would turn and scale them"
                    .into(),
            ),
            _ => None,
        },
    }
}

/// The section as text: the `title` line, then the points in `layout`, each coordinate
/// with `decimals` decimal places.
///
/// * [`Layout::Loop`]: all points from the upper trailing edge round to the lower one.
/// * [`Layout::Sides`]: a line with the two counts, the upper surface from the leading
///   edge, a blank line, the lower surface from the leading edge (the leading-edge point
///   is listed in both).
///
/// # Errors
/// [`SectionError::Decimals`] when `decimals` lies outside
/// [`MIN_DECIMALS`]..=[`MAX_DECIMALS`], or when the text would not read back as the
/// section (the reader would refuse it or re-normalise it); the error names the fewest
/// decimals that do read back, where some do.
pub fn to_text(
    section: &Section,
    layout: Layout,
    title: &str,
    decimals: usize,
) -> Result<String, SectionError> {
    if decimals < MIN_DECIMALS {
        return Err(SectionError::Decimals {
            decimals,
            reason: format!(
                "rounding to {decimals} decimal places moves points by up to {:e} chord, more than the {LE_SNAP:e} chord shape tolerance",
                0.5 * 10f64.powi(-(decimals as i32))
            ),
            fix: format!("give {MIN_DECIMALS} to {MAX_DECIMALS} decimal places ({DEFAULT_DECIMALS} is the default)"),
        });
    }
    if decimals > MAX_DECIMALS {
        return Err(SectionError::Decimals {
            decimals,
            reason: "an f64 coordinate near 1 holds no more digits".into(),
            fix: format!("give {MIN_DECIMALS} to {MAX_DECIMALS} decimal places ({DEFAULT_DECIMALS} is the default)"),
        });
    }
    let text = format_text(section, layout, title, decimals);
    let Some(reason) = read_back_problem(&text) else {
        return Ok(text);
    };
    let enough = (decimals + 1..=MAX_DECIMALS)
        .find(|&d| read_back_problem(&format_text(section, layout, title, d)).is_none());
    Err(SectionError::Decimals {
        decimals,
        reason,
        fix: match enough {
            Some(d) => format!("give at least {d} decimal places ({DEFAULT_DECIMALS} is the default)"),
            None => "no number of decimal places helps; resample the section to fewer points, or check its outline".into(),
        },
    })
}

/// Writes [`to_text`] to `path` (a plain write; the command line writes through
/// `export::write_atomic` instead).
pub fn write(
    path: &Path,
    section: &Section,
    layout: Layout,
    title: &str,
    decimals: usize,
) -> Result<(), SectionError> {
    let text = to_text(section, layout, title, decimals)?;
    std::fs::write(path, text).map_err(|cause| SectionError::Io {
        file: path.display().to_string(),
        cause,
    })
}
