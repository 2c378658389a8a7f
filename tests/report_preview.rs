//! The 3-D preview: same bytes every run, silhouettes that match the projected outline,
//! and the rotation arc turning the way the conventions say.

use nalgebra::{Matrix4, Point3, Rotation3, Vector3};
use spanwright::design::Rotation;
use spanwright::mesh::TriMesh;
use spanwright::report::preview::{render, Image, Item, Marks, PreviewOptions, View};

fn demo_blade() -> TriMesh {
    let d = spanwright::design::load(std::path::Path::new("examples/garden-turbine.toml"))
        .expect("example loads");
    let outcome = spanwright::pipeline::run(&d, &Default::default()).expect("builds");
    outcome.blade_part().mesh().clone()
}

/// A closed prism with `n` sides inscribed in radius `r`, axis along z, length `len`.
fn rod(len: f64, r: f64, n: usize) -> TriMesh {
    let mut m = TriMesh::new();
    for k in 0..2 {
        for i in 0..n {
            let t = std::f64::consts::TAU * i as f64 / n as f64;
            m.push_vertex(Point3::new(r * t.cos(), r * t.sin(), k as f64 * len));
        }
    }
    let n32 = n as u32;
    for i in 0..n32 {
        let j = (i + 1) % n32;
        m.triangles.push([i, j, n32 + j]);
        m.triangles.push([i, n32 + j, n32 + i]);
    }
    for i in 1..n32 - 1 {
        m.triangles.push([0, i + 1, i]);
        m.triangles.push([n32, n32 + i, n32 + i + 1]);
    }
    m
}

/// Convex hull of 2-D points (Andrew's monotone chain), counter-clockwise.
fn hull(mut p: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
    p.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    let cross = |o: (f64, f64), a: (f64, f64), b: (f64, f64)| {
        (a.0 - o.0) * (b.1 - o.1) - (a.1 - o.1) * (b.0 - o.0)
    };
    let mut lower: Vec<(f64, f64)> = Vec::new();
    for &q in &p {
        while lower.len() >= 2 && cross(lower[lower.len() - 2], lower[lower.len() - 1], q) <= 0.0 {
            lower.pop();
        }
        lower.push(q);
    }
    let mut upper: Vec<(f64, f64)> = Vec::new();
    for &q in p.iter().rev() {
        while upper.len() >= 2 && cross(upper[upper.len() - 2], upper[upper.len() - 1], q) <= 0.0 {
            upper.pop();
        }
        upper.push(q);
    }
    lower.pop();
    upper.pop();
    lower.extend(upper);
    lower
}

/// Shoelace area and perimeter of a polygon.
fn area_perimeter(p: &[(f64, f64)]) -> (f64, f64) {
    let (mut a, mut l) = (0.0, 0.0);
    for i in 0..p.len() {
        let (u, v) = (p[i], p[(i + 1) % p.len()]);
        a += u.0 * v.1 - v.0 * u.1;
        l += ((v.0 - u.0).powi(2) + (v.1 - u.1).powi(2)).sqrt();
    }
    (0.5 * a.abs(), l)
}

fn opts(view: View) -> PreviewOptions {
    PreviewOptions {
        view,
        ..PreviewOptions::DEFAULT
    }
}

/// The covered pixel count against the area of the convex outline of the projected
/// vertices (the outline of a convex solid), in pixels: pixel centres inside a convex
/// polygon number its area within half its perimeter (each boundary pixel is counted
/// in or out by its centre).
fn check_convex(mesh: &TriMesh, view: View) {
    let img = render(&[Item::new(mesh)], None, &opts(view));
    let pts: Vec<(f64, f64)> = mesh
        .vertices
        .iter()
        .map(|p| {
            let (x, y, _) = img.project(p);
            (x, y)
        })
        .collect();
    let (area, perim) = area_perimeter(&hull(pts));
    let count = img.covered_count() as f64;
    assert!(area > 10_000.0, "fills the picture: {area}");
    assert!(
        (count - area).abs() <= 0.5 * perim,
        "covered {count} px, outline {area:.0} px, perimeter {perim:.0} px"
    );
}

#[test]
fn box_and_cylinder_silhouettes_match_their_projected_outlines() {
    let b = TriMesh::cuboid(Point3::origin(), Vector3::new(60.0, 30.0, 20.0));
    let turned = b.transformed(&Rotation3::from_euler_angles(0.4, -0.3, 0.9).to_homogeneous());
    let cyl = rod(120.0, 15.0, 64);
    for view in [View::UPSTREAM_OBLIQUE, View::FROM_UPSTREAM] {
        check_convex(&b, view);
        check_convex(&turned, view);
        check_convex(&cyl, view);
    }
}

/// Pixel centres inside any projected triangle, by barycentric coordinates from a 2 x 2
/// solve (nalgebra), independent of the renderer's edge functions.
fn coverage_by_barycentrics(img: &Image, mesh: &TriMesh) -> Vec<bool> {
    let (w, h) = (img.width as usize, img.height as usize);
    let mut cov = vec![false; w * h];
    for t in 0..mesh.len() {
        let [a, b, c] = mesh.corners(t).map(|p| {
            let (x, y, _) = img.project(&p);
            nalgebra::Vector2::new(x, y)
        });
        let m = nalgebra::Matrix2::from_columns(&[b - a, c - a]);
        let Some(inv) = m.try_inverse() else { continue };
        let (x0, x1) = (
            a.x.min(b.x).min(c.x).floor().max(0.0) as usize,
            (a.x.max(b.x).max(c.x).ceil() as usize).min(w - 1),
        );
        let (y0, y1) = (
            a.y.min(b.y).min(c.y).floor().max(0.0) as usize,
            (a.y.max(b.y).max(c.y).ceil() as usize).min(h - 1),
        );
        for y in y0..=y1 {
            for x in x0..=x1 {
                let l = inv * (nalgebra::Vector2::new(x as f64 + 0.5, y as f64 + 0.5) - a);
                if l.x >= -1e-9 && l.y >= -1e-9 && l.x + l.y <= 1.0 + 1e-9 {
                    cov[y * w + x] = true;
                }
            }
        }
    }
    cov
}

#[test]
fn blade_silhouette_matches_its_projected_triangles() {
    let blade = demo_blade();
    for view in [
        View::UPSTREAM_OBLIQUE,
        View {
            look: [1.0, 0.2, 0.1],
            up: [0.0, 0.0, 1.0],
        },
    ] {
        let img = render(&[Item::new(&blade)], None, &opts(view));
        let cov = coverage_by_barycentrics(&img, &blade);
        let mut differ = 0;
        for y in 0..img.height {
            for x in 0..img.width {
                differ += usize::from(img.covered(x, y) != cov[(y * img.width + x) as usize]);
            }
        }
        let n = img.covered_count();
        // Only centres on an edge, within rounding, may be judged differently.
        assert!(n > 5_000, "{n}");
        assert!(differ * 1000 <= n, "{differ} of {n} pixels differ");
    }
}

/// Pixels whose colour differs between two pictures of one size.
fn pixels_differing(a: &Image, b: &Image) -> usize {
    a.rgb
        .chunks(3)
        .zip(b.rgb.chunks(3))
        .filter(|(p, q)| p != q)
        .count()
}

/// Back-face culling of a solid item: along every line of sight through a closed,
/// outward-oriented solid the first surface met faces the eye (common practice in
/// rendering: a closed surface's back faces are hidden), so skipping the faces turned
/// away changes no pixel but those on a silhouette edge within rounding. Checked on the
/// demo blade from two views, also placed through a mirroring transform (which turns
/// its faces over), and on a closed prism.
#[test]
fn solid_items_skip_hidden_faces_without_changing_the_picture() {
    let blade = demo_blade();
    let cyl = rod(120.0, 15.0, 64);
    let mirror = Matrix4::new_nonuniform_scaling(&Vector3::new(-1.0, 1.0, 1.0));
    for view in [
        View::UPSTREAM_OBLIQUE,
        View {
            look: [1.0, 0.2, 0.1],
            up: [0.0, 0.0, 1.0],
        },
    ] {
        for (mesh, transform) in [
            (&blade, Matrix4::identity()),
            (&blade, mirror),
            (&cyl, Matrix4::identity()),
        ] {
            let both = Item {
                transform,
                ..Item::new(mesh)
            };
            let culled = Item {
                transform,
                ..Item::solid(mesh)
            };
            let (a, b) = (
                render(&[both], None, &opts(view)),
                render(&[culled], None, &opts(view)),
            );
            let (n, differ) = (a.covered_count(), pixels_differing(&a, &b));
            assert!(n > 5_000, "{n}");
            assert!(differ * 1000 <= n, "{differ} of {n} pixels differ");
        }
        // Culling a solid's outward faces seen from inside-out (a mesh turned inside
        // out) would leave only the far side: the check is not blind.
        let mut inside_out = cyl.clone();
        for t in &mut inside_out.triangles {
            t.swap(1, 2);
        }
        let (a, b) = (
            render(&[Item::new(&cyl)], None, &opts(view)),
            render(&[Item::solid(&inside_out)], None, &opts(view)),
        );
        let differ = pixels_differing(&a, &b);
        assert!(differ * 10 > a.covered_count(), "{differ}");
    }
}

#[test]
fn same_bytes_every_run() {
    let blade = demo_blade();
    let marks = Marks::blade_frame(Rotation::Ccw, 300.0);
    let items = [Item::new(&blade)];
    let a = render(&items, Some(&marks), &PreviewOptions::DEFAULT).png();
    let b = render(&items, Some(&marks), &PreviewOptions::DEFAULT).png();
    assert_eq!(a, b);
    let c = std::thread::spawn(move || {
        let blade = demo_blade();
        render(&[Item::new(&blade)], Some(&marks), &PreviewOptions::DEFAULT).png()
    })
    .join()
    .unwrap();
    assert_eq!(a, c);
    // PNG signature (PNG specification, W3C/ISO 15948, section 5.2) and the IHDR size.
    assert_eq!(&a[..8], &[0x89, b'P', b'N', b'G', 0x0D, 0x0A, 0x1A, 0x0A]);
    assert_eq!(&a[12..16], b"IHDR");
    assert_eq!(u32::from_be_bytes(a[16..20].try_into().unwrap()), 800);
    assert_eq!(u32::from_be_bytes(a[20..24].try_into().unwrap()), 600);
}

#[test]
fn marks_do_not_change_the_silhouette_and_the_arc_turns_with_the_blade() {
    // Conventions (src/conventions.rs): a ccw rotor turns about -y, so the blade standing
    // along +z moves along omega x r = (-y) x z = -x; a cw rotor the other way. The arc's
    // direction where it passes over the blade must agree.
    for (rot, vx) in [(Rotation::Ccw, -1.0), (Rotation::Cw, 1.0)] {
        let m = Marks::blade_frame(rot, 100.0);
        let arc = m.arc(100.0);
        let k = (0..arc.len() - 1)
            .min_by(|&i, &j| arc[i].x.abs().total_cmp(&arc[j].x.abs()))
            .unwrap();
        let d = arc[k + 1] - arc[k];
        assert!(
            d.x * vx > 0.0 && arc[k].z > 99.0,
            "{rot:?}: {d:?} at {:?}",
            arc[k]
        );
    }
    let blade = demo_blade();
    let items = [Item {
        mesh: &blade,
        transform: Matrix4::new_translation(&Vector3::new(0.0, 0.0, 0.0)),
        colour: [200, 200, 200],
        solid: true,
    }];
    let plain = render(&items, None, &PreviewOptions::DEFAULT);
    let marked = render(
        &items,
        Some(&Marks::blade_frame(Rotation::Cw, 0.0)),
        &PreviewOptions::DEFAULT,
    );
    // The marks enlarge the frame (the arc reaches past the blade), so compare the
    // coverage of the marked picture with its own projected triangles.
    let cov = coverage_by_barycentrics(&marked, &blade);
    let same = (0..marked.height)
        .flat_map(|y| (0..marked.width).map(move |x| (x, y)))
        .filter(|&(x, y)| marked.covered(x, y) == cov[(y * marked.width + x) as usize])
        .count();
    assert!(same as f64 >= 0.999 * (marked.width * marked.height) as f64);
    assert!(plain.scale() > marked.scale());
    // The marks are drawn: pixels of the wind and rotation colours appear.
    let has = |c: [u8; 3]| marked.rgb.chunks(3).any(|p| p == c);
    assert!(has([31, 95, 168]) && has([192, 57, 43]));
}
