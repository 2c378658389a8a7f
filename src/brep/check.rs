//! Topology checks of a shell as a STEP file carries it (after reading it back): every
//! edge bounds exactly two faces, once in each sense. A reader that finds an edge used
//! once, or twice in the same sense, sees an open shell or a face turned inside out.

use truck_topology::compress::CompressedShell;

/// An edge of a read-back shell not used exactly twice in opposite senses.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct EdgeUse {
    /// The edge's index in the shell.
    pub edge: usize,
    /// Every use: the face's index and whether the face runs along the edge's curve.
    pub uses: Vec<(usize, bool)>,
}

impl std::fmt::Display for EdgeUse {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let uses: Vec<String> = self
            .uses
            .iter()
            .map(|(face, along)| {
                format!("face {face} {}", if *along { "along" } else { "against" })
            })
            .collect();
        write!(
            f,
            "edge {} is used {} time(s) ({}); a closed shell uses it twice, once each way",
            self.edge,
            self.uses.len(),
            uses.join(", ")
        )
    }
}

/// The edges of `shell` not used exactly twice in opposite senses (empty for a closed,
/// consistently oriented shell). A face's loops count in the face's own sense: reversed
/// when the face is reversed against its surface.
pub fn edge_uses<P, C, S>(shell: &CompressedShell<P, C, S>) -> Vec<EdgeUse> {
    let mut uses: Vec<Vec<(usize, bool)>> = vec![Vec::new(); shell.edges.len()];
    for (f, face) in shell.faces.iter().enumerate() {
        for boundary in &face.boundaries {
            for e in boundary {
                if let Some(u) = uses.get_mut(e.index) {
                    u.push((f, e.orientation == face.orientation));
                }
            }
        }
    }
    uses.into_iter()
        .enumerate()
        .filter(|(_, u)| !(u.len() == 2 && u[0].1 != u[1].1))
        .map(|(edge, uses)| EdgeUse { edge, uses })
        .collect()
}
