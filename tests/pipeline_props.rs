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

/// Root and tip options drawn for [`any_valid_design_builds_at_any_tolerance`]: a round
/// shank with a transition (and a bore) or none, and a flat or round tip.
#[derive(Debug, Clone)]
struct Ends {
    root: Option<(f64, f64, bool)>,
    round_tip: bool,
}

fn ends() -> impl Strategy<Value = Ends> {
    (
        prop::option::of((0.0..1.0f64, 0.0..1.0f64, any::<bool>())),
        any::<bool>(),
    )
        .prop_map(|(root, round_tip)| Ends { root, round_tip })
}

/// The `[root]` and `[tip]` tables for a blade whose first station has chord `c`
/// (section `thickness`, stacking fraction `f`) at radius `r0`; `None` when the shank and
/// transition do not fit inside `r0`. Valid in the root validation's sense (see
/// tests/root_props.rs): a shank area at least 1.3 times the first station's (NACA
/// Report 460 thickness integral 0.685 t c²), a transition at least as long as the
/// largest sideways travel of an outline point (45 degrees, common practice), walls of
/// at least 0.8 mm around the bore (two 0.4 mm nozzle widths, common practice).
fn ends_text(e: &Ends, c: f64, thickness: f64, f: f64, r0: f64) -> Option<String> {
    let mut s = String::new();
    if let Some((ud, ul, bore)) = e.root {
        let a1 = 0.685 * thickness * c * c;
        let d_min = (1.3 * 4.0 * a1 / std::f64::consts::PI).sqrt();
        let d = (c * (0.35 + 0.4 * ud)).max(d_min).max(8.0);
        let travel_x = ((1.0 - f) * c - 0.5 * d).max(f * c - 0.5 * d).max(0.5 * d);
        let travel = (travel_x * travel_x + 0.25 * d * d).sqrt();
        let transition = 1.1 * travel + 1.0;
        let shank = 12.0 + 10.0 * ul;
        if shank + transition >= r0 {
            return None;
        }
        s += &format!(
            "[root]\nshank-diameter = {d}\nshank-length = {shank}\ntransition-length = {transition}\n"
        );
        if bore {
            s += &format!("bore = {{ diameter = {}, depth = 8 }}\n", 0.4 * (d - 1.6));
        }
    }
    if e.round_tip {
        s += "[tip]\nshape = \"round\"\n";
    }
    Some(s)
}

proptest! {
    // Tolerances from 0.001 to 0.32 mm (log-uniform; the smallest generated chord,
    // 8 mm, allows up to 0.4 mm) with the root and tip options: sized to run in seconds
    // in release mode.
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn any_valid_design_builds_at_any_tolerance(
        root in 60.0..90.0f64,
        stations in prop::collection::vec(station(), 2..4),
        flow in any::<bool>(),
        stacking in 0.2..0.4f64,
        log_tol in -3.0..-0.5f64,
        ends in ends(),
    ) {
        let tol = 10f64.powf(log_tol);
        let mut stations = stations;
        if ends.round_tip {
            // The round tip continues the outline's spanwise slope at the last station over
            // half a chord; a section changing fast there (12 % to 9 % thick over 5 mm)
            // turns inside out before the tip closes (the tip outline crosses itself;
            // reported, see blade.rs). Round tips here end on one section.
            let n = stations.len();
            stations[n - 1].section = stations[n - 2].section;
        }
        let text = design_text(root, &stations, flow, false, stacking);
        let thickness = [0.12, 0.12, 0.15, 0.12, 0.09, 0.09][stations[0].section];
        let r0 = root + stations[0].dr;
        let Some(extra) = ends_text(&ends, 40.0, thickness, stacking, r0) else {
            return Ok(());
        };
        let text = format!("{text}{extra}");
        let design = parse_toml_str(&text, None).expect("generated designs are valid");
        // The whole pipeline: the blade built and certified by the solid check.
        let outcome = run(&design, &Options { tolerance: Some(tol), ..Options::default() });
        // A root the root validation refuses (with its reason) is not a valid design.
        {
            use spanwright::blade::BladeError;
            use spanwright::pipeline::PipelineError;
            prop_assume!(!matches!(
                outcome,
                Err(PipelineError::Blade(BladeError::Root(_)))
                    | Err(PipelineError::Table { cause: BladeError::Root(_), .. })
            ));
        }
        prop_assert!(outcome.is_ok(), "tolerance {tol}: {:?}\n{}", outcome.err(), text);
        let blade = outcome.unwrap().blade;
        // The printed bound on mesh-to-design holds the tolerance.
        prop_assert!(blade.mesh_to_design() <= tol, "{} > {tol}", blade.mesh_to_design());
    }
}
