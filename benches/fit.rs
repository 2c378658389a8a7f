//! Benchmarks of the printer fit: the single-part search on a 100k-triangle blade-like
//! mesh (with and without blade axes for the pose), the underside measure of one pose,
//! a three-blade plate layout, and the 3-D preview of the same mesh (800 x 600 PNG).

use criterion::{criterion_group, criterion_main, Criterion};
use spanwright::fit::{
    fit_part, layout, underside::Surfaces, BladeAxes, FitOptions, LayoutOptions, PrintOptions,
    PrinterSpec, UndersideOptions,
};
use spanwright::mesh::Part;
use spanwright::report::preview::{preview_png, Item, Marks, PreviewOptions};
use std::hint::black_box;

#[path = "../tests/support/mod.rs"]
mod support;
use support::blade;

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
    let axes = FitOptions {
        print: PrintOptions {
            axes: Some(BladeAxes {
                span: [0.0, 0.0, 1.0],
                leading_edge: [-1.0, 0.0, 0.0],
                pressure_side: [0.0, -1.0, 0.0],
            }),
            ..PrintOptions::DEFAULT
        },
        ..FitOptions::DEFAULT
    };
    g.bench_function("single_100k_blade_axes", |b| {
        b.iter(|| fit_part("blade", black_box(&short), &printer, &axes).expect("fit"))
    });
    let surfaces = Surfaces::new(&short);
    let up = nalgebra::Vector3::new(0.3, -0.5, 0.8);
    g.bench_function("underside_100k", |b| {
        b.iter(|| surfaces.measure(black_box(&up), &UndersideOptions::DEFAULT))
    });
    let marks = Marks::blade_frame(spanwright::design::Rotation::Ccw, 0.0);
    g.bench_function("preview_100k", |b| {
        b.iter(|| {
            preview_png(
                &[Item::new(black_box(&short))],
                Some(&marks),
                &PreviewOptions::DEFAULT,
            )
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
