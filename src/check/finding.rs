//! One failed check, with the offending items.

use super::grade::Grade;
use serde::Serialize;
use std::fmt;

/// A capped list: the first items found (at most [`super::CheckOptions::max_listed`]) and
/// the complete count.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Listed<T> {
    /// How many items failed in all.
    pub count: usize,
    /// The first of them, at most the cap.
    pub items: Vec<T>,
}

impl<T> Listed<T> {
    /// An empty list.
    pub fn new() -> Self {
        Listed {
            count: 0,
            items: Vec::new(),
        }
    }

    /// Counts `item` and keeps it when fewer than `cap` items are kept.
    pub fn push(&mut self, item: T, cap: usize) {
        self.count += 1;
        if self.items.len() < cap {
            self.items.push(item);
        }
    }

    /// Adds the count and the kept items of `later` (found after this list's), keeping
    /// at most `cap` items.
    pub fn append(&mut self, later: Listed<T>, cap: usize) {
        self.count += later.count;
        let room = cap.saturating_sub(self.items.len());
        self.items.extend(later.items.into_iter().take(room));
    }

    /// True when nothing was counted.
    pub fn is_empty(&self) -> bool {
        self.count == 0
    }
}

impl<T> Default for Listed<T> {
    fn default() -> Self {
        Self::new()
    }
}

/// An edge and the triangles that use it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct EdgeUse {
    /// Vertex indices; directed as the triangles run it where the direction matters
    /// (boundary edges, same-direction pairs), else smaller index first.
    pub edge: [u32; 2],
    /// Indices of the triangles using the edge.
    pub triangles: Vec<usize>,
}

/// A vertex whose triangles form more than one fan.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct VertexFans {
    /// Vertex index.
    pub vertex: u32,
    /// Number of separate fans of triangles around it (a manifold vertex has one).
    pub fans: usize,
}

/// One failed check. Each variant names the offending items.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "check", rename_all = "kebab-case")]
pub enum Finding {
    /// The mesh has no triangles.
    Empty,
    /// Vertices with a coordinate that is NaN or infinite.
    NonFinite(Listed<u32>),
    /// Triangles referring to a vertex index at or beyond `vertex_count`.
    IndexOutOfRange {
        /// Number of vertices in the mesh.
        vertex_count: usize,
        /// The offending triangles.
        triangles: Listed<usize>,
    },
    /// Triangles naming the same vertex twice.
    RepeatedIndex(Listed<usize>),
    /// Edges used by more than two triangles.
    OverusedEdges(Listed<EdgeUse>),
    /// Vertices whose triangles form several fans (e.g. two solids touching at a point).
    NonManifoldVertices(Listed<VertexFans>),
    /// Pairs of neighbouring triangles that run their shared edge the same way.
    SameDirection(Listed<EdgeUse>),
    /// Edges used by one triangle only (holes in the surface).
    BoundaryEdges(Listed<EdgeUse>),
    /// Triangles with (near) zero area.
    Degenerate {
        /// The area threshold used, mm².
        threshold: f64,
        /// The offending triangles.
        triangles: Listed<usize>,
    },
    /// The closed mesh encloses a negative volume: it faces inward.
    InsideOut {
        /// Signed volume, mm³.
        volume: f64,
    },
    /// The closed mesh encloses no volume (a flat or self-cancelling surface).
    ZeroVolume {
        /// Signed volume, mm³.
        volume: f64,
    },
    /// More than one connected component.
    Components {
        /// Triangle counts of the components, in order of their first triangle.
        sizes: Listed<usize>,
    },
    /// The genus of the closed surface is not the one expected.
    Genus {
        /// Genus found (number of through-holes).
        genus: u32,
        /// Genus expected.
        expected: u32,
    },
    /// Pairs of triangles that cross or touch away from shared edges and vertices.
    SelfIntersection(Listed<[usize; 2]>),
}

impl Finding {
    /// The grade this finding limits the mesh to.
    pub fn grade(&self) -> Grade {
        match self {
            Finding::Empty
            | Finding::NonFinite(_)
            | Finding::IndexOutOfRange { .. }
            | Finding::RepeatedIndex(_) => Grade::Broken,
            Finding::OverusedEdges(_) | Finding::NonManifoldVertices(_) => Grade::NonManifold,
            Finding::SameDirection(_) => Grade::Inconsistent,
            Finding::BoundaryEdges(_) => Grade::Open,
            Finding::Degenerate { .. }
            | Finding::InsideOut { .. }
            | Finding::ZeroVolume { .. }
            | Finding::Components { .. }
            | Finding::Genus { .. }
            | Finding::SelfIntersection(_) => Grade::Closed,
        }
    }
}

/// Writes `items` joined by `sep`, then "(and N more)" when the list was capped.
fn list<T>(
    f: &mut fmt::Formatter<'_>,
    l: &Listed<T>,
    sep: &str,
    each: impl Fn(&mut fmt::Formatter<'_>, &T) -> fmt::Result,
) -> fmt::Result {
    for (i, it) in l.items.iter().enumerate() {
        if i > 0 {
            f.write_str(sep)?;
        }
        each(f, it)?;
    }
    if l.count > l.items.len() {
        write!(f, " (and {} more)", l.count - l.items.len())?;
    }
    Ok(())
}

impl fmt::Display for Finding {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        const VERTEX: (&str, &str) = ("vertex", "vertices");
        const TRIANGLE: (&str, &str) = ("triangle", "triangles");
        match self {
            Finding::Empty => f.write_str("broken: the mesh has no triangles"),
            Finding::NonFinite(l) => {
                counted(f, "broken: ", l.count, VERTEX)?;
                f.write_str(" with a NaN or infinite coordinate: ")?;
                list(f, l, ", ", |f, v| write!(f, "{v}"))
            }
            Finding::IndexOutOfRange {
                vertex_count,
                triangles,
            } => {
                counted(f, "broken: ", triangles.count, TRIANGLE)?;
                write!(
                    f,
                    " name a vertex index >= {vertex_count} (the vertex count): "
                )?;
                list(f, triangles, ", ", |f, t| write!(f, "{t}"))
            }
            Finding::RepeatedIndex(l) => {
                counted(f, "broken: ", l.count, TRIANGLE)?;
                f.write_str(" name the same vertex twice (drop them, e.g. with check::weld): ")?;
                list(f, l, ", ", |f, t| write!(f, "{t}"))
            }
            Finding::OverusedEdges(l) => {
                counted(f, "non-manifold: ", l.count, ("edge", "edges"))?;
                f.write_str(" used by more than two triangles: ")?;
                list(f, l, "; ", |f, e| {
                    write!(f, "edge ({}, {}) by triangles ", e.edge[0], e.edge[1])?;
                    join(f, &e.triangles)
                })
            }
            Finding::NonManifoldVertices(l) => {
                counted(f, "non-manifold: ", l.count, VERTEX)?;
                f.write_str(" where separate fans of triangles meet at one point: ")?;
                list(f, l, "; ", |f, v| {
                    write!(f, "vertex {} joins {} fans", v.vertex, v.fans)
                })
            }
            Finding::SameDirection(l) => {
                counted(f, "inconsistent orientation: ", l.count, ("pair", "pairs"))?;
                f.write_str(" of neighbours run their shared edge the same way (neighbours must run it in opposite directions; reverse the wrong triangle): ")?;
                list(f, l, "; ", |f, e| {
                    write!(f, "triangles ")?;
                    join(f, &e.triangles)?;
                    write!(f, " both run edge {} -> {}", e.edge[0], e.edge[1])
                })
            }
            Finding::BoundaryEdges(l) => {
                counted(f, "open: ", l.count, ("boundary edge", "boundary edges"))?;
                f.write_str(" used by one triangle only (close the hole, or weld coincident vertices with check::weld): ")?;
                list(f, l, "; ", |f, e| {
                    write!(f, "edge {} -> {} of triangle ", e.edge[0], e.edge[1])?;
                    join(f, &e.triangles)
                })
            }
            Finding::Degenerate {
                threshold,
                triangles,
            } => {
                counted(f, "degenerate: ", triangles.count, TRIANGLE)?;
                write!(
                    f,
                    " with area below {threshold:.3e} mm² (collinear or coincident corners): "
                )?;
                list(f, triangles, ", ", |f, t| write!(f, "{t}"))
            }
            Finding::InsideOut { volume } => write!(
                f,
                "inside-out: the closed mesh encloses {volume:.6} mm³ (negative: the triangles face inward; reverse every triangle)"
            ),
            Finding::ZeroVolume { volume } => write!(
                f,
                "no volume: the closed mesh encloses {volume:.3e} mm³ (a flat or self-cancelling surface)"
            ),
            Finding::Components { sizes } => {
                write!(
                    f,
                    "several components: {} separate pieces (a part must be one piece); triangles per piece: ",
                    sizes.count
                )?;
                list(f, sizes, ", ", |f, s| write!(f, "{s}"))
            }
            Finding::Genus { genus, expected } => write!(
                f,
                "genus {genus} (through-holes), expected {expected}"
            ),
            Finding::SelfIntersection(l) => {
                counted(
                    f,
                    "self-intersection: ",
                    l.count,
                    ("triangle pair", "triangle pairs"),
                )?;
                f.write_str(" cross or touch away from shared edges and vertices: ")?;
                list(f, l, ", ", |f, p| write!(f, "({}, {})", p[0], p[1]))
            }
        }
    }
}

/// Writes `<prefix><count> <noun>`, the noun singular (`one`) or plural (`many`).
fn counted(
    f: &mut fmt::Formatter<'_>,
    prefix: &str,
    count: usize,
    (one, many): (&str, &str),
) -> fmt::Result {
    write!(f, "{prefix}{count} {}", if count == 1 { one } else { many })
}

/// Writes "a", "a and b" or "a, b and c".
fn join(f: &mut fmt::Formatter<'_>, items: &[usize]) -> fmt::Result {
    for (i, t) in items.iter().enumerate() {
        if i > 0 {
            f.write_str(if i + 1 == items.len() { " and " } else { ", " })?;
        }
        write!(f, "{t}")?;
    }
    Ok(())
}
