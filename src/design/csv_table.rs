//! The station table as a spreadsheet exports it (CSV).
//!
//! * First non-blank, non-comment row: the header, naming the columns in any order and
//!   case: `radius` (or `r`), `chord` (or `c`, `chord length`), `twist` (or `twist
//!   angle`) (required), `section` (or `airfoil`, `aerofoil`, `profile`; required unless a
//!   default section is given), `thickness` (or `t/c`, `relative thickness`), `sweep`,
//!   `prebend`, `stacking` (optional). Columns named `note`, `notes`, `comment` or
//!   `comments` are ignored; any other column is an error.
//! * A unit may follow the name the usual spreadsheet ways: `radius [mm]`, `chord (in)`,
//!   `radius_mm`, `r/mm` (ISO 80000-1 quantity/unit), `twist deg`. Lengths: mm, cm, m,
//!   in; angles: deg, rad; thickness: `%` (percent of chord, the default) or `fraction`.
//!   Without a unit the column is in the design's units (a bare CSV: mm and degrees).
//!   [`read`] says how each column was read ([`ColumnRead`]).
//! * `stacking` cells hold a chord fraction or a rule name (`quarter-chord`, `centroid`,
//!   `thickest`: see [`super::Stacking`]); the column is a fraction of chord unless its
//!   header says `stacking [%]`. An empty cell takes the design's `blade.stacking`.
//! * Separator: comma, semicolon or tab, detected from the header row. With a semicolon
//!   or tab separator a decimal comma (`12,5`) is read as a decimal point.
//! * Blank rows (also rows of empty cells), rows starting with `#`, LF, CRLF and CR line
//!   ends and a UTF-8 byte-order mark are tolerated; fields may be quoted.

use std::path::Path;
use std::sync::Arc;

use super::error::{Loc, Problem};
use super::limits::MAX_STATIONS;
use super::rows::{Num, Row};
use super::suggest;
use super::units::{AngleUnit, LengthUnit, RatioUnit};
use super::{ColumnRead, Stacking};

/// Units a CSV column is read in when its header names none, and where they come from.
#[derive(Debug, Clone, Default)]
pub(crate) struct Defaults {
    pub length: LengthUnit,
    pub angle: AngleUnit,
    /// Why the length unit is what it is, when not the millimetre default (for the
    /// unit-slip hint), e.g. `the design file says units = { length = "m" }`.
    pub said: Option<Arc<str>>,
}

/// A station table as read: the rows and how each header cell was read.
pub(crate) struct CsvTable {
    pub rows: Vec<Row>,
    pub columns: Vec<ColumnRead>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Col {
    Radius,
    Chord,
    Twist,
    Section,
    Thickness,
    Sweep,
    Prebend,
    Stacking,
    Note,
}

impl Col {
    const NAMES: [&'static str; 8] = [
        "radius",
        "chord",
        "twist",
        "section",
        "thickness",
        "sweep",
        "prebend",
        "stacking",
    ];

    /// Reads a column name (lower case), with its accepted aliases.
    fn parse(name: &str) -> Option<Self> {
        Some(match name {
            "radius" | "r" => Self::Radius,
            "chord" | "c" | "chord length" => Self::Chord,
            "twist" | "twist angle" => Self::Twist,
            "section" | "airfoil" | "aerofoil" | "profile" => Self::Section,
            "thickness" | "t/c" | "relative thickness" => Self::Thickness,
            "sweep" => Self::Sweep,
            "prebend" => Self::Prebend,
            "stacking" => Self::Stacking,
            "note" | "notes" | "comment" | "comments" => Self::Note,
            _ => return None,
        })
    }

    fn name(self) -> &'static str {
        match self {
            Self::Radius => "radius",
            Self::Chord => "chord",
            Self::Twist => "twist",
            Self::Section => "section",
            Self::Thickness => "thickness",
            Self::Sweep => "sweep",
            Self::Prebend => "prebend",
            Self::Stacking => "stacking",
            Self::Note => "note",
        }
    }
}

/// How a column's numbers convert: factor and unit name.
#[derive(Debug, Clone)]
struct Column {
    col: Col,
    factor: f64,
    unit: &'static str,
    /// Why the unit is what it is (for the unit-slip hint of lengths).
    said: Option<Arc<str>>,
}

/// Splits a header cell into its column name (lower case) and unit, the usual spreadsheet
/// ways: `radius [mm]`, `Chord (in)`, `radius_mm`, `r/mm`, `twist deg`. A name that is a
/// column name (or alias) as a whole is never split (`t/c`, `chord length`).
fn split_header(cell: &str) -> (String, Option<String>) {
    let cell = cell.trim();
    if let Some(open) = cell.find(['[', '(']) {
        let close = if cell[open..].starts_with('[') {
            ']'
        } else {
            ')'
        };
        let rest = &cell[open + 1..];
        let unit = rest.split(close).next().unwrap_or(rest).trim().to_string();
        return (cell[..open].trim().to_lowercase(), Some(unit));
    }
    let lower = cell.to_lowercase();
    if Col::parse(&lower).is_some() {
        return (lower, None);
    }
    for sep in ['/', '_', ' '] {
        if let Some((name, unit)) = lower.rsplit_once(sep) {
            let (name, unit) = (name.trim(), unit.trim());
            if Col::parse(name).is_some() && !unit.is_empty() {
                return (name.to_string(), Some(unit.to_string()));
            }
        }
    }
    (lower, None)
}

/// Picks the separator from the header line: the most frequent of `;`, tab and `,`.
fn separator(text: &str) -> char {
    let header = text
        .split(['\n', '\r'])
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("");
    let count = |c: char| header.matches(c).count();
    let (semi, tab, comma) = (count(';'), count('\t'), count(','));
    if semi > 0 && semi >= comma && semi >= tab {
        ';'
    } else if tab > 0 && tab >= comma {
        '\t'
    } else {
        ','
    }
}

/// A record: its cells, or why it could not be split.
type Record = Result<Vec<String>, String>;

/// Splits CSV text into records with the line (from 1) each starts on. Cells are trimmed;
/// a cell may be quoted (RFC 4180: `""` is a quote inside quotes, separators and line
/// breaks inside quotes belong to the cell). Rows whose first non-blank character is `#`
/// are comments and give an empty record. Line ends: LF, CRLF or CR.
fn split(text: &str, sep: char) -> Vec<(usize, Record)> {
    let mut out = Vec::new();
    let mut line = 1;
    let mut start = 1;
    let mut cells: Vec<String> = Vec::new();
    let mut cell = String::new();
    let mut quoted = false; // inside quotes
    let mut was_quoted = false; // this cell had quotes (keep its inner spaces)
    let mut comment = false;
    let mut chars = text.chars().peekable();
    let finish = |cell: &mut String, was_quoted: &mut bool, cells: &mut Vec<String>| {
        let c = std::mem::take(cell);
        cells.push(if *was_quoted { c } else { c.trim().to_string() });
        *was_quoted = false;
    };
    while let Some(mut c) = chars.next() {
        // One line end, whatever the convention: CRLF and a lone CR read as LF.
        if c == '\r' {
            if chars.peek() == Some(&'\n') {
                chars.next();
            }
            c = '\n';
        }
        if comment {
            if c == '\n' {
                comment = false;
                out.push((start, Ok(Vec::new())));
                line += 1;
                start = line;
            }
            continue;
        }
        if quoted {
            match c {
                '"' if chars.peek() == Some(&'"') => {
                    chars.next();
                    cell.push('"');
                }
                '"' => quoted = false,
                '\n' => {
                    line += 1;
                    cell.push('\n');
                }
                _ => cell.push(c),
            }
            continue;
        }
        match c {
            '#' if cells.is_empty() && cell.trim().is_empty() && !was_quoted => comment = true,
            '"' if cell.trim().is_empty() && !was_quoted => {
                cell.clear();
                quoted = true;
                was_quoted = true;
            }
            '\n' => {
                finish(&mut cell, &mut was_quoted, &mut cells);
                out.push((start, Ok(std::mem::take(&mut cells))));
                line += 1;
                start = line;
            }
            c if c == sep => finish(&mut cell, &mut was_quoted, &mut cells),
            // Text after a closing quote is kept, trimmed, as spreadsheets never write it.
            c if was_quoted && c.is_whitespace() => {}
            c => cell.push(c),
        }
    }
    if quoted {
        out.push((start, Err("a quoted cell is not closed".to_string())));
    } else if !comment && (!cells.is_empty() || !cell.trim().is_empty() || was_quoted) {
        finish(&mut cell, &mut was_quoted, &mut cells);
        out.push((start, Ok(cells)));
    }
    out
}

/// Number of cells up to and including the last non-empty one.
fn filled_width(record: &[String]) -> usize {
    record
        .iter()
        .rposition(|c| !c.trim().is_empty())
        .map_or(0, |i| i + 1)
}

fn number(cell: &str, decimal_comma: bool) -> Option<f64> {
    let cell = cell.trim();
    if decimal_comma && cell.contains(',') && !cell.contains('.') {
        cell.replace(',', ".").parse().ok()
    } else {
        cell.parse().ok()
    }
}

/// The header as read: its width and, per cell, the column read from it (`None` for
/// unusable cells, already reported).
struct Header {
    width: usize,
    columns: Vec<Option<Column>>,
}

impl Header {
    fn has(&self, col: Col) -> bool {
        self.columns.iter().flatten().any(|c| c.col == col)
    }
}

/// Step 1: the bytes as text (without a byte-order mark); not UTF-8 is reported.
fn text<'a>(bytes: &'a [u8], file: &Path, problems: &mut Vec<Problem>) -> Option<&'a str> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    match std::str::from_utf8(bytes) {
        Ok(t) => Some(t),
        Err(e) => {
            let before = &bytes[..e.valid_up_to()];
            let line = 1 + before
                .iter()
                .enumerate()
                .filter(|&(i, b)| *b == b'\n' || (*b == b'\r' && before.get(i + 1) != Some(&b'\n')))
                .count();
            problems.push(
                Loc::new(file, Some(line), None)
                    .problem("the file is not UTF-8 text")
                    .hint("save the table as 'CSV UTF-8'"),
            );
            None
        }
    }
}

/// Reads the rows of a CSV station table: the text, the header, then row by row. Problems
/// go to `problems`; the returned table holds what could be read. Reading stops after
/// [`MAX_STATIONS`] + 1 rows (the validation refuses that many).
pub(crate) fn read(
    bytes: &[u8],
    file: &Path,
    defaults: &Defaults,
    section_default: bool,
    problems: &mut Vec<Problem>,
) -> CsvTable {
    let mut table = CsvTable {
        rows: Vec::new(),
        columns: Vec::new(),
    };
    let Some(text) = text(bytes, file, problems) else {
        return table;
    };
    let sep = separator(text);
    let decimal_comma = sep != ',';
    let mut header: Option<Header> = None;
    for (line, record) in split(text, sep) {
        let loc = Loc::new(file, Some(line), None);
        let record =
            match record {
                Ok(r) => r,
                Err(message) => {
                    problems.push(loc.problem(message).hint(
                        "a quoted cell must end with a quote; write a quote inside one as \"\"",
                    ));
                    continue;
                }
            };
        if record.iter().all(|c| c.is_empty()) {
            continue;
        }
        let Some(h) = &header else {
            let (h, columns) = read_header(&record, &loc, defaults, section_default, problems);
            header = Some(h);
            table.columns = columns;
            continue;
        };
        table.rows.push(read_row(
            &record,
            loc,
            h,
            section_default,
            decimal_comma,
            problems,
        ));
        if table.rows.len() > MAX_STATIONS {
            break;
        }
    }
    check_end(header.is_some(), table.rows.is_empty(), file, problems);
    table
}

/// Step 3: one data row into a [`Row`]: its width against the header's, then each cell.
fn read_row(
    record: &[String],
    loc: Loc,
    header: &Header,
    section_default: bool,
    decimal_comma: bool,
    problems: &mut Vec<Problem>,
) -> Row {
    let width = header.width;
    let last_filled = filled_width(record);
    if record.len() < width || last_filled > width {
        let n = if record.len() < width {
            record.len()
        } else {
            last_filled
        };
        problems.push(
            loc.problem(format!("this row has {n} cells but the header has {width}"))
                .hint(
                    "every row needs one cell per column; check for a missing or extra separator",
                ),
        );
    }
    let mut row = Row::at(loc);
    // A missing section column is reported once, at the header.
    row.section_reported = !section_default && !header.has(Col::Section);
    for (i, column) in header.columns.iter().enumerate() {
        let Some(column) = column else { continue };
        if column.col == Col::Note {
            continue;
        }
        // Quoted cells keep their inner spaces; no value needs them at its ends.
        let cell = record.get(i).map_or("", |c| c.trim());
        if cell.is_empty() {
            empty_cell(
                &mut row,
                column.col,
                i < record.len(),
                section_default,
                problems,
            );
        } else {
            read_cell(&mut row, column, cell, decimal_comma, problems);
        }
    }
    row
}

/// An empty cell: fine for optional columns; a required one is reported unless the row
/// is short (`present` false: covered by the row-length message).
fn empty_cell(
    row: &mut Row,
    col: Col,
    present: bool,
    section_default: bool,
    problems: &mut Vec<Problem>,
) {
    let required = matches!(col, Col::Radius | Col::Chord | Col::Twist)
        || (col == Col::Section && !section_default);
    if required && col == Col::Section {
        row.section_reported = true;
    }
    if required && present {
        let name = col.name();
        problems.push(
            row.loc
                .problem(format!("{name} is empty"))
                .hint(format!("every station needs a {name}")),
        );
    }
}

/// A filled cell into its slot of the row.
fn read_cell(
    row: &mut Row,
    column: &Column,
    cell: &str,
    decimal_comma: bool,
    problems: &mut Vec<Problem>,
) {
    let loc = &row.loc;
    match column.col {
        Col::Section => {
            row.section = Some((cell.to_string(), loc.clone()));
            return;
        }
        Col::Stacking => {
            let read = match number(cell, decimal_comma) {
                Some(raw) => Stacking::fraction(raw * column.factor),
                None => Stacking::parse(cell, column.factor),
            };
            match read {
                Ok(s) => row.stacking = Some(s),
                Err(e) => problems.push(loc.problem(e.message()).hint(e.hint())),
            }
            return;
        }
        _ => {}
    }
    let name = column.col.name();
    let Some(raw) = number(cell, decimal_comma) else {
        problems.push(
            loc.problem(format!("{name} '{cell}' is not a number"))
                .hint("give a plain number such as 120.5"),
        );
        return;
    };
    let n = Num::new(raw, column.factor, column.unit, loc.clone()).said(column.said.clone());
    let slot = match column.col {
        Col::Radius => &mut row.radius,
        Col::Chord => &mut row.chord,
        Col::Twist => &mut row.twist,
        Col::Thickness => &mut row.thickness,
        Col::Sweep => &mut row.sweep,
        Col::Prebend => &mut row.prebend,
        Col::Section | Col::Stacking | Col::Note => return,
    };
    *slot = Some(n);
}

/// Step 4: a file without a header, or with no rows below it.
fn check_end(has_header: bool, no_rows: bool, file: &Path, problems: &mut Vec<Problem>) {
    let whole = Loc::new(file, None, None);
    if !has_header {
        problems.push(whole.problem("the file is empty").hint(format!(
            "the first row must name the columns, e.g. {}",
            Col::NAMES[..4].join(",")
        )));
    } else if no_rows {
        problems.push(
            whole
                .problem("the table has a header but no stations")
                .hint("add one row per station below the header"),
        );
    }
}

/// Step 2: the header row: column kinds and units, every required column present.
/// Returns the header and how each cell was read.
fn read_header(
    record: &[String],
    loc: &Loc,
    defaults: &Defaults,
    section_default: bool,
    problems: &mut Vec<Problem>,
) -> (Header, Vec<ColumnRead>) {
    let mut columns = Vec::with_capacity(record.len());
    let mut reads = Vec::new();
    let mut seen: Vec<Col> = Vec::new();
    for cell in record {
        let column = header_cell(cell, loc, defaults, &mut seen, problems);
        if let Some(c) = &column {
            reads.push(column_read(cell, c));
        }
        columns.push(column);
    }
    missing_columns(&seen, loc, section_default, problems);
    let header = Header {
        width: filled_width(record),
        columns,
    };
    (header, reads)
}

/// One header cell: its column (new, and known) and unit; problems are reported and give
/// `None`, except an unknown unit, whose column is still read so the numbers' other
/// problems are reported too.
fn header_cell(
    cell: &str,
    loc: &Loc,
    defaults: &Defaults,
    seen: &mut Vec<Col>,
    problems: &mut Vec<Problem>,
) -> Option<Column> {
    let (name, unit) = split_header(cell);
    if name.is_empty() {
        return None;
    }
    let Some(col) = Col::parse(&name) else {
        let hint = if number(&name, true).is_some() {
            format!(
                "the first row must name the columns, e.g. {}",
                Col::NAMES[..4].join(",")
            )
        } else {
            format!(
                "{}; name a column 'notes' to keep remarks",
                suggest::hint(&name, &Col::NAMES)
            )
        };
        problems.push(loc.problem(format!("unknown column '{cell}'")).hint(hint));
        return None;
    };
    if col != Col::Note && seen.contains(&col) {
        problems.push(
            loc.problem(format!("column '{}' appears twice", col.name()))
                .hint("keep one of them"),
        );
        return None;
    }
    seen.push(col);
    if col == Col::Section && unit.is_some() {
        problems.push(
            loc.problem(format!("column '{cell}': a section name takes no unit"))
                .hint("name the column just 'section'"),
        );
    }
    let said = match (&unit, col) {
        (Some(u), Col::Radius | Col::Chord | Col::Sweep | Col::Prebend) => {
            Some(format!("the column header '{}' says {u}", cell.trim()).into())
        }
        (None, _) => defaults.said.clone(),
        _ => None,
    };
    match column_unit(col, unit.as_deref(), defaults) {
        Ok((factor, unit)) => Some(Column {
            col,
            factor,
            unit,
            said,
        }),
        Err((kind, names)) => {
            problems.push(
                loc.problem(format!(
                    "unknown {kind} unit '{}' in column '{cell}'",
                    unit.unwrap_or_default()
                ))
                .hint(format!("use {names}")),
            );
            Some(Column {
                col,
                factor: 1.0,
                unit: "(unknown unit)",
                said: None,
            })
        }
    }
}

/// The factor and unit name of a column, from its header's unit or the defaults; or the
/// kind of unit expected and the accepted names.
fn column_unit(
    col: Col,
    unit: Option<&str>,
    defaults: &Defaults,
) -> Result<(f64, &'static str), (&'static str, &'static str)> {
    match col {
        Col::Radius | Col::Chord | Col::Sweep | Col::Prebend => {
            let u = match unit {
                None => Some(defaults.length),
                Some(u) => LengthUnit::parse(u),
            };
            u.map(|u| (u.to_mm(), u.name()))
                .ok_or(("length", LengthUnit::NAMES))
        }
        Col::Twist => {
            let u = match unit {
                None => Some(defaults.angle),
                Some(u) => AngleUnit::parse(u),
            };
            u.map(|u| (u.to_deg(), u.name()))
                .ok_or(("angle", AngleUnit::NAMES))
        }
        Col::Thickness => {
            let u = match unit {
                None => Some(RatioUnit::Percent),
                Some(u) => RatioUnit::parse(u),
            };
            u.map(|u| (u.to_percent(), u.name()))
                .ok_or(("thickness", RatioUnit::NAMES))
        }
        // Chord fractions unless the header says percent; the factor gives a fraction.
        Col::Stacking => {
            let u = match unit {
                None => Some(RatioUnit::Fraction),
                Some(u) => RatioUnit::parse(u),
            };
            u.map(|u| (u.to_percent() / 100.0, u.name()))
                .ok_or(("stacking", RatioUnit::NAMES))
        }
        Col::Section | Col::Note => Ok((1.0, "")),
    }
}

/// How a header cell was read, for the user.
fn column_read(cell: &str, c: &Column) -> ColumnRead {
    let (read_as, unit) = match c.col {
        Col::Note => ("ignored (notes)", None),
        Col::Section => ("section", None),
        other => (other.name(), Some(c.unit)),
    };
    ColumnRead {
        header: cell.trim().to_string(),
        read_as,
        unit,
    }
}

/// Every required column present (the section unless a default is given).
fn missing_columns(seen: &[Col], loc: &Loc, section_default: bool, problems: &mut Vec<Problem>) {
    for need in [Col::Radius, Col::Chord, Col::Twist, Col::Section] {
        if (need == Col::Section && section_default) || seen.contains(&need) {
            continue;
        }
        let hint = if need == Col::Section {
            "add a 'section' column, set [blade] section in a TOML design, or give a default \
             section on the command line"
                .to_string()
        } else {
            format!("add a '{}' column to the header row", need.name())
        };
        problems.push(
            loc.problem(format!("missing column '{}'", need.name()))
                .hint(hint),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cells(r: &(usize, Record)) -> Vec<&str> {
        r.1.as_ref().unwrap().iter().map(String::as_str).collect()
    }

    #[test]
    fn split_follows_rfc4180_quoting() {
        // RFC 4180 (2005), section 2, rules 5-7: quoted fields may hold separators, line
        // breaks and doubled quotes.
        let text = "a,b\r\n\"x, y\",\"say \"\"hi\"\"\"\r\n\"two\nlines\",3\n# note, here\n\n4 , 5";
        let r = split(text, ',');
        assert_eq!(r.len(), 6);
        assert_eq!((r[0].0, cells(&r[0])), (1, vec!["a", "b"]));
        assert_eq!((r[1].0, cells(&r[1])), (2, vec!["x, y", "say \"hi\""]));
        assert_eq!((r[2].0, cells(&r[2])), (3, vec!["two\nlines", "3"]));
        assert_eq!((r[3].0, cells(&r[3]).len()), (5, 0), "comment row");
        assert_eq!((r[4].0, cells(&r[4])), (6, vec![""]), "blank row");
        assert_eq!((r[5].0, cells(&r[5])), (7, vec!["4", "5"]));
        let bad = split("a,b\n\"open,1\n", ',');
        assert!(bad.last().unwrap().1.is_err());
        assert_eq!(bad.last().unwrap().0, 2);
    }

    #[test]
    fn cr_line_ends_split_like_lf() {
        // Classic Mac OS text files end lines with CR alone (common practice).
        let cr = split("a,b\r1,2\r# c\r3,4", ',');
        let lf = split("a,b\n1,2\n# c\n3,4", ',');
        assert_eq!(cr, lf);
        assert_eq!((cr[3].0, cells(&cr[3])), (4, vec!["3", "4"]));
    }

    #[test]
    fn header_units_and_separators() {
        let s = |c: &str| split_header(c);
        let some = |n: &str, u: &str| (n.to_string(), Some(u.to_string()));
        assert_eq!(s(" Radius [mm] "), some("radius", "mm"));
        assert_eq!(s("chord (in)"), some("chord", "in"));
        assert_eq!(s("radius_mm"), some("radius", "mm"));
        assert_eq!(s("r [mm]"), some("r", "mm"));
        assert_eq!(s("r/mm"), some("r", "mm"));
        assert_eq!(s("Twist deg"), some("twist", "deg"));
        assert_eq!(s("t/c"), ("t/c".into(), None));
        assert_eq!(s("chord length"), ("chord length".into(), None));
        assert_eq!(s("twist"), ("twist".into(), None));
        assert_eq!(s("span_mm"), ("span_mm".into(), None));
        assert_eq!(separator("# a, b, c\nradius;chord;twist\n"), ';');
        assert_eq!(separator("# a, b, c\rradius;chord;twist\r"), ';');
        assert_eq!(separator("radius\tchord\ttwist"), '\t');
        assert_eq!(separator("radius,chord"), ',');
        assert_eq!(number("12,5", true), Some(12.5));
        assert_eq!(number("12,5", false), None);
    }
}
