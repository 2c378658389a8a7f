//! Speed of the writers: each mesh writer on a ~100k-triangle mesh (into memory, so the
//! disk does not count), and the STEP path (B-rep build + text) of a 20-station skin.

use criterion::{criterion_group, criterion_main, Criterion};
use nalgebra::{Point3, Vector3};
use spanwright::export::{
    step_solid, step_text, write_3mf, write_obj, write_stl, write_stl_ascii, StepHeader,
};
use spanwright::loft::Skin;
use spanwright::mesh::{Part, TriMesh};
use std::collections::HashMap;
use std::hint::black_box;

/// Geodesic sphere: octahedron faces split n x n (8 n^2 triangles), radius 50 mm.
fn sphere(n: usize) -> TriMesh {
    let ax = [
        Vector3::x(),
        Vector3::y(),
        Vector3::z(),
        -Vector3::x(),
        -Vector3::y(),
        -Vector3::z(),
    ];
    let faces = [
        [0, 1, 2],
        [1, 3, 2],
        [3, 4, 2],
        [4, 0, 2],
        [1, 0, 5],
        [3, 1, 5],
        [4, 3, 5],
        [0, 4, 5],
    ];
    let mut m = TriMesh::new();
    let mut index: HashMap<[i64; 3], u32> = HashMap::new();
    let mut vid = |m: &mut TriMesh, d: Vector3<f64>| -> u32 {
        let d = d.normalize();
        let key = [d.x, d.y, d.z].map(|x| (x * 1e9).round() as i64);
        *index
            .entry(key)
            .or_insert_with(|| m.push_vertex(Point3::origin() + d * 50.0))
    };
    for f in faces {
        let (a, b, c) = (ax[f[0]], ax[f[1]], ax[f[2]]);
        let p = |i: usize, j: usize| {
            a + (b - a) * (i as f64 / n as f64) + (c - a) * (j as f64 / n as f64)
        };
        for i in 0..n {
            for j in 0..n - i {
                let v0 = vid(&mut m, p(i, j));
                let v1 = vid(&mut m, p(i + 1, j));
                let v2 = vid(&mut m, p(i, j + 1));
                m.triangles.push([v0, v1, v2]);
                if i + j + 1 < n {
                    let v3 = vid(&mut m, p(i + 1, j + 1));
                    m.triangles.push([v1, v3, v2]);
                }
            }
        }
    }
    m
}

fn clamped(n: usize, p: usize) -> Vec<f64> {
    let spans = n - p;
    let mut k = vec![0.0; p + 1];
    k.extend((1..spans).map(|i| i as f64 / spans as f64));
    k.extend(vec![1.0; p + 1]);
    k
}

/// A 20-station skin (demo data, invented): an elliptic section (61 cubic control
/// points, blunt trailing edge) shrinking and twisting from root to tip.
fn skin20() -> Skin {
    let (nu, nv) = (61, 20);
    let tau = std::f64::consts::TAU;
    let control = (0..nu)
        .map(|i| {
            let t = 0.05 + (tau - 0.1) * i as f64 / (nu - 1) as f64;
            (0..nv)
                .map(|j| {
                    let s = j as f64 / (nv - 1) as f64;
                    let (chord, twist) = (60.0 - 30.0 * s, 0.5 - 0.4 * s);
                    let (x, y) = (0.5 * chord * t.cos(), 0.06 * chord * t.sin());
                    let (c, sn) = (twist.cos(), twist.sin());
                    Point3::new(x * c - y * sn, x * sn + y * c, 50.0 + 450.0 * s)
                })
                .collect()
        })
        .collect();
    Skin {
        degree_u: 3,
        degree_v: 3,
        knots_u: clamped(nu, 3),
        knots_v: clamped(nv, 3),
        control,
        u_le: 0.5,
    }
}

fn writers(c: &mut Criterion) {
    let parts = vec![Part {
        name: "sphere".into(),
        mesh: sphere(112),
    }];
    assert!(parts[0].mesh.len() > 100_000);
    let mut buf: Vec<u8> = Vec::with_capacity(64 << 20);
    c.bench_function("stl binary 100k", |b| {
        b.iter(|| {
            buf.clear();
            write_stl(&mut buf, black_box(&parts)).unwrap();
        })
    });
    c.bench_function("stl ascii 100k", |b| {
        b.iter(|| {
            buf.clear();
            write_stl_ascii(&mut buf, "sphere", black_box(&parts)).unwrap();
        })
    });
    c.bench_function("obj 100k", |b| {
        b.iter(|| {
            buf.clear();
            write_obj(&mut buf, black_box(&parts)).unwrap();
        })
    });
    c.bench_function("3mf 100k", |b| {
        b.iter(|| {
            buf.clear();
            write_3mf(&mut buf, black_box(&parts), None).unwrap();
        })
    });
    let skin = skin20();
    let header = StepHeader::default();
    c.bench_function("step 20 stations (solid + text)", |b| {
        b.iter(|| {
            let solid = step_solid(black_box(&skin)).unwrap();
            black_box(step_text(&[("blade".into(), solid)], &header, "blade.step"))
        })
    });
}

criterion_group!(benches, writers);
criterion_main!(benches);
