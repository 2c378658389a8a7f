//! The segment switch and tables through the real binary: files named for blade,
//! segment and order in every format (STEP included), the same bytes on every run, and
//! the refusals: exit 1 for a plan, channel, pin or fit that cannot be made (naming the
//! widest rod or largest pin that would), exit 2 for bad values (naming the key).

#[macro_use]
mod support;

use support::run_in_temp;

use support::long_blade as blade;

#[test]
fn demo_writes_every_segment_in_every_format() {
    let run = run_in_temp(
        &[],
        &[
            "build",
            "@/examples/barn-turbine.toml",
            "--format",
            "stl,3mf,obj,step",
            "--blade-only",
        ],
    );
    assert_eq!(run.code, 0, "{}\n{}", run.stdout, run.stderr);
    let files = run.files("out");
    for f in [
        "barn-turbine-segment-1-of-2.stl",
        "barn-turbine-segment-2-of-2.stl",
        "barn-turbine-segment-1-of-2.3mf",
        "barn-turbine-segment-2-of-2.obj",
        "barn-turbine.step",
    ] {
        assert!(files.contains(&f.to_string()), "{f} missing from {files:?}");
    }
    // Each segment's exact solid (split faces, channel, pin holes; its agreement with
    // the mesh is checked in tests/export_step_segments.rs), and no note.
    for f in [
        "barn-turbine-segment-1-of-2.step",
        "barn-turbine-segment-2-of-2.step",
    ] {
        assert!(files.contains(&f.to_string()), "{f} missing from {files:?}");
    }
    assert!(!run.stdout.contains("no STEP file"), "{}", run.stdout);
    // Why the split is where it is, as the plan says it.
    assert!(run.stdout.contains("split 1 at"), "{}", run.stdout);
    assert!(run.stdout.contains("even lengths aim at"), "{}", run.stdout);
    assert!(run.stdout.contains("the printer allows"), "{}", run.stdout);
    assert!(run.stdout.contains("cut the rod to"), "{}", run.stdout);
    assert!(
        run.stdout.contains("Caution: a split blade"),
        "{}",
        run.stdout
    );
    // Binary STL: 80-byte header, u32 count, 50 bytes a facet (the STL format of 3D
    // Systems' StereoLithography Interface Specification, 1988).
    let bytes = std::fs::read(run.path("out/barn-turbine-segment-2-of-2.stl")).unwrap();
    let n = u32::from_le_bytes(bytes[80..84].try_into().unwrap()) as usize;
    assert_eq!(bytes.len(), 84 + 50 * n);
    // Deterministic output: the same bytes again.
    let again = run_in_temp(
        &[],
        &["build", "@/examples/barn-turbine.toml", "--blade-only"],
    );
    let other = std::fs::read(again.path("out/barn-turbine-segment-2-of-2.stl")).unwrap();
    assert!(bytes == other, "segment bytes differ between runs");
}

#[test]
fn split_switch_and_channel_without_segments() {
    let design = blade("[spar-channel]\ndiameter = 4\n");
    // The channel alone: the blade carries it, opening at the root face, in its mesh
    // and its STEP solid.
    let run = run_in_temp(
        &[("d.toml", &design)],
        &["build", "d.toml", "--format", "stl,step"],
    );
    assert_eq!(run.code, 0, "{}", run.stderr);
    assert!(
        run.stdout.contains("open at the root face"),
        "{}",
        run.stdout
    );
    assert!(!run.stdout.contains("no STEP file"), "{}", run.stdout);
    assert!(run.files("out").contains(&"long.step".to_string()));
    // Split at given radii from the command line: two joints, three segments.
    let run = run_in_temp(
        &[("d.toml", &design)],
        &["build", "d.toml", "--split", "150,260"],
    );
    assert_eq!(run.code, 0, "{}", run.stderr);
    for k in 1..=3 {
        assert!(run
            .files("out")
            .contains(&format!("long-segment-{k}-of-3.stl")));
    }
    assert!(run.stdout.contains("150.0 mm (given)"), "{}", run.stdout);
    // fit --split auto on a small printer lays every segment out.
    let run = run_in_temp(
        &[("d.toml", &design)],
        &[
            "fit",
            "d.toml",
            "--split",
            "auto",
            "--volume",
            "150,150,150",
            "--no-files",
        ],
    );
    assert_eq!(run.code, 0, "{}\n{}", run.stdout, run.stderr);
    assert!(run.stdout.contains("the fewest that fit"), "{}", run.stdout);
    assert!(run.stdout.contains("long-segment-1-of-"), "{}", run.stdout);
    assert!(run.stdout.contains("verdict: FITS"), "{}", run.stdout);
}

#[test]
fn refusals_name_what_would_fit() {
    // A rod too thick for the blade: exit 1, naming the widest rod.
    let run = run_in_temp(
        &[("d.toml", &blade("[spar-channel]\ndiameter = 30\n"))],
        &["build", "d.toml"],
    );
    assert_eq!(run.code, 1, "{}", run.stderr);
    assert!(
        run.stderr.contains("widest rod that fits is"),
        "{}",
        run.stderr
    );
    // Pins too large for the section: exit 1, naming the largest pin.
    let run = run_in_temp(
        &[(
            "d.toml",
            &blade("[segments]\nsplit = [200]\ndowels = { diameter = 9 }\n[spar-channel]\ndiameter = 3\n"),
        )],
        &["build", "d.toml"],
    );
    assert_eq!(run.code, 1, "{}", run.stderr);
    assert!(
        run.stderr.contains("largest pin that fits there is"),
        "{}",
        run.stderr
    );
    // A given split leaving a segment too long for the printer: exit 1.
    let run = run_in_temp(
        &[(
            "d.toml",
            &blade("[segments]\nsplit = [100]\n[printer]\nvolume = [150, 150, 150]\n"),
        )],
        &["build", "d.toml"],
    );
    assert_eq!(run.code, 1, "{}", run.stderr);
    assert!(
        run.stderr.contains("segment 2 of 2") && run.stderr.contains("does not fit"),
        "{}",
        run.stderr
    );
    // Bad values: exit 2 with the key and the line.
    let run = run_in_temp(
        &[("d.toml", &blade("[segments]\nsplit = \"half\"\n"))],
        &["build", "d.toml"],
    );
    assert_eq!(run.code, 2, "{}", run.stderr);
    assert!(
        run.stderr.contains("segments.split") && run.stderr.contains("d.toml:"),
        "{}",
        run.stderr
    );
    let run = run_in_temp(
        &[("d.toml", &blade("[segments]\nsplit = \"auto\"\n"))],
        &["build", "d.toml"],
    );
    assert_eq!(run.code, 2, "{}", run.stderr);
    assert!(run.stderr.contains("needs a printer"), "{}", run.stderr);
    let run = run_in_temp(
        &[("d.toml", &blade(""))],
        &["build", "d.toml", "--split", "1o0"],
    );
    assert_eq!(run.code, 2, "{}", run.stderr);
    assert!(run.stderr.contains("--split"), "{}", run.stderr);
}

#[test]
fn the_variants_summary_counts_the_segments() {
    // The summary row of a split design says how many pieces each blade prints in (the
    // plan's count); PLA preset and the default fill, no load case.
    let d = spanwright::design::load(std::path::Path::new("examples/barn-turbine.toml")).unwrap();
    let outcome = spanwright::pipeline::run(&d, &spanwright::pipeline::Options::default()).unwrap();
    let pla = spanwright::props::Material::preset("pla").unwrap();
    let row = spanwright::report::SummaryRow::of(
        "barn",
        "barn",
        &d,
        &outcome,
        &pla,
        spanwright::props::Fill::DEFAULT,
        None,
    )
    .unwrap();
    assert_eq!(row.segments, outcome.segments.as_ref().unwrap().count);
    assert_eq!(row.segments, 2);
}
