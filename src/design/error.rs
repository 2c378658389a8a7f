//! [`DesignError`]: every problem found in a design, each with its place.

use std::fmt;
use std::path::{Path, PathBuf};

/// One thing wrong with a design, with where it is and, when there is one, how to fix it.
///
/// Displayed as `file:line: key.path: message (hint)`; the line, the key path and the hint
/// are left out when unknown. CSV problems carry a line; TOML problems carry a key path such
/// as `station[3].chord` (entries counted from 1) and, when the file text is at hand, the
/// line too.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    /// The file the problem is in (`<design>` for text given without a file).
    pub file: PathBuf,
    /// Line in that file, counted from 1, when known.
    pub line: Option<usize>,
    /// Key path in a TOML file (`blade.stacking`, `station[2].chord`), when known.
    pub key: Option<String>,
    /// What is wrong, quoting the bad value.
    pub message: String,
    /// How to fix it, when there is a useful suggestion.
    pub hint: Option<String>,
}

impl Problem {
    /// A problem in `file` with no line or key yet.
    pub fn new(file: impl Into<PathBuf>, message: impl Into<String>) -> Self {
        Self {
            file: file.into(),
            line: None,
            key: None,
            message: message.into(),
            hint: None,
        }
    }

    /// Sets the line (counted from 1).
    pub fn line(mut self, line: Option<usize>) -> Self {
        self.line = line;
        self
    }

    /// Sets the key path.
    pub fn key(mut self, key: impl Into<String>) -> Self {
        self.key = Some(key.into());
        self
    }

    /// Sets the hint.
    pub fn hint(mut self, hint: impl Into<String>) -> Self {
        self.hint = Some(hint.into());
        self
    }

    /// Sets the hint when one is given.
    pub fn maybe_hint(mut self, hint: Option<String>) -> Self {
        if hint.is_some() {
            self.hint = hint;
        }
        self
    }
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file.display())?;
        if let Some(line) = self.line {
            write!(f, ":{line}")?;
        }
        // A message that opens with its key (`root.bore.depth = 12: ...`) names it already.
        if let Some(key) = self
            .key
            .as_ref()
            .filter(|k| !self.message.starts_with(k.as_str()))
        {
            write!(f, ": {key}")?;
        }
        write!(f, ": {}", self.message)?;
        if let Some(hint) = &self.hint {
            write!(f, " ({hint})")?;
        }
        Ok(())
    }
}

/// Why a design could not be read: every problem found, not only the first.
///
/// `Display` prints one problem per line (see [`Problem`]).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{}", list(.problems))]
pub struct DesignError {
    /// The problems, in the order they were found (file order within a file).
    pub problems: Vec<Problem>,
}

fn list(problems: &[Problem]) -> String {
    problems
        .iter()
        .map(ToString::to_string)
        .collect::<Vec<_>>()
        .join("\n")
}

impl DesignError {
    /// An error holding one problem.
    pub fn one(problem: Problem) -> Self {
        Self {
            problems: vec![problem],
        }
    }
}

impl From<Problem> for DesignError {
    fn from(problem: Problem) -> Self {
        Self::one(problem)
    }
}

/// Where a value sits: a file, maybe a line, maybe a key path. Used while reading to
/// stamp problems.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Loc {
    pub file: PathBuf,
    pub line: Option<usize>,
    pub key: Option<String>,
}

impl Loc {
    pub fn new(file: &Path, line: Option<usize>, key: Option<String>) -> Self {
        Self {
            file: file.to_path_buf(),
            line,
            key,
        }
    }

    /// A problem at this place.
    pub fn problem(&self, message: impl Into<String>) -> Problem {
        Problem {
            file: self.file.clone(),
            line: self.line,
            key: self.key.clone(),
            message: message.into(),
            hint: None,
        }
    }

    /// `file:line` or `file:line: key` or `file: key`, for [`super::Station::origin`].
    pub fn origin(&self) -> String {
        let mut s = self.file.display().to_string();
        if let Some(line) = self.line {
            s.push_str(&format!(":{line}"));
        }
        if let Some(key) = &self.key {
            s.push_str(&format!(": {key}"));
        }
        s
    }
}
