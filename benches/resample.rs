//! Resampling speed: 1,000 normalised sections of about 400 points each, resampled to
//! `n` points per side (swept). Issue target: well under 50 ms for the 1,000 on one core
//! (release build).

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use spanwright::airfoil::{normalize, Naca4, Section, Spline2, TrailingEdge};
use std::hint::black_box;

/// 1,000 different 4-digit sections (camber 0..6 %, position 20..60 %, thickness 8..25 %),
/// normalised from 200 generator stations per side: 399 or 400 points each.
fn sections() -> Vec<Section> {
    (0..1000)
        .map(|i| {
            let m = (i % 7) as f64 / 100.0;
            let p = if m == 0.0 {
                0.0
            } else {
                0.2 + 0.1 * ((i / 7) % 5) as f64
            };
            let t = 0.08 + 0.17 * (i as f64 / 999.0);
            let te = if i % 2 == 0 {
                TrailingEdge::Open
            } else {
                TrailingEdge::Closed
            };
            let raw = Naca4 { m, p, t, te }.raw_outline(200);
            normalize("bench", &raw).expect("generated sections normalise")
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let all = sections();
    let mut group = c.benchmark_group("resample_1000_sections");
    group.sample_size(30);
    for n in [50usize, 100, 200] {
        group.bench_with_input(BenchmarkId::from_parameter(n), &n, |b, &n| {
            b.iter(|| {
                for s in &all {
                    black_box(s.resample(black_box(n)).expect("resamples"));
                }
            })
        });
    }
    group.finish();
    // The spline fit alone, the part of the cost that does not depend on n.
    c.bench_function("spline_fit_1000_sections", |b| {
        b.iter(|| {
            for s in &all {
                black_box(Spline2::fit(black_box(s.points())));
            }
        })
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
