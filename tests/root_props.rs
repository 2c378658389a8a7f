//! Property test: random valid root and tip settings (round or elliptical shank, flat,
//! flange with or without fillet, bore with any drill point, one or two cross holes,
//! flat or round tip) on random
//! blades give parts that pass every mesh check of `spanwright::check::check_solid`:
//! closed, outward, no degenerate triangles, one component, genus = number of cross
//! holes and no self-intersection. Run with `cargo test --release --test root_props` (200 cases).
//!
//! "Valid" is what the root validation accepts: a transition at least as long as the
//! largest sideways travel of an outline point (45 degrees, common practice for
//! printing without support), walls of at least `min-wall` around the bore (two 0.4 mm
//! nozzle widths, common practice), a flat no deeper than a quarter of the shank.

use proptest::prelude::*;
use spanwright::check::{check_solid, CheckOptions};
use spanwright::design::parse_toml_str;
use spanwright::pipeline::{build_blade, Options};

const SECTIONS: [&str; 4] = ["naca0012", "naca2412", "naca4415", "naca0018"];

/// Unit draws (0..1) that the generator scales into valid settings.
#[derive(Debug, Clone)]
struct RootGen {
    chord: f64,
    section: usize,
    twist: f64,
    stacking: f64,
    turbine: bool,
    cw: bool,
    blunt: bool,
    diameter: f64,
    ellipse: Option<f64>,
    flat: Option<f64>,
    bore: Option<(f64, f64, usize)>,
    flange: Option<(f64, Option<f64>, f64)>,
    shank: f64,
    transition: f64,
    face: f64,
    round_tip: bool,
    holes: Option<(f64, bool)>,
}

fn unit() -> std::ops::Range<f64> {
    0.0..1.0
}

fn gen() -> impl Strategy<Value = RootGen> {
    (
        (
            unit(),
            0..SECTIONS.len(),
            unit(),
            unit(),
            any::<bool>(),
            any::<bool>(),
            any::<bool>(),
        ),
        (
            unit(),
            prop::option::of(unit()),
            prop::option::of(unit()),
            prop::option::of((unit(), unit(), 0..4usize)),
            prop::option::of((unit(), prop::option::of(unit()), unit())),
        ),
        (
            unit(),
            unit(),
            unit(),
            any::<bool>(),
            prop::option::of((unit(), any::<bool>())),
        ),
    )
        .prop_map(
            |(
                (chord, section, twist, stacking, turbine, cw, blunt),
                (diameter, ellipse, flat, bore, flange),
                (shank, transition, face, round_tip, holes),
            )| RootGen {
                chord,
                section,
                twist,
                stacking,
                turbine,
                cw,
                blunt,
                diameter,
                ellipse,
                flat,
                bore,
                flange,
                shank,
                transition,
                face,
                round_tip,
                holes,
            },
        )
}

/// The design text and the genus its part must have (one per cross hole).
fn design_text(g: &RootGen) -> (String, u32) {
    let c = 20.0 + 40.0 * g.chord;
    let f = 0.2 + 0.2 * g.stacking;
    // The shank's area at least 1.3 times the first station's, estimated with the
    // NACA Report 460 thickness integral 0.685 t c²: the blade tapers outward, so its
    // area falls there and the transition's area must fall too (monotone, see
    // RootError::Waist).
    let thickness = [0.12, 0.12, 0.15, 0.18][g.section];
    let ratio = g.ellipse.map_or(1.0, |e| 0.6 + 0.4 * e);
    // A trailing edge opened to 0.4 mm adds at most 0.4 mm x half the chord.
    let a1 = 0.685 * thickness * c * c + if g.blunt { 0.2 * c } else { 0.0 };
    // The flat takes a segment off the shank: for an ellipse of half-axes a (chordwise)
    // and b (along the axis) cut at depth h from b, the segment's area is a/b times the
    // circle segment b^2 acos(1 - h/b) - (b - h) sqrt(2 b h - h^2) (elementary).
    let flat_share = |d: f64| -> f64 {
        let Some(u) = g.flat else { return 0.0 };
        let (a, b) = (0.5 * d, 0.5 * d * ratio);
        let h = 2.0 * b * (0.02 + 0.22 * u);
        let circle = b * b * (1.0 - h / b).acos() - (b - h) * (2.0 * b * h - h * h).sqrt();
        a / b * circle
    };
    let shank_area = |d: f64| 0.25 * std::f64::consts::PI * d * d * ratio - flat_share(d);
    let mut d = (c * (0.35 + 0.55 * g.diameter)).max(8.0);
    while shank_area(d) < 1.3 * a1 {
        d *= 1.05;
    }
    let t = d * ratio;
    let min_wall = 0.8;
    let mut root = format!("[root]\nshank-diameter = {d}\n");
    if g.ellipse.is_some() {
        root += &format!("shank-thickness = {t}\n");
    }
    let mut half_small = 0.5 * d.min(t);
    if let Some(u) = g.flat {
        let depth = t * (0.02 + 0.22 * u);
        root += &format!("flat-depth = {depth}\n");
        half_small = half_small.min(0.5 * t - depth);
    }
    let mut needed: f64 = 0.0;
    if let Some((ud, uh, k)) = g.bore {
        let bd = 2.0 * (half_small - min_wall) * (0.3 + 0.65 * ud);
        let depth = 2.0 + 13.0 * uh;
        let angle = [118.0, 90.0, 140.0, 180.0][k];
        let point = if angle >= 180.0 {
            0.0
        } else {
            0.5 * bd / (0.5f64 * angle).to_radians().tan()
        };
        needed = needed.max(depth + point + min_wall + 0.01);
        root += &format!("bore = {{ diameter = {bd}, depth = {depth}, point-angle = {angle} }}\n");
    }
    if let Some((ut, uf, ud)) = g.flange {
        let thick = 1.0 + 3.0 * ut;
        let fillet = uf.map_or(0.0, |u| 0.5 + 2.5 * u);
        let dia = d.max(t) + 2.0 * fillet + 1.0 + 14.0 * ud;
        needed = needed.max(thick + fillet + 0.5);
        root +=
            &format!("flange = {{ diameter = {dia}, thickness = {thick}, fillet = {fillet} }}\n");
    }
    // Cross holes (round shank without a flat only) beyond the flange and the bore.
    let mut genus = 0;
    if let (Some((u, two)), None, None) = (g.holes, g.ellipse, g.flat) {
        let hd = (d - 2.0 * min_wall) * (0.15 + 0.45 * u);
        let mut at = needed + min_wall + 0.5 * hd + 0.01;
        let mut list = Vec::new();
        for _ in 0..if two { 2 } else { 1 } {
            list.push(format!("{{ diameter = {hd}, at = {at} }}"));
            genus += 1;
            at += hd + min_wall + 0.01;
        }
        needed = at - 0.5 * hd + min_wall;
        root += &format!("cross-holes = [{}]\n", list.join(", "));
    }
    let shank = needed + 1.0 + 20.0 * g.shank;
    // Largest sideways travel of an outline point, bounded above: the farther edge of
    // the chord beyond the shank's edge, and half the shank thickness.
    let travel_x = ((1.0 - f) * c - 0.5 * d).max(f * c - 0.5 * d).max(0.5 * d);
    let travel = (travel_x * travel_x + 0.25 * t * t).sqrt();
    let transition = travel * (1.05 + g.transition) + 1.0;
    root += &format!("shank-length = {shank}\ntransition-length = {transition}\n");
    let r0 = shank + transition + 40.0 * g.face;
    let twist = -10.0 + 40.0 * g.twist;
    let mut s = format!(
        "name = \"random-root\"\n[blade]\npoints-per-side = 40\ntolerance = 0.05\nstacking = {f}\nflow = \"{}\"\nrotation = \"{}\"\n{}",
        if g.turbine { "turbine" } else { "propeller" },
        if g.cw { "cw" } else { "ccw" },
        if g.blunt { "min-te-thickness = 0.4\n" } else { "" },
    );
    let sec = SECTIONS[g.section];
    for (dr, cf, dt) in [(0.0, 1.0, 0.0), (60.0, 0.9, -6.0), (150.0, 0.7, -12.0)] {
        s += &format!(
            "[[station]]\nradius = {}\nchord = {}\ntwist = {}\nsection = \"{sec}\"\n",
            r0 + dr,
            c * cf,
            twist + dt
        );
    }
    s += &root;
    if g.round_tip {
        s += "[tip]\nshape = \"round\"\n";
    }
    (s, genus)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    #[test]
    fn any_valid_root_gives_a_checked_solid(g in gen()) {
        let (text, genus) = design_text(&g);
        let design = parse_toml_str(&text, None).expect("generated designs are valid");
        let model = build_blade(&design, &Options::default());
        prop_assert!(model.is_ok(), "{}\n{}", model.err().map(|e| e.to_string()).unwrap_or_default(), text);
        let model = model.unwrap();
        let report = check_solid(
            model.mesh(),
            &CheckOptions::DEFAULT.with_expected_genus(Some(genus)),
        );
        prop_assert!(report.is_ok(), "{}\n{}", report, text);
        prop_assert!(model.mesh().signed_volume() > 0.0);
    }
}
