//! STEP export of the exact solid: built from a hand-made `Skin` (a prism, whose volume
//! is known exactly), written with truck-stepio, read back with truck-stepio's reader
//! and re-tessellated with truck-meshalgo.

use nalgebra::Point3;
use spanwright::brep::BrepError;
use spanwright::export::{step_solid, step_text, write_step, ExportError, StepHeader, STEP_SCHEMA};
use spanwright::loft::Skin;
use truck_meshalgo::prelude::*;
use truck_modeling::ShellCondition;
use truck_stepio::r#in::Table;

/// Clamped uniform knots for `n` control points of degree `p` on [0, 1].
fn clamped(n: usize, p: usize) -> Vec<f64> {
    let spans = n - p;
    let mut k = vec![0.0; p + 1];
    k.extend((1..spans).map(|i| i as f64 / spans as f64));
    k.extend(vec![1.0; p + 1]);
    k
}

/// A straight prism skin: the section points (x, y) repeated at `layers` z values from
/// `z0` to `z1` (degree_v = layers - 1, so the span is a straight line).
fn prism(
    section: &[(f64, f64)],
    degree_u: usize,
    u_le: f64,
    z0: f64,
    z1: f64,
    layers: usize,
) -> Skin {
    let control = section
        .iter()
        .map(|&(x, y)| {
            (0..layers)
                .map(|j| Point3::new(x, y, z0 + (z1 - z0) * j as f64 / (layers - 1) as f64))
                .collect()
        })
        .collect();
    Skin {
        degree_u,
        degree_v: layers - 1,
        knots_u: clamped(section.len(), degree_u),
        knots_v: clamped(layers, layers - 1),
        control,
        u_le,
    }
}

/// Ellipse polygon with semi-axes a, b: from the upper trailing edge (angle t0) over the
/// upper side (y > 0) to the leading edge and back along the lower side to angle
/// 2 pi - t0; `n` points, counter-clockwise.
fn ellipse(a: f64, b: f64, t0: f64, n: usize) -> Vec<(f64, f64)> {
    let tau = std::f64::consts::TAU;
    (0..n)
        .map(|k| {
            let t = t0 + (tau - 2.0 * t0) * k as f64 / (n - 1) as f64;
            (a * t.cos(), b * t.sin())
        })
        .collect()
}

/// A six-sided section with large corner angles (so truck-meshalgo's chordal
/// tessellation cuts almost nothing off the corners): trailing edge at x = 50 with
/// half-gap `te` (0 = sharp, the first and last points coincide), leading edge at x = -50.
fn hexagon(te: f64) -> Vec<(f64, f64)> {
    vec![
        (50.0, te),
        (20.0, 9.0),
        (-20.0, 9.0),
        (-50.0, 0.0),
        (-20.0, -9.0),
        (20.0, -9.0),
        (50.0, -te),
    ]
}

/// Shoelace formula (area of a simple polygon, closed implicitly).
fn shoelace(p: &[(f64, f64)]) -> f64 {
    0.5 * (0..p.len())
        .map(|i| {
            let (a, b) = (p[i], p[(i + 1) % p.len()]);
            a.0 * b.1 - b.0 * a.1
        })
        .sum::<f64>()
}

/// What the read-back solid looks like after re-tessellation.
struct Back {
    shells: usize,
    faces: usize,
    /// truck-meshalgo's volume (divergence theorem with the field (x, 0, 0)).
    volume: f64,
    /// Divergence theorem with the field (0, 0, z): for a prism only the caps
    /// contribute, so this checks that they exist and face outward.
    volume_z: f64,
    /// The welded mesh is closed (truck-meshalgo's graded check).
    closed: bool,
}

/// Read back with truck-stepio, then triangulate with truck-meshalgo (chordal tolerance
/// `tol`, mm) and weld shared edges with `put_together_same_attrs`.
fn read_back(text: &str, tol: f64) -> Back {
    let table = Table::from_step(text).expect("truck-stepio parses the file");
    let shells: Vec<_> = table.shell.values().collect();
    let shell = table
        .to_compressed_shell(shells[0])
        .expect("shell converts");
    let faces = shell.faces.len();
    let mut poly = shell.triangulation(tol).to_polygon();
    // The weld tolerance is relative to the bounding box (truck-meshalgo normalises).
    poly.put_together_same_attrs(1e-6)
        .remove_degenerate_faces()
        .remove_unused_attrs();
    let closed = poly.shell_condition() == truck_meshalgo::prelude::ShellCondition::Closed;
    let pos = poly.positions();
    let volume_z = poly
        .tri_faces()
        .iter()
        .map(|t| {
            let [p, q, r] = [pos[t[0].pos], pos[t[1].pos], pos[t[2].pos]];
            let nz = ((q.x - p.x) * (r.y - p.y) - (q.y - p.y) * (r.x - p.x)) / 2.0;
            nz * (p.z + q.z + r.z) / 3.0
        })
        .sum();
    Back {
        shells: shells.len(),
        faces,
        volume: poly.volume(),
        volume_z,
        closed,
    }
}

/// Both volume integrals within `rel` of `exact`.
fn assert_volume(b: &Back, exact: f64, rel: f64, what: &str) {
    assert!(
        b.closed,
        "{what}: re-tessellated, welded mesh is not closed"
    );
    for v in [b.volume, b.volume_z] {
        assert!(
            (v - exact).abs() < rel * exact,
            "{what}: volume {v} vs exact {exact}"
        );
    }
}

fn header() -> StepHeader {
    StepHeader {
        product: "test prism".into(),
        authors: vec!["A. Author".into()],
        organizations: vec!["Test \\ Lab".into()],
        ..StepHeader::default()
    }
}

#[test]
fn sharp_prism_is_closed_and_has_exact_volume() {
    let sec = hexagon(0.0); // first == last point: sharp trailing edge
    let skin = prism(&sec, 1, 0.5, 100.0, 400.0, 2);
    let solid = step_solid(&skin).unwrap();
    // The kernel's own graded check (truck-topology).
    assert_eq!(solid.boundaries().len(), 1);
    assert_eq!(
        solid.boundaries()[0].shell_condition(),
        ShellCondition::Closed
    );
    assert_eq!(solid.boundaries()[0].len(), 4, "upper, lower, root, tip");
    let text = step_text(&[("prism".into(), solid)], &header(), "prism.step");
    let back = read_back(&text, 0.2);
    assert_eq!((back.shells, back.faces), (1, 4));
    // Exact prism volume (elementary geometry): section area (shoelace formula) x
    // length 300 mm; within 0.1 %.
    let exact = shoelace(&sec[..sec.len() - 1]) * 300.0;
    assert_volume(&back, exact, 1e-3, "sharp prism");
}

#[test]
fn blunt_prism_has_trailing_edge_face() {
    let sec = hexagon(2.0); // gap between first and last point: blunt
    let skin = prism(&sec, 1, 0.5, 0.0, 250.0, 2);
    let solid = step_solid(&skin).unwrap();
    assert_eq!(
        solid.boundaries()[0].len(),
        5,
        "upper, lower, trailing edge, root, tip"
    );
    let text = step_text(&[("blunt".into(), solid)], &header(), "blunt.step");
    let back = read_back(&text, 0.2);
    assert_eq!((back.shells, back.faces), (1, 5));
    // Exact prism volume: shoelace area (closed by the trailing-edge segment) x 250 mm.
    let exact = shoelace(&sec) * 250.0;
    assert_volume(&back, exact, 1e-3, "blunt prism");
}

#[test]
fn cubic_skin_and_mirrored_sections_face_outward() {
    // Clamped cubic section through an ellipse control polygon; reference area by Green's
    // theorem on the curve evaluated with truck-geometry (20 000 trapezoids).
    let sec = ellipse(40.0, 6.0, 0.0, 33);
    for mirror in [1.0, -1.0] {
        let s: Vec<_> = sec.iter().map(|&(x, y)| (mirror * x, y)).collect();
        let skin = prism(&s, 3, 0.5, 50.0, 150.0, 4);
        let curve = truck_modeling::BSplineCurve::new(
            truck_modeling::KnotVec::from(skin.knots_u.clone()),
            s.iter()
                .map(|&(x, y)| truck_modeling::Point2::new(x, y))
                .collect(),
        );
        let m = 20_000;
        let pts: Vec<(f64, f64)> = (0..m)
            .map(|k| {
                let p = curve.subs(k as f64 / m as f64);
                (p.x, p.y)
            })
            .collect();
        let exact = shoelace(&pts).abs() * 100.0;
        let solid = step_solid(&skin).unwrap();
        assert_eq!(
            solid.boundaries()[0].shell_condition(),
            ShellCondition::Closed
        );
        let text = step_text(&[("cubic".into(), solid)], &header(), "cubic.step");
        // Chordal tolerance 0.02 mm: the polygonal approximation of the curved section
        // then loses under 0.1 % of the area.
        let back = read_back(&text, 0.02);
        assert_eq!(back.faces, 4);
        // Positive volumes: every face points outward, also for clockwise (mirrored)
        // sections, caps included.
        assert_volume(&back, exact, 1e-3, &format!("cubic, mirror {mirror}"));
    }
}

#[test]
fn header_is_quoted_deterministic_and_in_millimetres() {
    let dir = tempfile::tempdir().unwrap();
    let sec = ellipse(50.0, 6.0, 0.3, 30);
    let skin = prism(&sec, 1, 0.5, 0.0, 100.0, 2);
    let a = dir.path().join("a.step");
    let b = dir.path().join("b");
    std::fs::create_dir(&b).unwrap();
    let b = b.join("a.step");
    let two = |name: &str| vec![(name.to_string(), step_solid(&skin).unwrap())];
    let quoted = StepHeader {
        authors: vec!["O'Neil".into()],
        ..header()
    };
    write_step(&a, &two("blade 1"), &quoted).unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1100));
    write_step(&b, &two("blade 1"), &quoted).unwrap();
    let (x, y) = (std::fs::read(&a).unwrap(), std::fs::read(&b).unwrap());
    assert!(x == y, "same input, different bytes");
    let text = String::from_utf8(x).unwrap();
    // ISO 10303-21: exchange structure opens with ISO-10303-21; and a HEADER section of
    // FILE_DESCRIPTION, FILE_NAME, FILE_SCHEMA; strings in apostrophes, ' doubled (6.4.3).
    assert!(text.starts_with("ISO-10303-21;\nHEADER;\nFILE_DESCRIPTION(("));
    assert!(text
        .contains("FILE_NAME('a.step', '2000-01-01T00:00:00', ('O''Neil'), ('Test \\\\ Lab'), "));
    assert!(text.contains(&format!("FILE_SCHEMA(('{STEP_SCHEMA}'));")));
    assert!(
        text.contains("'automotive_design'"),
        "data section declares AP214"
    );
    assert!(
        text.contains("SI_UNIT(.MILLI.,.METRE.)"),
        "lengths in millimetres"
    );
    assert!(text.contains("PRODUCT('test prism','test prism',''"));
    assert!(text.contains("MANIFOLD_SOLID_BREP('blade 1',"));
    // ISO 10303-514 (advanced boundary representation): faces are ADVANCED_FACE.
    assert_eq!(text.matches(" = ADVANCED_FACE(").count(), 5);
    assert!(!text.contains("FACE_SURFACE("));
    assert!(text.trim_end().ends_with("END-ISO-10303-21;"));
    // truck-stepio's reader (ruststep 0.4) does not accept the standard's doubled
    // apostrophe inside strings; without one it reads the file.
    let plain = step_text(&two("blade 1"), &header(), "a.step");
    assert_eq!(Table::from_step(&plain).unwrap().shell.len(), 1);
}

#[test]
fn several_solids_in_one_file() {
    let a = prism(&ellipse(50.0, 6.0, 0.0, 21), 1, 0.5, 0.0, 100.0, 2);
    let mut b = a.clone();
    for row in &mut b.control {
        for p in row {
            p.x += 200.0;
        }
    }
    let solids = vec![
        ("blade 1".to_string(), step_solid(&a).unwrap()),
        ("blade 2".to_string(), step_solid(&b).unwrap()),
    ];
    let text = step_text(&solids, &StepHeader::default(), "rotor.step");
    assert_eq!(text.matches("MANIFOLD_SOLID_BREP(").count(), 2);
    assert!(text.contains("MANIFOLD_SOLID_BREP('blade 2',"));
    assert_eq!(Table::from_step(&text).unwrap().shell.len(), 2);
}

#[test]
fn malformed_skins_are_named() {
    let good = prism(&ellipse(50.0, 6.0, 0.0, 21), 1, 0.5, 0.0, 100.0, 2);
    let mut s = good.clone();
    s.knots_u.pop();
    let e = step_solid(&s).unwrap_err().to_string();
    assert!(e.contains("knots_u") && e.contains("expected 23"), "{e}");
    let mut s = good.clone();
    s.control[3][0].z += 0.5;
    let e = step_solid(&s).unwrap_err().to_string();
    assert!(e.contains("root") && e.contains("not in a plane"), "{e}");
    let mut s = good.clone();
    s.u_le = 1.0;
    assert!(matches!(
        step_solid(&s),
        Err(ExportError::Solid(BrepError::BadSkin { key: "u_le", .. }))
    ));
    // Sharp at the root, blunt at the tip.
    let mut s = good.clone();
    let last = s.control.len() - 1;
    s.control[last][1].y -= 1.0;
    let e = step_solid(&s).unwrap_err().to_string();
    assert!(e.contains("sharp at one end"), "{e}");
    let mut s = good;
    s.control[2][1].x = f64::NAN;
    assert!(step_solid(&s).is_err());
}

#[test]
fn root_above_tip_and_mirror_still_face_outward() {
    // Every combination of section sense and span direction gives a positive volume
    // equal to the exact prism's (shoelace area x length), caps included.
    let base = hexagon(1.5);
    for mirror in [1.0, -1.0] {
        for (z0, z1) in [(0.0, 120.0), (120.0, 0.0)] {
            let sec: Vec<_> = base.iter().map(|&(x, y)| (mirror * x, y)).collect();
            let skin = prism(&sec, 1, 0.5, z0, z1, 2);
            let solid = step_solid(&skin).unwrap();
            let text = step_text(&[("p".into(), solid)], &header(), "p.step");
            let back = read_back(&text, 0.2);
            let exact = shoelace(&base) * 120.0;
            assert_volume(
                &back,
                exact,
                1e-3,
                &format!("mirror {mirror}, z {z0} -> {z1}"),
            );
        }
    }
}
