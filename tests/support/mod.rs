//! Helpers shared by the tests and benchmarks (benchmarks include this file by path).
#![allow(dead_code)]

use nalgebra::Point3;
use spanwright::mesh::TriMesh;

/// Leading and trailing edge of a mesh cut by the plane z = r: the cut points farthest
/// apart (a sharp trailing edge makes them the two edges), the one at smaller x first
/// (the leading edge points toward -x, see the conventions).
pub fn chord_line_at(mesh: &TriMesh, r: f64) -> (Point3<f64>, Point3<f64>) {
    let mut pts = Vec::new();
    for t in 0..mesh.len() {
        let c = mesh.corners(t);
        for k in 0..3 {
            let (a, b) = (c[k], c[(k + 1) % 3]);
            if (a.z - r) * (b.z - r) < 0.0 {
                let s = (r - a.z) / (b.z - a.z);
                pts.push(a + (b - a) * s);
            }
        }
    }
    let mut best = (0.0, pts[0], pts[0]);
    for a in &pts {
        for b in &pts {
            let d = (a - b).norm();
            if d > best.0 {
                best = (d, *a, *b);
            }
        }
    }
    if best.1.x < best.2.x {
        (best.1, best.2)
    } else {
        (best.2, best.1)
    }
}

/// Invented blade-like solid: an elliptic section (12 % thick) whose chord tapers from
/// `root` to `tip` mm and twists by `twist` degrees over the span `len` mm, with flat caps;
/// `2 (rings - 1) around + 2 around` triangles.
pub fn blade(len: f64, root: f64, tip: f64, twist: f64, rings: usize, around: usize) -> TriMesh {
    let mut m = TriMesh::new();
    for k in 0..rings {
        let f = k as f64 / (rings - 1) as f64;
        let c = root + (tip - root) * f;
        let th = (twist * f).to_radians();
        for i in 0..around {
            let t = std::f64::consts::TAU * i as f64 / around as f64;
            let (u, v) = (0.5 * c * t.cos(), 0.06 * c * t.sin());
            m.push_vertex(Point3::new(
                u * th.cos() - v * th.sin(),
                u * th.sin() + v * th.cos(),
                len * f,
            ));
        }
    }
    let n = around as u32;
    for k in 0..rings as u32 - 1 {
        for i in 0..n {
            let j = (i + 1) % n;
            let (a, b, c, d) = (k * n + i, k * n + j, (k + 1) * n + j, (k + 1) * n + i);
            m.triangles.push([a, b, c]);
            m.triangles.push([a, c, d]);
        }
    }
    let bottom = m.push_vertex(Point3::new(0.0, 0.0, 0.0));
    let top = m.push_vertex(Point3::new(0.0, 0.0, len));
    let last = (rings as u32 - 1) * n;
    for i in 0..n {
        let j = (i + 1) % n;
        m.triangles.push([bottom, j, i]);
        m.triangles.push([top, last + i, last + j]);
    }
    m
}
