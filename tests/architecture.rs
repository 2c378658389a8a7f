//! The stage order of DEVELOPERS.md ("Architecture") holds for every path into the crate
//! that the code uses: a module may use modules of its own stage or below, never above.
//! Doc comments may link anywhere; tests inside a module may use anything.

use std::collections::BTreeMap;
use std::path::Path;

/// Stages from the bottom: each module of the library and the stage it belongs to.
const STAGES: &[(&str, u32)] = &[
    // Shared ground: conventions, file writing, SVG drawing, 1-D interpolation, 2-D
    // polygons.
    ("conventions", 0),
    ("atomic", 0),
    ("svg", 0),
    ("interp", 0),
    ("planar", 0),
    ("parallel", 0),
    // Input.
    ("design", 1),
    // Sections; drafting a table (before the pipeline, from design values only).
    ("airfoil", 2),
    ("draft", 2),
    // Blade model.
    ("root", 3),
    ("blade", 4),
    // Surface.
    ("loft", 5),
    ("rings", 5),
    // Mesh.
    ("mesh", 6),
    ("tessellate", 7),
    ("mount", 7),
    // Assembly of built blades (placements, hub, one-piece).
    ("assembly", 8),
    // Checks; the printer-fit search (it reads meshes and printer sizes only, and takes
    // checked parts for a job); segments, whose plan asks the printer-fit search.
    ("check", 9),
    ("brep", 9),
    ("fit", 9),
    ("segment", 9),
    // Parts: the orchestrator.
    ("pipeline", 10),
    // Consumers.
    ("props", 11),
    ("coupon", 11),
    ("export", 12),
    ("report", 13),
];

/// Code lines of a file: comments and the `#[cfg(test)]` module left out.
fn code_of(text: &str) -> String {
    let body = match text.find("#[cfg(test)]") {
        Some(i) => &text[..i],
        None => text,
    };
    body.lines()
        .map(|l| match l.find("//") {
            Some(i) => &l[..i],
            None => l,
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// Every `crate::<module>` a file's code names, and every module its `use super::...`
/// would leave (none: `super` stays inside the file's own module tree).
fn used_modules(code: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut rest = code;
    while let Some(i) = rest.find("crate::") {
        let tail = &rest[i + "crate::".len()..];
        let name: String = tail
            .chars()
            .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
            .collect();
        if !name.is_empty() {
            out.push(name);
        }
        rest = tail;
    }
    // `use crate::{a, b}` groups.
    let mut rest = code;
    while let Some(i) = rest.find("crate::{") {
        let tail = &rest[i + "crate::{".len()..];
        let end = tail.find('}').unwrap_or(tail.len());
        for item in tail[..end].split(',') {
            let name: String = item
                .trim()
                .chars()
                .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
                .collect();
            if !name.is_empty() {
                out.push(name);
            }
        }
        rest = tail;
    }
    out
}

fn visit(dir: &Path, files: &mut Vec<std::path::PathBuf>) {
    for entry in std::fs::read_dir(dir).unwrap() {
        let p = entry.unwrap().path();
        if p.is_dir() {
            visit(&p, files);
        } else if p.extension().is_some_and(|e| e == "rs") {
            files.push(p);
        }
    }
}

#[test]
fn no_module_uses_a_stage_above_it() {
    let stage: BTreeMap<&str, u32> = STAGES.iter().copied().collect();
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    visit(&src, &mut files);
    let mut seen = std::collections::BTreeSet::new();
    let mut wrong = Vec::new();
    for file in &files {
        let rel = file.strip_prefix(&src).unwrap();
        let top = rel
            .components()
            .next()
            .unwrap()
            .as_os_str()
            .to_string_lossy()
            .trim_end_matches(".rs")
            .to_string();
        if matches!(top.as_str(), "lib" | "main" | "cli") {
            continue; // the crate root and the command layer sit above every stage
        }
        seen.insert(top.clone());
        let Some(&own) = stage.get(top.as_str()) else {
            wrong.push(format!(
                "{}: module '{top}' has no stage; add it to STAGES here and to DEVELOPERS.md",
                rel.display()
            ));
            continue;
        };
        let code = code_of(&std::fs::read_to_string(file).unwrap());
        for used in used_modules(&code) {
            match stage.get(used.as_str()) {
                Some(&s) if s > own => wrong.push(format!(
                    "{}: '{top}' (stage {own}) uses '{used}' (stage {s}), a later stage",
                    rel.display()
                )),
                Some(_) => {}
                None => wrong.push(format!(
                    "{}: uses crate::{used}, which has no stage",
                    rel.display()
                )),
            }
        }
    }
    assert!(wrong.is_empty(), "{}", wrong.join("\n"));
    // Every stage listed exists (the list stays true as modules move).
    for (name, _) in STAGES {
        assert!(
            seen.contains(*name),
            "STAGES names '{name}', which is not in src/"
        );
    }
}
