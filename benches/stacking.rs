//! What each stacking rule costs: placing every ring of a blade (the stage the rule
//! changes; the centroid rule fits a spline to the section at every ring), and the whole
//! build.
//!
//! Run with `cargo bench --bench stacking`. The design is the pipeline benchmark's
//! 10-station blade at 200 points per side.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use spanwright::design::parse_toml_str;
use spanwright::pipeline::{build_blade, Options};
use std::hint::black_box;

fn design_text(stacking: &str) -> String {
    let mut s = format!(
        "name = \"bench\"\n[blade]\nsection = \"naca4412\"\npoints-per-side = 200\n\
         tolerance = 0.01\nstacking = {stacking}\n"
    );
    for i in 0..10 {
        let t = i as f64 / 9.0;
        s += &format!(
            "[[station]]\nradius = {}\nchord = {}\ntwist = {}\nsection = \"{}\"\n",
            40.0 + 240.0 * t,
            60.0 - 35.0 * t,
            25.0 - 22.0 * t,
            if i < 3 { "naca4415" } else { "naca4412" }
        );
    }
    s
}

fn rules(c: &mut Criterion) {
    let mut rings = c.benchmark_group("stacking_rings");
    for rule in ["0.25", "\"centroid\"", "\"thickest\""] {
        let design = parse_toml_str(&design_text(rule), None).unwrap();
        let model = build_blade(&design, &Options::default()).unwrap();
        rings.bench_with_input(BenchmarkId::from_parameter(rule), &model, |b, m| {
            b.iter(|| {
                m.ring_radii
                    .iter()
                    .map(|&r| black_box(&m.blade).ring(r).points.len())
                    .sum::<usize>()
            })
        });
    }
    rings.finish();
    let mut whole = c.benchmark_group("stacking_build");
    whole.sample_size(10);
    for rule in ["0.25", "\"centroid\""] {
        let design = parse_toml_str(&design_text(rule), None).unwrap();
        whole.bench_with_input(BenchmarkId::from_parameter(rule), &design, |b, d| {
            b.iter(|| {
                build_blade(black_box(d), &Options::default())
                    .unwrap()
                    .mesh()
                    .len()
            })
        });
    }
    whole.finish();
}

criterion_group!(benches, rules);
criterion_main!(benches);
