//! Property tests: any valid design lofts to a solid that passes every check, and the
//! STL written for it reads back (stl_io, an independent reader) with the same triangles.
//!
//! "Valid" includes being buildable in the trade's sense: between neighbouring stations
//! the chord, sweep and prebend change by at most half the radial step and the twist by
//! at most one degree per millimetre (steeper steps make surfaces fold over themselves;
//! the tool then refuses the part, which other tests cover).

use proptest::prelude::*;

use spanwright::design::parse_toml_str;
use spanwright::export::{write_mesh, MeshFormat};
use spanwright::pipeline::{run, Options};

const SECTIONS: [&str; 6] = [
    "naca0012",
    "naca2412",
    "naca4415",
    "naca23012",
    "naca0009-closed",
    "naca6409",
];

/// One station step: radial step and changes as fractions of their limits.
#[derive(Debug, Clone)]
struct StationGen {
    dr: f64,
    dc: f64,
    dtwist: f64,
    section: usize,
    dsweep: f64,
    dprebend: f64,
}

fn station() -> impl Strategy<Value = StationGen> {
    (
        5.0..80.0,
        -1.0..1.0,
        -1.0..1.0,
        0..SECTIONS.len(),
        -1.0..1.0,
        -1.0..1.0,
    )
        .prop_map(|(dr, dc, dtwist, section, dsweep, dprebend)| StationGen {
            dr,
            dc,
            dtwist,
            section,
            dsweep,
            dprebend,
        })
}

fn design_text(root: f64, stations: &[StationGen], flow: bool, cw: bool, stacking: f64) -> String {
    let mut s = format!(
        "name = \"random\"\n[blade]\npoints-per-side = 40\ntolerance = 0.05\nstacking = {stacking}\nflow = \"{}\"\nrotation = \"{}\"\n",
        if flow { "turbine" } else { "propeller" },
        if cw { "cw" } else { "ccw" }
    );
    let (mut r, mut chord, mut twist, mut sweep, mut prebend) = (root, 40.0, 20.0, 0.0, 0.0);
    for (i, st) in stations.iter().enumerate() {
        r += st.dr;
        if i > 0 {
            chord = f64::clamp(chord + 0.5 * st.dr * st.dc, 8.0, 80.0);
            twist = f64::clamp(twist + st.dr.min(30.0) * st.dtwist, -15.0, 45.0);
            sweep += 0.5 * st.dr * st.dsweep;
            prebend += 0.5 * st.dr * st.dprebend;
        }
        s += &format!(
            "[[station]]\nradius = {r}\nchord = {chord}\ntwist = {twist}\nsection = \"{}\"\nsweep = {sweep}\nprebend = {prebend}\n",
            SECTIONS[st.section]
        );
    }
    s
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    #[test]
    fn any_valid_design_gives_a_checked_solid(
        root in 0.0..60.0f64,
        stations in prop::collection::vec(station(), 2..6),
        flow in any::<bool>(),
        cw in any::<bool>(),
        stacking in 0.0..1.0f64,
    ) {
        let text = design_text(root, &stations, flow, cw, stacking);
        let design = parse_toml_str(&text, None).expect("generated designs are valid");
        // The pipeline checks every part it returns; a part failing its checks is an
        // error here.
        let outcome = run(&design, &Options::default());
        prop_assert!(outcome.is_ok(), "{:?}\n{}", outcome.err(), text);
        let outcome = outcome.unwrap();
        let blade = outcome.blade_part();
        let mesh = blade.mesh();

        // Round trip through binary STL and an independent reader.
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("random.stl");
        write_mesh(&path, MeshFormat::Stl, std::slice::from_ref(blade)).unwrap();
        let mut file = std::fs::File::open(&path).unwrap();
        let stl = stl_io::read_stl(&mut file).unwrap();
        prop_assert_eq!(stl.faces.len(), mesh.len());
        for (face, tri) in stl.faces.iter().zip(&mesh.triangles) {
            for (&vi, &ti) in face.vertices.iter().zip(tri) {
                let v = stl.vertices[vi];
                let p = mesh.vertices[ti as usize];
                for (a, b) in [(v[0], p.x), (v[1], p.y), (v[2], p.z)] {
                    prop_assert!((a as f64 - b).abs() <= 1e-4 * (1.0 + b.abs()));
                }
            }
        }
    }
}
