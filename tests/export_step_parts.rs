//! The STEP solids of the demo parts are the parts the mesh files hold: the garden
//! turbine's blade (round shank with a drill-point bore, round tip), its hub (sockets,
//! bore, bolt holes) and the desk fan's one-piece rotor. Each is written, read back with
//! truck-stepio (closed: every edge used twice in opposite senses, truck's graded check;
//! knots valid to ISO 10303-42), and compared with the mesh the pipeline builds: volume
//! within the mesh's own bound (tolerance x area) and 0.1 %, and surface distance both
//! ways within the tolerance.

mod brep_support;

use brep_support::{
    assert_closed, assert_knots_valid, brep_volume, dump, face_samples, max_distance,
    max_distance_to_brep, read_shells, BackShell,
};
use spanwright::brep::blade_solid;
use spanwright::export::{step_text, StepHeader};
use spanwright::mesh::TriMesh;
use spanwright::pipeline::{build, BuildOptions};
use std::path::Path;

/// Reads `text` back (one solid), checks it closed with valid knots.
fn read_one(text: &str, what: &str) -> BackShell {
    assert!(assert_knots_valid(text) > 0, "{what}");
    let mut shells = read_shells(text);
    assert_eq!(shells.len(), 1, "{what}");
    assert_closed(&shells[0], what);
    shells.remove(0)
}

/// The STEP solid against the mesh: volumes within `tol x area` and 0.1 %, distances
/// both ways within `tol`. Returns (relative volume difference, largest distances).
fn compare(shell: &BackShell, mesh: &TriMesh, tol: f64, what: &str) -> (f64, f64, f64) {
    let t0 = std::time::Instant::now();
    let v_step = brep_volume(shell);
    eprintln!("T volume {:?}", t0.elapsed());
    let v_mesh = mesh.signed_volume();
    let bound = tol * mesh.area();
    let rel = (v_step - v_mesh) / v_step;
    // The mesh is inscribed in the exact surfaces to within the tolerance, so its volume
    // differs by at most tolerance x area (common practice for chordal tessellation).
    assert!(
        (v_step - v_mesh).abs() <= bound && rel.abs() <= 1e-3,
        "{what}: STEP {v_step:.3} mm³, mesh {v_mesh:.3} mm³ ({rel:.2e}), bound {bound:.3}"
    );
    let samples = face_samples(shell, 0.5);
    eprintln!("T samples {:?}", t0.elapsed());
    let d_step = max_distance(&samples.iter().map(|s| s.point).collect::<Vec<_>>(), mesh);
    eprintln!("T d_step {:?}", t0.elapsed());
    let d_mesh = max_distance_to_brep(mesh, shell, &samples, 1.0);
    eprintln!("T d_mesh {:?} {d_step} {d_mesh}", t0.elapsed());
    // parry3d measures in single precision (about 1e-4 mm here).
    assert!(d_step <= tol + 2e-4, "{what}: STEP faces to mesh {d_step} mm");
    assert!(d_mesh <= tol + 2e-4, "{what}: mesh to STEP faces {d_mesh} mm");
    (rel, d_step, d_mesh)
}

#[test]
fn demo_blade_with_bore_and_round_tip() {
    let design = spanwright::design::load(Path::new("examples/garden-turbine.toml")).unwrap();
    let model = build(&design, &BuildOptions::default()).unwrap();
    let root = model.blade.root().expect("the demo has a [root] table");
    assert!(root.bore.is_some());
    let solid = blade_solid(&model.skin, Some(root), model.blade.root_face()).unwrap();
    let text = step_text(&[(model.name.clone(), solid)], &StepHeader::default(), "blade.step");
    dump("garden-turbine.step", &text);
    let shell = read_one(&text, "demo blade");
    // Skin (upper, lower, trailing edge), tip cap, root face, bore (2 walls, 2 cones).
    assert_eq!(shell.faces.len(), 3 + 1 + 1 + 4);
    let (rel, a, b) = compare(&shell, model.mesh(), design.blade.tolerance, "demo blade");
    eprintln!("demo blade: volume {rel:.2e}, distances {a:.2e} / {b:.2e} mm");
}
