//! Helpers for the exact-solid tests: read a STEP text back with truck-stepio (an
//! independent reader of ISO 10303-21), check its topology with truck's own graded
//! check and edge by edge, tessellate it with truck-meshalgo, and measure volumes and
//! distances (parry3d for point-to-mesh distances).
#![allow(dead_code)]

use nalgebra::Point3;
use spanwright::brep::edge_uses;
use spanwright::mesh::TriMesh;
use truck_meshalgo::prelude::*;
use truck_stepio::r#in::Table;

/// One solid's shell as read back from a STEP text.
pub type BackShell = truck_topology::compress::CompressedShell<
    truck_stepio::r#in::alias::Point3,
    truck_stepio::r#in::alias::Curve3D,
    truck_stepio::r#in::alias::Surface,
>;

/// Every shell of `text`, in the order of their entity numbers (truck-stepio parses
/// the file; a failure fails the test).
pub fn read_shells(text: &str) -> Vec<BackShell> {
    let table = Table::from_step(text).expect("truck-stepio parses the file");
    let mut ids: Vec<_> = table.shell.keys().copied().collect();
    ids.sort_unstable();
    ids.iter()
        .map(|id| {
            table
                .to_compressed_shell(&table.shell[id])
                .expect("the shell converts")
        })
        .collect()
}

/// Asserts the read-back shell is closed: every edge used by exactly two faces in
/// opposite senses (checked edge by edge), and truck's own graded check (after
/// rebuilding the topology from the file) says `Closed`.
pub fn assert_closed(shell: &BackShell, what: &str) {
    let problems = edge_uses(shell);
    assert!(
        problems.is_empty(),
        "{what}: {}",
        problems
            .iter()
            .map(|p| p.to_string())
            .collect::<Vec<_>>()
            .join("; ")
    );
    let topo = truck_topology::Shell::extract(shell.clone()).expect("topology rebuilds");
    assert_eq!(
        topo.shell_condition(),
        truck_topology::shell::ShellCondition::Closed,
        "{what}: truck's graded check"
    );
}

/// The read-back shell tessellated by truck-meshalgo (chordal tolerance `tol`, mm) and
/// welded at shared edges.
pub fn tessellate(shell: &BackShell, tol: f64) -> PolygonMesh {
    let mut poly = shell.triangulation(tol).to_polygon();
    poly.put_together_same_attrs(1e-7)
        .remove_degenerate_faces()
        .remove_unused_attrs();
    poly
}

/// The tessellation as a project mesh (for volumes and distances).
pub fn to_trimesh(poly: &PolygonMesh) -> TriMesh {
    let mut m = TriMesh::new();
    for p in poly.positions() {
        m.push_vertex(Point3::new(p.x, p.y, p.z));
    }
    for t in poly.tri_faces() {
        m.triangles
            .push([t[0].pos as u32, t[1].pos as u32, t[2].pos as u32]);
    }
    m
}

/// Volume of a closed tessellation by truck-meshalgo (divergence theorem).
pub fn volume(poly: &PolygonMesh) -> f64 {
    poly.volume()
}

/// Largest distance from any of `points` to the surface of `mesh` (parry3d, single
/// precision: coordinates are moved to the mesh's centre first, so at part sizes below a
/// metre the rounding stays under 1e-4 mm).
pub fn max_distance(points: &[Point3<f64>], mesh: &TriMesh) -> f64 {
    let bb = mesh.bounding_box().expect("a mesh with vertices");
    let c = nalgebra::center(&bb.min, &bb.max);
    let v: Vec<parry3d::math::Vector> = mesh
        .vertices
        .iter()
        .map(|p| {
            parry3d::math::Vector::new((p.x - c.x) as f32, (p.y - c.y) as f32, (p.z - c.z) as f32)
        })
        .collect();
    let tm =
        parry3d::shape::TriMesh::new(v, mesh.triangles.clone()).expect("parry3d builds the mesh");
    use parry3d::query::PointQuery;
    points
        .iter()
        .map(|p| {
            let q = parry3d::math::Vector::new(
                (p.x - c.x) as f32,
                (p.y - c.y) as f32,
                (p.z - c.z) as f32,
            );
            tm.distance_to_local_point(q, false) as f64
        })
        .fold(0.0, f64::max)
}

/// The data section of a STEP text as records by entity number (ruststep 0.4, an
/// ISO 10303-21 parser): one record for a simple entity, the partial records of a
/// complex one.
pub fn records(text: &str) -> std::collections::BTreeMap<u64, Vec<ruststep::ast::Record>> {
    use ruststep::ast::EntityInstance;
    let ex = ruststep::parser::parse(text).expect("ruststep parses the file");
    let mut out = std::collections::BTreeMap::new();
    for ds in ex.data {
        for e in ds.entities {
            match e {
                EntityInstance::Simple { id, record } => {
                    out.insert(id, vec![record]);
                }
                EntityInstance::Complex { id, subsuper } => {
                    out.insert(id, subsuper.0);
                }
            }
        }
    }
    out
}

/// The arguments of a record.
pub fn args(r: &ruststep::ast::Record) -> Vec<ruststep::ast::Parameter> {
    match &r.parameter {
        ruststep::ast::Parameter::List(v) => v.clone(),
        p => vec![p.clone()],
    }
}

fn ints(p: &ruststep::ast::Parameter) -> Vec<i64> {
    match p {
        ruststep::ast::Parameter::List(v) => v
            .iter()
            .map(|x| match x {
                ruststep::ast::Parameter::Integer(i) => *i,
                other => panic!("not an integer: {other:?}"),
            })
            .collect(),
        other => panic!("not a list: {other:?}"),
    }
}

fn reals(p: &ruststep::ast::Parameter) -> Vec<f64> {
    match p {
        ruststep::ast::Parameter::List(v) => v
            .iter()
            .map(|x| match x {
                ruststep::ast::Parameter::Real(r) => *r,
                ruststep::ast::Parameter::Integer(i) => *i as f64,
                other => panic!("not a number: {other:?}"),
            })
            .collect(),
        other => panic!("not a list: {other:?}"),
    }
}

fn list_len(p: &ruststep::ast::Parameter) -> Vec<usize> {
    match p {
        ruststep::ast::Parameter::List(v) => match v.first() {
            Some(ruststep::ast::Parameter::List(_)) => {
                let mut out = vec![v.len()];
                out.extend(list_len(&v[0]));
                out
            }
            _ => vec![v.len()],
        },
        _ => vec![],
    }
}

/// Checks every B-spline curve and surface of a STEP text against ISO 10303-42's rules
/// for `b_spline_curve_with_knots` / `b_spline_surface_with_knots`: knots strictly
/// increasing, multiplicities adding up to control points + degree + 1, end
/// multiplicities at most degree + 1 (clamped: equal), inner ones at most the degree.
/// Returns how many knot vectors were checked.
pub fn assert_knots_valid(text: &str) -> usize {
    let mut checked = 0;
    let check = |id: u64, deg: i64, n: usize, mults: &[i64], knots: &[f64]| {
        assert_eq!(mults.len(), knots.len(), "#{id}: knots and multiplicities");
        assert!(
            knots.windows(2).all(|w| w[1] > w[0]),
            "#{id}: knots {knots:?} not increasing"
        );
        assert_eq!(
            mults.iter().sum::<i64>() as usize,
            n + deg as usize + 1,
            "#{id}: multiplicities {mults:?} for {n} points, degree {deg}"
        );
        assert_eq!(mults[0], deg + 1, "#{id}: first multiplicity {mults:?}");
        assert_eq!(
            mults[mults.len() - 1],
            deg + 1,
            "#{id}: last multiplicity {mults:?}"
        );
        for m in &mults[1..mults.len() - 1] {
            assert!(
                *m <= deg,
                "#{id}: inner multiplicity {m} > degree {deg} in {mults:?}"
            );
        }
    };
    for (id, recs) in records(text) {
        let find = |name: &str| recs.iter().find(|r| r.name == name).map(args);
        if let Some(a) = find("B_SPLINE_CURVE_WITH_KNOTS") {
            let (deg, n, m, k) = if a.len() == 9 {
                let ruststep::ast::Parameter::Integer(d) = a[1] else {
                    panic!("#{id} degree")
                };
                (d, list_len(&a[2])[0], ints(&a[6]), reals(&a[7]))
            } else {
                let b = find("B_SPLINE_CURVE").expect("complex curve has B_SPLINE_CURVE");
                let ruststep::ast::Parameter::Integer(d) = b[0] else {
                    panic!("#{id} degree")
                };
                (d, list_len(&b[1])[0], ints(&a[0]), reals(&a[1]))
            };
            check(id, deg, n, &m, &k);
            checked += 1;
        }
        if let Some(a) = find("B_SPLINE_SURFACE_WITH_KNOTS") {
            let (du, dv, nn, mu, mv, ku, kv) = if a.len() == 13 {
                let (ruststep::ast::Parameter::Integer(du), ruststep::ast::Parameter::Integer(dv)) =
                    (&a[1], &a[2])
                else {
                    panic!("#{id} degrees")
                };
                (
                    *du,
                    *dv,
                    list_len(&a[3]),
                    ints(&a[8]),
                    ints(&a[9]),
                    reals(&a[10]),
                    reals(&a[11]),
                )
            } else {
                let b = find("B_SPLINE_SURFACE").expect("complex surface has B_SPLINE_SURFACE");
                let (ruststep::ast::Parameter::Integer(du), ruststep::ast::Parameter::Integer(dv)) =
                    (&b[0], &b[1])
                else {
                    panic!("#{id} degrees")
                };
                (
                    *du,
                    *dv,
                    list_len(&b[2]),
                    ints(&a[0]),
                    ints(&a[1]),
                    reals(&a[2]),
                    reals(&a[3]),
                )
            };
            check(id, du, nn[0], &mu, &ku);
            check(id, dv, nn[1], &mv, &kv);
            checked += 2;
        }
    }
    checked
}
