//! Single-part fit against elementary geometry, and property tests of soundness.

use nalgebra::{Matrix4, Point3, Rotation3, Vector3};
use proptest::prelude::*;
use spanwright::fit::{fit_part, Fit, FitOptions, Printer, PrinterSpec};
use spanwright::mesh::TriMesh;

fn box_mesh(a: f64, b: f64, c: f64) -> TriMesh {
    TriMesh::cuboid(Point3::origin(), nalgebra::Vector3::new(a, b, c))
}

/// A closed prism with `n` sides inscribed in a circle of radius `r`, axis along z,
/// length `len`.
fn rod(len: f64, r: f64, n: usize) -> TriMesh {
    let mut m = TriMesh::new();
    for k in 0..2 {
        for i in 0..n {
            let t = std::f64::consts::TAU * i as f64 / n as f64;
            m.push_vertex(Point3::new(r * t.cos(), r * t.sin(), k as f64 * len));
        }
    }
    let n32 = n as u32;
    for i in 0..n32 {
        let j = (i + 1) % n32;
        m.triangles.push([i, j, n32 + j]);
        m.triangles.push([i, n32 + j, n32 + i]);
    }
    for i in 1..n32 - 1 {
        m.triangles.push([0, i + 1, i]);
        m.triangles.push([n32, n32 + i, n32 + i + 1]);
    }
    m
}

fn printer_box(x: f64, y: f64, z: f64, margin: f64) -> Printer {
    PrinterSpec {
        volume: Some([x, y, z]),
        margin: Some(margin),
        ..Default::default()
    }
    .resolve("test")
    .unwrap()
}

fn opts(res: f64) -> FitOptions {
    FitOptions {
        resolution_deg: res,
        ..FitOptions::DEFAULT
    }
}

/// Checks every placed vertex against the volume and the margin (the soundness claim).
fn assert_inside(mesh: &TriMesh, fit: &Fit, p: &Printer) {
    let m = p.margin;
    let tol = 1e-6;
    for v in &mesh.vertices {
        let q = fit.placement.apply(v);
        match p.volume {
            spanwright::fit::Volume::Box { x, y, z } => {
                assert!(q.x >= m - tol && q.x <= x - m + tol, "x {q:?}");
                assert!(q.y >= m - tol && q.y <= y - m + tol, "y {q:?}");
                assert!(q.z >= -tol && q.z <= z - m + tol, "z {q:?}");
            }
            spanwright::fit::Volume::Round { diameter, height } => {
                assert!((q.x * q.x + q.y * q.y).sqrt() <= 0.5 * diameter - m + tol);
                assert!(q.z >= -tol && q.z <= height - m + tol);
            }
        }
    }
}

#[test]
fn cube_fits_only_when_its_side_does() {
    // Elementary geometry: a cube's width in every direction is at least its side s, so
    // it fits a cube-shaped volume of side S iff s <= S, in any orientation given.
    let cube = box_mesh(50.0, 50.0, 50.0);
    let turned = cube.transformed(&Rotation3::from_euler_angles(0.3, -0.7, 1.1).to_homogeneous());
    for mesh in [&cube, &turned] {
        let p = printer_box(50.01, 50.01, 50.01, 0.0);
        let f = fit_part("cube", mesh, &p, &FitOptions::DEFAULT).unwrap();
        assert!(f.fits, "{f:?}");
        assert_inside(mesh, &f, &p);
        let p = printer_box(49.9, 49.9, 49.9, 0.0);
        let f = fit_part("cube", mesh, &p, &FitOptions::DEFAULT).unwrap();
        assert!(!f.fits);
        // Overshoot at least 0.1 mm on some axis; the scale fits 49.9 / 50 at best.
        assert!(f.overshoot >= 0.1 - 1e-9, "{}", f.overshoot);
        assert!(f.scale_to_fit <= 49.9 / 50.0 + 1e-9, "{}", f.scale_to_fit);
    }
}

#[test]
fn box_with_margin_axis_aligned() {
    // Elementary: a 100 x 50 x 20 box needs 100 + 2m, 50 + 2m and 20 + m (top margin).
    let b = box_mesh(100.0, 50.0, 20.0);
    let p = printer_box(110.0, 60.0, 25.0, 5.0);
    let f = fit_part("box", &b, &p, &FitOptions::DEFAULT).unwrap();
    assert!(f.fits, "{f:?}");
    assert_inside(&b, &f, &p);
    // Lying on its largest face: height 20, and the gaps are exactly the margin.
    assert!((f.size[2] - 20.0).abs() < 1e-9, "{:?}", f.size);
    assert!((f.wall_gap[0] - 5.0).abs() < 1e-9 && (f.wall_gap[1] - 5.0).abs() < 1e-9);
    assert!(f.bed_contact > 100.0 * 50.0 - 1e-6, "{}", f.bed_contact);
    // Resting on a face, a box has no face pointing down other than the one on the bed.
    assert!(f.overhang_area.abs() < 1e-9, "{}", f.overhang_area);
    // The angles reproduce the matrix: R = Rz(c) Ry(b) Rx(a) (nalgebra's convention for
    // roll, pitch, yaw about fixed axes).
    let [a, b, c] = f.placement.angles_deg().map(f64::to_radians);
    let r = Rotation3::from_euler_angles(a, b, c);
    assert!((r.matrix() - f.placement.rotation).abs().max() < 1e-12);
}

#[test]
fn bar_fits_diagonally_not_when_longer_than_the_space_diagonal() {
    // Elementary geometry: a 100 x 4 x 4 bar lying diagonally in an 80 x 80 bed has a
    // bounding square of (100 + 4) / sqrt 2 = 73.5 mm < 80 although 100 > 80. A bar of
    // 120 mm is longer than the space diagonal sqrt(80^2 + 80^2 + 10^2) = 113.6 mm of an
    // 80 x 80 x 10 volume, and no segment longer than that fits in a box.
    let bar = box_mesh(100.0, 4.0, 4.0);
    let p = printer_box(80.0, 80.0, 10.0, 0.0);
    let f = fit_part("bar", &bar, &p, &FitOptions::DEFAULT).unwrap();
    assert!(f.fits, "{f:?}");
    assert_inside(&bar, &f, &p);
    assert!(
        f.size[0] > 60.0 && f.size[1] > 60.0,
        "diagonal: {:?}",
        f.size
    );
    let long = box_mesh(120.0, 4.0, 4.0);
    let f = fit_part("bar", &long, &p, &FitOptions::DEFAULT).unwrap();
    assert!(!f.fits);
}

#[test]
fn rod_along_the_space_diagonal() {
    // Derivation (elementary geometry): a cylinder of length L, radius r, axis u, has
    // width L |u.e| + 2 r sqrt(1 - (u.e)^2) along a unit vector e. In a cube of side S the
    // largest of the three widths is g(max_k |u_k|) with g(x) = L x + 2 r sqrt(1 - x^2),
    // increasing for x up to L / sqrt(L^2 + 4 r^2) and g(1) = L > S; max_k |u_k| >= 1/sqrt 3,
    // so the best is the space diagonal and the limit is L* = sqrt(3) S - 2 sqrt(2) r.
    // A prism with n sides inscribed in radius r lies between the cylinders of radius
    // r cos(pi/n) and r, so it fits for L < L* and not for L > sqrt 3 S - 2 sqrt 2 r cos(pi/n).
    let (s, r, n) = (100.0, 2.0, 48);
    let l_star = 3f64.sqrt() * s - 2.0 * 2f64.sqrt() * r;
    let l_in = 3f64.sqrt() * s - 2.0 * 2f64.sqrt() * r * (std::f64::consts::PI / n as f64).cos();
    let p = printer_box(s, s, s, 0.0);
    let o = opts(0.25);
    // Slack per axis delta / sqrt 3 must exceed the stated guarantee (about 0.75 mm).
    let fits = rod(l_star - 2.0, r, n);
    let f = fit_part("rod", &fits, &p, &o).unwrap();
    assert!(f.guarantee < 2.0 / 3f64.sqrt(), "{}", f.guarantee);
    assert!(f.fits, "{f:?}");
    assert_inside(&fits, &f, &p);
    let too_long = rod(l_in + 0.5, r, n);
    let f = fit_part("rod", &too_long, &p, &o).unwrap();
    assert!(!f.fits);
    assert!(f.overshoot < 2.0, "close to the limit: {}", f.overshoot);
}

#[test]
fn round_bed_tilted_rod() {
    // Elementary geometry: in a cylinder of diameter D and height H the longest segment
    // is sqrt(D^2 + H^2). A rod of 100.5 mm (radius 1) does not lie flat on a 100 mm bed
    // but fits tilted by about 9 degrees under a 20 mm height: horizontal
    // 100.5 cos 9 + 2 sin 9 = 99.6, vertical 100.5 sin 9 + 2 cos 9 = 17.7. A rod of 103 mm
    // exceeds sqrt(100^2 + 20^2) = 102.0 and cannot fit.
    let p = PrinterSpec {
        diameter: Some(100.0),
        height: Some(20.0),
        margin: Some(0.0),
        ..Default::default()
    }
    .resolve("test")
    .unwrap();
    let o = opts(0.1);
    let m = rod(100.5, 1.0, 32);
    let f = fit_part("rod", &m, &p, &o).unwrap();
    assert!(f.fits, "{f:?}");
    assert_inside(&m, &f, &p);
    assert!(f.size[2] > 10.0, "tilted: {:?}", f.size);
    let m = rod(103.0, 1.0, 32);
    assert!(!fit_part("rod", &m, &p, &o).unwrap().fits);
}

/// Brute force over a fine orientation grid: the largest smallest slack (mm) over all
/// grid orientations, computed on every vertex (box volumes).
fn brute_best_slack(mesh: &TriMesh, p: &Printer, dirs: usize, yaws: usize) -> f64 {
    let (a, b, h) = p.available();
    let golden = std::f64::consts::PI * (3.0 - 5f64.sqrt());
    let mut best = f64::MIN;
    for i in 0..dirs {
        let z = 1.0 - 2.0 * (i as f64 + 0.5) / dirs as f64;
        let rr = (1.0 - z * z).sqrt();
        let up = Vector3::new(
            rr * (golden * i as f64).cos(),
            rr * (golden * i as f64).sin(),
            z,
        );
        let seed = if up.x.abs() < 0.9 {
            Vector3::x()
        } else {
            Vector3::y()
        };
        let b1 = (seed - up * seed.dot(&up)).normalize();
        let b2 = up.cross(&b1);
        for j in 0..yaws {
            let t = std::f64::consts::PI * j as f64 / yaws as f64;
            let e1 = b1 * t.cos() + b2 * t.sin();
            let e2 = -b1 * t.sin() + b2 * t.cos();
            let ext = |e: &Vector3<f64>| {
                let (lo, hi) = mesh
                    .vertices
                    .iter()
                    .fold((f64::MAX, f64::MIN), |(l, h), v| {
                        let d = e.dot(&v.coords);
                        (l.min(d), h.max(d))
                    });
                hi - lo
            };
            let slack = (a - ext(&e1)).min(b - ext(&e2)).min(h - ext(&up));
            best = best.max(slack);
        }
    }
    best
}

/// Smallest enclosing circle radius by brute force over the circles through two or three
/// points (a smallest enclosing circle passes through two or three of them: elementary
/// geometry), independent of the library's Welzl algorithm.
fn brute_circle(p: &[[f64; 2]]) -> f64 {
    let covers = |c: [f64; 2], r: f64| {
        p.iter().all(|q| {
            ((q[0] - c[0]).powi(2) + (q[1] - c[1]).powi(2)).sqrt() <= r * (1.0 + 1e-12) + 1e-12
        })
    };
    let mut best = f64::MAX;
    for i in 0..p.len() {
        for j in i + 1..p.len() {
            let c = [0.5 * (p[i][0] + p[j][0]), 0.5 * (p[i][1] + p[j][1])];
            let r = 0.5 * ((p[i][0] - p[j][0]).powi(2) + (p[i][1] - p[j][1]).powi(2)).sqrt();
            if r < best && covers(c, r) {
                best = r;
            }
            for k in j + 1..p.len() {
                let (ax, ay, bx, by, cx, cy) =
                    (p[i][0], p[i][1], p[j][0], p[j][1], p[k][0], p[k][1]);
                let d = 2.0 * (ax * (by - cy) + bx * (cy - ay) + cx * (ay - by));
                if d.abs() < 1e-12 {
                    continue;
                }
                let ux = ((ax * ax + ay * ay) * (by - cy)
                    + (bx * bx + by * by) * (cy - ay)
                    + (cx * cx + cy * cy) * (ay - by))
                    / d;
                let uy = ((ax * ax + ay * ay) * (cx - bx)
                    + (bx * bx + by * by) * (ax - cx)
                    + (cx * cx + cy * cy) * (bx - ax))
                    / d;
                let r = ((ax - ux).powi(2) + (ay - uy).powi(2)).sqrt();
                if r < best && covers([ux, uy], r) {
                    best = r;
                }
            }
        }
    }
    best
}

/// Brute force for a round bed: the largest smallest slack over a grid of down
/// directions (yaw does not matter on a round bed).
fn brute_best_slack_round(mesh: &TriMesh, p: &Printer, dirs: usize) -> f64 {
    let (d, _, h) = p.available();
    let golden = std::f64::consts::PI * (3.0 - 5f64.sqrt());
    let mut best = f64::MIN;
    for i in 0..dirs {
        let z = 1.0 - 2.0 * (i as f64 + 0.5) / dirs as f64;
        let rr = (1.0 - z * z).sqrt();
        let up = Vector3::new(
            rr * (golden * i as f64).cos(),
            rr * (golden * i as f64).sin(),
            z,
        );
        let seed = if up.x.abs() < 0.9 {
            Vector3::x()
        } else {
            Vector3::y()
        };
        let b1 = (seed - up * seed.dot(&up)).normalize();
        let b2 = up.cross(&b1);
        let pts: Vec<[f64; 2]> = mesh
            .vertices
            .iter()
            .map(|v| [b1.dot(&v.coords), b2.dot(&v.coords)])
            .collect();
        let (lo, hi) = mesh
            .vertices
            .iter()
            .fold((f64::MAX, f64::MIN), |(l, hh), v| {
                let t = up.dot(&v.coords);
                (l.min(t), hh.max(t))
            });
        best = best.max((d - 2.0 * brute_circle(&pts)).min(h - (hi - lo)));
    }
    best
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(16))]
    #[test]
    fn round_bed_fit_is_sound_and_no_fit_is_complete(
        a in 10.0f64..150.0, b in 2.0f64..40.0, c in 1.0f64..20.0,
        rx in -3.2f64..3.2, ry in -1.6f64..1.6,
        diameter in 40.0f64..160.0, height in 5.0f64..80.0, margin in 0.0f64..3.0,
    ) {
        let mesh = box_mesh(a, b, c).transformed(&Rotation3::from_euler_angles(rx, ry, 0.0).to_homogeneous());
        let p = PrinterSpec {
            diameter: Some(diameter),
            height: Some(height),
            margin: Some(margin),
            ..Default::default()
        }
        .resolve("test")
        .unwrap();
        let f = fit_part("p", &mesh, &p, &FitOptions::DEFAULT).unwrap();
        if f.fits {
            assert_inside(&mesh, &f, &p);
        } else {
            let best = brute_best_slack_round(&mesh, &p, 3000);
            prop_assert!(best < f.guarantee, "brute force found slack {best} >= {}", f.guarantee);
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(24))]
    #[test]
    fn fit_is_sound_and_no_fit_is_complete(
        a in 10.0f64..150.0, b in 2.0f64..40.0, c in 1.0f64..20.0,
        rx in -3.2f64..3.2, ry in -1.6f64..1.6, rz in -3.2f64..3.2,
        x in 40.0f64..160.0, y in 40.0f64..160.0, z in 5.0f64..80.0,
        margin in 0.0f64..3.0,
    ) {
        let mesh = box_mesh(a, b, c).transformed(
            &(Matrix4::new_translation(&Vector3::new(7.0, -3.0, 11.0))
                * Rotation3::from_euler_angles(rx, ry, rz).to_homogeneous()),
        );
        let p = printer_box(x, y, z, margin);
        let f = fit_part("p", &mesh, &p, &FitOptions::DEFAULT).unwrap();
        if f.fits {
            assert_inside(&mesh, &f, &p);
        } else {
            // Independent brute force: no grid orientation fits with the stated
            // guarantee to spare.
            let best = brute_best_slack(&mesh, &p, 1500, 90);
            prop_assert!(best < f.guarantee, "brute force found slack {best} >= {}", f.guarantee);
        }
    }
}

#[test]
fn bad_meshes_are_errors_not_panics() {
    let p = printer_box(100.0, 100.0, 100.0, 1.0);
    let mut m = box_mesh(10.0, 10.0, 10.0);
    m.triangles.push([0, 1, 99]);
    let e = fit_part("broken", &m, &p, &FitOptions::DEFAULT)
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("broken") && e.contains("99") && e.contains("8 vertices"),
        "{e}"
    );
    let e = fit_part("empty", &TriMesh::new(), &p, &FitOptions::DEFAULT)
        .unwrap_err()
        .to_string();
    assert!(e.contains("empty"), "{e}");
    // All vertices in one point: fits, nothing to measure.
    let mut dot = TriMesh::new();
    for _ in 0..3 {
        dot.push_vertex(Point3::new(1.0, 2.0, 3.0));
    }
    dot.triangles.push([0, 1, 2]);
    let f = fit_part("dot", &dot, &p, &FitOptions::DEFAULT).unwrap();
    assert!(f.fits && f.size == [0.0; 3]);
}
