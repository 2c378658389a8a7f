//! A rotor printed as one part: blades joined by a prismatic hub, one closed solid.

use spanwright::design::parse_toml_str;
use spanwright::pipeline::{run, PartKind};
use std::f64::consts::PI;

fn design(rotor: &str) -> String {
    format!(
        r#"
name = "fan"
[blade]
section = "naca4409"
flow = "propeller"
rotation = "cw"
points-per-side = 60
min-te-thickness = 0.4
[[station]]
radius = 20
chord = 20
twist = 40
[[station]]
radius = 40
chord = 22
twist = 28
[[station]]
radius = 60
chord = 16
twist = 20
{rotor}
"#
    )
}

#[test]
fn one_piece_volume_is_blades_plus_prism_minus_bore() {
    // Elementary geometry: a regular B-gon of apothem R has area B R^2 tan(pi/B); the
    // bore is a regular n-gon of circumradius r, area n r^2 sin(2 pi/n) / 2. The blades
    // sit on the prism's faces from outside, so the volumes add.
    for (bore, genus) in [(None, 0u32), (Some(3.0), 1)] {
        let rotor = match bore {
            Some(d) => {
                format!("[rotor]\nblades = 5\n[rotor.one-piece]\nthickness = 16\nbore = {d}\n")
            }
            None => "[rotor]\nblades = 5\n[rotor.one-piece]\nthickness = 16\n".into(),
        };
        let d = parse_toml_str(&design(&rotor), None).unwrap();
        // The pipeline checks the one-piece rotor with the genus its bore implies.
        let outcome = run(&d, &Default::default()).unwrap();
        let part = &outcome.part(PartKind::OnePiece).unwrap().bodies[0];
        assert_eq!(part.report().genus, Some(genus));
        let b = 5.0;
        let prism = b * 20.0f64.powi(2) * (PI / b).tan() * 16.0;
        let bore_area = bore.map_or(0.0, |dd: f64| {
            // Count the bore's sides from the mesh: vertices on the top face's circle.
            let r = 0.5 * dd;
            let n = part
                .mesh()
                .vertices
                .iter()
                .filter(|p| ((p.x * p.x + p.z * p.z).sqrt() - r).abs() < 1e-9)
                .count() as f64
                / 2.0;
            0.5 * n * r * r * (2.0 * PI / n).sin()
        });
        let expected = b * outcome.blade_part().mesh().signed_volume() + prism - bore_area * 16.0;
        let v = part.mesh().signed_volume();
        assert!((v / expected - 1.0).abs() < 1e-9, "{v} vs {expected}");
    }
}

#[test]
fn one_piece_refuses_what_it_cannot_join() {
    let cases = [
        ("[rotor]\nblades = 2\n[rotor.one-piece]\n", "rotor.blades"),
        (
            "[rotor]\nblades = 3\ncone = 3\n[rotor.one-piece]\n",
            "rotor.cone",
        ),
        (
            "[rotor]\nblades = 3\nhub-radius = 25\n[rotor.one-piece]\n",
            "rotor.hub-radius",
        ),
        (
            "[rotor]\nblades = 12\n[rotor.one-piece]\n",
            "rotor.one-piece",
        ),
        (
            "[rotor]\nblades = 5\n[rotor.one-piece]\nthickness = 2\n",
            "rotor.one-piece.thickness",
        ),
        (
            "[rotor]\nblades = 5\n[rotor.one-piece]\nbore = 45\n",
            "rotor.one-piece.bore",
        ),
    ];
    for (rotor, key) in cases {
        let d = parse_toml_str(&design(rotor), None).unwrap();
        let err = run(&d, &Default::default()).unwrap_err().to_string();
        assert!(err.contains(key), "{rotor}: {err}");
    }
}
