//! Merging coincident vertices.

use crate::mesh::TriMesh;
use std::collections::HashMap;

/// Merges vertices closer than `tol` (mm) and drops the triangles that collapse (two or
/// three corners merged). Each vertex joins the first earlier kept vertex within `tol`
/// (greedy, in index order), so chains of near points do not creep. The result keeps the
/// first vertex of each group, in the original order; triangles keep their order and
/// orientation. A `tol` that is not positive and finite merges exactly equal positions
/// only.
pub fn weld(mesh: &TriMesh, tol: f64) -> TriMesh {
    let exact = !(tol > 0.0 && tol.is_finite());
    let h = if exact { 1.0 } else { tol };
    let key = |x: f64| (x / h).floor() as i64;
    let mut grid: HashMap<[i64; 3], Vec<u32>> = HashMap::new();
    let mut out = TriMesh::new();
    let mut map = Vec::with_capacity(mesh.vertices.len());
    for p in &mesh.vertices {
        let c = [key(p.x), key(p.y), key(p.z)];
        let mut hit = None;
        'search: for dz in -1..=1 {
            for dy in -1..=1 {
                for dx in -1..=1 {
                    if let Some(list) = grid.get(&[c[0] + dx, c[1] + dy, c[2] + dz]) {
                        for &k in list {
                            let d = (out.vertices[k as usize] - p).norm();
                            if (exact && d == 0.0) || (!exact && d < tol) {
                                hit = Some(k);
                                break 'search;
                            }
                        }
                    }
                }
            }
        }
        let k = match hit {
            Some(k) => k,
            None => {
                let k = out.push_vertex(*p);
                grid.entry(c).or_default().push(k);
                k
            }
        };
        map.push(k);
    }
    out.triangles = mesh
        .triangles
        .iter()
        .filter_map(|t| {
            let m = t.map(|i| map.get(i as usize).copied());
            match m {
                [Some(a), Some(b), Some(c)] if a != b && b != c && a != c => Some([a, b, c]),
                _ => None,
            }
        })
        .collect();
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::tests::box_mesh;
    use nalgebra::Vector3;

    #[test]
    fn unwelded_box_welds_back() {
        // Common practice: a "triangle soup" (three own vertices per triangle) of a box
        // welds back to the 8 corners and keeps all 12 triangles and the volume abc.
        let b = box_mesh(Vector3::new(2.0, 3.0, 5.0));
        let mut soup = TriMesh::new();
        for t in 0..b.len() {
            let [p, q, r] = b.corners(t);
            let i = soup.push_vertex(p + Vector3::new(1e-7, 0.0, 0.0));
            let j = soup.push_vertex(q);
            let k = soup.push_vertex(r);
            soup.triangles.push([i, j, k]);
        }
        let w = weld(&soup, 1e-4);
        assert_eq!(w.vertices.len(), 8);
        assert_eq!(w.triangles.len(), 12);
        assert!((w.signed_volume() - 30.0).abs() < 1e-5);
        // Exact welding keeps the shifted copies apart.
        assert!(weld(&soup, 0.0).vertices.len() > 8);
    }

    #[test]
    fn collapsed_triangles_are_dropped() {
        let mut m = TriMesh::new();
        let a = m.push_vertex(nalgebra::Point3::new(0.0, 0.0, 0.0));
        let b = m.push_vertex(nalgebra::Point3::new(1e-9, 0.0, 0.0));
        let c = m.push_vertex(nalgebra::Point3::new(0.0, 1.0, 0.0));
        let d = m.push_vertex(nalgebra::Point3::new(1.0, 1.0, 0.0));
        m.triangles = vec![[a, b, c], [a, d, c]];
        let w = weld(&m, 1e-6);
        assert_eq!(w.triangles, vec![[0, 2, 1]]);
    }
}
