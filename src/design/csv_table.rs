//! The station table as a spreadsheet exports it (CSV).
//!
//! * First non-blank, non-comment row: the header, naming the columns in any order and
//!   case: `radius`, `chord`, `twist` (required), `section` (required unless a default
//!   section is given), `thickness`, `sweep`, `prebend` (optional). `airfoil` and
//!   `profile` are accepted for `section`; columns named `note`, `notes`, `comment` or
//!   `comments` are ignored; any other column is an error.
//! * A unit may follow the name in brackets or parentheses: `radius [mm]`, `chord (in)`,
//!   `twist [deg]`, `thickness [%]`. Lengths: mm, cm, m, in; angles: deg, rad; thickness:
//!   `%` (percent of chord, the default) or `fraction`. Without a unit the column is in
//!   the design's units (a bare CSV: mm and degrees).
//! * Separator: comma, semicolon or tab, detected from the header row. With a semicolon
//!   or tab separator a decimal comma (`12,5`) is read as a decimal point.
//! * Blank rows (also rows of empty cells), rows starting with `#`, CRLF line ends and a
//!   UTF-8 byte-order mark are tolerated; fields may be quoted.

use std::path::Path;

use super::error::{Loc, Problem};
use super::rows::{Num, Row};
use super::suggest;
use super::units::{AngleUnit, LengthUnit, RatioUnit};

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
    Note,
}

impl Col {
    const NAMES: [&'static str; 7] = [
        "radius",
        "chord",
        "twist",
        "section",
        "thickness",
        "sweep",
        "prebend",
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
fn separator(text: &str) -> u8 {
    let header = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("");
    let count = |c: char| header.matches(c).count();
    let (semi, tab, comma) = (count(';'), count('\t'), count(','));
    if semi > 0 && semi >= comma && semi >= tab {
        b';'
    } else if tab > 0 && tab >= comma {
        b'\t'
    } else {
        b','
    }
}

/// Number of cells up to and including the last non-empty one.
fn filled_width(record: &csv::StringRecord) -> usize {
    (0..record.len())
        .rev()
        .find(|i| record.get(*i).is_some_and(|c| !c.trim().is_empty()))
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
    let decimal_comma = sep != b',';
    // Comment rows are blanked here rather than by the csv reader, whose line count skips
    // them: messages must name the line as an editor shows it.
    let text: String = text
        .split_inclusive('\n')
        .map(|l| {
            if l.trim_start().starts_with('#') {
                if l.ends_with("\r\n") {
                    "\r\n"
                } else if l.ends_with('\n') {
                    "\n"
                } else {
                    ""
                }
            } else {
                l
            }
        })
        .collect();
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(sep)
        .has_headers(false)
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());

    let mut header: Option<(usize, Vec<Option<Column>>)> = None;
    let mut rows = Vec::new();
    for record in reader.records() {
        let record = match record {
            Ok(r) => r,
            Err(e) => {
                let line = e.position().map(|p| p.line() as usize);
                problems.push(
                    at(line)
                        .problem(format!("cannot read this row: {e}"))
                        .hint("check quotes: a quoted cell must end with a quote"),
                );
                continue;
            }
        };
        let line = record.position().map(|p| p.line() as usize);
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
        };
        for (i, column) in columns.iter().enumerate() {
            let Some(column) = column else { continue };
            let cell = record.get(i).unwrap_or("");
            let name = column.col.name();
            if column.col == Col::Note {
                continue;
            }
            if cell.is_empty() {
                if matches!(column.col, Col::Radius | Col::Chord | Col::Twist)
                    || (column.col == Col::Section && !section_default)
                {
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
                Col::Section | Col::Note => continue,
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
    record: &csv::StringRecord,
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
