//! Fit coupons: volumes against elementary formulas, and the clearance between the shank
//! coupon and the socket ring measured on the meshes (vertex radii, and parry3d's distance
//! between the two surfaces).

#[macro_use]
mod support;
mod brep_support;

use spanwright::coupon::{coupons, CouponKind, CouponOptions};
use spanwright::design;
use spanwright::mesh::TriMesh;
use spanwright::pipeline::{self, Outcome};
use std::f64::consts::PI;

/// A small turbine with a hub 30 mm thick; `root` is the `[root]` table's body and `hub`
/// more `[rotor.hub]` lines.
fn build(root: &str, hub: &str) -> Outcome {
    let text = format!(
        r#"
name = "coupon-test"
[blade]
section = "naca4412"
points-per-side = 40
tolerance = 0.02
[[station]]
radius = 75
chord = 50
twist = 18
[[station]]
radius = 200
chord = 25
twist = 3
[rotor]
blades = 3
hub-radius = 20
[rotor.hub]
thickness = 30
{hub}
[root]
shank-length = 25
transition-length = 30
{root}
"#
    );
    let d = design::parse_toml_str(&text, None).unwrap();
    pipeline::run(&d, &pipeline::Options::default()).unwrap()
}

/// Area of the circular segment cut from a circle of radius `r` by a chord at distance
/// `d` from its centre: r² acos(d / r) - d sqrt(r² - d²) (elementary geometry, e.g. CRC
/// Standard Mathematical Tables, "circular segment").
fn segment(r: f64, d: f64) -> f64 {
    r * r * (d / r).acos() - d * (r * r - d * d).sqrt()
}

/// Smallest and largest distance of the mesh's vertices from the z axis.
fn radii(m: &TriMesh) -> (f64, f64) {
    m.vertices
        .iter()
        .map(|p| p.x.hypot(p.y))
        .fold((f64::INFINITY, 0.0), |(a, b), r| (a.min(r), b.max(r)))
}

fn length(m: &TriMesh) -> f64 {
    let bb = m.bounding_box().unwrap();
    bb.max.z - bb.min.z
}

fn to_parry(m: &TriMesh) -> parry3d::shape::TriMesh {
    let v: Vec<parry3d::math::Vector> = m
        .vertices
        .iter()
        .map(|p| parry3d::math::Vector::new(p.x as f32, p.y as f32, p.z as f32))
        .collect();
    parry3d::shape::TriMesh::new(v, m.triangles.clone()).unwrap()
}

#[test]
fn round_shank_with_flat_and_bore() {
    let o = build(
        "shank-diameter = 24\nflat-depth = 2\nbore = { diameter = 6.4, depth = 10 }",
        "diameter = 84\nsocket-clearance = 0.4",
    );
    let tol = o.blade.tolerance;
    let c = coupons(&o, &CouponOptions::DEFAULT).unwrap();
    assert_eq!(c.len(), 2);
    let (shank, socket) = (&c[0], &c[1]);
    assert_eq!(shank.kind, CouponKind::Shank);
    assert_eq!(shank.part.name(), "coupon-test-coupon-shank");
    assert_eq!(socket.part.name(), "coupon-test-coupon-socket");
    assert_eq!(shank.part.report().genus, Some(1));
    assert_eq!(socket.part.report().genus, Some(1));

    // Shank: (circle - segment below the flat - bore) x length (elementary geometry);
    // the inscribed polygons lose at most perimeter x tolerance of area.
    let (r, rb, l) = (12.0, 3.2, 10.0);
    assert_near!(
        length(shank.part.mesh()),
        l,
        1e-12,
        "coupon length (default 10 mm)"
    );
    let area = PI * r * r - segment(r, r - 2.0) - PI * rb * rb;
    let slack = 2.0 * PI * (r + rb) * tol * l;
    assert_near!(
        shank.part.report().volume,
        area * l,
        slack,
        "shank coupon: (pi r^2 - circular segment - pi rb^2) x length"
    );
    // Socket ring: the socket is shank + clearance (24.4 mm), the wall the hub's over
    // the socket: 30 / 2 - 12.2 = 2.8 mm; volume pi (ro^2 - ri^2) x length (annulus).
    let (ri, ro) = (12.2, 15.0);
    let slack = 2.0 * PI * (ri + ro) * tol * l;
    assert_near!(
        socket.part.report().volume,
        PI * (ro * ro - ri * ri) * l,
        slack,
        "socket ring: annulus area x length"
    );
    let (inner, outer) = radii(socket.part.mesh());
    assert_near!(inner, ri, 1e-9, "socket radius (shank + clearance) / 2");
    assert_near!(outer, ro, 1e-9, "ring outer radius");

    // The clearance on the meshes: socket diameter minus the shank's diameter.
    let (_, shank_r) = radii(shank.part.mesh());
    assert_near!(
        2.0 * (inner - shank_r),
        0.4,
        1e-9,
        "diametral clearance = rotor.hub.socket-clearance"
    );
    assert_near!(socket.clearance, 0.4, 1e-12, "reported clearance");
    // parry3d (reference library): the shank coupon placed in the ring, coaxial, is
    // clearance / 2 away from it everywhere; the outlines are polygons with the same
    // vertex angles, so the nearest points are on parallel sides, cos(pi / n) of the
    // radial gap apart (n >= 12 sides; here within the mesh tolerance).
    let d = parry3d::query::distance(
        &parry3d::math::Pose::IDENTITY,
        &to_parry(shank.part.mesh()),
        &parry3d::math::Pose::IDENTITY,
        &to_parry(socket.part.mesh()),
    )
    .expect("parry3d measures trimesh to trimesh");
    assert_near!(
        f64::from(d.distance),
        0.2,
        tol + 1e-4,
        "radial gap (parry3d)"
    );
}

#[test]
fn elliptical_shank_with_flat() {
    // Ellipse a = 12 (chordwise), b = 10 (along the rotor axis), flat 1.5 deep on the
    // -y side: area pi a b - (a / b) segment(b, b - 1.5) (the ellipse is the circle of
    // radius b stretched by a / b along x; areas scale by a / b).
    let o = build(
        "shank-diameter = 24\nshank-thickness = 20\nflat-depth = 1.5",
        "diameter = 84",
    );
    let tol = o.blade.tolerance;
    let c = coupons(&o, &CouponOptions { length: 6.0 }).unwrap();
    let shank = &c[0];
    assert_eq!(shank.part.report().genus, Some(0));
    let (a, b) = (12.0, 10.0);
    let area = PI * a * b - a / b * segment(b, b - 1.5);
    assert_near!(
        shank.part.report().volume,
        area * 6.0,
        2.0 * PI * a * tol * 6.0,
        "elliptical shank coupon: (pi a b - stretched segment) x length"
    );
    // The flat: no vertex below y = -(b - 1.5), and its corners on it.
    let lowest = shank
        .part
        .mesh()
        .vertices
        .iter()
        .map(|p| p.y)
        .fold(f64::INFINITY, f64::min);
    assert_near!(lowest, -(b - 1.5), 1e-12, "flat at thickness / 2 - depth");
    // The socket takes the larger extent: 24 + 0.3 (default clearance, common practice).
    let (inner, _) = radii(c[1].part.mesh());
    assert_near!(inner, 12.15, 1e-9, "socket radius (24 + 0.3) / 2");
    let (_, widest) = radii(shank.part.mesh());
    assert_near!(2.0 * (inner - widest), 0.3, 1e-9, "diametral clearance");
}

#[test]
fn no_coupons_without_sockets() {
    // A hub without sockets stays inside the root face (radius 18 < 20 mm).
    let o = build("shank-diameter = 24", "diameter = 36\nsockets = false");
    let e = coupons(&o, &CouponOptions::DEFAULT).unwrap_err();
    assert!(e.to_string().contains("sockets"), "{e}");
    let o = build("shank-diameter = 24", "diameter = 84");
    let e = coupons(&o, &CouponOptions { length: -1.0 }).unwrap_err();
    assert!(e.to_string().contains("-1"), "{e}");
}

#[test]
fn coupons_are_the_same_bytes_every_time() {
    let o = build("shank-diameter = 24\nflat-depth = 1", "diameter = 84");
    let a = coupons(&o, &CouponOptions::DEFAULT).unwrap();
    let b = coupons(&o, &CouponOptions::DEFAULT).unwrap();
    for (x, y) in a.iter().zip(&b) {
        assert!(x.part.mesh() == y.part.mesh());
    }
}

#[test]
fn joint_coupon_of_a_split_blade() {
    // The barn-turbine demo splits its blade; the joint coupon is a 10 mm slice at the
    // first joint with the pin holes and the rod's channel through it.
    let d = design::load(std::path::Path::new("examples/barn-turbine.toml")).unwrap();
    let outcome = pipeline::run(&d, &pipeline::Options::default()).unwrap();
    let plan = outcome.segments.as_ref().expect("the demo is split");
    let joint = &plan.joints[0];
    let holes = joint.holes(plan.channel.as_ref());
    let all = coupons(&outcome, &CouponOptions::DEFAULT).unwrap();
    let c = all
        .iter()
        .find(|c| c.kind == CouponKind::Joint)
        .expect("a joint coupon");
    let m = c.part.mesh();
    // The clearance is the design's dowel clearance (segments.dowels.clearance = 0.2).
    assert_near!(c.clearance, 0.2, 1e-12);
    // A prism 10 mm long (CouponOptions::DEFAULT).
    assert_near!(length(m), 10.0, 1e-9);
    // Genus = holes, by Euler's formula V - E + F = 2 - 2g for a closed orientable
    // surface (every edge is shared by two triangles, so E = 3F/2).
    let (v, f) = (m.vertices.len() as i64, m.triangles.len() as i64);
    let genus = (2 - (v - 3 * f / 2 + f)) / 2;
    assert_eq!(genus as usize, holes.len());
    // Each hole's wall: vertices at the hole's radius from its centre (inscribed
    // polygon), the pin holes at pin + clearance.
    for (centre, diameter) in &holes {
        let near: Vec<f64> = m
            .vertices
            .iter()
            .map(|p| (p.x - centre.x).hypot(p.y - centre.y))
            .filter(|r| (r - 0.5 * diameter).abs() < 0.05)
            .collect();
        assert!(
            near.len() >= 2 * 8,
            "hole at {centre}: {} wall vertices",
            near.len()
        );
        for r in near {
            assert_near!(r, 0.5 * diameter, 1e-9);
        }
    }
    assert!(holes
        .iter()
        .any(|(_, d)| (d - (joint.pin_diameter + 0.2)).abs() < 1e-12));
    // Volume = length x (outline area - hole areas): the shoelace formula (Gauss's
    // area formula) for the outline, n/2 r² sin(2 pi / n) for each inscribed n-gon;
    // the mesh volume by the divergence theorem (signed tetrahedra).
    let cut = spanwright::mesh::Slice::cut(outcome.blade.mesh(), joint.radius).unwrap();
    let outline = &cut.loops[0];
    let area: f64 = 0.5
        * (0..outline.len())
            .map(|i| {
                let (a, b) = (outline[i], outline[(i + 1) % outline.len()]);
                a.x * b.y - b.x * a.y
            })
            .sum::<f64>();
    let ring = |z: f64, centre: &nalgebra::Point2<f64>, r: f64| {
        m.vertices
            .iter()
            .filter(|p| {
                (p.z - z).abs() < 1e-9 && ((p.x - centre.x).hypot(p.y - centre.y) - r).abs() < 1e-9
            })
            .count()
    };
    let holes_area: f64 = holes
        .iter()
        .map(|(c, d)| {
            let n = ring(0.0, c, 0.5 * d) as f64;
            0.5 * n * (0.5 * d).powi(2) * (2.0 * PI / n).sin()
        })
        .sum();
    assert_rel!(m.signed_volume(), 10.0 * (area - holes_area), 1e-9);
}

#[test]
fn coupon_step_is_the_same_polyhedron_as_its_mesh() {
    // Each coupon's STEP (ISO 10303-21), read back with truck-stepio: one closed shell
    // (every edge used twice in opposite senses), with as many faces as the prism has
    // (two ends and one per loop edge), enclosing the mesh's volume (both are the same
    // polyhedron, so to rounding).
    let d = design::load(std::path::Path::new("examples/barn-turbine.toml")).unwrap();
    let outcome = pipeline::run(&d, &pipeline::Options::default()).unwrap();
    let all = coupons(&outcome, &CouponOptions::DEFAULT).unwrap();
    assert_eq!(all.len(), 3);
    for c in &all {
        let name = c.part.name();
        let text = spanwright::export::prism_step_text(name, &c.loops, c.length).unwrap();
        let shells = brep_support::read_shells(&text);
        assert_eq!(shells.len(), 1, "{name}");
        brep_support::assert_closed(&shells[0], name);
        let faces: usize = 2 + c.loops.iter().map(Vec::len).sum::<usize>();
        assert_eq!(shells[0].faces.len(), faces, "{name}");
        let v_step = brep_support::brep_volume(&shells[0]);
        assert_rel!(v_step, c.part.mesh().signed_volume(), 1e-9, name);
    }
}
