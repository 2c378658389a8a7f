//! `spanwright fit` through the binary: exit codes, files written and read back with
//! independent readers (stl_io for STL, the zip crate for the 3MF package, quick-xml for
//! the SVG).

mod support;

use std::path::Path;
use support::{run_in, Ran};

/// Writes a closed a x b x c box as binary STL with stl_io.
fn write_box_stl(path: &Path, a: f32, b: f32, c: f32) {
    let m = spanwright::mesh::TriMesh::cuboid(
        nalgebra::Point3::origin(),
        nalgebra::Vector3::new(a as f64, b as f64, c as f64),
    );
    let v = |i: u32| {
        let p = m.vertices[i as usize];
        stl_io::Vector::new([p.x as f32, p.y as f32, p.z as f32])
    };
    let out: Vec<stl_io::Triangle> = m
        .triangles
        .iter()
        .map(|t| stl_io::Triangle {
            normal: stl_io::Vector::new([0.0, 0.0, 0.0]),
            vertices: [v(t[0]), v(t[1]), v(t[2])],
        })
        .collect();
    let mut f = std::fs::File::create(path).unwrap();
    stl_io::write_stl(&mut f, out.iter()).unwrap();
}

/// Runs `spanwright fit <args>` in `dir`: (exit code, standard output, standard error).
fn fit(dir: &Path, args: &[&str]) -> (i32, String, String) {
    let mut all = vec!["fit"];
    all.extend_from_slice(args);
    let Ran {
        code,
        stdout,
        stderr,
    } = run_in(dir, &all);
    (code, stdout, stderr)
}

#[test]
fn fits_writes_plates_exit_0() {
    let dir = tempfile::tempdir().unwrap();
    write_box_stl(&dir.path().join("tile.stl"), 60.0, 40.0, 5.0);
    let (code, out, err) = fit(
        dir.path(),
        &[
            "tile.stl",
            "--printer",
            "small-180",
            "--copies",
            "4",
            "--json",
        ],
    );
    assert_eq!(code, 0, "{out}\n{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["fits"], true);
    assert_eq!(v["plates"].as_array().unwrap().len(), 1);
    // Plate STL read back by stl_io: four boxes of 12 triangles.
    let mut f = std::fs::File::open(dir.path().join("out/tile-plate-1.stl")).unwrap();
    let mesh = stl_io::read_stl(&mut f).unwrap();
    assert_eq!(mesh.faces.len(), 48);
    for p in &mesh.vertices {
        assert!(p.0[0] >= 5.0 - 1e-3 && p.0[0] <= 175.0 + 1e-3 && p.0[2] >= -1e-3);
    }
    // 3MF: a zip package with the model part (3MF Core Specification, part naming).
    let f = std::fs::File::open(dir.path().join("out/tile-plate-1.3mf")).unwrap();
    let mut zip = zip::ZipArchive::new(f).unwrap();
    assert!(zip.by_name("3D/3dmodel.model").is_ok());
    // SVG: well-formed XML with four part outlines.
    let svg = std::fs::read_to_string(dir.path().join("out/tile-plate-1.svg")).unwrap();
    let mut reader = quick_xml::Reader::from_str(&svg);
    let mut polygons = 0;
    loop {
        match reader.read_event().unwrap() {
            quick_xml::events::Event::Eof => break,
            quick_xml::events::Event::Empty(e) | quick_xml::events::Event::Start(e)
                if e.name().as_ref() == "polygon" =>
            {
                polygons += 1
            }
            _ => {}
        }
    }
    assert_eq!(polygons, 4);
}

#[test]
fn too_big_exit_1_and_bad_input_exit_2() {
    let dir = tempfile::tempdir().unwrap();
    write_box_stl(&dir.path().join("slab.stl"), 100.0, 100.0, 100.0);
    // A 100 mm cube cannot fit a 90 mm cube whatever the orientation (its width is at
    // least 100 in every direction).
    let (code, out, _) = fit(
        dir.path(),
        &["slab.stl", "--volume", "90,90,90", "--margin", "0"],
    );
    assert_eq!(code, 1, "{out}");
    assert!(
        out.contains("DOES NOT FIT") && out.contains("scale"),
        "{out}"
    );
    let (code, _, err) = fit(dir.path(), &["missing.stl", "--printer", "small-180"]);
    assert_eq!(code, 2);
    assert!(err.contains("missing.stl"), "{err}");
    let (code, _, err) = fit(dir.path(), &["slab.stl", "--printer", "huge"]);
    assert_eq!(code, 2);
    assert!(err.contains("huge") && err.contains("medium-220"), "{err}");
    let (code, _, err) = fit(dir.path(), &["slab.stl"]);
    assert_eq!(code, 2);
    assert!(err.contains("--printer"), "{err}");
    std::fs::write(dir.path().join("junk.stl"), b"solid x\nfacet oops\n").unwrap();
    let (code, _, err) = fit(dir.path(), &["junk.stl", "--printer", "small-180"]);
    assert_eq!(code, 2, "{err}");
}

#[test]
fn design_file_printer_table_and_override() {
    // The example design carries `[printer] volume = [220, 220, 250]` (mm).
    let dir = tempfile::tempdir().unwrap();
    let d = "@/examples/garden-turbine.toml";
    let (code, out, err) = fit(dir.path(), &[d, "--no-files", "--json"]);
    assert!(code == 0 || code == 1, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["printer"]["volume"]["x"], 220.0, "{out}");
    assert!(v["parts"][0]["triangles"].as_u64().unwrap() > 100);
    // Three blades ([rotor] blades = 3) and the hub ([rotor.hub]) laid out when the
    // blade fits.
    if v["fits"] == true {
        let n: usize = v["plates"]
            .as_array()
            .unwrap()
            .iter()
            .map(|p| p.as_array().unwrap().len())
            .sum();
        assert_eq!(n, 4);
    }
    let (_, out, err) = fit(
        dir.path(),
        &[d, "--no-files", "--json", "--printer", "large-300"],
    );
    let v: serde_json::Value = serde_json::from_str(&out).unwrap_or_else(|_| panic!("{err}"));
    assert_eq!(v["printer"]["volume"]["x"], 300.0);
    assert_eq!(v["printer"]["margin"], 5.0);
}

#[test]
fn assembled_rotor_as_one_part() {
    // A 10 x 4 x 100 mm bar spanning z = 0..100 (blade frame), three copies turned about
    // y by 120 degrees: its tips (the corners at z = 100) are at least
    // sqrt(3) x 100 = 173.2 mm apart (equilateral triangle of circumradius 100), more than
    // the 155.9 mm space diagonal of a 90 mm cube (elementary geometry), so it cannot fit
    // that cube; lying flat it fits a 250 x 250 x 50 volume (footprint within radius
    // sqrt(100^2 + 5^2) = 100.1 mm of the axis).
    let dir = tempfile::tempdir().unwrap();
    write_box_stl(&dir.path().join("bar.stl"), 10.0, 4.0, 100.0);
    let (code, out, err) = fit(
        dir.path(),
        &[
            "bar.stl",
            "--volume",
            "250,250,50",
            "--margin",
            "0",
            "--copies",
            "3",
            "--assembled",
            "--json",
            "--no-files",
        ],
    );
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["assembled"]["fits"], true, "{out}");
    assert_eq!(v["assembled"]["blades"], 3);
    let (_, out, err) = fit(
        dir.path(),
        &[
            "bar.stl",
            "--volume",
            "90,90,90",
            "--margin",
            "0",
            "--copies",
            "3",
            "--assembled",
            "--json",
            "--no-files",
        ],
    );
    let v: serde_json::Value = serde_json::from_str(&out).unwrap_or_else(|_| panic!("{err}"));
    assert_eq!(v["assembled"]["fits"], false, "{out}");
}
