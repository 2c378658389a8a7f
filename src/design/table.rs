//! [`Design::table`]: reading an optional table of a later stage, with errors that name
//! the file and the key path.

use std::path::Path;

use super::error::{DesignError, Problem};
use super::spans::{Seg, Spans};
use super::suggest;
use super::{Design, NO_FILE};

/// Rewords serde's messages for people writing design files, with a hint where one
/// helps: `invalid type: string "x", expected f64` becomes `expected a number, found
/// string "x"`; `unknown field `shank-diametr`, expected one of ...` becomes `unknown key
/// 'shank-diametr'` with "did you mean 'shank-diameter'?"; `unknown variant` and `missing
/// field` likewise.
fn reword(message: &str) -> (String, Option<String>) {
    if let Some(rest) = message.strip_prefix("invalid type: ") {
        if let Some((found, expected)) = rest.split_once(", expected ") {
            let expected = match expected {
                "f64" | "f32" | "a float" => "a number",
                "i8" | "i16" | "i32" | "i64" | "u8" | "u16" | "u32" | "u64" | "usize" | "isize"
                | "an integer" => "a whole number",
                "a boolean" | "bool" => "true or false",
                other => other,
            };
            let found = match found {
                "sequence" => "an array",
                "map" => "a table",
                other => other,
            };
            return (format!("expected {expected}, found {found}"), None);
        }
    }
    for (prefix, what) in [("unknown field `", "key"), ("unknown variant `", "value")] {
        if let Some(rest) = message.strip_prefix(prefix) {
            if let Some((word, expected)) = rest.split_once('`') {
                let known: Vec<&str> = expected.split('`').skip(1).step_by(2).collect();
                let hint = (!known.is_empty()).then(|| suggest::hint(word, &known));
                return (format!("unknown {what} '{word}'"), hint);
            }
        }
    }
    if let Some(rest) = message.strip_prefix("missing field `") {
        let key = rest.split('`').next().unwrap_or(rest);
        return (
            format!("missing key '{key}'"),
            Some(format!("add {key} = <value>")),
        );
    }
    (message.to_string(), None)
}

/// A table of a later stage whose lengths are written in the design file's length unit.
/// [`Design::table_mm`] reads such a table and converts it in one step: the one way a
/// length from a design file becomes millimetres.
pub trait Lengths: Sized {
    /// Every length multiplied by `k` (file unit to mm); angles and counts unchanged.
    fn to_mm(self, k: f64) -> Self;
}

impl Design {
    /// Reads the optional table `key` (see [`Design::table`]) and converts its lengths to
    /// millimetres.
    ///
    /// # Errors
    /// As [`Design::table`].
    pub fn table_mm<T: serde::de::DeserializeOwned + Lengths>(
        &self,
        key: &str,
    ) -> Result<Option<T>, DesignError> {
        Ok(self.table::<T>(key)?.map(|t| t.to_mm(self.length_to_mm)))
    }

    /// The file messages about this design name (`<design>` without a file).
    pub fn file(&self) -> &Path {
        self.source.as_deref().unwrap_or(Path::new(NO_FILE))
    }

    /// A problem at a key path of this design's file (for later stages validating their
    /// own tables), with the line when the file can be read again to find it.
    pub fn problem(&self, key: &str, message: impl Into<String>) -> Problem {
        Problem::new(self.file(), message)
            .key(key)
            .line(self.line_of(key))
    }

    /// Line of a dotted key path in the source file, when it is a TOML file that can be
    /// read (best effort, for messages only).
    fn line_of(&self, key: &str) -> Option<usize> {
        let src = self.source.as_deref()?;
        let is_toml = src
            .extension()
            .is_some_and(|e| e.eq_ignore_ascii_case("toml"));
        if !is_toml {
            return None;
        }
        let text = std::fs::read_to_string(src).ok()?;
        let spans = Spans::new(&text);
        let segs: Vec<Seg> = key.split('.').map(Seg::Key).collect();
        // The deepest prefix found.
        (1..=segs.len()).rev().find_map(|n| spans.line(&segs[..n]))
    }

    /// Deserialises the optional top-level table `key` (e.g. `"rotor"`) for a later stage.
    ///
    /// `Ok(None)` when the design has no such table. Errors name the file and the key path,
    /// e.g. `turbine.toml:12: root.bore-diameter: expected a number, found string "8"`.
    /// Lengths in the table are in the file's length unit: convert them with
    /// [`Design::table_mm`] (implement [`Lengths`]). Use `#[serde(deny_unknown_fields,
    /// rename_all = "kebab-case")]` on `T` so typos are reported with the known keys.
    pub fn table<T: serde::de::DeserializeOwned>(
        &self,
        key: &str,
    ) -> Result<Option<T>, DesignError> {
        let Some(value) = self.tables.get(key) else {
            return Ok(None);
        };
        value.clone().try_into::<T>().map(Some).map_err(|e| {
            // The toml crate's message ends with "in `a.b`" when the error is below the
            // table itself.
            let shown = e.to_string();
            let inner = shown
                .lines()
                .find_map(|l| l.strip_prefix("in `").and_then(|l| l.strip_suffix('`')));
            let mut path = key.to_string();
            if let Some(inner) = inner.filter(|s| !s.is_empty()) {
                path.push('.');
                path.push_str(inner);
            } else if let Some(field) = e
                .message()
                .strip_prefix("unknown field `")
                .and_then(|m| m.split('`').next())
            {
                path.push('.');
                path.push_str(field);
            }
            let (message, hint) = reword(e.message());
            DesignError::one(self.problem(&path, message).maybe_hint(hint))
        })
    }
}

#[cfg(test)]
mod tests {
    use super::reword;

    #[test]
    fn rewording() {
        assert_eq!(
            reword("invalid type: string \"x\", expected f64").0,
            "expected a number, found string \"x\""
        );
        assert_eq!(
            reword("invalid type: sequence, expected f64").0,
            "expected a number, found an array"
        );
        let (m, h) = reword(
            "unknown field `shank-diametr`, expected one of `shank-diameter`, `shank-length`",
        );
        assert_eq!(m, "unknown key 'shank-diametr'");
        assert_eq!(h.as_deref(), Some("did you mean 'shank-diameter'?"));
        let (m, h) = reword("unknown variant `rund`, expected `flat` or `round`");
        assert_eq!(m, "unknown value 'rund'");
        assert_eq!(h.as_deref(), Some("did you mean 'round'?"));
        assert_eq!(reword("missing field `a`").0, "missing key 'a'");
    }
}
