//! Benchmarks of the printer fit: the single-part search on a 100k-triangle blade-like
//! mesh, and a three-blade plate layout.

use criterion::{criterion_group, criterion_main, Criterion};
use nalgebra::Point3;
use spanwright::fit::{fit_part, layout, FitOptions, LayoutOptions, PrinterSpec};
use spanwright::mesh::{Part, TriMesh};
use std::hint::black_box;

/// Invented blade-like solid: an elliptic section (12 % thick) whose chord tapers from
/// `root` to `tip` mm and twists by `twist` degrees over the span `len` mm, with flat caps;
/// `2 (rings - 1) around + 2 around` triangles.
fn blade(len: f64, root: f64, tip: f64, twist: f64, rings: usize, around: usize) -> TriMesh {
    let mut m = TriMesh::new();
    for k in 0..rings {
        let f = k as f64 / (rings - 1) as f64;
        let c = root + (tip - root) * f;
        let th = (twist * f).to_radians();
        for i in 0..around {
            let t = std::f64::consts::TAU * i as f64 / around as f64;
            let (u, v) = (0.5 * c * t.cos(), 0.06 * c * t.sin());
            m.push_vertex(Point3::new(
                u * th.cos() - v * th.sin(),
                u * th.sin() + v * th.cos(),
                len * f,
            ));
        }
    }
    let n = around as u32;
    for k in 0..rings as u32 - 1 {
        for i in 0..n {
            let j = (i + 1) % n;
            let (a, b, c, d) = (k * n + i, k * n + j, (k + 1) * n + j, (k + 1) * n + i);
            m.triangles.push([a, b, c]);
            m.triangles.push([a, c, d]);
        }
    }
    let bottom = m.push_vertex(Point3::new(0.0, 0.0, 0.0));
    let top = m.push_vertex(Point3::new(0.0, 0.0, len));
    let last = (rings as u32 - 1) * n;
    for i in 0..n {
        let j = (i + 1) % n;
        m.triangles.push([bottom, j, i]);
        m.triangles.push([top, last + i, last + j]);
    }
    m
}

fn bench(c: &mut Criterion) {
    let printer = PrinterSpec {
        preset: Some("medium-220".into()),
        ..Default::default()
    }
    .resolve("bench")
    .expect("preset");
    // 250 rings x 200 points: 99 600 + 400 = 100 000 triangles. 260 mm span: longer than
    // the 210 mm usable side, so it fits only diagonally.
    let long = blade(260.0, 45.0, 18.0, 35.0, 250, 200);
    assert_eq!(long.len(), 100_000);
    let mut g = c.benchmark_group("fit");
    g.sample_size(10);
    g.bench_function("single_100k_diagonal", |b| {
        b.iter(|| fit_part("blade", black_box(&long), &printer, &FitOptions::DEFAULT).expect("fit"))
    });
    let short = blade(150.0, 40.0, 15.0, 30.0, 250, 200);
    g.bench_function("single_100k", |b| {
        b.iter(|| {
            fit_part("blade", black_box(&short), &printer, &FitOptions::DEFAULT).expect("fit")
        })
    });
    let parts: Vec<Part> = (1..=3)
        .map(|k| Part {
            name: format!("blade-{k}"),
            mesh: short.clone(),
        })
        .collect();
    g.bench_function("plate_3x100k", |b| {
        b.iter(|| layout(black_box(&parts), &printer, &LayoutOptions::DEFAULT).expect("layout"))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
