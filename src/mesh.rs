//! Indexed triangle meshes: the representation every mesh consumer (checks, exports,
//! properties, printer fit) reads.
//!
//! Orientation: triangle vertices run counter-clockwise seen from outside the solid, so
//! that `(b - a) x (c - a)` points outward (right-hand rule).

use nalgebra::{Matrix4, Point3, Vector3};

pub mod slice;

pub use slice::{Slice, SliceError};

/// An indexed triangle mesh in millimetres.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct TriMesh {
    /// Vertex positions.
    pub vertices: Vec<Point3<f64>>,
    /// Triangles as vertex indices, counter-clockwise seen from outside.
    pub triangles: Vec<[u32; 3]>,
}

/// An axis-aligned box.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Aabb {
    /// Smallest corner.
    pub min: Point3<f64>,
    /// Largest corner.
    pub max: Point3<f64>,
}

impl Aabb {
    /// Side lengths.
    pub fn size(&self) -> Vector3<f64> {
        self.max - self.min
    }

    /// The box of a set of points; `None` when empty.
    pub fn of_points<'a>(points: impl IntoIterator<Item = &'a Point3<f64>>) -> Option<Self> {
        let mut it = points.into_iter();
        let first = *it.next()?;
        Some(it.fold(
            Aabb {
                min: first,
                max: first,
            },
            |b, p| Aabb {
                min: b.min.inf(p),
                max: b.max.sup(p),
            },
        ))
    }
}

impl TriMesh {
    /// An empty mesh.
    pub fn new() -> Self {
        Self::default()
    }

    /// A closed, outward-oriented box (12 triangles) with corners `lo` and `lo + size`.
    pub fn cuboid(lo: Point3<f64>, size: Vector3<f64>) -> TriMesh {
        let mut m = TriMesh::new();
        for i in 0..8u32 {
            m.push_vertex(Point3::new(
                lo.x + if i & 1 != 0 { size.x } else { 0.0 },
                lo.y + if i & 2 != 0 { size.y } else { 0.0 },
                lo.z + if i & 4 != 0 { size.z } else { 0.0 },
            ));
        }
        m.triangles = vec![
            [0, 2, 1],
            [1, 2, 3], // z = lo.z, facing -z
            [4, 5, 6],
            [5, 7, 6], // z = lo.z + size.z
            [0, 1, 4],
            [1, 5, 4], // y = lo.y
            [2, 6, 3],
            [3, 6, 7], // y = lo.y + size.y
            [0, 4, 2],
            [2, 4, 6], // x = lo.x
            [1, 3, 5],
            [3, 7, 5], // x = lo.x + size.x
        ];
        m
    }

    /// Number of triangles.
    pub fn len(&self) -> usize {
        self.triangles.len()
    }

    /// True when there are no triangles.
    pub fn is_empty(&self) -> bool {
        self.triangles.is_empty()
    }

    /// The three corner positions of triangle `t`.
    pub fn corners(&self, t: usize) -> [Point3<f64>; 3] {
        let [a, b, c] = self.triangles[t];
        [
            self.vertices[a as usize],
            self.vertices[b as usize],
            self.vertices[c as usize],
        ]
    }

    /// Unnormalised normal `(b - a) x (c - a)` of triangle `t` (length = twice its area).
    pub fn scaled_normal(&self, t: usize) -> Vector3<f64> {
        let [a, b, c] = self.corners(t);
        (b - a).cross(&(c - a))
    }

    /// Adds a vertex and returns its index.
    pub fn push_vertex(&mut self, p: Point3<f64>) -> u32 {
        self.vertices.push(p);
        (self.vertices.len() - 1) as u32
    }

    /// Signed volume enclosed by the mesh, by the divergence theorem (sum of signed
    /// tetrahedra from the origin). Positive for a closed, outward-oriented mesh.
    pub fn signed_volume(&self) -> f64 {
        self.triangles
            .iter()
            .map(|&[a, b, c]| {
                let (a, b, c) = (
                    self.vertices[a as usize].coords,
                    self.vertices[b as usize].coords,
                    self.vertices[c as usize].coords,
                );
                a.dot(&b.cross(&c))
            })
            .sum::<f64>()
            / 6.0
    }

    /// Total surface area.
    pub fn area(&self) -> f64 {
        (0..self.len())
            .map(|t| 0.5 * self.scaled_normal(t).norm())
            .sum()
    }

    /// Axis-aligned bounding box of the vertices used by triangles; `None` when empty.
    pub fn bounding_box(&self) -> Option<Aabb> {
        Aabb::of_points(&self.vertices)
    }

    /// Applies an affine transform in place. A transform that mirrors (negative
    /// determinant) also reverses every triangle so the mesh keeps facing outward.
    pub fn transform(&mut self, m: &Matrix4<f64>) {
        for v in &mut self.vertices {
            *v = m.transform_point(v);
        }
        if m.fixed_view::<3, 3>(0, 0).determinant() < 0.0 {
            self.flip();
        }
    }

    /// Returns a transformed copy (see [`TriMesh::transform`]).
    pub fn transformed(&self, m: &Matrix4<f64>) -> TriMesh {
        let mut out = self.clone();
        out.transform(m);
        out
    }

    /// Translates every vertex.
    pub fn translate(&mut self, d: Vector3<f64>) {
        for v in &mut self.vertices {
            *v += d;
        }
    }

    /// Reverses the orientation of every triangle.
    pub fn flip(&mut self) {
        for t in &mut self.triangles {
            t.swap(1, 2);
        }
    }

    /// Drops vertices no triangle uses and renumbers the triangles; the kept vertices
    /// keep their relative order (a mesh without unused vertices is left unchanged).
    pub fn compact(&mut self) {
        self.compact_map();
    }

    /// [`TriMesh::compact`], returning the new index of every old vertex (`u32::MAX` for
    /// a dropped one) when any was dropped.
    pub fn compact_map(&mut self) -> Option<Vec<u32>> {
        let mut used = vec![false; self.vertices.len()];
        for t in &self.triangles {
            for &i in t {
                used[i as usize] = true;
            }
        }
        if used.iter().all(|&u| u) {
            return None;
        }
        let mut map = vec![u32::MAX; self.vertices.len()];
        let mut kept = Vec::with_capacity(self.vertices.len());
        for (i, p) in self.vertices.iter().enumerate() {
            if used[i] {
                map[i] = kept.len() as u32;
                kept.push(*p);
            }
        }
        for t in &mut self.triangles {
            for i in t.iter_mut() {
                *i = map[*i as usize];
            }
        }
        self.vertices = kept;
        Some(map)
    }

    /// Appends another mesh (its vertices are not merged with ours).
    pub fn append(&mut self, other: &TriMesh) {
        let off = self.vertices.len() as u32;
        self.vertices.extend_from_slice(&other.vertices);
        self.triangles.extend(
            other
                .triangles
                .iter()
                .map(|t| [t[0] + off, t[1] + off, t[2] + off]),
        );
    }
}

/// A named solid ready for checks and export.
#[derive(Debug, Clone, PartialEq)]
pub struct Part {
    /// Name used for file names and object names in multi-part files.
    pub name: String,
    /// The closed triangle mesh.
    pub mesh: TriMesh,
}

/// `x` rounded down to single precision: the largest `f32` not above it (STL and the
/// compact per-triangle data of the checks store `f32`; rounding outward keeps a bound a
/// bound).
pub fn f32_below(x: f64) -> f32 {
    let y = x as f32;
    if f64::from(y) > x {
        y.next_down()
    } else {
        y
    }
}

/// `x` rounded up to single precision: the smallest `f32` not below it.
pub fn f32_above(x: f64) -> f32 {
    let y = x as f32;
    if f64::from(y) < x {
        y.next_up()
    } else {
        y
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    /// A closed, outward-oriented axis-aligned box mesh at the origin, for tests.
    pub fn box_mesh(size: Vector3<f64>) -> TriMesh {
        TriMesh::cuboid(Point3::origin(), size)
    }

    #[test]
    fn box_volume_and_area() {
        // Elementary geometry: V = abc, A = 2(ab + bc + ca).
        let m = box_mesh(Vector3::new(2.0, 3.0, 5.0));
        assert!((m.signed_volume() - 30.0).abs() < 1e-12);
        assert!((m.area() - 62.0).abs() < 1e-12);
        let mut padded = m.clone();
        padded.push_vertex(Point3::new(9.0, 9.0, 9.0));
        padded.compact();
        assert_eq!(padded.vertices.len(), 8);
        assert!((padded.signed_volume() - 30.0).abs() < 1e-12);
        let mut mirrored = m.clone();
        mirrored.transform(&Matrix4::new_nonuniform_scaling(&Vector3::new(
            -1.0, 1.0, 1.0,
        )));
        assert!((mirrored.signed_volume() - 30.0).abs() < 1e-12);
    }
}
