//! Plate layouts: parts inside the volume, clearance kept, no two parts intersecting
//! (checked with parry3d 0.31's triangle-mesh intersection test, an independent library),
//! and plate counts against elementary area bounds.

use nalgebra::Point3;
use spanwright::fit::{layout, Layout, LayoutOptions, Printer, PrinterSpec, Volume};
use spanwright::mesh::{Part, TriMesh};

mod support;
use support::blade;

fn box_mesh(a: f64, b: f64, c: f64) -> TriMesh {
    TriMesh::cuboid(Point3::origin(), nalgebra::Vector3::new(a, b, c))
}

fn printer(x: f64, y: f64, z: f64, margin: f64, clearance: f64) -> Printer {
    PrinterSpec {
        volume: Some([x, y, z]),
        margin: Some(margin),
        clearance: Some(clearance),
        ..Default::default()
    }
    .resolve("test")
    .unwrap()
}

/// Convex hull by Jarvis's march (gift wrapping; R. A. Jarvis, Information Processing
/// Letters 2, 1973): written here independently of the library's monotone chain.
fn jarvis(pts: &[[f64; 2]]) -> Vec<[f64; 2]> {
    let start = (0..pts.len())
        .min_by(|&a, &b| {
            pts[a][0]
                .total_cmp(&pts[b][0])
                .then(pts[a][1].total_cmp(&pts[b][1]))
        })
        .unwrap();
    let mut hull = vec![];
    let mut p = start;
    loop {
        hull.push(pts[p]);
        let mut q = (p + 1) % pts.len();
        for r in 0..pts.len() {
            let cross = (pts[q][0] - pts[p][0]) * (pts[r][1] - pts[p][1])
                - (pts[q][1] - pts[p][1]) * (pts[r][0] - pts[p][0]);
            if cross < 0.0 {
                q = r;
            }
        }
        p = q;
        if p == start || hull.len() > pts.len() {
            break;
        }
    }
    hull
}

fn seg_dist(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
    let l2 = dx * dx + dy * dy;
    let t = if l2 > 0.0 {
        (((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / l2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    ((p[0] - a[0] - t * dx).powi(2) + (p[1] - a[1] - t * dy).powi(2)).sqrt()
}

/// True when `v` lies inside or on the counter-clockwise convex polygon `poly`.
fn inside(v: [f64; 2], poly: &[[f64; 2]]) -> bool {
    (0..poly.len()).all(|i| {
        let (a, b) = (poly[i], poly[(i + 1) % poly.len()]);
        (b[0] - a[0]) * (v[1] - a[1]) - (b[1] - a[1]) * (v[0] - a[0]) >= 0.0
    })
}

/// Smallest distance between two convex polygons (vertex to edge, both ways); 0 when one
/// holds a vertex of the other.
fn hull_gap(p: &[[f64; 2]], q: &[[f64; 2]]) -> f64 {
    if p.iter().any(|&v| inside(v, q)) || q.iter().any(|&v| inside(v, p)) {
        return 0.0;
    }
    // Crossing edges (two convex polygons can cross with no vertex inside the other).
    let side = |a: [f64; 2], b: [f64; 2], c: [f64; 2]| {
        (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
    };
    for i in 0..p.len() {
        let (a, b) = (p[i], p[(i + 1) % p.len()]);
        for j in 0..q.len() {
            let (c, d) = (q[j], q[(j + 1) % q.len()]);
            if side(a, b, c) * side(a, b, d) < 0.0 && side(c, d, a) * side(c, d, b) < 0.0 {
                return 0.0;
            }
        }
    }
    let mut d = f64::MAX;
    for (a, b) in [(p, q), (q, p)] {
        for &v in a {
            for i in 0..b.len() {
                d = d.min(seg_dist(v, b[i], b[(i + 1) % b.len()]));
            }
        }
    }
    d
}

fn to_parry(m: &TriMesh) -> parry3d::shape::TriMesh {
    let v: Vec<parry3d::math::Vector> = m
        .vertices
        .iter()
        .map(|p| parry3d::math::Vector::new(p.x as f32, p.y as f32, p.z as f32))
        .collect();
    parry3d::shape::TriMesh::new(v, m.triangles.clone()).unwrap()
}

/// Checks every plate: inside the volume with the margin, footprints apart by the
/// clearance, and no two solids intersecting (parry3d).
fn check(l: &Layout, parts: &[Part], p: &Printer) {
    let tol = 1e-6;
    for k in 0..l.plates.len() {
        let placed = l.plate_parts(k, parts);
        for part in &placed {
            for q in &part.mesh.vertices {
                match p.volume {
                    Volume::Box { x, y, z } => {
                        assert!(q.x >= p.margin - tol && q.x <= x - p.margin + tol, "{q:?}");
                        assert!(q.y >= p.margin - tol && q.y <= y - p.margin + tol, "{q:?}");
                        assert!(q.z >= -tol && q.z <= z - p.margin + tol, "{q:?}");
                    }
                    Volume::Round { diameter, height } => {
                        assert!((q.x * q.x + q.y * q.y).sqrt() <= 0.5 * diameter - p.margin + tol);
                        assert!(q.z >= -tol && q.z <= height - p.margin + tol);
                    }
                }
            }
        }
        let hulls: Vec<Vec<[f64; 2]>> = placed
            .iter()
            .map(|x| {
                jarvis(
                    &x.mesh
                        .vertices
                        .iter()
                        .map(|v| [v.x, v.y])
                        .collect::<Vec<_>>(),
                )
            })
            .collect();
        let shapes: Vec<_> = placed.iter().map(|x| to_parry(&x.mesh)).collect();
        for i in 0..placed.len() {
            for j in i + 1..placed.len() {
                let gap = hull_gap(&hulls[i], &hulls[j]);
                assert!(
                    gap >= p.clearance - 1e-6,
                    "plate {k}: parts {i}, {j} {gap} mm apart"
                );
                let id = parry3d::math::Pose::IDENTITY;
                let hit = parry3d::query::intersection_test(&id, &shapes[i], &id, &shapes[j])
                    .unwrap()
                    .intersecting;
                assert!(!hit, "plate {k}: parts {i} and {j} intersect");
            }
        }
    }
}

#[test]
fn three_blades_share_one_plate() {
    // Invented demo blades: 150 mm span, chord 40 to 15 mm, 30 degrees of twist.
    let b = blade(150.0, 40.0, 15.0, 30.0, 31, 48);
    let parts: Vec<Part> = (1..=3)
        .map(|k| Part {
            name: format!("blade-{k}"),
            mesh: b.clone(),
        })
        .collect();
    let p = printer(220.0, 220.0, 250.0, 5.0, 5.0);
    // Negative control: the intersection test does see two overlapping blades.
    let shifted = b.transformed(&nalgebra::Matrix4::new_translation(
        &nalgebra::Vector3::new(3.0, 0.0, 0.0),
    ));
    let id = parry3d::math::Pose::IDENTITY;
    assert!(
        parry3d::query::intersection_test(&id, &to_parry(&b), &id, &to_parry(&shifted))
            .unwrap()
            .intersecting
    );
    let l = layout(&parts, &p, &LayoutOptions::DEFAULT).unwrap();
    assert!(l.unplaced.is_empty());
    // Three chord-wide strips of ~ 150 x 40 mm need about 150 x 130 mm: one plate.
    assert_eq!(
        l.plates.len(),
        1,
        "{:?}",
        l.plates.iter().map(|p| p.parts.len()).collect::<Vec<_>>()
    );
    check(&l, &parts, &p);
}

#[test]
fn nine_tiles_in_a_grid_and_two_large_plates() {
    // Elementary packing: 3 x 60 + 2 x 5 = 190 <= 210 usable, so nine 60 x 60 tiles fit a
    // 220 x 220 bed with margin 5 and clearance 5 in a 3 x 3 grid.
    let tiles: Vec<Part> = (0..9)
        .map(|k| Part {
            name: format!("tile-{k}"),
            mesh: box_mesh(60.0, 60.0, 8.0),
        })
        .collect();
    let p = printer(220.0, 220.0, 100.0, 5.0, 5.0);
    let l = layout(&tiles, &p, &LayoutOptions::DEFAULT).unwrap();
    assert_eq!(l.plates.len(), 1);
    check(&l, &tiles, &p);
    // Area bound: two 150 x 150 plates cover 45 000 mm^2 > 210^2 = 44 100 mm^2 usable, so
    // they need two plates; each fits alone.
    let big: Vec<Part> = (0..2)
        .map(|k| Part {
            name: format!("big-{k}"),
            mesh: box_mesh(150.0, 150.0, 8.0),
        })
        .collect();
    let l = layout(&big, &p, &LayoutOptions::DEFAULT).unwrap();
    assert_eq!(l.plates.len(), 2);
    check(&l, &big, &p);
}

#[test]
fn round_bed_and_unplaceable_part() {
    let p = PrinterSpec {
        diameter: Some(200.0),
        height: Some(100.0),
        margin: Some(3.0),
        clearance: Some(4.0),
        ..Default::default()
    }
    .resolve("test")
    .unwrap();
    let parts: Vec<Part> = vec![
        Part {
            name: "a".into(),
            mesh: box_mesh(50.0, 30.0, 10.0),
        },
        Part {
            name: "b".into(),
            mesh: box_mesh(40.0, 40.0, 10.0),
        },
        Part {
            name: "c".into(),
            mesh: box_mesh(60.0, 20.0, 10.0),
        },
        // Longer than the volume's longest segment sqrt(194^2 + 97^2) = 216.9 mm.
        Part {
            name: "too-long".into(),
            mesh: box_mesh(230.0, 5.0, 5.0),
        },
    ];
    let l = layout(&parts, &p, &LayoutOptions::DEFAULT).unwrap();
    assert_eq!(l.unplaced.len(), 1);
    assert_eq!(l.unplaced[0].0, 3);
    assert_eq!(l.plates.len(), 1);
    check(&l, &parts, &p);
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(12))]
    #[test]
    fn random_parts_keep_apart_and_inside(
        dims in proptest::collection::vec((5.0f64..90.0, 5.0f64..60.0, 2.0f64..25.0, -3.0f64..3.0, -3.0f64..3.0), 2..8),
        x in 120.0f64..250.0, y in 120.0f64..250.0, margin in 0.0f64..5.0, clearance in 0.0f64..6.0,
    ) {
        let parts: Vec<Part> = dims
            .iter()
            .enumerate()
            .map(|(k, &(a, b, c, r1, r2))| Part {
                name: format!("p{k}"),
                mesh: box_mesh(a, b, c).transformed(
                    &nalgebra::Rotation3::from_euler_angles(r1, r2, 0.5 * r1).to_homogeneous(),
                ),
            })
            .collect();
        let p = printer(x, y, 60.0, margin, clearance);
        let l = layout(&parts, &p, &LayoutOptions::DEFAULT).unwrap();
        let placed: usize = l.plates.iter().map(|pl| pl.parts.len()).sum();
        proptest::prop_assert_eq!(placed + l.unplaced.len(), parts.len());
        check(&l, &parts, &p);
    }
}

#[test]
fn round_bed_uses_the_whole_circle() {
    // Elementary packing: five 50 x 50 tiles, 5 mm apart, fit the usable circle of radius
    // 95 mm as a cross: a row of three (x from -80 to 80, y from -25 to 25; farthest corner
    // sqrt(80^2 + 25^2) = 83.8 mm) and one tile above and one below the middle (corner
    // sqrt(25^2 + 80^2) = 83.8 mm). The inscribed square (side 134 mm) holds only four.
    let p = PrinterSpec {
        diameter: Some(200.0),
        height: Some(50.0),
        margin: Some(5.0),
        clearance: Some(5.0),
        ..Default::default()
    }
    .resolve("test")
    .unwrap();
    let tiles: Vec<Part> = (0..5)
        .map(|k| Part {
            name: format!("t{k}"),
            mesh: box_mesh(50.0, 50.0, 5.0),
        })
        .collect();
    let l = layout(&tiles, &p, &LayoutOptions::DEFAULT).unwrap();
    check(&l, &tiles, &p);
    assert_eq!(
        l.plates.len(),
        1,
        "{:?}",
        l.plates.iter().map(|p| p.parts.len()).collect::<Vec<_>>()
    );
}
