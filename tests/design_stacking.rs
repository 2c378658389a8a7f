//! Reading `stacking` values: the blade key, the per-station key and the CSV column, and
//! the errors for bad values (each naming its key or line, with a fix).

use spanwright::design::{parse_csv_str, parse_toml_str, DesignError, Problem, Stacking};

const STATIONS: &str = "[[station]]\nradius = 10\nchord = 5\ntwist = 1\n\
                        [[station]]\nradius = 20\nchord = 4\ntwist = 1\n";

fn toml(blade: &str, stations: &str) -> Result<spanwright::design::Design, DesignError> {
    parse_toml_str(
        &format!("[blade]\nsection = \"naca0012\"\n{blade}\n{stations}"),
        None,
    )
}

/// The one problem whose key (TOML) or line (CSV) is `at`.
fn problem<'a>(e: &'a DesignError, key: Option<&str>, line: Option<usize>) -> &'a Problem {
    e.problems
        .iter()
        .find(|p| {
            key.is_none_or(|k| p.key.as_deref() == Some(k)) && (line.is_none() || p.line == line)
        })
        .unwrap_or_else(|| panic!("no problem at {key:?} / {line:?} in:\n{e}"))
}

#[test]
fn blade_key_takes_fractions_and_rule_names() {
    for (text, want) in [
        ("stacking = 0.3", Stacking::ChordFraction(0.3)),
        ("stacking = 1", Stacking::ChordFraction(1.0)),
        ("stacking = \"quarter-chord\"", Stacking::QuarterChord),
        ("stacking = \"aerodynamic-center\"", Stacking::QuarterChord),
        ("stacking = \"centroid\"", Stacking::Centroid),
        ("stacking = \"Thickest\"", Stacking::Thickest),
        ("", Stacking::QuarterChord),
    ] {
        let d = toml(text, STATIONS).unwrap();
        assert_eq!(d.blade.stacking, want, "{text}");
        assert!(d.stations.iter().all(|s| s.stacking.is_none()));
    }
}

#[test]
fn station_key_overrides_the_blade() {
    let stations = STATIONS.replace("chord = 4\n", "chord = 4\nstacking = \"centroid\"\n");
    let d = toml("stacking = 0.3", &stations).unwrap();
    assert_eq!(d.stations[0].stacking, None);
    assert_eq!(d.stations[1].stacking, Some(Stacking::Centroid));
    assert_eq!(d.blade.stacking, Stacking::ChordFraction(0.3));
}

#[test]
fn bad_toml_values_name_the_key_and_the_fix() {
    let stations = STATIONS.replace("chord = 4\n", "chord = 4\nstacking = \"thickst\"\n");
    let e = toml("stacking = 1.5", &stations).unwrap_err();
    let p = problem(&e, Some("blade.stacking"), Some(3));
    assert!(
        p.message.contains("1.5") && p.message.contains("outside 0..1"),
        "{p}"
    );
    assert!(p.hint.as_deref().unwrap().contains("quarter-chord"), "{p}");
    let p = problem(&e, Some("station[2].stacking"), None);
    assert!(p.message.contains("\"thickst\""), "{p}");
    assert_eq!(p.hint.as_deref(), Some("did you mean 'thickest'?"));
    assert_eq!(e.problems.len(), 2, "{e}");

    let e = toml("stacking = \"centriod\"", STATIONS).unwrap_err();
    let p = problem(&e, Some("blade.stacking"), None);
    assert_eq!(p.hint.as_deref(), Some("did you mean 'centroid'?"), "{p}");

    // Percent written where a fraction is meant: the hint gives the fraction.
    let e = toml("stacking = 25", STATIONS).unwrap_err();
    let hint = problem(&e, Some("blade.stacking"), None)
        .hint
        .clone()
        .unwrap();
    assert!(hint.contains("write 0.25"), "{hint}");

    let e = toml("stacking = \"0.3\"", STATIONS).unwrap_err();
    let p = problem(&e, Some("blade.stacking"), None);
    assert_eq!(
        p.hint.as_deref(),
        Some("write it without quotes: stacking = 0.3")
    );

    let e = toml("stacking = true", STATIONS).unwrap_err();
    let p = problem(&e, Some("blade.stacking"), None);
    assert!(
        p.message
            .contains("a chord fraction or a stacking rule name"),
        "{p}"
    );

    let e = toml("stacking = -0.1", STATIONS).unwrap_err();
    assert!(
        e.to_string()
            .starts_with("<design>:3: blade.stacking: stacking -0.1 is outside 0..1"),
        "{e}"
    );
}

#[test]
fn csv_column_reads_fractions_percent_and_names() {
    let text = "radius,chord,twist,stacking\n10,5,1,0.3\n20,4,1,\n30,3,1,centroid\n";
    let d = parse_csv_str(text, None, Some("naca0012")).unwrap();
    let got: Vec<_> = d.stations.iter().map(|s| s.stacking).collect();
    assert_eq!(
        got,
        [
            Some(Stacking::ChordFraction(0.3)),
            None,
            Some(Stacking::Centroid)
        ]
    );
    let text = "radius;chord;twist;Stacking [%]\n10;5;1;30\n20;4;1;32,5\n";
    let d = parse_csv_str(text, None, Some("naca0012")).unwrap();
    assert_eq!(d.stations[1].stacking, Some(Stacking::ChordFraction(0.325)));
}

#[test]
fn bad_csv_cells_name_the_line_and_the_fix() {
    let text =
        "radius,chord,twist,stacking\n10,5,1,1.2\n20,4,1,centre\n30,3,1,thickest\n40,2,1,xyz\n";
    let e = parse_csv_str(text, None, Some("naca0012")).unwrap_err();
    let p = problem(&e, None, Some(2));
    assert!(p.message.contains("stacking 1.2 is outside 0..1"), "{p}");
    let p = problem(&e, None, Some(3));
    assert!(p.message.contains("\"centre\""), "{p}");
    assert!(
        p.hint
            .as_deref()
            .unwrap()
            .contains("one of: quarter-chord, centroid, thickest"),
        "{p}"
    );
    let p = problem(&e, None, Some(5));
    assert!(p.message.contains("\"xyz\""), "{p}");
    assert_eq!(e.problems.len(), 3, "{e}");
    // A mistyped header and an unknown unit are refused at the header.
    let e = parse_csv_str(
        "radius,chord,twist,stackng\n10,5,1,0.3\n20,4,1,0.3\n",
        None,
        Some("a"),
    )
    .unwrap_err();
    assert!(e.to_string().contains("did you mean 'stacking'?"), "{e}");
    let e = parse_csv_str(
        "radius,chord,twist,stacking [mm]\n10,5,1,0.3\n20,4,1,0.3\n",
        None,
        Some("a"),
    )
    .unwrap_err();
    assert!(e.to_string().contains("unknown stacking unit 'mm'"), "{e}");
}
