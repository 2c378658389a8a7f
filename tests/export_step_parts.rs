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
use spanwright::pipeline::{build_blade, Options};
use std::path::Path;

/// Reads `text` back (one solid), checks it closed with valid knots.
fn read_one(text: &str, what: &str) -> BackShell {
    assert!(assert_knots_valid(text) > 0, "{what}");
    let mut shells = read_shells(text);
    assert_eq!(shells.len(), 1, "{what}");
    assert_closed(&shells[0], what);
    shells.remove(0)
}

/// How far the mesh may be from the exact part: its chordal tolerance, and any larger
/// gap its builder documents (the hub's rim facets), with the volume that gap can hold.
struct MeshBound {
    /// Largest distance of the mesh from the exact surfaces, mm.
    distance: f64,
    /// Largest volume difference, mm³.
    volume: f64,
    /// Largest distance of a mesh vertex from the exact surfaces, mm (vertices lie on
    /// them, except where a builder places them otherwise, e.g. around cross holes).
    vertices: f64,
}

impl MeshBound {
    /// The plain chordal bound: `tol`, and `tol x area` in volume (each facet within
    /// `tol` of its surface; common practice for chordal tessellation).
    fn chordal(mesh: &TriMesh, tol: f64) -> MeshBound {
        MeshBound {
            distance: tol,
            volume: tol * mesh.area(),
            vertices: 1e-6,
        }
    }
}

/// The STEP solid against the mesh: volumes within the bound and 0.1 %, distances both
/// ways within the bound (the mesh's vertices lie on the exact surfaces, so they are
/// held to 1e-6 mm). Returns (relative volume difference, largest distances).
fn compare(
    shell: &BackShell,
    mesh: &TriMesh,
    bound: &MeshBound,
    max_rel: f64,
    what: &str,
) -> (f64, f64, f64) {
    let v_step = brep_volume(shell);
    let v_mesh = mesh.signed_volume();
    let rel = (v_step - v_mesh) / v_step;
    assert!(
        (v_step - v_mesh).abs() <= bound.volume && rel.abs() <= max_rel,
        "{what}: STEP {v_step:.3} mm³, mesh {v_mesh:.3} mm³ ({rel:.2e}), bound {:.3}",
        bound.volume
    );
    let samples = face_samples(shell, 0.5);
    let d_step = max_distance(&samples.iter().map(|s| s.point).collect::<Vec<_>>(), mesh);
    let d_mesh = max_distance_to_brep(mesh, shell, &samples, 1.0);
    // parry3d measures in single precision (about 1e-4 mm here).
    assert!(
        d_step <= bound.distance + 2e-4,
        "{what}: STEP faces to mesh {d_step} mm"
    );
    assert!(
        d_mesh <= bound.vertices,
        "{what}: mesh vertices to STEP faces {d_mesh} mm"
    );
    (rel, d_step, d_mesh)
}

#[test]
fn demo_blade_with_bore_and_round_tip() {
    let design = spanwright::design::load(Path::new("examples/garden-turbine.toml")).unwrap();
    let model = build_blade(&design, &Options::default()).unwrap();
    let root = model.blade.root().expect("the demo has a [root] table");
    assert!(root.bore.is_some());
    let solid = blade_solid(&model.skin, Some(root), model.blade.root_face()).unwrap();
    let text = step_text(
        &[(model.name.clone(), solid)],
        &StepHeader::default(),
        "blade.step",
    );
    dump("garden-turbine.step", &text);
    let shell = read_one(&text, "demo blade");
    // Skin (upper, lower, trailing edge), tip cap, root face, bore (2 walls, 2 cones).
    assert_eq!(shell.faces.len(), 3 + 1 + 1 + 4);
    let tol = design.blade.tolerance;
    let (rel, a, b) = compare(
        &shell,
        model.mesh(),
        &MeshBound::chordal(model.mesh(), tol),
        1e-3,
        "demo blade",
    );
    eprintln!("demo blade: volume {rel:.2e}, distances {a:.2e} / {b:.2e} mm");
}

#[test]
fn demo_blade_with_flange_fillet_and_cross_hole() {
    // The demo blade with a flange and fillet and a cross hole added to its [root].
    let path = Path::new("examples/garden-turbine.toml");
    let text = std::fs::read_to_string(path).unwrap().replace(
        "[root]\n",
        "[root]\nflange = { diameter = 40, thickness = 3, fillet = 2 }\ncross-holes = [{ diameter = 4, at = 18 }]\n",
    );
    let design = spanwright::design::parse_toml_str(&text, Some(path)).unwrap();
    let model = build_blade(&design, &Options::default()).unwrap();
    let genus = Some(model.expected_genus());
    let opts = spanwright::check::CheckOptions::DEFAULT.with_expected_genus(genus);
    assert!(spanwright::check::certify(model.part(), &opts).is_ok());
    let solid = blade_solid(&model.skin, model.blade.root(), model.blade.root_face()).unwrap();
    let text = step_text(
        &[(model.name.clone(), solid)],
        &StepHeader::default(),
        "blade.step",
    );
    dump("garden-turbine-flange-cross.step", &text);
    let shell = read_one(&text, "blade with flange and cross hole");
    // Skin 3, tip cap, fillet 3, plate top, rim 2, plate face, bore 4, cross hole 2.
    assert_eq!(shell.faces.len(), 3 + 1 + 3 + 1 + 2 + 1 + 4 + 2);
    // The mesh's hole rims lie on the ideal shank cylinder and its band around the
    // holes has points between the skin's rows: those vertices are within the
    // tolerance of the exact faces, not on them.
    let tol = design.blade.tolerance;
    let bound = MeshBound {
        vertices: tol,
        ..MeshBound::chordal(model.mesh(), tol)
    };
    let (rel, a, b) = compare(
        &shell,
        model.mesh(),
        &bound,
        1e-3,
        "blade with flange and cross hole",
    );
    eprintln!(
        "demo blade with flange and cross hole: volume {rel:.2e}, distances {a:.2e} / {b:.2e} mm"
    );
}

#[test]
fn demo_hub_with_sockets_bore_and_bolt_holes() {
    let design = spanwright::design::load(Path::new("examples/garden-turbine.toml")).unwrap();
    let outcome = spanwright::pipeline::run(&design, &Options::default()).unwrap();
    let rotor = outcome.rotor.as_ref().expect("the demo has a rotor");
    let hub = rotor.hub.as_ref().expect("the demo has a hub");
    let mesh = outcome
        .part(spanwright::pipeline::PartKind::Hub)
        .expect("hub part")
        .bodies[0]
        .mesh();
    assert!(hub.sockets.is_some() && hub.bore_radius.is_some() && hub.bolts.is_some());
    let solid = spanwright::brep::hub_solid(hub).unwrap();
    let text = step_text(
        &[("hub".to_string(), solid)],
        &StepHeader::default(),
        "hub.step",
    );
    dump("garden-turbine-hub.step", &text);
    let shell = read_one(&text, "demo hub");
    // Rim: 3 sectors; 3 sockets of 2 walls and a floor; bore and 3 bolt holes of 2
    // walls each; top and bottom.
    assert_eq!(shell.faces.len(), 3 + 3 * 3 + 4 * 2 + 2);
    // The rim's triangles between the socket openings lie within their chord's
    // sagitta R (1 - cos(dt / 2)) of the cylinder (elementary geometry), dt the largest
    // angle a triangle spans; the hub mesh keeps that within the tolerance. The bound
    // adds each facet's gap to the chordal one, and the gap is checked against the
    // tolerance.
    let tol = design.blade.tolerance;
    let mut bound = MeshBound::chordal(mesh, tol);
    for k in 0..mesh.len() {
        let c = mesh.corners(k);
        if c.iter().all(|p| (p.x.hypot(p.z) - hub.radius).abs() < 1e-9) {
            let th: Vec<f64> = c.iter().map(|p| p.x.atan2(p.z)).collect();
            let mut dt: f64 = 0.0;
            for i in 0..3 {
                let x = (th[i] - th[(i + 1) % 3]).abs();
                dt = dt.max(x.min(2.0 * std::f64::consts::PI - x));
            }
            let gap = hub.radius * (1.0 - (0.5 * dt).cos());
            bound.volume += 0.5 * mesh.scaled_normal(k).norm() * gap;
            bound.distance = bound.distance.max(gap);
        }
    }
    assert!(
        bound.distance <= tol * (1.0 + 1e-9),
        "rim gap {} mm over the tolerance {tol} mm",
        bound.distance
    );
    let (rel, a, b) = compare(&shell, mesh, &bound, 1e-3, "demo hub");
    eprintln!("demo hub: mesh rim gap up to {:.4} mm", bound.distance);
    eprintln!("demo hub: volume {rel:.2e}, distances {a:.2e} / {b:.2e} mm");
    // The disc less its holes and sockets by elementary formulas (the sockets' by
    // Simpson's rule), computed by the hub itself: the exact solid agrees to 1e-6.
    let v = brep_volume(&shell);
    assert!(
        (v / hub.exact_volume() - 1.0).abs() < 1e-6,
        "{v} vs {}",
        hub.exact_volume()
    );
}

#[test]
fn desk_fan_one_piece_rotor() {
    use spanwright::assembly::blade_transform;
    use spanwright::brep::{one_piece_solid, PrismHub};
    let design = spanwright::design::load(Path::new("examples/desk-fan.toml")).unwrap();
    let outcome = spanwright::pipeline::run(&design, &Options::default()).unwrap();
    let model = &outcome.blade;
    let rotor = outcome.rotor.as_ref().expect("[rotor]").spec.clone();
    let spec = rotor.one_piece.clone().expect("[rotor.one-piece]");
    let part = outcome
        .part(spanwright::pipeline::PartKind::OnePiece)
        .expect("one-piece part")
        .bodies[0]
        .as_part()
        .clone();
    let rotation = design.blade.rotation;
    let z0 = model.blade.root_face();
    let ring: Vec<nalgebra::Point3<f64>> = model
        .tessellation
        .root_ring
        .iter()
        .map(|&i| model.mesh().vertices[i as usize])
        .collect();
    let hub = PrismHub::new(&ring, z0, &rotor, rotation, &spec);
    let placements: Vec<_> = (0..rotor.blades)
        .map(|k| blade_transform(&rotor, rotation, z0, k))
        .collect();
    let solid = one_piece_solid(&model.skin, &placements, &hub).unwrap();
    let text = step_text(
        &[(part.name.clone(), solid)],
        &StepHeader::default(),
        "fan.step",
    );
    dump("desk-fan-one-piece.step", &text);
    let shell = read_one(&text, "one-piece rotor");
    // Five blades (upper, lower, trailing edge, tip), five side faces, two end faces,
    // bore (two walls).
    assert_eq!(shell.faces.len(), 5 * 4 + 5 + 2 + 2);
    let tol = design.blade.tolerance;
    let (rel, a, b) = compare(
        &shell,
        &part.mesh,
        &MeshBound::chordal(&part.mesh, tol),
        1e-3,
        "one-piece rotor",
    );
    eprintln!("desk fan one-piece: volume {rel:.2e}, distances {a:.2e} / {b:.2e} mm");
}
