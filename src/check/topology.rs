//! Edge use, orientation, vertex fans and the Euler characteristic of a triangle mesh.

use super::components::Dsu;
use super::finding::{EdgeUse, Listed, VertexFans};
use rayon::slice::ParallelSliceMut;

/// What the edge and fan analysis found.
#[derive(Debug, Clone, Default)]
pub(crate) struct Topology {
    /// Distinct edges.
    pub edges: usize,
    /// Distinct vertices used by the analysed triangles.
    pub vertices: usize,
    /// Triangles analysed.
    pub faces: usize,
    /// Edges used once, directed as their triangle runs them.
    pub boundary: Listed<EdgeUse>,
    /// Edges used more than twice.
    pub overused: Listed<EdgeUse>,
    /// Edges used twice in the same direction.
    pub same_direction: Listed<EdgeUse>,
    /// Vertices with more than one fan.
    pub fans: Listed<VertexFans>,
}

impl Topology {
    /// V - E + F.
    pub fn euler(&self) -> i64 {
        self.vertices as i64 - self.edges as i64 + self.faces as i64
    }

    /// True when every edge is used by exactly two triangles and every vertex has one fan.
    pub fn closed_manifold(&self) -> bool {
        self.boundary.is_empty() && self.overused.is_empty() && self.fans.is_empty()
    }
}

/// Analyses `triangles[t]` for the `t` in `use_tri` (indices already known to be in range
/// and distinct within each triangle). `nv` is the vertex count, `cap` the list cap.
pub(crate) fn analyse(triangles: &[[u32; 3]], use_tri: &[u32], nv: usize, cap: usize) -> Topology {
    let mut topo = Topology {
        faces: use_tri.len(),
        ..Topology::default()
    };
    let mut corners = topo.edges_of(triangles, &directed_edges(triangles, use_tri), cap);
    topo.fans_of(triangles, use_tri, &mut corners, cap);
    debug_assert!(topo.vertices <= nv);
    topo
}

/// One record per directed edge: (undirected key, triangle, slot k of edge k -> k+1),
/// sorted so the uses of one edge stand together.
fn directed_edges(triangles: &[[u32; 3]], use_tri: &[u32]) -> Vec<(u64, u32, u8)> {
    let mut rec: Vec<(u64, u32, u8)> = Vec::with_capacity(use_tri.len() * 3);
    for &t in use_tri {
        let tri = triangles[t as usize];
        for k in 0..3u8 {
            let (a, b) = (tri[k as usize], tri[(k as usize + 1) % 3]);
            let key = ((a.min(b) as u64) << 32) | a.max(b) as u64;
            rec.push((key, t, k));
        }
    }
    // Parallel sort: the records are distinct, so the order is the same on any thread count.
    rec.par_sort_unstable();
    rec
}

/// The runs of equal keys in a sorted list, as index ranges.
fn runs<'a, T, K: PartialEq + 'a>(
    sorted: &'a [T],
    key: impl Fn(&T) -> K + 'a,
) -> impl Iterator<Item = std::ops::Range<usize>> + 'a {
    let mut i = 0;
    std::iter::from_fn(move || {
        if i >= sorted.len() {
            return None;
        }
        let mut j = i + 1;
        while j < sorted.len() && key(&sorted[j]) == key(&sorted[i]) {
            j += 1;
        }
        let run = i..j;
        i = j;
        Some(run)
    })
}

impl Topology {
    /// Counts the edges and lists those used once, more than twice, or twice in the
    /// same direction. Returns the corners (3 t + k) joined across each edge used
    /// exactly twice: the corners of one vertex that end in the same set form one fan.
    fn edges_of(&mut self, triangles: &[[u32; 3]], rec: &[(u64, u32, u8)], cap: usize) -> Dsu {
        let mut corners = Dsu::new(triangles.len() * 3);
        let directed = |t: u32, k: u8| {
            let tri = triangles[t as usize];
            [tri[k as usize], tri[(k as usize + 1) % 3]]
        };
        for run in runs(rec, |r| r.0) {
            self.edges += 1;
            let group = &rec[run];
            match group.len() {
                1 => {
                    let (_, t, k) = group[0];
                    self.boundary.push(
                        EdgeUse {
                            edge: directed(t, k),
                            triangles: vec![t as usize],
                        },
                        cap,
                    );
                }
                2 => {
                    let (_, t1, k1) = group[0];
                    let (_, t2, k2) = group[1];
                    let (e1, e2) = (directed(t1, k1), directed(t2, k2));
                    if e1 == e2 {
                        self.same_direction.push(
                            EdgeUse {
                                edge: e1,
                                triangles: vec![t1 as usize, t2 as usize],
                            },
                            cap,
                        );
                    }
                    for v in e1 {
                        let c1 = corner(triangles, t1, v);
                        let c2 = corner(triangles, t2, v);
                        corners.union(c1, c2);
                    }
                }
                _ => {
                    let key = group[0].0;
                    self.overused.push(
                        EdgeUse {
                            edge: [(key >> 32) as u32, key as u32],
                            triangles: group.iter().map(|r| r.1 as usize).collect(),
                        },
                        cap,
                    );
                }
            }
        }
        corners
    }

    /// Counts the vertices and lists those with more than one fan: distinct corner sets
    /// among the vertex's corners.
    fn fans_of(&mut self, triangles: &[[u32; 3]], use_tri: &[u32], corners: &mut Dsu, cap: usize) {
        let mut vc: Vec<(u32, u32)> = Vec::with_capacity(use_tri.len() * 3);
        for &t in use_tri {
            for k in 0..3 {
                let c = 3 * t + k;
                vc.push((triangles[t as usize][k as usize], corners.find(c)));
            }
        }
        vc.par_sort_unstable();
        vc.dedup();
        for run in runs(&vc, |x| x.0) {
            self.vertices += 1;
            if run.len() > 1 {
                self.fans.push(
                    VertexFans {
                        vertex: vc[run.start].0,
                        fans: run.len(),
                    },
                    cap,
                );
            }
        }
    }
}

/// The corner id (3 t + k) of vertex `v` in triangle `t`.
fn corner(triangles: &[[u32; 3]], t: u32, v: u32) -> u32 {
    let k = triangles[t as usize]
        .iter()
        .position(|&x| x == v)
        .unwrap_or(0);
    3 * t + k as u32
}
