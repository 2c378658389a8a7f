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
    let mut corners = topo.edges_of(triangles, &EdgeGroups::new(triangles, use_tri, nv), cap);
    topo.fans_of(triangles, use_tri, &mut corners, cap);
    debug_assert!(topo.vertices <= nv);
    topo
}

/// The directed edges grouped by undirected edge: for each vertex `a` (ascending), the
/// edges whose smaller end is `a`, as `(other end, corner 3 t + k of edge k -> k+1)`,
/// sorted, so the uses of one edge stand together. A counting sort on the smaller end
/// (`O(n)`, 8 bytes per directed edge) and a sort of each vertex's few edges; the
/// result does not depend on the thread count.
struct EdgeGroups {
    /// `start[a]..start[a + 1]` are vertex `a`'s records.
    start: Vec<u32>,
    rec: Vec<(u32, u32)>,
}

impl EdgeGroups {
    fn new(triangles: &[[u32; 3]], use_tri: &[u32], nv: usize) -> EdgeGroups {
        let ends = |t: u32, k: u32| {
            let tri = triangles[t as usize];
            let (a, b) = (tri[k as usize], tri[(k as usize + 1) % 3]);
            (a.min(b), a.max(b))
        };
        let mut start = vec![0u32; nv + 1];
        for &t in use_tri {
            for k in 0..3 {
                start[ends(t, k).0 as usize + 1] += 1;
            }
        }
        for a in 0..nv {
            start[a + 1] += start[a];
        }
        let mut fill = start.clone();
        let mut rec = vec![(0u32, 0u32); use_tri.len() * 3];
        for &t in use_tri {
            for k in 0..3 {
                let (a, b) = ends(t, k);
                rec[fill[a as usize] as usize] = (b, 3 * t + k);
                fill[a as usize] += 1;
            }
        }
        drop(fill);
        for a in 0..nv {
            rec[start[a] as usize..start[a + 1] as usize].sort_unstable();
        }
        EdgeGroups { start, rec }
    }

    /// Each undirected edge `[a, b]` (`a < b`) with its uses `(triangle, slot)`.
    fn each(&self, mut f: impl FnMut([u32; 2], &[(u32, u32)])) {
        for a in 0..self.start.len() - 1 {
            let group = &self.rec[self.start[a] as usize..self.start[a + 1] as usize];
            for run in runs(group, |r| r.0) {
                let uses = &group[run];
                f([a as u32, uses[0].0], uses);
            }
        }
    }
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
    fn edges_of(&mut self, triangles: &[[u32; 3]], groups: &EdgeGroups, cap: usize) -> Dsu {
        let mut corners = Dsu::new(triangles.len() * 3);
        let directed = |c: u32| {
            let (t, k) = ((c / 3) as usize, (c % 3) as usize);
            [triangles[t][k], triangles[t][(k + 1) % 3]]
        };
        groups.each(|edge, uses| {
            self.edges += 1;
            match uses {
                [(_, c)] => {
                    self.boundary.push(
                        EdgeUse {
                            edge: directed(*c),
                            triangles: vec![(c / 3) as usize],
                        },
                        cap,
                    );
                }
                [(_, c1), (_, c2)] => {
                    let (t1, t2) = (c1 / 3, c2 / 3);
                    let (e1, e2) = (directed(*c1), directed(*c2));
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
                        corners.union(corner(triangles, t1, v), corner(triangles, t2, v));
                    }
                }
                _ => {
                    self.overused.push(
                        EdgeUse {
                            edge,
                            triangles: uses.iter().map(|r| (r.1 / 3) as usize).collect(),
                        },
                        cap,
                    );
                }
            }
        });
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
