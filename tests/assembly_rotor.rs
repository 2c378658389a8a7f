//! Rotor assembly, rotation sense and flow side, and the hub body, against elementary
//! geometry and the conventions of `spanwright::conventions`.

mod support;

use nalgebra::{Matrix4, Point3, Vector3};
use spanwright::assembly::{
    check_hand, hand_description, hand_radii, BladeFacts, HandOptions, HandReport, Hub, RotorSpec,
    Side,
};
use spanwright::check::{check_solid, CheckOptions};
use spanwright::design::{parse_toml_str, Design, Flow, Rotation};
use spanwright::mesh::{Part, TriMesh};
use spanwright::pipeline::{
    blade_facts, build_blade, read_rotor, run, Options, PartKind, PipelineError,
};
use std::f64::consts::PI;

/// The assembled rotor of a design as the pipeline builds it, seen as plain parts.
#[derive(Debug)]
struct Built {
    blades: Vec<Part>,
    hub: Option<Part>,
    hub_shape: Option<Hub>,
    transforms: Vec<Matrix4<f64>>,
    rotation: Rotation,
    flow: Flow,
    station_radii: Vec<f64>,
}

impl Built {
    /// Every body, blades first.
    fn parts(&self) -> Vec<Part> {
        let mut out = self.blades.clone();
        out.extend(self.hub.clone());
        out
    }

    /// The genus each body of `parts` must have.
    fn expected_genus(&self) -> Vec<u32> {
        let mut out = vec![0; self.blades.len()];
        out.extend(self.hub_shape.as_ref().map(Hub::genus));
        out
    }

    /// All bodies appended in one mesh.
    fn envelope(&self) -> TriMesh {
        let mut m = TriMesh::new();
        for p in self.parts() {
            m.append(&p.mesh);
        }
        m
    }

    /// The rotation-sense check of every placed blade.
    fn check_hand(&self, opts: &HandOptions) -> Vec<HandReport> {
        let radii = hand_radii(&self.station_radii);
        self.blades
            .iter()
            .zip(&self.transforms)
            .map(|(p, m)| check_hand(&p.mesh, m, &radii, self.rotation, self.flow, opts))
            .collect()
    }
}

/// Runs the pipeline and returns its assembled rotor (an error without a `[rotor]`
/// table).
fn build_rotor(d: &Design) -> Result<Built, PipelineError> {
    let outcome = run(d, &Options::default())?;
    let rotor = outcome.rotor.clone().ok_or_else(|| {
        PipelineError::from(spanwright::design::DesignError::one(
            d.problem("rotor", "no [rotor] table: add one with `blades`"),
        ))
    })?;
    let bodies = &outcome.part(PartKind::Rotor).expect("rotor part").bodies;
    let plain = |b: &spanwright::check::CheckedPart| b.as_part().clone();
    let hub = outcome.part(PartKind::Hub).map(|h| plain(&h.bodies[0]));
    let n = rotor.transforms.len();
    Ok(Built {
        blades: bodies[..n].iter().map(plain).collect(),
        hub,
        hub_shape: rotor.hub.clone(),
        transforms: rotor.transforms.clone(),
        rotation: rotor.rotation,
        flow: rotor.flow,
        station_radii: rotor.station_radii.clone(),
    })
}

/// The design's validated `[rotor]` table.
fn rotor_spec(d: &Design) -> RotorSpec {
    read_rotor(d).expect("valid").expect("table")
}

/// A small invented demo blade (not a real design), cheap to build in a debug test.
fn design(rotation: &str, flow: &str, section: &str, twist: (f64, f64), rotor: &str) -> Design {
    let text = format!(
        r#"
        name = "demo"
        [blade]
        section = "{section}"
        flow = "{flow}"
        rotation = "{rotation}"
        points-per-side = 40
        tolerance = 0.05
        [[station]]
        radius = 40
        chord = 30
        twist = {t0}
        [[station]]
        radius = 80
        chord = 24
        twist = {tm}
        [[station]]
        radius = 120
        chord = 16
        twist = {t1}
        [rotor]
        {rotor}
        "#,
        t0 = twist.0,
        tm = 0.5 * (twist.0 + twist.1),
        t1 = twist.1,
    );
    parse_toml_str(&text, None).expect("valid demo design")
}

const ROTOR: &str = r#"
        blades = 3
        pitch = 4
        cone = 5
        azimuth-offset = 10
        [rotor.hub]
        diameter = 60
        thickness = 12
        bore = 8
        bolt-count = 3
        bolt-diameter = 4
        bolt-circle = 30
"#;

/// Vertices sorted lexicographically, to compare meshes whose vertex order may differ.
/// The sort key is rounded to 1e-6 mm so that rounding noise (1e-15) in one coordinate
/// does not reorder points; the values compared are the exact ones.
fn sorted(vs: impl Iterator<Item = Point3<f64>>) -> Vec<[f64; 3]> {
    let mut v: Vec<[f64; 3]> = vs.map(|p| [p.x, p.y, p.z]).collect();
    let key = |p: &[f64; 3]| p.map(|c| (c * 1e6).round() as i64);
    v.sort_by_key(key);
    v
}

/// Volume centroid of a closed mesh: signed tetrahedra from the origin, each weighted
/// by its volume, centroid (0 + a + b + c) / 4 (divergence theorem, elementary).
fn centroid(m: &TriMesh) -> Point3<f64> {
    let (mut v, mut c) = (0.0, Vector3::zeros());
    for t in 0..m.len() {
        let [a, b, cc] = m.corners(t);
        let dv = a.coords.dot(&b.coords.cross(&cc.coords)) / 6.0;
        v += dv;
        c += (a.coords + b.coords + cc.coords) * (dv / 4.0);
    }
    Point3::from(c / v)
}

#[test]
fn clockwise_rotor_is_the_mirror_of_the_counter_clockwise_one() {
    // Conventions: a clockwise rotor is the mirror image (x -> -x) of the
    // counter-clockwise one; pitch, cone and azimuth are defined so that this holds
    // blade by blade (a mirror conjugates a rotation about y or z into its inverse and
    // leaves a rotation about x unchanged: elementary linear algebra).
    let pairs = [
        (
            design("ccw", "turbine", "naca4412", (20.0, 5.0), ROTOR),
            design("cw", "turbine", "naca4412", (20.0, 5.0), ROTOR),
        ),
        (
            socket_design("ccw", SOCKET_HUB),
            socket_design("cw", SOCKET_HUB),
        ),
    ];
    for (dccw, dcw) in pairs {
        let ccw = build_rotor(&dccw).expect("ccw rotor");
        let cw = build_rotor(&dcw).expect("cw rotor");
        let (a, b) = (ccw.parts(), cw.parts());
        assert_eq!(a.len(), 4);
        assert_eq!(b.len(), 4);
        for (pa, pb) in a.iter().zip(&b) {
            let mirrored = sorted(pa.mesh.vertices.iter().map(|p| Point3::new(-p.x, p.y, p.z)));
            let other = sorted(pb.mesh.vertices.iter().copied());
            assert_eq!(mirrored.len(), other.len(), "{}", pa.name);
            let worst = mirrored
                .iter()
                .zip(&other)
                .map(|(p, q)| (0..3).map(|i| (p[i] - q[i]).abs()).fold(0.0, f64::max))
                .fold(0.0, f64::max);
            assert!(worst < 1e-9, "{}: vertices differ by {worst} mm", pa.name);
            assert_eq!(pa.mesh.triangles.len(), pb.mesh.triangles.len());
            let (va, vb) = (pa.mesh.signed_volume(), pb.mesh.signed_volume());
            assert!((va / vb - 1.0).abs() < 1e-12, "{}: {va} vs {vb}", pa.name);
        }
    }
}

#[test]
fn assembled_volume_is_blades_times_blade_volume_plus_hub() {
    // Rigid motions preserve volume (elementary), and the envelope appends separate
    // bodies, so V = B V_blade + V_hub.
    let d = design("ccw", "turbine", "naca4412", (20.0, 5.0), ROTOR);
    let blade = build_blade(&d, &Options::default()).expect("blade");
    let rotor = build_rotor(&d).expect("rotor");
    let vb = blade.mesh().signed_volume();
    let vh = rotor.hub.as_ref().expect("hub").mesh.signed_volume();
    for p in &rotor.blades {
        assert!(
            (p.mesh.signed_volume() / vb - 1.0).abs() < 1e-9,
            "{}",
            p.name
        );
        assert!(
            check_solid(&p.mesh, &CheckOptions::DEFAULT).is_ok(),
            "{}",
            p.name
        );
    }
    let total = rotor.envelope().signed_volume();
    let expected = 3.0 * vb + vh;
    assert!(
        (total / expected - 1.0).abs() < 1e-9,
        "{total} vs {expected}"
    );
}

#[test]
fn blades_are_spaced_evenly_in_the_sense_of_rotation() {
    // Elementary geometry: a rigid rotation about the axis by 360/B moves each blade's
    // centre of mass by 360/B in azimuth. Counter-clockwise seen from upstream means
    // from +z toward -x (conventions: the blade as built moves toward -x at +z).
    for (sense, sign) in [("ccw", -1.0), ("cw", 1.0)] {
        for blades in [2u32, 3, 5] {
            let rotor_text = format!("blades = {blades}\ncone = 3\npitch = 2");
            let d = design(sense, "turbine", "naca4412", (20.0, 5.0), &rotor_text);
            let rotor = build_rotor(&d).expect("rotor");
            assert_eq!(rotor.blades.len(), blades as usize);
            let angles: Vec<f64> = rotor
                .blades
                .iter()
                .map(|p| {
                    let c = centroid(&p.mesh);
                    c.x.atan2(c.z).to_degrees()
                })
                .collect();
            let r0 = {
                let c = centroid(&rotor.blades[0].mesh);
                (c.x * c.x + c.z * c.z).sqrt()
            };
            for (k, p) in rotor.blades.iter().enumerate() {
                let c = centroid(&p.mesh);
                assert!(((c.x * c.x + c.z * c.z).sqrt() - r0).abs() < 1e-9);
                let want = sign * 360.0 * k as f64 / blades as f64 + angles[0];
                let diff = (angles[k] - want + 540.0).rem_euclid(360.0) - 180.0;
                assert!(
                    diff.abs() < 1e-9,
                    "{sense} B={blades} blade {k}: {diff} degrees off"
                );
            }
        }
    }
}

#[test]
fn cone_tilts_blades_downstream_about_the_root() {
    // Rotation by the cone angle b about the x-parallel line through (0, 0, z_p) moves a
    // point (x, y, z) to (x, y cos b + (z - z_p) sin b, z_p + (z - z_p) cos b - y sin b)
    // (elementary rotation, tilting +z toward +y: downstream).
    let flat = build_rotor(&design(
        "ccw",
        "turbine",
        "naca4412",
        (20.0, 5.0),
        "blades = 1",
    ))
    .expect("flat");
    let coned = build_rotor(&design(
        "ccw",
        "turbine",
        "naca4412",
        (20.0, 5.0),
        "blades = 1\ncone = 8",
    ))
    .expect("coned");
    let (p, q) = (
        centroid(&flat.blades[0].mesh),
        centroid(&coned.blades[0].mesh),
    );
    let (s, c) = 8f64.to_radians().sin_cos();
    let zp = 40.0; // root face = first station (no [root] table)
    let want = Point3::new(p.x, p.y * c + (p.z - zp) * s, zp + (p.z - zp) * c - p.y * s);
    assert!((q - want).norm() < 1e-9, "{q} vs {want}");
    assert!(q.y > p.y + 3.0, "coned blade moved downstream");
}

#[test]
fn pitch_adds_to_twist() {
    // Conventions: pitch turns the leading edge upstream like twist, about the stacking
    // axis, so the chord makes twist + pitch with the plane of rotation. A symmetric,
    // closed NACA 0012 section makes the chord line the section's longest diameter (kept
    // closed: min-te-thickness 0, no trailing edge opened by default).
    for pitch in [-6.0, 0.0, 7.0] {
        let mut d = design(
            "ccw",
            "turbine",
            "naca0012-closed",
            (10.0, 10.0),
            &format!("blades = 2\npitch = {pitch}"),
        );
        d.blade.min_te_thickness = Some(0.0);
        let rotor = build_rotor(&d).expect("rotor");
        let (le, te) = support::chord_line_at(&rotor.blades[0].mesh, 100.0);
        let angle = (te.y - le.y).atan2(te.x - le.x).to_degrees();
        assert!(
            (angle - (10.0 + pitch)).abs() < 0.1,
            "pitch {pitch}: chord at {angle}"
        );
        // The stacking axis stays put: the quarter-chord point is at x = y = 0.
        let quarter = le + (te - le) * 0.25;
        assert!(quarter.x.abs() < 0.1 && quarter.y.abs() < 0.1, "{quarter}");
    }
}

#[test]
fn hand_check_passes_for_every_sense_and_mode() {
    // Kinematics: a point at r moves along omega x r; conventions: omega along -y for a
    // counter-clockwise rotor seen from upstream; the turbine's pressure side faces -y,
    // the propeller's suction side faces -y.
    for rot in ["ccw", "cw"] {
        for flow in ["turbine", "propeller"] {
            let d = design(rot, flow, "naca4412", (20.0, 5.0), ROTOR);
            let radii = hand_radii(&[40.0, 80.0, 120.0]);
            let blade = build_blade(&d, &Options::default()).expect("blade");
            let single = check_hand(
                blade.mesh(),
                &Matrix4::identity(),
                &radii,
                d.blade.rotation,
                d.blade.flow,
                &HandOptions::DEFAULT,
            );
            assert!(single.is_ok(), "{rot} {flow}: {single}");
            assert!(single.undetermined.is_empty(), "{rot} {flow}: {single}");
            assert!(single
                .stations
                .iter()
                .all(|s| s.lead > 0.9 && s.side == Side::Right));
            let rotor = build_rotor(&d).expect("rotor");
            for (p, m) in rotor.blades.iter().zip(&rotor.transforms) {
                let r = check_hand(
                    &p.mesh,
                    m,
                    &radii,
                    rotor.rotation,
                    rotor.flow,
                    &HandOptions::DEFAULT,
                );
                assert!(r.is_ok(), "{rot} {flow} {}: {r}", p.name);
            }
            // The same blade checked against the other sense trails everywhere.
            let other = match d.blade.rotation {
                Rotation::Ccw => Rotation::Cw,
                Rotation::Cw => Rotation::Ccw,
            };
            let wrong = check_hand(
                blade.mesh(),
                &Matrix4::identity(),
                &radii,
                other,
                d.blade.flow,
                &HandOptions::DEFAULT,
            );
            assert_eq!(wrong.trailing.len(), radii.len(), "{wrong}");
        }
    }
}

#[test]
fn mirrored_blade_fails_loudly() {
    // A blade mirrored in x without changing the design: the leading edge trails at
    // every station. Mirrored in y (flow side flipped): the pressure side faces
    // downstream at every station while the leading edge still leads.
    let d = design("ccw", "turbine", "naca4412", (20.0, 5.0), ROTOR);
    let blade = build_blade(&d, &Options::default()).expect("blade");
    let radii = hand_radii(&[40.0, 80.0, 120.0]);
    let mirror_x = blade
        .mesh()
        .transformed(&Matrix4::new_nonuniform_scaling(&Vector3::new(
            -1.0, 1.0, 1.0,
        )));
    let r = check_hand(
        &mirror_x,
        &Matrix4::identity(),
        &radii,
        Rotation::Ccw,
        Flow::Turbine,
        &HandOptions::DEFAULT,
    );
    assert!(!r.is_ok());
    assert_eq!(r.trailing, (0..radii.len()).collect::<Vec<_>>(), "{r}");
    let text = r.to_string();
    assert!(text.contains("FAILED") && text.contains("trails"), "{text}");
    let mirror_y = blade
        .mesh()
        .transformed(&Matrix4::new_nonuniform_scaling(&Vector3::new(
            1.0, -1.0, 1.0,
        )));
    let r = check_hand(
        &mirror_y,
        &Matrix4::identity(),
        &radii,
        Rotation::Ccw,
        Flow::Turbine,
        &HandOptions::DEFAULT,
    );
    assert!(r.trailing.is_empty(), "{r}");
    assert_eq!(r.wrong_side, (0..radii.len()).collect::<Vec<_>>(), "{r}");
}

#[test]
fn symmetric_sections_leave_the_side_undetermined() {
    // A symmetric section has no camber (NACA 00xx, Report 460): no flow side to tell.
    let d = design("ccw", "turbine", "naca0012", (20.0, 5.0), "blades = 2");
    let blade = build_blade(&d, &Options::default()).expect("blade");
    let radii = hand_radii(&[40.0, 80.0, 120.0]);
    let r = check_hand(
        blade.mesh(),
        &Matrix4::identity(),
        &radii,
        Rotation::Ccw,
        Flow::Turbine,
        &HandOptions::DEFAULT,
    );
    assert!(r.is_ok(), "{r}");
    assert_eq!(r.undetermined.len(), radii.len(), "{r}");
}

#[test]
fn hub_is_a_solid_of_the_right_genus_and_volume() {
    // Exact volume: pi (R^2 - r_b^2 - n r_h^2) t (elementary). Each circle is an
    // inscribed polygon whose area is short of the circle's by at most perimeter x
    // sagitta <= 2 pi r tol, so |V_mesh - V_exact| <= t tol 2 pi (R + r_b + n r_h).
    let d = design("ccw", "turbine", "naca4412", (20.0, 5.0), ROTOR);
    let rotor = build_rotor(&d).expect("rotor");
    let hub = rotor.hub_shape.as_ref().expect("hub");
    assert_eq!(hub.genus(), 4, "bore + 3 bolt holes");
    assert_eq!(rotor.expected_genus(), vec![0, 0, 0, 4]);
    for (p, g) in rotor.parts().iter().zip(rotor.expected_genus()) {
        let r = check_solid(&p.mesh, &CheckOptions::DEFAULT.with_expected_genus(Some(g)));
        assert!(r.is_ok(), "{}: {r}", p.name);
    }
    let mesh = &rotor.hub.as_ref().expect("hub part").mesh;
    let report = check_solid(mesh, &CheckOptions::DEFAULT.with_expected_genus(Some(4)));
    assert!(report.is_ok(), "{report}");
    let (rr, t, rb, rh, n) = (30.0, 12.0, 4.0, 2.0, 3.0);
    let exact = PI * (rr * rr - rb * rb - n * rh * rh) * t;
    let tol = d.blade.tolerance;
    let bound = t * tol * 2.0 * PI * (rr + rb + n * rh);
    let v = mesh.signed_volume();
    eprintln!("plain hub: mesh {v:.3} mm³, exact {exact:.3} mm³, bound {bound:.3}");
    assert!((v - exact).abs() <= bound, "{v} vs {exact} (bound {bound})");
    assert!((hub.exact_volume() - exact).abs() < 1e-9);
    // Thickness along the rotor axis and diameter across it.
    let bb = mesh.bounding_box().expect("box");
    assert!((bb.size().y - t).abs() < 1e-12);
    assert!((bb.size().x - 2.0 * rr).abs() < 2.0 * tol);
    // Without bore and bolts the disc is genus 0.
    let plain = build_rotor(&design(
        "ccw",
        "turbine",
        "naca4412",
        (20.0, 5.0),
        "blades = 3\n[rotor.hub]\nthickness = 10\ndiameter = 60",
    ))
    .expect("plain");
    let m = &plain.hub.as_ref().expect("hub").mesh;
    let report = check_solid(m, &CheckOptions::DEFAULT.with_expected_genus(Some(0)));
    assert!(report.is_ok(), "{report}");
}

#[test]
fn bad_rotor_tables_name_their_key() {
    let cases = [
        ("blades = 0", "rotor.blades"),
        ("blades = 3\nhub-radius = -1", "rotor.hub-radius"),
        ("blades = 3\ncone = 60", "rotor.cone"),
        ("blades = 3\npitch = 95", "rotor.pitch"),
        ("blades = 3\nspin = 2", "rotor.spin"),
        ("blades = 3\n[rotor.hub]\nthickness = 10\ndiameter = 60\nbore = 59", "rotor.hub.bore"),
        (
            "blades = 3\n[rotor.hub]\nthickness = 10\ndiameter = 60\nbolt-count = 4\nbolt-diameter = 5",
            "rotor.hub.bolt-circle",
        ),
        (
            "blades = 3\n[rotor.hub]\nthickness = 10\ndiameter = 60\nbolt-count = 12\nbolt-diameter = 8\nbolt-circle = 30",
            "rotor.hub.bolt-circle",
        ),
    ];
    for (table, key) in cases {
        let d = design("ccw", "turbine", "naca4412", (20.0, 5.0), table);
        let e = build_rotor(&d).expect_err("fails").to_string();
        assert!(e.contains(key), "{table}: {e}");
    }
    // No [rotor] table at all.
    let mut d = design("ccw", "turbine", "naca4412", (20.0, 5.0), "blades = 3");
    d.tables.remove("rotor");
    let e = build_rotor(&d).expect_err("fails").to_string();
    assert!(e.contains("rotor") && e.contains("blades"), "{e}");
}

#[test]
fn description_words() {
    let d = design("cw", "turbine", "naca4412", (20.0, 5.0), ROTOR);
    let spec = rotor_spec(&d);
    let s = hand_description(&spec, d.blade.rotation, d.blade.flow);
    assert!(s.contains("3 blades, 120 degrees apart"), "{s}");
    assert!(s.contains("turns clockwise seen from upstream"), "{s}");
    assert!(s.contains("pressure sides face the wind"), "{s}");
    let d = design("ccw", "propeller", "naca4412", (20.0, 5.0), ROTOR);
    let s = hand_description(&spec, d.blade.rotation, d.blade.flow);
    assert!(
        s.contains("counter-clockwise") && s.contains("suction sides face upstream"),
        "{s}"
    );
}

/// Shank diameter of the socket demo, mm.
const SHANK: f64 = 11.0;

/// A demo blade with a round shank (invented data): root face at 70 - 25 - 20 = 25 mm.
fn socket_design(rotation: &str, hub: &str) -> Design {
    let text = format!(
        r#"
        name = "socketed"
        [blade]
        section = "naca4412"
        rotation = "{rotation}"
        points-per-side = 40
        tolerance = 0.05
        [[station]]
        radius = 70
        chord = 30
        twist = 20
        [[station]]
        radius = 110
        chord = 24
        twist = 10
        [[station]]
        radius = 150
        chord = 16
        twist = 4
        [root]
        shank-diameter = {SHANK}
        shank-length = 20
        transition-length = 25
        [rotor]
        blades = 3
        pitch = 3
        azimuth-offset = 15
        [rotor.hub]
        {hub}
        "#
    );
    parse_toml_str(&text, None).expect("valid demo design")
}

const SOCKET_HUB: &str =
    "thickness = 14\nbore = 8\nbolt-count = 3\nbolt-diameter = 4\nbolt-circle = 30";

#[test]
fn hub_sockets_hold_the_shanks_with_clearance() {
    // The socket is a cylinder of the shank diameter + clearance (0.3 mm default) along
    // the blade's span axis, floor half the clearance below the root face: every blade
    // vertex inside the hub's radius lies within the shank radius (plus the shank's
    // trailing-edge allowance) of the socket axis and
    // beyond the root face (elementary geometry), and blades and hub neither cross nor
    // touch, so the envelope's only finding is its four components.
    for rot in ["ccw", "cw"] {
        let d = socket_design(rot, SOCKET_HUB);
        let rotor = build_rotor(&d).expect("rotor");
        let hub = rotor.hub_shape.as_ref().expect("hub");
        let sockets = hub.sockets.as_ref().expect("sockets");
        assert!((sockets.radius - 0.5 * (SHANK + 0.3)).abs() < 1e-12);
        assert!((sockets.floor - (25.0 - 0.15)).abs() < 1e-12);
        for (p, m) in rotor.blades.iter().zip(&rotor.transforms) {
            let axis = m.transform_vector(&Vector3::z());
            assert!(
                axis.y.abs() < 1e-12,
                "socket axes lie in the plane of rotation"
            );
            for v in &p.mesh.vertices {
                if v.x * v.x + v.z * v.z < 35.0 * 35.0 {
                    let along = v.coords.dot(&axis);
                    let off = (v.coords - axis * along).norm();
                    // The shank's two trailing-edge points are held the airfoil's
                    // trailing-edge gap apart (src/root.rs), up to half that gap (0.04
                    // mm here) off the circle.
                    assert!(
                        off <= 0.5 * SHANK + 0.05,
                        "{}: {off} mm off the socket axis",
                        p.name
                    );
                    assert!(along >= 25.0 - 1e-9, "{}: below the root face", p.name);
                }
            }
        }
        let mesh = &rotor.hub.as_ref().expect("hub").mesh;
        let report = check_solid(mesh, &CheckOptions::DEFAULT.with_expected_genus(Some(4)));
        assert!(report.is_ok(), "{rot}: {report}");
        let env = check_solid(
            &rotor.envelope(),
            &CheckOptions::DEFAULT.with_expected_genus(None),
        );
        assert_eq!(env.components, 4, "{env}");
        assert!(
            env.findings
                .iter()
                .all(|f| matches!(f, spanwright::check::Finding::Components { .. })),
            "{rot}: {env}"
        );
    }
}

#[test]
fn socketed_hub_volume_matches_the_disc_minus_holes() {
    // Exact: pi (R^2 - r_b^2 - n r_h^2) t minus B sockets, each the integral over the
    // socket disc of (sqrt(R^2 - a^2) - floor) (elementary; checked here against an
    // independent Simpson sum in a). Mesh error bound: each polygon's area deficit is at
    // most perimeter x sagitta (tol), giving t tol 2 pi (r_b + n r_h) for the face
    // holes and B (R - floor) 2 pi r_s tol for the socket walls; each rim facet with
    // angular extent dt lies within R (1 - cos(dt / 2)) of the cylinder, so the rim adds
    // at most the sum of facet area x that gap (measured on the mesh).
    let d = socket_design("ccw", SOCKET_HUB);
    let rotor = build_rotor(&d).expect("rotor");
    let hub = rotor.hub_shape.as_ref().expect("hub");
    let s = hub.sockets.as_ref().expect("sockets");
    let (rr, t, tol) = (35.0, 14.0, d.blade.tolerance);
    let (rs, fl) = (s.radius, s.floor);
    let steps = 20_000;
    let mut socket = 0.0;
    for i in 0..steps {
        // Midpoint rule in a, integrand 2 sqrt(rs^2 - a^2) (sqrt(R^2 - a^2) - floor).
        let a = -rs + (i as f64 + 0.5) * 2.0 * rs / steps as f64;
        socket += 2.0 * (rs * rs - a * a).sqrt() * ((rr * rr - a * a).sqrt() - fl) * 2.0 * rs
            / steps as f64;
    }
    let exact = PI * (rr * rr - 16.0 - 3.0 * 4.0) * t - 3.0 * socket;
    assert!(
        (hub.exact_volume() - exact).abs() < 1e-3 * socket,
        "{} vs {exact}",
        hub.exact_volume()
    );
    let mesh = &rotor.hub.as_ref().expect("hub").mesh;
    let mut rim = 0.0;
    for k in 0..mesh.len() {
        let c = mesh.corners(k);
        if c.iter().all(|p| (p.x.hypot(p.z) - rr).abs() < 1e-9) {
            let th: Vec<f64> = c.iter().map(|p| p.x.atan2(p.z)).collect();
            let mut dt: f64 = 0.0;
            for i in 0..3 {
                let x = (th[i] - th[(i + 1) % 3]).abs();
                dt = dt.max(x.min(2.0 * PI - x));
            }
            rim += 0.5 * mesh.scaled_normal(k).norm() * rr * (1.0 - (0.5 * dt).cos());
        }
    }
    let bound =
        t * tol * 2.0 * PI * (rr + 4.0 + 3.0 * 2.0) + 3.0 * (rr - fl) * 2.0 * PI * rs * tol + rim;
    let v = mesh.signed_volume();
    eprintln!(
        "socketed hub: mesh {v:.3} mm³, exact {exact:.3} mm³, bound {bound:.3} (rim {rim:.3})"
    );
    assert!((v - exact).abs() <= bound, "{v} vs {exact} (bound {bound})");
}

#[test]
fn socket_problems_name_their_key() {
    let cases = [
        ("thickness = 10", "rotor.hub.thickness"),
        ("thickness = 14\nbore = 49", "rotor.hub.bore"),
        ("thickness = 14\ndiameter = 40", "rotor.hub.diameter"),
        ("thickness = 14\ndiameter = 100", "rotor.hub.diameter"),
        (
            "thickness = 14\nbolt-count = 6\nbolt-diameter = 4\nbolt-circle = 50",
            "rotor.hub.bolt-circle",
        ),
    ];
    for (hub, key) in cases {
        let d = socket_design("ccw", hub);
        let e = build_rotor(&d).expect_err("fails").to_string();
        assert!(e.contains(key), "{hub}: {e}");
    }
    // Radial sockets and a cone do not go together.
    let mut d = socket_design("ccw", "thickness = 14");
    if let Some(t) = d.tables.get_mut("rotor").and_then(|t| t.as_table_mut()) {
        t.insert("cone".into(), toml::Value::Float(4.0));
    }
    let e = build_rotor(&d).expect_err("fails").to_string();
    assert!(e.contains("rotor.cone"), "{e}");
    // Without sockets the shanks of the coned blades run into the solid hub disc: the
    // bodies meet, which is a failed check naming both bodies, not a rotor.
    let mut d = socket_design("ccw", "thickness = 14\nsockets = false");
    if let Some(t) = d.tables.get_mut("rotor").and_then(|t| t.as_table_mut()) {
        t.insert("cone".into(), toml::Value::Float(4.0));
    }
    let e = build_rotor(&d).expect_err("bodies meet");
    assert!(e.is_failed_check(), "{e}");
    let e = e.to_string();
    assert!(
        e.contains("socketed-blade-1") && e.contains("socketed-hub"),
        "{e}"
    );
}

#[test]
fn example_rotors_turn_the_way_their_files_say() {
    // The shipped examples (invented demo data): every placed blade's leading edge
    // leads along omega x r and its pressure side faces the way its mode needs (the
    // conventions; kinematics of a rigid rotation).
    for (file, blades) in [
        ("examples/garden-turbine.toml", 3),
        ("examples/desk-fan.toml", 5),
    ] {
        let d = spanwright::design::load(std::path::Path::new(file)).expect("example loads");
        let rotor = build_rotor(&d).expect("example rotor");
        assert_eq!(rotor.blades.len(), blades, "{file}");
        let reports = rotor.check_hand(&HandOptions::DEFAULT);
        assert_eq!(reports.len(), blades);
        for r in &reports {
            assert!(r.is_ok() && r.undetermined.is_empty(), "{file}: {r}");
        }
        let spec = rotor_spec(&d);
        let words = hand_description(&spec, d.blade.rotation, d.blade.flow);
        assert!(words.contains(&format!("{blades} blades")), "{words}");
    }
}

#[test]
fn hubs_over_a_range_of_blades_bolts_and_tolerances_are_solids() {
    // Every combination must pass the mesh checks (closed, oriented, no self-
    // intersection) with genus = bore + bolt holes (Euler: V - E + F = 2 - 2g).
    use spanwright::assembly::HubSpec;
    let d = socket_design("ccw", "thickness = 14");
    let blade = build_blade(&d, &Options::default()).expect("blade");
    let facts: BladeFacts = blade_facts(&d, &blade);
    let mut built = 0;
    for blades in 1..=5u32 {
        for (bolts, circle) in [(0u32, 0.0), (2, 30.0), (5, 28.0)] {
            for (tol, offset, bore) in [(0.05, 0.0, Some(8.0)), (0.01, 37.0, None)] {
                let hub = HubSpec {
                    thickness: 14.0,
                    diameter: None,
                    bore,
                    bolt_count: bolts,
                    bolt_diameter: (bolts > 0).then_some(3.0),
                    bolt_circle: (bolts > 0).then_some(circle),
                    min_wall: 0.8,
                    sockets: true,
                    socket_clearance: 0.3,
                };
                let spec = RotorSpec {
                    blades,
                    hub_radius: None,
                    pitch: 0.0,
                    cone: 0.0,
                    azimuth_offset: offset,
                    hub: Some(hub.clone()),
                    one_piece: None,
                };
                let case = format!("B={blades} bolts={bolts} tol={tol} offset={offset}");
                let resolved = hub
                    .resolve(&spec, &facts)
                    .unwrap_or_else(|e| panic!("{case}: {e}"));
                assert_eq!(
                    resolved.sockets.as_ref().map(|s| s.angles.len()),
                    Some(blades as usize)
                );
                let genus = u32::from(bore.is_some()) + bolts;
                let report = check_solid(
                    &resolved.mesh(tol),
                    &CheckOptions::DEFAULT.with_expected_genus(Some(genus)),
                );
                assert!(report.is_ok(), "{case}: {report}");
                built += 1;
            }
        }
    }
    assert_eq!(built, 30);
}

#[test]
fn socket_clearance_holds_at_every_tolerance() {
    // The demo's shanks sit in hub sockets 0.3 mm wider (rotor.hub.socket-clearance,
    // 0.15 mm all round). A shank's mesh lies inside its exact cylinder (vertices on it,
    // flats within the tolerance inside), so the socket's polygon is circumscribed about
    // its own circle: every socket vertex lies at least the nominal socket radius from
    // the socket axis, and the rotor's bodies stay apart at every tolerance up to the
    // coarsest the demo's chords allow (1.25 mm, 20 tolerances of its 25 mm chord). At
    // 0.15 mm an inscribed socket had reached the shanks (238 crossing triangle pairs).
    let design =
        spanwright::design::load(std::path::Path::new("examples/garden-turbine.toml")).unwrap();
    for tol in [0.01, 0.15, 0.3, 1.0, 1.25] {
        let out = run(
            &design,
            &Options {
                tolerance: Some(tol),
                ..Options::default()
            },
        )
        .unwrap_or_else(|e| panic!("tolerance {tol}: {e}"));
        let hub = out
            .rotor
            .as_ref()
            .and_then(|r| r.hub.as_ref())
            .expect("a hub");
        let s = hub.sockets.as_ref().expect("sockets");
        let mesh = out.part(PartKind::Hub).expect("the hub part").bodies[0].mesh();
        let mut on_walls = 0;
        for p in &mesh.vertices {
            for &angle in &s.angles {
                let psi = angle.to_radians();
                let d = Vector3::new(psi.sin(), 0.0, psi.cos());
                let along = p.coords.dot(&d);
                let off = (p.coords - d * along).norm();
                if along >= s.floor - 1e-6 && (off - s.radius).abs() <= 2.0 * tol {
                    on_walls += 1;
                    assert!(
                        off >= s.radius - 1e-9,
                        "tolerance {tol}: a socket vertex {off} from its axis, socket radius {}",
                        s.radius
                    );
                }
            }
        }
        assert!(
            on_walls >= 3 * 2 * 12,
            "tolerance {tol}: {on_walls} socket vertices"
        );
    }
}
