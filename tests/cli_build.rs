//! `spanwright build` as a user meets it: exit codes, messages that name the file and the
//! line or key, and nothing half-written in the output folder.

mod support;

use support::{run_in_temp, Run};

/// Writes `files` into a fresh temp dir and runs `spanwright build <args> --out out`
/// there.
fn build(files: &[(&str, &str)], args: &[&str]) -> Run {
    let mut all = vec!["build"];
    all.extend_from_slice(args);
    all.extend(["--out", "out"]);
    run_in_temp(files, &all)
}

const GOOD_CSV: &str =
    "radius,chord,twist,section\n40,60,25,naca4415\n150,40,10,naca4412\n280,25,3,naca4412\n";

#[test]
fn builds_a_bare_csv_with_a_section_name() {
    let r = build(
        &[(
            "t.csv",
            "radius [mm],chord [mm],twist [deg]\n40,60,25\n280,25,3\n",
        )],
        &["t.csv", "--section", "naca4412", "--format", "stl,3mf,step"],
    );
    assert_eq!(r.code, 0, "{}", r.stderr);
    assert_eq!(
        r.files("out"),
        ["t-preview.png", "t.3mf", "t.step", "t.stl"]
    );
    assert!(
        r.stdout.contains("closed, oriented, no self-intersection"),
        "{}",
        r.stdout
    );
}

#[test]
fn json_summary_is_valid_json() {
    let r = build(&[("t.csv", GOOD_CSV)], &["t.csv", "--json"]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let v: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    assert!(v["triangles"].as_u64().unwrap() > 1000);
    assert!(v["measured_deviation_mm"].as_f64().unwrap() <= 0.01);
}

/// Bad inputs: each must exit 2, name the file and where, and write nothing.
#[test]
fn malformed_inputs_exit_2_name_the_place_and_write_nothing() {
    let toml = |body: &str| format!("[blade]\nsection = \"naca4412\"\n{body}");
    let two = "[[station]]\nradius = 40\nchord = 60\ntwist = 25\n[[station]]\nradius = 280\nchord = 25\ntwist = 3\n";
    // (case, files, args, substrings the message must contain)
    type Case<'a> = (&'a str, Vec<(&'a str, String)>, Vec<&'a str>, Vec<&'a str>);
    let cases: Vec<Case> = vec![
        ("missing column", vec![("t.csv", "radius,twist,section\n40,25,naca4412\n280,3,naca4412\n".into())], vec!["t.csv"], vec!["t.csv", "chord"]),
        ("decreasing radius", vec![("t.csv", "radius,chord,twist,section\n40,60,25,naca4412\n30,25,3,naca4412\n".into())], vec!["t.csv"], vec!["t.csv:3", "radius"]),
        ("negative chord", vec![("t.csv", "radius,chord,twist,section\n40,-60,25,naca4412\n280,25,3,naca4412\n".into())], vec!["t.csv"], vec!["t.csv:2", "chord"]),
        ("zero chord", vec![("t.csv", "radius,chord,twist,section\n40,60,25,naca4412\n280,0,3,naca4412\n".into())], vec!["t.csv"], vec!["t.csv:3", "chord"]),
        ("NaN", vec![("t.csv", "radius,chord,twist,section\n40,NaN,25,naca4412\n280,25,3,naca4412\n".into())], vec!["t.csv"], vec!["t.csv:2"]),
        ("unknown section", vec![("t.csv", "radius,chord,twist,section\n40,60,25,naca4412\n280,25,3,wing-thing\n".into())], vec!["t.csv"], vec!["t.csv:3", "wing-thing"]),
        ("unknown unit", vec![("d.toml", format!("units = {{ length = \"furlong\" }}\n{}", toml(two)))], vec!["d.toml"], vec!["d.toml", "furlong"]),
        ("empty file", vec![("t.csv", String::new())], vec!["t.csv"], vec!["t.csv"]),
        ("wrong type", vec![("d.toml", toml("[[station]]\nradius = 40\nchord = \"wide\"\ntwist = 25\n[[station]]\nradius = 280\nchord = 25\ntwist = 3\n"))], vec!["d.toml"], vec!["d.toml", "chord"]),
        ("duplicate radius", vec![("t.csv", "radius,chord,twist,section\n40,60,25,naca4412\n40,25,3,naca4412\n".into())], vec!["t.csv"], vec!["t.csv:3"]),
        ("ragged rows", vec![("t.csv", "radius,chord,twist,section\n40,60,25\n280,25,3,naca4412\n".into())], vec!["t.csv"], vec!["t.csv:2"]),
        ("unknown key", vec![("d.toml", toml(&format!("chrod = 3\n{two}")))], vec!["d.toml"], vec!["d.toml", "chrod"]),
        ("single station", vec![("t.csv", "radius,chord,twist,section\n40,60,25,naca4412\n".into())], vec!["t.csv"], vec!["t.csv"]),
        ("missing stations file", vec![("d.toml", "stations = \"nowhere.csv\"\n[blade]\nsection = \"naca4412\"\n".into())], vec!["d.toml"], vec!["nowhere.csv"]),
        ("missing design file", vec![], vec!["absent.toml"], vec!["absent.toml"]),
        ("unknown format", vec![("t.csv", GOOD_CSV.into())], vec!["t.csv", "--format", "dwg"], vec!["dwg"]),
        ("negative tolerance", vec![("t.csv", GOOD_CSV.into())], vec!["t.csv", "--tolerance=-1"], vec!["tolerance"]),
        ("bore wider than shank", vec![("d.toml", toml(&format!("{two}[root]\nshank-diameter = 20\nshank-length = 20\ntransition-length = 18\n[root.bore]\ndiameter = 25\ndepth = 8\n")))], vec!["d.toml"], vec!["bore"]),
        ("bare csv without a section", vec![("t.csv", "radius,chord,twist\n40,60,25\n280,25,3\n".into())], vec!["t.csv"], vec!["t.csv", "section"]),
    ];
    assert!(cases.len() >= 15);
    for (name, files, args, needles) in cases {
        let files: Vec<(&str, &str)> = files.iter().map(|(n, t)| (*n, t.as_str())).collect();
        let r = build(&files, &args);
        assert_eq!(r.code, 2, "{name}: exit {} stderr {}", r.code, r.stderr);
        for needle in needles {
            assert!(
                r.stderr.contains(needle),
                "{name}: message lacks {needle:?}:\n{}",
                r.stderr
            );
        }
        assert!(!r.stderr.contains("panicked"), "{name}: {}", r.stderr);
        assert!(
            r.files("out").is_empty(),
            "{name}: wrote {:?}",
            r.files("out")
        );
    }
}

#[test]
fn a_part_that_fails_its_checks_is_not_written_and_exits_1() {
    // Valid syntax, but twelve blades of 60 mm root chord at 40 mm from the axis: the
    // circle there is 2 pi 40 = 251 mm around, 21 mm per blade, so neighbouring blades
    // cross (plane geometry). The assembled rotor fails its bodies-apart check and
    // nothing is written, not even the blade that passed its own checks.
    let toml = "name = \"crowd\"\n[blade]\nsection = \"naca4412\"\n\
                [[station]]\nradius = 40\nchord = 60\ntwist = 0\n\
                [[station]]\nradius = 200\nchord = 40\ntwist = 0\n\
                [rotor]\nblades = 12\n";
    let r = build(&[("crowd.toml", toml)], &["crowd.toml"]);
    assert_eq!(r.code, 1, "{}{}", r.stdout, r.stderr);
    assert!(r.stderr.contains("nothing was written"), "{}", r.stderr);
    assert!(
        r.stderr
            .contains("'crowd-blade-1' and 'crowd-blade-2' cross or touch"),
        "{}",
        r.stderr
    );
    assert!(r.files("out").is_empty());
}

#[test]
fn steep_steps_are_named_and_the_blade_follows_them() {
    // The twist swings by 165 degrees within each millimetre of span. The skin's rings
    // are placed until it follows the design's own spanwise law (crate::rings), so the
    // sections between stations are the design's rotated sections and the solid is valid;
    // the steep steps are still named as a warning with both rows.
    let csv = "radius,chord,twist,section\n40,60,0,naca4412\n41,60,85,naca4412\n42,60,-80,naca4412\n43,60,80,naca4412\n200,30,0,naca4412\n";
    let r = build(&[("fold.csv", csv)], &["fold.csv"]);
    assert_eq!(r.code, 0, "{}{}", r.stdout, r.stderr);
    assert!(
        r.stdout
            .contains("warning: fold.csv:3 -> fold.csv:4: twist changes by 165.0 degrees"),
        "{}",
        r.stdout
    );
    assert!(
        r.stdout.contains("closed, oriented, no self-intersection"),
        "{}",
        r.stdout
    );
}
