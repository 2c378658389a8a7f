//! Helpers shared by the tests and benchmarks (benchmarks include this file by path):
//! running the binary in a temp dir, comparing numbers with a stated tolerance, and the
//! test blades; analytic shapes are in [`shapes`].
#![allow(dead_code, unused_macros)]

pub mod shapes;

use nalgebra::Point3;
use spanwright::mesh::TriMesh;
use std::path::{Path, PathBuf};

/// Asserts `|got - want| <= tol`, naming what was compared and the source of `want`:
/// `assert_near!(v, 24.0, 1e-9, "box volume (elementary)")`; without the fourth
/// argument the message names the expression compared.
macro_rules! assert_near {
    ($got:expr, $want:expr, $tol:expr $(,)?) => {
        assert_near!($got, $want, $tol, stringify!($got))
    };
    ($got:expr, $want:expr, $tol:expr, $what:expr $(,)?) => {{
        let (got, want, tol): (f64, f64, f64) = ($got, $want, $tol);
        assert!(
            (got - want).abs() <= tol,
            "{}: got {got}, want {want} +- {tol} (off by {:.3e})",
            $what,
            (got - want).abs()
        );
    }};
}

/// Asserts `|got / want - 1| <= rel`, naming what was compared and the source (or,
/// without the fourth argument, the expression compared).
macro_rules! assert_rel {
    ($got:expr, $want:expr, $rel:expr $(,)?) => {
        assert_rel!($got, $want, $rel, stringify!($got))
    };
    ($got:expr, $want:expr, $rel:expr, $what:expr $(,)?) => {{
        let (got, want, rel): (f64, f64, f64) = ($got, $want, $rel);
        assert!(
            (got / want - 1.0).abs() <= rel,
            "{}: got {got}, want {want} within {:.3} % (off by {:.4} %)",
            $what,
            rel * 100.0,
            (got / want - 1.0).abs() * 100.0
        );
    }};
}

/// What a run of the binary in a temp dir of its own gave.
pub struct Run {
    /// Exit code (-1 when killed by a signal).
    pub code: i32,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
    /// The folder it ran in (removed when the run is dropped).
    pub dir: tempfile::TempDir,
}

impl Run {
    /// A path inside the run's folder.
    pub fn path(&self, rel: &str) -> PathBuf {
        self.dir.path().join(rel)
    }

    /// Names of the files in a folder of the run (sorted; empty when it does not exist).
    pub fn files(&self, rel: &str) -> Vec<String> {
        files_in(&self.path(rel))
    }
}

/// What a run of the binary in a given folder gave.
pub struct Ran {
    /// Exit code (-1 when killed by a signal).
    pub code: i32,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
}

/// Writes `files` (name, text) into a fresh temp dir and runs `spanwright <args>` there.
/// Paths in `args` starting with `@/` are taken from the project folder (examples,
/// profiles).
pub fn run_in_temp(files: &[(&str, &str)], args: &[&str]) -> Run {
    let dir = tempfile::tempdir().unwrap();
    for (name, text) in files {
        let p = dir.path().join(name);
        if let Some(parent) = p.parent() {
            std::fs::create_dir_all(parent).unwrap();
        }
        std::fs::write(p, text).unwrap();
    }
    let Ran {
        code,
        stdout,
        stderr,
    } = run_in(dir.path(), args);
    Run {
        code,
        stdout,
        stderr,
        dir,
    }
}

/// Runs `spanwright <args>` in `dir` (for several commands on the same files). Paths in
/// `args` starting with `@/` are taken from the project folder.
pub fn run_in(dir: &Path, args: &[&str]) -> Ran {
    let project = Path::new(env!("CARGO_MANIFEST_DIR"));
    let args: Vec<String> = args
        .iter()
        .map(|a| match a.strip_prefix("@/") {
            Some(rel) => project.join(rel).display().to_string(),
            None => a.to_string(),
        })
        .collect();
    let output = std::process::Command::new(env!("CARGO_BIN_EXE_spanwright"))
        .current_dir(dir)
        .args(&args)
        .output()
        .unwrap();
    Ran {
        code: output.status.code().unwrap_or(-1),
        stdout: String::from_utf8_lossy(&output.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&output.stderr).into_owned(),
    }
}

/// Names of the files in `dir`, sorted (empty when it does not exist).
pub fn files_in(dir: &Path) -> Vec<String> {
    let mut out: Vec<String> = std::fs::read_dir(dir)
        .map(|rd| {
            rd.filter_map(|e| e.ok())
                .map(|e| e.file_name().to_string_lossy().into_owned())
                .collect()
        })
        .unwrap_or_default();
    out.sort();
    out
}

/// Leading and trailing edge of a mesh cut by the plane z = r: the cut points farthest
/// apart (a sharp trailing edge makes them the two edges), the one at smaller x first
/// (the leading edge points toward -x, see the conventions).
pub fn chord_line_at(mesh: &TriMesh, r: f64) -> (Point3<f64>, Point3<f64>) {
    let mut pts = Vec::new();
    for t in 0..mesh.len() {
        let c = mesh.corners(t);
        for k in 0..3 {
            let (a, b) = (c[k], c[(k + 1) % 3]);
            if (a.z - r) * (b.z - r) < 0.0 {
                let s = (r - a.z) / (b.z - a.z);
                pts.push(a + (b - a) * s);
            }
        }
    }
    let mut best = (0.0, pts[0], pts[0]);
    for a in &pts {
        for b in &pts {
            let d = (a - b).norm();
            if d > best.0 {
                best = (d, *a, *b);
            }
        }
    }
    if best.1.x < best.2.x {
        (best.1, best.2)
    } else {
        (best.2, best.1)
    }
}

/// Invented blade-like solid: an elliptic section (12 % thick) whose chord tapers from
/// `root` to `tip` mm and twists by `twist` degrees over the span `len` mm, with flat caps;
/// `2 (rings - 1) around + 2 around` triangles.
pub fn blade(len: f64, root: f64, tip: f64, twist: f64, rings: usize, around: usize) -> TriMesh {
    let mut m = TriMesh::new();
    for k in 0..rings {
        let f = k as f64 / (rings - 1) as f64;
        let c = root + (tip - root) * f;
        let th = (twist * f).to_radians();
        for i in 0..around {
            let t = std::f64::consts::TAU * i as f64 / around as f64;
            let (u, v) = (0.5 * c * t.cos(), 0.06 * c * t.sin());
            m.push_vertex(Point3::new(
                u * th.cos() - v * th.sin(),
                u * th.sin() + v * th.cos(),
                len * f,
            ));
        }
    }
    let n = around as u32;
    for k in 0..rings as u32 - 1 {
        for i in 0..n {
            let j = (i + 1) % n;
            let (a, b, c, d) = (k * n + i, k * n + j, (k + 1) * n + j, (k + 1) * n + i);
            m.triangles.push([a, b, c]);
            m.triangles.push([a, c, d]);
        }
    }
    let bottom = m.push_vertex(Point3::new(0.0, 0.0, 0.0));
    let top = m.push_vertex(Point3::new(0.0, 0.0, len));
    let last = (rings as u32 - 1) * n;
    for i in 0..n {
        let j = (i + 1) % n;
        m.triangles.push([bottom, j, i]);
        m.triangles.push([top, last + i, last + j]);
    }
    m
}

/// Invented test blade for the segment tests: 320 mm of plain airfoil (no root table:
/// the root face is a plain cap a spar channel can open through), `extra` appended.
pub fn long_blade(extra: &str) -> String {
    format!(
        r#"name = "long"
[blade]
section = "naca4415"
points-per-side = 60
tolerance = 0.05

[[station]]
radius = 40
chord = 70
twist = 12

[[station]]
radius = 200
chord = 55
twist = 6

[[station]]
radius = 360
chord = 40
twist = 2
{extra}
"#
    )
}

/// The garden-turbine demo blade (examples/, invented data) built at `tolerance` mm.
pub fn demo_blade(tolerance: f64) -> spanwright::pipeline::BuiltBlade {
    let design =
        spanwright::design::load(Path::new("examples/garden-turbine.toml")).expect("the demo");
    spanwright::pipeline::build_blade(
        &design,
        &spanwright::pipeline::Options {
            tolerance: Some(tolerance),
            ..spanwright::pipeline::Options::default()
        },
    )
    .expect("the demo builds")
}

/// A mesh in parry3d (an independent reference library) for point distances: parry3d
/// measures in single precision, so the mesh is centred on its bounding box first, which
/// keeps the rounding near 1e-5 mm for a blade-sized part.
pub struct Parry {
    shape: parry3d::shape::TriMesh,
    centre: Point3<f64>,
}

impl Parry {
    /// The mesh, centred, as a parry3d triangle mesh.
    pub fn new(mesh: &TriMesh) -> Parry {
        let bb = mesh.bounding_box().expect("a mesh with vertices");
        let centre = nalgebra::center(&bb.min, &bb.max);
        let shape = parry3d::shape::TriMesh::new(
            mesh.vertices
                .iter()
                .map(|p| Self::to_f32(p, &centre))
                .collect(),
            mesh.triangles.clone(),
        )
        .expect("a valid triangle mesh");
        Parry { shape, centre }
    }

    fn to_f32(p: &Point3<f64>, c: &Point3<f64>) -> parry3d::math::Vector {
        parry3d::math::Vector::new((p.x - c.x) as f32, (p.y - c.y) as f32, (p.z - c.z) as f32)
    }

    /// Distance from `p` to the mesh surface, mm.
    pub fn distance(&self, p: &Point3<f64>) -> f64 {
        use parry3d::query::PointQuery;
        self.shape
            .distance_to_local_point(Self::to_f32(p, &self.centre), false) as f64
    }
}
