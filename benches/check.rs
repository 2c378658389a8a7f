//! Benchmarks of the solid checks on fine torus meshes (10k, 100k and 1M triangles):
//! the whole `check_solid` with and without the self-intersection test.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use nalgebra::Point3;
use spanwright::check::{check_solid, CheckOptions};
use spanwright::mesh::TriMesh;
use std::f64::consts::PI;
use std::hint::black_box;

/// A torus about the z axis (tube centre radius `big`, tube radius `small`) with
/// `2 nu nv` triangles.
fn torus(big: f64, small: f64, nu: u32, nv: u32) -> TriMesh {
    let mut m = TriMesh::new();
    for i in 0..nu {
        let th = 2.0 * PI * i as f64 / nu as f64;
        for j in 0..nv {
            let ph = 2.0 * PI * j as f64 / nv as f64;
            let rr = big + small * ph.cos();
            m.push_vertex(Point3::new(rr * th.cos(), rr * th.sin(), small * ph.sin()));
        }
    }
    let id = |i: u32, j: u32| (i % nu) * nv + j % nv;
    for i in 0..nu {
        for j in 0..nv {
            let (a, b, c, d) = (id(i, j), id(i + 1, j), id(i, j + 1), id(i + 1, j + 1));
            m.triangles.push([a, b, d]);
            m.triangles.push([a, d, c]);
        }
    }
    m
}

fn bench_check(c: &mut Criterion) {
    let mut g = c.benchmark_group("check_solid");
    g.sample_size(10);
    for (nu, nv) in [(100u32, 50u32), (500, 100), (1000, 500)] {
        let m = torus(100.0, 30.0, nu, nv);
        let n = m.len();
        let full = CheckOptions::DEFAULT.with_expected_genus(Some(1));
        assert!(check_solid(&m, &full).is_ok());
        g.bench_with_input(BenchmarkId::new("with_self_intersection", n), &m, |b, m| {
            b.iter(|| black_box(check_solid(m, &full)))
        });
        let topo = full.with_self_intersection(false);
        g.bench_with_input(BenchmarkId::new("topology_only", n), &m, |b, m| {
            b.iter(|| black_box(check_solid(m, &topo)))
        });
    }
    g.finish();
}

criterion_group!(benches, bench_check);
criterion_main!(benches);
