//! Reading a TOML design file (see the key table in [`super`]).

use std::path::{Path, PathBuf};

use toml::{Table, Value};

use super::csv_table::{self, Defaults};
use super::error::{DesignError, Loc, Problem};
use super::rows::{validate, Num, Row};
use super::spans::{line_of, render, Seg, Spans};
use super::suggest;
use super::units::{AngleUnit, LengthUnit};
use super::{BladeOptions, Design, Flow, Rotation, Stacking};

/// Top-level keys read here; any other top-level table is kept for later stages.
const TOP: [&str; 5] = ["name", "units", "blade", "station", "stations"];
/// Tables read here (a kept table with a name close to one of these is a typo).
const OWN_TABLES: [&str; 3] = ["units", "blade", "station"];
const UNIT_KEYS: [&str; 2] = ["length", "angle"];
const BLADE_KEYS: [&str; 7] = [
    "section",
    "stacking",
    "flow",
    "rotation",
    "points-per-side",
    "tolerance",
    "min-te-thickness",
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
/// Largest accepted `tolerance`, mm (it must also be more than 0).
pub(crate) const TOLERANCE_MAX_MM: f64 = 10.0;

/// How a value looks in a message: strings quoted, others as TOML writes them.
pub(crate) fn show(v: &Value) -> String {
    match v {
        Value::String(s) => format!("\"{s}\""),
        Value::Table(_) => "a table".into(),
        Value::Array(_) => "an array".into(),
        other => other.to_string(),
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
            format!("expected {expected}, found {} {}", v.type_str(), show(v)),
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
        unit: &str,
    ) -> Option<Num> {
        let raw = self.number(table, path, key)?;
        let p = [path, &[Seg::Key(key)]].concat();
        Some(Num::new(raw, factor, unit, self.loc(&p)))
    }

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

    /// Reads `[blade]`; returns the options and the default section.
    fn blade(&mut self, top: &Table) -> (BladeOptions, Option<String>) {
        let mut o = BladeOptions::default();
        let path = [Seg::Key("blade")];
        let Some(v) = top.get("blade") else {
            return (o, None);
        };
        let Value::Table(t) = v else {
            self.wrong_type(&path, "a table ([blade])", v);
            return (o, None);
        };
        self.keys(t, &path, &BLADE_KEYS);
        let key = |k: &'static str| [Seg::Key("blade"), Seg::Key(k)];
        let section = self
            .string(t, &path, "section")
            .map(|s| s.trim().to_string());
        if section.as_deref().is_some_and(|s| s.trim().is_empty()) {
            self.report(
                &key("section"),
                "the section name is empty".into(),
                Some("give a designation such as \"naca4412\" or a section file".into()),
            );
        }
        if let Some(stacking) = self.stacking(t, &path) {
            o.stacking = stacking;
        }
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
        if let Some(v) = t.get("points-per-side") {
            let (lo, hi) = POINTS_PER_SIDE;
            match v {
                Value::Integer(n) if (lo..=hi).contains(n) => {
                    o.points_per_side = usize::try_from(*n).unwrap_or(o.points_per_side);
                }
                Value::Integer(n) => self.report(
                    &key("points-per-side"),
                    format!("points-per-side {n} is outside {lo}..{hi}"),
                    Some("120 is the default and enough for most blades".into()),
                ),
                other => self.wrong_type(&key("points-per-side"), "a whole number", other),
            }
        }
        if let Some(f) = self.number(t, &path, "tolerance") {
            let hi = TOLERANCE_MAX_MM;
            if !(f > 0.0 && f <= hi) {
                self.report(
                    &key("tolerance"),
                    format!("tolerance {f} mm must be more than 0 and at most {hi} mm"),
                    Some("give the largest allowed mesh deviation in mm, e.g. 0.01".into()),
                );
            } else {
                o.tolerance = f;
            }
        }
        if let Some(f) = self.number(t, &path, "min-te-thickness") {
            if f.is_finite() && f >= 0.0 {
                o.min_te_thickness = Some(f);
            } else {
                self.report(
                    &key("min-te-thickness"),
                    format!("min-te-thickness {f} mm must be 0 or more"),
                    Some("give the thinnest printable trailing edge in mm, e.g. 0.4".into()),
                );
            }
        }
        (o, section.filter(|s| !s.trim().is_empty()))
    }

    /// Reads the inline `[[station]]` entries.
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
        let (lf, lu, af, au) = (length.to_mm(), length.name(), angle.to_deg(), angle.name());
        let mut rows = Vec::with_capacity(entries.len());
        for (i, entry) in entries.iter().enumerate() {
            let p = [Seg::Key("station"), Seg::Index(i)];
            let Value::Table(t) = entry else {
                self.wrong_type(&p, "a table of station values", entry);
                continue;
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
                if s.trim().is_empty() {
                    self.problems.push(
                        loc.problem("the section name is empty")
                            .hint("give a designation such as \"naca4412\" or a section file"),
                    );
                }
            }
            rows.push(Row {
                loc: self.loc(&p),
                radius: self.num(t, &p, "radius", lf, lu),
                chord: self.num(t, &p, "chord", lf, lu),
                twist: self.num(t, &p, "twist", af, au),
                section,
                thickness: self.num(t, &p, "thickness", 1.0, "%"),
                sweep: self.num(t, &p, "sweep", lf, lu),
                prebend: self.num(t, &p, "prebend", lf, lu),
                stacking: self.stacking(t, &p),
                section_reported: false,
            });
        }
        rows
    }
}

/// Reads a TOML design from `text`. `file` labels messages; relative paths in the file
/// (the station table) are resolved against `dir`.
pub(crate) fn parse(
    text: &str,
    file: &Path,
    dir: &Path,
    source: Option<PathBuf>,
) -> Result<Design, DesignError> {
    let top: Table = toml::from_str(text).map_err(|e| {
        let line = e.span().map(|s| line_of(text, s.start));
        DesignError::one(
            Problem::new(file, format!("not valid TOML: {}", e.message()))
                .line(line)
                .hint("see https://toml.io for the syntax"),
        )
    })?;
    let mut r = Reader {
        file: file.to_path_buf(),
        spans: Spans::new(text),
        problems: Vec::new(),
    };

    let mut tables = Table::new();
    for (key, v) in &top {
        if TOP.contains(&key.as_str()) {
            continue;
        }
        let tableish = match v {
            Value::Table(_) => true,
            Value::Array(a) => !a.is_empty() && a.iter().all(Value::is_table),
            _ => false,
        };
        if !tableish {
            r.report(
                &[Seg::Key(key)],
                format!("unknown key '{key}'"),
                Some(suggest::hint(key, &TOP)),
            );
        } else if let Some(own) = suggest::closest(key, &OWN_TABLES) {
            r.report(
                &[Seg::Key(key)],
                format!("unknown table [{key}]"),
                Some(format!("did you mean [{own}]?")),
            );
        } else {
            tables.insert(key.clone(), v.clone());
        }
    }

    let name = match r.string(&top, &[], "name") {
        Some(n)
            if n.trim().is_empty() || n.contains(['/', '\\']) || n.contains(char::is_control) =>
        {
            r.report(
                &[Seg::Key("name")],
                format!("name \"{n}\" cannot name output files"),
                Some("use letters, digits, '-' and '_'".into()),
            );
            None
        }
        other => other,
    };
    let (length, angle) = r.units(&top);
    let (blade, default_section) = r.blade(&top);

    let (rows, whole, section_hint) = match (top.get("station"), top.get("stations")) {
        (Some(_), Some(_)) => {
            r.report(
                &[Seg::Key("stations")],
                "both [[station]] entries and a stations file are given".into(),
                Some("keep one of them".into()),
            );
            (Vec::new(), None, "")
        }
        (Some(v), None) => {
            let rows = r.stations(v, length, angle);
            (
                rows,
                Some(r.loc(&[Seg::Key("station")])),
                "add section = \"...\" to this station or set section in [blade]",
            )
        }
        (None, Some(v)) => {
            let path = [Seg::Key("stations")];
            match v {
                Value::String(s) => {
                    let csv_path = dir.join(s);
                    match std::fs::read(&csv_path) {
                        Ok(bytes) => {
                            let defaults = Defaults { length, angle };
                            let rows = csv_table::read(
                                &bytes,
                                &csv_path,
                                defaults,
                                default_section.is_some(),
                                &mut r.problems,
                            );
                            (
                                rows,
                                Some(Loc::new(&csv_path, None, None)),
                                "add a 'section' column or set section in [blade]",
                            )
                        }
                        Err(e) => {
                            r.report(
                                &path,
                                format!("cannot read station table '{}': {e}", csv_path.display()),
                                Some("the path is relative to the design file's folder".into()),
                            );
                            (Vec::new(), None, "")
                        }
                    }
                }
                other => {
                    r.wrong_type(&path, "the name of a CSV station table", other);
                    (Vec::new(), None, "")
                }
            }
        }
        (None, None) => {
            r.problems.push(
                Problem::new(file, "no stations").hint(
                    "add [[station]] entries, or stations = \"table.csv\" naming a CSV table",
                ),
            );
            (Vec::new(), None, "")
        }
    };
    let stations = match &whole {
        Some(whole) => validate(
            &rows,
            default_section.as_deref(),
            section_hint,
            whole,
            &mut r.problems,
        ),
        None => Vec::new(),
    };
    if !r.problems.is_empty() {
        super::rows::sort(&mut r.problems);
        return Err(DesignError {
            problems: r.problems,
        });
    }
    let name = name.unwrap_or_else(|| super::stem(file));
    Ok(Design {
        name,
        source,
        stations,
        blade,
        length_to_mm: length.to_mm(),
        tables,
    })
}
