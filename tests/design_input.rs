//! Design input: TOML and CSV reading, unit conversion, and the reporting of every
//! problem with its file and line or key path.
//!
//! Unit factors are checked against NIST Special Publication 811, "Guide for the Use of
//! the International System of Units (SI)", 2008 edition, Appendix B (B.8 and B.9):
//! 1 in = 2.54 cm exactly, 1 rad = 57.29578 degrees (180/pi).

#[macro_use]
mod support;

use std::fs;
use std::path::{Path, PathBuf};

use spanwright::design::{self, Design, DesignError, Flow, Rotation};
use tempfile::TempDir;

/// 1 inch in mm, exact by definition (NIST SP 811, 2008, Appendix B.8: 1 in = 2.54 cm).
const INCH_MM: f64 = 25.4;
/// Degrees per radian (NIST SP 811, 2008, Appendix B.9: 1 rad = 57.29578 deg).
const DEG_PER_RAD: f64 = 57.29578;

fn write(dir: &TempDir, name: &str, text: &str) -> PathBuf {
    let p = dir.path().join(name);
    fs::write(&p, text).unwrap();
    p
}

fn load_err(path: &Path) -> DesignError {
    match design::load(path) {
        Ok(d) => panic!("expected an error, got {d:?}"),
        Err(e) => e,
    }
}

/// Asserts that some line of the error names `file`, `line` and contains all `words`.
fn has(err: &DesignError, file: &Path, line: usize, words: &[&str]) {
    let text = err.to_string();
    let prefix = format!("{}:{line}:", file.display());
    let found = text
        .lines()
        .any(|l| l.starts_with(&prefix) && words.iter().all(|w| l.contains(w)));
    assert!(found, "no line '{prefix} ... {words:?}' in:\n{text}");
}

/// Asserts that some line of the error names `file` and `key` and contains all `words`.
fn has_key(err: &DesignError, file: &Path, key: &str, words: &[&str]) {
    let text = err.to_string();
    let found = text.lines().any(|l| {
        l.starts_with(&file.display().to_string())
            && l.contains(&format!(": {key}: "))
            && words.iter().all(|w| l.contains(w))
    });
    assert!(found, "no line naming {key} with {words:?} in:\n{text}");
}

const INLINE: &str = r#"
name = "demo"

[blade]
section = "naca4412"
stacking = 0.3
flow = "propeller"
rotation = "cw"
points-per-side = 90
tolerance = 0.02
min-te-thickness = 0.5

[[station]]
radius = 20
chord = 30
twist = 35
section = "naca4415"
thickness = 15

[[station]]
radius = 60
chord = 20
twist = 12.5
sweep = 1.5
prebend = -2

[rotor]
blades = 4
hub-radius = 15
"#;

#[test]
fn inline_toml_is_read() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "demo.toml", INLINE);
    let d = design::load(&p).unwrap();
    assert_eq!(d.name, "demo");
    assert_eq!(d.stations.len(), 2);
    let s = &d.stations[0];
    assert_near!(s.radius, 20.0, 1e-12);
    assert_near!(s.chord, 30.0, 1e-12);
    assert_near!(s.twist, 35.0, 1e-12);
    assert_eq!(s.section, "naca4415");
    assert_near!(s.thickness.unwrap(), 0.15, 1e-12);
    let t = &d.stations[1];
    assert_eq!(t.section, "naca4412", "default section from [blade]");
    assert_eq!(t.thickness, None);
    assert_near!(t.sweep, 1.5, 1e-12);
    assert_near!(t.prebend, -2.0, 1e-12);
    assert!(t.origin.contains("station[2]"), "{}", t.origin);
    assert_eq!(d.blade.flow, Flow::Propeller);
    assert_eq!(d.blade.rotation, Rotation::Cw);
    assert_near!(d.blade.stacking.chord_fraction().unwrap(), 0.3, 1e-12);
    assert_eq!(d.blade.points_per_side, 90);
    assert_near!(d.blade.tolerance, 0.02, 1e-12);
    assert_near!(d.blade.min_te_thickness.unwrap(), 0.5, 1e-12);
    assert!(d.tables.contains_key("rotor"));
    assert_eq!(d.source.as_deref(), Some(p.as_path()));
}

#[test]
fn defaults_apply() {
    let d = design::parse_toml_str(
        "[[station]]\nradius = 0\nchord = 5\ntwist = 1\nsection = \"a\"\n\
         [[station]]\nradius = 1\nchord = 5\ntwist = 1\nsection = \"a\"\n",
        None,
    )
    .unwrap();
    assert_eq!(d.name, "design");
    assert_near!(d.blade.stacking.chord_fraction().unwrap(), 0.25, 0.0);
    assert_eq!(d.blade.flow, Flow::Turbine);
    assert_eq!(d.blade.rotation, Rotation::Ccw);
    assert_eq!(d.blade.points_per_side, 120);
    assert_near!(d.length_to_mm, 1.0, 0.0);
}

#[test]
fn toml_with_csv_table_and_units() {
    let dir = TempDir::new().unwrap();
    write(
        &dir,
        "rows.csv",
        "radius,chord,twist\n0.1,0.05,0.3\n0.5,0.02,0.05\n",
    );
    let p = write(
        &dir,
        "m.toml",
        "units = { length = \"m\", angle = \"rad\" }\nstations = \"rows.csv\"\n\
         [blade]\nsection = \"naca2412\"\n[root]\nbore-diameter = 0.008\n",
    );
    let d = design::load(&p).unwrap();
    assert_eq!(d.name, "m");
    // 1 m = 1000 mm (SI definition of the prefix milli, NIST SP 811, 2008, Table 5).
    assert_near!(d.stations[0].radius, 100.0, 1e-9);
    assert_near!(d.stations[1].chord, 20.0, 1e-9);
    assert_near!(d.stations[0].twist, 0.3 * DEG_PER_RAD, 1e-4);
    assert_near!(d.stations[1].twist, 0.05 * DEG_PER_RAD, 1e-5);
    assert_eq!(d.stations[1].section, "naca2412");
    assert!(d.stations[0].origin.contains("rows.csv:2"));
    assert_near!(d.length_to_mm, 1000.0, 1e-12);
    // Other tables stay in the file's unit; Design::mm converts.
    #[derive(serde::Deserialize)]
    #[serde(deny_unknown_fields, rename_all = "kebab-case")]
    struct Root {
        bore_diameter: f64,
    }
    let root: Root = d.table("root").unwrap().unwrap();
    assert_near!(root.bore_diameter * d.length_to_mm, 8.0, 1e-9);
    assert!(d.table::<Root>("tip").unwrap().is_none());
}

#[test]
fn inches_are_exact() {
    let d = design::parse_toml_str(
        "units = { length = \"in\" }\n[blade]\nsection = \"s\"\n\
         [[station]]\nradius = 1\nchord = 2\ntwist = 0\nsweep = 0.5\n\
         [[station]]\nradius = 10\nchord = 1.5\ntwist = 0\n",
        None,
    )
    .unwrap();
    assert_near!(d.stations[0].radius, INCH_MM, 1e-12);
    assert_near!(d.stations[0].chord, 2.0 * INCH_MM, 1e-12);
    assert_near!(d.stations[0].sweep, 0.5 * INCH_MM, 1e-12);
    assert_near!(d.stations[1].radius, 254.0, 1e-12);
    assert_near!(d.length_to_mm, INCH_MM, 1e-15);
}

#[test]
fn csv_header_units_and_spreadsheet_quirks() {
    let dir = TempDir::new().unwrap();
    // BOM, CRLF, semicolons with decimal commas, comments, blank rows, a notes column,
    // mixed-case headers with units.
    let text = "\u{feff}# exported from a spreadsheet\r\n\
                Radius [in];CHORD (mm);twist [rad];Section;thickness [fraction];notes\r\n\
                \r\n\
                2;50,5;0,2;naca4415;0,15;root\r\n\
                ;;;;;\r\n\
                # mid-span comment\r\n\
                10;\"30\";0,05;naca4412;;tip\r\n";
    let p = write(&dir, "sheet.csv", text);
    let d = design::load(&p).unwrap();
    assert_eq!(d.name, "sheet");
    assert_eq!(d.stations.len(), 2);
    assert_near!(d.stations[0].radius, 2.0 * INCH_MM, 1e-12);
    assert_near!(d.stations[1].radius, 10.0 * INCH_MM, 1e-12);
    assert_near!(d.stations[0].chord, 50.5, 1e-12);
    assert_near!(d.stations[0].twist, 0.2 * DEG_PER_RAD, 1e-5);
    assert_near!(d.stations[0].thickness.unwrap(), 0.15, 1e-12);
    assert_eq!(d.stations[1].thickness, None);
    assert_eq!(d.stations[1].section, "naca4412");
    // Line numbers count the comment and blank lines.
    assert!(
        d.stations[1].origin.ends_with("sheet.csv:7"),
        "{}",
        d.stations[1].origin
    );
}

#[test]
fn csv_default_section_from_caller() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "b.csv", "radius,chord,twist\n10,5,3\n20,4,2\n");
    let d = design::load_csv(&p, Some("naca0012")).unwrap();
    assert!(d.stations.iter().all(|s| s.section == "naca0012"));
    // Without a default, the missing section column is an error naming the file.
    let e = design::load_csv(&p, None).unwrap_err();
    has(&e, &p, 1, &["missing column 'section'"]);
    assert_eq!(e.problems.len(), 1, "reported once, not per row: {e}");
}

#[test]
fn demo_designs_are_valid() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let t = design::load(&root.join("garden-turbine.toml")).unwrap();
    assert_eq!(t.stations.len(), 10);
    assert_near!(t.stations.last().unwrap().radius, 280.0, 1e-12);
    assert_eq!(t.stations[0].section, "naca4415");
    assert_eq!(t.stations[9].section, "naca4412");
    assert!(t.tables.contains_key("rotor") && t.tables.contains_key("printer"));
    let f = design::load(&root.join("desk-fan.toml")).unwrap();
    assert_eq!(f.blade.flow, Flow::Propeller);
    assert_near!(f.stations.last().unwrap().radius, 60.0, 1e-12);
    #[derive(serde::Deserialize)]
    #[serde(rename_all = "kebab-case")]
    struct Rotor {
        blades: u32,
        hub_radius: Option<f64>,
    }
    let r: Rotor = f.table("rotor").unwrap().unwrap();
    assert_eq!(r.blades, 5);
    // The blades join the hub at their root face: the demos no longer spell it out.
    assert_eq!(r.hub_radius, None);
}

// ---- malformed inputs: each names the file and the line or key ----

#[test]
fn csv_missing_column() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "a.csv", "radius,twist,section\n1,2,x\n3,4,x\n");
    has(&load_err(&p), &p, 1, &["missing column 'chord'"]);
}

#[test]
fn csv_decreasing_and_duplicate_radius() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius,chord,twist,section\n10,5,1,s\n30,5,1,s\n20,5,1,s\n30,5,1,s\n40,5,1,s\n",
    );
    let e = load_err(&p);
    has(&e, &p, 4, &["radius 20 mm", "smaller", "line 3"]);
    has(&e, &p, 5, &["radius 30 mm", "repeats", "line 3"]);
    assert_eq!(e.problems.len(), 2, "{e}");
}

#[test]
fn csv_zero_and_negative_chord() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius,chord,twist,section\n10,0,1,s\n20,-3,1,s\n30,2,1,s\n",
    );
    let e = load_err(&p);
    has(&e, &p, 2, &["chord 0 mm", "greater than zero"]);
    has(&e, &p, 3, &["chord -3 mm", "greater than zero"]);
}

#[test]
fn csv_nan_and_infinity() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius,chord,twist,section\nNaN,5,1,s\n20,inf,1,s\n30,2,1,s\n",
    );
    let e = load_err(&p);
    has(&e, &p, 2, &["radius NaN", "not a finite number"]);
    has(&e, &p, 3, &["chord inf", "not a finite number"]);
}

#[test]
fn csv_unknown_unit() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius [furlong],chord,twist [grad],section\n1,5,1,s\n2,5,1,s\n",
    );
    let e = load_err(&p);
    has(
        &e,
        &p,
        1,
        &["unknown length unit 'furlong'", "mm, cm, m or in"],
    );
    has(&e, &p, 1, &["unknown angle unit 'grad'", "deg or rad"]);
}

#[test]
fn csv_empty_file_and_header_only() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "empty.csv", "");
    let e = load_err(&p);
    assert!(e
        .to_string()
        .starts_with(&format!("{}: the file is empty", p.display())));
    let p = write(&dir, "comments.csv", "# nothing\n\n");
    assert!(load_err(&p).to_string().contains("the file is empty"));
    let p = write(&dir, "head.csv", "radius,chord,twist,section\n");
    let e = load_err(&p);
    assert!(e.to_string().contains("header but no stations"), "{e}");
    assert!(e.to_string().contains("0 stations given"), "{e}");
}

#[test]
fn csv_wrong_types_and_empty_cells() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius,chord,twist,section\n10,five,1,s\n20,5,,s\n30,5,1,\n",
    );
    let e = load_err(&p);
    has(&e, &p, 2, &["chord 'five' is not a number"]);
    has(&e, &p, 3, &["twist is empty"]);
    has(&e, &p, 4, &["section is empty"]);
}

#[test]
fn csv_ragged_rows() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius,chord,twist,section\n10,5,1\n20,5,1,s,extra\n30,5,1,s,,\n",
    );
    let e = load_err(&p);
    has(&e, &p, 2, &["3 cells", "header has 4"]);
    has(&e, &p, 3, &["5 cells", "header has 4"]);
    // Trailing empty cells, as spreadsheets pad rows, are not ragged.
    assert!(!e.to_string().contains(":4:"), "{e}");
    // The short row's missing cells are not reported again one by one.
    assert_eq!(e.problems.len(), 2, "{e}");
}

#[test]
fn csv_unknown_column_suggests() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius,chrod,twist,section\n10,5,1,s\n20,5,1,s\n",
    );
    let e = load_err(&p);
    has(
        &e,
        &p,
        1,
        &["unknown column 'chrod'", "did you mean 'chord'?"],
    );
    has(&e, &p, 1, &["missing column 'chord'"]);
}

#[test]
fn csv_header_of_numbers() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "a.csv", "10,5,1,s\n20,5,1,s\n");
    let e = load_err(&p);
    has(
        &e,
        &p,
        1,
        &["unknown column '10'", "first row must name the columns"],
    );
}

#[test]
fn csv_thickness_range_and_negative_radius() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.csv",
        "radius,chord,twist,section,thickness\n-5,5,1,s,0.12\n20,5,1,s,80\n",
    );
    let e = load_err(&p);
    has(&e, &p, 2, &["radius -5 mm is negative"]);
    has(&e, &p, 2, &["thickness 0.12 %", "write 12 for 12 %"]);
    has(&e, &p, 3, &["thickness 80 %", "outside"]);
}

#[test]
fn single_station() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "a.csv", "radius,chord,twist,section\n10,5,1,s\n");
    let e = load_err(&p);
    assert!(
        e.to_string()
            .contains(&format!("{}: 1 station given; at least two", p.display())),
        "{e}"
    );
    let p = write(
        &dir,
        "one.toml",
        "[[station]]\nradius = 1\nchord = 1\ntwist = 0\nsection = \"s\"\n",
    );
    has_key(&load_err(&p), &p, "station", &["1 station given"]);
}

#[test]
fn toml_unknown_keys_suggest() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.toml",
        "nme = \"x\"\n[blade]\nsectoin = \"s\"\n[blades]\nx = 1\n\
         [[station]]\nradius = 1\nchord = 1\ntwist = 0\nsection = \"s\"\ncord = 3\n\
         [[station]]\nradius = 2\nchord = 1\ntwist = 0\nsection = \"s\"\n",
    );
    let e = load_err(&p);
    has(
        &e,
        &p,
        1,
        &["nme: unknown key 'nme'", "did you mean 'name'?"],
    );
    has(
        &e,
        &p,
        3,
        &["blade.sectoin: unknown key", "did you mean 'section'?"],
    );
    has(
        &e,
        &p,
        4,
        &["unknown table [blades]", "did you mean [blade]?"],
    );
    has(
        &e,
        &p,
        11,
        &["station[1].cord: unknown key", "did you mean 'chord'?"],
    );
    assert_eq!(e.problems.len(), 4, "{e}");
}

#[test]
fn toml_wrong_types_and_ranges_all_reported() {
    let dir = TempDir::new().unwrap();
    let text = "units = { length = \"furlong\", angle = \"deg\" }\n\
                [blade]\n\
                section = \"s\"\n\
                stacking = 1.5\n\
                flow = \"turbin\"\n\
                points-per-side = 3\n\
                tolerance = 0\n\
                [[station]]\n\
                radius = \"ten\"\n\
                chord = 5\n\
                twist = 1\n\
                [[station]]\n\
                radius = 20\n\
                chord = nan\n\
                twist = 100\n\
                [[station]]\n\
                radius = 30\n\
                twist = 1\n";
    let p = write(&dir, "bad.toml", text);
    let e = load_err(&p);
    has_key(&e, &p, "units.length", &["unknown length unit \"furlong\""]);
    has(&e, &p, 4, &["blade.stacking", "1.5", "outside 0..1"]);
    has(&e, &p, 5, &["blade.flow", "did you mean 'turbine'?"]);
    has(&e, &p, 6, &["blade.points-per-side", "3"]);
    has(
        &e,
        &p,
        7,
        &["blade.tolerance", "tolerance 0 mm must be more than 0"],
    );
    has(
        &e,
        &p,
        9,
        &[
            "station[1].radius",
            "expected a number, found string \"ten\"",
        ],
    );
    has(
        &e,
        &p,
        14,
        &["station[2].chord", "NaN", "not a finite number"],
    );
    has(&e, &p, 15, &["station[2].twist", "100 deg", "outside"]);
    has(&e, &p, 16, &["station[3]", "missing 'chord'"]);
    assert_eq!(e.problems.len(), 9, "{e}");
    // Reported in file order.
    let lines: Vec<usize> = e.problems.iter().map(|p| p.line.unwrap()).collect();
    assert!(lines.windows(2).all(|w| w[0] <= w[1]), "{lines:?}");
}

#[test]
fn toml_decreasing_radius_names_keys() {
    let text = "[blade]\nsection = \"s\"\n\
                [[station]]\nradius = 50\nchord = 5\ntwist = 1\n\
                [[station]]\nradius = 40\nchord = 5\ntwist = 1\n\
                [[station]]\nradius = 40\nchord = 5\ntwist = 1\n";
    let e = design::parse_toml_str(text, None).unwrap_err();
    let s = e.to_string();
    assert!(
        s.contains(
            "<design>:8: station[2].radius: radius 40 mm is smaller than 50 mm at station[1]"
        ),
        "{s}"
    );
    assert!(
        s.contains("station[3].radius: radius 40 mm is smaller"),
        "{s}"
    );
}

#[test]
fn toml_missing_stations_file() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.toml",
        "stations = \"nowhere.csv\"\n[blade]\nsection = \"s\"\n",
    );
    let e = load_err(&p);
    has(
        &e,
        &p,
        1,
        &["stations: cannot read station table", "nowhere.csv"],
    );
}

#[test]
fn toml_csv_problems_name_the_csv() {
    let dir = TempDir::new().unwrap();
    let csv = write(&dir, "t.csv", "radius,chord,twist\n10,5,1\n5,5,1\n");
    let p = write(
        &dir,
        "a.toml",
        "stations = \"t.csv\"\n[blade]\nsection = \"s\"\n",
    );
    has(
        &load_err(&p),
        &csv,
        3,
        &["radius 5 mm is smaller than 10 mm"],
    );
}

#[test]
fn toml_syntax_error_has_line() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "a.toml", "name = \"x\"\n[blade]\nstacking = \n");
    has(&load_err(&p), &p, 3, &["not valid TOML"]);
}

#[test]
fn toml_no_stations_and_single_table() {
    let e = design::parse_toml_str("name = \"x\"\n", None).unwrap_err();
    assert!(e.to_string().starts_with("<design>: no stations"), "{e}");
    let e = design::parse_toml_str("[station]\nradius = 1\n", None).unwrap_err();
    assert!(
        e.to_string().contains("[[station]] (double brackets)"),
        "{e}"
    );
}

#[test]
fn toml_missing_section() {
    let text = "[[station]]\nradius = 1\nchord = 1\ntwist = 0\n\
                [[station]]\nradius = 2\nchord = 1\ntwist = 0\nsection = \"s\"\n";
    let e = design::parse_toml_str(text, None).unwrap_err();
    assert!(
        e.to_string().contains("<design>:1: station[1]: no section"),
        "{e}"
    );
    assert_eq!(e.problems.len(), 1);
}

#[test]
fn unknown_extension() {
    let dir = TempDir::new().unwrap();
    let p = write(&dir, "a.xlsx", "");
    assert!(load_err(&p)
        .to_string()
        .contains(".toml design file or a .csv"));
    let missing = dir.path().join("nope.toml");
    assert!(load_err(&missing)
        .to_string()
        .contains("cannot read the file"));
}

#[test]
fn table_errors_name_key_path() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "a.toml",
        "[blade]\nsection = \"s\"\n\
         [[station]]\nradius = 1\nchord = 1\ntwist = 0\n\
         [[station]]\nradius = 2\nchord = 1\ntwist = 0\n\
         [root]\nbore-diameter = \"8\"\n[tip]\nshape = \"round\"\nextra = 1\n",
    );
    let d: Design = design::load(&p).unwrap();
    #[derive(Debug, serde::Deserialize)]
    #[serde(deny_unknown_fields, rename_all = "kebab-case")]
    struct Root {
        #[allow(dead_code)]
        bore_diameter: f64,
    }
    let e = d.table::<Root>("root").unwrap_err();
    has(
        &e,
        &p,
        12,
        &["root.bore-diameter: expected a number, found string \"8\""],
    );
    #[derive(Debug, serde::Deserialize)]
    #[serde(deny_unknown_fields)]
    struct Tip {
        #[allow(dead_code)]
        shape: String,
    }
    let e = d.table::<Tip>("tip").unwrap_err();
    has(&e, &p, 15, &["tip.extra: unknown key 'extra'"]);
}

// ---- properties ----

mod properties {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(200))]

        /// Bad input never panics: any text gives a design or an error with problems.
        #[test]
        fn arbitrary_text_never_panics(text in "[ -~\r\n\t]{0,300}") {
            if let Err(e) = design::parse_csv_str(&text, None, Some("s")) {
                prop_assert!(!e.problems.is_empty());
            }
            if let Err(e) = design::parse_toml_str(&text, None) {
                prop_assert!(!e.problems.is_empty());
            }
        }

        /// Text shaped like a station table (digits, separators, quotes, comments) never
        /// panics either, and every problem names a line.
        #[test]
        fn table_like_text_never_panics(
            rows in proptest::collection::vec("[0-9.,;\"#a-z -]{0,30}", 0..12)
        ) {
            let text = format!("radius,chord,twist,section\n{}", rows.join("\n"));
            if let Err(e) = design::parse_csv_str(&text, None, None) {
                for p in &e.problems {
                    let whole_file = p.message.contains("station")
                        || p.message.contains("empty");
                    prop_assert!(p.line.is_some() || whole_file, "{}", p);
                }
            }
        }

        /// Stations written in inches as CSV come back in mm, 1 in = 25.4 mm exactly
        /// (NIST SP 811, 2008, Appendix B.8), with the same order and sections.
        #[test]
        fn csv_in_inches_round_trips(
            steps in proptest::collection::vec(0.01f64..25.0, 2..15),
            chord in 0.1f64..20.0,
            twist in -60.0f64..60.0,
        ) {
            let mut text = String::from("radius [in];chord [in];twist [deg];section\n");
            let mut r = 0.0;
            let mut radii = Vec::new();
            for (i, s) in steps.iter().enumerate() {
                r += s;
                radii.push(r);
                text.push_str(&format!("{r};{chord};{twist};sec{i}\n"));
            }
            let d = design::parse_csv_str(&text, None, None).unwrap();
            prop_assert_eq!(d.stations.len(), radii.len());
            for (i, (st, r)) in d.stations.iter().zip(&radii).enumerate() {
                prop_assert!((st.radius - r * INCH_MM).abs() <= 1e-9 * r.max(1.0) * INCH_MM);
                prop_assert!((st.chord - chord * INCH_MM).abs() <= 1e-9 * INCH_MM * chord.max(1.0));
                prop_assert!((st.twist - twist).abs() <= 1e-12);
                prop_assert_eq!(&st.section, &format!("sec{i}"));
            }
        }
    }
}

#[test]
fn csv_not_utf8_and_tabs() {
    let dir = TempDir::new().unwrap();
    // "twist [°]" saved as Windows-1252 / Latin-1: the degree sign is the byte 0xB0
    // (ISO/IEC 8859-1 code table), not valid UTF-8 on its own.
    let p = dir.path().join("latin1.csv");
    fs::write(
        &p,
        b"# exported\nradius,chord,twist [\xB0],section\n1,2,3,s\n",
    )
    .unwrap();
    has(&load_err(&p), &p, 2, &["not UTF-8"]);
    // Tab separated, as a spreadsheet's "text (tab delimited)" export.
    let p = write(
        &dir,
        "tabs.csv",
        "radius\tchord\ttwist\tsection\n1\t2,5\t3\ts\n4\t2\t1\ts\n",
    );
    let d = design::load(&p).unwrap();
    assert_near!(d.stations[0].chord, 2.5, 1e-12);
}

#[test]
fn toml_thickness_as_fraction_is_caught() {
    let text = "[blade]\nsection = \" naca0012 \"\n\
                [[station]]\nradius = 1\nchord = 1\ntwist = 0\nthickness = 0.12\n\
                [[station]]\nradius = 2\nchord = 1\ntwist = 0\n";
    let e = design::parse_toml_str(text, None).unwrap_err();
    let s = e.to_string();
    assert!(
        s.contains(
            "<design>:7: station[1].thickness: thickness 0.12 % is outside 1..50 % of chord"
        ),
        "{s}"
    );
    assert!(s.contains("write 12 for 12 %"), "{s}");
    let ok = design::parse_toml_str(&text.replace("0.12", "12"), None).unwrap();
    assert_near!(ok.stations[0].thickness.unwrap(), 0.12, 1e-12);
    assert_eq!(
        ok.stations[1].section, "naca0012",
        "section names are trimmed"
    );
}
