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
