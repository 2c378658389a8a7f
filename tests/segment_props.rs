//! Property test over random blades and printer sizes: an automatic split either plans
//! segments that pass every check (closed and oriented with the genus Euler's formula
//! gives, fitting the printer on all their points, volumes adding up with the holes'
//! cylinders and cones) or refuses with a reason that is a failed check (exit 1), never
//! bad input, never a panic; for either rotation sense (a clockwise blade is the mirror
//! image, its meshes re-oriented).

#[macro_use]
mod support;

use proptest::prelude::*;
use spanwright::design::parse_toml_str;
use spanwright::fit::{fit_extents, FitOptions, PrinterSpec};
use spanwright::mesh::TriMesh;
use spanwright::pipeline::{run, Options};
use std::collections::HashMap;

struct Blade<'a> {
    r0: f64,
    len: f64,
    chord: f64,
    taper: f64,
    section: &'a str,
    cw: bool,
}

fn design_text(b: &Blade<'_>, rod: Option<f64>, pin: f64) -> String {
    let Blade {
        r0,
        len,
        chord,
        taper,
        section,
        cw,
    } = *b;
    let rotation = if cw { "cw" } else { "ccw" };
    let mut s = format!(
        "name = \"p\"\n[blade]\nsection = \"{section}\"\nrotation = \"{rotation}\"\npoints-per-side = 50\ntolerance = 0.05\n"
    );
    for k in 0..3 {
        let f = k as f64 / 2.0;
        s += &format!(
            "[[station]]\nradius = {}\nchord = {}\ntwist = {}\n",
            r0 + len * f,
            chord * (1.0 - (1.0 - taper) * f),
            12.0 - 10.0 * f
        );
    }
    s += &format!("[segments]\nsplit = \"auto\"\ndowels = {{ diameter = {pin} }}\n");
    if let Some(d) = rod {
        s += &format!("[spar-channel]\ndiameter = {d}\n");
    }
    s
}

fn euler(m: &TriMesh) -> Option<i64> {
    let mut edges: HashMap<(u32, u32), u32> = HashMap::new();
    for t in &m.triangles {
        for k in 0..3 {
            *edges.entry((t[k], t[(k + 1) % 3])).or_default() += 1;
        }
    }
    for (&(a, b), &n) in &edges {
        if n != 1 || edges.get(&(b, a)) != Some(&1) {
            return None;
        }
    }
    Some(m.vertices.len() as i64 - (edges.len() / 2) as i64 + m.triangles.len() as i64)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 16, ..ProptestConfig::default() })]

    #[test]
    fn plans_pass_every_check_or_refuse(
        r0 in 30.0..90.0f64,
        len in 200.0..650.0f64,
        chord in 40.0..110.0f64,
        taper in 0.3..0.8f64,
        section in prop::sample::select(vec!["naca4412", "naca4415", "naca2412"]),
        rod in prop::option::of(2.0..9.0f64),
        pin in 1.5..4.0f64,
        side in 110.0..300.0f64,
        cw in any::<bool>(),
    ) {
        let blade = Blade { r0, len, chord, taper, section, cw };
        let text = design_text(&blade, rod, pin);
        let design = parse_toml_str(&text, None).expect("generated designs are valid");
        let printer = PrinterSpec { volume: Some([side, side, side]), ..Default::default() }
            .resolve("test")
            .unwrap();
        let opts = Options { printer: Some(printer), ..Options::default() };
        match run(&design, &opts) {
            Ok(o) => {
                let plan = o.segments.as_ref().expect("asked for a split");
                let segs = o.segment_parts();
                let meshes: Vec<&TriMesh> = if segs.is_empty() {
                    vec![o.blade_part().mesh()]
                } else {
                    segs.iter().map(|p| p.bodies[0].mesh()).collect()
                };
                prop_assert_eq!(meshes.len(), plan.count);
                for m in &meshes {
                    // Closed and oriented; V - E + F = 2 - 2g with g in {0, 1}
                    // (Euler's polyhedron formula; at most the channel goes through).
                    let chi = euler(m);
                    prop_assert!(chi == Some(2) || chi == Some(0), "chi {:?}", chi);
                    prop_assert!(m.signed_volume() > 0.0);
                    // Every segment fits, on all of its vertices.
                    if plan.count > 1 {
                        prop_assert!(fit_extents(&m.vertices, &printer, &FitOptions::DEFAULT).is_some());
                    }
                }
                // Volumes add up (elementary cylinder and cone volumes), within the
                // tolerance times all surface areas.
                let cone = |r: f64, h: f64| std::f64::consts::PI * r * r * h / 3.0;
                let cyl = |r: f64, l: f64| std::f64::consts::PI * r * r * l;
                let mut removed = 0.0;
                if let Some(c) = &plan.channel {
                    let r = c.hole_radius();
                    removed += cyl(r, c.end - c.start) + cone(r, c.point_depth);
                }
                for j in &plan.joints {
                    let r = 0.5 * j.hole_diameter;
                    removed += j.pins.len() as f64 * 2.0 * (cyl(r, j.depth) + cone(r, j.point_depth));
                }
                if plan.count > 1 {
                    let whole = o.blade_part().mesh();
                    let sum: f64 = meshes.iter().map(|m| m.signed_volume()).sum();
                    let area = whole.area() + meshes.iter().map(|m| m.area()).sum::<f64>();
                    let tol = o.blade.tolerance * area;
                    prop_assert!((sum + removed - whole.signed_volume()).abs() <= tol,
                        "{} + {} vs {}", sum, removed, whole.signed_volume());
                }
            }
            Err(e) => {
                let msg = e.to_string();
                prop_assert!(e.is_failed_check(), "refused as bad input: {}", msg);
                prop_assert!(msg.len() > 30, "{}", msg);
            }
        }
    }
}
