//! Helpers shared by the pipeline and rotor tests.
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
