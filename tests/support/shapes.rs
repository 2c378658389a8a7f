//! Mesh builders of analytic shapes shared by the tests (props, report): prisms, boxes,
//! spheres, tubes and a demo blade.
#![allow(dead_code)]

use nalgebra::{Point2, Point3};
use spanwright::mesh::TriMesh;

/// Stacks rings (same point count, each counter-clockwise seen from +z, star-shaped about
/// its `centre`) at ascending heights into a closed, outward mesh with fan caps.
pub fn stack(rings: &[(f64, Vec<Point2<f64>>)], centres: (Point2<f64>, Point2<f64>)) -> TriMesh {
    let n = rings[0].1.len() as u32;
    let mut m = TriMesh::new();
    for (z, ring) in rings {
        for p in ring {
            m.push_vertex(Point3::new(p.x, p.y, *z));
        }
    }
    for i in 0..rings.len() as u32 - 1 {
        for k in 0..n {
            let (a, b) = (i * n + k, i * n + (k + 1) % n);
            let (ta, tb) = (a + n, b + n);
            m.triangles.push([a, b, tb]);
            m.triangles.push([a, tb, ta]);
        }
    }
    let (z0, z1) = (rings[0].0, rings[rings.len() - 1].0);
    let c0 = m.push_vertex(Point3::new(centres.0.x, centres.0.y, z0));
    let c1 = m.push_vertex(Point3::new(centres.1.x, centres.1.y, z1));
    let top = (rings.len() as u32 - 1) * n;
    for k in 0..n {
        m.triangles.push([c0, (k + 1) % n, k]);
        m.triangles.push([c1, top + k, top + (k + 1) % n]);
    }
    m
}

/// A straight prism of a polygon (counter-clockwise, star-shaped about `centre`)
/// between `z0` and `z1`.
pub fn prism(poly: &[Point2<f64>], centre: Point2<f64>, z0: f64, z1: f64) -> TriMesh {
    stack(
        &[(z0, poly.to_vec()), (z1, poly.to_vec())],
        (centre, centre),
    )
}

/// Regular polygon with `n` corners on a circle of radius `r` about `c`, counter-clockwise.
pub fn ngon(n: usize, r: f64, c: Point2<f64>) -> Vec<Point2<f64>> {
    (0..n)
        .map(|k| {
            let t = std::f64::consts::TAU * k as f64 / n as f64;
            Point2::new(c.x + r * t.cos(), c.y + r * t.sin())
        })
        .collect()
}

/// Ellipse outline (semi-axes `a` along x, `b` along y), `n` points, counter-clockwise.
pub fn ellipse(n: usize, a: f64, b: f64) -> Vec<Point2<f64>> {
    (0..n)
        .map(|k| {
            let t = std::f64::consts::TAU * k as f64 / n as f64;
            Point2::new(a * t.cos(), b * t.sin())
        })
        .collect()
}

/// Rectangle `[x0, x0 + b] x [y0, y0 + h]`, counter-clockwise.
pub fn rect(x0: f64, y0: f64, b: f64, h: f64) -> Vec<Point2<f64>> {
    vec![
        Point2::new(x0, y0),
        Point2::new(x0 + b, y0),
        Point2::new(x0 + b, y0 + h),
        Point2::new(x0, y0 + h),
    ]
}

/// A closed, outward box mesh `[0, a] x [0, b] x [0, c]`, each face split into a grid of
/// `k x k` squares so that cuts cross many triangles.
pub fn boxed(a: f64, b: f64, c: f64, k: usize) -> TriMesh {
    // Stack rectangles subdivided along their outline, plus fan caps.
    let mut ring = Vec::new();
    let corners = rect(0.0, 0.0, a, b);
    for s in 0..4 {
        let (p, q) = (corners[s], corners[(s + 1) % 4]);
        for j in 0..k {
            ring.push(p + (q - p) * (j as f64 / k as f64));
        }
    }
    let rings: Vec<_> = (0..=k)
        .map(|i| (c * i as f64 / k as f64, ring.clone()))
        .collect();
    let mid = Point2::new(a / 2.0, b / 2.0);
    stack(&rings, (mid, mid))
}

/// Symmetric NACA 4-digit half-thickness (NACA Report 460, 1933; closed trailing edge
/// coefficient -0.1036), thickness `t` as a fraction of chord.
pub fn naca00(t: f64, x: f64) -> f64 {
    5.0 * t
        * (0.2969 * x.sqrt() - 0.1260 * x - 0.3516 * x * x + 0.2843 * x.powi(3)
            - 0.1036 * x.powi(4))
}

/// An invented demo blade (labelled as such): symmetric NACA sections, chord tapering
/// from `c0` to `c1`, twist from `tw0` to `tw1` degrees, `m` stations from `r0` to `r1`,
/// stacked at quarter chord. Counter-clockwise rings, star-shaped about the quarter chord.
#[allow(clippy::too_many_arguments)] // a demo geometry: every number is one design value
pub fn demo_blade(
    r0: f64,
    r1: f64,
    c0: f64,
    c1: f64,
    tw0: f64,
    tw1: f64,
    m: usize,
    n_side: usize,
) -> TriMesh {
    let xs: Vec<f64> = (0..=n_side)
        .map(|i| 0.5 * (1.0 - (std::f64::consts::PI * i as f64 / n_side as f64).cos()))
        .collect();
    let mut unit = Vec::new();
    // Lower surface LE -> TE then upper TE -> LE: counter-clockwise (x right, y up).
    for &x in &xs[..n_side] {
        unit.push(Point2::new(x, -naca00(0.15, x)));
    }
    for &x in xs[1..].iter().rev() {
        unit.push(Point2::new(x, naca00(0.15, x)));
    }
    let rings: Vec<_> = (0..m)
        .map(|i| {
            let f = i as f64 / (m - 1) as f64;
            let (r, c, tw) = (
                r0 + f * (r1 - r0),
                c0 + f * (c1 - c0),
                (tw0 + f * (tw1 - tw0)).to_radians(),
            );
            let ring = unit
                .iter()
                .map(|p| {
                    let (u, v) = ((p.x - 0.25) * c, p.y * c);
                    Point2::new(u * tw.cos() - v * tw.sin(), u * tw.sin() + v * tw.cos())
                })
                .collect();
            (r, ring)
        })
        .collect();
    stack(&rings, (Point2::origin(), Point2::origin()))
}

/// A UV sphere of radius `r` about the origin with `n` latitude bands and `2n` meridians.
pub fn sphere(r: f64, n: usize) -> TriMesh {
    let mut m = TriMesh::new();
    let south = m.push_vertex(Point3::new(0.0, 0.0, -r));
    let lon = 2 * n as u32;
    for i in 1..n {
        let th = std::f64::consts::PI * i as f64 / n as f64;
        for j in 0..lon {
            let ph = std::f64::consts::TAU * j as f64 / lon as f64;
            m.push_vertex(Point3::new(
                r * th.sin() * ph.cos(),
                r * th.sin() * ph.sin(),
                -r * th.cos(),
            ));
        }
    }
    let north = m.push_vertex(Point3::new(0.0, 0.0, r));
    let at = |i: u32, j: u32| 1 + (i - 1) * lon + j % lon;
    for j in 0..lon {
        m.triangles.push([south, at(1, j + 1), at(1, j)]);
        m.triangles
            .push([north, at(n as u32 - 1, j), at(n as u32 - 1, j + 1)]);
    }
    for i in 1..n as u32 - 1 {
        for j in 0..lon {
            let (a, b, c, d) = (at(i, j), at(i, j + 1), at(i + 1, j + 1), at(i + 1, j));
            m.triangles.push([a, b, c]);
            m.triangles.push([a, c, d]);
        }
    }
    m
}

/// A closed tube between `z0` and `z1`: outer ring counter-clockwise, inner ring (the
/// hole) clockwise, annular caps. Both rings have the same point count.
pub fn tube(outer: &[Point2<f64>], inner: &[Point2<f64>], z0: f64, z1: f64) -> TriMesh {
    let n = outer.len() as u32;
    let mut m = TriMesh::new();
    // 0: outer bottom, n: outer top, 2n: inner bottom, 3n: inner top.
    for (ring, z) in [(outer, z0), (outer, z1), (inner, z0), (inner, z1)] {
        for p in ring {
            m.push_vertex(Point3::new(p.x, p.y, z));
        }
    }
    for k in 0..n {
        let k1 = (k + 1) % n;
        // Outer wall faces out (ring counter-clockwise, as in `stack`).
        m.triangles.push([k, k1, n + k1]);
        m.triangles.push([k, n + k1, n + k]);
        // Inner wall faces the hole: reversed.
        m.triangles.push([2 * n + k, 3 * n + k1, 2 * n + k1]);
        m.triangles.push([2 * n + k, 3 * n + k, 3 * n + k1]);
        // Bottom annulus faces -z, top faces +z.
        m.triangles.push([k, 2 * n + k1, k1]);
        m.triangles.push([k, 2 * n + k, 2 * n + k1]);
        m.triangles.push([n + k, n + k1, 3 * n + k1]);
        m.triangles.push([n + k, 3 * n + k1, 3 * n + k]);
    }
    m
}
