//! The spanwise law (`blade.spanwise`): a table meant as straight segments, built
//! linear, has the volume of straight lines between its stations.

use spanwright::design::{self, Law};
use spanwright::pipeline::{build_blade, Options};

/// Area of the NACA 00xx section of unit chord and thickness `t`: twice the integral of
/// the published half-thickness y_t = 5 t (0.2969 sqrt(x) - 0.1260 x - 0.3516 x^2 +
/// 0.2843 x^3 - 0.1015 x^4) over 0..1 (NACA Report 460, Jacobs, Ward & Pinkerton, 1933;
/// Abbott & von Doenhoff, *Theory of Wing Sections*, 1959, section 6.4), integrated term
/// by term: 10 t (0.2969 * 2/3 - 0.1260/2 - 0.3516/3 + 0.2843/4 - 0.1015/5).
fn naca00_area(t: f64) -> f64 {
    10.0 * t * (0.2969 * 2.0 / 3.0 - 0.1260 / 2.0 - 0.3516 / 3.0 + 0.2843 / 4.0 - 0.1015 / 5.0)
}

/// Stations (radius, chord) of a planform meant as straight segments: a taper from 40 to
/// 30 mm over 100 mm, then a constant 30 mm chord for 100 mm (invented demo values).
const PLANFORM: [(f64, f64); 3] = [(40.0, 40.0), (140.0, 30.0), (240.0, 30.0)];

fn text(law: &str) -> String {
    let mut s = format!(
        "[blade]\nsection = \"naca0012\"\nmin-te-thickness = 0\ntolerance = 0.01\nspanwise = \"{law}\"\n"
    );
    for (r, c) in PLANFORM {
        s.push_str(&format!(
            "[[station]]\nradius = {r}\nchord = {c}\ntwist = 0\n"
        ));
    }
    s
}

#[test]
fn straight_taper_built_linear_has_the_straight_line_volume() {
    // With one section shape scaled by the chord, the area at r is A0 (c(r)/c0)^2 and the
    // volume is the integral of the area (Cavalieri's principle). For a straight chord
    // from c_a to c_b over a length L, the integral of c^2 is L (c_a^2 + c_a c_b + c_b^2)
    // / 3: the frustum (prismoidal) formula, exact for a quadratic integrand.
    let unit = naca00_area(0.12);
    let exact: f64 = PLANFORM
        .windows(2)
        .map(|w| {
            let (l, a, b) = (w[1].0 - w[0].0, w[0].1, w[1].1);
            unit * l * (a * a + a * b + b * b) / 3.0
        })
        .sum();
    let d = design::parse_toml_str(&text("linear"), None).unwrap();
    let built = build_blade(&d, &Options::default()).unwrap();
    assert_eq!(built.blade.spanwise(), Law::Linear);
    let mesh = built.mesh();
    let v = mesh.signed_volume();
    // The mesh lies within the tolerance of the exact surface everywhere, so its volume
    // differs from the solid's by at most tolerance x surface area.
    let bound = built.tolerance * mesh.area();
    eprintln!("linear: mesh {v:.1} mm³, exact {exact:.1} mm³, bound {bound:.1} mm³");
    assert!((v - exact).abs() <= bound, "{v} vs {exact} (bound {bound})");

    // The smooth law bulges the taper's chord toward the kink: its volume lies outside
    // the bound, so the comparison above tells the laws apart.
    let d = design::parse_toml_str(&text("smooth"), None).unwrap();
    let smooth = build_blade(&d, &Options::default()).unwrap();
    assert_eq!(smooth.blade.spanwise(), Law::Smooth);
    let vs = smooth.mesh().signed_volume();
    eprintln!("smooth: mesh {vs:.1} mm³");
    assert!(
        (vs - exact).abs() > bound,
        "{vs} vs {exact} (bound {bound})"
    );
}

#[test]
fn linear_chord_is_straight_between_stations() {
    // Midway between the first two stations the chord is the mean of theirs (linear
    // interpolation, elementary).
    let d = design::parse_toml_str(&text("linear"), None).unwrap();
    let built = build_blade(&d, &Options::default()).unwrap();
    for f in [0.25, 0.5, 0.75] {
        let r = 40.0 + 100.0 * f;
        let want = 40.0 - 10.0 * f;
        assert!((built.blade.chord_at(r) - want).abs() < 1e-12, "r = {r}");
    }
    assert!((built.blade.chord_at(190.0) - 30.0).abs() < 1e-12);
}
