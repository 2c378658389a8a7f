//! What a part's underside asks of the printer in one pose: the area resting on the bed
//! and the area that needs support.
//!
//! # Definitions
//! The part is turned so that `up` (a unit vector in the part's frame) points away from
//! the bed; heights `h` are measured along `up` from the part's lowest vertex. A triangle
//! with outward unit normal `n` **faces down** when `n . up < 0`. Its **angle from
//! vertical** is `asin(-n . up)`: 0 for a vertical wall, 90 degrees for a ceiling.
//!
//! * **First layer**: the slab `0 <= h <= first_layer` (default 0.2 mm, a usual first
//!   layer height for a 0.4 mm nozzle: common practice). Whatever faces down inside it is
//!   laid directly on the bed.
//! * **Bed contact** (mm^2): the area, projected on the bed, of the parts of the
//!   downward-facing triangles that lie in the first layer: `sum f_t A_t |n . up|`, where
//!   `A_t` is the triangle's area and `f_t` the fraction of it with `h <= first_layer`
//!   (exact: the triangle is cut by the plane `h = first_layer`). A face lying on the bed
//!   counts whole; a part resting on an edge or a curve counts the strip of the first
//!   layer under it.
//! * **Overhang needing support** (mm^2): the true surface area of the parts of the
//!   triangles steeper than the overhang angle (`angle from vertical > overhang angle`,
//!   i.e. `-n . up > sin(overhang angle)`, strictly; default 45 degrees, common practice)
//!   that lie above the first layer: `sum (1 - f_t) A_t`. Faces at exactly the overhang
//!   angle print without support.
//!
//! A face in the first layer is supported by the bed, so it is contact, never overhang.
//! Heights within `1e-9` times the part's size of the first layer's top count as on it
//! (rounding only): a face lying on the bed in exact arithmetic counts whole even when
//! the rotation leaves its corners a few ulps apart.

use crate::mesh::TriMesh;
use nalgebra::{Point3, Vector3};

/// Options of the underside measures.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct UndersideOptions {
    /// Steepest printable overhang, degrees from vertical (default 45, common practice):
    /// faces steeper than this need support.
    pub overhang_deg: f64,
    /// Height of the first layer, mm (default 0.2, common practice for a 0.4 mm nozzle):
    /// faces within it rest on the bed.
    pub first_layer: f64,
}

impl UndersideOptions {
    /// The defaults.
    pub const DEFAULT: UndersideOptions = UndersideOptions {
        overhang_deg: 45.0,
        first_layer: 0.2,
    };
}

impl Default for UndersideOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// The underside of a part in one pose (see the module docs for the definitions).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Underside {
    /// Area resting on the bed (projected on it), mm^2.
    pub contact_area: f64,
    /// Surface area of faces steeper than the overhang angle above the first layer, mm^2.
    pub overhang_area: f64,
    /// The same overhang projected on the bed, mm^2 (the footprint of the support).
    pub overhang_projected: f64,
    /// Height of the part along `up`, mm.
    pub height: f64,
}

/// Fraction of a triangle's area lying at heights `<= b`, for corner heights `h` (the
/// height varies linearly over the triangle, so the cut is one straight line).
pub fn fraction_below(h: [f64; 3], b: f64) -> f64 {
    let mut s = h;
    s.sort_by(f64::total_cmp);
    let [h0, h1, h2] = s;
    if b >= h2 {
        1.0
    } else if b <= h0 {
        0.0
    } else if b <= h1 {
        // A small triangle at the lowest corner, similar on its two edges.
        ((b - h0) / (h1 - h0)) * ((b - h0) / (h2 - h0))
    } else {
        // Everything but a small triangle at the highest corner.
        1.0 - ((h2 - b) / (h2 - h1)) * ((h2 - b) / (h2 - h0))
    }
}

/// A mesh prepared to be measured in many poses: vertices and unit normals in separate
/// coordinate arrays (the sums over every triangle vectorise), and for each vertex the
/// triangles around it (only those near the bed are cut by the first layer).
#[derive(Debug, Clone)]
pub struct Surfaces {
    /// Vertices used by the kept triangles, by coordinate.
    vx: Vec<f64>,
    vy: Vec<f64>,
    vz: Vec<f64>,
    /// Kept triangles, indexing the vertices.
    tris: Vec<[u32; 3]>,
    /// Unit normals and areas of the kept triangles, by coordinate.
    nx: Vec<f64>,
    ny: Vec<f64>,
    nz: Vec<f64>,
    area: Vec<f64>,
    /// Triangles around vertex `v`: `around[start[v]..start[v + 1]]`.
    start: Vec<u32>,
    around: Vec<u32>,
    tol: f64,
}

impl Surfaces {
    /// Prepares a mesh (triangles naming missing vertices or with a zero or non-finite
    /// area are left out).
    pub fn new(mesh: &TriMesh) -> Surfaces {
        let n = mesh.vertices.len();
        let mut map = vec![u32::MAX; n];
        let mut vertices: Vec<Point3<f64>> = Vec::new();
        let mut tris = Vec::with_capacity(mesh.len());
        let (mut nx, mut ny, mut nz, mut area) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
        for t in &mesh.triangles {
            if t.iter().any(|&i| i as usize >= n) {
                continue;
            }
            let [a, b, c] = t.map(|i| mesh.vertices[i as usize]);
            let s = (b - a).cross(&(c - a));
            let len = s.norm();
            if !(len > 0.0) || !len.is_finite() {
                continue;
            }
            let tri = t.map(|i| {
                let k = &mut map[i as usize];
                if *k == u32::MAX {
                    *k = vertices.len() as u32;
                    vertices.push(mesh.vertices[i as usize]);
                }
                *k
            });
            tris.push(tri);
            nx.push(s.x / len);
            ny.push(s.y / len);
            nz.push(s.z / len);
            area.push(0.5 * len);
        }
        // Vertex -> triangles, compressed rows.
        let mut start = vec![0u32; vertices.len() + 1];
        for t in &tris {
            for &v in t {
                start[v as usize + 1] += 1;
            }
        }
        for i in 0..vertices.len() {
            start[i + 1] += start[i];
        }
        let mut fill = start.clone();
        let mut around = vec![0u32; 3 * tris.len()];
        for (k, t) in tris.iter().enumerate() {
            for &v in t {
                around[fill[v as usize] as usize] = k as u32;
                fill[v as usize] += 1;
            }
        }
        let size = crate::mesh::Aabb::of_points(&vertices)
            .map(|b| b.size().norm())
            .filter(|s| s.is_finite())
            .unwrap_or(1.0);
        Surfaces {
            vx: vertices.iter().map(|v| v.x).collect(),
            vy: vertices.iter().map(|v| v.y).collect(),
            vz: vertices.iter().map(|v| v.z).collect(),
            tris,
            nx,
            ny,
            nz,
            area,
            start,
            around,
            tol: 1e-9 * size.max(1.0),
        }
    }

    /// Total surface area, mm^2.
    pub fn area(&self) -> f64 {
        self.area.iter().sum()
    }

    /// The underside with `up` (part frame, any length) pointing away from the bed.
    pub fn measure(&self, up: &Vector3<f64>, opts: &UndersideOptions) -> Underside {
        let empty = Underside {
            contact_area: 0.0,
            overhang_area: 0.0,
            overhang_projected: 0.0,
            height: 0.0,
        };
        let Some(u) = up.try_normalize(0.0) else {
            return empty;
        };
        let (ux, uy, uz) = (u.x, u.y, u.z);
        let heights: Vec<f64> = (0..self.vx.len())
            .map(|i| ux * self.vx[i] + uy * self.vy[i] + uz * self.vz[i])
            .collect();
        let (lo, hi) = heights
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &h| {
                (a.min(h), b.max(h))
            });
        if !lo.is_finite() {
            return empty;
        }
        let steep = opts.overhang_deg.to_radians().sin();
        // Every steep face, whole.
        let (mut over, mut over_proj) = (0.0, 0.0);
        for k in 0..self.area.len() {
            let down = -(self.nx[k] * ux + self.ny[k] * uy + self.nz[k] * uz);
            let a = if down > steep { self.area[k] } else { 0.0 };
            over += a;
            over_proj += a * down;
        }
        // The triangles touching the first layer: their part in it is contact, and not
        // overhang.
        let band = opts.first_layer.max(0.0);
        let mut near: Vec<u32> = Vec::new();
        for (v, &h) in heights.iter().enumerate() {
            if h - lo <= band + self.tol {
                near.extend_from_slice(
                    &self.around[self.start[v] as usize..self.start[v + 1] as usize],
                );
            }
        }
        near.sort_unstable();
        near.dedup();
        let mut contact = 0.0;
        for k in near {
            let k = k as usize;
            let down = -(self.nx[k] * ux + self.ny[k] * uy + self.nz[k] * uz);
            if down <= 0.0 {
                continue;
            }
            // Corners within rounding of the layer's top count as in it.
            let h = self.tris[k].map(|i| {
                let h = heights[i as usize] - lo;
                if (h - band).abs() <= self.tol {
                    band
                } else {
                    h
                }
            });
            let f = fraction_below(h, band);
            contact += f * self.area[k] * down;
            if down > steep {
                over -= f * self.area[k];
                over_proj -= f * self.area[k] * down;
            }
        }
        Underside {
            contact_area: contact,
            overhang_area: over.max(0.0),
            overhang_projected: over_proj.max(0.0),
            height: hi - lo,
        }
    }
}

/// The underside of `mesh` with `up` (part frame) pointing away from the bed.
pub fn underside(mesh: &TriMesh, up: &Vector3<f64>, opts: &UndersideOptions) -> Underside {
    Surfaces::new(mesh).measure(up, opts)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fraction_of_a_triangle_below_a_line() {
        // Elementary geometry: the part of a triangle below a level line through the
        // middle of two edges from the lowest corner is similar with ratio 1/2: area 1/4.
        assert!((fraction_below([0.0, 2.0, 2.0], 1.0) - 0.25).abs() < 1e-15);
        // Above the level line through the middles from the highest corner: 1/4 above.
        assert!((fraction_below([0.0, 0.0, 2.0], 1.0) - 0.75).abs() < 1e-15);
        assert_eq!(fraction_below([0.0, 0.0, 0.0], 0.0), 1.0);
        assert_eq!(fraction_below([1.0, 2.0, 3.0], 0.5), 0.0);
    }
}
