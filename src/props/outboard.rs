//! Volume and spanwise first moment of the part outboard of a plane `z = r`, exact for
//! the mesh.
//!
//! Divergence theorem on the clipped solid (the mesh above the plane plus the flat cap
//! the plane cuts): with `F = (0, 0, z)`, `V = surface integral(z n_z)`; with
//! `F = (0, 0, z^2 / 2)`, `integral(z dV) = surface integral(z^2 / 2 n_z)`. Taking `z`
//! relative to the plane (`w = z - r`) makes both fields vanish on the cap, so only the
//! clipped triangles count; then `integral(z dV) = integral(w dV) + r V`. Per triangle the
//! integrals are exact for linear `w`:
//! `integral(w dS) = S (w0 + w1 + w2) / 3`,
//! `integral(w^2 dS) = S (w0^2 + w1^2 + w2^2 + w0 w1 + w1 w2 + w2 w0) / 6`.

use nalgebra::Point3;

use crate::mesh::TriMesh;

/// Volume and first moment of the material above a plane.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Outboard {
    /// Plane position, mm.
    pub radius: f64,
    /// Volume above the plane, mm^3.
    pub volume: f64,
    /// `integral(z dV)` over the volume above the plane, mm^4.
    pub moment: f64,
}

impl Outboard {
    /// Integrals over the part of the closed, outward `mesh` with `z >= radius`.
    pub fn of_mesh(mesh: &TriMesh, radius: f64) -> Outboard {
        let (mut v, mut q) = (0.0, 0.0);
        let mut poly: Vec<Point3<f64>> = Vec::with_capacity(4);
        for t in 0..mesh.len() {
            let c = mesh.corners(t);
            if c.iter().all(|p| p.z < radius) {
                continue;
            }
            poly.clear();
            // Sutherland-Hodgman against z >= radius.
            for k in 0..3 {
                let (p, n) = (c[k], c[(k + 1) % 3]);
                let (pin, nin) = (p.z >= radius, n.z >= radius);
                if pin {
                    poly.push(p);
                }
                if pin != nin {
                    let s = (radius - p.z) / (n.z - p.z);
                    poly.push(p + (n - p) * s);
                }
            }
            for k in 1..poly.len().saturating_sub(1) {
                let (a, b, d) = (poly[0], poly[k], poly[k + 1]);
                let sz = 0.5 * ((b - a).cross(&(d - a))).z;
                let (z0, z1, z2) = (a.z - radius, b.z - radius, d.z - radius);
                v += sz * (z0 + z1 + z2) / 3.0;
                q += sz * 0.5 * (z0 * z0 + z1 * z1 + z2 * z2 + z0 * z1 + z1 * z2 + z2 * z0) / 6.0;
            }
        }
        Outboard {
            radius,
            volume: v,
            moment: q + radius * v,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::tests::box_mesh;
    use nalgebra::Vector3;

    #[test]
    fn box_outboard() {
        // Box 2 x 3 x 5: above z = 2 the volume is 2*3*3 = 18, integral(z dV) = 6 (5^2 - 2^2)/2.
        let m = box_mesh(Vector3::new(2.0, 3.0, 5.0));
        let o = Outboard::of_mesh(&m, 2.0);
        assert!((o.volume - 18.0).abs() < 1e-12);
        assert!((o.moment - 6.0 * 21.0 / 2.0).abs() < 1e-12);
        let all = Outboard::of_mesh(&m, -1.0);
        assert!((all.volume - 30.0).abs() < 1e-12);
    }
}
