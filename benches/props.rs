//! Benchmarks of the printed-shell mass model and the printability check on the shared
//! twisted test blade (260 mm span, 250 rings x 200 points).

use criterion::{criterion_group, criterion_main, Criterion};
use spanwright::fit::{printability, PrintabilityOptions, PrinterSpec};
use spanwright::props::{Fill, FilledMass, ShellOptions};
use std::hint::black_box;

#[path = "../tests/support/mod.rs"]
mod support;
use support::blade;

fn bench(c: &mut Criterion) {
    let mesh = blade(260.0, 45.0, 18.0, 35.0, 250, 200);
    let mut g = c.benchmark_group("props");
    g.sample_size(10);
    for step in [1.5, 0.6] {
        g.bench_function(format!("filled_mass_step_{step}"), |b| {
            b.iter(|| {
                FilledMass::of_mesh(
                    black_box(&mesh),
                    1.24e-3,
                    Fill::DEFAULT,
                    &ShellOptions { step },
                )
                .expect("closed blade")
            })
        });
    }
    let printer = PrinterSpec {
        preset: Some("medium-220".into()),
        ..Default::default()
    }
    .resolve("bench")
    .expect("preset");
    g.bench_function("printability_whole_span", |b| {
        b.iter(|| printability(black_box(&mesh), &printer, &PrintabilityOptions::DEFAULT))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
