//! Station rows as read (from TOML or CSV), and their validation into [`Station`]s.
//!
//! Readers turn text into [`Row`]s, reporting syntax, type and unit problems; [`validate`]
//! then checks values and order, reporting every problem with the place it came from.
//! The order of the checks is the method:
//!
//! 1. the table's size (at least two stations, at most [`MAX_STATIONS`]);
//! 2. each row's values: radius (order, range), chord, twist, thickness, offsets, section;
//! 3. the span and the gaps between stations against the mesh tolerance.

use std::sync::Arc;

use super::error::{Loc, Problem};
use super::limits::{
    show_number, unit_slip_hint, MAX_LENGTH_MM, MAX_STATIONS, MIN_CHORD_TOLERANCES,
    MIN_GAP_TOLERANCES, MIN_SPAN_TOLERANCES,
};
use super::{Stacking, Station};

/// Thickness range accepted, percent of chord: thinner than 1 % is almost surely a
/// fraction written where percent was meant; thicker than 50 % is no airfoil.
pub(crate) const THICKNESS_PERCENT: (f64, f64) = (1.0, 50.0);

/// Largest twist magnitude accepted, degrees: beyond it the chord would face backwards.
pub(crate) const TWIST_LIMIT_DEG: f64 = 90.0;

/// One number as read: converted value, the value as written (with its unit) for
/// messages, and its place.
#[derive(Debug, Clone)]
pub(crate) struct Num {
    /// In mm, degrees or percent.
    pub value: f64,
    /// The number as written, in its unit.
    pub raw: f64,
    /// The unit it was written in (`mm`, `in`, `deg`, `%`, ...).
    pub unit: &'static str,
    /// As written, with the unit, e.g. `-3 in`.
    pub written: String,
    /// Why the unit is what it is, when that is not the millimetre default (e.g.
    /// `units = { length = "m" }`), for the unit-slip hint.
    pub said: Option<Arc<str>>,
    pub loc: Loc,
}

impl Num {
    pub fn new(raw: f64, factor: f64, unit: &'static str, loc: Loc) -> Self {
        Self {
            value: raw * factor,
            raw,
            unit,
            written: format!("{} {unit}", show_number(raw)),
            said: None,
            loc,
        }
    }

    /// Records where the unit came from.
    pub fn said(mut self, said: Option<Arc<str>>) -> Self {
        self.said = said;
        self
    }
}

/// One station as read. `None` fields were missing or unreadable; a required field that
/// is `None` has already been reported by the reader.
#[derive(Debug, Clone)]
pub(crate) struct Row {
    /// The whole row (CSV line) or entry (TOML `station[i]`).
    pub loc: Loc,
    pub radius: Option<Num>,
    pub chord: Option<Num>,
    pub twist: Option<Num>,
    pub section: Option<(String, Loc)>,
    /// Percent of chord.
    pub thickness: Option<Num>,
    pub sweep: Option<Num>,
    pub prebend: Option<Num>,
    /// A stacking override, already checked by the reader.
    pub stacking: Option<Stacking>,
    /// The reader already reported why this row has no section.
    pub section_reported: bool,
}

impl Row {
    /// An empty row at `loc`.
    pub fn at(loc: Loc) -> Self {
        Self {
            loc,
            radius: None,
            chord: None,
            twist: None,
            section: None,
            thickness: None,
            sweep: None,
            prebend: None,
            stacking: None,
            section_reported: false,
        }
    }
}

/// What the validation needs besides the rows.
pub(crate) struct Rules<'a> {
    /// Section for rows without one.
    pub default_section: Option<&'a str>,
    /// Where a default section could come from, for the message when there is none.
    pub missing_section_hint: &'a str,
    /// Locates problems of the table as a whole (too few stations).
    pub whole: &'a Loc,
    /// The mesh tolerance in mm and how it was set (e.g. `blade.tolerance = 0.01 mm`),
    /// when it is known (`None` when the file's own value was refused).
    pub tolerance: Option<(f64, String)>,
}

/// Where a row is, shortly, for cross references in messages: `line 7` or `station[2]`.
fn short(loc: &Loc) -> String {
    match (&loc.key, loc.line) {
        (Some(k), _) => k.clone(),
        (None, Some(l)) => format!("line {l}"),
        (None, None) => "the previous station".into(),
    }
}

fn finite(n: &Num, name: &str, problems: &mut Vec<Problem>) -> bool {
    if n.value.is_finite() {
        return true;
    }
    problems.push(
        n.loc
            .problem(format!("{name} {} is not a finite number", n.written))
            .hint("give a plain number such as 120.5"),
    );
    false
}

/// A length's magnitude against [`MAX_LENGTH_MM`], with the unit-slip hint when the same
/// number in millimetres would do.
fn within_length_limit(n: &Num, name: &str, problems: &mut Vec<Problem>) -> bool {
    if n.value.abs() <= MAX_LENGTH_MM {
        return true;
    }
    let slip = n
        .said
        .as_deref()
        .and_then(|said| unit_slip_hint(n.raw, n.unit, said));
    let hint = slip.unwrap_or_else(|| {
        "spanwright builds rotors up to 10 m radius; check the value and the length unit"
            .to_string()
    });
    let in_mm = if n.unit == "mm" {
        String::new()
    } else {
        format!(" ({} mm)", show_number(n.value))
    };
    problems.push(
        n.loc
            .problem(format!(
                "{name} {}{in_mm} is more than the largest length spanwright accepts, \
                 {MAX_LENGTH_MM:.0} mm (10 m)",
                n.written
            ))
            .hint(hint),
    );
    false
}

/// Checks the rows and builds stations; problems go to `problems`.
pub(crate) fn validate(rows: &[Row], rules: &Rules, problems: &mut Vec<Problem>) -> Vec<Station> {
    if !table_size(rows, rules, problems) {
        return Vec::new();
    }
    let mut stations = Vec::with_capacity(rows.len());
    let mut prev: Option<&Num> = None;
    for row in rows {
        let mut ok = radius_ok(row, &mut prev, problems);
        ok &= chord_ok(row, rules, problems);
        ok &= twist_ok(row, problems);
        ok &= thickness_ok(row, problems);
        ok &= offsets_ok(row, problems);
        let section = section_of(row, rules, problems);
        if let (true, Some(section)) = (ok, section) {
            stations.push(station(row, section));
        }
    }
    if stations.len() == rows.len() {
        span_ok(&stations, rows, rules, problems);
    }
    stations
}

/// Step 1: at least two stations and at most [`MAX_STATIONS`]; false when the rows are
/// too many to check one by one.
fn table_size(rows: &[Row], rules: &Rules, problems: &mut Vec<Problem>) -> bool {
    if rows.len() < 2 {
        problems.push(
            rules
                .whole
                .problem(format!(
                    "{} station{} given; at least two are needed",
                    rows.len(),
                    if rows.len() == 1 { "" } else { "s" }
                ))
                .hint("give at least a root and a tip station"),
        );
    }
    if rows.len() > MAX_STATIONS {
        problems.push(
            rules
                .whole
                .problem(format!(
                    "the table has more than the {MAX_STATIONS} stations spanwright accepts"
                ))
                .hint(
                    "a few dozen stations describe any blade; keep every tenth row, or fewer, \
                     the spanwise law fills in between",
                ),
        );
        return false;
    }
    true
}

/// Step 2a: the radius is finite, not negative, within the length limit, and larger
/// than the largest radius before it (`prev`, updated).
fn radius_ok<'a>(row: &'a Row, prev: &mut Option<&'a Num>, problems: &mut Vec<Problem>) -> bool {
    let Some(r) = &row.radius else {
        return false;
    };
    if !finite(r, "radius", problems) {
        return false;
    }
    let mut ok = within_length_limit(r, "radius", problems);
    if r.value < 0.0 {
        ok = false;
        problems.push(
            r.loc
                .problem(format!("radius {} is negative", r.written))
                .hint("the radius is the distance from the rotor axis: use 0 or more"),
        );
    }
    if let Some(p) = prev {
        if r.value == p.value {
            ok = false;
            problems.push(
                r.loc
                    .problem(format!(
                        "radius {} repeats the radius of {}",
                        r.written,
                        short(&p.loc)
                    ))
                    .hint("each station needs its own radius: remove or merge the duplicate"),
            );
        } else if r.value < p.value {
            ok = false;
            problems.push(
                r.loc
                    .problem(format!(
                        "radius {} is smaller than {} at {}",
                        r.written,
                        p.written,
                        short(&p.loc)
                    ))
                    .hint("list stations from root to tip, radius strictly increasing"),
            );
        }
    }
    // Compare the next row with the largest radius so far, so one stray row gives one
    // message, not two.
    if prev.is_none_or(|p| r.value > p.value) {
        *prev = Some(r);
    }
    ok
}

/// Step 2b: the chord is finite, positive, within the length limit and at least
/// [`MIN_CHORD_TOLERANCES`] tolerances.
fn chord_ok(row: &Row, rules: &Rules, problems: &mut Vec<Problem>) -> bool {
    let Some(c) = &row.chord else {
        return false;
    };
    if !finite(c, "chord", problems) {
        return false;
    }
    if c.value <= 0.0 {
        problems.push(
            c.loc
                .problem(format!("chord {} must be greater than zero", c.written))
                .hint("give the chord length of this station"),
        );
        return false;
    }
    if !within_length_limit(c, "chord", problems) {
        return false;
    }
    if let Some((tol, set)) = &rules.tolerance {
        let least = MIN_CHORD_TOLERANCES * tol;
        if c.value < least {
            problems.push(
                c.loc
                    .problem(format!(
                        "chord {} is shorter than {MIN_CHORD_TOLERANCES} times the mesh \
                         tolerance ({set}), {} mm: a section this small cannot keep its \
                         two sides apart in the mesh",
                        c.written,
                        show_number(least)
                    ))
                    .hint(format!(
                        "check the chord and its unit, or make the tolerance at most {} mm",
                        show_number(c.value / MIN_CHORD_TOLERANCES)
                    )),
            );
            return false;
        }
    }
    true
}

/// Step 2c: the twist is finite and within ±[`TWIST_LIMIT_DEG`].
fn twist_ok(row: &Row, problems: &mut Vec<Problem>) -> bool {
    let Some(t) = &row.twist else {
        return false;
    };
    if !finite(t, "twist", problems) {
        return false;
    }
    if t.value.abs() > TWIST_LIMIT_DEG {
        problems.push(
            t.loc
                .problem(format!(
                    "twist {} is outside -{TWIST_LIMIT_DEG}..{TWIST_LIMIT_DEG} degrees",
                    t.written
                ))
                .hint("check the angle unit: deg or rad"),
        );
        return false;
    }
    true
}

/// Step 2d: a relative thickness, when given, within [`THICKNESS_PERCENT`].
fn thickness_ok(row: &Row, problems: &mut Vec<Problem>) -> bool {
    let Some(t) = &row.thickness else {
        return true;
    };
    let (lo, hi) = THICKNESS_PERCENT;
    if !finite(t, "thickness", problems) {
        return false;
    }
    if t.value < lo || t.value > hi {
        let hint = if t.value > 0.0 && t.value < lo {
            "thickness is in percent of chord: write 12 for 12 %, or mark a CSV column \
             'thickness [fraction]'"
        } else {
            "give the relative thickness in percent of chord, e.g. 12"
        };
        problems.push(
            t.loc
                .problem(format!(
                    "thickness {} is outside {lo}..{hi} % of chord",
                    t.written
                ))
                .hint(hint),
        );
        return false;
    }
    true
}

/// Step 2e: sweep and prebend, when given, finite and within the length limit.
fn offsets_ok(row: &Row, problems: &mut Vec<Problem>) -> bool {
    let mut ok = true;
    for (n, name) in [(&row.sweep, "sweep"), (&row.prebend, "prebend")] {
        if let Some(n) = n {
            ok &= finite(n, name, problems) && within_length_limit(n, name, problems);
        }
    }
    ok
}

/// Step 2f: the row's section, or the default; reports a missing one.
fn section_of<'a>(row: &'a Row, rules: &Rules<'a>, problems: &mut Vec<Problem>) -> Option<&'a str> {
    let section = match &row.section {
        Some((s, _)) => Some(s.as_str()),
        None => rules.default_section,
    };
    if section.is_none() && !row.section_reported {
        problems.push(
            row.loc
                .problem("no section for this station")
                .hint(rules.missing_section_hint),
        );
    }
    section
}

/// The station of a row whose values all passed.
fn station(row: &Row, section: &str) -> Station {
    let value = |n: &Option<Num>| n.as_ref().map_or(0.0, |n| n.value);
    Station {
        radius: value(&row.radius),
        chord: value(&row.chord),
        twist: value(&row.twist),
        section: section.to_string(),
        thickness: row.thickness.as_ref().map(|n| n.value / 100.0),
        sweep: value(&row.sweep),
        prebend: value(&row.prebend),
        stacking: row.stacking,
        origin: row.loc.origin(),
    }
}

/// Step 3: the span (first to last station) at least [`MIN_SPAN_TOLERANCES`] tolerances,
/// neighbouring stations at least [`MIN_GAP_TOLERANCES`] apart. Called with every row
/// valid (`stations[i]` is `rows[i]`).
fn span_ok(stations: &[Station], rows: &[Row], rules: &Rules, problems: &mut Vec<Problem>) {
    let (Some((tol, set)), Some(first), Some(last)) =
        (&rules.tolerance, stations.first(), stations.last())
    else {
        return;
    };
    let span = last.radius - first.radius;
    let least = MIN_SPAN_TOLERANCES * tol;
    if span < least {
        let at = rows.last().and_then(|r| r.radius.as_ref()).map(|n| &n.loc);
        problems.push(
            at.unwrap_or(rules.whole)
                .problem(format!(
                    "the blade spans only {} mm from the first to the last station, less \
                     than {MIN_SPAN_TOLERANCES} times the mesh tolerance ({set}), {} mm: \
                     the mesh cannot make a solid of it",
                    show_number(span),
                    show_number(least)
                ))
                .hint("check the radii and their unit: the stations run from root to tip"),
        );
        return;
    }
    let least_gap = MIN_GAP_TOLERANCES * tol;
    for (w, r) in stations.windows(2).zip(rows.iter().skip(1)) {
        let gap = w[1].radius - w[0].radius;
        if gap < least_gap {
            let at = r.radius.as_ref().map_or(&r.loc, |n| &n.loc);
            problems.push(
                at.problem(format!(
                    "this station is only {} mm outboard of the one before, closer than the \
                     mesh tolerance ({set}): the mesh cannot tell the two apart",
                    show_number(gap)
                ))
                .hint("merge the two stations, or make the tolerance finer"),
            );
        }
    }
}

/// Orders problems by file (in order of first appearance) and line, keeping the order
/// of problems on the same line.
pub(crate) fn sort(problems: &mut [Problem]) {
    let mut files: Vec<std::path::PathBuf> = Vec::new();
    for p in problems.iter() {
        if !files.contains(&p.file) {
            files.push(p.file.clone());
        }
    }
    problems.sort_by_key(|p| (files.iter().position(|f| *f == p.file), p.line.unwrap_or(0)));
}
