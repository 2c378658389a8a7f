//! The station table as a spreadsheet exports it (CSV).
//!
//! * First non-blank, non-comment row: the header, naming the columns in any order and
//!   case: `radius`, `chord`, `twist` (required), `section` (required unless a default
//!   section is given), `thickness`, `sweep`, `prebend`, `stacking` (optional).
//!   `airfoil` and `profile` are accepted for `section`; columns named `note`, `notes`,
//!   `comment` or `comments` are ignored; any other column is an error.
//! * A unit may follow the name in brackets or parentheses: `radius [mm]`, `chord (in)`,
//!   `twist [deg]`, `thickness [%]`. Lengths: mm, cm, m, in; angles: deg, rad; thickness:
//!   `%` (percent of chord, the default) or `fraction`. Without a unit the column is in
//!   the design's units (a bare CSV: mm and degrees).
//! * `stacking` cells hold a chord fraction or a rule name (`quarter-chord`, `centroid`,
//!   `thickest`: see [`super::Stacking`]); the column is a fraction of chord unless its
//!   header says `stacking [%]`. An empty cell takes the design's `blade.stacking`.
//! * Separator: comma, semicolon or tab, detected from the header row. With a semicolon
//!   or tab separator a decimal comma (`12,5`) is read as a decimal point.
//! * Blank rows (also rows of empty cells), rows starting with `#`, CRLF line ends and a
//!   UTF-8 byte-order mark are tolerated; fields may be quoted.

use std::path::Path;

use super::error::{Loc, Problem};
use super::rows::{Num, Row};
use super::suggest;
use super::units::{AngleUnit, LengthUnit, RatioUnit};
use super::Stacking;

/// Units a CSV column is read in when its header names none.
#[derive(Debug, Clone, Copy, Default)]
pub(crate) struct Defaults {
    pub length: LengthUnit,
    pub angle: AngleUnit,
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

    fn parse(name: &str) -> Option<Self> {
        Some(match name {
            "radius" => Self::Radius,
            "chord" => Self::Chord,
            "twist" => Self::Twist,
            "section" | "airfoil" | "profile" => Self::Section,
            "thickness" => Self::Thickness,
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
#[derive(Debug, Clone, Copy)]
struct Column {
    col: Col,
    factor: f64,
    unit: &'static str,
}

/// Splits `radius [mm]` or `Chord (in)` into (`radius`, Some(`mm`)).
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
        (cell[..open].trim().to_lowercase(), Some(unit))
    } else {
        (cell.to_lowercase(), None)
    }
}

/// Picks the separator from the header line: the most frequent of `;`, tab and `,`.
fn separator(text: &str) -> char {
    let header = text
        .lines()
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

/// Splits CSV text into records with the line (from 1) each starts on. Cells are trimmed;
/// a cell may be quoted (RFC 4180: `""` is a quote inside quotes, separators and line
/// breaks inside quotes belong to the cell). Rows whose first non-blank character is `#`
/// are comments and give an empty record. Line ends: LF or CRLF.
fn split(text: &str, sep: char) -> Vec<(usize, Result<Vec<String>, String>)> {
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
    while let Some(c) = chars.next() {
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
            '\r' if chars.peek() == Some(&'\n') => {}
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

/// Reads the rows of a CSV station table. Problems go to `problems`; the returned rows
/// hold what could be read.
pub(crate) fn read(
    bytes: &[u8],
    file: &Path,
    defaults: Defaults,
    section_default: bool,
    problems: &mut Vec<Problem>,
) -> Vec<Row> {
    let at = |line: Option<usize>| Loc::new(file, line, None);
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    let text = match std::str::from_utf8(bytes) {
        Ok(t) => t,
        Err(e) => {
            let line = bytes[..e.valid_up_to()]
                .iter()
                .filter(|b| **b == b'\n')
                .count()
                + 1;
            problems.push(
                at(Some(line))
                    .problem("the file is not UTF-8 text")
                    .hint("save the table as 'CSV UTF-8'"),
            );
            return Vec::new();
        }
    };
    let sep = separator(text);
    let decimal_comma = sep != ',';
    let mut header: Option<(usize, Vec<Option<Column>>)> = None;
    let mut rows = Vec::new();
    for (line, record) in split(text, sep) {
        let line = Some(line);
        let record =
            match record {
                Ok(r) => r,
                Err(message) => {
                    problems.push(at(line).problem(message).hint(
                        "a quoted cell must end with a quote; write a quote inside one as \"\"",
                    ));
                    continue;
                }
            };
        if record.iter().all(|c| c.is_empty()) {
            continue;
        }
        let Some((width, columns)) = &header else {
            header = Some(read_header(
                &record,
                line,
                file,
                defaults,
                section_default,
                problems,
            ));
            continue;
        };
        let loc = at(line);
        let last_filled = filled_width(&record);
        if record.len() < *width || last_filled > *width {
            let n = if record.len() < *width {
                record.len()
            } else {
                last_filled
            };
            problems.push(
                loc.problem(format!(
                    "this row has {n} cells but the header has {width}"
                ))
                .hint("every row needs one cell per column; check for a missing or extra separator"),
            );
        }
        let mut row = Row {
            loc: loc.clone(),
            radius: None,
            chord: None,
            twist: None,
            section: None,
            thickness: None,
            sweep: None,
            prebend: None,
            stacking: None,
            // A missing section column is reported once, at the header.
            section_reported: !section_default
                && !columns.iter().flatten().any(|c| c.col == Col::Section),
        };
        for (i, column) in columns.iter().enumerate() {
            let Some(column) = column else { continue };
            let cell = record.get(i).map_or("", String::as_str);
            let name = column.col.name();
            if column.col == Col::Note {
                continue;
            }
            if cell.is_empty() {
                let required = matches!(column.col, Col::Radius | Col::Chord | Col::Twist)
                    || (column.col == Col::Section && !section_default);
                // Cells missing from a short row are covered by the row-length message.
                if required && column.col == Col::Section {
                    row.section_reported = true;
                }
                if required && i < record.len() {
                    problems.push(
                        loc.problem(format!("{name} is empty"))
                            .hint(format!("every station needs a {name}")),
                    );
                }
                continue;
            }
            if column.col == Col::Section {
                row.section = Some((cell.to_string(), loc.clone()));
                continue;
            }
            if column.col == Col::Stacking {
                let read = match number(cell, decimal_comma) {
                    Some(raw) => Stacking::fraction(raw * column.factor),
                    None => Stacking::parse(cell, column.factor),
                };
                match read {
                    Ok(s) => row.stacking = Some(s),
                    Err(e) => problems.push(loc.problem(e.message()).hint(e.hint())),
                }
                continue;
            }
            let Some(raw) = number(cell, decimal_comma) else {
                problems.push(
                    loc.problem(format!("{name} '{cell}' is not a number"))
                        .hint("give a plain number such as 120.5"),
                );
                continue;
            };
            let n = Num::new(raw, column.factor, column.unit, loc.clone());
            let slot = match column.col {
                Col::Radius => &mut row.radius,
                Col::Chord => &mut row.chord,
                Col::Twist => &mut row.twist,
                Col::Thickness => &mut row.thickness,
                Col::Sweep => &mut row.sweep,
                Col::Prebend => &mut row.prebend,
                Col::Section | Col::Stacking | Col::Note => continue,
            };
            *slot = Some(n);
        }
        rows.push(row);
    }
    match header {
        None => problems.push(at(None).problem("the file is empty").hint(format!(
            "the first row must name the columns, e.g. {}",
            Col::NAMES[..4].join(",")
        ))),
        Some((_, _)) if rows.is_empty() => problems.push(
            at(None)
                .problem("the table has a header but no stations")
                .hint("add one row per station below the header"),
        ),
        _ => {}
    }
    rows
}

/// Reads the header row: column kinds and units. Returns the header width and, per cell,
/// the column read from it (`None` for unusable cells, already reported).
fn read_header(
    record: &[String],
    line: Option<usize>,
    file: &Path,
    defaults: Defaults,
    section_default: bool,
    problems: &mut Vec<Problem>,
) -> (usize, Vec<Option<Column>>) {
    let loc = Loc::new(file, line, None);
    let mut columns = Vec::with_capacity(record.len());
    let mut seen: Vec<Col> = Vec::new();
    for cell in record.iter() {
        let (name, unit) = split_header(cell);
        if name.is_empty() {
            columns.push(None);
            continue;
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
            columns.push(None);
            continue;
        };
        if col != Col::Note && seen.contains(&col) {
            problems.push(
                loc.problem(format!("column '{}' appears twice", col.name()))
                    .hint("keep one of them"),
            );
            columns.push(None);
            continue;
        }
        seen.push(col);
        let unit = unit.as_deref();
        let column = match col {
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
            Col::Section | Col::Note => {
                if unit.is_some() && col == Col::Section {
                    problems.push(
                        loc.problem(format!("column '{cell}': a section name takes no unit"))
                            .hint("name the column just 'section'"),
                    );
                }
                Ok((1.0, ""))
            }
        };
        match column {
            Ok((factor, unit)) => columns.push(Some(Column { col, factor, unit })),
            Err((kind, names)) => {
                problems.push(
                    loc.problem(format!(
                        "unknown {kind} unit '{}' in column '{cell}'",
                        unit.unwrap_or_default()
                    ))
                    .hint(format!("use {names}")),
                );
                // Keep reading the column's numbers in the default unit so their other
                // problems are reported too; the design is refused anyway.
                let factor = 1.0;
                columns.push(Some(Column {
                    col,
                    factor,
                    unit: "(unknown unit)",
                }));
            }
        }
    }
    for need in [Col::Radius, Col::Chord, Col::Twist, Col::Section] {
        if need == Col::Section && section_default {
            continue;
        }
        if !seen.contains(&need) {
            let hint = if need == Col::Section {
                "add a 'section' column, set [blade] section in a TOML design, or give a \
                 default section on the command line"
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
    (filled_width(record), columns)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cells(r: &(usize, Result<Vec<String>, String>)) -> Vec<&str> {
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
    fn header_units_and_separators() {
        assert_eq!(
            split_header(" Radius [mm] "),
            ("radius".into(), Some("mm".into()))
        );
        assert_eq!(
            split_header("chord (in)"),
            ("chord".into(), Some("in".into()))
        );
        assert_eq!(split_header("twist"), ("twist".into(), None));
        assert_eq!(separator("# a, b, c\nradius;chord;twist\n"), ';');
        assert_eq!(separator("radius\tchord\ttwist"), '\t');
        assert_eq!(separator("radius,chord"), ',');
        assert_eq!(number("12,5", true), Some(12.5));
        assert_eq!(number("12,5", false), None);
    }
}
