//! `[[variant]]` entries: each variant a whole design, read by the design reader, with
//! problems that name the variant, the key and the line.

#[macro_use]
mod support;

use spanwright::design::variants::{expand_str, variants};
use spanwright::design::{self, Rotation};

const BASE: &str = r#"name = "fan"
[blade]
section = "naca4412"
[[station]]
radius = 60
chord = 50
twist = 20
[[station]]
radius = 150
chord = 35
twist = 8
[[station]]
radius = 240
chord = 22
twist = 3
sweep = 2
[rotor]
blades = 3
hub-radius = 60
"#;

/// Line (from 1) of the first line of `text` that starts with `start`.
fn line_of(text: &str, start: &str) -> usize {
    text.lines()
        .position(|l| l.trim_start().starts_with(start))
        .expect("the line is there")
        + 1
}

#[test]
fn variants_change_what_they_name_and_nothing_else() {
    let text = format!(
        r#"{BASE}
[[variant]]
name = "as-is"

[[variant]]
name = "cw"
blade.rotation = "cw"
rotor.blades = 2

[[variant]]
name = "long"
tip-radius = 330

[[variant]]
name = "big"
scale = 1.5
section = "naca0012"
"#
    );
    let base = design::parse_toml_str(&text, None).unwrap();
    let v = expand_str(&text, None).unwrap();
    let names: Vec<&str> = v.iter().map(|v| v.name.as_str()).collect();
    assert_eq!(names, ["as-is", "cw", "long", "big"]);
    // A variant with no changes is the design itself (stations, their origins in this
    // file, options, tables), under its own name.
    assert_eq!(v[0].design.name, "fan-as-is");
    assert_eq!(v[0].design.stations, base.stations);
    assert_eq!(v[0].design.blade, base.blade);
    let mut tables = base.tables.clone();
    tables.remove("variant");
    assert_eq!(v[0].design.tables, tables);
    // Overrides of the blade and of a later stage's table.
    assert_eq!(v[1].design.blade.rotation, Rotation::Cw);
    assert_eq!(base.blade.rotation, Rotation::Ccw);
    assert_eq!(v[1].design.tables["rotor"]["blades"].as_integer(), Some(2));
    assert_eq!(
        v[1].design.tables["rotor"]["hub-radius"].as_integer(),
        Some(60)
    );
    // tip-radius: the first station stays, the last moves to 330 and the middle one keeps
    // its place in proportion: 60 + (150 - 60) x (330 - 60) / (240 - 60) = 195 (by hand).
    let r: Vec<f64> = v[2].design.stations.iter().map(|s| s.radius).collect();
    assert_near!(r[0], 60.0, 1e-12, "first station kept");
    assert_near!(r[1], 195.0, 1e-9, "proportional stretch, by hand");
    assert_near!(r[2], 330.0, 1e-12, "tip-radius");
    assert_eq!(v[2].design.stations[1].chord, 35.0);
    // scale: radius, chord, sweep times 1.5; twist unchanged; every section replaced.
    let big = &v[3].design.stations;
    assert_near!(big[2].radius, 360.0, 1e-12, "240 x 1.5");
    assert_near!(big[2].chord, 33.0, 1e-12, "22 x 1.5");
    assert_near!(big[2].sweep, 3.0, 1e-12, "2 x 1.5");
    assert_near!(big[2].twist, 3.0, 0.0, "twist unchanged");
    assert!(big.iter().all(|s| s.section == "naca0012"));
}

#[test]
fn lengths_are_in_the_files_unit() {
    // units.length = "in": tip-radius = 10 in is 254 mm (1 in = 25.4 mm exactly, by
    // definition: NIST SP 811, 2008, B.8).
    let text = r#"units = { length = "in" }
[blade]
section = "naca4412"
[[station]]
radius = 2
chord = 2
twist = 20
[[station]]
radius = 8
chord = 1
twist = 4
[[variant]]
name = "ten"
tip-radius = 10
"#;
    let v = expand_str(text, None).unwrap();
    assert_near!(v[0].design.stations[1].radius, 254.0, 1e-9, "10 in in mm");
}

#[test]
fn problems_name_the_variant_the_key_and_the_line() {
    let text = format!(
        r#"{BASE}
[[variant]]
name = "ok"

[[variant]]
name = "typo"
blade.rotation = "cww"
blade.flw = "turbine"

[[variant]]
name = "ok"
rotr.blades = 2
flow = "propeller"
units.length = "m"

[[variant]]
scale = -1

[[variant]]
name = "short"
tip-radius = 50
"#
    );
    let e = expand_str(&text, Some(std::path::Path::new("fan.toml"))).unwrap_err();
    let shown = e.to_string();
    let expect = |key: &str, line: usize, words: &[&str]| {
        let p = e
            .problems
            .iter()
            .find(|p| p.key.as_deref() == Some(key))
            .unwrap_or_else(|| panic!("no problem at {key}:\n{shown}"));
        assert_eq!(p.line, Some(line), "line of {key}:\n{shown}");
        assert_eq!(p.file, std::path::Path::new("fan.toml"));
        for w in words {
            assert!(p.to_string().contains(w), "{key}: {p} lacks {w}");
        }
    };
    expect(
        "variant[2].blade.rotation",
        line_of(&text, "blade.rotation = \"cww\""),
        &["variant \"typo\"", "cww"],
    );
    expect(
        "variant[2].blade.flw",
        line_of(&text, "blade.flw"),
        &["variant \"typo\"", "did you mean 'flow'"],
    );
    expect(
        "variant[3].name",
        line_of(&text, "rotr.blades") - 1,
        &["also the name of variant[1]"],
    );
    expect(
        "variant[3].rotr",
        line_of(&text, "rotr.blades"),
        &["did you mean 'rotor'"],
    );
    expect(
        "variant[3].flow",
        line_of(&text, "flow = \"propeller\""),
        &["blade.flow"],
    );
    expect(
        "variant[3].units",
        line_of(&text, "units.length"),
        &["cannot change 'units'"],
    );
    // A problem with the whole entry is at its first line.
    expect(
        "variant[4]",
        line_of(&text, "scale = -1") - 1,
        &["missing 'name'"],
    );
    expect("variant[4].scale", line_of(&text, "scale = -1"), &["-1"]);
    expect(
        "variant[5].tip-radius",
        line_of(&text, "tip-radius = 50"),
        &["variant \"short\"", "first station"],
    );
    // All at once, in file order.
    assert_eq!(e.problems.len(), 9, "{shown}");
    let lines: Vec<usize> = e.problems.iter().map(|p| p.line.unwrap()).collect();
    assert!(lines.windows(2).all(|w| w[0] <= w[1]), "{lines:?}");
}

#[test]
fn duplicate_name_is_reported_at_its_own_line() {
    let text = format!("{BASE}\n[[variant]]\nname = \"a\"\n[[variant]]\nname = \"a\"\n");
    let e = expand_str(&text, None).unwrap_err();
    assert_eq!(e.problems.len(), 1);
    let last = text.lines().count();
    assert_eq!(e.problems[0].line, Some(last));
    assert_eq!(e.problems[0].key.as_deref(), Some("variant[2].name"));
}

#[test]
fn a_csv_station_table_and_a_loaded_design() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("t.csv"),
        "radius,chord,twist,section\n50,40,15,naca4412\n200,20,3,naca4412\n",
    )
    .unwrap();
    let toml = dir.path().join("t.toml");
    std::fs::write(
        &toml,
        "stations = \"t.csv\"\n[[variant]]\nname = \"sym\"\nsection = \"naca0012\"\n[[variant]]\nname = \"half\"\nscale = 0.5\n",
    )
    .unwrap();
    let d = design::load(&toml).unwrap();
    let v = variants(&d).unwrap();
    assert_eq!(v.len(), 2);
    assert!(v[0].design.stations.iter().all(|s| s.section == "naca0012"));
    // The CSV rows keep their origins in the CSV file.
    assert_eq!(v[0].design.stations[1].origin, d.stations[1].origin);
    assert_near!(v[1].design.stations[1].radius, 100.0, 1e-12, "200 x 0.5");
    assert_eq!(v[1].design.source.as_deref(), Some(toml.as_path()));
    // A design without variants has none.
    let plain = design::parse_toml_str(BASE, None).unwrap();
    assert!(variants(&plain).unwrap().is_empty());
}
