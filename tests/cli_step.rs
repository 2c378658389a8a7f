//! `spanwright build --format step` writes every part's exact solid: the blade, the hub,
//! the one-piece rotor as plain solids, and the assembled rotor as an ISO 10303 product
//! structure (AP214: one PRODUCT per distinct part, one NEXT_ASSEMBLY_USAGE_OCCURRENCE
//! per placed instance, ISO 10303-44 clause 4.3).

#[macro_use]
mod support;

use support::run_in_temp;

fn count(text: &str, entity: &str) -> usize {
    text.matches(&format!("= {entity}(")).count()
}

#[test]
fn demo_turbine_step_files_are_the_parts_and_an_assembly() {
    let r = run_in_temp(
        &[],
        &[
            "build",
            "@/examples/garden-turbine.toml",
            "--format",
            "stl,step",
            "-o",
            "out",
            "--coupons",
            "none",
        ],
    );
    assert_eq!(r.code, 0, "{}", r.stderr);
    let files = r.files("out");
    for f in [
        "garden-turbine.step",
        "garden-turbine-hub.step",
        "garden-turbine-rotor.step",
    ] {
        assert!(files.contains(&f.to_string()), "{f} missing: {files:?}");
    }
    let blade = std::fs::read_to_string(r.path("out/garden-turbine.step")).unwrap();
    assert_eq!(count(&blade, "MANIFOLD_SOLID_BREP"), 1);
    assert_eq!(count(&blade, "NEXT_ASSEMBLY_USAGE_OCCURRENCE"), 0);
    let rotor = std::fs::read_to_string(r.path("out/garden-turbine-rotor.step")).unwrap();
    // Two distinct parts (blade, hub) plus the rotor itself; three blades and one hub
    // placed; each part's solid written once.
    assert_eq!(count(&rotor, "PRODUCT"), 3, "products");
    assert_eq!(
        count(&rotor, "NEXT_ASSEMBLY_USAGE_OCCURRENCE"),
        4,
        "instances"
    );
    assert_eq!(count(&rotor, "MANIFOLD_SOLID_BREP"), 2, "solids");
    assert!(
        !r.stdout.contains("no STEP file"),
        "every part has its STEP: {}",
        r.stdout
    );
}

#[test]
fn desk_fan_one_piece_rotor_has_its_step() {
    let r = run_in_temp(
        &[],
        &[
            "build",
            "@/examples/desk-fan.toml",
            "--format",
            "step",
            "-o",
            "out",
        ],
    );
    assert_eq!(r.code, 0, "{}", r.stderr);
    let whole = std::fs::read_to_string(r.path("out/desk-fan-rotor-one-piece.step")).unwrap();
    assert_eq!(count(&whole, "MANIFOLD_SOLID_BREP"), 1);
    // The same bytes on a second run (fixed header time stamp).
    let again = run_in_temp(
        &[],
        &[
            "build",
            "@/examples/desk-fan.toml",
            "--format",
            "step",
            "-o",
            "out",
        ],
    );
    let twice = std::fs::read_to_string(again.path("out/desk-fan-rotor-one-piece.step")).unwrap();
    assert!(whole == twice, "STEP bytes differ between runs");
}
