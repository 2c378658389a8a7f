//! Root shank, transition, flat, flange, bore and tip of built blades, checked against
//! elementary geometry (volumes of cylinders, cones and circular segments) and against
//! the mesh checks of `spanwright::check`.

#[macro_use]
mod support;

use spanwright::blade::{BladeError, Region};
use spanwright::check::{check_solid, CheckOptions};
use spanwright::design::parse_toml_str;
use spanwright::pipeline::{build_blade, BuiltBlade, Options, PipelineError};
use spanwright::root::RootError;
use std::f64::consts::PI;

/// A two-station NACA 0012 blade (chord 40 mm at 100 mm, 30 mm at 250 mm, twist 10 to 2
/// degrees) with extra tables appended (`[root]`, `[tip]`).
fn design(extra: &str, pps: usize, tol: f64) -> String {
    format!(
        r#"
        name = "shank"
        [blade]
        section = "naca0012"
        min-te-thickness = 0
        points-per-side = {pps}
        tolerance = {tol}
        [[station]]
        radius = 100
        chord = 40
        twist = 10
        [[station]]
        radius = 250
        chord = 30
        twist = 2
        {extra}
        "#
    )
}

fn try_model(text: &str) -> Result<BuiltBlade, PipelineError> {
    let design = parse_toml_str(text, None).expect("valid design text");
    build_blade(&design, &Options::default())
}

fn model(text: &str) -> BuiltBlade {
    try_model(text).expect("builds")
}

fn assert_solid(m: &BuiltBlade) {
    let report = check_solid(m.mesh(), &CheckOptions::DEFAULT);
    assert!(report.is_ok(), "{report}");
}

fn root_error(text: &str) -> (RootError, String) {
    match try_model(text) {
        // Placed in the design file: the problem names the line and key.
        Err(PipelineError::Table {
            cause: BladeError::Root(e),
            problem,
        }) => {
            assert!(problem
                .key
                .as_deref()
                .is_some_and(|k| k.starts_with("root")));
            let msg = e.to_string();
            (e, msg)
        }
        Err(e) => panic!("expected a root error, got {e}"),
        Ok(_) => panic!("expected a root error, the design built"),
    }
}

/// Segment of a circle of radius `r` cut off by a chord at depth `h` (CRC Standard
/// Mathematical Tables, circular segment: A = r² acos((r-h)/r) - (r-h) sqrt(2rh - h²)).
fn segment_area(r: f64, h: f64) -> f64 {
    r * r * ((r - h) / r).acos() - (r - h) * (2.0 * r * h - h * h).sqrt()
}

fn root(shank_length: f64, extra: &str) -> String {
    format!(
        "[root]\nshank-diameter = 20\nshank-length = {shank_length}\ntransition-length = 30\n{extra}"
    )
}

fn volume(extra: &str) -> f64 {
    let m = model(&design(extra, 120, 0.004));
    // Closed and outward (the volume is meaningful); self-intersection is tested on
    // every feature together below.
    let report = check_solid(
        m.mesh(),
        &CheckOptions::DEFAULT.with_self_intersection(false),
    );
    assert!(report.is_ok(), "{report}");
    m.mesh().signed_volume()
}

#[test]
fn straight_shank_volume_is_pi_d2_l_over_4() {
    // Cylinder volume pi d² L / 4 (elementary geometry): two designs that differ only in
    // shank length (20 vs 40 mm) differ by a 20 mm cylinder of 20 mm diameter.
    let diff = volume(&root(40.0, "")) - volume(&root(20.0, ""));
    assert_rel!(diff, PI * 20.0 * 20.0 * 20.0 / 4.0, 2e-3, "shank cylinder");
}

#[test]
fn bore_removes_cylinder_and_drill_point_cone() {
    // Cylinder pi d² h / 4 plus cone pi r² h_c / 3 (elementary geometry), with the
    // cone height h_c = r / tan(118°/2) of a 118° drill point (the default point angle;
    // 118° is the usual twist-drill point, from memory). 6.4 mm: a hole slightly under
    // an M5 heat-set insert's outer diameter (common practice).
    let (d, h) = (6.4, 10.0);
    let r = d / 2.0;
    let hc = r / 59.0f64.to_radians().tan();
    let plain = volume(&root(20.0, ""));
    let bored = volume(&root(20.0, "bore = { diameter = 6.4, depth = 10 }\n"));
    assert_rel!(
        plain - bored,
        PI * d * d * h / 4.0 + PI * r * r * hc / 3.0,
        2e-3,
        "bore with drill point",
    );
    // A flat-bottomed bore (point angle 180) removes the cylinder alone.
    let flat = volume(&root(
        20.0,
        "bore = { diameter = 6.4, depth = 10, point-angle = 180 }\n",
    ));
    assert_rel!(
        plain - flat,
        PI * d * d * h / 4.0,
        2e-3,
        "flat-bottomed bore",
    );
}

#[test]
fn flat_removes_a_circular_segment_along_the_straight_shank() {
    // Section of the flatted shank: circle less the segment of depth 2 mm (CRC circular
    // segment formula above); two shank lengths differ by that prism over 20 mm.
    let diff = volume(&root(40.0, "flat-depth = 2\n")) - volume(&root(20.0, "flat-depth = 2\n"));
    assert_rel!(
        diff,
        (PI * 100.0 - segment_area(10.0, 2.0)) * 20.0,
        2e-3,
        "flatted shank",
    );
}

#[test]
fn flange_adds_a_plate_and_a_fillet() {
    // Plate pi D² t / 4 less the shank it replaces, plus the fillet ring: the region
    // between the shank cylinder, the plate and a quarter circle of radius f, a solid of
    // revolution whose volume is by Pappus' centroid theorem 2 pi x̄ A with
    // A = f² (1 - pi/4) and x̄ = R + f (10 - 3 pi) / (12 - 3 pi) (centroid of the
    // spandrel outside a quarter circle, CRC Standard Mathematical Tables).
    let (big_d, t, f, r) = (34.0, 3.0, 2.0, 10.0);
    let plain = volume(&root(20.0, ""));
    let flanged = volume(&root(
        20.0,
        "flange = { diameter = 34, thickness = 3, fillet = 2 }\n",
    ));
    let spandrel = f * f * (1.0 - PI / 4.0);
    let xbar = r + f * (10.0 - 3.0 * PI) / (12.0 - 3.0 * PI);
    let want = PI * (big_d * big_d / 4.0 - r * r) * t + 2.0 * PI * xbar * spandrel;
    assert_rel!(flanged - plain, want, 5e-3, "flange and fillet");
}

/// Largest distance between corresponding points of two rings.
fn ring_gap(a: &[nalgebra::Point3<f64>], b: &[nalgebra::Point3<f64>]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(p, q)| {
            let (p, q) = (p.xy(), q.xy());
            (p - q).norm()
        })
        .fold(0.0, f64::max)
}

#[test]
fn transition_is_continuous_in_position_and_slope_and_monotone_in_area() {
    let m = model(&design(&root(20.0, ""), 60, 0.05));
    let b = &m.blade;
    let (z0, z1) = (70.0, 100.0); // shank end and first station
    assert_eq!(b.region(z0 - 1.0), Region::Shank);
    assert_eq!(b.region(z0 + 1.0), Region::Transition);
    assert_eq!(b.region(z1 + 1.0), Region::Airfoil);
    let h = 1e-3;
    for z in [z0, z1] {
        let ring = |r: f64| b.ring(r).points;
        let (below, at, above) = (ring(z - h), ring(z), ring(z + h));
        // Position: the sections on both sides within h of each other converge to the
        // one at z (no jump): the change over h is O(h).
        let jump = ring_gap(&below, &above);
        assert!(
            jump < 0.1 * 2.0 * h * 30.0,
            "position jump {jump} mm at z = {z}"
        );
        // Slope: one-sided difference quotients (finite differences, spanwise) agree to
        // O(h) times the curvature; a kink of 1/1000 mm/mm would fail this.
        let slope_jump = below
            .iter()
            .zip(&at)
            .zip(&above)
            .map(|((p, q), r)| {
                let left = (q.xy() - p.xy()) / h;
                let right = (r.xy() - q.xy()) / h;
                (left - right).norm()
            })
            .fold(0.0, f64::max);
        assert!(slope_jump < 1e-3, "slope jump {slope_jump} at z = {z}");
    }
    // Area monotone from the shank's pi d²/4 down to the first station's NACA 0012 area.
    let areas: Vec<f64> = (0..=200)
        .map(|i| b.area_at(z0 + (z1 - z0) * i as f64 / 200.0))
        .collect();
    assert_rel!(areas[0], PI * 100.0, 2e-3, "shank section area");
    // NACA Report 460 thickness integral: area = 0.68508 t c² (open trailing edge).
    assert_rel!(
        areas[200],
        0.68508 * 0.12 * 1600.0,
        5e-3,
        "first station area",
    );
    for (i, w) in areas.windows(2).enumerate() {
        assert!(w[1] <= w[0] + 1e-9, "area rises at sample {i}: {w:?}");
    }
    // The stacking point stays on the stacking axis (no sweep or prebend here): the
    // shank circle is centred on it.
    let shank = b.ring(z0 - 5.0).points;
    let bb = spanwright::mesh::Aabb::of_points(&shank).expect("points");
    let centre = (bb.min.coords + bb.max.coords).xy() * 0.5;
    assert!(centre.norm() < 1e-9, "shank centre {centre}");
    // Width: the circle's 20 mm, seen through its discrete points (sagitta of a
    // 2 * pi / 120 step on a 10 mm radius is under 3e-3 mm).
    assert_rel!(bb.size().x, 20.0, 3e-4, "shank width");
}

#[test]
fn trailing_edge_keeps_its_printable_thickness_through_the_transition() {
    // min-te-thickness = 0.4 mm (one line of a 0.4 mm nozzle, common practice). The
    // transition never lets the gap fall below the first station's.
    let text = design(&root(20.0, ""), 60, 0.05)
        .replace("min-te-thickness = 0\n", "min-te-thickness = 0.4\n");
    let m = model(&text);
    assert_solid(&m);
    let b = &m.blade;
    for i in 0..=100 {
        let r = 70.0 + 30.0 * i as f64 / 100.0;
        let p = b.ring(r).points;
        let gap = (p[0] - p[p.len() - 1]).norm();
        assert!(gap > 0.4 - 1e-9, "trailing edge {gap} mm at r = {r}");
    }
}

#[test]
fn every_feature_together_is_one_checked_solid() {
    for tip in ["flat", "round"] {
        let m = model(&design(
            &format!(
                "{}[tip]\nshape = \"{tip}\"\n",
                root(
                    20.0,
                    "flat-depth = 1.5\nflange = { diameter = 34, thickness = 3, fillet = 2 }\n\
                     bore = { diameter = 6.4, depth = 10 }\n"
                )
            ),
            80,
            0.01,
        ));
        // check_solid: closed, oriented, no degenerate triangles, one component,
        // genus 0, no self-intersection.
        assert_solid(&m);
    }
}

#[test]
fn round_tip_closes_over_half_the_tip_chord() {
    let m = model(&design("[tip]\nshape = \"round\"\n", 80, 0.01));
    assert_solid(&m);
    let bb = m.mesh().bounding_box().expect("mesh");
    // Default length: half the 30 mm tip chord beyond the 250 mm station.
    assert!((bb.max.z - 265.0).abs() < 1e-6, "tip end {}", bb.max.z);
    assert!((m.blade.tip_end() - 265.0).abs() < 1e-9);
    // The last ring shrinks to 5 % of the tip outline.
    let end = m.blade.ring(265.0);
    assert!(
        end.chord < 0.06 * 30.0 && end.chord > 0.04 * 30.0,
        "{}",
        end.chord
    );
}

#[test]
fn mount_features_are_listed() {
    let m = model(&design(
        &root(20.0, "flat-depth = 1\nflange = { diameter = 30, thickness = 2 }\nbore = { diameter = 5, depth = 8 }\n"),
        40,
        0.05,
    ));
    let r = m.blade.root().expect("root");
    assert_eq!(r.mount_features(), vec!["flange", "bore"]);
    let m = model(&design(&root(20.0, "flat-depth = 1\n"), 40, 0.05));
    assert!(m.blade.root().expect("root").mount_features().is_empty());
}

// ---- clear errors that say what to change and by how much ----

#[test]
fn bore_wider_than_the_shank() {
    let (e, msg) = root_error(&design(
        &root(20.0, "bore = { diameter = 22, depth = 10 }\n"),
        40,
        0.05,
    ));
    match e {
        RootError::ThinWall { wall, min, .. } => {
            // Wall (20 - 22) / 2 = -1 mm against the default 0.8 mm (two 0.4 mm nozzle
            // widths, common practice): 1.8 mm short.
            assert!((wall + 1.0).abs() < 1e-12 && (min - 0.8).abs() < 1e-12);
        }
        other => panic!("{other:?}"),
    }
    for part in [
        "root.bore.diameter",
        "-1.00 mm",
        "1.80 mm under",
        "root.min-wall = 0.80",
    ] {
        assert!(msg.contains(part), "{part:?} missing from: {msg}");
    }
    // A bore that fits the diameter but leaves 0.5 mm where the flat is.
    let (_, msg) = root_error(&design(
        &root(
            20.0,
            "flat-depth = 2\nbore = { diameter = 15, depth = 10 }\n",
        ),
        40,
        0.05,
    ));
    assert!(msg.contains("0.50 mm, 0.30 mm under"), "{msg}");
    // Too deep: the bore and its point must end min-wall inside the straight shank.
    let (_, msg) = root_error(&design(
        &root(12.0, "bore = { diameter = 6, depth = 10 }\n"),
        40,
        0.05,
    ));
    assert!(msg.contains("root.bore.depth"), "{msg}");
}

#[test]
fn transition_too_short_for_the_chord() {
    // The trailing edge sits 0.75 * 40 = 30 mm aft of the stacking axis, the shank's
    // edge 10 mm: it must travel 20 mm, more than a 10 mm transition allows (45 degrees).
    let (e, msg) = root_error(&design(
        "[root]\nshank-diameter = 20\nshank-length = 20\ntransition-length = 10\n",
        40,
        0.05,
    ));
    match e {
        RootError::TransitionTooShort { given, travel } => {
            assert_eq!(given, 10.0);
            assert!((travel - 20.0).abs() < 0.5, "travel {travel}");
        }
        other => panic!("{other:?}"),
    }
    assert!(
        msg.contains("root.transition-length = 10.00 mm is too short"),
        "{msg}"
    );
    assert!(msg.contains("lengthen it by"), "{msg}");
}

#[test]
fn flange_smaller_than_the_shank() {
    let (e, msg) = root_error(&design(
        &root(
            20.0,
            "flange = { diameter = 18, thickness = 3, fillet = 2 }\n",
        ),
        40,
        0.05,
    ));
    assert_eq!(
        e,
        RootError::FlangeTooSmall {
            diameter: 18.0,
            needed: 24.0
        }
    );
    assert!(msg.contains("enlarge it by 6.00 mm"), "{msg}");
}

#[test]
fn shank_smaller_than_a_tapering_first_station_is_refused() {
    // Shank area pi 12² / 4 = 113 mm² below the first station's 0.685 * 0.12 * 40² =
    // 131.5 mm² (Report 460 integral) while the blade's area falls outward: no monotone
    // C1 area law joins them, so the root is refused with what to change.
    let (e, msg) = root_error(&design(
        "[root]\nshank-diameter = 12\nshank-length = 20\ntransition-length = 30\n",
        40,
        0.05,
    ));
    match e {
        RootError::Waist { start, end, .. } => {
            assert_rel!(start, PI * 36.0, 2e-3, "shank area");
            assert_rel!(end, 0.68508 * 0.12 * 1600.0, 1e-2, "first station area");
        }
        other => panic!("{other:?}"),
    }
    assert!(msg.contains("root.shank-diameter"), "{msg}");
}

#[test]
fn other_root_errors() {
    let (e, _) = root_error(&design(&root(20.0, "flat-depth = 6\n"), 40, 0.05));
    assert!(matches!(e, RootError::FlatTooDeep { .. }), "{e:?}");
    let (e, msg) = root_error(&design(
        "[root]\nshank-diameter = 20\nshank-length = 60\ntransition-length = 50\n",
        40,
        0.05,
    ));
    assert!(matches!(e, RootError::BehindAxis(_)), "{e:?}");
    assert!(msg.contains("-10.00 mm"), "{msg}");
    let (e, _) = root_error(&design(
        "[root]\nshank-diameter = -20\nshank-length = 20\ntransition-length = 30\n",
        40,
        0.05,
    ));
    assert_eq!(
        e,
        RootError::NotPositive {
            key: "shank-diameter",
            value: -20.0
        }
    );
    let (e, _) = root_error(&design(
        &root(
            10.0,
            "flange = { diameter = 40, thickness = 8, fillet = 3 }\n",
        ),
        40,
        0.05,
    ));
    assert!(matches!(e, RootError::FlangeTooLong { .. }), "{e:?}");
}

#[test]
fn transition_picture_shows_every_section() {
    let m = model(&design(&root(20.0, ""), 40, 0.05));
    let svg = spanwright::report::transition_svg(&m.blade, 8);
    // Root face, 8 transition sections (the last is the first station), one more station.
    assert_eq!(svg.matches("<polygon").count(), 1 + 8 + 1, "{svg}");
    // Well-formed XML, read back with quick-xml (a general-purpose XML reader).
    let mut reader = quick_xml::Reader::from_str(&svg);
    let mut elements = 0;
    loop {
        match reader.read_event() {
            Ok(quick_xml::events::Event::Eof) => break,
            Ok(quick_xml::events::Event::Start(_) | quick_xml::events::Event::Empty(_)) => {
                elements += 1
            }
            Ok(_) => {}
            Err(e) => panic!("not well-formed: {e}"),
        }
    }
    assert!(elements > 10);
}

/// Volume of a drilled cross hole of radius `r` through a cylinder of radius `big_r`,
/// axes crossing at right angles: V = ∫ 2 sqrt(r² - x²) · 2 sqrt(R² - x²) dx over
/// |x| < r (elementary calculus: the hole's chord length in z times the shank's chord
/// length in y), with x = r sin(phi) to make the integrand smooth, by Simpson's rule.
fn cross_hole_volume(r: f64, big_r: f64) -> f64 {
    let n = 2000;
    let h = PI / n as f64;
    let f = |phi: f64| {
        let x = r * phi.sin();
        4.0 * r * phi.cos() * r * phi.cos() * (big_r * big_r - x * x).sqrt()
    };
    let mut s = f(-PI / 2.0) + f(PI / 2.0);
    for i in 1..n {
        let phi = -PI / 2.0 + h * i as f64;
        s += if i % 2 == 1 { 4.0 } else { 2.0 } * f(phi);
    }
    s * h / 3.0
}

#[test]
fn cross_hole_removes_the_drilled_volume_and_adds_one_genus() {
    // Volume by the integral above within 0.2 %; the mesh's hole is a 96-sided polygon
    // (inscribed area factor n sin(2 pi / n) / (2 pi) = 0.99929, so 0.07 % smaller).
    let holed = model(&design(
        &root(25.0, "cross-holes = [{ diameter = 5, at = 12 }]\n"),
        120,
        0.004,
    ));
    // check_solid with genus 1: a through hole is one handle (Euler: V - E + F = 2 - 2g).
    let report = check_solid(
        holed.mesh(),
        &CheckOptions::DEFAULT.with_expected_genus(Some(1)),
    );
    assert!(report.is_ok(), "{report}");
    assert_eq!(report.genus, Some(1));
    let plain = volume(&root(25.0, ""));
    assert_rel!(
        plain - holed.mesh().signed_volume(),
        cross_hole_volume(2.5, 10.0),
        2e-3,
        "cross hole",
    );
    assert_eq!(holed.blade.root().expect("root").genus(), 1);
}

#[test]
fn two_cross_holes_with_flange_and_bore_are_genus_two() {
    let m = model(&design(
        &root(
            30.0,
            "flange = { diameter = 34, thickness = 3, fillet = 2 }\n\
             bore = { diameter = 6.4, depth = 8 }\n\
             cross-holes = [{ diameter = 4, at = 15 }, { diameter = 3, at = 23 }]\n",
        ),
        60,
        0.02,
    ));
    let report = check_solid(
        m.mesh(),
        &CheckOptions::DEFAULT.with_expected_genus(Some(2)),
    );
    assert!(report.is_ok(), "{report}");
    assert_eq!(
        m.blade.root().expect("root").mount_features(),
        vec!["flange", "bore", "cross holes"]
    );
}

#[test]
fn cross_hole_that_breaks_out_of_the_wall() {
    // 19 mm hole in a 20 mm shank: 0.5 mm wall each side, 0.3 mm under min-wall 0.8.
    let (e, msg) = root_error(&design(
        &root(25.0, "cross-holes = [{ diameter = 19, at = 12 }]\n"),
        40,
        0.05,
    ));
    assert!(matches!(e, RootError::ThinWall { .. }), "{e:?}");
    assert!(msg.contains("root.cross-holes.diameter"), "{msg}");
    assert!(msg.contains("0.50 mm, 0.30 mm under"), "{msg}");
    // Too near the transition: 5 mm hole at 23 mm of a 25 mm shank leaves -0.5 mm.
    let (_, msg) = root_error(&design(
        &root(25.0, "cross-holes = [{ diameter = 5, at = 23 }]\n"),
        40,
        0.05,
    ));
    assert!(
        msg.contains("toward the transition") && msg.contains("-0.50 mm"),
        "{msg}"
    );
    // Into the bore's point.
    let (_, msg) = root_error(&design(
        &root(
            25.0,
            "bore = { diameter = 6, depth = 10 }\ncross-holes = [{ diameter = 4, at = 12 }]\n",
        ),
        40,
        0.05,
    ));
    assert!(msg.contains("bore's point"), "{msg}");
    // Cross holes need a round shank.
    let (e, _) = root_error(&design(
        &root(
            25.0,
            "flat-depth = 1\ncross-holes = [{ diameter = 4, at = 12 }]\n",
        ),
        40,
        0.05,
    ));
    assert_eq!(e, RootError::CrossHoleShank);
}
