//! Graded remarks on a drafted design: notes, cautions and warnings naming the stations
//! they concern.

use std::fmt;

/// How much a remark matters, from least to most.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Severity {
    /// Worth knowing; the design is usual.
    Note,
    /// Bears on safety or on how the design is used; read before building.
    Caution,
    /// The design leaves the range where the method or common practice holds.
    Warning,
}

impl fmt::Display for Severity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Severity::Note => "note",
            Severity::Caution => "caution",
            Severity::Warning => "warning",
        })
    }
}

/// One remark on a drafted design.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Remark {
    /// How much it matters.
    #[serde(rename = "grade")]
    pub severity: Severity,
    /// What is remarked and what to do about it.
    pub message: String,
    /// Indices (from 0, root first) of the stations concerned; empty when the remark is
    /// about the whole design.
    pub stations: Vec<usize>,
}

impl Remark {
    /// A remark about the whole design.
    pub fn new(severity: Severity, message: impl Into<String>) -> Self {
        Self {
            severity,
            message: message.into(),
            stations: Vec::new(),
        }
    }

    /// A remark about the given stations.
    pub fn at(severity: Severity, message: impl Into<String>, stations: Vec<usize>) -> Self {
        Self {
            severity,
            message: message.into(),
            stations,
        }
    }
}

impl fmt::Display for Remark {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.severity, self.message)?;
        if !self.stations.is_empty() {
            write!(f, " (stations {})", index_list(&self.stations))?;
        }
        Ok(())
    }
}

/// Formats station indices compactly: `0-3, 7, 9-10`.
pub fn index_list(indices: &[usize]) -> String {
    let mut parts = Vec::new();
    let mut i = 0;
    while i < indices.len() {
        let start = indices[i];
        let mut end = start;
        while i + 1 < indices.len() && indices[i + 1] == end + 1 {
            i += 1;
            end = indices[i];
        }
        parts.push(if end == start {
            start.to_string()
        } else {
            format!("{start}-{end}")
        });
        i += 1;
    }
    parts.join(", ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_are_compact() {
        assert_eq!(index_list(&[0, 1, 2, 5, 7, 8]), "0-2, 5, 7-8");
        assert_eq!(index_list(&[]), "");
    }
}
