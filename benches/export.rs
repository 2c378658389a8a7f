//! Speed of the writers: each mesh writer on a ~100k-triangle mesh (into memory, so the
//! disk does not count), and the STEP path (B-rep build + text, and to a file) of a
//! 20-station lofted skin, the demo blades and the barn-turbine demo's segments.

use criterion::{criterion_group, criterion_main, Criterion};
use nalgebra::{Point3, Vector3};
use spanwright::airfoil::{Naca4, TrailingEdge};
use spanwright::check::{certify, CheckOptions};
use spanwright::export::{
    step_solid, step_text, write_3mf, write_obj, write_step, write_stl, write_stl_ascii, StepHeader,
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

/// A 20-station blade (demo data, invented) lofted by the project's lofter: NACA 4412
/// with its blunt trailing edge, 121 points per section, chord 80 -> 40 mm, twist
/// 20 -> 5 degrees, radius 50 -> 500 mm.
fn skin20() -> Skin {
    let sec = Naca4::from_digits("4412", TrailingEdge::Open)
        .unwrap()
        .section("naca4412", 121)
        .unwrap();
    let rings: Vec<Vec<Point3<f64>>> = (0..20)
        .map(|l| {
            let s = l as f64 / 19.0;
            let (c, th, z) = (
                80.0 - 40.0 * s,
                (20.0 - 15.0 * s).to_radians(),
                50.0 + 450.0 * s,
            );
            sec.points()
                .iter()
                .map(|p| {
                    let (u, v) = ((p.x - 0.25) * c, p.y * c);
                    Point3::new(u * th.cos() - v * th.sin(), u * th.sin() + v * th.cos(), z)
                })
                .collect()
        })
        .collect();
    Skin::interpolate(&rings, sec.leading_edge_index()).unwrap()
}

fn writers(c: &mut Criterion) {
    let parts = vec![certify(
        Part {
            name: "sphere".into(),
            mesh: sphere(112),
        },
        &CheckOptions::DEFAULT,
    )
    .expect("a sphere is a solid")];
    assert!(parts[0].mesh().len() > 100_000);
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
    // The demo blade with every root feature its STEP solid carries: the garden turbine
    // as shipped (round shank, drill-point bore, round tip), and the same blade with a
    // flange and fillet and a cross hole added.
    for (name, extra) in [
        ("step demo blade (bore, round tip)", ""),
        (
            "step demo blade (flange, fillet, bore, cross hole, round tip)",
            "flange = { diameter = 40, thickness = 3, fillet = 2 }\ncross-holes = [{ diameter = 4, at = 18 }]\n",
        ),
    ] {
        let path = std::path::Path::new("examples/garden-turbine.toml");
        let text = std::fs::read_to_string(path)
            .unwrap()
            .replace("[root]\n", &format!("[root]\n{extra}"));
        let design = spanwright::design::parse_toml_str(&text, Some(path)).unwrap();
        let model = spanwright::pipeline::build_blade(&design, &Default::default()).unwrap();
        let (root, face) = (model.blade.root(), model.blade.root_face());
        c.bench_function(name, |b| {
            b.iter(|| {
                let solid = spanwright::brep::blade_solid(black_box(&model.skin), root, face).unwrap();
                black_box(step_text(&[("blade".into(), solid)], &header, "blade.step"))
            })
        });
    }
    // Each segment of the barn-turbine demo (split faces, spar channel, pin holes) as
    // the build writes it: exact solid and STEP text.
    let path = std::path::Path::new("examples/barn-turbine.toml");
    let design = spanwright::design::load(path).unwrap();
    let opts = spanwright::pipeline::Options {
        blade_only: true,
        ..Default::default()
    };
    let outcome = spanwright::pipeline::run(&design, &opts).unwrap();
    for part in outcome.segment_parts() {
        c.bench_function(&format!("step {}", part.name), |b| {
            b.iter(|| {
                black_box(
                    spanwright::export::part_step_text(black_box(&outcome), part)
                        .unwrap()
                        .unwrap(),
                )
            })
        });
    }
    let dir = std::env::temp_dir().join(format!("spanwright-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("blade.step");
    c.bench_function("step 20 stations to file (atomic)", |b| {
        b.iter(|| {
            let solid = step_solid(black_box(&skin)).unwrap();
            write_step(&path, &[("blade".into(), solid)], &header).unwrap();
        })
    });
    let _ = std::fs::remove_dir_all(&dir);
}

criterion_group!(benches, writers);
criterion_main!(benches);
