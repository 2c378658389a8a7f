//! The HTML report as a browser shows it: the three views inside their picture with no
//! empty half, the legend of the section picture, the 3-D preview inlined as a PNG, and
//! one number format throughout. (`scripts/report-screenshot` shows the page in headless
//! Chromium; these tests check what it showed, without a browser.)

#[macro_use]
mod support;

use nalgebra::{Point3, Vector3};
use spanwright::design;
use spanwright::mesh::TriMesh;
use spanwright::pipeline;
use spanwright::props::{Fill, LoadCase, Material};
use spanwright::report::{self, numbers::GROUP, ReportInput};

const DESIGN: &str = r#"
name = "html-test"
[blade]
section = "naca4412"
rotation = "cw"
points-per-side = 40
tolerance = 0.05
[[station]]
radius = 60
chord = 50
twist = 20
[[station]]
radius = 160
chord = 35
twist = 8
[[station]]
radius = 240
chord = 22
twist = 3
[root]
shank-diameter = 20
shank-length = 20
transition-length = 35
"#;

/// The test design's report and pictures (with a load case, so every table is there).
fn report_of_design() -> (report::Report, report::Pictures) {
    let d = design::parse_toml_str(DESIGN, None).unwrap();
    let outcome = pipeline::run(&d, &pipeline::Options::default()).unwrap();
    let parts = vec![outcome.blade_part().clone()];
    let input = ReportInput {
        name: d.name.clone(),
        source: None,
        parts: &parts,
        stations: Some(&d.stations),
        blade: Some(&outcome.blade.blade),
        rotation: Some(d.blade.rotation),
        material: Material::preset("petg").unwrap(),
        fill: Fill::DEFAULT,
        load: Some(LoadCase {
            rpm: 700.0,
            wind: 9.0,
            ..LoadCase::default()
        }),
        extra_radii: vec![],
        stress_cuts: 31,
        picture_cuts: 9,
    };
    report::build(&input, &mut |_, _| {}).unwrap()
}

/// An SVG element: its name, attributes and the text inside it.
type Element = (String, Vec<(String, String)>, String);

/// Every element of an SVG document.
fn svg_elements(svg: &str) -> Vec<Element> {
    use quick_xml::events::Event;
    let mut reader = quick_xml::Reader::from_str(svg);
    let mut out: Vec<Element> = Vec::new();
    loop {
        match reader.read_event().expect("the SVG is XML") {
            Event::Start(e) | Event::Empty(e) => {
                let attrs = e
                    .attributes()
                    .map(|a| {
                        let a = a.unwrap();
                        (
                            a.key.as_ref().to_string(),
                            a.normalized_value(quick_xml::XmlVersion::Implicit1_0)
                                .unwrap()
                                .into_owned(),
                        )
                    })
                    .collect();
                let name = e.name().as_ref().to_string();
                out.push((name, attrs, String::new()));
            }
            Event::Text(t) => {
                if let Some(last) = out.last_mut() {
                    last.2.push_str(&t.xml10_content());
                }
            }
            Event::GeneralRef(r) => {
                if let Some(last) = out.last_mut() {
                    // An entity such as &amp; shows as one character.
                    let _ = r;
                    last.2.push('&');
                }
            }
            Event::Eof => break,
            _ => {}
        }
    }
    out
}

fn attr(attrs: &[(String, String)], key: &str) -> f64 {
    attrs
        .iter()
        .find(|(k, _)| k == key)
        .unwrap_or_else(|| panic!("no {key}"))
        .1
        .parse()
        .unwrap()
}

/// The box every drawn stroke and every label of an SVG covers, and the picture's size.
/// Label widths are estimated at 0.6 em per character, a generous average for sans-serif
/// fonts (common practice for layout estimates).
fn drawn_extent(svg: &str) -> ([f64; 4], f64, f64) {
    let els = svg_elements(svg);
    let (_, root, _) = &els[0];
    let (w, h) = (attr(root, "width"), attr(root, "height"));
    let mut ext = [
        f64::INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::NEG_INFINITY,
    ];
    let mut add = |x: f64, y: f64| {
        ext[0] = ext[0].min(x);
        ext[1] = ext[1].min(y);
        ext[2] = ext[2].max(x);
        ext[3] = ext[3].max(y);
    };
    for (name, attrs, text) in &els {
        match name.as_str() {
            "line" => {
                add(attr(attrs, "x1"), attr(attrs, "y1"));
                add(attr(attrs, "x2"), attr(attrs, "y2"));
            }
            "path" => {
                let d = &attrs.iter().find(|(k, _)| k == "d").unwrap().1;
                let nums: Vec<f64> = d
                    .split(|c: char| c == 'M' || c == 'L' || c.is_whitespace())
                    .filter(|s| !s.is_empty())
                    .map(|s| s.parse().unwrap())
                    .collect();
                for p in nums.chunks(2) {
                    add(p[0], p[1]);
                }
            }
            "polyline" | "polygon" => {
                let pts = &attrs.iter().find(|(k, _)| k == "points").unwrap().1;
                for p in pts.split_whitespace() {
                    let (x, y) = p.split_once(',').unwrap();
                    add(x.parse().unwrap(), y.parse().unwrap());
                }
            }
            "text" => {
                let (x, y, size) = (attr(attrs, "x"), attr(attrs, "y"), attr(attrs, "font-size"));
                let anchor = &attrs.iter().find(|(k, _)| k == "text-anchor").unwrap().1;
                let width = 0.6 * size * text.chars().count() as f64;
                let (left, right) = match anchor.as_str() {
                    "start" => (x, x + width),
                    "end" => (x - width, x),
                    _ => (x - width / 2.0, x + width / 2.0),
                };
                add(left, y - size);
                add(right, y);
            }
            _ => {}
        }
    }
    (ext, w, h)
}

#[test]
fn three_views_stay_inside_their_picture_and_fill_it() {
    // A slender blade-like box, a cube, a part wide along the rotor axis, and a real
    // blade: every stroke and label inside the picture (nothing cropped), and the drawing
    // spans most of the picture's height (no empty half). Before the fix, the end view's
    // label ran past the right edge and a slender part left over half the height empty.
    let boxes = [
        Vector3::new(51.5, 25.1, 272.5),
        Vector3::new(60.0, 60.0, 60.0),
        Vector3::new(20.0, 90.0, 40.0),
        Vector3::new(8.0, 4.0, 600.0),
    ];
    let mut meshes: Vec<TriMesh> = boxes
        .iter()
        .map(|s| TriMesh::cuboid(Point3::new(-s.x / 3.0, -s.y / 2.0, 20.0), *s))
        .collect();
    meshes.push(support::blade(250.0, 60.0, 25.0, 20.0, 12, 40));
    for mesh in &meshes {
        let svg = report::three_view_svg("part", mesh, &[], true);
        let (ext, w, h) = drawn_extent(&svg);
        assert!(
            ext[0] >= 0.0 && ext[1] >= 0.0 && ext[2] <= w && ext[3] <= h,
            "drawn {ext:?} outside the {w} x {h} picture"
        );
        assert!(
            (ext[3] - ext[1]) / h >= 0.85,
            "the drawing spans {:.0} of {h} px in height",
            ext[3] - ext[1]
        );
    }
}

#[test]
fn section_picture_has_a_legend_naming_every_radius() {
    let (rep, pics) = report_of_design();
    let els = svg_elements(&pics.sections);
    let texts: Vec<&str> = els
        .iter()
        .filter(|(n, _, _)| n == "text")
        .map(|(_, _, t)| t.trim())
        .collect();
    assert!(texts.contains(&"outline at radius r (mm):"), "{texts:?}");
    // The picture's outlines are cut at 9 radii evenly spread over the blade's span (its
    // mesh's z extent): each appears in the legend, with two decimals.
    let (z0, z1) = (rep.parts[0].bbox_min[2], rep.parts[0].bbox_max[2]);
    let legend: Vec<f64> = texts
        .iter()
        .filter(|t| !t.contains(char::is_alphabetic))
        .flat_map(|t| t.split([',', ' ', '\n']))
        .filter(|w| w.len() > 3 && w.as_bytes()[w.len() - 3] == b'.')
        .filter_map(|w| w.parse::<f64>().ok())
        .collect();
    assert_eq!(legend.len(), 9, "{texts:?}");
    for (i, shown) in legend.iter().enumerate() {
        let r = z0 + (z1 - z0) * i as f64 / 8.0;
        assert_near!(
            *shown,
            r,
            0.0051,
            "legend radius (even spacing over the span)"
        );
    }
    // One swatch per colour used (6 palette colours over 9 outlines), each a line of 22 px.
    let swatches = els
        .iter()
        .filter(|(n, a, _)| n == "line" && (attr(a, "x2") - attr(a, "x1") - 22.0).abs() < 1e-9)
        .count();
    assert_eq!(swatches, 6);
    // The HTML inlines the picture, legend included.
    let html = report::html(&rep, &pics);
    assert!(html.contains("outline at radius r (mm):"));
}

#[test]
fn html_inlines_the_preview_png() {
    let (rep, pics) = report_of_design();
    let preview = pics.preview.as_ref().expect("a preview");
    // The png crate (an independent decoder) reads it back at the stated size.
    let decoder = png::Decoder::new(std::io::Cursor::new(&preview.png));
    let reader = decoder.read_info().expect("a PNG");
    let info = reader.info();
    assert_eq!((info.width, info.height), (preview.width, preview.height));
    assert_eq!((info.width, info.height), (800, 600));
    let html = report::html(&rep, &pics);
    let uri = format!(
        "src=\"data:image/png;base64,{}\"",
        report::base64(&preview.png)
    );
    assert!(html.contains(&uri), "the preview is not inlined");
    assert!(html.contains("width=\"800\" height=\"600\""));
    assert!(!html.contains("<script"));
    // Deterministic: the same input gives the same page.
    let (rep2, pics2) = report_of_design();
    assert!(
        report::html(&rep2, &pics2) == html,
        "the page differs between runs"
    );
}

/// The cells of every table of the page: rows of cell texts.
fn tables(html: &str) -> Vec<Vec<Vec<String>>> {
    let mut out = Vec::new();
    for table in html.split("<table>").skip(1) {
        let table = &table[..table.find("</table>").unwrap()];
        let rows = table
            .split("<tr>")
            .skip(1)
            .map(|row| {
                row.split("<td")
                    .skip(1)
                    .map(|cell| {
                        let cell = &cell[cell.find('>').unwrap() + 1..];
                        cell[..cell.find("</td>").unwrap()].to_string()
                    })
                    .collect::<Vec<_>>()
            })
            .filter(|r| !r.is_empty())
            .collect();
        out.push(rows);
    }
    out
}

/// Decimals of a number written by the report's convention; `None` when the text is not
/// such a number. The convention (SI Brochure, 9th edition, 2019, 5.4.4): plain decimals,
/// groups of three digits separated by a narrow space when the whole part has five or
/// more digits, a point as the decimal marker, no exponent.
fn decimals(text: &str) -> Option<usize> {
    let t = text.strip_prefix('-').unwrap_or(text);
    let (whole, frac) = t.split_once('.').unwrap_or((t, ""));
    if !frac.chars().all(|c| c.is_ascii_digit()) || (t.contains('.') && frac.is_empty()) {
        return None;
    }
    let groups: Vec<&str> = whole.split(GROUP).collect();
    let digits: usize = groups.iter().map(|g| g.len()).sum();
    let ok = groups
        .iter()
        .all(|g| !g.is_empty() && g.chars().all(|c| c.is_ascii_digit()))
        && if digits >= 5 {
            groups[0].len() <= 3 && groups[1..].iter().all(|g| g.len() == 3)
        } else {
            groups.len() == 1
        };
    ok.then_some(frac.len())
}

#[test]
fn numbers_follow_one_convention() {
    let (rep, pics) = report_of_design();
    let html = report::html(&rep, &pics);
    assert!(decimals("43\u{202f}279.168") == Some(3) && decimals("5939") == Some(0));
    assert!(decimals("1.7858e5").is_none() && decimals("50391.280").is_none());
    let all = tables(&html);
    assert!(all.len() >= 4, "{} tables", all.len());
    for table in &all {
        let columns = table[0].len();
        for col in 0..columns {
            let cells: Vec<&String> = table.iter().filter_map(|r| r.get(col)).collect();
            let kinds: Vec<Option<usize>> = cells.iter().map(|c| decimals(c)).collect();
            if kinds.iter().all(Option::is_none) {
                continue; // a column of names
            }
            assert!(
                kinds.iter().all(|k| k.is_some() && *k == kinds[0]),
                "column {col} mixes formats: {cells:?}"
            );
        }
    }
    // No number anywhere in the page's text in exponent notation (tags, the style sheet
    // and the inlined picture aside).
    let body = &html[html.find("</style>").unwrap()..];
    let text: String = body
        .split('<')
        .filter_map(|part| part.split_once('>').map(|(_, t)| t))
        .collect::<Vec<_>>()
        .join(" ");
    let b = text.as_bytes();
    for i in 1..b.len().saturating_sub(1) {
        let exp = b[i] == b'e'
            && b[i - 1].is_ascii_digit()
            && (b[i + 1].is_ascii_digit() || b[i + 1] == b'-' || b[i + 1] == b'+');
        assert!(
            !exp,
            "exponent notation near: {}",
            &text[i.saturating_sub(20)..(i + 20).min(text.len())]
        );
    }
    // Superscript units, never "mm2" or "mm3" (in the text: the inlined pictures'
    // base64 may hold any letters).
    assert!(!text.contains("mm2") && !text.contains("mm3") && !text.contains("mm4"));
}

#[test]
fn screenshot_script_installs_nothing_and_names_the_package() {
    // The script only uses the system's chromium (Debian package `chromium`), headless,
    // and says how to install it when it is missing.
    let script = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("scripts/report-screenshot"),
    )
    .unwrap();
    assert!(script.contains("--headless") && script.contains("--screenshot="));
    assert!(script.contains("apt-get install chromium"));
    for installer in [
        "apt-get install -y",
        "apt install",
        "npm ",
        "pip ",
        "curl ",
        "wget ",
    ] {
        assert!(
            !script.contains(installer),
            "the script must not run {installer}"
        );
    }
}
