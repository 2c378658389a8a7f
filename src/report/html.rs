//! The self-contained HTML report: tables plus the pictures as inline SVG. No scripts,
//! no external files.

use std::fmt::Write;

use super::build::Pictures;
use super::model::Report;
use crate::svg::escape;

fn num(v: f64) -> String {
    if !v.is_finite() {
        "-".into()
    } else if v != 0.0 && (v.abs() >= 1e5 || v.abs() < 1e-3) {
        format!("{v:.4e}")
    } else {
        format!("{v:.3}")
    }
}

/// The HTML document.
pub fn html(report: &Report, pictures: &Pictures) -> String {
    let mut h = String::new();
    let name = escape(&report.name);
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>{name}: spanwright report</title>\n<style>\n\
         body {{ font-family: sans-serif; max-width: 960px; margin: 2em auto; color: #222; }}\n\
         table {{ border-collapse: collapse; margin: 1em 0; font-size: 0.9em; }}\n\
         th, td {{ border: 1px solid #ccc; padding: 0.2em 0.5em; text-align: right; }}\n\
         th {{ background: #f0f0f0; }}\n\
         .caution {{ border: 2px solid #c0392b; background: #fff4f2; padding: 0.5em 1em; }}\n\
         .fail {{ color: #c0392b; font-weight: bold; }} .pass {{ color: #2e8b57; font-weight: bold; }}\n\
         </style>\n</head>\n<body>\n<h1>{name}</h1>\n"
    );
    if let Some(src) = &report.source {
        let _ = writeln!(h, "<p>Input: <code>{}</code></p>", escape(src));
    }
    let _ = writeln!(
        h,
        "<p>Written by {}. Units: {} {} {} {} {}.</p>",
        escape(&report.generator),
        report.units.length,
        report.units.mass,
        report.units.force,
        report.units.stress,
        report.units.angle
    );
    h.push_str("<div class=\"caution\"><h2>Cautions</h2><ul>\n");
    for c in &report.cautions {
        let _ = writeln!(h, "<li>{}</li>", escape(c));
    }
    h.push_str("</ul></div>\n");
    let m = &report.material;
    let _ = writeln!(
        h,
        "<h2>Material and fill</h2><p>{}: density {} g/cm3, strength {} MPa, E = {} MPa ({}). \
         Walls {} mm, infill {:.0} %: shell volume taken as surface area x wall, capped at the \
         full volume; material spread uniformly.</p>",
        escape(&m.name),
        m.density,
        m.strength,
        m.modulus,
        escape(&m.note),
        report.fill.wall,
        report.fill.infill * 100.0
    );
    h.push_str("<h2>Mass properties</h2>\n<table><tr><th>part</th><th>triangles</th><th>volume mm3</th><th>area mm2</th><th>fill</th><th>mass g</th><th>centre of mass mm</th><th>principal moments g mm2</th><th>I about rotor axis g mm2</th><th>size mm</th></tr>\n");
    for p in &report.parts {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{:.3}</td><td>{}</td><td>({}, {}, {})</td><td>{}, {}, {}</td><td>{}</td><td>{} x {} x {}</td></tr>",
            escape(&p.name),
            p.triangles,
            num(p.volume),
            num(p.area),
            p.fill_fraction,
            num(p.mass),
            num(p.centroid[0]),
            num(p.centroid[1]),
            num(p.centroid[2]),
            num(p.principal_moments[0]),
            num(p.principal_moments[1]),
            num(p.principal_moments[2]),
            num(p.inertia_rotor_axis),
            num(p.bbox_max[0] - p.bbox_min[0]),
            num(p.bbox_max[1] - p.bbox_min[1]),
            num(p.bbox_max[2] - p.bbox_min[2]),
        );
    }
    h.push_str("</table>\n");
    if let Some(b) = &report.balance {
        let _ = writeln!(
            h,
            "<h2>Balance</h2><p>Total mass {} g; centre of mass {} mm from the rotor axis: static \
             imbalance {} g mm. Heaviest part {} minus lightest part {}: {} g. Balance the real \
             rotor; printed parts vary.</p>",
            num(b.total_mass),
            num(b.offset),
            num(b.imbalance),
            b.heaviest,
            b.lightest,
            num(b.mass_spread)
        );
    }
    if let Some(seg) = &report.segments {
        segments_html(&mut h, seg);
    }
    h.push_str("<h2>Pictures</h2>\n");
    for svg in [
        pictures.planform.as_deref(),
        Some(pictures.sections.as_str()),
        Some(pictures.three_view.as_str()),
        pictures.stress.as_deref(),
    ]
    .into_iter()
    .flatten()
    {
        let _ = writeln!(h, "<figure>\n{svg}</figure>");
    }
    h.push_str("<h2>Section properties</h2>\n<p>Second moments about the centroid; the polar moment Ixx + Iyy overestimates the torsional stiffness of thin closed sections (an estimate).</p>\n<table><tr><th>r mm</th><th>loops</th><th>area mm2</th><th>cx mm</th><th>cy mm</th><th>Ixx mm4</th><th>Iyy mm4</th><th>Ixy mm4</th><th>I1 mm4</th><th>I2 mm4</th><th>angle deg</th><th>polar mm4</th></tr>\n");
    for s in &report.sections {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{:.2}</td><td>{}</td></tr>",
            num(s.radius), s.loops, num(s.area), num(s.cx), num(s.cy), num(s.ixx), num(s.iyy),
            num(s.ixy), num(s.i1), num(s.i2), s.angle, num(s.polar)
        );
    }
    h.push_str("</table>\n");
    if let Some(t) = &report.stress {
        let verdict = if t.passes {
            "<span class=\"pass\">reaches</span>"
        } else {
            "<span class=\"fail\">DOES NOT reach</span>"
        };
        let _ = writeln!(
            h,
            "<h2>Stress estimate</h2><p>At {} rpm and {} m/s: thrust {} N per blade, mass {} g, \
             smallest safety factor {} at r = {} mm, which {verdict} the required {}. Tip \
             deflection {} mm. This is an estimate, not a certification.</p>\n<h3>Assumptions</h3><ul>",
            t.load.rpm,
            t.load.wind,
            num(t.thrust_per_blade),
            num(t.mass),
            num(t.min_safety_factor),
            num(t.critical_radius),
            t.load.safety_factor,
            num(t.tip_deflection)
        );
        for a in &t.assumptions {
            let _ = writeln!(h, "<li>{}</li>", escape(a));
        }
        h.push_str("</ul>\n<table><tr><th>r mm</th><th>area mm2</th><th>fill</th><th>centrifugal N</th><th>centrifugal MPa</th><th>moment N mm</th><th>tension MPa</th><th>compression MPa</th><th>safety factor</th><th>deflection mm</th></tr>\n");
        let step = (t.rows.len() / 25).max(1);
        for (i, r) in t.rows.iter().enumerate() {
            if i % step != 0 && i + 1 != t.rows.len() {
                continue;
            }
            let _ = writeln!(
                h,
                "<tr><td>{}</td><td>{}</td><td>{:.3}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                num(r.section.radius), num(r.section.area), r.fill, num(r.centrifugal_force),
                num(r.centrifugal_stress), num(r.bending_moment), num(r.max_tension),
                num(r.max_compression), num(r.safety_factor), num(r.deflection)
            );
        }
        h.push_str("</table>\n");
    }
    h.push_str("</body>\n</html>\n");
    h
}

/// The segments of a split blade: masses, joints and their cautions.
fn segments_html(h: &mut String, seg: &super::joints::SegmentsSummary) {
    h.push_str("<h2>Segments and joints</h2>\n<div class=\"caution\"><ul>\n");
    for c in &seg.cautions {
        let _ = writeln!(h, "<li>{}</li>", escape(c));
    }
    h.push_str("</ul></div>\n<table><tr><th>segment</th><th>volume mm3</th><th>mass g</th></tr>\n");
    for p in &seg.segments {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td></tr>",
            escape(&p.name),
            num(p.volume),
            num(p.mass)
        );
    }
    h.push_str("</table>\n");
    if let Some([d, l]) = seg.rod {
        let _ = writeln!(
            h,
            "<p>Rod: {} mm diameter, cut to {} mm.</p>",
            num(d),
            num(l)
        );
    }
    h.push_str("<table><tr><th>joint</th><th>r mm</th><th>gross area mm2</th><th>net area mm2</th><th>holes</th><th>net Ixx mm4</th><th>force N</th><th>moment N mm</th><th>tension MPa</th><th>compression MPa</th><th>safety factor</th></tr>\n");
    for j in &seg.joints {
        let (f, m, t, c, sf) = match &j.stress {
            Some(s) => (
                num(s.centrifugal_force),
                num(s.bending_moment),
                num(s.max_tension),
                num(s.max_compression),
                num(s.safety_factor),
            ),
            None => ("-".into(), "-".into(), "-".into(), "-".into(), "-".into()),
        };
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{f}</td><td>{m}</td><td>{t}</td><td>{c}</td><td>{sf}</td></tr>",
            j.joint,
            num(j.radius),
            num(j.gross.area),
            num(j.net.area),
            j.holes,
            num(j.net.ixx)
        );
    }
    h.push_str("</table>\n");
}
