//! Reading what the commands are given: design files (TOML, or a CSV table with a
//! section for every station) and STL parts, which are checked like built ones.

use anyhow::Context as _;
use spanwright::check::{certify, CheckOptions, CheckedPart};
use spanwright::design::{self, Design};
use std::path::Path;

/// True when the file name ends in `.ext` (any case).
pub fn has_extension(path: &Path, ext: &str) -> bool {
    path.extension()
        .is_some_and(|e| e.to_string_lossy().eq_ignore_ascii_case(ext))
}

/// Loads a design file: TOML, or a CSV station table with an optional section for
/// every station that names none.
pub fn design(path: &Path, section: Option<&str>) -> anyhow::Result<Design> {
    let design = if has_extension(path, "csv") {
        design::load_csv(path, section)
    } else {
        design::load(path)
    }?;
    Ok(design)
}

/// Reads an STL file as a part and checks it like a built one (any genus): a mesh with
/// a hole, a flipped triangle or a self-intersection is a failed check.
pub fn stl_part(path: &Path) -> anyhow::Result<CheckedPart> {
    let part = spanwright::fit::read_stl_part(path)?;
    let checked = certify(part, &CheckOptions::DEFAULT.with_expected_genus(None))
        .with_context(|| format!("{}: the mesh is not a valid solid", path.display()))?;
    Ok(checked)
}
