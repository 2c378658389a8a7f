//! Section properties of mesh cuts against handbook formulas.

mod props_support;

use nalgebra::{Point2, Rotation2};
use props_support::{boxed, ellipse, prism, rect, sphere};
use spanwright::props::{section_table, SectionProps, Slice};

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1e-30)
}

#[test]
fn rectangle_second_moments() {
    // Rectangle b x h about its centroidal axes: I_x = b h^3 / 12, I_y = h b^3 / 12,
    // A = b h (Roark's Formulas for Stress and Strain, 8th ed., Table A.1, case 2; from
    // memory). Cuts at planes through mesh vertices (z = 10, 20, ...) and between them.
    let (b, h, l) = (30.0, 8.0, 50.0);
    let mesh = boxed(b, h, l, 5);
    let radii = [1e-9, 3.3, 10.0, 20.0, 27.5, 40.0, 50.0];
    let table = section_table(&mesh, &radii).unwrap();
    assert_eq!(table.len(), radii.len());
    for s in &table {
        assert_eq!(s.loops, 1, "r = {}", s.radius);
        assert!(close(s.area, b * h, 1e-12), "r = {}", s.radius);
        assert!(close(s.ixx, b * h.powi(3) / 12.0, 1e-10));
        assert!(close(s.iyy, h * b.powi(3) / 12.0, 1e-10));
        assert!(s.ixy.abs() < 1e-9 * s.iyy);
        assert!((s.cx - b / 2.0).abs() < 1e-12 && (s.cy - h / 2.0).abs() < 1e-12);
        assert!(close(s.perimeter, 2.0 * (b + h), 1e-12));
        assert!(close(s.polar, s.ixx + s.iyy, 1e-12));
        // The wide side lies along x, so the largest moment is about y: 90 degrees.
        assert!((s.angle.abs() - 90.0).abs() < 1e-9);
    }
    // Below the root face and above the tip the plane misses the part.
    assert!(section_table(&mesh, &[-1.0, 0.0, 50.1]).unwrap().is_empty());
}

#[test]
fn rotated_rectangle_principal_axes() {
    // Rotating a section by theta rotates its principal axes by theta and keeps the
    // principal moments (Mohr's circle for second moments of area; any mechanics of
    // materials text, e.g. Gere & Goodno, Mechanics of Materials, section 12.8).
    let (b, h) = (6.0, 24.0);
    let th = 35f64.to_radians();
    let rot = Rotation2::new(th);
    let poly: Vec<Point2<f64>> = rect(-b / 2.0, -h / 2.0, b, h)
        .iter()
        .map(|p| rot * p)
        .collect();
    let mesh = prism(&poly, Point2::origin(), 0.0, 20.0);
    let s = SectionProps::of_slice(&Slice::cut(&mesh, 7.0).unwrap()).unwrap();
    assert!(close(s.i1, b * h.powi(3) / 12.0, 1e-10));
    assert!(close(s.i2, h * b.powi(3) / 12.0, 1e-10));
    // The tall side (h along y before rotation) carries i1 about the x axis: angle 0 -> 35.
    assert!((s.angle - 35.0).abs() < 1e-8, "angle {}", s.angle);
    // Mohr's circle: ixx = mean + R cos 2 theta, ixy = -R sin 2 theta.
    let (mean, r) = ((s.i1 + s.i2) / 2.0, (s.i1 - s.i2) / 2.0);
    assert!(close(s.ixx, mean + r * (2.0 * th).cos(), 1e-10));
    assert!(close(s.ixy, -r * (2.0 * th).sin(), 1e-10));
}

#[test]
fn ellipse_second_moment() {
    // Solid ellipse, semi-axes a (x) and b (y): I_x = pi a b^3 / 4, I_y = pi a^3 b / 4,
    // A = pi a b (Roark's Formulas for Stress and Strain, 8th ed., Table A.1; from memory).
    // The inscribed 4096-gon differs by O(1/n^2).
    let (a, b) = (40.0, 6.0);
    let mesh = prism(&ellipse(4096, a, b), Point2::origin(), 100.0, 140.0);
    let s = SectionProps::of_slice(&Slice::cut(&mesh, 120.0).unwrap()).unwrap();
    let pi = std::f64::consts::PI;
    assert!(close(s.area, pi * a * b, 1e-5));
    assert!(close(s.ixx, pi * a * b.powi(3) / 4.0, 1e-5));
    assert!(close(s.iyy, pi * a.powi(3) * b / 4.0, 1e-5));
    assert!(s.cx.abs() < 1e-9 && s.cy.abs() < 1e-9);
}

#[test]
fn cut_through_a_ring_of_vertices() {
    // A plane through a whole latitude ring of a UV sphere (every vertex of the ring
    // lies on it) must still give that ring: a regular m-gon of circumradius
    // R = r sin(theta), area m R^2 sin(2 pi / m) / 2 (elementary geometry).
    let (r, n) = (30.0, 24usize);
    let mesh = sphere(r, n);
    let i = 9;
    let th = std::f64::consts::PI * i as f64 / n as f64;
    let z = -r * th.cos(); // the same expression the builder used
    let slice = Slice::cut(&mesh, z).unwrap();
    assert_eq!(slice.loops.len(), 1);
    let m = 2 * n;
    assert_eq!(slice.loops[0].len(), m);
    let s = SectionProps::of_slice(&slice).unwrap();
    let rr = r * th.sin();
    assert!(close(
        s.area,
        m as f64 * rr * rr * (std::f64::consts::TAU / m as f64).sin() / 2.0,
        1e-12
    ));
    // The loop runs counter-clockwise seen from +z (material on the left): positive area.
    assert!(s.area > 0.0);
}

#[test]
fn hollow_section_subtracts_the_hole() {
    // Regular n-gon of circumradius R: J = A R^2 (2 + cos a) / 6 with a = 2 pi / n and
    // A = n R^2 sin(a) / 2 (derived in props_mass.rs), I_x = I_y = J / 2 by symmetry.
    // A hollow section is the outer polygon minus the inner one (second moments add over
    // areas). As n grows, I_x -> pi (R^4 - r^4) / 4 (Roark's Formulas for Stress and
    // Strain, 8th ed., Table A.1, hollow circle; from memory).
    let (ro, ri, n) = (20.0, 16.0, 256usize);
    let outer = props_support::ngon(n, ro, Point2::origin());
    let inner = props_support::ngon(n, ri, Point2::origin());
    let mesh = props_support::tube(&outer, &inner, 0.0, 30.0);
    let slice = Slice::cut(&mesh, 12.0).unwrap();
    assert_eq!(slice.loops.len(), 2);
    let s = SectionProps::of_slice(&slice).unwrap();
    let a = std::f64::consts::TAU / n as f64;
    let ix = |r: f64| {
        let area = n as f64 * r * r * a.sin() / 2.0;
        area * r * r * (2.0 + a.cos()) / 12.0
    };
    let area = |r: f64| n as f64 * r * r * a.sin() / 2.0;
    assert_eq!(s.loops, 2);
    assert!(close(s.area, area(ro) - area(ri), 1e-10));
    assert!(close(s.ixx, ix(ro) - ix(ri), 1e-10));
    assert!(close(s.iyy, ix(ro) - ix(ri), 1e-10));
    let pi = std::f64::consts::PI;
    assert!(close(s.ixx, pi * (ro.powi(4) - ri.powi(4)) / 4.0, 1e-3));
    // The mass properties see the hole too: volume = section area x length.
    let p = spanwright::props::MassProps::of_mesh(&mesh, 1.0).unwrap();
    assert!(close(p.volume, s.area * 30.0, 1e-10));
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(48))]
    #[test]
    fn any_cut_of_a_prism_is_its_polygon(
        angle in 0.0f64..360.0,
        dx in -50.0f64..50.0,
        dy in -50.0f64..50.0,
        z in 0.0f64..=40.0,
        n in 3usize..40,
    ) {
        // Property: every cut of a straight prism inside its length, including cuts
        // through its end faces' vertices, has the area and centroid of the polygon
        // (elementary geometry; polygon area by the shoelace formula).
        let rot = Rotation2::new(angle.to_radians());
        let poly: Vec<Point2<f64>> = props_support::ngon(n, 10.0, Point2::origin())
            .iter()
            .map(|p| rot * p + nalgebra::Vector2::new(dx, dy))
            .collect();
        let mesh = prism(&poly, Point2::new(dx, dy), 0.0, 40.0);
        let z = if z == 0.0 { 1e-9 } else { z };
        let s = SectionProps::of_slice(&Slice::cut(&mesh, z).unwrap()).unwrap();
        let shoelace: f64 = (0..n)
            .map(|i| {
                let (p, q) = (poly[i], poly[(i + 1) % n]);
                p.x * q.y - q.x * p.y
            })
            .sum::<f64>()
            / 2.0;
        proptest::prop_assert!((s.area - shoelace).abs() < 1e-9 * shoelace);
        proptest::prop_assert!((s.cx - dx).abs() < 1e-9 && (s.cy - dy).abs() < 1e-9);
        proptest::prop_assert!((s.ixx - s.iyy).abs() < 1e-9 * s.ixx);
    }
}
