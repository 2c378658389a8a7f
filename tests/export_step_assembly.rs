//! The rotor as a STEP assembly (ISO 10303 product structure, as AP214 and AP242 use
//! it): one product per distinct part, placed instances through
//! NEXT_ASSEMBLY_USAGE_OCCURRENCE, CONTEXT_DEPENDENT_SHAPE_REPRESENTATION and
//! ITEM_DEFINED_TRANSFORMATION. Read back with ruststep (an ISO 10303-21 parser) for the
//! structure and truck-stepio for the solids; the placements must be the mesh rotor's
//! transforms within 1e-6 mm.

mod brep_support;

use brep_support::{args, assert_closed, assert_knots_valid, dump, read_shells, records};
use nalgebra::{Matrix4, Point3, Vector3};
use ruststep::ast::{Name, Parameter, Record};
use spanwright::brep::{blade_solid, hub_solid};
use spanwright::export::{step_assembly_text, ExportError, StepHeader};
use spanwright::pipeline::{run, Options};
use std::collections::BTreeMap;
use std::path::Path;

type Recs = BTreeMap<u64, Vec<Record>>;

fn refs(p: &Parameter) -> u64 {
    match p {
        Parameter::Ref(Name::Entity(i)) => *i,
        other => panic!("not an entity reference: {other:?}"),
    }
}

fn reals(p: &Parameter) -> Vec<f64> {
    match p {
        Parameter::List(v) => v
            .iter()
            .map(|x| match x {
                Parameter::Real(r) => *r,
                Parameter::Integer(i) => *i as f64,
                o => panic!("{o:?}"),
            })
            .collect(),
        o => panic!("{o:?}"),
    }
}

fn string(p: &Parameter) -> String {
    match p {
        Parameter::String(s) => s.clone(),
        o => panic!("{o:?}"),
    }
}

fn record<'a>(r: &'a Recs, id: u64, name: &str) -> &'a Record {
    r[&id]
        .iter()
        .find(|x| x.name == name)
        .unwrap_or_else(|| panic!("#{id} is not {name}: {:?}", r[&id]))
}

/// The matrix of an AXIS2_PLACEMENT_3D (ISO 10303-42: location, axis = z,
/// ref_direction = x made normal to z, y = z x x).
fn placement(r: &Recs, id: u64) -> Matrix4<f64> {
    let a = args(record(r, id, "AXIS2_PLACEMENT_3D"));
    let p = reals(&args(record(r, refs(&a[1]), "CARTESIAN_POINT"))[1]);
    let z = Vector3::from_vec(reals(&args(record(r, refs(&a[2]), "DIRECTION"))[1])).normalize();
    let x0 = Vector3::from_vec(reals(&args(record(r, refs(&a[3]), "DIRECTION"))[1]));
    let x = (x0 - z * x0.dot(&z)).normalize();
    let y = z.cross(&x);
    let mut m = Matrix4::identity();
    for k in 0..3 {
        m[(k, 0)] = x[k];
        m[(k, 1)] = y[k];
        m[(k, 2)] = z[k];
        m[(k, 3)] = p[k];
    }
    m
}

/// The product name behind a PRODUCT_DEFINITION.
fn product_of(r: &Recs, pd: u64) -> String {
    let pdf = refs(&args(record(r, pd, "PRODUCT_DEFINITION"))[2]);
    let prod = refs(&args(record(r, pdf, "PRODUCT_DEFINITION_FORMATION"))[2]);
    string(&args(record(r, prod, "PRODUCT"))[1])
}

/// Every instance: (name of the placed product, placement), in file order.
fn instances(r: &Recs) -> Vec<(String, Matrix4<f64>)> {
    let mut out = Vec::new();
    for (id, recs) in r {
        let Some(cdsr) = recs
            .iter()
            .find(|x| x.name == "CONTEXT_DEPENDENT_SHAPE_REPRESENTATION")
        else {
            continue;
        };
        let a = args(cdsr);
        let (rr, pds) = (refs(&a[0]), refs(&a[1]));
        let nauo = refs(&args(record(r, pds, "PRODUCT_DEFINITION_SHAPE"))[2]);
        let n = args(record(r, nauo, "NEXT_ASSEMBLY_USAGE_OCCURRENCE"));
        let child = product_of(r, refs(&n[4]));
        let idt = refs(
            &args(record(
                r,
                rr,
                "REPRESENTATION_RELATIONSHIP_WITH_TRANSFORMATION",
            ))[0],
        );
        let t = args(record(r, idt, "ITEM_DEFINED_TRANSFORMATION"));
        // The part's origin item maps onto the placement item.
        let (from, to) = (placement(r, refs(&t[2])), placement(r, refs(&t[3])));
        let _ = id;
        out.push((child, to * from.try_inverse().expect("rigid")));
    }
    out
}

#[test]
fn demo_rotor_is_an_assembly_of_blade_and_hub() {
    let design = spanwright::design::load(Path::new("examples/garden-turbine.toml")).unwrap();
    let outcome = run(&design, &Options::default()).unwrap();
    let model = &outcome.blade;
    let rotor = outcome.rotor.as_ref().unwrap();
    let blade = blade_solid(&model.skin, model.blade.root(), model.blade.root_face()).unwrap();
    let hub = hub_solid(rotor.hub.as_ref().unwrap()).unwrap();
    let products = vec![
        (format!("{}-blade", model.name), blade),
        (format!("{}-hub", model.name), hub),
    ];
    let mut placed: Vec<(usize, Matrix4<f64>)> = rotor.transforms.iter().map(|m| (0, *m)).collect();
    placed.push((1, Matrix4::identity()));
    let header = StepHeader::for_design(&format!("{}-rotor", model.name));
    let text = step_assembly_text(&products, &placed, &header, "rotor.step").unwrap();
    dump("garden-turbine-rotor.step", &text);
    // Deterministic bytes.
    assert_eq!(
        text,
        step_assembly_text(&products, &placed, &header, "rotor.step").unwrap()
    );
    assert!(assert_knots_valid(&text) > 0);
    let r = records(&text);
    let count = |name: &str| {
        r.values()
            .filter(|v| v.iter().any(|x| x.name == name))
            .count()
    };
    // Three products (blade, hub, rotor), four placed instances.
    assert_eq!(count("PRODUCT"), 3);
    assert_eq!(count("NEXT_ASSEMBLY_USAGE_OCCURRENCE"), 4);
    assert_eq!(count("CONTEXT_DEPENDENT_SHAPE_REPRESENTATION"), 4);
    assert_eq!(
        count("MANIFOLD_SOLID_BREP"),
        2,
        "each part's solid is written once"
    );
    let inst = instances(&r);
    assert_eq!(inst.len(), 4);
    // Placements equal the mesh rotor's transforms: points of the blade's bounding box
    // (and the hub's) land within 1e-6 mm of where the rotor's transform puts them.
    let bb = model.mesh().bounding_box().unwrap();
    let corners: Vec<Point3<f64>> = (0..8)
        .map(|k| {
            Point3::new(
                if k & 1 == 0 { bb.min.x } else { bb.max.x },
                if k & 2 == 0 { bb.min.y } else { bb.max.y },
                if k & 4 == 0 { bb.min.z } else { bb.max.z },
            )
        })
        .collect();
    for (k, (name, m)) in inst.iter().enumerate() {
        let (want_name, want) = if k < 3 {
            (products[0].0.clone(), rotor.transforms[k])
        } else {
            (products[1].0.clone(), Matrix4::identity())
        };
        assert_eq!(name, &want_name);
        let worst = corners
            .iter()
            .map(|p| (m.transform_point(p) - want.transform_point(p)).norm())
            .fold(0.0, f64::max);
        assert!(worst < 1e-6, "instance {k}: {worst} mm");
    }
    // The two solids read back closed.
    let shells = read_shells(&text);
    assert_eq!(shells.len(), 2);
    for (s, what) in shells.iter().zip(["blade", "hub"]) {
        assert_closed(s, what);
    }
    // A placement that is not rigid is refused, naming the instance.
    let mut bad = placed.clone();
    bad[1].1[(0, 0)] = 2.0;
    let e = step_assembly_text(&products, &bad, &header, "rotor.step").unwrap_err();
    assert!(
        matches!(e, ExportError::BadPlacement { index: 1, .. }),
        "{e}"
    );
}
