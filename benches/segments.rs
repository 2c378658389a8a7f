//! Planning and building the segments of the barn-turbine demo (a 1.2 m three-blade
//! turbine on a 220 x 220 x 250 mm printer): the automatic split with its printer-fit
//! searches, the spar channel, the keyed pins, every segment's mesh and its solid
//! checks. The three blades are the same, so one blade's segments serve all three: this
//! is the work for every segment of the rotor. Also the whole run (blade, segments, hub,
//! assembled rotor).
//!
//! Run with `cargo bench --bench segments`.

use criterion::{criterion_group, criterion_main, Criterion};
use spanwright::check::{certify, CheckOptions};
use spanwright::design::load;
use spanwright::mesh::Part;
use spanwright::pipeline::{build_blade, run, segment_request, Options};
use spanwright::segment::{segment, SegmentInput};
use std::hint::black_box;
use std::path::Path;

fn bench(c: &mut Criterion) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/barn-turbine.toml");
    let design = load(&path).expect("demo");
    let opts = Options::default();
    let blade = build_blade(&design, &opts).expect("blade");
    let request = segment_request(&design, &opts)
        .expect("tables")
        .expect("the demo asks for segments");
    let input = SegmentInput {
        blade: &blade.blade,
        skin: &blade.skin,
        us: &blade.tessellation.us,
        vs: &blade.tessellation.vs,
        mesh: blade.mesh(),
        tolerance: blade.tolerance,
    };
    let mut g = c.benchmark_group("segments");
    g.sample_size(10);
    g.bench_function("plan_build_check_barn_turbine", |b| {
        b.iter(|| {
            let s = segment(black_box(&input), &request).expect("segments");
            let checked: Vec<_> = s
                .segments
                .into_iter()
                .map(|m| {
                    let part = Part {
                        name: format!("segment-{}", m.index),
                        mesh: m.mesh,
                    };
                    certify(
                        part,
                        &CheckOptions::DEFAULT.with_expected_genus(Some(m.genus)),
                    )
                    .expect("checked")
                })
                .collect();
            checked.len()
        })
    });
    g.bench_function("plan_and_build_barn_turbine", |b| {
        b.iter(|| {
            segment(black_box(&input), &request)
                .expect("segments")
                .segments
                .len()
        })
    });
    g.bench_function("whole_run_barn_turbine", |b| {
        b.iter(|| run(black_box(&design), &opts).expect("run").parts.len())
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
