//! The exit-code contract, the same in every command (README, "Exit codes"): 0 done,
//! 1 a check failed (a broken part, bodies that meet, does not fit, safety factor
//! short), 2 bad input or an I/O error. Each command is run as a user runs it.

#[macro_use]
mod support;

use support::run_in_temp;

/// A small valid blade (invented demo data), quick to build.
const BLADE: &str = "name = \"t\"
[blade]
section = \"naca4412\"
points-per-side = 30
tolerance = 0.05
[[station]]
radius = 40
chord = 30
twist = 20
[[station]]
radius = 120
chord = 20
twist = 5
";

/// The same blade with a rotor whose hub disc stops short of the blades' root face at
/// 40 mm (the default diameter), but whose 10 degree cone tilts the root faces into the
/// disc: the input checks pass, the bodies meet, and the interference check refuses them.
fn hub_through_blades() -> String {
    format!("{BLADE}[rotor]\nblades = 3\ncone = 10\n[rotor.hub]\nthickness = 10\n")
}

/// A closed box as ASCII STL (3D Systems, 1989: facet normal, outer loop, vertices).
fn box_stl(a: f64, b: f64, c: f64, drop_one: bool) -> String {
    let m = spanwright::mesh::TriMesh::cuboid(
        nalgebra::Point3::origin(),
        nalgebra::Vector3::new(a, b, c),
    );
    let mut s = String::from("solid box\n");
    let n = m.triangles.len() - usize::from(drop_one);
    for t in &m.triangles[..n] {
        s += "facet normal 0 0 0\nouter loop\n";
        for &i in t {
            let p = m.vertices[i as usize];
            s += &format!("vertex {} {} {}\n", p.x, p.y, p.z);
        }
        s += "endloop\nendfacet\n";
    }
    s + "endsolid box\n"
}

fn expect(code: i32, r: &support::Run, what: &str) {
    assert_eq!(
        r.code, code,
        "{what}: exit {} (want {code})\nstdout: {}\nstderr: {}",
        r.code, r.stdout, r.stderr
    );
}

#[test]
fn build_exits_0_1_2() {
    let r = run_in_temp(&[("t.toml", BLADE)], &["build", "t.toml", "-o", "out"]);
    expect(0, &r, "a valid blade");
    assert_eq!(r.files("out"), ["t-preview.png", "t.stl"]);

    let r = run_in_temp(
        &[("t.toml", &hub_through_blades())],
        &["build", "t.toml", "-o", "out"],
    );
    expect(1, &r, "a hub running into the blades");
    assert!(r.stderr.contains("cross or touch"), "{}", r.stderr);
    assert!(
        r.files("out").is_empty(),
        "nothing is written: {:?}",
        r.files("out")
    );

    let r = run_in_temp(
        &[("t.toml", &BLADE.replace("chord = 30", "chord = -30"))],
        &["build", "t.toml", "-o", "out"],
    );
    expect(2, &r, "a negative chord");
    assert!(r.stderr.contains("t.toml"), "{}", r.stderr);

    let r = run_in_temp(
        &[("t.toml", BLADE)],
        &["build", "t.toml", "--tolerance", "1e9"],
    );
    expect(2, &r, "a tolerance beyond the allowed range");
    assert!(r.stderr.contains("--tolerance"), "{}", r.stderr);
}

#[test]
fn fit_exits_0_1_2() {
    let tile = box_stl(60.0, 40.0, 5.0, false);
    let r = run_in_temp(
        &[("tile.stl", &tile)],
        &["fit", "tile.stl", "--printer", "small-180", "--no-files"],
    );
    expect(0, &r, "a tile on a 180 mm bed");

    let r = run_in_temp(
        &[("tile.stl", &tile)],
        &["fit", "tile.stl", "--volume", "30,30,30", "--no-files"],
    );
    expect(1, &r, "a 60 mm tile in a 30 mm box");
    assert!(r.stdout.contains("DOES NOT FIT"), "{}", r.stdout);

    let r = run_in_temp(
        &[("open.stl", &box_stl(60.0, 40.0, 5.0, true))],
        &["fit", "open.stl", "--printer", "small-180", "--no-files"],
    );
    expect(1, &r, "an STL with a hole");
    assert!(r.stderr.contains("open.stl"), "{}", r.stderr);

    let r = run_in_temp(&[("tile.stl", &tile)], &["fit", "tile.stl"]);
    expect(2, &r, "no printer given");

    let r = run_in_temp(
        &[("tile.stl", &tile)],
        &["fit", "tile.stl", "--printer", "small-180", "--copies", "0"],
    );
    expect(2, &r, "zero copies");
}

#[test]
fn report_exits_0_1_2() {
    let r = run_in_temp(&[("t.toml", BLADE)], &["report", "t.toml", "--no-files"]);
    expect(0, &r, "a report without a load case");

    // 30,000 rpm on a 120 mm PLA blade: the centrifugal stress alone is far beyond the
    // material (sigma ~ rho omega^2 r^2 / 2, about 50 MPa for PLA at 1.24 g/cm3).
    let r = run_in_temp(
        &[("t.toml", BLADE)],
        &[
            "report",
            "t.toml",
            "--no-files",
            "--rpm",
            "30000",
            "--wind",
            "10",
        ],
    );
    expect(1, &r, "a safety factor short of the required");

    let r = run_in_temp(
        &[("t.toml", BLADE)],
        &["report", "t.toml", "--no-files", "--material", "cheese"],
    );
    expect(2, &r, "an unknown material");
}

#[test]
fn draft_exits_0_2() {
    let args = [
        "draft",
        "--tip-radius",
        "300",
        "--inner-radius",
        "50",
        "--blades",
        "3",
        "--tip-speed-ratio",
        "6",
        "--design-cl",
        "1.0",
        "--design-alpha",
        "6",
        "-o",
        "out/d.csv",
    ];
    let r = run_in_temp(&[], &args);
    expect(0, &r, "a plausible draft");
    assert_eq!(r.files("out"), ["d.csv"]);

    let mut bad = args.to_vec();
    bad[2] = "-300";
    let r = run_in_temp(&[], &bad);
    expect(2, &r, "a negative tip radius");
    assert!(r.files("out").is_empty());
}

#[test]
fn section_exits_0_2() {
    let r = run_in_temp(&[], &["section", "measure", "naca2412"]);
    expect(0, &r, "measuring a 4-digit section");
    let r = run_in_temp(&[], &["section", "measure", "no-such-section"]);
    expect(2, &r, "an unknown section");
}

#[test]
fn a_closed_pipe_ends_output_quietly() {
    // `spanwright build ... --json | head -1`: the reader goes away early; the command
    // must not panic. Closing the read end before the command has written anything
    // makes every write fail with a broken pipe.
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("t.toml"), BLADE).unwrap();
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_spanwright"))
        .current_dir(dir.path())
        .args(["build", "t.toml", "--json"])
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let out = child.wait_with_output().unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert_eq!(out.status.code(), Some(0), "{stderr}");
}

#[test]
fn fit_accounts_for_every_part_of_the_design() {
    // The demo turbine's blades fit a 300 x 60 x 60 mm box lying down; its 84 mm hub
    // disc fits in no orientation (its smallest width, 30 mm thick by 84 mm across, has
    // a diagonal of at least 84 mm > the 60 - 2 x 5 mm usable). The verdict must not
    // drop the hub: exit 1, naming it.
    let r = run_in_temp(
        &[],
        &[
            "fit",
            "@/examples/garden-turbine.toml",
            "--volume",
            "300,60,60",
            "--no-files",
            "--json",
        ],
    );
    expect(1, &r, "a printer the hub does not fit");
    let v: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    assert_eq!(v["fits"], false);
    let unplaced: Vec<&str> = v["unplaced"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_str().unwrap())
        .collect();
    assert_eq!(unplaced, ["garden-turbine-hub"]);
    let placed: usize = v["plates"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p.as_array().unwrap().len())
        .sum();
    assert_eq!(placed, 3, "the three blades are placed");
}
