//! [`SectionError`]: everything that can go wrong reading, resolving or changing a
//! section. Each message names the file (or designation), the line where there is one,
//! what is wrong and how to fix it.

use super::resample::ResampleError;

/// Why a section could not be read, resolved, generated or changed.
#[derive(Debug, thiserror::Error)]
pub enum SectionError {
    /// The file could not be read.
    #[error("{file}: cannot read the section file: {cause}; check the path and permissions")]
    Io {
        /// File path.
        file: String,
        /// Underlying I/O error.
        #[source]
        cause: std::io::Error,
    },
    /// No coordinates at all.
    #[error("{file}: the file holds no coordinates (only blank lines, comments or a name); add one `x y` pair per line")]
    Empty {
        /// File path.
        file: String,
    },
    /// A line that should hold numbers holds something else.
    #[error("{file}:{line}: `{text}` is not a pair of numbers; write `x y` separated by spaces, tabs or a comma, or start the line with `#` to make it a comment")]
    NonNumeric {
        /// File path.
        file: String,
        /// Line number, from 1.
        line: usize,
        /// The offending text.
        text: String,
    },
    /// A coordinate is NaN or infinite.
    #[error(
        "{file}:{line}: `{text}` is not a finite number; replace it by the coordinate it should be"
    )]
    NotFinite {
        /// File path.
        file: String,
        /// Line number, from 1.
        line: usize,
        /// The offending text.
        text: String,
    },
    /// Too few distinct points to describe an outline.
    #[error("{file}: only {count} distinct points; a section needs at least {min} (typically 60 to 200) to describe its leading edge")]
    TooFewPoints {
        /// File path or designation.
        file: String,
        /// Distinct points found.
        count: usize,
        /// Minimum accepted.
        min: usize,
    },
    /// The data fits neither the loop nor the two-sides layout.
    #[error("{file}:{line}: unrecognised layout: {reason}. Expected either one loop of `x y` lines (trailing edge -> upper surface -> leading edge -> lower surface -> trailing edge), or a line with the two point counts followed by the upper and then the lower surface, each from the leading edge")]
    Layout {
        /// File path.
        file: String,
        /// Line number, from 1 (0 when it concerns the whole file).
        line: usize,
        /// What does not fit.
        reason: String,
    },
    /// A point lies far outside the unit chord after normalising.
    #[error("{file}:{line}: point ({x:.4}, {y:.4}) in chord units lies far outside the section (x must be within [0, 1], |y| below 0.5, with a small margin); check that line for a typing error or a stray point")]
    OutOfRange {
        /// File path.
        file: String,
        /// Line number, from 1.
        line: usize,
        /// Normalised x.
        x: f64,
        /// Normalised y.
        y: f64,
    },
    /// The outline crosses itself.
    #[error("{file}: the outline crosses itself: the segment ending at line {line_a} crosses the segment ending at line {line_b}; check the point order around those lines (a swapped pair, a side listed twice, or upper and lower surfaces crossing near a thin trailing edge)")]
    SelfIntersecting {
        /// File path.
        file: String,
        /// Line of the end point of the first crossing segment.
        line_a: usize,
        /// Line of the end point of the second crossing segment.
        line_b: usize,
    },
    /// The outline cannot be normalised or resampled.
    #[error("{file}: {cause}; check the point order and that each surface runs once from the leading to the trailing edge")]
    Shape {
        /// File path or designation.
        file: String,
        /// What went wrong.
        #[source]
        cause: ResampleError,
    },
    /// A name that is neither a designation nor a file found in the search directories.
    #[error("section `{name}` not found: {detail}. Valid names: a NACA 4-digit designation (`naca2412`, `NACA 0012`), a 5-digit one with a tabulated mean line (`naca23012`; 210..250, reflexed 221..251), either with `-closed` for the sharp-trailing-edge variant (`naca0012-closed`), or a section file given by path{dirs}{available}")]
    NotFound {
        /// The name as given.
        name: String,
        /// Why it did not match.
        detail: String,
        /// ` or by name ... in <the search directories>`, or empty without any.
        dirs: String,
        /// Section files that exist in the search directories, listed (may be empty).
        available: String,
    },
    /// A parameter of an operation is out of range.
    #[error("{what} = {value} is out of range: {fix}")]
    Parameter {
        /// Parameter name.
        what: &'static str,
        /// Value given.
        value: f64,
        /// Accepted range and fix.
        fix: &'static str,
    },
    /// A section cannot be written with this many decimal places.
    #[error("cannot write the section with {decimals} decimal places: {reason}; {fix}")]
    Decimals {
        /// Decimal places asked for.
        decimals: usize,
        /// What would go wrong.
        reason: String,
        /// The number of decimal places that works.
        fix: String,
    },
    /// Two sections do not share a point structure.
    #[error("sections `{a}` and `{b}` do not have the same point structure; resample both to the same number of points per side first")]
    Incompatible {
        /// First section name.
        a: String,
        /// Second section name.
        b: String,
    },
}

impl SectionError {
    /// Wraps a [`ResampleError`] for `file`.
    pub fn shape(file: impl Into<String>, cause: ResampleError) -> Self {
        match cause {
            ResampleError::TooFewPoints(count) => Self::TooFewPoints {
                file: file.into(),
                count,
                min: super::import::MIN_POINTS,
            },
            cause => Self::Shape {
                file: file.into(),
                cause,
            },
        }
    }
}
