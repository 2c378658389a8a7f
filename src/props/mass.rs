//! Mass properties of a closed triangle mesh, exact for the mesh.
//!
//! The volume integrals of `1, x, y, z, x^2, y^2, z^2, xy, yz, zx` are turned into surface
//! integrals by the divergence theorem and evaluated in closed form per triangle
//! (D. Eberly, "Polyhedral Mass Properties (Revisited)", Geometric Tools, 2002; the
//! same integrals as B. Mirtich, "Fast and Accurate Computation of Polyhedral Mass
//! Properties", J. Graphics Tools 1(2), 1996). The mesh is first shifted to the centre of
//! its bounding box so that large coordinates do not cost precision.

use nalgebra::{Matrix3, Point3, SymmetricEigen, Vector3};

use crate::mesh::TriMesh;

/// Mass properties of a solid of uniform density.
///
/// Lengths in mm, mass in g, inertia in g mm^2. With `density = 1 g/mm^3` the mass equals
/// the volume (see [`MassProps::of_mesh`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MassProps {
    /// Enclosed volume, mm^3 (positive for a closed, outward mesh).
    pub volume: f64,
    /// Surface area, mm^2.
    pub area: f64,
    /// Mass, g.
    pub mass: f64,
    /// Centre of mass, mm.
    pub centroid: Point3<f64>,
    /// Inertia tensor about the centre of mass, g mm^2 (diagonal: moments; off-diagonal:
    /// products of inertia with the usual minus sign, `I_xy = -integral(x y dm)`).
    pub inertia: Matrix3<f64>,
}

/// Principal moments and axes of an inertia tensor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Principal {
    /// Principal moments, g mm^2, ascending.
    pub moments: [f64; 3],
    /// Unit principal axes, in the order of `moments`.
    pub axes: [Vector3<f64>; 3],
}

/// Integrals of `1, x, y, z, x^2, y^2, z^2, xy, yz, zx` over the volume of a closed mesh,
/// about the point `origin` (coordinates relative to it).
pub(crate) fn volume_integrals(mesh: &TriMesh, origin: &Point3<f64>) -> [f64; 10] {
    // Eberly (2002), "Subexpressions" and "Compute" listings.
    fn sub(w0: f64, w1: f64, w2: f64) -> (f64, f64, f64, f64, f64, f64) {
        let t0 = w0 + w1;
        let f1 = t0 + w2;
        let t1 = w0 * w0;
        let t2 = t1 + w1 * t0;
        let f2 = t2 + w2 * f1;
        let f3 = w0 * t1 + w1 * t2 + w2 * f2;
        let g0 = f2 + w0 * (f1 + w0);
        let g1 = f2 + w1 * (f1 + w1);
        let g2 = f2 + w2 * (f1 + w2);
        (f1, f2, f3, g0, g1, g2)
    }
    let mut s = [0.0f64; 10];
    for t in 0..mesh.len() {
        let [a, b, c] = mesh.corners(t);
        let (p0, p1, p2) = (a - origin, b - origin, c - origin);
        let d = (p1 - p0).cross(&(p2 - p0));
        let (f1x, f2x, f3x, g0x, g1x, g2x) = sub(p0.x, p1.x, p2.x);
        let (_, f2y, f3y, g0y, g1y, g2y) = sub(p0.y, p1.y, p2.y);
        let (_, f2z, f3z, g0z, g1z, g2z) = sub(p0.z, p1.z, p2.z);
        s[0] += d.x * f1x;
        s[1] += d.x * f2x;
        s[2] += d.y * f2y;
        s[3] += d.z * f2z;
        s[4] += d.x * f3x;
        s[5] += d.y * f3y;
        s[6] += d.z * f3z;
        s[7] += d.x * (p0.y * g0x + p1.y * g1x + p2.y * g2x);
        s[8] += d.y * (p0.z * g0y + p1.z * g1y + p2.z * g2y);
        s[9] += d.z * (p0.x * g0z + p1.x * g1z + p2.x * g2z);
    }
    let mult = [
        1.0 / 6.0,
        1.0 / 24.0,
        1.0 / 24.0,
        1.0 / 24.0,
        1.0 / 60.0,
        1.0 / 60.0,
        1.0 / 60.0,
        1.0 / 120.0,
        1.0 / 120.0,
        1.0 / 120.0,
    ];
    for (v, m) in s.iter_mut().zip(mult) {
        *v *= m;
    }
    s
}

impl MassProps {
    /// Mass properties of a closed, outward-oriented mesh of uniform `density` (g/mm^3;
    /// use [`crate::props::Material::density_g_mm3`]). Returns `None` when the mesh
    /// encloses no positive volume (empty, open or inside-out).
    pub fn of_mesh(mesh: &TriMesh, density: f64) -> Option<MassProps> {
        let origin = Self::origin_of(mesh)?;
        let s = volume_integrals(mesh, &origin);
        Self::from_integrals(&s, &origin, mesh.area(), density)
    }

    /// The reference point of [`MassProps::of_mesh`]: the centre of the bounding box.
    pub(crate) fn origin_of(mesh: &TriMesh) -> Option<Point3<f64>> {
        let bb = mesh.bounding_box()?;
        Some(Point3::from((bb.min.coords + bb.max.coords) * 0.5))
    }

    /// Mass properties from the volume integrals of `1, x, y, z, x^2, y^2, z^2, xy, yz,
    /// zx` taken about `origin` (per unit density), a surface `area` and a `density`.
    /// `None` unless the volume is positive.
    pub(crate) fn from_integrals(
        s: &[f64; 10],
        origin: &Point3<f64>,
        area: f64,
        density: f64,
    ) -> Option<MassProps> {
        let volume = s[0];
        if !(volume.is_finite() && volume > 0.0) {
            return None;
        }
        let c = Vector3::new(s[1], s[2], s[3]) / volume;
        // Second moments about the centre of mass, per unit density.
        let xx = s[4] - volume * c.x * c.x;
        let yy = s[5] - volume * c.y * c.y;
        let zz = s[6] - volume * c.z * c.z;
        let xy = s[7] - volume * c.x * c.y;
        let yz = s[8] - volume * c.y * c.z;
        let zx = s[9] - volume * c.z * c.x;
        let inertia =
            Matrix3::new(yy + zz, -xy, -zx, -xy, xx + zz, -yz, -zx, -yz, xx + yy) * density;
        Some(MassProps {
            volume,
            area,
            mass: volume * density,
            centroid: origin + c,
            inertia,
        })
    }

    /// Principal moments (ascending) and axes of the inertia tensor about the centre of mass.
    pub fn principal(&self) -> Principal {
        let eig = SymmetricEigen::new(self.inertia);
        let mut idx = [0usize, 1, 2];
        idx.sort_by(|&a, &b| eig.eigenvalues[a].total_cmp(&eig.eigenvalues[b]));
        let axis = |i: usize| {
            let v: Vector3<f64> = eig.eigenvectors.column(i).into_owned();
            v.normalize()
        };
        Principal {
            moments: idx.map(|i| eig.eigenvalues[i]),
            axes: idx.map(axis),
        }
    }

    /// Moment of inertia, g mm^2, about the line through `point` with direction `dir`
    /// (any length, not zero), by the parallel-axis theorem:
    /// `I = u^T I_c u + m d^2`, `d` the distance of the centre of mass from the line.
    pub fn inertia_about(&self, point: &Point3<f64>, dir: &Vector3<f64>) -> f64 {
        let u = dir.normalize();
        let r = self.centroid - point;
        let d2 = (r - u * r.dot(&u)).norm_squared();
        u.dot(&(self.inertia * u)) + self.mass * d2
    }

    /// Moment of inertia about the rotor axis, g mm^2: the y axis through the origin (see
    /// [`crate::conventions`]).
    pub fn inertia_about_rotor_axis(&self) -> f64 {
        self.inertia_about(&Point3::origin(), &Vector3::y())
    }

    /// Copy with every mass quantity multiplied by `factor` (geometry unchanged): used
    /// to turn a per-unit-density result into a material's.
    pub fn scaled(&self, factor: f64) -> MassProps {
        MassProps {
            mass: self.mass * factor,
            inertia: self.inertia * factor,
            ..*self
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::tests::box_mesh;

    #[test]
    fn box_inertia() {
        // Any mechanics handbook: solid box I_x = m (b^2 + c^2) / 12.
        let m = box_mesh(Vector3::new(2.0, 3.0, 5.0));
        let p = MassProps::of_mesh(&m, 2.0).unwrap();
        assert!((p.mass - 60.0).abs() < 1e-9);
        assert!((p.centroid - Point3::new(1.0, 1.5, 2.5)).norm() < 1e-12);
        assert!((p.inertia[(0, 0)] - 60.0 * (9.0 + 25.0) / 12.0).abs() < 1e-9);
        assert!((p.inertia[(1, 1)] - 60.0 * (4.0 + 25.0) / 12.0).abs() < 1e-9);
        assert!((p.inertia[(2, 2)] - 60.0 * (4.0 + 9.0) / 12.0).abs() < 1e-9);
        assert!(p.inertia[(0, 1)].abs() < 1e-9);
    }
}
