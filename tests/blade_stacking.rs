//! Stacking rules against outside references, measured on the finished mesh: plane cuts
//! (`props::Slice`), their centroids by Green's theorem written out here, and their
//! extents, never the code that placed the sections.

use nalgebra::Point2;
use spanwright::design::{parse_csv_str, parse_toml_str, Design, Stacking};
use spanwright::export::write_stl;
use spanwright::mesh::Part;
use spanwright::pipeline::{build_blade, BuiltBlade, Options};
use spanwright::props::Slice;

/// A design whose sections stay as published (no trailing edge opened: the references
/// below are the published sections' own centroids and thickest points).
fn design(toml: &str) -> Design {
    let mut d = parse_toml_str(toml, None).expect("valid design");
    d.blade.min_te_thickness = Some(0.0);
    d
}

fn model_at(d: &Design, tolerance: Option<f64>) -> BuiltBlade {
    build_blade(
        d,
        &Options {
            tolerance,
            ..Options::default()
        },
    )
    .expect("builds")
}

/// Area centroid of a closed polygon by Green's theorem (shoelace first moments):
/// `A = 1/2 sum c_i`, `C = sum (p_i + p_j) c_i / (6 A)` with `c_i = x_i y_j - x_j y_i`
/// (e.g. Bourke, "Calculating the area and centroid of a polygon", 1988).
fn centroid(poly: &[Point2<f64>]) -> Point2<f64> {
    let o = poly[0];
    let (mut a, mut mx, mut my) = (0.0, 0.0, 0.0);
    for i in 0..poly.len() {
        let (p, q) = (poly[i] - o, poly[(i + 1) % poly.len()] - o);
        let c = p.x * q.y - q.x * p.y;
        a += c;
        mx += (p.x + q.x) * c;
        my += (p.y + q.y) * c;
    }
    Point2::new(o.x + mx / (3.0 * a), o.y + my / (3.0 * a))
}

/// The one loop of the cut at `r`.
/// The skin's own section at radius `r`: its iso-curve there (every iso-curve of the
/// skin is planar, `spanwright::tessellate::row_radius`) sampled at 20 000 even steps of
/// the section parameter, closed across the trailing edge. Its centroid differs from the
/// exact curve's by the polygon's sagitta error, far below 1e-6 chord at this density.
fn skin_cut(m: &BuiltBlade, r: f64) -> Vec<Point2<f64>> {
    let v = spanwright::tessellate::row_at_radius(&m.skin, r).expect("inside the skin");
    let n = 20_000;
    (0..n)
        .map(|k| {
            let p = m.skin.eval(k as f64 / n as f64, v);
            Point2::new(p.x, p.y)
        })
        .collect()
}

fn cut(m: &BuiltBlade, r: f64) -> Vec<Point2<f64>> {
    let s = Slice::cut(m.mesh(), r).expect("closed mesh");
    assert_eq!(s.loops.len(), 1, "one loop at r = {r}");
    s.loops.into_iter().next().unwrap()
}

/// Chord position of the maximum of the NACA 4-digit thickness polynomial (NACA Report
/// 460, Jacobs, Ward & Pinkerton, 1933, open trailing edge `a4 = -0.1015`): the root of
/// its derivative `0.14845/sqrt(x) - 0.1260 - 0.7032 x + 0.8529 x^2 - 0.4060 x^3`, by
/// bisection. The report rounds it to "30 per cent of the chord".
fn naca4_thickest() -> f64 {
    let d = |x: f64| {
        0.2969 * 0.5 / x.sqrt() - 0.1260 - 2.0 * 0.3516 * x + 3.0 * 0.2843 * x * x
            - 4.0 * 0.1015 * x.powi(3)
    };
    let (mut lo, mut hi) = (0.1, 0.5);
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if d(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// Centroid of the NACA 00xx area (Report 460 thickness polynomial, any thickness):
/// `x_c = int x y dx / int y dx` with, per term `a x^k`, `int x^k = 1/(k+1)`:
/// numerator `0.2969 (2/5) - 0.1260/3 - 0.3516/4 + 0.2843/5 - 0.1015/6`,
/// denominator `0.2969 (2/3) - 0.1260/2 - 0.3516/3 + 0.2843/4 - 0.1015/5`.
fn naca00_centroid() -> f64 {
    let num = 0.2969 * 0.4 - 0.1260 / 3.0 - 0.3516 / 4.0 + 0.2843 / 5.0 - 0.1015 / 6.0;
    let den = 0.2969 * 2.0 / 3.0 - 0.1260 / 2.0 - 0.3516 / 3.0 + 0.2843 / 4.0 - 0.1015 / 5.0;
    num / den
}

/// Three stations of changing section, chord and twist, with sweep and prebend linear in
/// the radius (x = 0.02 (r - 100), y = -0.01 (r - 100)): a monotone cubic through points on
/// a line is that line (a Hermite interpolant whose slopes are the line's slope;
/// Fritsch & Carlson 1980), so the stacking axis is that straight line.
fn tapered(stacking: &str) -> String {
    format!(
        r#"
        [blade]
        stacking = {stacking}
        points-per-side = 120
        [[station]]
        radius = 100
        chord = 60
        twist = 20
        section = "naca4415"
        [[station]]
        radius = 200
        chord = 45
        twist = 10
        section = "naca4412"
        sweep = 2
        prebend = -1
        [[station]]
        radius = 300
        chord = 30
        twist = 4
        section = "naca2409"
        sweep = 4
        prebend = -2
        "#
    )
}

fn axis(r: f64) -> Point2<f64> {
    Point2::new(0.02 * (r - 100.0), -0.01 * (r - 100.0))
}

#[test]
fn centroid_stacked_sections_have_their_centroids_on_the_axis() {
    // The claim: every section's area centroid lies on the stacking axis within 1e-6
    // chord (the smallest chord, 30 mm, is the scale: chord never undershoots between
    // stations). The skin's own sections are measured (a mesh cut carries the
    // tessellation's error, about 4e-5 chord at 0.01 mm); the skin follows the design
    // within a tenth of the 0.001 mm tolerance.
    let d = design(&tapered("\"centroid\""));
    let m = model_at(&d, Some(1e-3));
    let scale = 30.0;
    let mut worst: f64 = 0.0;
    for k in 1..40 {
        let r = 100.0 + 200.0 * k as f64 / 40.0;
        let c = centroid(&skin_cut(&m, r));
        worst = worst.max((c - axis(r)).norm() / scale);
    }
    // The skin strays from the design's sections by at most the measured skin-to-design
    // distance, and a section's centroid by no more than its points.
    let strays = m.skin_to_design / scale;
    assert!(
        worst < 1e-6 + strays,
        "centroid {worst:e} chord off the axis ({strays:e})"
    );
    // The blade's own summary agrees (its offsets are measured on the placed sections).
    let s = m.blade.stacking();
    assert_eq!(s.rule, Some(Stacking::Centroid));
    assert!(s.centroid_offset < 1e-9, "{s}");

    // The check can fail: the same blade stacked on the quarter chord has its centroids
    // about 0.17 chord behind the axis (a 4-digit section's centroid is near 42 % chord).
    let q = model_at(&design(&tapered("0.25")), None);
    let r = 200.0;
    let off = (centroid(&cut(&q, r)) - axis(r)).norm() / 45.0;
    assert!((0.12..0.22).contains(&off), "{off}");
}

#[test]
fn thickest_rule_sits_at_30_percent_chord_on_naca_00xx() {
    // NACA Report 460: the 4-digit thickness is largest at 30 % chord for every
    // thickness; from the published polynomial the maximum is at x = 0.29978.
    let xt = naca4_thickest();
    assert!((xt - 0.30).abs() < 5e-4, "{xt}");
    // Untwisted, unswept stations: the axis is x = 0, the chord runs along +x, so the
    // leading edge of the cut sits at x = -x_t c.
    let d = design(
        r#"
        [blade]
        stacking = "thickest"
        points-per-side = 160
        [[station]]
        radius = 50
        chord = 60
        twist = 0
        section = "naca0018"
        [[station]]
        radius = 150
        chord = 40
        twist = 0
        section = "naca0009"
        "#,
    );
    let m = model_at(&d, Some(1e-3));
    for r in [50.5, 100.0, 149.5] {
        let pts = cut(&m, r);
        let lo = pts.iter().map(|p| p.x).fold(f64::INFINITY, f64::min);
        let hi = pts.iter().map(|p| p.x).fold(f64::NEG_INFINITY, f64::max);
        let at = -lo / (hi - lo);
        assert!(
            (at - xt).abs() < 5e-5,
            "r = {r}: axis at {at} chord, Report 460 {xt}"
        );
    }
    for s in m.blade.stacking().stations {
        assert!((s.point[0] - xt).abs() < 1e-4 && s.point[1] == 0.0, "{s:?}");
    }
}

#[test]
fn centroid_of_naca_00xx_is_the_report_460_integral() {
    // A symmetric section's centroid is on its chord line at x_c = 0.42044 (Report 460
    // polynomial integrated term by term; the same for every thickness).
    let xc = naca00_centroid();
    assert!((xc - 0.42044).abs() < 1e-5, "{xc}");
    let text = |stacking: &str| {
        format!(
            "[blade]\nstacking = {stacking}\npoints-per-side = 200\n\
             [[station]]\nradius = 50\nchord = 50\ntwist = 0\nsection = \"naca0012\"\n\
             [[station]]\nradius = 150\nchord = 50\ntwist = 0\nsection = \"naca0012\"\n"
        )
    };
    let m = model_at(&design(&text("\"centroid\"")), Some(1e-3));
    for s in m.blade.stacking().stations {
        assert!((s.point[0] - xc).abs() < 2e-4, "{s:?}");
        assert!(s.point[1].abs() < 1e-9, "{s:?}");
    }
    // Measured on the mesh: the leading edge sits x_c c ahead of the axis.
    let pts = cut(&m, 100.0);
    let lo = pts.iter().map(|p| p.x).fold(f64::INFINITY, f64::min);
    assert!((-lo / 50.0 - xc).abs() < 2e-4, "{}", -lo / 50.0);
    // Quarter-chord stacked, the summary states the centrifugal arm (x_c - 0.25) c.
    let q = model_at(&design(&text("\"quarter-chord\"")), None);
    let s = q.blade.stacking();
    assert!((s.centroid_offset - (xc - 0.25) * 50.0).abs() < 0.01, "{s}");
    assert!((s.centroid_offset_chord - (xc - 0.25)).abs() < 2e-4, "{s}");
}

fn stl_bytes(m: &BuiltBlade) -> Vec<u8> {
    let mut out = Vec::new();
    let part = Part {
        name: "blade".into(),
        mesh: m.mesh().clone(),
    };
    let part = spanwright::check::certify(part, &spanwright::check::CheckOptions::DEFAULT)
        .expect("a built blade is a solid");
    write_stl(&mut out, &[part]).unwrap();
    out
}

#[test]
fn quarter_chord_is_the_historical_0_25_byte_for_byte() {
    // 0.25 was the only stacking before named rules (and the default); the quarter chord
    // is the aerodynamic centre of thin-airfoil theory (Abbott & von Doenhoff, Theory of
    // Wing Sections, 1959, ch. 4). Every spelling of it builds the same STL bytes, and so
    // does a per-station override that says 0.25 everywhere.
    let base = stl_bytes(&model_at(&design(&tapered("0.25")), None));
    for s in [
        "\"quarter-chord\"",
        "\"aerodynamic-centre\"",
        "\"Quarter-Chord\"",
    ] {
        assert!(
            base == stl_bytes(&model_at(&design(&tapered(s)), None)),
            "{s}"
        );
    }
    let default = tapered("0.25").replace("stacking = 0.25\n", "");
    assert!(base == stl_bytes(&model_at(&design(&default), None)));
    let per_station = tapered("\"thickest\"").replace("twist = ", "stacking = 0.25\ntwist = ");
    assert!(base == stl_bytes(&model_at(&design(&per_station), None)));
    // And the bytes do depend on the stacking: 0.3 differs.
    assert!(base != stl_bytes(&model_at(&design(&tapered("0.3")), None)));
}

#[test]
fn moving_the_stacking_fraction_translates_untwisted_sections() {
    // Conventions: u = (s_x - f) c. At zero twist a change of f by 0.05 moves every
    // section by -0.05 c along x. The loft's chord-length parameters do not change under a
    // translation, so every mesh vertex moves by exactly that (to rounding).
    let text = |f: f64| {
        format!(
            "[blade]\nstacking = {f}\nsection = \"naca2412\"\n\
             [[station]]\nradius = 50\nchord = 40\ntwist = 0\n\
             [[station]]\nradius = 150\nchord = 40\ntwist = 0\n"
        )
    };
    let (a, b) = (
        model_at(&design(&text(0.25)), None),
        model_at(&design(&text(0.3)), None),
    );
    let (va, vb) = (&a.mesh().vertices, &b.mesh().vertices);
    assert_eq!(va.len(), vb.len());
    for (p, q) in va.iter().zip(vb) {
        assert!((q.x - p.x + 0.05 * 40.0).abs() < 1e-9, "{p} -> {q}");
        assert!((q.y - p.y).abs() < 1e-9 && (q.z - p.z).abs() < 1e-9);
    }
}

#[test]
fn csv_column_changes_the_fraction_along_the_span() {
    // A bare CSV table whose stacking column goes from 0.25 at the root to 40 % at the
    // tip (semicolons and a decimal comma, as a European spreadsheet writes them). At
    // zero twist and sweep the leading edge of a station's cut sits f c ahead of the
    // axis; between stations the fraction stays within its neighbours' range (monotone
    // interpolation, Fritsch & Carlson 1980).
    let text = "radius;chord;twist;stacking [%]\n50;40;0;25\n100;40;0;32,5\n150;40;0;40\n";
    let d = parse_csv_str(text, None, Some("naca0012")).unwrap();
    let m = model_at(&d, Some(1e-3));
    for (r, f) in [(50.5, 0.25), (100.0, 0.325), (149.5, 0.40)] {
        let pts = cut(&m, r);
        let lo = pts.iter().map(|p| p.x).fold(f64::INFINITY, f64::min);
        // Half a millimetre from the end stations the fraction has moved by less than
        // 1e-3 (its slope is at most 3 x 0.075 / 50 per mm).
        assert!((-lo / 40.0 - f).abs() < 2e-3, "r = {r}: {}", -lo / 40.0);
    }
    for k in 0..=20 {
        let r = 50.0 + 5.0 * k as f64;
        let lo = cut(&m, r.clamp(50.5, 149.5))
            .iter()
            .map(|p| p.x)
            .fold(f64::INFINITY, f64::min);
        let f = -lo / 40.0;
        assert!((0.249..=0.401).contains(&f), "r = {r}: {f}");
    }
}

#[test]
fn mixed_rules_hold_at_their_stations() {
    // Centroid at the two inner stations, a chord fraction at the tip: the centroid rule
    // holds at and between the inner stations, the fraction at the tip station, and the
    // blade is still one closed solid (pipeline checks).
    let d = design(
        r#"
        [blade]
        stacking = "centroid"
        section = "naca4412"
        [[station]]
        radius = 50
        chord = 50
        twist = 10
        [[station]]
        radius = 120
        chord = 45
        twist = 5
        [[station]]
        radius = 200
        chord = 40
        twist = 0
        stacking = 0.3
        "#,
    );
    let m = model_at(&d, Some(1e-3));
    checked(&m).expect("a closed solid");
    for r in [51.0, 85.0, 120.0] {
        let off = centroid(&skin_cut(&m, r)).coords.norm() / 45.0;
        assert!(off < 1e-6, "r = {r}: {off:e} chord");
    }
    let pts = cut(&m, 199.9);
    let lo = pts.iter().map(|p| p.x).fold(f64::INFINITY, f64::min);
    assert!((-lo / 40.0 - 0.3).abs() < 1e-3, "{}", -lo / 40.0);
    let s = m.blade.stacking();
    assert_eq!(s.rule, None);
    assert!(s
        .rule_text()
        .starts_with("per station (centroid at r = 50.0 mm"));
}

/// Attributes of every `<tag .../>` element of an SVG text (our writer puts each element
/// on one line with `key="value"` attributes).
fn elements(svg: &str, tag: &str) -> Vec<std::collections::HashMap<String, String>> {
    let open = format!("<{tag} ");
    svg.lines()
        .filter_map(|l| l.trim().strip_prefix(&open))
        .map(|rest| {
            rest.split("\" ")
                .filter_map(|kv| kv.split_once("=\""))
                .map(|(k, v)| (k.trim().to_string(), v.trim_end_matches("\"/>").to_string()))
                .collect()
        })
        .collect()
}

fn points(attr: &str) -> Vec<(f64, f64)> {
    attr.split_whitespace()
        .map(|p| {
            let (x, y) = p.split_once(',').unwrap();
            (x.parse().unwrap(), y.parse().unwrap())
        })
        .collect()
}

#[test]
fn three_view_draws_the_swept_axis() {
    // The tapered blade's axis is the line x = 0.02 (z - 100), y = -0.01 (z - 100). The
    // plan view maps (z, x) to (right, up) and the edge view (z, y) to (right, up) at one
    // scale, so the drawn axis is straight with pixel slopes -0.02 and +0.01 (y down).
    let m = model_at(&design(&tapered("\"centroid\"")), None);
    let axis = m.blade.stacking_axis(32);
    let svg = spanwright::report::three_view_svg("t", m.mesh(), &axis, true);
    let lines: Vec<Vec<(f64, f64)>> = elements(&svg, "polyline")
        .iter()
        .filter(|e| e["stroke"] == spanwright::report::AXIS_COLOUR)
        .map(|e| points(&e["points"]))
        .collect();
    assert_eq!(lines.len(), 2, "plan and edge view");
    for (line, slope) in lines.iter().zip([-0.02, 0.01]) {
        let (a, b) = (line[0], line[line.len() - 1]);
        let s = (b.1 - a.1) / (b.0 - a.0);
        assert!((s - slope).abs() < 2e-4, "slope {s} vs {slope}");
        // Straight: every point within the 0.01 px the writer rounds to (and a little).
        for p in line {
            let off = (p.1 - a.1) - s * (p.0 - a.0);
            assert!(off.abs() < 0.02, "{p:?} off the line by {off}");
        }
    }
    assert!(svg.contains(">stacking axis</text>"));
    // Without an axis nothing is drawn in its colour.
    let plain = spanwright::report::three_view_svg("t", m.mesh(), &[], true);
    assert!(!plain.contains(spanwright::report::AXIS_COLOUR));
}

#[test]
fn transition_picture_marks_the_axis_on_the_rotor_axis() {
    // No sweep or prebend: the stacking axis is the z axis, so seen from the tip every
    // cross sits where the picture's dashed x and y axes (through x = y = 0) meet.
    let d = design(
        r#"
        [blade]
        stacking = "centroid"
        section = "naca4415"
        [[station]]
        radius = 75
        chord = 60
        twist = 25
        [[station]]
        radius = 280
        chord = 25
        twist = 3
        [root]
        shank-diameter = 24
        shank-length = 25
        transition-length = 30
        "#,
    );
    let m = model_at(&d, None);
    let svg = spanwright::report::transition_svg(&m.blade, 8);
    let dashed: Vec<_> = elements(&svg, "line")
        .into_iter()
        .filter(|e| e.contains_key("stroke-dasharray"))
        .collect();
    let v: f64 = dashed.iter().find(|e| e["x1"] == e["x2"]).unwrap()["x1"]
        .parse()
        .unwrap();
    let h: f64 = dashed.iter().find(|e| e["y1"] == e["y2"]).unwrap()["y1"]
        .parse()
        .unwrap();
    let crosses: Vec<_> = elements(&svg, "line")
        .into_iter()
        .filter(|e| e["stroke"] == spanwright::report::AXIS_COLOUR)
        .collect();
    // Two strokes per cross: root face, 8 transition sections (the last one is the first
    // station) and the tip station.
    assert_eq!(crosses.len(), 2 * 10, "{}", crosses.len());
    for c in crosses {
        let mid =
            |a: &str, b: &str| 0.5 * (c[a].parse::<f64>().unwrap() + c[b].parse::<f64>().unwrap());
        assert!((mid("x1", "x2") - v).abs() < 0.02 && (mid("y1", "y2") - h).abs() < 0.02);
    }
}

#[test]
fn report_states_the_rule_and_draws_the_axis() {
    use spanwright::props::{Fill, Material};
    use spanwright::report::{self, ReportInput};
    let d = design(&tapered("\"centroid\""));
    let m = model_at(&d, None);
    let parts = [checked(&m).unwrap()];
    let input = ReportInput {
        name: "t".into(),
        source: None,
        parts: &parts,
        stations: Some(&d.stations),
        blade: Some(&m.blade),
        rotation: None,
        material: Material::preset("pla").unwrap(),
        fill: Fill::SOLID,
        load: None,
        extra_radii: vec![],
        stress_cuts: 11,
        picture_cuts: 5,
    };
    let (rep, pics) = report::build(&input, &mut |_, _| {}).unwrap();
    let s = rep
        .stacking
        .as_ref()
        .expect("a report from a design states its stacking");
    assert_eq!(s.rule, Some(Stacking::Centroid));
    assert_eq!(s.stations.len(), 3);
    let json = serde_json::to_value(&rep).unwrap();
    assert_eq!(json["stacking"]["rule"], "centroid");
    assert!(json["stacking"]["centroid_offset"].as_f64().unwrap() < 1e-9);
    // Both pictures that look along the span or across it carry the axis.
    assert!(pics.three_view.contains(report::AXIS_COLOUR));
    assert!(pics.sections.contains(report::AXIS_COLOUR));
}

/// The blade checked as the pipeline checks it.
fn checked(m: &BuiltBlade) -> Result<spanwright::check::CheckedPart, spanwright::check::Rejected> {
    spanwright::check::certify(
        m.part(),
        &spanwright::check::CheckOptions::DEFAULT.with_expected_genus(Some(m.expected_genus())),
    )
}
