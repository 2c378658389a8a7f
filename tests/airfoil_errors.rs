//! Malformed section files: each gives its own clear error, never a panic.

use spanwright::airfoil::{read, resolve, Layout, SectionError};
use std::path::{Path, PathBuf};

/// A valid NACA 0012 loop, 41 points per side, as text lines (no name line).
fn good_lines() -> Vec<String> {
    let s = resolve("naca0012", &[]).unwrap().resample(41).unwrap();
    spanwright::airfoil::to_text(&s, Layout::Loop, "x", 6)
        .unwrap()
        .lines()
        .skip(1)
        .map(String::from)
        .collect()
}

fn put(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// Reads the file, asserts an error whose message names the file (and the line when
/// given), and returns it.
fn fails(path: &Path, line: Option<usize>) -> SectionError {
    let e = match read(path) {
        Ok(_) => panic!("{} was accepted", path.display()),
        Err(e) => e,
    };
    let msg = e.to_string();
    assert!(msg.contains(&path.display().to_string()), "{msg}");
    if let Some(l) = line {
        assert!(
            msg.contains(&format!(":{l}:")) || msg.contains(&format!("line {l}")),
            "expected line {l}: {msg}"
        );
    }
    e
}

#[test]
fn malformed_files_give_clear_errors() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let good = good_lines();
    // The good file itself reads (guards the fixtures below).
    assert!(read(&put(d, "good.dat", &good.join("\n"))).is_ok());
    let with = |i: usize, text: &str| {
        let mut l = good.clone();
        l[i] = text.into();
        l.join("\n")
    };

    // 1. Empty file.
    let e = fails(&put(d, "empty.dat", ""), None);
    assert!(matches!(e, SectionError::Empty { .. }), "{e}");
    // 2. Only a name line, comments and blank lines.
    let e = fails(
        &put(d, "name-only.dat", "NACA 0012\n# nothing\n\n  \n"),
        None,
    );
    assert!(matches!(e, SectionError::Empty { .. }), "{e}");
    // 3. Too few points.
    let e = fails(&put(d, "few.dat", &good[..6].join("\n")), None);
    assert!(
        matches!(e, SectionError::TooFewPoints { count: 6, .. }),
        "{e}"
    );
    // 4. Non-numeric text in the data (line 8 of the file).
    let e = fails(&put(d, "text.dat", &with(7, "0.5 abc")), Some(8));
    assert!(matches!(e, SectionError::NonNumeric { line: 8, .. }), "{e}");
    // 5. NaN.
    let e = fails(&put(d, "nan.dat", &with(10, "NaN 0.01")), Some(11));
    assert!(matches!(e, SectionError::NotFinite { line: 11, .. }), "{e}");
    // 6. Infinity (overflowing literal).
    let e = fails(&put(d, "inf.dat", &with(12, "0.4 1e999")), Some(13));
    assert!(matches!(e, SectionError::NotFinite { line: 13, .. }), "{e}");
    // 7. Three numbers on a line.
    let e = fails(&put(d, "columns.dat", &with(5, "0.9 0.01 0.0")), Some(6));
    assert!(matches!(e, SectionError::Layout { line: 6, .. }), "{e}");
    // 8. Point counts that do not match the data.
    let text = format!("two sides\n40 40\n{}", good.join("\n"));
    let e = fails(&put(d, "counts.dat", &text), Some(2));
    assert!(matches!(e, SectionError::Layout { line: 2, .. }), "{e}");
    // 9. A stray point far behind the trailing edge (a typing error: 1.8 for 0.8).
    let e = fails(&put(d, "stray.dat", &with(8, "1.8 0.0")), Some(9));
    assert!(matches!(e, SectionError::OutOfRange { line: 9, .. }), "{e}");
    // 10. Self-intersecting: the aft upper surface mirrored below the lower surface.
    let crossed: Vec<String> = good
        .iter()
        .enumerate()
        .map(|(i, l)| {
            if i < 10 {
                let v: Vec<f64> = l.split_whitespace().map(|t| t.parse().unwrap()).collect();
                format!("{} {}", v[0], -2.0 * v[1])
            } else {
                l.clone()
            }
        })
        .collect();
    let e = fails(&put(d, "crossed.dat", &crossed.join("\n")), None);
    assert!(matches!(e, SectionError::SelfIntersecting { .. }), "{e}");
    assert!(e.to_string().contains("line"), "{e}");
    // 11. All points on one line: no area.
    let flat: Vec<String> = (0..30)
        .map(|i| {
            let x = (i as f64 - 15.0).abs() / 15.0;
            format!("{x} 0")
        })
        .collect();
    let e = fails(&put(d, "flat.dat", &flat.join("\n")), None);
    assert!(matches!(e, SectionError::Shape { .. }), "{e}");
    // 12. A missing file.
    let e = fails(&d.join("missing.dat"), None);
    assert!(matches!(e, SectionError::Io { .. }), "{e}");
    // 13. Binary garbage.
    let bytes: Vec<u8> = (0..=255u8).cycle().take(2000).collect();
    let p = d.join("binary.dat");
    std::fs::write(&p, bytes).unwrap();
    let e = fails(&p, None);
    assert!(
        matches!(
            e,
            SectionError::NonNumeric { .. } | SectionError::Empty { .. }
        ),
        "{e}"
    );
    // 14. Identical points only.
    let same = vec!["0.5 0.0"; 20].join("\n");
    let e = fails(&put(d, "same.dat", &same), None);
    assert!(
        matches!(e, SectionError::TooFewPoints { count: 1, .. }),
        "{e}"
    );
    // 15. A lone number in the middle of the data.
    let e = fails(&put(d, "lone.dat", &with(20, "0.5")), Some(21));
    assert!(matches!(e, SectionError::Layout { line: 21, .. }), "{e}");
}

#[test]
fn messages_say_how_to_fix() {
    let dir = tempfile::tempdir().unwrap();
    let p = put(dir.path(), "text.dat", "name\n1 0\n0.5 x\n");
    let msg = read(&p).unwrap_err().to_string();
    assert!(msg.contains("`0.5 x`") && msg.contains('#'), "{msg}");
    let p = put(dir.path(), "few.dat", "1 0\n0 0\n1 0\n");
    let msg = read(&p).unwrap_err().to_string();
    assert!(msg.contains("at least 10"), "{msg}");
}
