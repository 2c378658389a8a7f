//! The design's stated input limits, units of the blade options, defaults, and the
//! readers' handling of the usual spreadsheet and editor habits (issue 14, items 2, 8, 9,
//! 11, 14, 16 and 18). Every refusal names the file and the line or key, the figure, the
//! limit and a fix.

use std::fs;
use std::path::PathBuf;

use spanwright::design::{self, DesignError, Law};
use tempfile::TempDir;

/// 1 in = 25.4 mm exactly (NIST SP 811, 2008, Appendix B.8).
const INCH_MM: f64 = 25.4;

fn write(dir: &TempDir, name: &str, text: &str) -> PathBuf {
    let p = dir.path().join(name);
    fs::write(&p, text).unwrap();
    p
}

fn toml_err(text: &str) -> DesignError {
    design::parse_toml_str(text, None).expect_err("refused")
}

/// The problem at `key` contains every word.
fn has_key(e: &DesignError, key: &str, words: &[&str]) {
    let p = e
        .problems
        .iter()
        .find(|p| p.key.as_deref() == Some(key))
        .unwrap_or_else(|| panic!("no problem at {key}:\n{e}"));
    let shown = p.to_string();
    for w in words {
        assert!(shown.contains(w), "'{w}' missing from: {shown}");
    }
}

const BLADE: &str = "[blade]\nsection = \"naca4412\"\n";

fn stations(rows: &[(f64, f64)]) -> String {
    rows.iter()
        .map(|(r, c)| format!("[[station]]\nradius = {r}\nchord = {c}\ntwist = 5\n"))
        .collect()
}

#[test]
fn metres_with_millimetre_numbers_are_caught_with_a_hint() {
    let text = format!(
        "units = {{ length = \"m\" }}\n{BLADE}{}",
        stations(&[(40.0, 30.0), (280.0, 20.0)])
    );
    let e = toml_err(&text);
    has_key(
        &e,
        "station[2].radius",
        &[
            "radius 280 m (280000 mm)",
            "10000 mm (10 m)",
            "did you mean millimetres?",
            "units = { length = \"m\" }",
        ],
    );
    assert!(e.problems.iter().all(|p| p.line.is_some()), "{e}");
    // The same numbers in millimetres are a valid blade.
    let ok = design::parse_toml_str(&text.replace("\"m\"", "\"mm\""), None).unwrap();
    assert_eq!(ok.stations.len(), 2);
}

#[test]
fn absurd_sizes_are_refused_with_the_limit() {
    let e = toml_err(&format!(
        "{BLADE}{}",
        stations(&[(40.0, 30.0), (1e12, 20.0)])
    ));
    has_key(
        &e,
        "station[2].radius",
        &["1e12 mm", "10000 mm", "check the value"],
    );
    let e = toml_err(&format!(
        "{BLADE}{}",
        stations(&[(40.0, 1e6), (120.0, 20.0)])
    ));
    has_key(
        &e,
        "station[1].chord",
        &["1000000 mm", "more than the largest length"],
    );
    // A column in metres says where the unit came from.
    let e = design::parse_csv_str(
        "radius [m],chord,twist,section\n40,30,5,a\n120,20,2,a\n",
        None,
        None,
    )
    .unwrap_err();
    assert!(
        e.to_string()
            .contains("the column header 'radius [m]' says m"),
        "{e}"
    );
}

#[test]
fn tolerance_has_a_floor_and_converts_with_the_file_unit() {
    let e = toml_err(&format!(
        "{BLADE}tolerance = 1e-9\n{}",
        stations(&[(40.0, 30.0), (120.0, 20.0)])
    ));
    has_key(&e, "blade.tolerance", &["1e-9 mm", "finer than 0.001 mm"]);
    // In inches, tolerance and min-te-thickness convert like every other length.
    let d = design::parse_toml_str(
        &format!(
            "units = {{ length = \"in\" }}\n{BLADE}tolerance = 0.0004\nmin-te-thickness = 0.02\n{}",
            stations(&[(2.0, 1.5), (10.0, 0.8)])
        ),
        None,
    )
    .unwrap();
    assert!((d.blade.tolerance - 0.0004 * INCH_MM).abs() < 1e-12);
    assert!((d.blade.min_te_thickness.unwrap() - 0.02 * INCH_MM).abs() < 1e-12);
    // 1e-6 in = 0.0000254 mm is under the floor, named in both units.
    let e = toml_err(&format!(
        "units = {{ length = \"in\" }}\n{BLADE}tolerance = 0.000001\n{}",
        stations(&[(2.0, 1.5), (10.0, 0.8)])
    ));
    has_key(&e, "blade.tolerance", &["1e-6 in (2.54e-5 mm)"]);
}

#[test]
fn chord_span_and_gaps_are_checked_against_the_tolerance() {
    // The wafer: two stations 0.001 mm apart at the default tolerance 0.01 mm.
    let e = toml_err(&format!(
        "{BLADE}{}",
        stations(&[(40.0, 30.0), (40.001, 20.0)])
    ));
    has_key(
        &e,
        "station[2].radius",
        &[
            "spans only 0.001 mm",
            "20 times the mesh tolerance",
            "0.2 mm",
        ],
    );
    // A chord under 20 tolerances.
    let e = toml_err(&format!(
        "{BLADE}tolerance = 0.1\n{}",
        stations(&[(40.0, 30.0), (120.0, 1.5)])
    ));
    has_key(
        &e,
        "station[2].chord",
        &["1.5 mm", "blade.tolerance = 0.1 mm", "at most 0.075 mm"],
    );
    // Stations closer than the tolerance.
    let e = toml_err(&format!(
        "{BLADE}{}",
        stations(&[(40.0, 30.0), (40.005, 29.0), (120.0, 20.0)])
    ));
    has_key(
        &e,
        "station[2].radius",
        &["only 0.005 mm outboard", "merge"],
    );
    // The rule as stated holds at its edge: 20 tolerances of span and chord pass.
    let d = design::parse_toml_str(
        &format!("{BLADE}{}", stations(&[(40.0, 0.2), (40.2, 0.2)])),
        None,
    );
    assert!(d.is_ok(), "{d:?}");
}

#[test]
fn a_tolerance_given_for_a_build_is_checked_like_the_files() {
    let d = design::parse_toml_str(
        &format!("{BLADE}{}", stations(&[(40.0, 30.0), (120.0, 20.0)])),
        None,
    )
    .unwrap();
    assert!(d.check_tolerance(0.05, "--tolerance").is_ok());
    let e = d
        .check_tolerance(5.0, "--tolerance")
        .unwrap_err()
        .to_string();
    assert!(e.contains("too coarse for the 20 mm chord"), "{e}");
    assert!(e.contains("at most 1 mm"), "{e}");
    let e = d
        .check_tolerance(1e-9, "--tolerance")
        .unwrap_err()
        .to_string();
    assert!(e.contains("at least 0.001 mm"), "{e}");
}

#[test]
fn station_count_and_file_size_are_bounded() {
    let mut text = String::from("radius,chord,twist,section\n");
    for i in 0..=design::MAX_STATIONS {
        text.push_str(&format!("{},{},0,a\n", 10.0 + i as f64, 20.0));
    }
    let e = design::parse_csv_str(&text, None, None).unwrap_err();
    assert!(
        e.to_string()
            .contains("more than the 1000 stations spanwright accepts"),
        "{e}"
    );
    assert_eq!(e.problems.len(), 1, "one problem, not one per row: {e}");
    let dir = TempDir::new().unwrap();
    let big = "# padding\n".repeat(500_000);
    let p = write(&dir, "big.csv", &big);
    let e = design::load(&p).unwrap_err().to_string();
    assert!(e.contains("MB, more than the 4 MB"), "{e}");
}

#[test]
fn min_te_thickness_defaults_keeps_zero_and_has_a_maximum() {
    let two = stations(&[(40.0, 30.0), (120.0, 20.0)]);
    // Default: a 0.4 mm nozzle's width (common practice), also for bare CSV tables.
    let d = design::parse_toml_str(&format!("{BLADE}{two}"), None).unwrap();
    assert_eq!(d.blade.min_te_thickness, Some(design::DEFAULT_MIN_TE_MM));
    let c =
        design::parse_csv_str("radius,chord,twist\n40,30,5\n120,20,2\n", None, Some("a")).unwrap();
    assert_eq!(c.blade.min_te_thickness, Some(0.4));
    // 0 keeps knife edges on purpose.
    let d = design::parse_toml_str(&format!("{BLADE}min-te-thickness = 0\n{two}"), None).unwrap();
    assert_eq!(d.blade.min_te_thickness, Some(0.0));
    // 100 mm is refused, naming the thinnest chord and the largest value.
    let e = toml_err(&format!("{BLADE}min-te-thickness = 100\n{two}"));
    has_key(
        &e,
        "blade.min-te-thickness",
        &["100 mm", "10 % of the 20 mm chord", "at most 2 mm"],
    );
}

#[test]
fn spanwise_law_is_chosen_by_name() {
    let two = stations(&[(40.0, 30.0), (120.0, 20.0)]);
    let d = design::parse_toml_str(&format!("{BLADE}{two}"), None).unwrap();
    assert_eq!(d.blade.spanwise, Law::Smooth);
    let d = design::parse_toml_str(&format!("{BLADE}spanwise = \"linear\"\n{two}"), None).unwrap();
    assert_eq!(d.blade.spanwise, Law::Linear);
    let e = toml_err(&format!("{BLADE}spanwise = \"lineal\"\n{two}"));
    has_key(&e, "blade.spanwise", &["did you mean 'linear'?"]);
}

#[test]
fn unknown_tables_are_errors_with_a_suggestion() {
    let two = stations(&[(40.0, 30.0), (120.0, 20.0)]);
    let e = toml_err(&format!("{BLADE}{two}[roots]\nshank-diameter = 10\n"));
    has_key(
        &e,
        "roots",
        &["unknown table [roots]", "did you mean [root]?"],
    );
    let e = toml_err(&format!("{BLADE}{two}[paint]\ncolour = 1\n"));
    has_key(
        &e,
        "paint",
        &["unknown table [paint]", "[rotor]", "[printer]"],
    );
    // A later stage's table is kept for it, with its errors named by key.
    let d = design::parse_toml_str(
        &format!("{BLADE}{two}[tip]\nshape = \"rund\"\n[root]\nshank-diametr = 3\n"),
        None,
    )
    .unwrap();
    let e = d.table::<spanwright::root::TipSpec>("tip").unwrap_err();
    assert!(
        e.to_string()
            .contains("tip.shape: unknown value 'rund' (did you mean 'round'?)"),
        "{e}"
    );
    let e = d.table::<spanwright::root::RootSpec>("root").unwrap_err();
    assert!(
        e.to_string().contains(
            "root.shank-diametr: unknown key 'shank-diametr' (did you mean 'shank-diameter'?)"
        ),
        "{e}"
    );
}

#[test]
fn wrong_types_read_plainly() {
    let two = stations(&[(40.0, 30.0), (120.0, 20.0)]);
    let e = toml_err(&format!("[blade]\nsection = [\"naca4412\"]\n{two}"));
    has_key(&e, "blade.section", &["expected a string, found an array"]);
    assert!(!e.to_string().contains("array an array"), "{e}");
}

#[test]
fn csv_headers_with_units_the_usual_ways() {
    // Spreadsheets write units after an underscore, in brackets or parentheses, or as
    // ISO 80000-1 quantity/unit (common practice).
    let text = "r [mm];Chord_in;twist (deg);t/c [%];airfoil;notes\n\
                40;1,2;20;15;naca4415;root\n\
                120;0,8;5;12;naca4412;tip\n";
    let d = design::parse_csv_str(text, None, None).unwrap();
    assert!((d.stations[0].chord - 1.2 * INCH_MM).abs() < 1e-12);
    assert!((d.stations[1].thickness.unwrap() - 0.12).abs() < 1e-12);
    let read: Vec<String> = d.columns.iter().map(ToString::to_string).collect();
    assert_eq!(
        read,
        [
            "'r [mm]' read as radius in mm",
            "'Chord_in' read as chord in in",
            "'twist (deg)' read as twist in deg",
            "'t/c [%]' read as thickness in %",
            "'airfoil' read as section",
            "'notes' ignored (notes)",
        ]
    );
    let d = design::parse_csv_str(
        "radius_mm,chord/mm,Twist,section\n40,30,5,a\n120,20,2,a\n",
        None,
        None,
    )
    .unwrap();
    assert_eq!(d.columns[2].to_string(), "'Twist' read as twist in deg");
    assert!((d.stations[1].chord - 20.0).abs() < 1e-12);
    // An unknown unit after an underscore is an unknown unit, not an unknown column.
    let e =
        design::parse_csv_str("radius_ft,chord,twist,section\n1,2,3,a\n", None, None).unwrap_err();
    assert!(e.to_string().contains("unknown length unit 'ft'"), "{e}");
}

#[test]
fn csv_with_cr_line_ends_reads_like_lf() {
    // Classic Mac OS line ends (CR alone): common practice in old spreadsheet exports.
    let cr = "radius,chord,twist,section\r40,30,20,naca4412\r120,20,5,naca4412\r";
    let d = design::parse_csv_str(cr, None, None).unwrap();
    assert_eq!(d.stations.len(), 2);
    assert!((d.stations[1].radius - 120.0).abs() < 1e-12);
    let e = design::parse_csv_str(
        "radius,chord,twist,section\r40,30,20,a\r30,20,5,a\r",
        None,
        None,
    )
    .unwrap_err();
    assert_eq!(e.problems[0].line, Some(3), "{e}");
}

#[test]
fn stations_must_name_a_csv_table() {
    let dir = TempDir::new().unwrap();
    let p = write(
        &dir,
        "self.toml",
        "stations = \"self.toml\"\n[blade]\nsection = \"naca4412\"\n",
    );
    let e = design::load(&p).unwrap_err().to_string();
    assert!(e.contains("names the design file itself"), "{e}");
    write(&dir, "other.toml", "x = 1\n");
    let p = write(
        &dir,
        "a.toml",
        "stations = \"other.toml\"\n[blade]\nsection = \"naca4412\"\n",
    );
    let e = design::load(&p).unwrap_err().to_string();
    assert!(
        e.contains("a.toml:1: stations") && e.contains("names a TOML file"),
        "{e}"
    );
}
