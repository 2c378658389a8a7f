//! Report outputs: the JSON report validates against its documented schema, every SVG
//! parses as XML (quick-xml), files are written atomically, and the CLI runs end to end.

mod support;

use serde_json::Value;
use spanwright::design::Station;
use spanwright::mesh::Part;
use spanwright::props::{Fill, LoadCase, Material};
use spanwright::report::{self, ReportInput, SCHEMA};
use support::run_in;
use support::shapes::demo_blade;

/// A minimal JSON Schema checker for the keywords our schema uses: `type`, `required`,
/// `properties`, `items`, `$ref` (local), `oneOf`, `const`, `enum`, `minItems`,
/// `maxItems` (JSON Schema draft 2020-12, Core and Validation specifications).
fn validate(schema: &Value, root: &Value, v: &Value, path: &str, errs: &mut Vec<String>) {
    if let Some(r) = schema.get("$ref").and_then(Value::as_str) {
        let mut target = root;
        for key in r.trim_start_matches("#/").split('/') {
            target = &target[key];
        }
        assert!(!target.is_null(), "dangling $ref {r}");
        validate(target, root, v, path, errs);
    }
    if let Some(alts) = schema.get("oneOf").and_then(Value::as_array) {
        let ok = alts
            .iter()
            .filter(|s| {
                let mut e = Vec::new();
                validate(s, root, v, path, &mut e);
                e.is_empty()
            })
            .count();
        if ok != 1 {
            errs.push(format!("{path}: matches {ok} of oneOf"));
        }
    }
    if let Some(t) = schema.get("type") {
        let types: Vec<&str> = match t {
            Value::String(s) => vec![s.as_str()],
            Value::Array(a) => a.iter().filter_map(Value::as_str).collect(),
            _ => vec![],
        };
        let fits = |ty: &str| match ty {
            "object" => v.is_object(),
            "array" => v.is_array(),
            "string" => v.is_string(),
            "number" => v.is_number(),
            "integer" => v.is_u64() || v.is_i64(),
            "boolean" => v.is_boolean(),
            "null" => v.is_null(),
            _ => false,
        };
        if !types.iter().any(|ty| fits(ty)) {
            errs.push(format!("{path}: expected {types:?}, found {v}"));
            return;
        }
    }
    if let Some(c) = schema.get("const") {
        if c != v {
            errs.push(format!("{path}: expected {c}, found {v}"));
        }
    }
    if let Some(e) = schema.get("enum").and_then(Value::as_array) {
        if !e.contains(v) {
            errs.push(format!("{path}: {v} not in {e:?}"));
        }
    }
    if let (Some(req), Some(obj)) = (
        schema.get("required").and_then(Value::as_array),
        v.as_object(),
    ) {
        for k in req.iter().filter_map(Value::as_str) {
            if !obj.contains_key(k) {
                errs.push(format!("{path}: missing required key `{k}`"));
            }
        }
    }
    if let (Some(props), Some(obj)) = (
        schema.get("properties").and_then(Value::as_object),
        v.as_object(),
    ) {
        for (k, s) in props {
            if let Some(x) = obj.get(k) {
                validate(s, root, x, &format!("{path}.{k}"), errs);
            }
        }
    }
    if let Some(arr) = v.as_array() {
        if let Some(n) = schema.get("minItems").and_then(Value::as_u64) {
            if (arr.len() as u64) < n {
                errs.push(format!("{path}: fewer than {n} items"));
            }
        }
        if let Some(n) = schema.get("maxItems").and_then(Value::as_u64) {
            if (arr.len() as u64) > n {
                errs.push(format!("{path}: more than {n} items"));
            }
        }
        if let Some(items) = schema.get("items") {
            for (i, x) in arr.iter().enumerate() {
                validate(items, root, x, &format!("{path}[{i}]"), errs);
            }
        }
    }
}

/// Parses a document with quick-xml and returns the element count; panics on bad XML.
fn parse_xml(text: &str) -> usize {
    let mut reader = quick_xml::Reader::from_str(text);
    reader.config_mut().check_end_names = true;
    let mut depth = 0i64;
    let mut elements = 0;
    loop {
        match reader.read_event() {
            Ok(quick_xml::events::Event::Start(_)) => {
                depth += 1;
                elements += 1;
            }
            Ok(quick_xml::events::Event::Empty(_)) => elements += 1,
            Ok(quick_xml::events::Event::End(_)) => depth -= 1,
            Ok(quick_xml::events::Event::Eof) => break,
            Ok(_) => {}
            Err(e) => panic!("not XML at {}: {e}", reader.buffer_position()),
        }
    }
    assert_eq!(depth, 0, "unbalanced elements");
    elements
}

/// Invented demo stations (for this test only), matching `demo_blade` below.
fn demo_stations() -> Vec<Station> {
    (0..5)
        .map(|i| {
            let f = i as f64 / 4.0;
            Station {
                radius: 60.0 + f * 340.0,
                chord: 70.0 - f * 40.0,
                twist: 25.0 - f * 22.0,
                section: "naca0015".into(),
                thickness: None,
                sweep: 0.0,
                prebend: 0.0,
                stacking: None,
                origin: format!("demo row {i}"),
            }
        })
        .collect()
}

fn demo_report(load: Option<LoadCase>, copies: usize) -> (report::Report, report::Pictures) {
    let blade = demo_blade(60.0, 400.0, 70.0, 30.0, 25.0, 3.0, 12, 40);
    let parts: Vec<Part> = (0..copies)
        .map(|k| {
            let r = nalgebra::Rotation3::from_axis_angle(
                &nalgebra::Vector3::y_axis(),
                k as f64 * std::f64::consts::TAU / copies as f64,
            );
            Part {
                name: format!("demo-{k}"),
                mesh: blade.transformed(&r.to_homogeneous()),
            }
        })
        .collect();
    let stations = demo_stations();
    let input = ReportInput {
        name: "demo <blade> & co".into(),
        source: None,
        parts: &checked(&parts),
        stations: Some(&stations),
        blade: None,
        rotation: None,
        material: Material::preset("petg").unwrap(),
        fill: Fill::DEFAULT,
        load,
        extra_radii: vec![123.0],
        stress_cuts: 41,
        picture_cuts: 7,
    };
    let mut steps = Vec::new();
    let out = report::build(&input, &mut |s, _| steps.push(s)).unwrap();
    assert_eq!(steps, (0..report::STEPS).collect::<Vec<_>>());
    out
}

#[test]
fn json_report_validates_against_schema() {
    let schema: Value = serde_json::from_str(SCHEMA).expect("schema.json is JSON");
    for (load, copies) in [
        (None, 1),
        (
            Some(LoadCase {
                rpm: 600.0,
                wind: 12.0,
                ..LoadCase::default()
            }),
            3,
        ),
    ] {
        let has_load = load.is_some();
        let (rep, _) = demo_report(load, copies);
        let v: Value = serde_json::to_value(&rep).unwrap();
        let mut errs = Vec::new();
        validate(&schema, &schema, &v, "$", &mut errs);
        assert!(errs.is_empty(), "{errs:#?}");
        assert_eq!(v["stress"].is_null(), !has_load);
        assert_eq!(v["balance"].is_null(), copies == 1);
        // Stations radii (5) plus one extra radius.
        assert_eq!(v["sections"].as_array().unwrap().len(), 6);
        // The checker must be able to fail: break a required key and a type.
        let mut broken = v.clone();
        broken.as_object_mut().unwrap().remove("parts");
        broken["sections"][0]["area"] = Value::String("big".into());
        let mut errs = Vec::new();
        validate(&schema, &schema, &broken, "$", &mut errs);
        assert!(errs.len() >= 2, "{errs:?}");
    }
}

#[test]
fn pictures_parse_as_xml() {
    let (rep, pics) = demo_report(
        Some(LoadCase {
            rpm: 900.0,
            ..LoadCase::default()
        }),
        2,
    );
    let all = [
        pics.planform.clone().expect("planform with stations"),
        pics.sections.clone(),
        pics.three_view.clone(),
        pics.stress.clone().expect("stress picture with a load"),
    ];
    for svg in &all {
        assert!(parse_xml(svg) > 10);
        assert!(svg.contains("&lt;blade&gt; &amp; co") || svg.contains("demo-0"));
    }
    // The HTML embeds every picture inline, and names the cautions.
    let html = report::html(&rep, &pics);
    for svg in &all {
        assert!(html.contains(svg.as_str()));
    }
    assert!(html.contains("IEC 61400-2"));
    assert!(!html.contains("<script"));
}

/// Writes a mesh as binary STL with stl_io (reference writer).
fn write_stl(mesh: &spanwright::mesh::TriMesh, path: &std::path::Path) {
    let tris: Vec<stl_io::Triangle> = (0..mesh.len())
        .map(|t| {
            let c = mesh.corners(t);
            let n = mesh.scaled_normal(t).normalize();
            stl_io::Triangle {
                normal: stl_io::Normal::new([n.x as f32, n.y as f32, n.z as f32]),
                vertices: c.map(|p| stl_io::Vertex::new([p.x as f32, p.y as f32, p.z as f32])),
            }
        })
        .collect();
    let mut f = std::fs::File::create(path).unwrap();
    stl_io::write_stl(&mut f, tris.iter()).unwrap();
}

#[test]
fn cli_reports_an_stl() {
    // Round trip through stl_io (reference reader/writer) and the binary.
    let dir = tempfile::tempdir().unwrap();
    let blade = demo_blade(60.0, 400.0, 70.0, 30.0, 25.0, 3.0, 12, 40);
    let stl = dir.path().join("demo.stl");
    write_stl(&blade, &stl);
    let out = dir.path().join("reports");
    let run = run_in(
        dir.path(),
        &[
            "report",
            stl.to_str().unwrap(),
            "--rpm",
            "1500",
            "--wind",
            "8",
            "--json",
            "--material",
            "pa12",
            "--out",
            out.to_str().unwrap(),
        ],
    );
    let stderr = &run.stderr;
    assert!(run.code == 0 || run.code == 1, "{stderr}");
    assert!(
        stderr.contains("caution"),
        "cautions must be printed: {stderr}"
    );
    let v: Value = serde_json::from_str(&run.stdout).unwrap();
    let schema: Value = serde_json::from_str(SCHEMA).unwrap();
    let mut errs = Vec::new();
    validate(&schema, &schema, &v, "$", &mut errs);
    assert!(errs.is_empty(), "{errs:#?}");
    assert_eq!(v["material"]["key"], "pa12");
    for name in [
        "demo-report.json",
        "demo-report.html",
        "demo-sections.svg",
        "demo-views.svg",
        "demo-stress.svg",
    ] {
        let text =
            std::fs::read_to_string(out.join(name)).unwrap_or_else(|e| panic!("{name}: {e}"));
        if name.ends_with(".svg") {
            parse_xml(&text);
        }
    }
    // Two blades 90 degrees apart about the rotor axis: the centres of mass (radius rho
    // each) add to a vector of length rho sqrt(2), so the total centre sits at rho / sqrt(2)
    // and the static imbalance is 2 m rho / sqrt(2) = sqrt(2) m rho (plane geometry).
    let quarter = nalgebra::Rotation3::from_axis_angle(
        &nalgebra::Vector3::y_axis(),
        std::f64::consts::FRAC_PI_2,
    );
    let other = blade.transformed(&quarter.to_homogeneous());
    let stl2 = dir.path().join("other.stl");
    write_stl(&other, &stl2);
    let two = run_in(
        dir.path(),
        &[
            "report",
            stl.to_str().unwrap(),
            stl2.to_str().unwrap(),
            "--json",
            "--no-files",
        ],
    );
    assert_eq!(two.code, 0, "{}", two.stderr);
    let v: Value = serde_json::from_str(&two.stdout).unwrap();
    let m = v["parts"][0]["mass"].as_f64().unwrap();
    let c = &v["parts"][0]["centroid"];
    let rho = c[0].as_f64().unwrap().hypot(c[2].as_f64().unwrap());
    let imb = v["balance"]["imbalance"].as_f64().unwrap();
    assert!(
        (imb - 2f64.sqrt() * m * rho).abs() < 1e-4 * imb,
        "{imb} vs {}",
        2f64.sqrt() * m * rho
    );
    // Bad input: an unknown material is exit code 2 with a message naming it.
    let bad = run_in(
        dir.path(),
        &[
            "report",
            stl.to_str().unwrap(),
            "--material",
            "balsa",
            "--no-files",
        ],
    );
    assert_eq!(bad.code, 2);
    assert!(bad.stderr.contains("balsa"));
}

#[test]
fn a_part_across_the_axis_is_refused_with_a_reason() {
    // A blade turned half a revolution about the rotor axis lies at negative z: not one
    // blade in the blade frame (crate conventions), so no sections or stress.
    let blade = demo_blade(60.0, 400.0, 70.0, 30.0, 25.0, 3.0, 6, 20);
    let half = nalgebra::Rotation3::from_axis_angle(&nalgebra::Vector3::y_axis(), 3.0);
    let parts = [Part {
        name: "turned".into(),
        mesh: blade.transformed(&half.to_homogeneous()),
    }];
    let input = ReportInput {
        name: "turned".into(),
        source: None,
        parts: &checked(&parts),
        stations: None,
        blade: None,
        rotation: None,
        material: Material::preset("pla").unwrap(),
        fill: Fill::SOLID,
        load: None,
        extra_radii: vec![],
        stress_cuts: 11,
        picture_cuts: 3,
    };
    let e = report::build(&input, &mut |_, _| {}).unwrap_err();
    let msg = e.to_string();
    assert!(
        msg.contains("turned") && msg.contains("blade frame"),
        "{msg}"
    );
}

/// The parts, checked as the pipeline checks its own (reports take checked parts only).
fn checked(parts: &[Part]) -> Vec<spanwright::check::CheckedPart> {
    parts
        .iter()
        .map(|p| {
            spanwright::check::certify(
                p.clone(),
                &spanwright::check::CheckOptions::DEFAULT.with_expected_genus(None),
            )
            .expect("test parts are solids")
        })
        .collect()
}
