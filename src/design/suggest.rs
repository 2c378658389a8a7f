//! "Did you mean ...?" suggestions for mistyped keys, column names and options.

/// The candidate closest to `word` by edit distance (Levenshtein, case-insensitive), when
/// it is close enough to be a likely typo: at most 2 edits, and fewer than half the
/// letters of the word.
pub fn closest<'a>(word: &str, candidates: &[&'a str]) -> Option<&'a str> {
    let w = word.to_lowercase();
    candidates
        .iter()
        .map(|c| (distance(&w, &c.to_lowercase()), *c))
        .filter(|(d, _)| *d <= 2 && 2 * *d < w.chars().count().max(1))
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

/// A hint: `did you mean 'x'?` when one candidate is close, else `expected one of: a, b`.
pub fn hint(word: &str, candidates: &[&str]) -> String {
    match closest(word, candidates) {
        Some(c) => format!("did you mean '{c}'?"),
        None => format!("expected one of: {}", candidates.join(", ")),
    }
}

/// Levenshtein distance (insertions, deletions, substitutions) between two strings,
/// by the classic two-row dynamic programme.
fn distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    let mut cur = vec![0; b.len() + 1];
    for (i, ca) in a.chars().enumerate() {
        cur[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur[j + 1] = sub.min(prev[j + 1] + 1).min(cur[j] + 1);
        }
        std::mem::swap(&mut prev, &mut cur);
    }
    prev[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edit_distance() {
        // The textbook example kitten -> sitting needs 3 edits (from memory; the
        // Levenshtein distance is commonly illustrated with it).
        assert_eq!(distance("kitten", "sitting"), 3);
        assert_eq!(distance("", "abc"), 3);
        assert_eq!(distance("chord", "chord"), 0);
    }

    #[test]
    fn suggestions() {
        let keys = ["radius", "chord", "twist", "section"];
        assert_eq!(closest("chrod", &keys), Some("chord"));
        assert_eq!(closest("Radious", &keys), Some("radius"));
        assert_eq!(closest("xyz", &keys), None);
        assert!(hint("zzz", &keys).contains("one of"));
    }
}
