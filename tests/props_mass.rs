//! Mass properties of meshed analytic shapes against handbook formulas and parry3d.

mod props_support;

use nalgebra::{Matrix3, Matrix4, Point2, Point3, Rotation3, Vector3};
use props_support::{boxed, demo_blade, ngon, prism, sphere};
use spanwright::props::{Balance, MassProps, Material};

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1e-30)
}

#[test]
fn box_matches_handbook() {
    // Solid rectangular block: V = abc, I_x = m (b^2 + c^2) / 12 about the centroid
    // (any mechanics handbook, e.g. Meriam & Kraige, Engineering Mechanics: Dynamics,
    // Appendix D, Table D/4).
    let (a, b, c) = (20.0, 30.0, 50.0);
    let rho = 1.24e-3; // g/mm^3 (PLA, common practice)
    let p = MassProps::of_mesh(&boxed(a, b, c, 3), rho).unwrap();
    let m = rho * a * b * c;
    assert!(close(p.volume, a * b * c, 1e-12));
    assert!(close(p.area, 2.0 * (a * b + b * c + c * a), 1e-12));
    assert!(close(p.mass, m, 1e-12));
    assert!((p.centroid - Point3::new(a / 2.0, b / 2.0, c / 2.0)).norm() < 1e-9);
    assert!(close(p.inertia[(0, 0)], m * (b * b + c * c) / 12.0, 1e-10));
    assert!(close(p.inertia[(1, 1)], m * (a * a + c * c) / 12.0, 1e-10));
    assert!(close(p.inertia[(2, 2)], m * (a * a + b * b) / 12.0, 1e-10));
    assert!(p.inertia[(0, 1)].abs() < 1e-9 * m * c * c);
    // Rotor axis (y through the origin): parallel-axis theorem, d^2 = (a/2)^2 + (c/2)^2.
    let iy = m * (a * a + c * c) / 12.0 + m * (a * a + c * c) / 4.0;
    assert!(close(p.inertia_about_rotor_axis(), iy, 1e-10));
    let pr = p.principal();
    // Ascending: the smallest moment is about the long (z) edge.
    assert!(close(pr.moments[0], m * (a * a + b * b) / 12.0, 1e-10));
    assert!(pr.axes[0].z.abs() > 1.0 - 1e-9);
    assert!(close(pr.moments[2], m * (b * b + c * c) / 12.0, 1e-10));
}

#[test]
fn faceted_cylinder_matches_exact_prism() {
    // Derivation (for this test): a regular n-gon of circumradius R is n isosceles
    // triangles with apex at the centre and apex angle a = 2 pi / n. For a triangle with
    // one vertex at the origin and the others at p, q, integral(x^2 + y^2 dA) =
    // A_t (p.p + p.q + q.q) / 6, so J = A R^2 (2 + cos a) / 6 with A = n R^2 sin(a) / 2.
    // The prism of height h: I_axis = rho h J = m R^2 (2 + cos a) / 6; by symmetry
    // I_xx = I_yy = J / 2 in the plane, so I_transverse = m R^2 (2 + cos a) / 12 + m h^2 / 12.
    // As n -> infinity, I_axis -> m R^2 / 2 (solid cylinder, any mechanics handbook).
    let (r, h) = (12.0, 40.0);
    for n in [3usize, 7, 64] {
        let mesh = prism(
            &ngon(n, r, Point2::new(5.0, -3.0)),
            Point2::new(5.0, -3.0),
            10.0,
            10.0 + h,
        );
        let p = MassProps::of_mesh(&mesh, 1.0).unwrap();
        let a = std::f64::consts::TAU / n as f64;
        let area = n as f64 * r * r * a.sin() / 2.0;
        let m = area * h;
        assert!(close(p.mass, m, 1e-12), "n = {n}");
        assert!(
            close(p.inertia[(2, 2)], m * r * r * (2.0 + a.cos()) / 6.0, 1e-10),
            "n = {n}"
        );
        let it = m * r * r * (2.0 + a.cos()) / 12.0 + m * h * h / 12.0;
        assert!(close(p.inertia[(0, 0)], it, 1e-10), "n = {n}");
        assert!(close(p.inertia[(1, 1)], it, 1e-10), "n = {n}");
        assert!((p.centroid - Point3::new(5.0, -3.0, 10.0 + h / 2.0)).norm() < 1e-9);
    }
    // Limit: I = m r^2 / 2 about the axis of a solid cylinder (any mechanics handbook).
    let mesh = prism(&ngon(512, r, Point2::origin()), Point2::origin(), 0.0, h);
    let p = MassProps::of_mesh(&mesh, 1.0).unwrap();
    assert!(close(p.inertia[(2, 2)], p.mass * r * r / 2.0, 1e-4));
}

#[test]
fn sphere_tends_to_two_fifths() {
    // Solid sphere: V = 4/3 pi r^3, I = 2/5 m r^2 (any mechanics handbook). The inscribed
    // mesh converges from below; the error must shrink as the mesh is refined.
    let r = 25.0;
    let mut last = f64::INFINITY;
    for n in [16usize, 32, 96] {
        let p = MassProps::of_mesh(&sphere(r, n), 1.0).unwrap();
        let err = (p.inertia[(0, 0)] / (p.mass * r * r) - 0.4).abs();
        assert!(
            err < last,
            "refining must reduce the error ({err} after {last})"
        );
        last = err;
        assert!(p.centroid.coords.norm() < 1e-9);
    }
    let p = MassProps::of_mesh(&sphere(r, 96), 1.0).unwrap();
    assert!(close(
        p.volume,
        4.0 / 3.0 * std::f64::consts::PI * r.powi(3),
        1e-3
    ));
    for k in 0..3 {
        assert!(close(p.inertia[(k, k)], 0.4 * p.mass * r * r, 1e-3));
    }
}

#[test]
fn tilted_prism_transforms_like_a_tensor() {
    // A rigid motion x' = R x + t moves the centre of mass to R c + t and turns the
    // central inertia tensor into R I R^T (tensor transformation rule); about any line
    // the parallel-axis theorem adds m d^2 (any mechanics handbook).
    let mesh = boxed(8.0, 14.0, 60.0, 2);
    let base = MassProps::of_mesh(&mesh, 2.7e-3).unwrap();
    let rot = Rotation3::from_euler_angles(0.3, -0.7, 1.1);
    let t = Vector3::new(4.0, -9.0, 120.0);
    let mut mv = Matrix4::new_translation(&t) * rot.to_homogeneous();
    mv[(3, 3)] = 1.0;
    let moved = MassProps::of_mesh(&mesh.transformed(&mv), 2.7e-3).unwrap();
    let c = rot * base.centroid + t;
    assert!((moved.centroid - c).norm() < 1e-9);
    let rm: Matrix3<f64> = *rot.matrix();
    let want = rm * base.inertia * rm.transpose();
    assert!((moved.inertia - want).norm() < 1e-9 * want.norm());
    // About the rotor axis (the y axis): u = y, d^2 = c_x^2 + c_z^2.
    let about = want[(1, 1)] + moved.mass * (c.x * c.x + c.z * c.z);
    assert!(close(moved.inertia_about_rotor_axis(), about, 1e-10));
    // About a skew axis through an arbitrary point.
    let (q, u) = (
        Point3::new(1.0, 2.0, 3.0),
        Vector3::new(1.0, -2.0, 0.5).normalize(),
    );
    let rq = c - q;
    let d2 = (rq - u * rq.dot(&u)).norm_squared();
    let skew = u.dot(&(want * u)) + moved.mass * d2;
    assert!(close(moved.inertia_about(&q, &u), skew, 1e-10));
}

#[test]
fn agrees_with_parry3d() {
    // Reference library: parry3d 0.31 `MassProperties::from_trimesh` (f32, glam types):
    // mass, centre of mass and principal moments within 0.1 %.
    let mesh = demo_blade(60.0, 400.0, 70.0, 30.0, 25.0, 3.0, 12, 40);
    let rho = 1.0e-3;
    let ours = MassProps::of_mesh(&mesh, rho).unwrap();
    // Shift to the centroid first so f32 keeps its digits.
    let c = ours.centroid.coords;
    let verts: Vec<parry3d::math::Vector> = mesh
        .vertices
        .iter()
        .map(|p| {
            let q = p.coords - c;
            parry3d::math::Vector::new(q.x as f32, q.y as f32, q.z as f32)
        })
        .collect();
    let theirs =
        parry3d::mass_properties::MassProperties::from_trimesh(rho as f32, &verts, &mesh.triangles);
    assert!(close(theirs.mass() as f64, ours.mass, 1e-3));
    let com = theirs.local_com;
    let com = Vector3::new(com.x as f64, com.y as f64, com.z as f64);
    assert!(
        com.norm() < 1e-3 * (ours.volume.cbrt()),
        "centre of mass differs by {com:?}"
    );
    let mut pm = [
        theirs.principal_inertia().x as f64,
        theirs.principal_inertia().y as f64,
        theirs.principal_inertia().z as f64,
    ];
    pm.sort_by(f64::total_cmp);
    let mine = ours.principal().moments;
    for k in 0..3 {
        assert!(
            close(mine[k], pm[k], 1e-3),
            "principal {k}: {} vs {}",
            mine[k],
            pm[k]
        );
    }
}

#[test]
fn rotor_balance_and_fill() {
    // Three copies of a blade at 120 degrees about the y axis balance (statics: the
    // centre of mass of a symmetric set lies on the axis); one heavier blade shows an
    // imbalance of (extra mass) x (its centre-of-mass radius) g mm, exactly.
    let blade = demo_blade(40.0, 300.0, 60.0, 25.0, 20.0, 2.0, 8, 30);
    let pla = Material::preset("pla").unwrap();
    let parts: Vec<MassProps> = (0..3)
        .map(|k| {
            let r = Rotation3::from_axis_angle(&Vector3::y_axis(), k as f64 * 120f64.to_radians());
            MassProps::of_mesh(&blade.transformed(&r.to_homogeneous()), pla.density_g_mm3())
                .unwrap()
        })
        .collect();
    let bal = Balance::of_parts(&parts).unwrap();
    assert!(bal.imbalance < 1e-9 * bal.total_mass * 300.0);
    assert!(bal.mass_spread < 1e-9 * bal.total_mass);
    let mut heavy = parts.clone();
    heavy[1] = heavy[1].scaled(1.02);
    let bal = Balance::of_parts(&heavy).unwrap();
    let extra = 0.02 * parts[1].mass;
    let rc = parts[1].centroid.x.hypot(parts[1].centroid.z);
    assert!(close(bal.imbalance, extra * rc, 1e-9));
    assert!(close(bal.mass_spread, extra, 1e-9));
    assert_eq!(bal.heaviest, 1);
    // The fill model is tested against exact offsets in tests/props_shell.rs.
}
