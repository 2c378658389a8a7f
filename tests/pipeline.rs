//! The core pipeline against outside references: design text -> closed blade mesh.

mod support;

use spanwright::check::{check_solid, CheckOptions};
use spanwright::design::parse_toml_str;
use spanwright::pipeline::{build_blade, BuiltBlade, Options};

/// Integral of the NACA 4-digit thickness polynomial (NACA Report 460, Jacobs, Ward &
/// Pinkerton, 1933) over the chord, open trailing edge: area = k t c^2 with
/// k = 10 (0.2969 * 2/3 - 0.1260/2 - 0.3516/3 + 0.2843/4 - 0.1015/5) = 0.68508 (the
/// commonly quoted 0.6851).
const NACA4_AREA_FACTOR: f64 =
    10.0 * (0.2969 * 2.0 / 3.0 - 0.1260 / 2.0 - 0.3516 / 3.0 + 0.2843 / 4.0 - 0.1015 / 5.0);

fn model(toml: &str) -> BuiltBlade {
    let design = parse_toml_str(toml, None).expect("valid design");
    build_blade(&design, &Options::default()).expect("builds")
}

fn assert_solid(m: &BuiltBlade) {
    let report = check_solid(m.mesh(), &CheckOptions::DEFAULT);
    assert!(report.is_ok(), "{report}");
}

#[test]
fn straight_naca0012_prism_volume() {
    // Prism of constant section: V = 0.68508 t c^2 L (Report 460 thickness integral).
    let (c, l) = (50.0, 200.0);
    let m = model(
        r#"
        name = "prism"
        [blade]
        section = "naca0012"
        min-te-thickness = 0
        points-per-side = 200
        tolerance = 0.002
        [[station]]
        radius = 100
        chord = 50
        twist = 0
        [[station]]
        radius = 300
        chord = 50
        twist = 0
        "#,
    );
    assert_solid(&m);
    let exact = NACA4_AREA_FACTOR * 0.12 * c * c * l;
    let v = m.mesh().signed_volume();
    assert!((v / exact - 1.0).abs() < 1e-3, "volume {v} vs {exact}");
}

#[test]
fn tapered_blade_volume_is_the_integral_of_section_area() {
    // Linear taper c(r) = c1 + (c2 - c1) s (two stations interpolate linearly):
    // V = k t L (c1^2 + c1 c2 + c2^2) / 3, with k from Report 460 (derived above).
    let (c1, c2, l) = (60.0, 20.0, 150.0);
    let m = model(
        r#"
        [blade]
        section = "naca0015"
        min-te-thickness = 0
        points-per-side = 160
        tolerance = 0.002
        [[station]]
        radius = 50
        chord = 60
        twist = 0
        [[station]]
        radius = 200
        chord = 20
        twist = 0
        "#,
    );
    assert_solid(&m);
    let exact = NACA4_AREA_FACTOR * 0.15 * l * (c1 * c1 + c1 * c2 + c2 * c2) / 3.0;
    let v = m.mesh().signed_volume();
    assert!((v / exact - 1.0).abs() < 1e-3, "volume {v} vs {exact}");
}

#[test]
fn twist_rotates_the_chord_about_the_stacking_point() {
    // Conventions: positive twist turns the leading edge toward -y about the stacking
    // point at (0, 0); LE at (-f c cos t, -f c sin t), TE at ((1-f) c cos t, (1-f) c sin t).
    let m = model(
        r#"
        [blade]
        section = "naca0012-closed"
        min-te-thickness = 0
        stacking = 0.3
        points-per-side = 120
        [[station]]
        radius = 100
        chord = 40
        twist = 30
        [[station]]
        radius = 200
        chord = 40
        twist = 30
        "#,
    );
    assert_solid(&m);
    let (le, te) = support::chord_line_at(m.mesh(), 150.0);
    let (s, c) = 30f64.to_radians().sin_cos();
    let (f, chord) = (0.3, 40.0);
    let le_exact = (-f * chord * c, -f * chord * s);
    let te_exact = ((1.0 - f) * chord * c, (1.0 - f) * chord * s);
    assert!(
        (le.x - le_exact.0).abs() < 0.02 && (le.y - le_exact.1).abs() < 0.02,
        "{le} vs {le_exact:?}"
    );
    assert!(
        (te.x - te_exact.0).abs() < 0.02 && (te.y - te_exact.1).abs() < 0.02,
        "{te} vs {te_exact:?}"
    );
    let angle = (te.y - le.y).atan2(te.x - le.x).to_degrees();
    assert!((angle - 30.0).abs() < 0.05, "chord angle {angle}");
}

#[test]
fn parry3d_mass_properties_agree() {
    // Independent reference library: parry3d's mass properties of the same triangles.
    let m = model(
        r#"
        [blade]
        section = "naca4412"
        [[station]]
        radius = 40
        chord = 60
        twist = 25
        section = "naca4415"
        [[station]]
        radius = 150
        chord = 40
        twist = 10
        [[station]]
        radius = 280
        chord = 25
        twist = 3
        "#,
    );
    assert_solid(&m);
    let mesh = m.mesh();
    let verts: Vec<parry3d::math::Vector> = mesh
        .vertices
        .iter()
        .map(|p| parry3d::math::Vector::new(p.x as f32, p.y as f32, p.z as f32))
        .collect();
    // parry3d 0.31 works in f32 (glam types); density 1 gives mass = volume.
    let props =
        parry3d::mass_properties::MassProperties::from_trimesh(1.0, &verts, &mesh.triangles);
    let ours = mesh.signed_volume();
    let theirs = props.mass() as f64;
    assert!(
        (ours / theirs - 1.0).abs() < 2e-3,
        "ours {ours} parry3d {theirs}"
    );
}

#[test]
fn truck_retessellation_of_the_exact_solid_agrees() {
    // Independent kernel: truck-meshalgo tessellates our exact B-rep (the STEP solid);
    // after welding its volume must match our mesh within 0.2 %.
    use truck_meshalgo::prelude::*;
    let m = model(
        r#"
        [blade]
        section = "naca2412"
        [[station]]
        radius = 30
        chord = 40
        twist = 15
        [[station]]
        radius = 120
        chord = 20
        twist = 2
        "#,
    );
    let solid = spanwright::export::step_solid(&m.skin).expect("exact solid");
    let mut poly = solid.triangulation(0.01).to_polygon();
    poly.put_together_same_attrs(1e-6);
    let theirs = poly.volume();
    let ours = m.mesh().signed_volume();
    assert!(
        (ours / theirs - 1.0).abs() < 2e-3,
        "ours {ours} truck {theirs}"
    );
}

#[test]
fn cambered_designations_keep_their_published_chord_line() {
    // NACA Report 460: upper surface x_u = x - y_t sin(theta), y_u = y_c + y_t cos(theta),
    // lower with the signs of y_t flipped, in the frame whose chord line runs from the
    // mean line's origin to the trailing edge. At zero twist the blade section must be
    // that outline scaled by the chord (highest and lowest ordinates within 0.02 mm).
    let (c, m, p, t) = (100.0, 0.04, 0.4, 0.15);
    let model = model(
        r#"
        [blade]
        section = "naca4415"
        points-per-side = 160
        tolerance = 0.002
        [[station]]
        radius = 100
        chord = 100
        twist = 0
        [[station]]
        radius = 200
        chord = 100
        twist = 0
        "#,
    );
    let (mut hi, mut lo) = (f64::MIN, f64::MAX);
    for i in 0..=20000 {
        let x = i as f64 / 20000.0;
        let yt = 5.0
            * t
            * (0.2969 * x.sqrt() - 0.1260 * x - 0.3516 * x * x + 0.2843 * x.powi(3)
                - 0.1015 * x.powi(4));
        let (yc, dyc) = if x < p {
            (
                m / (p * p) * (2.0 * p * x - x * x),
                2.0 * m / (p * p) * (p - x),
            )
        } else {
            let q = (1.0 - p) * (1.0 - p);
            (
                m / q * ((1.0 - 2.0 * p) + 2.0 * p * x - x * x),
                2.0 * m / q * (p - x),
            )
        };
        let th = dyc.atan();
        hi = hi.max(yc + yt * th.cos());
        lo = lo.min(yc - yt * th.cos());
    }
    let mesh = model.mesh();
    let ys = mesh
        .vertices
        .iter()
        .filter(|v| (v.z - 150.0).abs() < 60.0)
        .map(|v| v.y);
    let (top, bottom) = ys.fold((f64::MIN, f64::MAX), |(a, b), y| (a.max(y), b.min(y)));
    assert!((top - hi * c).abs() < 0.02, "highest {top} vs {}", hi * c);
    assert!(
        (bottom - lo * c).abs() < 0.02,
        "lowest {bottom} vs {}",
        lo * c
    );
}
