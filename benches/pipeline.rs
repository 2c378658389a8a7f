//! The main job's speed: design table to binary STL, and how tessellation time grows
//! with the triangle count.
//!
//! Run with `cargo bench --bench pipeline`. The design is a 10-station blade resampled to
//! 200 points per side (the reference case); the floor group scales it ten times
//! (a 2.8 m blade) so that a million triangles come at a tolerance the design allows, and
//! times the build that writes its STL file against copying that file, in one run.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use spanwright::design::parse_toml_str;
use spanwright::export::{write_mesh, write_stl, MeshFormat};
use spanwright::pipeline::{build_blade, resolve_sections, run, Options};
use spanwright::tessellate::{tessellate, TessellationOptions};
use std::hint::black_box;

fn design_text() -> String {
    scaled_design_text(1.0)
}

/// The ten-station blade with every length times `scale` (scripts/speed builds the same).
fn scaled_design_text(scale: f64) -> String {
    let mut s = String::from("name = \"bench\"\n[blade]\nsection = \"naca4412\"\npoints-per-side = 200\ntolerance = 0.01\n");
    for i in 0..10 {
        let t = i as f64 / 9.0;
        s += &format!(
            "[[station]]\nradius = {}\nchord = {}\ntwist = {}\nsection = \"{}\"\n",
            scale * (40.0 + 240.0 * t),
            scale * (60.0 - 35.0 * t),
            25.0 - 22.0 * t,
            if i < 3 { "naca4415" } else { "naca4412" }
        );
    }
    s
}

fn table_to_stl(c: &mut Criterion) {
    let text = design_text();
    c.bench_function("table_to_stl_10_stations_200_pts_0.01mm", |b| {
        b.iter(|| {
            let design = parse_toml_str(black_box(&text), None).unwrap();
            let outcome = run(&design, &Options::default()).unwrap();
            let blade = outcome.blade_part();
            let mut bytes = Vec::with_capacity(blade.mesh().len() * 50 + 84);
            write_stl(&mut bytes, std::slice::from_ref(blade)).unwrap();
            bytes.len()
        })
    });
    let design = parse_toml_str(&text, None).unwrap();
    c.bench_function("stage_sections", |b| {
        b.iter(|| resolve_sections(black_box(&design)).unwrap())
    });
    let model = build_blade(&design, &Options::default()).unwrap();
    c.bench_function("stage_tessellate_0.01mm", |b| {
        b.iter(|| tessellate(black_box(&model.skin), &TessellationOptions::DEFAULT).unwrap())
    });
}

fn growth(c: &mut Criterion) {
    let design = parse_toml_str(&design_text(), None).unwrap();
    let model = build_blade(&design, &Options::default()).unwrap();
    let mut group = c.benchmark_group("tessellate_growth");
    group.sample_size(10);
    for tol in [0.1, 0.01, 0.001, 0.0001, 0.00005] {
        let opts = TessellationOptions {
            tolerance: tol,
            ..TessellationOptions::DEFAULT
        };
        let n = tessellate(&model.skin, &opts).unwrap().mesh.len();
        group.bench_with_input(
            BenchmarkId::new(format!("{n}_triangles"), tol),
            &opts,
            |b, o| b.iter(|| tessellate(black_box(&model.skin), o).unwrap().mesh.len()),
        );
    }
    group.finish();
}

/// The floor: table to a checked, written binary STL of about a million triangles,
/// against copying that STL file (read, write, flush to disk), both timed in this run;
/// the ratio of the medians is printed.
fn floor(c: &mut Criterion) {
    let text = scaled_design_text(10.0);
    let dir = tempfile::tempdir().unwrap();
    let stl = dir.path().join("floor.stl");
    let copy = dir.path().join("copy.stl");
    let opts = Options {
        tolerance: Some(0.002),
        blade_only: true,
        ..Options::default()
    };
    let build = || {
        let design = parse_toml_str(&text, None).unwrap();
        let outcome = run(&design, &opts).unwrap();
        let blade = outcome.blade_part();
        write_mesh(&stl, MeshFormat::Stl, std::slice::from_ref(blade)).unwrap();
        blade.mesh().len()
    };
    let copy_file = || {
        std::fs::copy(&stl, &copy).unwrap();
        std::fs::File::open(&copy).unwrap().sync_all().unwrap();
    };
    let n = build();
    let mut group = c.benchmark_group("floor");
    group.sample_size(10);
    group.bench_function(format!("build_and_write_{n}_triangles"), |b| b.iter(build));
    group.bench_function("copy_its_stl", |b| b.iter(copy_file));
    group.finish();
    let median = |f: &dyn Fn()| {
        let mut t: Vec<f64> = (0..5)
            .map(|_| {
                let start = std::time::Instant::now();
                f();
                start.elapsed().as_secs_f64()
            })
            .collect();
        t.sort_by(f64::total_cmp);
        t[2]
    };
    let (b, k) = (
        median(&|| {
            build();
        }),
        median(&copy_file),
    );
    println!(
        "floor: {n} triangles: build {b:.3} s, copy {k:.4} s (medians of 5), ratio {:.1}",
        b / k
    );
}

/// Table to a checked, written binary STL (the floor's work) from about 10 thousand to
/// about 1.5 million triangles (the ten-station blade scaled 11.8 times, 0.2 down to
/// 0.0013 mm; the finest tolerance a design may ask, 0.001 mm, would give 2.5 million). Prints the fitted exponent of time against
/// triangles (least squares on the logarithms of medians of 5), and time as a fixed
/// set-up plus a cost per triangle with the exponent of the part that grows.
fn pipeline_growth(c: &mut Criterion) {
    let text = scaled_design_text(11.8);
    let dir = tempfile::tempdir().unwrap();
    let stl = dir.path().join("growth.stl");
    let build = |tol: f64| {
        let opts = Options {
            tolerance: Some(tol),
            blade_only: true,
            ..Options::default()
        };
        let design = parse_toml_str(&text, None).unwrap();
        let outcome = run(&design, &opts).unwrap();
        let blade = outcome.blade_part();
        write_mesh(&stl, MeshFormat::Stl, std::slice::from_ref(blade)).unwrap();
        blade.mesh().len()
    };
    let mut group = c.benchmark_group("pipeline_growth");
    group.sample_size(10);
    let mut points = Vec::new();
    for tol in [0.2, 0.06, 0.02, 0.006, 0.002, 0.0013] {
        let n = build(tol);
        group.bench_with_input(
            BenchmarkId::new(format!("{n}_triangles"), tol),
            &tol,
            |b, &t| b.iter(|| build(t)),
        );
        let mut t: Vec<f64> = (0..5)
            .map(|_| {
                let start = std::time::Instant::now();
                build(tol);
                start.elapsed().as_secs_f64()
            })
            .collect();
        t.sort_by(f64::total_cmp);
        points.push((n as f64, t[2]));
    }
    group.finish();
    for (n, t) in &points {
        println!("pipeline growth: {n} triangles: median {:.2} ms", t * 1e3);
    }
    println!(
        "pipeline growth: fitted exponent of time against triangles {:.3}",
        fitted_exponent(&points)
    );
    // Time as set-up plus work per triangle, t = a + b n (least squares on relative
    // errors), and the exponent of what grows, t - a.
    let (a, b) = affine_fit(&points);
    let worst = points
        .iter()
        .map(|(n, t)| ((a + b * n - t) / t).abs())
        .fold(0.0, f64::max);
    let grows: Vec<(f64, f64)> = points.iter().map(|&(n, t)| (n, t - a)).collect();
    let k = if grows.iter().all(|p| p.1 > 0.0) {
        format!("{:.3}", fitted_exponent(&grows))
    } else {
        "undefined (set-up above a point)".to_string()
    };
    println!(
        "pipeline growth: t = {:.2} ms + {:.1} ns x triangles, within {:.1} % of every \
         point; exponent of t - set-up {k}",
        a * 1e3,
        b * 1e9,
        100.0 * worst
    );
}

/// Least squares `t = a + b n` on relative errors (weights `1 / t^2`): `(a, b)`.
fn affine_fit(points: &[(f64, f64)]) -> (f64, f64) {
    let (mut s00, mut s01, mut s11, mut r0, mut r1) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for &(n, t) in points {
        let w = 1.0 / (t * t);
        s00 += w;
        s01 += w * n;
        s11 += w * n * n;
        r0 += w * t;
        r1 += w * n * t;
    }
    let det = s00 * s11 - s01 * s01;
    ((s11 * r0 - s01 * r1) / det, (s00 * r1 - s01 * r0) / det)
}

/// Least-squares slope of ln t against ln n.
fn fitted_exponent(points: &[(f64, f64)]) -> f64 {
    let xs: Vec<f64> = points.iter().map(|p| p.0.ln()).collect();
    let ys: Vec<f64> = points.iter().map(|p| p.1.ln()).collect();
    let (mx, my) = (
        xs.iter().sum::<f64>() / xs.len() as f64,
        ys.iter().sum::<f64>() / ys.len() as f64,
    );
    let sxy: f64 = xs.iter().zip(&ys).map(|(x, y)| (x - mx) * (y - my)).sum();
    let sxx: f64 = xs.iter().map(|x| (x - mx).powi(2)).sum();
    sxy / sxx
}

criterion_group!(benches, table_to_stl, growth, pipeline_growth, floor);
criterion_main!(benches);
