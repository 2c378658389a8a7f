//! Regressions of the STEP files that an independent reader (OpenCASCADE) read as an
//! open shell: a knot vector with a cubic knot of multiplicity 5 (the leading-edge split
//! of a symmetric section fell 1e-7 below a knot, and the writer merged the two), so the
//! reader dropped that face. Every file is read back: knots valid to ISO 10303-42, every
//! edge used by exactly two faces in opposite senses, truck's graded check closed.

mod brep_support;

use brep_support::{assert_closed, assert_knots_valid, read_shells};
use spanwright::export::{step_solid, step_text, StepHeader};
use spanwright::pipeline::{build_blade, Options};

/// `05-step-bad-knots.toml` of the shared reproducers (invented data: a symmetric
/// section and a round tip).
const BAD_KNOTS: &str = r#"
name = "v115"
[blade]
section = "naca0010"
[[station]]
radius = 417.195
chord = 64.627
twist = 3.888
[[station]]
radius = 472.447
chord = 54.471
twist = 3.298
[[station]]
radius = 525.821
chord = 44.661
twist = 3.118
[tip]
shape = "round"
"#;

/// `step-open-shell.toml` of the shared reproducers (invented data).
const OPEN_SHELL: &str = r#"
name = "v010"
[blade]
section = "naca0012"
stacking = 0.312
flow = "turbine"
rotation = "cw"
tolerance = 0.01
points-per-side = 40
[[station]]
radius = 62.82
chord = 48.005
twist = -4.618
section = "naca0012"
[[station]]
radius = 86.24
chord = 44.717
twist = -4.721
section = "naca0012"
[[station]]
radius = 103.577
chord = 43.159
twist = -4.776
section = "naca0011"
[[station]]
radius = 122.174
chord = 41.7
twist = -4.817
section = "naca0011"
[[station]]
radius = 149.501
chord = 39.787
twist = -4.848
section = "naca0010"
[[station]]
radius = 167.06
chord = 38.654
twist = -4.852
section = "naca0010"
[tip]
shape = "round"
"#;

#[test]
fn symmetric_sections_write_valid_knots_and_closed_shells() {
    for (name, toml) in [("bad knots", BAD_KNOTS), ("open shell", OPEN_SHELL)] {
        let design = spanwright::design::parse_toml_str(toml, None).unwrap();
        let model = build_blade(&design, &Options::default()).unwrap();
        let solid = step_solid(&model.skin).unwrap();
        let text = step_text(
            &[(name.to_string(), solid)],
            &StepHeader::default(),
            "r.step",
        );
        // ISO 10303-42 knot rules on every curve and surface as written.
        assert!(assert_knots_valid(&text) >= 10, "{name}");
        let shells = read_shells(&text);
        assert_eq!(shells.len(), 1, "{name}");
        assert_closed(&shells[0], name);
    }
}

/// `self-intersecting-root-tip.toml` of the shared reproducers (invented data: a
/// 23-station blade with a root shank and a round tip). The skin's ring placement once
/// halved the interval at the shank's kink down to rings 0.0003 mm apart, whose knots a
/// STEP file cannot tell apart, and the build failed writing STEP.
const ROOT_TIP: &str = r#"
name = "v195"

[blade]
section = "naca6411"
stacking = 0.287
flow = "propeller"
rotation = "ccw"
tolerance = 0.01
min-te-thickness = 0.3
points-per-side = 120

[[station]]
radius = 240.353
chord = 116.811
twist = 19.695
section = "naca6411"

[[station]]
radius = 254.331
chord = 116.724
twist = 19.181
section = "naca6411"

[[station]]
radius = 268.861
chord = 116.634
twist = 18.663
section = "naca6411"

[[station]]
radius = 286.072
chord = 116.527
twist = 18.071
section = "naca6411"

[[station]]
radius = 299.735
chord = 116.442
twist = 17.619
section = "naca6411"

[[station]]
radius = 312.288
chord = 116.365
twist = 17.216
section = "naca6411"

[[station]]
radius = 326.286
chord = 116.278
twist = 16.783
section = "naca6411"

[[station]]
radius = 340.956
chord = 116.188
twist = 16.347
section = "naca6411"

[[station]]
radius = 356.595
chord = 116.092
twist = 15.904
section = "naca6411"

[[station]]
radius = 371.844
chord = 115.998
twist = 15.492
section = "naca6411"

[[station]]
radius = 386.043
chord = 115.911
twist = 15.129
section = "naca6411"

[[station]]
radius = 398.209
chord = 115.836
twist = 14.832
section = "naca6411"

[[station]]
radius = 416.345
chord = 115.725
twist = 14.417
section = "naca6410"

[[station]]
radius = 430.138
chord = 115.641
twist = 14.123
section = "naca6410"

[[station]]
radius = 443.967
chord = 115.557
twist = 13.849
section = "naca6410"

[[station]]
radius = 458.447
chord = 115.469
twist = 13.584
section = "naca6410"

[[station]]
radius = 473.178
chord = 115.379
twist = 13.339
section = "naca6410"

[[station]]
radius = 489.236
chord = 115.282
twist = 13.102
section = "naca6410"

[[station]]
radius = 502.924
chord = 115.199
twist = 12.926
section = "naca6410"

[[station]]
radius = 518.684
chord = 115.103
twist = 12.755
section = "naca6410"

[[station]]
radius = 532.589
chord = 115.019
twist = 12.636
section = "naca6410"

[[station]]
radius = 544.4
chord = 114.948
twist = 12.562
section = "naca6410"

[[station]]
radius = 560.374
chord = 114.852
twist = 12.512
section = "naca6410"

[root]
shank-diameter = 47.299
shank-length = 28.413
transition-length = 127.698

[tip]
shape = "round"

"#;

#[test]
fn a_kink_in_the_spanwise_law_still_writes_valid_knots() {
    let design = spanwright::design::parse_toml_str(ROOT_TIP, None).unwrap();
    let outcome = spanwright::pipeline::run(&design, &Options::default()).unwrap();
    let part = &outcome.parts[0];
    let text = spanwright::export::part_step_text(&outcome, part)
        .unwrap()
        .expect("the blade's exact solid");
    assert!(assert_knots_valid(&text) >= 10);
    let shells = read_shells(&text);
    assert_eq!(shells.len(), 1);
    assert_closed(&shells[0], "root and round tip");
    // Neighbouring rings at least 1e-5 of the span apart (crate::rings).
    let r = &outcome.blade.ring_radii;
    let span = r[r.len() - 1] - r[0];
    let gap = r
        .windows(2)
        .map(|w| w[1] - w[0])
        .fold(f64::INFINITY, f64::min);
    assert!(gap >= 1e-5 * span * 0.999, "rings {gap} mm apart");
}
