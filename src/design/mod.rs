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
//! | `blade.tolerance` | number, length unit | 0.01 mm | largest mesh deviation; at least 0.001 mm, at most 10 mm (in the file's unit: `0.0004` in an inch file is 0.01016 mm) |
//! | `blade.min-te-thickness` | number, length unit | 0.4 mm | thinnest trailing edge: thinner edges are opened to it (the build summary lists them); 0 keeps knife edges; at most 10 % of every station's chord |
//! | `blade.spanwise` | `"smooth"`, `"linear"` | `"smooth"` | how values vary between stations: monotone cubic, or straight lines (see [`Law`]) |
//! | `station` | array of tables (`[[station]]`) | | the stations, root to tip, 2 to 1000 |
//! | `station[i].radius` | number, length unit | required | distance from the rotor axis, >= 0, strictly increasing, at most 10 m |
//! | `station[i].chord` | number, length unit | required | > 0, at most 10 m, at least 20 tolerances |
//! | `station[i].twist` | number, angle unit | required | within -90..=90 degrees, sign as in [`crate::conventions`] |
//! | `station[i].section` | string | `blade.section` | section designation or file |
//! | `station[i].thickness` | number, **percent of chord** | none | relative thickness to scale the section to, 1..=50 |
//! | `station[i].sweep` | number, length unit | 0 | chordwise offset of the stacking point, at most 10 m either way |
//! | `station[i].prebend` | number, length unit | 0 | out-of-plane offset, positive downstream, at most 10 m either way |
//! | `station[i].stacking` | as `blade.stacking` | `blade.stacking` | this station's stacking |
//! | `stations` | string | | instead of `[[station]]`: a CSV station table, path relative to the TOML file (not a TOML file) |
//! | `root`, `tip`, `rotor`, `printer`, `segments`, `spar-channel`, `variant` | table (`[[variant]]`: array of tables) | | kept in [`Design::tables`] for a later stage ([`TABLES`]) |
//!
//! Every length in the file, `blade.tolerance` and `blade.min-te-thickness` included, is in
//! `units.length`; the design holds millimetres.
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
//! Unknown keys and tables anywhere are errors, with "did you mean" when a known name is
//! close (`[roots]`: did you mean `[root]`?): the keys of `units`, `blade` and `station`
//! here, top-level tables against this module's and [`TABLES`], and the keys of the
//! tables of later stages when their stage reads them (`Design::table`).
//!
//! Lengths in the other tables (`root`, `rotor`, `printer`, ...) are in the file's length
//! unit: read them with [`Design::table_mm`] (see [`Lengths`]).
//!
//! # Limits
//!
//! Plain input sanity, checked while reading (each refusal names the figure, the limit and
//! a fix; the limits are constants of this module):
//!
//! | limit | value | why |
//! |-------|-------|-----|
//! | largest radius, chord, sweep, prebend | 10 m ([`MAX_LENGTH_MM`]) | spanwright is for small rotors; a larger number is almost always a unit slip, and the message says so (`radius 280 m: did you mean millimetres? ... units = { length = "m" }`) |
//! | tolerance | 0.001 to 10 mm ([`MIN_TOLERANCE_MM`], [`MAX_TOLERANCE_MM`]) | what precision machining holds; below it the skin, STL's single precision and a round tip's end cannot keep the tolerance for every design; the mesh grows with 1/tolerance |
//! | smallest chord | 20 tolerances ([`MIN_CHORD_TOLERANCES`]) | each side of the mesh may lie a tolerance inside the surface: a 10 %-thick section must stay thicker than two tolerances |
//! | smallest span, first to last station | 20 tolerances ([`MIN_SPAN_TOLERANCES`]) | the same along the span (a 0.001 mm "blade" is a wafer the mesh cannot close) |
//! | neighbouring stations | at least one tolerance apart ([`MIN_GAP_TOLERANCES`]) | closer, the mesh cannot tell them apart |
//! | stations | 2 to 1000 ([`MAX_STATIONS`]) | a few dozen describe any blade |
//! | design file | 4 MiB ([`MAX_FILE_BYTES`]) | a thousand stations take about 50 kB |
//! | `min-te-thickness` | 10 % of every chord ([`MAX_TE_CHORD_FRACTION`]) | thicker, the edge cuts the section off |
//!
//! A tolerance given for one build (`--tolerance`) is checked against the same rules by
//! [`Design::check_tolerance`]. No limit here has an override: each bounds what the input
//! can mean, not how long a valid design takes (that is estimated before meshing).
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
//!   case: `radius` (or `r`), `chord` (or `c`, `chord length`), `twist` (or `twist
//!   angle`) (required), `section` (required unless a default section is given by
//!   `[blade] section` or by the caller; `airfoil`, `aerofoil` and `profile` are accepted
//!   for it), `thickness` (or `t/c`, `relative thickness`), `sweep`, `prebend`,
//!   `stacking` (optional); columns named `note(s)` or `comment(s)` are ignored; any other
//!   column is an error.
//! * A unit may follow the name the usual spreadsheet ways: `radius [mm]`, `chord (in)`,
//!   `radius_mm`, `r/mm` (ISO 80000-1 quantity/unit), `twist deg`, `thickness [%]` or
//!   `thickness [fraction]`. Without one, the column is in the design's units (for a bare
//!   CSV: mm, degrees, percent). [`Design::columns`] says how each column was read
//!   ([`ColumnRead`], `'r [mm]' read as radius in mm`), for the user.
//! * `stacking` cells hold a chord fraction or a rule name, as `station[i].stacking`; an
//!   empty cell takes `blade.stacking`. The column is a fraction of chord unless its header
//!   says `stacking [%]` (then `30` is 30 % of chord).
//! * Separator: comma, semicolon or tab, detected from the header. With semicolon or tab,
//!   a decimal comma (`12,5`) is read as a decimal point.
//! * Blank rows (also rows of empty cells), `#` comment rows, LF, CRLF and CR line ends
//!   and a UTF-8 byte-order mark are tolerated; cells may be quoted. Empty optional cells take their default.
//!   Trailing empty cells are fine; a row with fewer cells than the header, or with
//!   filled cells beyond it, is an error.
//! * [`Station::origin`] is `file:line` for CSV rows and `file:line: station[i]` for
//!   TOML entries.

use std::path::{Path, PathBuf};

mod csv_table;
mod error;
mod limits;
mod rows;
mod spans;
mod stacking;
mod suggest;
mod table;
mod toml_file;
mod units;
pub mod variants;

pub use crate::interp::Law;
pub use error::{DesignError, Problem};
pub use limits::{
    DEFAULT_MIN_TE_MM, MAX_FILE_BYTES, MAX_LENGTH_MM, MAX_STATIONS, MAX_TE_CHORD_FRACTION,
    MAX_TOLERANCE_MM, MIN_CHORD_TOLERANCES, MIN_GAP_TOLERANCES, MIN_SPAN_TOLERANCES,
    MIN_TOLERANCE_MM,
};
pub use stacking::{Stacking, StackingValueError};
pub use table::Lengths;
pub use units::{AngleUnit, LengthUnit, RatioUnit};

/// Largest mesh tolerance accepted from a design file or the command line, mm.
pub const MAX_TOLERANCE: f64 = MAX_TOLERANCE_MM;

/// Smallest mesh tolerance accepted from a design file or the command line, mm.
pub const MIN_TOLERANCE: f64 = MIN_TOLERANCE_MM;

/// The optional top-level tables of later stages, by name. Any other table in a design
/// file is an error ("did you mean"); a stage that adds a table registers its name here.
pub const TABLES: [&str; 7] = [
    "root",
    "tip",
    "rotor",
    "printer",
    "segments",
    "spar-channel",
    "variant",
];

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
    /// Minimum trailing-edge thickness, mm, applied by thickening (default
    /// [`DEFAULT_MIN_TE_MM`], 0.4 mm; 0 or `None` keeps the sections' own edges).
    pub min_te_thickness: Option<f64>,
    /// How chord, twist, offsets and section shape vary between stations (default
    /// [`Law::Smooth`], monotone cubic).
    pub spanwise: Law,
}

impl Default for BladeOptions {
    fn default() -> Self {
        Self {
            stacking: Stacking::default(),
            flow: Flow::default(),
            rotation: Rotation::default(),
            points_per_side: 120,
            tolerance: 0.01,
            min_te_thickness: Some(DEFAULT_MIN_TE_MM),
            spanwise: Law::default(),
        }
    }
}

/// How one column of a CSV station table was read: the header cell as written, the
/// station value it was read as, and its unit. Displayed as
/// `'r [mm]' read as radius in mm` or `'notes' ignored (notes)`.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct ColumnRead {
    /// The header cell as written (trimmed).
    pub header: String,
    /// The station value it was read as (`radius`, `chord`, `twist`, `section`,
    /// `thickness`, `sweep`, `prebend`, `stacking`), or `ignored (notes)`.
    pub read_as: &'static str,
    /// The unit its numbers are read in (`mm`, `in`, `deg`, `rad`, `%`, `fraction`, ...),
    /// for numeric columns.
    pub unit: Option<&'static str>,
}

impl std::fmt::Display for ColumnRead {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match (self.read_as, self.unit) {
            (what, _) if what.starts_with("ignored") => write!(f, "'{}' {what}", self.header),
            (what, Some(unit)) if !unit.is_empty() => {
                write!(f, "'{}' read as {what} in {unit}", self.header)
            }
            (what, _) => write!(f, "'{}' read as {what}", self.header),
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
    /// How each column of the CSV station table was read, when the stations come from
    /// one (empty for `[[station]]` entries): a list to show the user.
    pub columns: Vec<ColumnRead>,
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

/// Why a file could not be read.
enum ReadFail {
    /// The operating system's error.
    Io(std::io::Error),
    /// Larger than [`MAX_FILE_BYTES`] (its size in bytes).
    TooLarge(u64),
}

/// The problem of a file larger than [`MAX_FILE_BYTES`].
fn too_large(file: &Path, bytes: u64) -> Problem {
    Problem::new(
        file,
        format!(
            "the file is {:.1} MB, more than the {} MB a design file may be",
            bytes as f64 / 1_048_576.0,
            MAX_FILE_BYTES >> 20
        ),
    )
    .hint(format!(
        "a design of {MAX_STATIONS} stations takes about 50 kB; check that this is the \
         design table"
    ))
}

/// Reads a file of at most [`MAX_FILE_BYTES`] (reading stops past it).
fn read_limited(path: &Path) -> Result<Vec<u8>, ReadFail> {
    use std::io::Read;
    let file = std::fs::File::open(path).map_err(ReadFail::Io)?;
    let mut bytes = Vec::new();
    file.take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(ReadFail::Io)?;
    if bytes.len() as u64 > MAX_FILE_BYTES {
        let size = std::fs::metadata(path).map_or(bytes.len() as u64, |m| m.len());
        return Err(ReadFail::TooLarge(size));
    }
    Ok(bytes)
}

fn read(path: &Path) -> Result<Vec<u8>, DesignError> {
    read_limited(path).map_err(|fail| match fail {
        ReadFail::Io(e) => DesignError::one(
            Problem::new(path, format!("cannot read the file: {e}"))
                .hint("check the path and the file's permissions"),
        ),
        ReadFail::TooLarge(size) => DesignError::one(too_large(path, size)),
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
    if bytes.len() as u64 > MAX_FILE_BYTES {
        return Err(DesignError::one(too_large(file, bytes.len() as u64)));
    }
    let table = csv_table::read(
        bytes,
        file,
        &csv_table::Defaults::default(),
        default_section.is_some(),
        &mut problems,
    );
    let whole = error::Loc::new(file, None, None);
    let blade = BladeOptions::default();
    let rules = rows::Rules {
        default_section,
        missing_section_hint: "add a 'section' column or give a default section",
        whole: &whole,
        tolerance: Some((
            blade.tolerance,
            format!("the default, {} mm", blade.tolerance),
        )),
    };
    let stations = rows::validate(&table.rows, &rules, &mut problems);
    if !problems.is_empty() {
        rows::sort(&mut problems);
        return Err(DesignError { problems });
    }
    Ok(Design {
        name: stem(file),
        source,
        stations,
        blade,
        length_to_mm: 1.0,
        tables: toml::Table::new(),
        columns: table.columns,
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

impl Design {
    /// Checks a mesh tolerance (mm) for this design, when it is not the file's own (e.g.
    /// `--tolerance` on the command line; `from` says where it came from): the range
    /// [`MIN_TOLERANCE_MM`]..=[`MAX_TOLERANCE_MM`], and the rules the design file's
    /// tolerance was checked by: every chord at least [`MIN_CHORD_TOLERANCES`]
    /// tolerances, the span at least [`MIN_SPAN_TOLERANCES`], neighbouring stations at
    /// least [`MIN_GAP_TOLERANCES`] apart.
    ///
    /// # Errors
    /// A [`DesignError`] naming the figure, the limit and the largest (or smallest)
    /// tolerance that would do.
    pub fn check_tolerance(&self, tolerance: f64, from: &str) -> Result<(), DesignError> {
        let problem = |message: String, hint: String| {
            Err(DesignError::one(
                Problem::new(self.file(), message).hint(hint),
            ))
        };
        let (lo, hi) = (MIN_TOLERANCE_MM, MAX_TOLERANCE_MM);
        let n = limits::show_number;
        let tolerance_mm = tolerance;
        let tolerance = n(tolerance_mm);
        if !(tolerance_mm >= lo && tolerance_mm <= hi) {
            return problem(
                format!("tolerance {tolerance} mm ({from}) must be at least {lo} mm and at most {hi} mm"),
                "give the largest allowed mesh deviation in mm, e.g. 0.01 (a fine print) or 0.001 (a machining file)".into(),
            );
        }
        let Some(thinnest) = self
            .stations
            .iter()
            .min_by(|a, b| a.chord.total_cmp(&b.chord))
        else {
            return Ok(());
        };
        let most = thinnest.chord / MIN_CHORD_TOLERANCES;
        if tolerance_mm > most {
            return problem(
                format!(
                    "tolerance {tolerance} mm ({from}) is too coarse for the {} mm chord at {}: \
                     a chord must be at least {MIN_CHORD_TOLERANCES} tolerances",
                    n(thinnest.chord),
                    thinnest.origin
                ),
                format!("give a tolerance of at most {} mm", n(most)),
            );
        }
        let radii: Vec<f64> = self.stations.iter().map(|s| s.radius).collect();
        let span = radii[radii.len() - 1] - radii[0];
        if tolerance_mm > span / MIN_SPAN_TOLERANCES {
            return problem(
                format!(
                    "tolerance {tolerance} mm ({from}) is too coarse for a blade spanning {} \
                     mm: the span must be at least {MIN_SPAN_TOLERANCES} tolerances",
                    n(span)
                ),
                format!(
                    "give a tolerance of at most {} mm",
                    n(span / MIN_SPAN_TOLERANCES)
                ),
            );
        }
        let closest = radii
            .windows(2)
            .map(|w| w[1] - w[0])
            .fold(f64::INFINITY, f64::min);
        if tolerance_mm > closest / MIN_GAP_TOLERANCES {
            return problem(
                format!(
                    "tolerance {tolerance} mm ({from}) is coarser than the {} mm between \
                     the two closest stations: the mesh cannot tell them apart",
                    n(closest)
                ),
                format!(
                    "give a tolerance of at most {} mm",
                    n(closest / MIN_GAP_TOLERANCES)
                ),
            );
        }
        Ok(())
    }
}
