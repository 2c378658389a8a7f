//! `spanwright build --coupons`: the fit coupons written with the parts, alone, or not at
//! all; read back with stl_io (reference reader).

#[macro_use]
mod support;

use std::f64::consts::PI;

/// Volume of an STL file read with stl_io (divergence theorem: the sum of the signed
/// tetrahedra from the origin).
fn stl_volume(path: &std::path::Path) -> f64 {
    let mut f = std::fs::File::open(path).unwrap();
    let mesh = stl_io::read_stl(&mut f).unwrap();
    mesh.faces
        .iter()
        .map(|t| {
            let [a, b, c] = t.vertices.map(|i| {
                let v = mesh.vertices[i];
                nalgebra::Vector3::new(f64::from(v[0]), f64::from(v[1]), f64::from(v[2]))
            });
            a.dot(&b.cross(&c)) / 6.0
        })
        .sum()
}

#[test]
fn build_writes_coupons_for_a_rotor_with_sockets() {
    let run = support::run_in_temp(&[], &["build", "@/examples/garden-turbine.toml"]);
    assert_eq!(run.code, 0, "{}", run.stderr);
    let files = run.files("out");
    for f in [
        "garden-turbine-coupon-shank.stl",
        "garden-turbine-coupon-socket.stl",
        "garden-turbine.stl",
    ] {
        assert!(files.contains(&f.to_string()), "{files:?}");
    }
    assert!(run.stdout.contains("fit coupons"), "{}", run.stdout);
    // The example: shank 24 mm with a 6.4 mm bore, socket clearance 0.3 mm (default),
    // hub 30 mm thick: shank (pi 12^2 - pi 3.2^2) x 10, ring pi (15^2 - 12.15^2) x 10
    // (elementary geometry); inscribed polygons within perimeter x 0.01 mm tolerance, and
    // f32 coordinates in the file.
    let l = 10.0;
    let shank = stl_volume(&run.path("out/garden-turbine-coupon-shank.stl"));
    assert_near!(
        shank,
        PI * (144.0 - 3.2 * 3.2) * l,
        2.0 * PI * (12.0 + 3.2) * 0.01 * l + 0.05,
        "shank coupon volume (annulus x length)"
    );
    let ring = stl_volume(&run.path("out/garden-turbine-coupon-socket.stl"));
    assert_near!(
        ring,
        PI * (225.0 - 12.15 * 12.15) * l,
        2.0 * PI * (15.0 + 12.15) * 0.01 * l + 0.05,
        "socket ring volume (annulus x length)"
    );
}

#[test]
fn coupons_none_only_and_nothing_to_test() {
    let none = support::run_in_temp(
        &[],
        &[
            "build",
            "@/examples/garden-turbine.toml",
            "--coupons",
            "none",
        ],
    );
    assert_eq!(none.code, 0, "{}", none.stderr);
    assert!(!none.files("out").iter().any(|f| f.contains("coupon")));
    let only = support::run_in_temp(
        &[],
        &[
            "build",
            "@/examples/garden-turbine.toml",
            "--coupons",
            "only",
        ],
    );
    assert_eq!(only.code, 0, "{}", only.stderr);
    assert_eq!(
        only.files("out"),
        [
            "garden-turbine-coupon-shank.stl",
            "garden-turbine-coupon-socket.stl"
        ]
    );
    // The desk fan has no root shank: nothing to test is bad input with `only`, and
    // nothing is written; in `auto` mode the build just has no coupons.
    let fan = support::run_in_temp(
        &[],
        &["build", "@/examples/desk-fan.toml", "--coupons", "only"],
    );
    assert_eq!(fan.code, 2, "{}", fan.stderr);
    assert!(fan.stderr.contains("[root]"), "{}", fan.stderr);
    assert!(fan.files("out").is_empty());
    let blade_only = support::run_in_temp(
        &[],
        &["build", "@/examples/garden-turbine.toml", "--blade-only"],
    );
    assert_eq!(blade_only.code, 0, "{}", blade_only.stderr);
    assert!(!blade_only.files("out").iter().any(|f| f.contains("coupon")));
}
