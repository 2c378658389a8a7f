//! Line numbers for TOML key paths, from the parser's spans.

use toml::de::{DeTable, DeValue};
use toml::Spanned;

/// One step of a key path: a key in a table or an entry (counted from 0) of an array.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Seg<'a> {
    Key(&'a str),
    Index(usize),
}

/// Renders a key path as `station[3].chord`; array entries are shown counted from 1.
pub(crate) fn render(path: &[Seg]) -> String {
    let mut s = String::new();
    for seg in path {
        match seg {
            Seg::Key(k) => {
                if !s.is_empty() {
                    s.push('.');
                }
                s.push_str(k);
            }
            Seg::Index(i) => s.push_str(&format!("[{}]", i + 1)),
        }
    }
    s
}

/// The parsed document with spans, for looking up where a key path is.
pub(crate) struct Spans<'a> {
    text: &'a str,
    root: Option<Spanned<DeTable<'a>>>,
}

impl<'a> Spans<'a> {
    /// Parses `text` (already known to be valid TOML; on failure no lines are given).
    pub fn new(text: &'a str) -> Self {
        Self {
            text,
            root: DeTable::parse(text).ok(),
        }
    }

    /// Line (from 1) of the deepest part of `path` found: the key's line for a key, the
    /// entry's first line for an array entry.
    pub fn line(&self, path: &[Seg]) -> Option<usize> {
        let root = self.root.as_ref()?;
        let mut table: Option<&DeTable> = Some(root.get_ref());
        let mut array: Option<&[Spanned<DeValue>]> = None;
        let mut at: Option<usize> = None;
        for seg in path {
            let value: &Spanned<DeValue> = match *seg {
                Seg::Key(k) => {
                    let (key, value) = table?.iter().find(|(key, _)| key.get_ref() == k)?;
                    at = Some(key.span().start);
                    value
                }
                Seg::Index(i) => {
                    let value = array?.get(i)?;
                    at = Some(value.span().start);
                    value
                }
            };
            table = value.get_ref().as_table();
            array = value.get_ref().as_array().map(|a| &**a);
        }
        let start = at?;
        Some(
            self.text[..start.min(self.text.len())]
                .matches('\n')
                .count()
                + 1,
        )
    }
}

/// Line (from 1) of a byte offset in `text`.
pub(crate) fn line_of(text: &str, offset: usize) -> usize {
    let end = offset.min(text.len());
    text.as_bytes()[..end]
        .iter()
        .filter(|b| **b == b'\n')
        .count()
        + 1
}
