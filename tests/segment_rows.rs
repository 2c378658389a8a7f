//! Rows of the skin at given radii (the split planes) and the split's spellings.
//!
//! Every iso-curve `v = const` of the skin lies in a plane `z = const`: the rings it
//! interpolates are planar and the B-spline basis sums to one (partition of unity, Piegl
//! and Tiller, *The NURBS Book*, 2nd ed., 1997, property P2.4), so every control point
//! of a `v` column has the same z.

use spanwright::design::{load, parse_toml_str};
use spanwright::pipeline::{build_blade, Options};
use spanwright::segment::{SegmentsSpec, Split};
use spanwright::tessellate::{row_at_radius, row_radius, with_rows};
use std::path::Path;

#[test]
fn rows_at_radii_are_planar_and_forced() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/barn-turbine.toml");
    let design = load(&path).unwrap();
    let b = build_blade(&design, &Options::default()).unwrap();
    let skin = &b.skin;
    for z in [31.0, 95.5, 324.25, 600.0, 617.0] {
        let v = row_at_radius(skin, z).expect("inside the skin");
        assert!((row_radius(skin, v) - z).abs() < 1e-9, "z {z}");
        for k in 0..=40 {
            let p = skin.eval(k as f64 / 40.0, v);
            assert!((p.z - z).abs() < 1e-9, "u {k}/40 at z {z}: {}", p.z);
        }
    }
    assert!(row_at_radius(skin, 10.0).is_none() && row_at_radius(skin, 700.0).is_none());
    let vs = &b.tessellation.vs;
    let (rows, at) = with_rows(skin, vs, &[200.0, 400.0]).unwrap();
    assert!(
        rows.windows(2).all(|w| w[0] < w[1]),
        "sorted, no duplicates"
    );
    assert!(rows.len() >= vs.len() && rows.len() <= vs.len() + 2);
    for (&j, z) in at.iter().zip([200.0, 400.0]) {
        assert!((row_radius(skin, rows[j]) - z).abs() < 1e-9);
    }
    // Every old row is kept, or moved by less than 0.01 mm onto a forced one.
    for &v in vs {
        let z = row_radius(skin, v);
        assert!(rows.contains(&v) || (z - 200.0).abs() < 0.01 || (z - 400.0).abs() < 0.01);
    }
}

#[test]
fn split_spellings() {
    assert_eq!("auto".parse::<Split>(), Ok(Split::Auto));
    assert_eq!("none".parse::<Split>(), Ok(Split::None));
    assert_eq!(
        "260, 430".parse::<Split>(),
        Ok(Split::At(vec![260.0, 430.0]))
    );
    assert!("half".parse::<Split>().unwrap_err().contains("auto"));
    let table = |t: &str| toml::from_str::<SegmentsSpec>(t);
    assert_eq!(table("split = \"auto\"").unwrap().split, Split::Auto);
    assert_eq!(
        table("split = [1, 2.5]").unwrap().split,
        Split::At(vec![1.0, 2.5])
    );
    let e = table("split = \"half\"").unwrap_err().to_string();
    assert!(e.contains("not a split"), "{e}");
    // Lengths in the file's unit: inches to millimetres, 25.4 mm per inch (exact by
    // definition, NIST SP 811).
    let text = "name = \"i\"\nunits = { length = \"in\" }\n[blade]\nsection = \"naca4412\"\n[[station]]\nradius = 2\nchord = 1\ntwist = 5\n[[station]]\nradius = 10\nchord = 0.8\ntwist = 1\n[segments]\nsplit = [6]\nmin-wall = 0.05\ndowels = { diameter = 0.125 }\n";
    let d = parse_toml_str(text, None).unwrap();
    let s = d.table_mm::<SegmentsSpec>("segments").unwrap().unwrap();
    let Split::At(r) = &s.split else {
        panic!("radii")
    };
    assert!((r[0] - 152.4).abs() < 1e-12);
    assert!((s.min_wall - 1.27).abs() < 1e-12 && (s.dowels.diameter - 3.175).abs() < 1e-12);
}
