//! `build` and `report` over a design's variants: each variant's files in its own folder,
//! one summary table (CSV read back with the csv crate, JSON with serde_json).

#[macro_use]
mod support;

use std::collections::HashMap;

const DESIGN: &str = r#"name = "duo"
[blade]
section = "naca4412"
points-per-side = 40
tolerance = 0.05
[[station]]
radius = 40
chord = 40
twist = 18
[[station]]
radius = 160
chord = 20
twist = 3
[printer]
volume = [220, 220, 250]

[[variant]]
name = "ccw"

[[variant]]
name = "cw"
blade.rotation = "cw"

[[variant]]
name = "long"
tip-radius = 300
"#;

/// The summary CSV's rows as column -> cell maps, read with the csv crate.
fn rows(path: &std::path::Path) -> Vec<HashMap<String, String>> {
    let mut r = csv::Reader::from_path(path).unwrap();
    let header: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            header
                .iter()
                .cloned()
                .zip(rec.iter().map(String::from))
                .collect()
        })
        .collect()
}

#[test]
fn build_writes_each_variant_in_its_folder_and_one_summary() {
    let run = support::run_in_temp(&[("duo.toml", DESIGN)], &["build", "duo.toml"]);
    assert_eq!(run.code, 0, "{}", run.stderr);
    assert_eq!(
        run.files("out"),
        ["ccw", "cw", "duo-variants.csv", "duo-variants.json", "long"]
    );
    assert_eq!(run.files("out/cw"), ["duo-cw-preview.png", "duo-cw.stl"]);
    let table = rows(&run.path("out/duo-variants.csv"));
    assert_eq!(table.len(), 3, "one row per variant");
    let names: Vec<&str> = table.iter().map(|r| r["variant"].as_str()).collect();
    assert_eq!(names, ["ccw", "cw", "long"]);
    assert_eq!(table[1]["rotation"], "cw");
    assert_eq!(table[0]["rotation"], "ccw");
    // Mirror images (the cw blade is the ccw one mirrored in x, see the conventions):
    // the same volume; the longer blade encloses more.
    let vol = |k: usize| table[k]["blade_volume_mm3"].parse::<f64>().unwrap();
    assert_rel!(vol(1), vol(0), 1e-9, "mirrored blade, same volume");
    assert!(vol(2) > vol(0) * 1.2, "{} vs {}", vol(2), vol(0));
    // The flat tip of the long variant is at 300 mm (tip-radius).
    let tip = table[2]["tip_radius_mm"].parse::<f64>().unwrap();
    assert_near!(tip, 300.0, 1e-9, "tip-radius with a flat tip");
    for r in &table {
        assert_eq!(r["material"], "pla");
        assert_eq!(r["safety_factor"], "", "no load case in build");
        assert_eq!(
            r["fits"], "true",
            "a 300 mm blade on a 220 x 220 x 250 printer"
        );
        assert_eq!(r["segments"], "1", "whole blades");
        assert!(r["seconds"].parse::<f64>().unwrap() > 0.0);
        // Mass with the fill model lies below the solid PLA mass, 1.24 g/cm³ (common
        // practice, the preset's typical value).
        let mass: f64 = r["blade_mass_g"].parse().unwrap();
        let volume: f64 = r["blade_volume_mm3"].parse().unwrap();
        assert!(mass > 0.0 && mass < volume * 1.24e-3, "{mass} g");
    }
    // The JSON summary holds the same rows.
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(run.path("out/duo-variants.json")).unwrap())
            .unwrap();
    let arr = json.as_array().unwrap();
    assert_eq!(arr.len(), 3);
    assert_eq!(arr[1]["rotation"], "cw");
    assert!(arr[0]["safety_factor"].is_null());

    // Deterministic: a second run gives the same files, and the same summary but for the
    // time column.
    let again = support::run_in_temp(&[("duo.toml", DESIGN)], &["build", "duo.toml"]);
    for v in ["ccw", "cw", "long"] {
        let f = format!("out/{v}/duo-{v}.stl");
        assert!(
            std::fs::read(run.path(&f)).unwrap() == std::fs::read(again.path(&f)).unwrap(),
            "{f} differs between runs"
        );
    }
    let mut a = rows(&run.path("out/duo-variants.csv"));
    let mut b = rows(&again.path("out/duo-variants.csv"));
    for r in a.iter_mut().chain(b.iter_mut()) {
        r.remove("seconds");
    }
    assert_eq!(a, b);
}

#[test]
fn report_fills_the_safety_factor_and_writes_each_report() {
    let run = support::run_in_temp(
        &[("duo.toml", DESIGN)],
        &["report", "duo.toml", "--rpm", "800", "--wind", "9"],
    );
    assert!(run.code == 0 || run.code == 1, "{}", run.stderr);
    assert!(run.stderr.contains("caution"), "{}", run.stderr);
    for v in ["ccw", "cw", "long"] {
        let files = run.files(&format!("out/{v}"));
        assert!(
            files.contains(&format!("duo-{v}-report.html")),
            "{v}: {files:?}"
        );
    }
    let table = rows(&run.path("out/duo-variants.csv"));
    assert_eq!(table.len(), 3);
    let sf = |k: usize| table[k]["safety_factor"].parse::<f64>().unwrap();
    assert!(sf(0) > 0.0);
    // Mirrored blades carry the same stress.
    assert_rel!(sf(1), sf(0), 1e-6, "mirror image, same stress");
    // A longer blade at the same speed and wind is loaded more: a smaller factor.
    assert!(sf(2) < sf(0), "{} vs {}", sf(2), sf(0));
    // Each variant's JSON report says the same as its row.
    let rep: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(run.path("out/long/duo-long-report.json")).unwrap(),
    )
    .unwrap();
    let f = rep["stress"]["min_safety_factor"].as_f64().unwrap();
    assert_near!(
        f,
        sf(2),
        1e-9 * f,
        "the row's safety factor is the report's"
    );
}

#[test]
fn a_bad_variant_writes_nothing_and_names_itself() {
    let bad = DESIGN.replace("blade.rotation = \"cw\"", "blade.rotation = \"clockwise\"");
    let run = support::run_in_temp(&[("duo.toml", &bad)], &["build", "duo.toml"]);
    assert_eq!(run.code, 2, "{}", run.stderr);
    assert!(
        run.stderr.contains("variant[2].blade.rotation") && run.stderr.contains("\"cw\""),
        "{}",
        run.stderr
    );
    assert!(run.files("out").is_empty(), "{:?}", run.files("out"));
    // A variant that fails in the pipeline (a section that does not exist) stops every
    // file of the run too, folders included, and the error names the variant.
    let broken = DESIGN.replace("tip-radius = 300", "section = \"no-such-section\"");
    let run = support::run_in_temp(&[("duo.toml", &broken)], &["build", "duo.toml"]);
    assert_eq!(run.code, 2, "{}", run.stderr);
    assert!(run.stderr.contains("variant \"long\""), "{}", run.stderr);
    assert!(run.files("out").is_empty(), "{:?}", run.files("out"));
    assert!(!run.path("out").exists());
}
