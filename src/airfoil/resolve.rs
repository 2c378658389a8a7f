//! Finding a section by name: a designation, or a section file by path or by name in
//! search directories.

use super::designation::{Designation, Parsed};
use super::error::SectionError;
use super::import::read;
use super::section::Section;
use std::path::{Path, PathBuf};

/// File extensions tried after the bare name.
pub const EXTENSIONS: [&str; 2] = ["dat", "txt"];

/// Returns the section named `name` in the section frame (not resampled), its chord
/// line chosen by the rule of [`crate::conventions`] ("Section frame"):
///
/// 1. a designation (`naca2412`, `NACA 2412`, `naca0012-closed`, `naca23012`), generated;
/// 2. a file path as given;
/// 3. the name in each of `search_dirs` in order, as given and then with `.dat` and
///    `.txt` added.
///
/// Errors list what names are valid and which section files the directories hold.
pub fn resolve(name: &str, search_dirs: &[&Path]) -> Result<Section, SectionError> {
    let parsed = Designation::parse(name);
    if let Parsed::Valid(d) = &parsed {
        return d.section().map_err(|e| SectionError::shape(d.name(), e));
    }
    if let Some(path) = find_file(name, search_dirs) {
        return read(&path);
    }
    let detail = match parsed {
        Parsed::Invalid(why) => why,
        _ if search_dirs.is_empty() => {
            format!("it is no designation and no file `{name}` exists")
        }
        _ => format!(
            "it is no designation, and no file `{name}` exists as a path or in the search directories"
        ),
    };
    Err(SectionError::NotFound {
        name: name.into(),
        detail,
        dirs: if search_dirs.is_empty() {
            String::new()
        } else {
            format!(
                " or by name (with or without `.dat`/`.txt`) in {}",
                search_dirs
                    .iter()
                    .map(|d| format!("`{}`", d.display()))
                    .collect::<Vec<_>>()
                    .join(", ")
            )
        },
        available: available(search_dirs),
    })
}

/// The file a name refers to, if any.
pub fn find_file(name: &str, search_dirs: &[&Path]) -> Option<PathBuf> {
    let given = Path::new(name);
    if given.is_file() {
        return Some(given.to_path_buf());
    }
    if name.trim().is_empty() {
        return None;
    }
    for dir in search_dirs {
        let base = dir.join(name);
        if base.is_file() {
            return Some(base);
        }
        for ext in EXTENSIONS {
            let mut p = base.clone().into_os_string();
            p.push(".");
            p.push(ext);
            let p = PathBuf::from(p);
            if p.is_file() {
                return Some(p);
            }
        }
    }
    None
}

/// `; files found: a, b, c` for the section files in the directories (at most 30).
fn available(search_dirs: &[&Path]) -> String {
    let mut names: Vec<String> = search_dirs
        .iter()
        .filter_map(|d| std::fs::read_dir(d).ok())
        .flat_map(|it| it.filter_map(Result::ok))
        .map(|e| e.path())
        .filter(|p| {
            p.extension()
                .and_then(|e| e.to_str())
                .is_some_and(|e| EXTENSIONS.contains(&e.to_ascii_lowercase().as_str()))
        })
        .filter_map(|p| p.file_stem().and_then(|s| s.to_str()).map(String::from))
        .collect();
    names.sort();
    names.dedup();
    if names.is_empty() {
        return String::new();
    }
    let more = names.len().saturating_sub(30);
    names.truncate(30);
    format!(
        "; section files found: {}{}",
        names.join(", "),
        if more > 0 {
            format!(" and {more} more")
        } else {
            String::new()
        }
    )
}
