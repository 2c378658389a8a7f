//! The self-contained HTML report: tables, the pictures as inline SVG and the 3-D
//! preview as an inline PNG (`data:` URI). No scripts, no external files.
//!
//! Numbers follow the one convention of [`super::numbers`]: plain decimals, a fixed
//! number of decimals per unit, digits grouped in threes, units with superscripts.
//! `scripts/report-screenshot` opens the page in headless Chromium to look at it.

use std::fmt::Write;

use super::build::Pictures;
use super::datauri::data_uri;
use super::model::Report;
use super::numbers::{number, Decimals as D};
use crate::svg::escape;

/// The style sheet: a readable column, tables that scroll sideways on narrow screens
/// rather than squeezing their numbers, pictures that shrink with the page.
const STYLE: &str = "\
body { font-family: sans-serif; max-width: 960px; margin: 2em auto; padding: 0 1em; color: #222; }
table { border-collapse: collapse; margin: 1em 0; font-size: 0.9em; }
.scroll { overflow-x: auto; }
th, td { border: 1px solid #ccc; padding: 0.2em 0.5em; text-align: right; }
td { white-space: nowrap; }
th { background: #f0f0f0; font-weight: bold; }
td.name { text-align: left; }
.caution { border: 2px solid #c0392b; background: #fff4f2; padding: 0.5em 1em; }
.fail { color: #c0392b; font-weight: bold; } .pass { color: #2e8b57; font-weight: bold; }
figure { margin: 1.5em 0; }
figure svg, figure img { max-width: 100%; height: auto; }
figcaption { font-size: 0.9em; color: #555; }
";

/// The HTML document.
pub fn html(report: &Report, pictures: &Pictures) -> String {
    let mut h = String::new();
    let name = escape(&report.name);
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>{name}: spanwright report</title>\n<style>\n{STYLE}</style>\n</head>\n<body>\n<h1>{name}</h1>\n"
    );
    if let Some(src) = &report.source {
        let _ = writeln!(h, "<p>Input: <code>{}</code></p>", escape(src));
    }
    let _ = writeln!(
        h,
        "<p>Written by {}. Units: lengths {}, masses {}, forces {}, stresses {}, angles {}. \
         Numbers are rounded to a fixed number of decimals per unit; the JSON report keeps \
         every digit.</p>",
        escape(&report.generator),
        report.units.length,
        report.units.mass,
        report.units.force,
        report.units.stress,
        report.units.angle
    );
    cautions(&mut h, report);
    material(&mut h, report);
    mass_table(&mut h, report);
    balance(&mut h, report);
    segments_html(&mut h, report);
    figures(&mut h, pictures);
    section_table(&mut h, report);
    stress(&mut h, report);
    h.push_str("</body>\n</html>\n");
    h
}

fn cautions(h: &mut String, report: &Report) {
    h.push_str("<div class=\"caution\"><h2>Cautions</h2><ul>\n");
    for c in &report.cautions {
        let _ = writeln!(h, "<li>{}</li>", escape(c));
    }
    h.push_str("</ul></div>\n");
}

fn material(h: &mut String, report: &Report) {
    let m = &report.material;
    let _ = writeln!(
        h,
        "<h2>Material and fill</h2><p>{}: density {} g/cm³, strength {} MPa, E = {} MPa ({}). \
         Walls {} mm, infill {} %: the shell is the material within the wall of the surface \
         (inward offsets of slices across the part), the rest filled to the infill; mass, centre \
         of mass and inertia of that shell plus infill.</p>",
        escape(&m.name),
        number(m.density, D::Density),
        number(m.strength, D::Strength),
        number(m.modulus, D::Strength),
        escape(&m.note),
        number(report.fill.wall, D::Mm),
        number(report.fill.infill * 100.0, D::Percent)
    );
}

fn mass_table(h: &mut String, report: &Report) {
    let mm = |v: f64| number(v, D::Mm);
    let moment = |v: f64| number(v, D::GMm2);
    h.push_str(
        "<h2>Mass properties</h2>\n<div class=\"scroll\"><table><tr><th>part</th><th>triangles</th>\
         <th>volume mm³</th><th>area mm²</th><th>fill</th><th>mass g</th>\
         <th>size x mm</th><th>size y mm</th><th>size z mm</th></tr>\n",
    );
    for p in &report.parts {
        let _ = writeln!(
            h,
            "<tr><td class=\"name\">{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
             <td>{}</td><td>{}</td><td>{}</td></tr>",
            escape(&p.name),
            number(p.triangles as f64, D::Count),
            number(p.volume, D::Mm3),
            number(p.area, D::Mm2),
            number(p.fill_fraction, D::Ratio),
            number(p.mass, D::G),
            mm(p.bbox_max[0] - p.bbox_min[0]),
            mm(p.bbox_max[1] - p.bbox_min[1]),
            mm(p.bbox_max[2] - p.bbox_min[2]),
        );
    }
    h.push_str("</table></div>\n");
    h.push_str(
        "<div class=\"scroll\"><table><tr><th>part</th><th>centre of mass x mm</th>\
         <th>y mm</th><th>z mm</th><th>principal moment I1 g mm²</th><th>I2 g mm²</th>\
         <th>I3 g mm²</th><th>I about rotor axis g mm²</th></tr>\n",
    );
    for p in &report.parts {
        let _ = writeln!(
            h,
            "<tr><td class=\"name\">{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
             <td>{}</td><td>{}</td></tr>",
            escape(&p.name),
            mm(p.centroid[0]),
            mm(p.centroid[1]),
            mm(p.centroid[2]),
            moment(p.principal_moments[0]),
            moment(p.principal_moments[1]),
            moment(p.principal_moments[2]),
            moment(p.inertia_rotor_axis),
        );
    }
    h.push_str("</table></div>\n");
}

fn balance(h: &mut String, report: &Report) {
    let Some(b) = &report.balance else {
        return;
    };
    let _ = writeln!(
        h,
        "<h2>Balance</h2><p>Total mass {} g; centre of mass {} mm from the rotor axis: static \
         imbalance {} g mm. Heaviest part {} minus lightest part {}: {} g. Balance the real \
         rotor; printed parts vary.</p>",
        number(b.total_mass, D::G),
        number(b.offset, D::Mm),
        number(b.imbalance, D::GMm),
        b.heaviest,
        b.lightest,
        number(b.mass_spread, D::G)
    );
}

fn figures(h: &mut String, pictures: &Pictures) {
    h.push_str("<h2>Pictures</h2>\n");
    if let Some(p) = &pictures.preview {
        let _ = writeln!(
            h,
            "<figure>\n<img alt=\"shaded 3-D preview of the part\" width=\"{}\" height=\"{}\" src=\"{}\">\n\
             <figcaption>3-D preview (flat shading, no perspective); where the rotation sense \
             is known, the red arc shows it and the blue arrow the wind.</figcaption>\n</figure>",
            p.width,
            p.height,
            data_uri("image/png", &p.png)
        );
    }
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
}

fn section_table(h: &mut String, report: &Report) {
    h.push_str(
        "<h2>Section properties</h2>\n<p>Second moments about the centroid; the polar moment \
         Ixx + Iyy overestimates the torsional stiffness of thin closed sections (an \
         estimate).</p>\n<div class=\"scroll\"><table><tr><th>r mm</th><th>loops</th>\
         <th>area mm²</th><th>cx mm</th><th>cy mm</th><th>Ixx mm⁴</th><th>Iyy mm⁴</th>\
         <th>Ixy mm⁴</th><th>I1 mm⁴</th><th>I2 mm⁴</th><th>angle deg</th><th>polar mm⁴</th></tr>\n",
    );
    for s in &report.sections {
        let i = |v: f64| number(v, D::Mm4);
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
             <td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            number(s.radius, D::Mm),
            s.loops,
            number(s.area, D::Mm2),
            number(s.cx, D::Mm),
            number(s.cy, D::Mm),
            i(s.ixx),
            i(s.iyy),
            i(s.ixy),
            i(s.i1),
            i(s.i2),
            number(s.angle, D::Deg),
            i(s.polar)
        );
    }
    h.push_str("</table></div>\n");
}

fn stress(h: &mut String, report: &Report) {
    let Some(t) = &report.stress else {
        return;
    };
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
        number(t.load.rpm, D::Rpm),
        number(t.load.wind, D::MPerS),
        number(t.thrust_per_blade, D::N),
        number(t.mass, D::G),
        number(t.min_safety_factor, D::Ratio),
        number(t.critical_radius, D::Mm),
        number(t.load.safety_factor, D::Ratio),
        number(t.tip_deflection, D::Mm)
    );
    for a in &t.assumptions {
        let _ = writeln!(h, "<li>{}</li>", escape(a));
    }
    h.push_str(
        "</ul>\n<div class=\"scroll\"><table><tr><th>r mm</th><th>area mm²</th><th>fill</th>\
         <th>centrifugal N</th><th>centrifugal MPa</th><th>moment N mm</th><th>tension MPa</th>\
         <th>compression MPa</th><th>safety factor</th><th>deflection mm</th></tr>\n",
    );
    let step = (t.rows.len() / 25).max(1);
    for (i, r) in t.rows.iter().enumerate() {
        if i % step != 0 && i + 1 != t.rows.len() {
            continue;
        }
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
             <td>{}</td><td>{}</td><td>{}</td></tr>",
            number(r.section.radius, D::Mm),
            number(r.section.area, D::Mm2),
            number(r.fill, D::Ratio),
            number(r.centrifugal_force, D::N),
            number(r.centrifugal_stress, D::Mpa),
            number(r.bending_moment, D::NMm),
            number(r.max_tension, D::Mpa),
            number(r.max_compression, D::Mpa),
            number(r.safety_factor, D::Ratio),
            number(r.deflection, D::Mm)
        );
    }
    h.push_str("</table></div>\n");
}

/// The segments of a split blade: masses, joints and their cautions.
/// A split blade: segment masses, the rod, and the net section and stress at each joint.
fn segments_html(h: &mut String, report: &Report) {
    let Some(seg) = &report.segments else {
        return;
    };
    h.push_str("<h2>Segments and joints</h2>\n<div class=\"caution\"><ul>\n");
    for c in &seg.cautions {
        let _ = writeln!(h, "<li>{}</li>", escape(c));
    }
    h.push_str(
        "</ul></div>\n<div class=\"scroll\"><table><tr><th>segment</th><th>volume mm³</th>\
         <th>mass g</th></tr>\n",
    );
    for p in &seg.segments {
        let _ = writeln!(
            h,
            "<tr><td class=\"name\">{}</td><td>{}</td><td>{}</td></tr>",
            escape(&p.name),
            number(p.volume, D::Mm3),
            number(p.mass, D::G)
        );
    }
    h.push_str("</table></div>\n");
    if let Some([d, l]) = seg.rod {
        let _ = writeln!(
            h,
            "<p>Rod: {} mm diameter, cut to {} mm.</p>",
            number(d, D::Mm),
            number(l, D::Mm)
        );
    }
    h.push_str(
        "<div class=\"scroll\"><table><tr><th>joint</th><th>r mm</th><th>gross area mm²</th>\
         <th>net area mm²</th><th>holes</th><th>net Ixx mm⁴</th><th>force N</th>\
         <th>moment N mm</th><th>tension MPa</th><th>compression MPa</th>\
         <th>safety factor</th></tr>\n",
    );
    for j in &seg.joints {
        let (f, m, t, c, sf) = match &j.stress {
            Some(s) => (
                number(s.centrifugal_force, D::N),
                number(s.bending_moment, D::NMm),
                number(s.max_tension, D::Mpa),
                number(s.max_compression, D::Mpa),
                number(s.safety_factor, D::Ratio),
            ),
            None => ("-".into(), "-".into(), "-".into(), "-".into(), "-".into()),
        };
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
             <td>{f}</td><td>{m}</td><td>{t}</td><td>{c}</td><td>{sf}</td></tr>",
            j.joint,
            number(j.radius, D::Mm),
            number(j.gross.area, D::Mm2),
            number(j.net.area, D::Mm2),
            j.holes,
            number(j.net.ixx, D::Mm4)
        );
    }
    h.push_str("</table></div>\n");
}
