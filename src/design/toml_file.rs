//! Reading a TOML design file (see the key table in [`super`]).
//!
//! [`parse`] is the method, step by step: the TOML syntax; the top level (own keys, the
//! tables of later stages, unknown names with "did you mean"); the name; the units; the
//! `[blade]` options; the station rows (inline `[[station]]` entries or a CSV table);
//! their validation; the checks that need both the options and the stations.

use std::path::{Path, PathBuf};
use std::sync::Arc;

use toml::{Table, Value};

use super::csv_table::{self, Defaults};
use super::error::{DesignError, Loc, Problem};
use super::limits::{
    show_number, MAX_FILE_BYTES, MAX_TE_CHORD_FRACTION, MAX_TOLERANCE_MM, MIN_TOLERANCE_MM,
};
use super::rows::{validate, Num, Row, Rules};
use super::spans::{line_of, render, Seg, Spans};
use super::suggest;
use super::units::{AngleUnit, LengthUnit};
use super::{BladeOptions, ColumnRead, Design, Flow, Rotation, Stacking, Station, TABLES};
use crate::interp::Law;

/// Top-level keys read here; the tables of later stages are [`TABLES`].
const TOP: [&str; 5] = ["name", "units", "blade", "station", "stations"];
/// Tables read here.
const OWN_TABLES: [&str; 3] = ["units", "blade", "station"];
const UNIT_KEYS: [&str; 2] = ["length", "angle"];
const BLADE_KEYS: [&str; 8] = [
    "section",
    "stacking",
    "flow",
    "rotation",
    "points-per-side",
    "tolerance",
    "min-te-thickness",
    "spanwise",
];
const STATION_KEYS: [&str; 8] = [
    "radius",
    "chord",
    "twist",
    "section",
    "thickness",
    "sweep",
    "prebend",
    "stacking",
];

/// Accepted `points-per-side` range: fewer cannot resolve a leading edge, more only slows
/// every later stage down.
pub(crate) const POINTS_PER_SIDE: (i64, i64) = (8, 2000);

/// How a value looks in a message: strings quoted, others as TOML writes them.
pub(crate) fn show(v: &Value) -> String {
    match v {
        Value::String(s) => format!("\"{s}\""),
        Value::Table(_) => "a table".into(),
        Value::Array(_) => "an array".into(),
        other => other.to_string(),
    }
}

/// What was found, for "expected ..., found ..." messages: `string "x"`, `integer 5`,
/// `an array`, `a table`.
fn found(v: &Value) -> String {
    match v {
        Value::Table(_) | Value::Array(_) => show(v),
        other => format!("{} {}", other.type_str(), show(other)),
    }
}

/// The `[blade]` options as read, before the checks that need the stations.
struct BladeRead {
    options: BladeOptions,
    /// Default section for stations without one.
    section: Option<String>,
    /// The tolerance and how it was set, when valid.
    tolerance: Option<(f64, String)>,
    /// `min-te-thickness` as written (mm, and as written), when given and valid.
    min_te: Option<(f64, String)>,
}

/// The station rows and what their validation needs to know of where they came from.
struct StationRows {
    rows: Vec<Row>,
    /// Locates problems of the table as a whole.
    whole: Option<Loc>,
    /// Where a default section could come from.
    section_hint: &'static str,
    /// How the columns of a CSV table were read (empty for inline stations).
    columns: Vec<ColumnRead>,
}

impl StationRows {
    fn none() -> Self {
        Self {
            rows: Vec::new(),
            whole: None,
            section_hint: "",
            columns: Vec::new(),
        }
    }
}

struct Reader<'a> {
    file: PathBuf,
    spans: Spans<'a>,
    problems: Vec<Problem>,
}

impl Reader<'_> {
    fn loc(&self, path: &[Seg]) -> Loc {
        let key = (!path.is_empty()).then(|| render(path));
        Loc::new(&self.file, self.spans.line(path), key)
    }

    fn report(&mut self, path: &[Seg], message: String, hint: Option<String>) {
        let p = self.loc(path).problem(message).maybe_hint(hint);
        self.problems.push(p);
    }

    /// Reports keys of `table` not in `allowed`.
    fn keys(&mut self, table: &Table, path: &[Seg], allowed: &[&str]) {
        for key in table.keys() {
            if !allowed.contains(&key.as_str()) {
                let mut p = path.to_vec();
                p.push(Seg::Key(key));
                self.report(
                    &p,
                    format!("unknown key '{key}'"),
                    Some(suggest::hint(key, allowed)),
                );
            }
        }
    }

    fn wrong_type(&mut self, path: &[Seg], expected: &str, v: &Value) {
        self.report(
            path,
            format!("expected {expected}, found {}", found(v)),
            None,
        );
    }

    /// A number (integer or float) at `path + key`; `None` when absent or of a wrong type
    /// (reported).
    fn number(&mut self, table: &Table, path: &[Seg], key: &str) -> Option<f64> {
        let v = table.get(key)?;
        let p = [path, &[Seg::Key(key)]].concat();
        match v {
            Value::Float(f) => Some(*f),
            Value::Integer(i) => Some(*i as f64),
            other => {
                self.wrong_type(&p, "a number", other);
                None
            }
        }
    }

    fn string(&mut self, table: &Table, path: &[Seg], key: &str) -> Option<String> {
        let v = table.get(key)?;
        let p = [path, &[Seg::Key(key)]].concat();
        match v {
            Value::String(s) => Some(s.clone()),
            other => {
                self.wrong_type(&p, "a string", other);
                None
            }
        }
    }

    /// A `stacking` value at `path + "stacking"`: a chord fraction or a rule name;
    /// `None` when absent or refused (reported).
    fn stacking(&mut self, table: &Table, path: &[Seg]) -> Option<Stacking> {
        let v = table.get("stacking")?;
        let p = [path, &[Seg::Key("stacking")]].concat();
        let read = match v {
            Value::Float(f) => Stacking::fraction(*f),
            Value::Integer(i) => Stacking::fraction(*i as f64),
            Value::String(s) if s.trim().parse::<f64>().is_ok() => {
                self.report(
                    &p,
                    format!("stacking \"{s}\" is a number written as a string"),
                    Some(format!("write it without quotes: stacking = {}", s.trim())),
                );
                return None;
            }
            Value::String(s) => Stacking::parse(s, 1.0),
            other => {
                self.wrong_type(&p, "a chord fraction or a stacking rule name", other);
                return None;
            }
        };
        match read {
            Ok(s) => Some(s),
            Err(e) => {
                self.report(&p, e.message(), Some(e.hint()));
                None
            }
        }
    }

    /// A converted number with its place, for station rows.
    fn num(
        &mut self,
        table: &Table,
        path: &[Seg],
        key: &str,
        factor: f64,
        unit: &'static str,
    ) -> Option<Num> {
        let raw = self.number(table, path, key)?;
        let p = [path, &[Seg::Key(key)]].concat();
        Some(Num::new(raw, factor, unit, self.loc(&p)))
    }

    /// Step 2: the top level. Own keys are read later; the tables of later stages are
    /// kept; anything else is an error, with the closest known name.
    fn top_level(&mut self, top: &Table) -> Table {
        let mut tables = Table::new();
        let known_tables: Vec<&str> = OWN_TABLES.iter().chain(&TABLES).copied().collect();
        for (key, v) in top {
            if TOP.contains(&key.as_str()) {
                continue;
            }
            let tableish = match v {
                Value::Table(_) => true,
                Value::Array(a) => !a.is_empty() && a.iter().all(Value::is_table),
                _ => false,
            };
            if !tableish {
                let keys: Vec<&str> = TOP.iter().chain(&TABLES).copied().collect();
                self.report(
                    &[Seg::Key(key)],
                    format!("unknown key '{key}'"),
                    Some(suggest::hint(key, &keys)),
                );
            } else if TABLES.contains(&key.as_str()) {
                tables.insert(key.clone(), v.clone());
            } else {
                let hint = match suggest::closest(key, &known_tables) {
                    Some(t) => format!("did you mean [{t}]?"),
                    None => format!("the tables are: [{}]", known_tables.join("], [")),
                };
                self.report(
                    &[Seg::Key(key)],
                    format!("unknown table [{key}]"),
                    Some(hint),
                );
            }
        }
        tables
    }

    /// Step 3: the design name, when given and usable for file names.
    fn name(&mut self, top: &Table) -> Option<String> {
        let n = self.string(top, &[], "name")?;
        if n.trim().is_empty() || n.contains(['/', '\\']) || n.contains(char::is_control) {
            self.report(
                &[Seg::Key("name")],
                format!("name \"{n}\" cannot name output files"),
                Some("use letters, digits, '-' and '_'".into()),
            );
            return None;
        }
        Some(n)
    }

    /// Step 4: the units table.
    fn units(&mut self, top: &Table) -> (LengthUnit, AngleUnit) {
        let mut units = (LengthUnit::default(), AngleUnit::default());
        let path = [Seg::Key("units")];
        let Some(v) = top.get("units") else {
            return units;
        };
        let Value::Table(t) = v else {
            self.wrong_type(
                &path,
                "a table such as { length = \"mm\", angle = \"deg\" }",
                v,
            );
            return units;
        };
        self.keys(t, &path, &UNIT_KEYS);
        if let Some(s) = self.string(t, &path, "length") {
            match LengthUnit::parse(&s) {
                Some(u) => units.0 = u,
                None => self.report(
                    &[Seg::Key("units"), Seg::Key("length")],
                    format!("unknown length unit \"{s}\""),
                    Some(format!("use {}", LengthUnit::NAMES)),
                ),
            }
        }
        if let Some(s) = self.string(t, &path, "angle") {
            match AngleUnit::parse(&s) {
                Some(u) => units.1 = u,
                None => self.report(
                    &[Seg::Key("units"), Seg::Key("angle")],
                    format!("unknown angle unit \"{s}\""),
                    Some(format!("use {}", AngleUnit::NAMES)),
                ),
            }
        }
        units
    }

    /// Step 5: `[blade]`. Lengths (`tolerance`, `min-te-thickness`) are in the file's
    /// length unit.
    fn blade(&mut self, top: &Table, length: LengthUnit) -> BladeRead {
        let default_tolerance = BladeOptions::default().tolerance;
        let mut read = BladeRead {
            options: BladeOptions::default(),
            section: None,
            tolerance: Some((
                default_tolerance,
                format!("the default, {default_tolerance} mm"),
            )),
            min_te: None,
        };
        let path = [Seg::Key("blade")];
        let Some(v) = top.get("blade") else {
            return read;
        };
        let Value::Table(t) = v else {
            self.wrong_type(&path, "a table ([blade])", v);
            return read;
        };
        self.keys(t, &path, &BLADE_KEYS);
        read.section = self.blade_section(t);
        if let Some(stacking) = self.stacking(t, &path) {
            read.options.stacking = stacking;
        }
        self.blade_choices(t, &mut read.options);
        self.points_per_side(t, &mut read.options);
        read.tolerance = self.tolerance(t, length, &mut read.options);
        read.min_te = self.min_te(t, length, &mut read.options);
        read
    }

    /// `blade.section`, trimmed; an empty one is reported.
    fn blade_section(&mut self, t: &Table) -> Option<String> {
        let section = self
            .string(t, &[Seg::Key("blade")], "section")
            .map(|s| s.trim().to_string())?;
        if section.is_empty() {
            self.report(
                &[Seg::Key("blade"), Seg::Key("section")],
                "the section name is empty".into(),
                Some("give a designation such as \"naca4412\" or a section file".into()),
            );
            return None;
        }
        Some(section)
    }

    /// `blade.flow`, `blade.rotation` and `blade.spanwise`: one of a few names each.
    fn blade_choices(&mut self, t: &Table, o: &mut BladeOptions) {
        let path = [Seg::Key("blade")];
        let key = |k: &'static str| [Seg::Key("blade"), Seg::Key(k)];
        if let Some(s) = self.string(t, &path, "flow") {
            match s.as_str() {
                "turbine" => o.flow = Flow::Turbine,
                "propeller" => o.flow = Flow::Propeller,
                _ => self.report(
                    &key("flow"),
                    format!("unknown flow \"{s}\""),
                    Some(suggest::hint(&s, &["turbine", "propeller"])),
                ),
            }
        }
        if let Some(s) = self.string(t, &path, "rotation") {
            match s.as_str() {
                "ccw" => o.rotation = Rotation::Ccw,
                "cw" => o.rotation = Rotation::Cw,
                _ => self.report(
                    &key("rotation"),
                    format!("unknown rotation \"{s}\""),
                    Some("use \"ccw\" or \"cw\" (seen from upstream)".into()),
                ),
            }
        }
        if let Some(s) = self.string(t, &path, "spanwise") {
            match Law::parse(&s) {
                Some(law) => o.spanwise = law,
                None => self.report(
                    &key("spanwise"),
                    format!("unknown spanwise law \"{s}\""),
                    Some(format!(
                        "{}: \"smooth\" (monotone cubic, the default) or \"linear\" (straight \
                         lines between stations)",
                        suggest::hint(&s, &Law::NAMES)
                    )),
                ),
            }
        }
    }

    /// `blade.points-per-side`, a whole number in [`POINTS_PER_SIDE`].
    fn points_per_side(&mut self, t: &Table, o: &mut BladeOptions) {
        let Some(v) = t.get("points-per-side") else {
            return;
        };
        let key = [Seg::Key("blade"), Seg::Key("points-per-side")];
        let (lo, hi) = POINTS_PER_SIDE;
        match v {
            Value::Integer(n) if (lo..=hi).contains(n) => {
                o.points_per_side = usize::try_from(*n).unwrap_or(o.points_per_side);
            }
            Value::Integer(n) => self.report(
                &key,
                format!("points-per-side {n} is outside {lo}..{hi}"),
                Some("120 is the default and enough for most blades".into()),
            ),
            other => self.wrong_type(&key, "a whole number", other),
        }
    }

    /// `blade.tolerance` in the file's length unit, within
    /// [`MIN_TOLERANCE_MM`]..=[`MAX_TOLERANCE_MM`]. Returns the tolerance and how it was
    /// set, or `None` when the value was refused.
    fn tolerance(
        &mut self,
        t: &Table,
        length: LengthUnit,
        o: &mut BladeOptions,
    ) -> Option<(f64, String)> {
        let default = Some((o.tolerance, format!("the default, {} mm", o.tolerance)));
        let Some(raw) = self.number(t, &[Seg::Key("blade")], "tolerance") else {
            return if t.contains_key("tolerance") {
                None
            } else {
                default
            };
        };
        let f = raw * length.to_mm();
        let written = written_length(raw, length, f);
        let (lo, hi) = (MIN_TOLERANCE_MM, MAX_TOLERANCE_MM);
        let refused = if !(f > 0.0) {
            Some(format!("tolerance {written} must be more than 0"))
        } else if f < lo {
            Some(format!(
                "tolerance {written} is finer than {lo} mm, the smallest spanwright accepts"
            ))
        } else if !(f <= hi) {
            Some(format!(
                "tolerance {written} is more than {hi} mm, the largest spanwright accepts"
            ))
        } else {
            None
        };
        if let Some(message) = refused {
            self.report(
                &[Seg::Key("blade"), Seg::Key("tolerance")],
                message,
                Some(format!(
                    "give the largest allowed mesh deviation from {lo} mm (what precision \
                     machining holds) to {hi} mm; 0.01 mm is a fine print, 0.001 mm a \
                     machining file"
                )),
            );
            return None;
        }
        o.tolerance = f;
        Some((f, format!("blade.tolerance = {written}")))
    }

    /// `blade.min-te-thickness` in the file's length unit: 0 or more (0 keeps knife
    /// edges); the default is [`DEFAULT_MIN_TE_MM`]. The largest value is checked against
    /// the chords later. Returns the value (mm) and how it was written.
    fn min_te(
        &mut self,
        t: &Table,
        length: LengthUnit,
        o: &mut BladeOptions,
    ) -> Option<(f64, String)> {
        let raw = self.number(t, &[Seg::Key("blade")], "min-te-thickness")?;
        let f = raw * length.to_mm();
        let written = written_length(raw, length, f);
        if !(f.is_finite() && f >= 0.0) {
            self.report(
                &[Seg::Key("blade"), Seg::Key("min-te-thickness")],
                format!("min-te-thickness {written} must be 0 or more"),
                Some(
                    "give the thinnest printable trailing edge, e.g. 0.4 mm, or 0 to keep \
                     knife edges"
                        .into(),
                ),
            );
            return None;
        }
        o.min_te_thickness = Some(f);
        Some((f, written))
    }

    /// Step 6: the station rows, inline or from a CSV table.
    fn station_rows(
        &mut self,
        top: &Table,
        units: (LengthUnit, AngleUnit),
        has_default_section: bool,
        dir: &Path,
    ) -> StationRows {
        match (top.get("station"), top.get("stations")) {
            (Some(_), Some(_)) => {
                self.report(
                    &[Seg::Key("stations")],
                    "both [[station]] entries and a stations file are given".into(),
                    Some("keep one of them".into()),
                );
                StationRows::none()
            }
            (Some(v), None) => StationRows {
                rows: self.stations(v, units.0, units.1),
                whole: Some(self.loc(&[Seg::Key("station")])),
                section_hint: "add section = \"...\" to this station or set section in [blade]",
                columns: Vec::new(),
            },
            (None, Some(v)) => self.csv_stations(v, units, has_default_section, dir),
            (None, None) => {
                self.problems
                    .push(Problem::new(&self.file, "no stations").hint(
                        "add [[station]] entries, or stations = \"table.csv\" naming a CSV table",
                    ));
                StationRows::none()
            }
        }
    }

    /// `stations = "table.csv"`: the CSV table beside the design file.
    fn csv_stations(
        &mut self,
        v: &Value,
        units: (LengthUnit, AngleUnit),
        has_default_section: bool,
        dir: &Path,
    ) -> StationRows {
        let path = [Seg::Key("stations")];
        let Value::String(s) = v else {
            self.wrong_type(&path, "the name of a CSV station table", v);
            return StationRows::none();
        };
        let csv_path = dir.join(s);
        if let Some(why) = not_a_station_table(&csv_path, &self.file) {
            self.report(
                &path,
                format!("stations = \"{s}\" {why}; it must name a CSV station table"),
                Some(
                    "write the stations as [[station]] entries in this file, or name the CSV \
                     file a spreadsheet exported"
                        .into(),
                ),
            );
            return StationRows::none();
        }
        let bytes = match super::read_limited(&csv_path) {
            Ok(bytes) => bytes,
            Err(super::ReadFail::Io(e)) => {
                self.report(
                    &path,
                    format!("cannot read station table '{}': {e}", csv_path.display()),
                    Some("the path is relative to the design file's folder".into()),
                );
                return StationRows::none();
            }
            Err(super::ReadFail::TooLarge(size)) => {
                self.problems.push(super::too_large(&csv_path, size));
                return StationRows::none();
            }
        };
        let said: Option<Arc<str>> = (units.0 != LengthUnit::Mm).then(|| {
            format!(
                "the design file says units = {{ length = \"{}\" }}",
                units.0.name()
            )
            .into()
        });
        let defaults = Defaults {
            length: units.0,
            angle: units.1,
            said,
        };
        let table = csv_table::read(
            &bytes,
            &csv_path,
            &defaults,
            has_default_section,
            &mut self.problems,
        );
        StationRows {
            rows: table.rows,
            whole: Some(Loc::new(&csv_path, None, None)),
            section_hint: "add a 'section' column or set section in [blade]",
            columns: table.columns,
        }
    }

    /// The inline `[[station]]` entries.
    fn stations(&mut self, v: &Value, length: LengthUnit, angle: AngleUnit) -> Vec<Row> {
        let path = [Seg::Key("station")];
        let entries = match v {
            Value::Array(a) => a,
            Value::Table(_) => {
                self.report(
                    &path,
                    "[station] is a single table".into(),
                    Some("write [[station]] (double brackets) before each station".into()),
                );
                return Vec::new();
            }
            other => {
                self.wrong_type(&path, "[[station]] entries", other);
                return Vec::new();
            }
        };
        let said: Option<Arc<str>> = (length != LengthUnit::Mm)
            .then(|| format!("the file says units = {{ length = \"{}\" }}", length.name()).into());
        let mut rows = Vec::with_capacity(entries.len().min(super::MAX_STATIONS + 1));
        for (i, entry) in entries.iter().enumerate().take(super::MAX_STATIONS + 1) {
            if let Some(row) = self.station(i, entry, length, angle, &said) {
                rows.push(row);
            }
        }
        rows
    }

    /// One `[[station]]` entry (`i` counted from 0).
    fn station(
        &mut self,
        i: usize,
        entry: &Value,
        length: LengthUnit,
        angle: AngleUnit,
        said: &Option<Arc<str>>,
    ) -> Option<Row> {
        let p = [Seg::Key("station"), Seg::Index(i)];
        let Value::Table(t) = entry else {
            self.wrong_type(&p, "a table of station values", entry);
            return None;
        };
        self.keys(t, &p, &STATION_KEYS);
        for need in ["radius", "chord", "twist"] {
            if !t.contains_key(need) {
                self.report(
                    &p,
                    format!("missing '{need}'"),
                    Some(format!("every station needs {need} = <number>")),
                );
            }
        }
        let section = self.string(t, &p, "section").map(|s| {
            let sp = [Seg::Key("station"), Seg::Index(i), Seg::Key("section")];
            (s.trim().to_string(), self.loc(&sp))
        });
        if let Some((s, loc)) = &section {
            if s.is_empty() {
                self.problems.push(
                    loc.problem("the section name is empty")
                        .hint("give a designation such as \"naca4412\" or a section file"),
                );
            }
        }
        let (lf, lu, af, au) = (length.to_mm(), length.name(), angle.to_deg(), angle.name());
        let length_num =
            |r: &mut Self, key| r.num(t, &p, key, lf, lu).map(|n| n.said(said.clone()));
        Some(Row {
            loc: self.loc(&p),
            radius: length_num(self, "radius"),
            chord: length_num(self, "chord"),
            twist: self.num(t, &p, "twist", af, au),
            section,
            thickness: self.num(t, &p, "thickness", 1.0, "%"),
            sweep: length_num(self, "sweep"),
            prebend: length_num(self, "prebend"),
            stacking: self.stacking(t, &p),
            section_reported: false,
        })
    }

    /// Step 8: `min-te-thickness` against the stations' chords: at most
    /// [`MAX_TE_CHORD_FRACTION`] of every chord.
    fn min_te_fits_chords(&mut self, min_te: &(f64, String), stations: &[Station]) {
        let (f, written) = min_te;
        let Some(thinnest) = stations.iter().min_by(|a, b| a.chord.total_cmp(&b.chord)) else {
            return;
        };
        let most = MAX_TE_CHORD_FRACTION * thinnest.chord;
        if *f > most {
            self.report(
                &[Seg::Key("blade"), Seg::Key("min-te-thickness")],
                format!(
                    "min-te-thickness {written} is more than {:.0} % of the {} mm chord at {}, \
                     {} mm: a trailing edge that thick cuts the section off",
                    MAX_TE_CHORD_FRACTION * 100.0,
                    show_number(thinnest.chord),
                    thinnest.origin,
                    show_number(most)
                ),
                Some(format!(
                    "give at most {} mm (the nozzle width, commonly 0.4 mm), or 0 to keep \
                     knife edges",
                    show_number(most)
                )),
            );
        }
    }
}

/// A length as written, with its millimetres when the unit is not mm: `0.02 in (0.508 mm)`.
fn written_length(raw: f64, unit: LengthUnit, mm: f64) -> String {
    if unit == LengthUnit::Mm {
        format!("{} mm", show_number(raw))
    } else {
        format!(
            "{} {} ({} mm)",
            show_number(raw),
            unit.name(),
            show_number(mm)
        )
    }
}

/// Why `path` cannot be the station table of the design `design`, if it cannot: it is a
/// TOML file, or the design file itself.
fn not_a_station_table(path: &Path, design: &Path) -> Option<&'static str> {
    let is_toml = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("toml"));
    let same = match (path.canonicalize(), design.canonicalize()) {
        (Ok(a), Ok(b)) => a == b,
        _ => false,
    };
    if same {
        Some("names the design file itself")
    } else if is_toml {
        Some("names a TOML file")
    } else {
        None
    }
}

/// Step 1: the TOML syntax.
fn document(text: &str, file: &Path) -> Result<Table, DesignError> {
    if text.len() as u64 > MAX_FILE_BYTES {
        return Err(DesignError::one(super::too_large(file, text.len() as u64)));
    }
    toml::from_str(text).map_err(|e| {
        let line = e.span().map(|s| line_of(text, s.start));
        DesignError::one(
            Problem::new(file, format!("not valid TOML: {}", e.message()))
                .line(line)
                .hint("see https://toml.io for the syntax"),
        )
    })
}

/// Reads a TOML design from `text`. `file` labels messages; relative paths in the file
/// (the station table) are resolved against `dir`.
pub(crate) fn parse(
    text: &str,
    file: &Path,
    dir: &Path,
    source: Option<PathBuf>,
) -> Result<Design, DesignError> {
    let top = document(text, file)?;
    let mut r = Reader {
        file: file.to_path_buf(),
        spans: Spans::new(text),
        problems: Vec::new(),
    };
    let tables = r.top_level(&top);
    let name = r.name(&top);
    let (length, angle) = r.units(&top);
    let blade = r.blade(&top, length);
    let read = r.station_rows(&top, (length, angle), blade.section.is_some(), dir);
    let stations = match &read.whole {
        Some(whole) => {
            let rules = Rules {
                default_section: blade.section.as_deref(),
                missing_section_hint: read.section_hint,
                whole,
                tolerance: blade.tolerance.clone(),
            };
            validate(&read.rows, &rules, &mut r.problems)
        }
        None => Vec::new(),
    };
    if let Some(min_te) = &blade.min_te {
        r.min_te_fits_chords(min_te, &stations);
    }
    if !r.problems.is_empty() {
        super::rows::sort(&mut r.problems);
        return Err(DesignError {
            problems: r.problems,
        });
    }
    Ok(Design {
        name: name.unwrap_or_else(|| super::stem(file)),
        source,
        stations,
        blade: blade.options,
        length_to_mm: length.to_mm(),
        tables,
        columns: read.columns,
    })
}
