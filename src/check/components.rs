//! Connected components of a triangle mesh.

use crate::mesh::TriMesh;

/// Disjoint sets with path halving and union by size.
#[derive(Debug, Clone)]
pub(crate) struct Dsu {
    parent: Vec<u32>,
    size: Vec<u32>,
}

impl Dsu {
    /// `n` singleton sets.
    pub(crate) fn new(n: usize) -> Self {
        Dsu {
            parent: (0..n as u32).collect(),
            size: vec![1; n],
        }
    }

    /// The representative of `x`'s set.
    pub(crate) fn find(&mut self, mut x: u32) -> u32 {
        while self.parent[x as usize] != x {
            let p = self.parent[x as usize];
            self.parent[x as usize] = self.parent[p as usize];
            x = p;
        }
        x
    }

    /// Joins the sets of `a` and `b`.
    pub(crate) fn union(&mut self, a: u32, b: u32) {
        let (mut a, mut b) = (self.find(a), self.find(b));
        if a == b {
            return;
        }
        if self.size[a as usize] < self.size[b as usize] {
            std::mem::swap(&mut a, &mut b);
        }
        self.parent[b as usize] = a;
        self.size[a as usize] += self.size[b as usize];
    }
}

/// The connected components of `mesh`: triangle indices grouped so that two triangles
/// sharing a vertex index are in the same group. Groups are ordered by their smallest
/// triangle index, and each group lists its triangles in increasing order. Triangles with
/// a vertex index out of range form groups of their own.
pub fn components(mesh: &TriMesh) -> Vec<Vec<usize>> {
    let label = Labels::of(mesh);
    let mut groups: Vec<Vec<usize>> = vec![Vec::new(); label.count];
    for (t, &g) in label.of_triangle.iter().enumerate() {
        groups[g as usize].push(t);
    }
    groups
}

/// The number of triangles in each connected component, in the order of
/// [`components`].
pub(crate) fn component_sizes(mesh: &TriMesh) -> Vec<usize> {
    let label = Labels::of(mesh);
    let mut sizes = vec![0; label.count];
    for &g in &label.of_triangle {
        sizes[g as usize] += 1;
    }
    sizes
}

/// Each triangle's component, numbered in order of first appearance.
struct Labels {
    of_triangle: Vec<u32>,
    count: usize,
}

impl Labels {
    fn of(mesh: &TriMesh) -> Labels {
        let nv = mesh.vertices.len();
        let mut dsu = Dsu::new(nv);
        let valid = |t: &[u32; 3]| t.iter().all(|&i| (i as usize) < nv);
        for t in mesh.triangles.iter().filter(|t| valid(t)) {
            dsu.union(t[0], t[1]);
            dsu.union(t[0], t[2]);
        }
        // Component id of each root, in order of first appearance.
        let mut id = vec![u32::MAX; nv];
        let mut count = 0u32;
        let of_triangle = mesh
            .triangles
            .iter()
            .map(|t| {
                if !valid(t) {
                    count += 1;
                    return count - 1;
                }
                let r = dsu.find(t[0]) as usize;
                if id[r] == u32::MAX {
                    id[r] = count;
                    count += 1;
                }
                id[r]
            })
            .collect();
        Labels {
            of_triangle,
            count: count as usize,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::tests::box_mesh;
    use nalgebra::Vector3;

    #[test]
    fn two_boxes_are_two_components() {
        // Common practice: disjoint vertex sets give separate components.
        let mut m = box_mesh(Vector3::new(1.0, 1.0, 1.0));
        let mut other = box_mesh(Vector3::new(1.0, 2.0, 3.0));
        other.translate(Vector3::new(5.0, 0.0, 0.0));
        m.append(&other);
        let c = components(&m);
        assert_eq!(c.len(), 2);
        assert_eq!(c[0], (0..12).collect::<Vec<_>>());
        assert_eq!(c[1], (12..24).collect::<Vec<_>>());
    }
}
