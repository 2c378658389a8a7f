//! Design input: the blade design table and its options, read from TOML or CSV,
//! validated, and converted to millimetres and degrees.
//!
//! Every later stage reads a [`Design`]; nothing downstream parses text again. Optional
//! tables that belong to later stages (root, tip, rotor, printer, material, ...) stay in
//! [`Design::tables`] and are read by their own module through [`Design::table`], so each
//! stage owns its keys and its validation while errors still name the key path.
//!
//! Entry points: [`load`] (a `.toml` design or a bare `.csv` station table), [`load_csv`]
//! (a bare CSV plus a default section), [`parse_toml_str`] and [`parse_csv_str`] (text).
//! Every problem found is reported at once in a [`DesignError`], each with its file and
//! line (CSV) or key path (TOML, plus the line).
//!
//! ```
//! use spanwright::design;
//! let text = r#"
//! units = { length = "in" }
//! [blade]
//! section = "naca4412"
//! [[station]]
//! radius = 2
//! chord = 2
//! twist = 20
//! [[station]]
//! radius = 10
//! chord = 1
//! twist = 4
//! "#;
//! let d = design::parse_toml_str(text, None)?;
//! assert_eq!(d.stations[1].radius, 254.0); // mm
//! assert_eq!(d.stations[0].section, "naca4412");
//!
//! let bad = "radius,chord,twist,section\n10,5,1,a\n8,-1,1,a\n";
//! let e = design::parse_csv_str(bad, None, None).unwrap_err();
//! assert_eq!(e.problems.len(), 2);
//! assert!(e.to_string().starts_with("<design>:3: radius 8 mm is smaller than 10 mm"));
//! # Ok::<(), design::DesignError>(())
//! ```
//!
//! # TOML design file
//!
//! ```toml
//! name = "garden-turbine"                 # optional, default: the file name
//! units = { length = "mm", angle = "deg" } # optional, these are the defaults
//!
//! [blade]
//! section = "naca4412"   # default section for stations without one
//! stacking = "quarter-chord"  # or a chord fraction such as 0.3, "centroid", "thickest"
//! flow = "turbine"
//! rotation = "ccw"
//!
//! [[station]]
//! radius = 40
//! chord = 60
//! twist = 25
//! section = "naca4415"
//!
//! [[station]]
//! radius = 280
//! chord = 25
//! twist = 3
//! ```
//!
//! | key | type | default | meaning |
//! |-----|------|---------|---------|
//! | `name` | string | file stem | design name; names output files (no `/` or `\`) |
//! | `units.length` | `"mm"`, `"cm"`, `"m"`, `"in"` | `"mm"` | length unit of stations and of the tables of later stages (1 in = 25.4 mm exactly) |
//! | `units.angle` | `"deg"`, `"rad"` | `"deg"` | angle unit of station twist |
//! | `blade.section` | string | none | section for stations that name none |
//! | `blade.stacking` | number in 0..=1, or `"quarter-chord"`, `"centroid"`, `"thickest"` | `"quarter-chord"` (= 0.25) | where the stacking axis passes through each section, see below |
//! | `blade.flow` | `"turbine"`, `"propeller"` | `"turbine"` | see [`Flow`] |
//! | `blade.rotation` | `"ccw"`, `"cw"` | `"ccw"` | seen from upstream, see [`Rotation`] |
//! | `blade.points-per-side` | integer in 8..=2000 | 120 | section resampling |
//! | `blade.tolerance` | number, **mm** (whatever `units.length`) | 0.01 | largest mesh deviation, > 0 and <= 10 |
//! | `blade.min-te-thickness` | number, **mm** (whatever `units.length`) | none | thinnest trailing edge, >= 0 |
//! | `station` | array of tables (`[[station]]`) | | the stations, root to tip |
//! | `station[i].radius` | number, length unit | required | distance from the rotor axis, >= 0, strictly increasing |
//! | `station[i].chord` | number, length unit | required | > 0 |
//! | `station[i].twist` | number, angle unit | required | within -90..=90 degrees, sign as in [`crate::conventions`] |
//! | `station[i].section` | string | `blade.section` | section designation or file |
//! | `station[i].thickness` | number, **percent of chord** | none | relative thickness to scale the section to, 1..=50 |
//! | `station[i].sweep` | number, length unit | 0 | chordwise offset of the stacking point |
//! | `station[i].prebend` | number, length unit | 0 | out-of-plane offset, positive downstream |
//! | `station[i].stacking` | as `blade.stacking` | `blade.stacking` | this station's stacking |
//! | `stations` | string | | instead of `[[station]]`: a CSV station table, path relative to the TOML file |
//! | any other table | table | | kept in [`Design::tables`] for a later stage |
//!
//! `stacking` values ([`Stacking`]): a number is the chord fraction of a point on the
//! chord line (0 leading edge, 1 trailing edge); `"quarter-chord"` is the aerodynamic
//! centre of thin-airfoil theory, the quarter chord (Abbott & von Doenhoff, *Theory of
//! Wing Sections*, 1959, ch. 4; `"aerodynamic-centre"` is accepted for it); `"centroid"`
//! is the area centroid of the section (stacked on centroids, centrifugal force does not
//! bend the blade: common practice); `"thickest"` is the point of maximum thickness, on
//! the chord line. Named rules are resolved from each station's own section (after
//! blending, thickness scaling and trailing-edge thickening); how the axis runs between
//! stations is described in [`crate::blade`]. `0.25` and `"quarter-chord"` build the same
//! blade byte for byte; 0.25 was the historical default.
//!
//! Stations are counted from 1 in key paths: `station[1]` is the first `[[station]]`.
//! Unknown keys in `units`, `blade` and `station` entries are errors (with "did you mean"
//! when a key is close), as are unknown top-level keys that are not tables and tables
//! whose name is a near miss of `units`, `blade` or `station`.
//!
//! Lengths in the other tables (`root`, `rotor`, `printer`, ...) are in the file's length
//! unit: read them with [`Design::table_mm`] (see [`Lengths`]).
//!
//! # CSV station table
//!
//! ```text
//! # invented demo rows
//! radius [mm];chord [mm];twist [deg];section;thickness [%];stacking
//! 40;60;25;naca4415;15;centroid
//! 280;25;3;naca4412;;0,3
//! ```
//!
//! * First non-blank, non-comment row: the header, naming the columns in any order and
//!   case: `radius`, `chord`, `twist` (required), `section` (required unless a default
//!   section is given by `[blade] section` or by the caller), `thickness`, `sweep`,
//!   `prebend`, `stacking` (optional). `airfoil` and `profile` are accepted for
//!   `section`; columns named `note(s)` or `comment(s)` are ignored; any other column is
//!   an error.
//! * A unit may follow the name: `radius [mm]`, `chord (in)`, `twist [deg]`,
//!   `thickness [%]` or `thickness [fraction]`. Without one, the column is in the design's
//!   units (for a bare CSV: mm, degrees, percent).
//! * `stacking` cells hold a chord fraction or a rule name, as `station[i].stacking`; an
//!   empty cell takes `blade.stacking`. The column is a fraction of chord unless its header
//!   says `stacking [%]` (then `30` is 30 % of chord).
//! * Separator: comma, semicolon or tab, detected from the header. With semicolon or tab,
//!   a decimal comma (`12,5`) is read as a decimal point.
//! * Blank rows (also rows of empty cells), `#` comment rows, CRLF and a UTF-8 byte-order
//!   mark are tolerated; cells may be quoted. Empty optional cells take their default.
//!   Trailing empty cells are fine; a row with fewer cells than the header, or with
//!   filled cells beyond it, is an error.
//! * [`Station::origin`] is `file:line` for CSV rows and `file:line: station[i]` for
//!   TOML entries.

use std::path::{Path, PathBuf};

mod csv_table;
mod error;
mod rows;
mod spans;
mod stacking;
mod suggest;
mod table;
mod toml_file;
mod units;
pub mod variants;

pub use error::{DesignError, Problem};
pub use stacking::{Stacking, StackingValueError};
pub use table::Lengths;
pub use units::{AngleUnit, LengthUnit, RatioUnit};

/// Largest mesh tolerance accepted from a design file or the command line, mm.
pub const MAX_TOLERANCE: f64 = toml_file::TOLERANCE_MAX_MM;

/// Which way the rotor exchanges energy with the flow.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Flow {
    /// Extracts power from the flow (wind or water turbine).
    #[default]
    Turbine,
    /// Drives the flow (propeller, fan).
    Propeller,
}

/// Sense of rotation seen from upstream (the side the flow comes from).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Rotation {
    /// Counter-clockwise seen from upstream.
    #[default]
    Ccw,
    /// Clockwise seen from upstream.
    Cw,
}

/// One row of the design table, in millimetres and degrees.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Station {
    /// Distance from the rotor axis, mm.
    pub radius: f64,
    /// Chord length, mm.
    pub chord: f64,
    /// Twist, degrees; positive turns the leading edge toward upstream (see
    /// [`crate::conventions`]).
    pub twist: f64,
    /// Section name: a designation such as `naca2412` or a section file.
    pub section: String,
    /// Relative thickness (fraction of chord) to scale the section to, if given.
    pub thickness: Option<f64>,
    /// Chordwise offset of the stacking point (sweep), mm, positive toward the trailing edge.
    pub sweep: f64,
    /// Out-of-plane offset (prebend), mm, positive downstream.
    pub prebend: f64,
    /// This station's stacking, when it overrides [`BladeOptions::stacking`].
    pub stacking: Option<Stacking>,
    /// Where the row came from (`file:line` for CSV, key path for TOML), for messages.
    pub origin: String,
}

/// Blade-wide options.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BladeOptions {
    /// Where the stacking axis passes through each section (stations may override it).
    pub stacking: Stacking,
    /// Flow mode (turbine or propeller).
    pub flow: Flow,
    /// Rotation sense seen from upstream.
    pub rotation: Rotation,
    /// Points per side each section is resampled to (default 120).
    pub points_per_side: usize,
    /// Largest allowed distance between mesh and exact surface, mm (default 0.01).
    pub tolerance: f64,
    /// Minimum trailing-edge thickness, mm, applied by thickening (default: none).
    pub min_te_thickness: Option<f64>,
}

impl Default for BladeOptions {
    fn default() -> Self {
        Self {
            stacking: Stacking::default(),
            flow: Flow::default(),
            rotation: Rotation::default(),
            points_per_side: 120,
            tolerance: 0.01,
            min_te_thickness: None,
        }
    }
}

/// A validated design, in millimetres and degrees.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// Design name (file stem when not given); names output files.
    pub name: String,
    /// The design file, when read from one; section files are looked up beside it.
    pub source: Option<PathBuf>,
    /// Stations, radius strictly increasing, at least two.
    pub stations: Vec<Station>,
    /// Blade-wide options.
    pub blade: BladeOptions,
    /// Factor from the file's length unit to millimetres (for the optional tables).
    pub length_to_mm: f64,
    /// Optional tables owned by later stages (`root`, `tip`, `rotor`, `printer`, ...),
    /// as written: lengths in them are in the file's length unit (multiply by
    /// [`Design::length_to_mm`]). Read one with [`Design::table`].
    pub tables: toml::Table,
}

/// Label used in messages for text given without a file.
pub const NO_FILE: &str = "<design>";

/// The file name without extension, for a default design name.
fn stem(file: &Path) -> String {
    file.file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .filter(|s| !s.is_empty() && s != "<design>")
        .unwrap_or_else(|| "design".into())
}

fn read(path: &Path) -> Result<Vec<u8>, DesignError> {
    std::fs::read(path).map_err(|e| {
        DesignError::one(
            Problem::new(path, format!("cannot read the file: {e}"))
                .hint("check the path and the file's permissions"),
        )
    })
}

/// Reads a design: a TOML design file (`.toml`) or a bare CSV station table (`.csv`, read
/// as by [`load_csv`] without a default section). The extension is matched
/// case-insensitively.
pub fn load(path: &Path) -> Result<Design, DesignError> {
    let ext = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase());
    match ext.as_deref() {
        Some("toml") => {
            let bytes = read(path)?;
            let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(&bytes);
            let text = std::str::from_utf8(bytes).map_err(|_| {
                DesignError::one(
                    Problem::new(path, "the file is not UTF-8 text")
                        .hint("save the design as UTF-8"),
                )
            })?;
            let dir = path.parent().unwrap_or(Path::new(""));
            toml_file::parse(text, path, dir, Some(path.to_path_buf()))
        }
        Some("csv") => load_csv(path, None),
        _ => Err(DesignError::one(
            Problem::new(path, "unknown kind of design file")
                .hint("give a .toml design file or a .csv station table"),
        )),
    }
}

/// Reads a bare CSV station table (see the module docs for the format). Stations without
/// a section take `default_section` (for example a name given on the command line); with
/// neither a section column nor a default, that is an error. Blade options are the
/// defaults, units mm and degrees unless the header names others.
pub fn load_csv(path: &Path, default_section: Option<&str>) -> Result<Design, DesignError> {
    let bytes = read(path)?;
    csv_design(&bytes, path, Some(path.to_path_buf()), default_section)
}

/// Reads a CSV station table from text, as [`load_csv`] does from a file. `source` labels
/// messages (`<design>` when `None`).
pub fn parse_csv_str(
    text: &str,
    source: Option<&Path>,
    default_section: Option<&str>,
) -> Result<Design, DesignError> {
    let file = source.unwrap_or(Path::new(NO_FILE));
    csv_design(
        text.as_bytes(),
        file,
        source.map(Path::to_path_buf),
        default_section,
    )
}

fn csv_design(
    bytes: &[u8],
    file: &Path,
    source: Option<PathBuf>,
    default_section: Option<&str>,
) -> Result<Design, DesignError> {
    let default_section = default_section.filter(|s| !s.trim().is_empty());
    let mut problems = Vec::new();
    let rows = csv_table::read(
        bytes,
        file,
        csv_table::Defaults::default(),
        default_section.is_some(),
        &mut problems,
    );
    let whole = error::Loc::new(file, None, None);
    let stations = rows::validate(
        &rows,
        default_section,
        "add a 'section' column or give a default section",
        &whole,
        &mut problems,
    );
    if !problems.is_empty() {
        rows::sort(&mut problems);
        return Err(DesignError { problems });
    }
    Ok(Design {
        name: stem(file),
        source,
        stations,
        blade: BladeOptions::default(),
        length_to_mm: 1.0,
        tables: toml::Table::new(),
    })
}

/// Reads a TOML design from text. `source` labels messages (`<design>` when `None`) and
/// locates a `stations = "file.csv"` table (relative to the source's folder, or to the
/// working directory without a source).
pub fn parse_toml_str(text: &str, source: Option<&Path>) -> Result<Design, DesignError> {
    let file = source.unwrap_or(Path::new(NO_FILE));
    let dir = source.and_then(Path::parent).unwrap_or(Path::new(""));
    toml_file::parse(
        text.strip_prefix('\u{feff}').unwrap_or(text),
        file,
        dir,
        source.map(Path::to_path_buf),
    )
}
