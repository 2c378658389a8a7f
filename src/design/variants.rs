//! Variants: several designs from one design file, built in one run.
//!
//! A design file may name variants, each a `[[variant]]` entry with a `name` and what it
//! changes; the design as written is the common ground. Every variant is a whole design,
//! validated as the design file is (by the same reader), and its problems name the
//! variant and the key:
//!
//! ```toml
//! [[variant]]
//! name = "cw"
//! blade.rotation = "cw"        # any key of the design's tables, dotted
//!
//! [[variant]]
//! name = "long"
//! tip-radius = 330             # the span stretched; root and hub unchanged
//!
//! [[variant]]
//! name = "thin"
//! section = "naca4409"         # every station's section
//! rotor.hub.socket-clearance = 0.4
//! ```
//!
//! | key | type | meaning |
//! |-----|------|---------|
//! | `name` | string, required | names the variant's folder and its design (`<design>-<name>`); letters, digits, `-`, `_`, `.`; unique |
//! | `<table>.<key>` | any | replaces that key of the design: `blade.rotation`, `blade.stacking`, `rotor.blades`, `root.shank-diameter`, `printer.volume`, ... (lengths in the file's unit); a table the design lacks is added |
//! | `tip-radius` | number, length unit | the last station moves to this radius and the stations between the first and the last are spread in proportion (`r' = r0 + (r - r0) (R' - r0) / (R - r0)`); chords, twist and the root stay |
//! | `scale` | number, > 0 and <= 100 | every station's radius, chord, sweep and prebend times this (the blade alone: `[root]`, `[rotor]` and the other tables keep their sizes, so with a root the root face moves with the first station) |
//! | `section` | string | every station's section (also the stations of a CSV table) |
//!
//! `station`, `stations`, `units` and `variant` cannot be changed by a variant. Problems
//! found in a variant read `file:line: variant[2].blade.rotation: variant "cw": ...`,
//! the line being the variant's entry; problems a variant causes elsewhere name the
//! variant and the key where they show.
//!
//! [`variants`] expands a loaded [`Design`] (it reads its TOML file again);
//! [`expand_str`] expands design text.

use std::path::{Path, PathBuf};

use toml::{Table, Value};

use super::error::{DesignError, Loc, Problem};
use super::spans::{Seg, Spans};
use super::{suggest, toml_file, Design, NO_FILE};

/// The top-level key holding the variants.
pub const KEY: &str = "variant";

/// Keys of a variant entry other than table overrides.
const OWN: [&str; 4] = ["name", "tip-radius", "scale", "section"];
/// Keys a variant may not change.
const FIXED: [&str; 4] = ["station", "stations", "units", KEY];
/// Largest accepted `scale`.
const MAX_SCALE: f64 = 100.0;

/// One variant: its name and its whole design.
#[derive(Debug, Clone, PartialEq)]
pub struct Variant {
    /// The variant's name (its folder).
    pub name: String,
    /// The design with the variant's changes, named `<design>-<variant>`.
    pub design: Design,
}

/// The variants of a loaded design, in file order; empty when it names none.
///
/// # Errors
/// Every problem of every variant at once ([`DesignError`]); a design given as text
/// without a file cannot be expanded here (use [`expand_str`]).
pub fn variants(design: &Design) -> Result<Vec<Variant>, DesignError> {
    if !design.tables.contains_key(KEY) {
        return Ok(Vec::new());
    }
    let Some(path) = design.source.as_deref() else {
        return Err(DesignError::one(
            Problem::new(NO_FILE, "the design's variants need its file")
                .key(KEY)
                .hint("expand design text with design::variants::expand_str"),
        ));
    };
    let bytes = std::fs::read(path).map_err(|e| {
        DesignError::one(
            Problem::new(path, format!("cannot read the file again: {e}"))
                .hint("check the path and the file's permissions"),
        )
    })?;
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(&bytes);
    let text = String::from_utf8_lossy(bytes);
    expand_str(&text, Some(path))
}

/// The variants of design text (see the module docs); `source` labels messages and
/// locates files named by the design, as in [`super::parse_toml_str`].
///
/// # Errors
/// Every problem of every variant at once.
pub fn expand_str(text: &str, source: Option<&Path>) -> Result<Vec<Variant>, DesignError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let file = source.unwrap_or(Path::new(NO_FILE));
    let dir = source.and_then(Path::parent).unwrap_or(Path::new(""));
    let top: Table = toml::from_str(text).map_err(|e| {
        DesignError::one(Problem::new(
            file,
            format!("not valid TOML: {}", e.message()),
        ))
    })?;
    let Some(list) = top.get(KEY) else {
        return Ok(Vec::new());
    };
    let ctx = Context {
        file,
        dir,
        source: source.map(Path::to_path_buf),
        spans: Spans::new(text),
    };
    let mut problems = Vec::new();
    // Entries with problems of their own are left out; the others are still read, so
    // every problem of every variant is reported at once.
    let entries = ctx.entries(list, &top, &mut problems);
    let mut base = top.clone();
    base.remove(KEY);
    let mut out = Vec::with_capacity(entries.len());
    for entry in &entries {
        match ctx.build(&base, entry) {
            Ok(design) => out.push(Variant {
                name: entry.name.clone(),
                design,
            }),
            Err(mut e) => problems.append(&mut e.problems),
        }
    }
    if problems.is_empty() {
        Ok(out)
    } else {
        super::rows::sort(&mut problems);
        Err(DesignError { problems })
    }
}

/// A checked `[[variant]]` entry.
struct Entry {
    /// Index in the file, from 0.
    index: usize,
    name: String,
    tip_radius: Option<f64>,
    scale: Option<f64>,
    section: Option<String>,
    /// The table overrides (everything but the own keys).
    overrides: Table,
}

impl Entry {
    /// Dotted paths of every overridden value (`blade.rotation`, `rotor.hub.bore`).
    fn paths(&self) -> Vec<String> {
        fn walk(prefix: &str, t: &Table, out: &mut Vec<String>) {
            for (k, v) in t {
                let p = if prefix.is_empty() {
                    k.clone()
                } else {
                    format!("{prefix}.{k}")
                };
                match v {
                    Value::Table(inner) if !inner.is_empty() => walk(&p, inner, out),
                    _ => out.push(p),
                }
            }
        }
        let mut out = Vec::new();
        walk("", &self.overrides, &mut out);
        out
    }
}

struct Context<'a> {
    file: &'a Path,
    dir: &'a Path,
    source: Option<PathBuf>,
    spans: Spans<'a>,
}

impl Context<'_> {
    /// A problem at `variant[i]` + `key` of the file.
    fn at(&self, index: usize, key: &str, message: String) -> Problem {
        let key = if key.is_empty() {
            format!("{KEY}[{}]", index + 1)
        } else {
            format!("{KEY}[{}].{key}", index + 1)
        };
        Problem::new(self.file, message)
            .line(self.line(&key))
            .key(key)
    }

    /// Line of a rendered key path (`variant[2].blade.rotation`) in the file: the deepest
    /// part found.
    fn line(&self, key: &str) -> Option<usize> {
        let segs = segments(key);
        (1..=segs.len())
            .rev()
            .find_map(|n| self.spans.line(&segs[..n]))
    }

    /// Checks every entry; reports all problems.
    fn entries(&self, list: &Value, top: &Table, problems: &mut Vec<Problem>) -> Vec<Entry> {
        let items = match list {
            Value::Array(a) => a,
            _ => {
                problems.push(
                    Problem::new(self.file, "[variant] is a single table")
                        .line(self.line(KEY))
                        .key(KEY)
                        .hint("write [[variant]] (double brackets) before each variant"),
                );
                return Vec::new();
            }
        };
        let tables: Vec<&str> = top
            .iter()
            .filter(|(k, v)| v.is_table() && k.as_str() != KEY)
            .map(|(k, _)| k.as_str())
            .chain(["blade"])
            .collect();
        let mut seen: Vec<(String, usize)> = Vec::new();
        let mut out = Vec::new();
        for (index, item) in items.iter().enumerate() {
            let Value::Table(t) = item else {
                problems.push(self.at(index, "", "expected a table of changes".into()));
                continue;
            };
            let before = problems.len();
            let name = self.name(index, t, &seen, problems);
            let mut entry = Entry {
                index,
                name: name.clone().unwrap_or_default(),
                tip_radius: None,
                scale: None,
                section: None,
                overrides: Table::new(),
            };
            for (key, value) in t {
                self.key(&mut entry, key, value, &tables, problems);
            }
            if let Some(n) = name {
                seen.push((n, index));
            }
            if problems.len() == before {
                out.push(entry);
            } else if let Some(n) = t.get("name").and_then(Value::as_str) {
                for p in &mut problems[before..] {
                    p.message = format!("variant \"{n}\": {}", p.message);
                }
            }
        }
        out
    }

    /// The entry's name, checked (present, a usable folder name, unique).
    fn name(
        &self,
        index: usize,
        t: &Table,
        seen: &[(String, usize)],
        problems: &mut Vec<Problem>,
    ) -> Option<String> {
        let Some(v) = t.get("name") else {
            problems.push(
                self.at(index, "", "missing 'name'".into())
                    .hint("give every variant a name, e.g. name = \"cw\""),
            );
            return None;
        };
        let Value::String(n) = v else {
            problems.push(self.at(
                index,
                "name",
                format!("expected a string, found {}", v.type_str()),
            ));
            return None;
        };
        let usable = !n.is_empty()
            && n != "."
            && n != ".."
            && n.chars()
                .all(|c| c.is_ascii_alphanumeric() || matches!(c, '-' | '_' | '.'));
        if !usable {
            problems.push(
                self.at(index, "name", format!("name \"{n}\" cannot name a folder"))
                    .hint("use letters, digits, '-', '_' and '.'"),
            );
            return None;
        }
        if let Some((_, first)) = seen.iter().find(|(s, _)| s == n) {
            problems.push(
                self.at(
                    index,
                    "name",
                    format!("name \"{n}\" is also the name of variant[{}]", first + 1),
                )
                .hint("give each variant its own name"),
            );
            return None;
        }
        Some(n.clone())
    }

    /// One key of an entry: an own key, checked, or a table override.
    fn key(
        &self,
        entry: &mut Entry,
        key: &str,
        value: &Value,
        tables: &[&str],
        problems: &mut Vec<Problem>,
    ) {
        let i = entry.index;
        let number = |v: &Value| match v {
            Value::Float(f) => Some(*f),
            Value::Integer(n) => Some(*n as f64),
            _ => None,
        };
        match key {
            "name" => {}
            "scale" => match number(value) {
                Some(s) if s > 0.0 && s <= MAX_SCALE => entry.scale = Some(s),
                Some(s) => problems.push(
                    self.at(
                        i,
                        key,
                        format!("scale {s} must be more than 0 and at most {MAX_SCALE}"),
                    )
                    .hint("1.2 makes the blade 20 % larger"),
                ),
                None => problems.push(self.at(
                    i,
                    key,
                    format!("expected a number, found {}", value.type_str()),
                )),
            },
            "tip-radius" => match number(value) {
                Some(r) if r > 0.0 && r.is_finite() => entry.tip_radius = Some(r),
                Some(r) => problems.push(
                    self.at(i, key, format!("tip-radius {r} must be a positive length"))
                        .hint("give the new tip radius in the file's length unit"),
                ),
                None => problems.push(self.at(
                    i,
                    key,
                    format!("expected a number, found {}", value.type_str()),
                )),
            },
            "section" => match value {
                Value::String(s) if !s.trim().is_empty() => {
                    entry.section = Some(s.trim().to_string());
                }
                Value::String(_) => problems.push(
                    self.at(i, key, "the section name is empty".into())
                        .hint("give a designation such as \"naca4412\" or a section file"),
                ),
                other => problems.push(self.at(
                    i,
                    key,
                    format!("expected a string, found {}", other.type_str()),
                )),
            },
            k if FIXED.contains(&k) => problems.push(
                self.at(i, key, format!("a variant cannot change '{k}'"))
                    .hint("change the stations with tip-radius, scale or section"),
            ),
            k => match value {
                Value::Table(_) => {
                    if !tables.contains(&k) {
                        if let Some(near) = suggest::closest(k, tables) {
                            problems.push(
                                self.at(i, key, format!("unknown table '{k}'"))
                                    .hint(format!("did you mean '{near}'?")),
                            );
                            return;
                        }
                    }
                    entry.overrides.insert(k.to_string(), value.clone());
                }
                _ => {
                    let hint = format!(
                        "a variant takes {}, or <table>.<key> = value to change a key of the design (e.g. blade.{k} = ...)",
                        OWN.join(", ")
                    );
                    problems.push(self.at(i, key, format!("unknown key '{k}'")).hint(hint));
                }
            },
        }
    }

    /// The variant's design: the base with the overrides, read by the design reader,
    /// then the station changes.
    fn build(&self, base: &Table, entry: &Entry) -> Result<Design, DesignError> {
        let mut merged = base.clone();
        merge(&mut merged, &entry.overrides);
        let text = toml::to_string(&merged).map_err(|e| {
            DesignError::one(self.at(entry.index, "", format!("cannot be written out: {e}")))
        })?;
        let mut design = toml_file::parse(&text, self.file, self.dir, self.source.clone())
            .map_err(|e| self.relocate(e, entry))?;
        design.name = format!("{}-{}", design.name, entry.name);
        if merged.contains_key("station") {
            // Inline stations: their origins name this file's lines, not the merged text's.
            for (k, st) in design.stations.iter_mut().enumerate() {
                let key = format!("station[{}]", k + 1);
                st.origin = Loc::new(self.file, self.line(&key), Some(key)).origin();
            }
        }
        self.restation(&mut design, entry)?;
        Ok(design)
    }

    /// Problems of the merged design, placed in this file: those about an overridden key
    /// at the variant's entry, the others at their key's line; each names the variant.
    fn relocate(&self, e: DesignError, entry: &Entry) -> DesignError {
        let paths = entry.paths();
        let touches = |key: &str| {
            paths.iter().any(|p| {
                key == p || key.starts_with(&format!("{p}.")) || p.starts_with(&format!("{key}."))
            })
        };
        let problems = e
            .problems
            .into_iter()
            .map(|mut p| {
                let ours = p.file.as_path() == self.file;
                p.message = format!("variant \"{}\": {}", entry.name, p.message);
                match p.key.clone() {
                    Some(k) if ours && touches(&k) => {
                        let moved = self.at(entry.index, &k, p.message.clone());
                        p.line = moved.line;
                        p.key = moved.key;
                    }
                    Some(k) if ours => p.line = self.line(&k),
                    None if ours => p.line = self.line(&format!("{KEY}[{}]", entry.index + 1)),
                    _ => {}
                }
                p
            })
            .collect();
        DesignError { problems }
    }

    /// Applies `scale`, `tip-radius` and `section` to the stations (mm).
    fn restation(&self, design: &mut Design, entry: &Entry) -> Result<(), DesignError> {
        if let Some(s) = entry.scale {
            for st in &mut design.stations {
                st.radius *= s;
                st.chord *= s;
                st.sweep *= s;
                st.prebend *= s;
            }
        }
        if let Some(tip) = entry.tip_radius {
            let tip_mm = tip * design.length_to_mm;
            let (r0, r1) = match (design.stations.first(), design.stations.last()) {
                (Some(a), Some(b)) => (a.radius, b.radius),
                _ => return Ok(()),
            };
            if !(tip_mm > r0) {
                return Err(DesignError::one(
                    self.at(
                        entry.index,
                        "tip-radius",
                        format!(
                            "variant \"{}\": tip-radius {tip} is not beyond the first station (radius {} in the file's unit)",
                            entry.name,
                            r0 / design.length_to_mm
                        ),
                    )
                    .hint("give a tip radius larger than the first station's"),
                ));
            }
            let k = (tip_mm - r0) / (r1 - r0);
            for st in &mut design.stations {
                st.radius = r0 + (st.radius - r0) * k;
            }
            if let Some(last) = design.stations.last_mut() {
                last.radius = tip_mm;
            }
        }
        if let Some(section) = &entry.section {
            for st in &mut design.stations {
                st.section.clone_from(section);
            }
        }
        Ok(())
    }
}

/// Merges `over` into `into`: tables key by key, everything else replaced.
fn merge(into: &mut Table, over: &Table) {
    for (k, v) in over {
        match (into.get_mut(k), v) {
            (Some(Value::Table(a)), Value::Table(b)) => merge(a, b),
            _ => {
                into.insert(k.clone(), v.clone());
            }
        }
    }
}

/// A rendered key path (`variant[2].blade.rotation`, entries counted from 1) as segments.
fn segments(key: &str) -> Vec<Seg<'_>> {
    let mut out = Vec::new();
    for part in key.split('.') {
        match part.split_once('[') {
            Some((name, rest)) => {
                out.push(Seg::Key(name));
                if let Some(n) = rest.strip_suffix(']').and_then(|n| n.parse::<usize>().ok()) {
                    out.push(Seg::Index(n.saturating_sub(1)));
                }
            }
            None => out.push(Seg::Key(part)),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn key_paths_split_into_segments() {
        assert_eq!(
            segments("variant[2].blade.rotation"),
            vec![
                Seg::Key("variant"),
                Seg::Index(1),
                Seg::Key("blade"),
                Seg::Key("rotation")
            ]
        );
    }

    #[test]
    fn merge_replaces_leaves_and_keeps_the_rest() {
        let mut a: Table = toml::from_str("[rotor]\nblades = 3\nhub-radius = 20\n").unwrap();
        let b: Table = toml::from_str("[rotor]\nblades = 2\n").unwrap();
        merge(&mut a, &b);
        assert_eq!(a["rotor"]["blades"].as_integer(), Some(2));
        assert_eq!(a["rotor"]["hub-radius"].as_integer(), Some(20));
    }
}
