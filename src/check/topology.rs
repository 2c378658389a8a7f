//! Edge use, orientation, vertex fans and the Euler characteristic of a triangle mesh.

use super::finding::{EdgeUse, Listed, VertexFans};

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
///
/// Vertex by vertex: each vertex's corners (listed by a counting sort, `O(n)`) give its
/// edges (an edge is counted at its smaller end) and its fans (corners joined across the
/// edges used exactly twice; a small union-find per vertex). Vertices are analysed in
/// parallel in fixed chunks and the findings merged in vertex order, so the result does
/// not depend on the thread count: edges listed by smaller end, then larger end.
pub(crate) fn analyse(triangles: &[[u32; 3]], use_tri: &[u32], nv: usize, cap: usize) -> Topology {
    use rayon::prelude::*;
    const CHUNK: usize = 4096;
    let at = VertexCorners::new(triangles, use_tri, nv);
    let parts: Vec<Topology> = (0..nv.div_ceil(CHUNK))
        .into_par_iter()
        .map(|c| {
            let mut part = Topology::default();
            let mut local = Local::default();
            for v in c * CHUNK..((c + 1) * CHUNK).min(nv) {
                part.vertex(triangles, v as u32, at.of(v), cap, &mut local);
            }
            part
        })
        .collect();
    let mut topo = Topology {
        faces: use_tri.len(),
        ..Topology::default()
    };
    for p in parts {
        topo.edges += p.edges;
        topo.vertices += p.vertices;
        topo.boundary.append(p.boundary, cap);
        topo.overused.append(p.overused, cap);
        topo.same_direction.append(p.same_direction, cap);
        topo.fans.append(p.fans, cap);
    }
    debug_assert!(topo.vertices <= nv);
    topo
}

/// The corners `3 t + k` at each vertex, ascending: a counting sort on the vertex.
struct VertexCorners {
    /// `start[v]..start[v + 1]` are vertex `v`'s corners.
    start: Vec<u32>,
    corners: Vec<u32>,
}

impl VertexCorners {
    fn new(triangles: &[[u32; 3]], use_tri: &[u32], nv: usize) -> VertexCorners {
        let mut start = vec![0u32; nv + 1];
        for &t in use_tri {
            for v in triangles[t as usize] {
                start[v as usize + 1] += 1;
            }
        }
        for a in 0..nv {
            start[a + 1] += start[a];
        }
        let mut fill = start.clone();
        let mut corners = vec![0u32; use_tri.len() * 3];
        for &t in use_tri {
            for (k, v) in triangles[t as usize].iter().enumerate() {
                corners[fill[*v as usize] as usize] = 3 * t + k as u32;
                fill[*v as usize] += 1;
            }
        }
        VertexCorners { start, corners }
    }

    fn of(&self, v: usize) -> &[u32] {
        &self.corners[self.start[v] as usize..self.start[v + 1] as usize]
    }
}

/// Buffers reused from vertex to vertex.
#[derive(Default)]
struct Local {
    /// `(other end, triangle, local corner, leaves the vertex)` per edge use at the vertex.
    uses: Vec<(u32, u32, u32, bool)>,
    /// Union-find over the vertex's corners.
    parent: Vec<u32>,
}

impl Local {
    fn find(&mut self, mut x: u32) -> u32 {
        while self.parent[x as usize] != x {
            let p = self.parent[x as usize];
            self.parent[x as usize] = self.parent[p as usize];
            x = p;
        }
        x
    }
}

impl Topology {
    /// Vertex `v` with its `corners`: counts it, its edges to larger vertices (listing
    /// those used once, more than twice, or twice in the same direction) and its fans
    /// (listed when more than one).
    fn vertex(
        &mut self,
        triangles: &[[u32; 3]],
        v: u32,
        corners: &[u32],
        cap: usize,
        l: &mut Local,
    ) {
        if corners.is_empty() {
            return;
        }
        self.vertices += 1;
        l.uses.clear();
        for (x, &c) in corners.iter().enumerate() {
            let (t, k) = (c / 3, (c % 3) as usize);
            let tri = triangles[t as usize];
            l.uses.push((tri[(k + 1) % 3], t, x as u32, true));
            l.uses.push((tri[(k + 2) % 3], t, x as u32, false));
        }
        l.uses.sort_unstable();
        l.parent.clear();
        l.parent.extend(0..corners.len() as u32);
        let mut i = 0;
        while i < l.uses.len() {
            let w = l.uses[i].0;
            let mut j = i + 1;
            while j < l.uses.len() && l.uses[j].0 == w {
                j += 1;
            }
            if j - i == 2 {
                let (a, b) = (l.uses[i].2, l.uses[i + 1].2);
                let (a, b) = (l.find(a), l.find(b));
                l.parent[a as usize] = b;
            }
            if w > v {
                self.edge(v, &l.uses[i..j], cap);
            }
            i = j;
        }
        let roots = (0..corners.len() as u32)
            .filter(|&x| l.find(x) == x)
            .count();
        if roots > 1 {
            self.fans.push(
                VertexFans {
                    vertex: v,
                    fans: roots,
                },
                cap,
            );
        }
    }

    /// The edge from `v` to a larger vertex with its `uses` (sorted by triangle).
    fn edge(&mut self, v: u32, uses: &[(u32, u32, u32, bool)], cap: usize) {
        self.edges += 1;
        let directed = |u: &(u32, u32, u32, bool)| if u.3 { [v, u.0] } else { [u.0, v] };
        match uses {
            [u] => self.boundary.push(
                EdgeUse {
                    edge: directed(u),
                    triangles: vec![u.1 as usize],
                },
                cap,
            ),
            [u1, u2] => {
                if u1.3 == u2.3 {
                    self.same_direction.push(
                        EdgeUse {
                            edge: directed(u1),
                            triangles: vec![u1.1 as usize, u2.1 as usize],
                        },
                        cap,
                    );
                }
            }
            _ => self.overused.push(
                EdgeUse {
                    edge: [v, uses[0].0],
                    triangles: uses.iter().map(|u| u.1 as usize).collect(),
                },
                cap,
            ),
        }
    }
}
