//! Fuzz loops for the four readers of user files: the TOML design, the CSV station table,
//! section coordinate files and STL meshes. Stable toolchain, no extra crates: a seeded
//! mutation fuzzer (byte flips, interesting bytes, dictionary tokens, deletions,
//! duplications, splices with other seeds, truncation) over corpora of valid files.
//!
//! For every input: the reader never panics, every error names its place (the file,
//! and the line or key where the input had one), and every input it accepts obeys the
//! stated limits (a design: 2 to 1000 stations, radii strictly increasing and at most
//! 10 m, chords positive and at least 20 tolerances; a section: enough finite points; a
//! mesh: finite vertices, valid indices).
//!
//! `cargo test --release --test fuzz_parsers` runs a few thousand inputs per reader. Set
//! `FUZZ_CASES=1000000` for a long run, `FUZZ_SEED` for another sequence, and
//! `FUZZ_CASE=k` to replay one case. A failing input is saved under
//! `$TMPDIR/spanwright-fuzz/` and its case number printed. Inputs found are kept as
//! regression tests at the end of this file.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::{Path, PathBuf};

use spanwright::design::{self, Design, DesignError};

/// SplitMix64 (Steele, Lea & Flood, "Fast splittable pseudorandom number generators",
/// OOPSLA 2014): small, fast, and the same sequence on every platform.
struct Rng(u64);

impl Rng {
    fn new(seed: u64, case: u64) -> Self {
        let mut r = Rng(seed ^ case.wrapping_mul(0x9E37_79B9_7F4A_7C15));
        r.next();
        r
    }

    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in `0..n` (n > 0).
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

/// Bytes that often matter to a parser.
const INTERESTING: &[u8] = b"\0\xff\n\r\t \"',;#[]{}=.-+e0159\x80\xc3\xbf";

/// Largest input tried, bytes.
const MAX_INPUT: usize = 1 << 16;

/// One mutated input from the corpus.
fn mutate(rng: &mut Rng, corpus: &[Vec<u8>], dict: &[&[u8]]) -> Vec<u8> {
    let mut b = corpus[rng.below(corpus.len())].clone();
    let rounds = 1 + rng.below(8);
    for _ in 0..rounds {
        let len = b.len();
        let at = rng.below(len + 1);
        match rng.below(9) {
            0 if len > 0 => {
                let i = rng.below(len);
                b[i] ^= 1 << rng.below(8);
            }
            1 if len > 0 => {
                let i = rng.below(len);
                b[i] = INTERESTING[rng.below(INTERESTING.len())];
            }
            2 | 3 => {
                let t = dict[rng.below(dict.len())];
                b.splice(at..at, t.iter().copied());
            }
            4 if len > 0 => {
                let end = (at + 1 + rng.below(32)).min(len);
                b.drain(at.min(end)..end);
            }
            5 if len > 0 => {
                let start = rng.below(len);
                let end = (start + 1 + rng.below(64)).min(len);
                let chunk: Vec<u8> = b[start..end].to_vec();
                b.splice(at..at, chunk);
            }
            6 => {
                let other = &corpus[rng.below(corpus.len())];
                if !other.is_empty() {
                    let start = rng.below(other.len());
                    let end = (start + 1 + rng.below(256)).min(other.len());
                    b.splice(at..at, other[start..end].iter().copied());
                }
            }
            7 => b.truncate(at),
            _ => {
                // A number replaced by an extreme one.
                let t: &[u8] = [
                    &b"1e308"[..],
                    b"-1e308",
                    b"nan",
                    b"inf",
                    b"1e-320",
                    b"0",
                    b"-0",
                ][rng.below(7)];
                let i = b
                    .iter()
                    .skip(at)
                    .position(u8::is_ascii_digit)
                    .map(|i| i + at);
                if let Some(i) = i {
                    let end = b[i..]
                        .iter()
                        .position(|c| !(c.is_ascii_digit() || *c == b'.'))
                        .map_or(b.len(), |e| i + e);
                    b.splice(i..end, t.iter().copied());
                }
            }
        }
        b.truncate(MAX_INPUT);
    }
    b
}

fn env_u64(name: &str) -> Option<u64> {
    std::env::var(name).ok().and_then(|v| v.trim().parse().ok())
}

/// Runs `check` over mutated inputs: the number of cases from `FUZZ_CASES` (default
/// `default_cases`), or the one case `FUZZ_CASE`. `check` returns a broken invariant.
/// Returns the number of inputs tried and how many the reader accepted.
fn fuzz(
    target: &str,
    corpus: &[Vec<u8>],
    dict: &[&[u8]],
    default_cases: u64,
    check: impl Fn(&[u8]) -> Result<bool, String>,
) -> (u64, u64) {
    let seed = env_u64("FUZZ_SEED").unwrap_or(0x5EED_2024);
    let cases: Vec<u64> = match env_u64("FUZZ_CASE") {
        Some(k) => vec![k],
        None => (0..env_u64("FUZZ_CASES").unwrap_or(default_cases)).collect(),
    };
    let (mut tried, mut accepted) = (0, 0);
    for case in cases {
        let mut rng = Rng::new(seed, case);
        // Every 16th case is a seed as it is (the valid files must stay valid).
        let input = if case % 16 == 0 {
            corpus[rng.below(corpus.len())].clone()
        } else {
            mutate(&mut rng, corpus, dict)
        };
        let outcome = catch_unwind(AssertUnwindSafe(|| check(&input)));
        let broken = match outcome {
            Ok(Ok(ok)) => {
                accepted += u64::from(ok);
                None
            }
            Ok(Err(why)) => Some(why),
            Err(panic) => Some(format!(
                "panicked: {}",
                panic
                    .downcast_ref::<String>()
                    .cloned()
                    .or_else(|| panic.downcast_ref::<&str>().map(|s| s.to_string()))
                    .unwrap_or_default()
            )),
        };
        if let Some(why) = broken {
            let dir = std::env::temp_dir().join("spanwright-fuzz");
            let _ = std::fs::create_dir_all(&dir);
            let file = dir.join(format!("{target}-{seed:x}-{case}"));
            let _ = std::fs::write(&file, &input);
            panic!(
                "{target}: case {case} (FUZZ_SEED={seed}, FUZZ_CASE={case}): {why}\ninput saved to {}",
                file.display()
            );
        }
        tried += 1;
    }
    eprintln!("{target}: {tried} inputs, {accepted} accepted, no failure");
    (tried, accepted)
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn read_dir_files(dir: &Path, ext: &str) -> Vec<Vec<u8>> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(dir)
        .map(|d| d.flatten().map(|e| e.path()).collect())
        .unwrap_or_default();
    files.sort();
    files
        .iter()
        .filter(|p| p.extension().is_some_and(|e| e == ext))
        .filter_map(|p| std::fs::read(p).ok())
        .collect()
}

// ---- design problems: each names its place ----

/// Problems about a file as a whole, which have no line or key by nature.
const WHOLE_FILE: &[&str] = &[
    "no stations",
    "the file is empty",
    "the file is not UTF-8",
    "header but no stations",
    "station given",
    "stations given",
    "stations spanwright accepts",
    "a design file may be",
];

fn placed(e: &DesignError, files: &[&Path]) -> Result<(), String> {
    if e.problems.is_empty() {
        return Err("an error without problems".into());
    }
    for p in &e.problems {
        if !files.iter().any(|f| p.file == *f) {
            return Err(format!("problem names another file: {p}"));
        }
        let whole = WHOLE_FILE.iter().any(|w| p.message.contains(w));
        if p.line.is_none() && p.key.is_none() && !whole {
            return Err(format!("problem without line or key: {p}"));
        }
        if p.message.trim().is_empty() {
            return Err(format!("empty message: {p:?}"));
        }
    }
    Ok(())
}

/// The stated limits every accepted design obeys (src/design/mod.rs, key reference).
fn obeys_limits(d: &Design) -> Result<(), String> {
    let n = d.stations.len();
    if !(2..=design::MAX_STATIONS).contains(&n) {
        return Err(format!("{n} stations accepted"));
    }
    let tol = d.blade.tolerance;
    if !(design::MIN_TOLERANCE_MM..=design::MAX_TOLERANCE_MM).contains(&tol) {
        return Err(format!("tolerance {tol} accepted"));
    }
    for w in d.stations.windows(2) {
        if !(w[1].radius - w[0].radius >= design::MIN_GAP_TOLERANCES * tol) {
            return Err(format!(
                "radii {} then {} accepted",
                w[0].radius, w[1].radius
            ));
        }
    }
    for s in &d.stations {
        let ok = s.radius >= 0.0
            && s.radius <= design::MAX_LENGTH_MM
            && s.chord >= design::MIN_CHORD_TOLERANCES * tol
            && s.chord <= design::MAX_LENGTH_MM
            && s.twist.abs() <= 90.0
            && s.sweep.abs() <= design::MAX_LENGTH_MM
            && s.prebend.abs() <= design::MAX_LENGTH_MM
            && s.thickness.is_none_or(|t| (0.01..=0.5).contains(&t))
            && !s.section.trim().is_empty();
        if !ok {
            return Err(format!("station out of its limits accepted: {s:?}"));
        }
    }
    let span = d.stations[n - 1].radius - d.stations[0].radius;
    if span < design::MIN_SPAN_TOLERANCES * tol {
        return Err(format!("span {span} accepted at tolerance {tol}"));
    }
    if let Some(te) = d.blade.min_te_thickness {
        let thinnest = d.stations.iter().map(|s| s.chord).fold(f64::MAX, f64::min);
        let explicit = te != design::DEFAULT_MIN_TE_MM;
        if !(te >= 0.0) || (explicit && te > design::MAX_TE_CHORD_FRACTION * thinnest + 1e-12) {
            return Err(format!(
                "min-te-thickness {te} accepted (thinnest chord {thinnest})"
            ));
        }
    }
    Ok(())
}

// ---- corpora ----

fn design_corpus() -> Vec<Vec<u8>> {
    let mut c = read_dir_files(&root().join("examples"), "toml");
    c.extend(read_dir_files(Path::new("/work/shared/repro"), "toml"));
    c.push(
        br#"name = "inch"
units = { length = "in", angle = "rad" }
[blade]
section = "naca0012"
stacking = "centroid"
spanwise = "linear"
tolerance = 0.0004
min-te-thickness = 0.01
[[station]]
radius = 2
chord = 1.5
twist = 0.3
thickness = 15
sweep = 0.1
[[station]]
radius = 10
chord = 0.8
twist = 0.05
stacking = 0.3
[root]
shank-diameter = 0.5
[rotor]
blades = 2
[rotor.hub]
thickness = 0.4
"#
        .to_vec(),
    );
    c.push(b"stations = \"t.csv\"\n[blade]\nsection = \"naca4412\"\n".to_vec());
    c
}

const DESIGN_DICT: &[&[u8]] = &[
    b"[[station]]\nradius = 1\nchord = 1\ntwist = 0\n",
    b"[station]\n",
    b"[blade]\n",
    b"[roots]\n",
    b"[rotor]\nblades = 1\nhub-radius = 40\n",
    b"[tip]\nshape = \"round\"\nlength = 1e6\n",
    b"units = { length = \"m\" }\n",
    b"units = { length = \"in\" }\n",
    b"stations = \"t.csv\"\n",
    b"stations = \"self.toml\"\n",
    b"tolerance = 1e-9\n",
    b"min-te-thickness = 100\n",
    b"spanwise = \"linear\"\n",
    b"points-per-side = 5000\n",
    b"radius = ",
    b"chord = ",
    b" = [1, 2]\n",
    b" = { a = 1 }\n",
    b"\"\"\"",
    b"'",
    b"\r\n",
    b"\r",
    b"1e400",
    b"-1",
    b"\xef\xbb\xbf",
    b"nan",
];

fn csv_corpus() -> Vec<Vec<u8>> {
    let mut c = read_dir_files(&root().join("examples"), "csv");
    for text in [
        "radius [mm],chord [mm],twist [deg],section,thickness [%],stacking\n40,60,25,naca4415,15,centroid\n280,25,3,naca4412,,0.3\n",
        "r_mm;chord (in);Twist [rad];airfoil;notes\n40;2,5;0,4;naca2412;root\n120;1;0,1;naca2412;tip\n",
        "# comment\rr/mm\tc/mm\ttwist deg\tt/c [fraction]\r30\t20\t10\t0.12\r90\t12\t2\t0.1\r",
        "\"radius\",\"chord\",\"twist\",\"section\"\r\n\"10\",\"5\",\"1\",\"a, b\"\r\n20,4,0,\"x\"\r\n",
    ] {
        c.push(text.as_bytes().to_vec());
    }
    c
}

const CSV_DICT: &[&[u8]] = &[
    b"radius_mm",
    b"r [m]",
    b"chord (in)",
    b"twist [rad]",
    b"t/c",
    b"stacking [%]",
    b"notes",
    b",",
    b";",
    b"\t",
    b"\r",
    b"\r\n",
    b"\"",
    b"\"\"",
    b"# c\n",
    b"1e400",
    b"NaN",
    b"-1",
    b"12,5",
    b"\n40,30,20,naca4412\n",
];

fn section_corpus() -> Vec<Vec<u8>> {
    let mut c = read_dir_files(&root().join("profiles"), "dat");
    c.push(b"NACA 0012 sides\n3 3\n0 0\n0.5 0.06\n1 0\n0 0\n0.5 -0.06\n1 0\n".to_vec());
    c
}

const SECTION_DICT: &[&[u8]] = &[
    b"1.0 0.0\n",
    b"0 0\n",
    b"66 66\n",
    b"# note\n",
    b"\r",
    b"\r\n",
    b",",
    b";",
    b"1e308",
    b"nan",
    b"-0.5 0.5\n",
    b"name line\n",
];

/// A small closed mesh (an octahedron) as binary and ASCII STL (3D Systems, 1989).
fn stl_corpus() -> Vec<Vec<u8>> {
    let v = [
        [1.0f32, 0.0, 0.0],
        [-1.0, 0.0, 0.0],
        [0.0, 1.0, 0.0],
        [0.0, -1.0, 0.0],
        [0.0, 0.0, 1.0],
        [0.0, 0.0, -1.0],
    ];
    let f = [
        [0, 2, 4],
        [2, 1, 4],
        [1, 3, 4],
        [3, 0, 4],
        [2, 0, 5],
        [1, 2, 5],
        [3, 1, 5],
        [0, 3, 5],
    ];
    let mut bin = vec![b' '; 80];
    bin[..5].copy_from_slice(b"octa ");
    bin.extend_from_slice(&(f.len() as u32).to_le_bytes());
    let mut ascii = String::from("solid octa\n");
    for t in f {
        bin.extend_from_slice(&[0u8; 12]);
        ascii.push_str("facet normal 0 0 0\nouter loop\n");
        for i in t {
            for c in v[i] {
                bin.extend_from_slice(&c.to_le_bytes());
            }
            ascii.push_str(&format!("vertex {} {} {}\n", v[i][0], v[i][1], v[i][2]));
        }
        bin.extend_from_slice(&[0, 0]);
        ascii.push_str("endloop\nendfacet\n");
    }
    ascii.push_str("endsolid octa\n");
    let mut solid_header = bin.clone();
    solid_header[..6].copy_from_slice(b"solid ");
    vec![bin, ascii.into_bytes(), solid_header]
}

const STL_DICT: &[&[u8]] = &[
    b"solid ",
    b"solid\n",
    b"facet normal 0 0 1\n",
    b"outer loop\n",
    b"vertex 0 0 0\n",
    b"endloop\n",
    b"endfacet\n",
    b"endsolid\n",
    b"\xff\xff\xff\xff",
    b"\x00\x00\x80\x7f",
    b"\x00\x00\xc0\x7f",
    b"\x01\x00\x00\x00",
];

// ---- the four loops ----

/// A folder with the files a design may name: a station table `t.csv`.
fn design_dir() -> tempfile::TempDir {
    let dir = tempfile::TempDir::new().expect("temp dir");
    std::fs::write(
        dir.path().join("t.csv"),
        "radius,chord,twist\n40,30,20\n120,20,5\n",
    )
    .expect("table");
    dir
}

#[test]
fn fuzz_design_toml() {
    let dir = design_dir();
    let file = dir.path().join("self.toml");
    let csv = dir.path().join("t.csv");
    std::fs::write(&file, "").expect("file");
    let files = [file.as_path(), csv.as_path()];
    fuzz(
        "design-toml",
        &design_corpus(),
        DESIGN_DICT,
        3000,
        |input| {
            let text = String::from_utf8_lossy(input);
            match design::parse_toml_str(&text, Some(&file)) {
                Ok(d) => obeys_limits(&d).map(|()| true),
                Err(e) => placed(&e, &files).map(|()| false),
            }
        },
    );
}

#[test]
fn fuzz_station_csv() {
    let file = Path::new("table.csv");
    fuzz("station-csv", &csv_corpus(), CSV_DICT, 3000, |input| {
        let text = String::from_utf8_lossy(input);
        let section = (input.len() % 2 == 0).then_some("naca0012");
        match design::parse_csv_str(&text, Some(file), section) {
            Ok(d) => obeys_limits(&d).map(|()| true),
            Err(e) => placed(&e, &[file]).map(|()| false),
        }
    });
}

#[test]
fn fuzz_section_file() {
    fuzz(
        "section-file",
        &section_corpus(),
        SECTION_DICT,
        3000,
        |input| {
            let text = String::from_utf8_lossy(input);
            match spanwright::airfoil::parse(&text, "f.dat") {
                Ok(s) => {
                    let pts = s.points();
                    if pts.len() < spanwright::airfoil::MIN_POINTS
                        || pts.iter().any(|p| !(p.x.is_finite() && p.y.is_finite()))
                    {
                        return Err(format!("accepted a section of {} points", pts.len()));
                    }
                    Ok(true)
                }
                Err(e) => {
                    let m = e.to_string();
                    if m.starts_with("f.dat") {
                        Ok(false)
                    } else {
                        Err(format!("error does not name the file: {m}"))
                    }
                }
            }
        },
    );
}

#[test]
fn fuzz_stl() {
    fuzz(
        "stl",
        &stl_corpus(),
        STL_DICT,
        3000,
        |input| match spanwright::fit::parse_stl(input, "p", "p.stl") {
            Ok(part) => {
                let m = &part.mesh;
                let n = m.vertices.len() as u32;
                if m.triangles.is_empty()
                    || m.triangles.iter().flatten().any(|&i| i >= n)
                    || m.vertices
                        .iter()
                        .any(|p| !p.coords.iter().all(|c| c.is_finite()))
                {
                    return Err("accepted a mesh with bad indices or coordinates".into());
                }
                Ok(true)
            }
            Err(e) => {
                let m = e.to_string();
                if m.starts_with("p.stl: ") {
                    Ok(false)
                } else {
                    Err(format!("error does not name the file: {m}"))
                }
            }
        },
    );
}
