//! Station rows as read (from TOML or CSV), and their validation into [`Station`]s.
//!
//! Readers turn text into [`Row`]s, reporting syntax, type and unit problems; [`validate`]
//! then checks values and order, reporting every problem with the place it came from.

use super::error::{Loc, Problem};
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
    /// As written, with the unit, e.g. `-3 in`.
    pub written: String,
    pub loc: Loc,
}

impl Num {
    pub fn new(raw: f64, factor: f64, unit: &str, loc: Loc) -> Self {
        Self {
            value: raw * factor,
            written: format!("{raw} {unit}"),
            loc,
        }
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

/// Checks the rows and builds stations; problems go to `problems`.
///
/// `default_section` is used for rows without a section; `missing_section_hint` tells the
/// user where a default could come from. `whole` locates problems of the table as a whole
/// (too few stations).
pub(crate) fn validate(
    rows: &[Row],
    default_section: Option<&str>,
    missing_section_hint: &str,
    whole: &Loc,
    problems: &mut Vec<Problem>,
) -> Vec<Station> {
    let mut stations = Vec::with_capacity(rows.len());
    let mut prev: Option<(f64, &Num)> = None;
    for row in rows {
        let mut ok = true;
        if let Some(r) = &row.radius {
            if finite(r, "radius", problems) {
                if r.value < 0.0 {
                    ok = false;
                    problems.push(
                        r.loc
                            .problem(format!("radius {} is negative", r.written))
                            .hint("the radius is the distance from the rotor axis: use 0 or more"),
                    );
                }
                if let Some((pv, pn)) = prev {
                    if r.value == pv {
                        ok = false;
                        problems.push(
                            r.loc
                                .problem(format!(
                                    "radius {} repeats the radius of {}",
                                    r.written,
                                    short(&pn.loc)
                                ))
                                .hint("each station needs its own radius: remove or merge the duplicate"),
                        );
                    } else if r.value < pv {
                        ok = false;
                        problems.push(
                            r.loc
                                .problem(format!(
                                    "radius {} is smaller than {} at {}",
                                    r.written,
                                    pn.written,
                                    short(&pn.loc)
                                ))
                                .hint("list stations from root to tip, radius strictly increasing"),
                        );
                    }
                }
                // Compare the next row with the largest radius so far, so one stray row
                // gives one message, not two.
                if prev.is_none_or(|(pv, _)| r.value > pv) {
                    prev = Some((r.value, r));
                }
            } else {
                ok = false;
            }
        } else {
            ok = false;
        }
        if let Some(c) = &row.chord {
            if !finite(c, "chord", problems) {
                ok = false;
            } else if c.value <= 0.0 {
                ok = false;
                problems.push(
                    c.loc
                        .problem(format!("chord {} must be greater than zero", c.written))
                        .hint("give the chord length of this station"),
                );
            }
        } else {
            ok = false;
        }
        if let Some(t) = &row.twist {
            if !finite(t, "twist", problems) {
                ok = false;
            } else if t.value.abs() > TWIST_LIMIT_DEG {
                ok = false;
                problems.push(
                    t.loc
                        .problem(format!(
                            "twist {} is outside -{TWIST_LIMIT_DEG}..{TWIST_LIMIT_DEG} degrees",
                            t.written
                        ))
                        .hint("check the angle unit: deg or rad"),
                );
            }
        } else {
            ok = false;
        }
        if let Some(t) = &row.thickness {
            let (lo, hi) = THICKNESS_PERCENT;
            if !finite(t, "thickness", problems) {
                ok = false;
            } else if t.value < lo || t.value > hi {
                ok = false;
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
            }
        }
        for (n, name) in [(&row.sweep, "sweep"), (&row.prebend, "prebend")] {
            if let Some(n) = n {
                ok &= finite(n, name, problems);
            }
        }
        let section = match &row.section {
            Some((s, _)) => Some(s.as_str()),
            None => default_section,
        };
        if section.is_none() {
            ok = false;
        }
        if section.is_none() && !row.section_reported {
            problems.push(
                row.loc
                    .problem("no section for this station")
                    .hint(missing_section_hint),
            );
        }
        if ok {
            stations.push(Station {
                radius: row.radius.as_ref().map_or(0.0, |n| n.value),
                chord: row.chord.as_ref().map_or(0.0, |n| n.value),
                twist: row.twist.as_ref().map_or(0.0, |n| n.value),
                section: section.unwrap_or_default().to_string(),
                thickness: row.thickness.as_ref().map(|n| n.value / 100.0),
                sweep: row.sweep.as_ref().map_or(0.0, |n| n.value),
                prebend: row.prebend.as_ref().map_or(0.0, |n| n.value),
                stacking: row.stacking,
                origin: row.loc.origin(),
            });
        }
    }
    if rows.len() < 2 {
        problems.push(
            whole
                .problem(format!(
                    "{} station{} given; at least two are needed",
                    rows.len(),
                    if rows.len() == 1 { "" } else { "s" }
                ))
                .hint("give at least a root and a tip station"),
        );
    }
    stations
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
