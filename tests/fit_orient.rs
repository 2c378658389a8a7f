//! Orientation for printing: ties broken the same way every run, the demo blade's pose
//! against the measurement, pose classes asked for, layouts keeping poses, and
//! the print advice rules.

use nalgebra::{Point3, Vector3};
use spanwright::fit::{
    advise, fit_part, layout_fitted, underside, AdviceOptions, BladeAxes, Choice, Fit, FitOptions,
    LayoutOptions, PoseClass, PrintOptions, Printer, PrinterSpec, UndersideOptions,
};
use spanwright::mesh::{Part, TriMesh};

fn demo() -> (spanwright::design::Design, Part) {
    let d = spanwright::design::load(std::path::Path::new("examples/garden-turbine.toml"))
        .expect("example loads");
    let outcome = spanwright::pipeline::run(&d, &Default::default()).expect("builds");
    let part = outcome.blade_part().as_part().clone();
    (d, part)
}

fn medium() -> Printer {
    PrinterSpec {
        preset: Some("medium-220".into()),
        ..Default::default()
    }
    .resolve("test")
    .unwrap()
}

fn with(print: PrintOptions) -> FitOptions {
    FitOptions {
        print,
        ..FitOptions::DEFAULT
    }
}

/// Overhang of a placed mesh computed independently of the library: every triangle
/// facing down more than 45 degrees from vertical, less the parts of those within
/// `layer` of the lowest point found by sampling each triangle on a fine barycentric
/// grid (the library cuts triangles exactly).
fn overhang_by_sampling(mesh: &TriMesh, fit: &Fit, layer: f64) -> f64 {
    let placed = fit.placement.place(mesh);
    let lo = placed.vertices.iter().map(|p| p.z).fold(f64::MAX, f64::min);
    let mut over = 0.0;
    for t in 0..placed.len() {
        let n = placed.scaled_normal(t);
        let area = 0.5 * n.norm();
        if !(area > 0.0) || -n.z / (2.0 * area) <= std::f64::consts::FRAC_1_SQRT_2 {
            continue;
        }
        let [a, b, c] = placed.corners(t);
        let k = 12;
        let (mut above, mut all) = (0usize, 0usize);
        for i in 0..k {
            for j in 0..k - i {
                let (s, r) = (
                    (i as f64 + 1.0 / 3.0) / k as f64,
                    (j as f64 + 1.0 / 3.0) / k as f64,
                );
                let z = a.z + s * (b.z - a.z) + r * (c.z - a.z);
                all += 1;
                above += usize::from(z - lo > layer);
            }
        }
        over += area * above as f64 / all as f64;
    }
    over
}

#[test]
fn cube_gets_the_same_pose_every_run_and_upright() {
    // Issue 14, item 17: a 60 mm cube was turned differently from run to run (ties in
    // hash order). Same input, same output, also on other threads (whose hash seeds
    // differ); the tie rule keeps the part's own +z up.
    let cube = TriMesh::cuboid(Point3::origin(), Vector3::new(60.0, 60.0, 60.0));
    let p = medium();
    let first = fit_part("cube", &cube, &p, &FitOptions::DEFAULT).unwrap();
    for _ in 0..3 {
        assert_eq!(
            fit_part("cube", &cube, &p, &FitOptions::DEFAULT).unwrap(),
            first
        );
    }
    let others: Vec<Fit> = (0..3)
        .map(|_| {
            let (c, p) = (cube.clone(), p);
            std::thread::spawn(move || fit_part("cube", &c, &p, &FitOptions::DEFAULT).unwrap())
        })
        .map(|h| h.join().unwrap())
        .collect();
    assert!(others.iter().all(|f| *f == first));
    let pose = first.orientation.pose();
    assert_eq!(pose.up, [0.0, 0.0, 1.0], "{pose:?}");
    // Elementary geometry: a face of 60 x 60 mm rests on the bed, nothing overhangs.
    assert!((first.bed_contact - 3600.0).abs() < 1e-6 && first.overhang_area < 1e-6);
    // Six equal faces: the offered poses are distinct faces, all scoring the same.
    let o = &first.orientation;
    assert!(o.poses.len() >= 3 && o.poses.iter().all(|q| (q.score - pose.score).abs() < 1e-9));
}

#[test]
fn demo_blade_needs_far_less_support_than_lying_flat() {
    // Issue 16 measured the pose chosen by the box alone on this design and a 220 mm
    // printer: 9,359 mm^2 of overhang needing support, 0 mm^2 on the bed. The pose chosen
    // now (blade axes given, layers along the span) needs under 1,500 mm^2, checked by an
    // independent sampling of the placed mesh; lying on the pressure side, the way the
    // old search laid it, still needs several thousand.
    let (d, part) = demo();
    let p = medium();
    let axes = BladeAxes::of_design(&d);
    let f = fit_part(
        "blade",
        &part.mesh,
        &p,
        &with(PrintOptions {
            axes: Some(axes),
            ..PrintOptions::DEFAULT
        }),
    )
    .unwrap();
    assert!(f.fits);
    let o = &f.orientation;
    let pose = o.pose();
    let sampled = overhang_by_sampling(&part.mesh, &f, 0.2);
    assert!(sampled < 1500.0, "{sampled} {pose:?}");
    assert!(
        (sampled - f.overhang_area).abs() < 0.05 * f.overhang_area.max(20.0),
        "{sampled} vs {}",
        f.overhang_area
    );
    // Layers along the span (within 10 degrees): the strong way for bending.
    assert!(pose.span_to_layers_deg.unwrap() < 10.0, "{pose:?}");
    assert_eq!(o.choice, Choice::Best);
    assert!(
        o.why.iter().any(|w| w.contains("weakest in bending")),
        "{:?}",
        o.why
    );
    // One pose per class, best first.
    let mut classes: Vec<PoseClass> = o.poses.iter().filter_map(|q| q.class).collect();
    assert_eq!(classes.len(), o.poses.len());
    classes.sort();
    classes.dedup();
    assert_eq!(classes.len(), o.poses.len());
    assert!(o.poses.windows(2).all(|w| w[0].score <= w[1].score));
    // The pose the box-only search chose (its printed rotation, third row: the part's
    // up direction), measured again: the 9,359 mm^2, here by the library and by
    // the independent sampling.
    let old_up = Vector3::new(-0.517497, 0.855680, -0.002970);
    let old = underside(&part.mesh, &old_up, &UndersideOptions::DEFAULT);
    assert!(
        (old.overhang_area - 9359.0).abs() < 0.02 * 9359.0,
        "{old:?}"
    );
    assert!(sampled < old.overhang_area / 6.0);
    // Asked to lie on the pressure side: the class's best, reported as asked for.
    let flat = fit_part(
        "blade",
        &part.mesh,
        &p,
        &with(PrintOptions {
            axes: Some(axes),
            pose: Some(PoseClass::PressureSideDown),
            ..PrintOptions::DEFAULT
        }),
    )
    .unwrap();
    assert_eq!(flat.orientation.choice, Choice::Requested);
    assert_eq!(
        flat.orientation.pose().class,
        Some(PoseClass::PressureSideDown)
    );
    eprintln!(
        "chosen {:?}: overhang {:.0} mm^2 (sampled {sampled:.0}), contact {:.1} mm^2; old pose {:.0} mm^2; pressure side down: {:.0} mm^2",
        pose.class, f.overhang_area, f.bed_contact, old.overhang_area, flat.overhang_area
    );
}

#[test]
fn root_down_asked_for_stands_the_blade_up_and_says_layers_cross_the_span() {
    // The demo blade (about 270 mm from root face to tip) is taller than the 245 mm of
    // usable height, so root down it leans: the span stays within 45 degrees of vertical
    // (the class) and more than 45 degrees from the layers.
    let (d, part) = demo();
    let f = fit_part(
        "blade",
        &part.mesh,
        &medium(),
        &with(PrintOptions {
            axes: Some(BladeAxes::of_design(&d)),
            pose: Some(PoseClass::RootDown),
            ..PrintOptions::DEFAULT
        }),
    )
    .unwrap();
    let pose = f.orientation.pose();
    assert_eq!(pose.class, Some(PoseClass::RootDown));
    let a = pose.span_to_layers_deg.unwrap();
    assert!(a >= 45.0 - 1e-9, "{a}");
    assert!(f.size[2] <= 245.0 + 1e-6);
    assert!(f.orientation.why.iter().any(|w| w.contains("asked for")));
}

#[test]
fn a_class_that_cannot_fit_is_reported_and_the_best_chosen() {
    // A 200 x 10 x 10 bar with its span along z in a 210 x 210 x 50 volume cannot stand
    // on its root (200 > 50 tall and the class keeps it within 45 degrees of vertical:
    // at least 200 cos 45 = 141 mm tall).
    let bar = TriMesh::cuboid(
        Point3::new(-5.0, -5.0, 0.0),
        Vector3::new(10.0, 10.0, 200.0),
    );
    let p = PrinterSpec {
        volume: Some([220.0, 220.0, 55.0]),
        ..Default::default()
    }
    .resolve("test")
    .unwrap();
    let f = fit_part(
        "bar",
        &bar,
        &p,
        &with(PrintOptions {
            axes: Some(BladeAxes {
                span: [0.0, 0.0, 1.0],
                leading_edge: [-1.0, 0.0, 0.0],
                pressure_side: [0.0, -1.0, 0.0],
            }),
            pose: Some(PoseClass::RootDown),
            ..PrintOptions::DEFAULT
        }),
    )
    .unwrap();
    assert!(f.fits);
    assert_eq!(f.orientation.choice, Choice::RequestedDoesNotFit);
    assert_ne!(f.orientation.pose().class, Some(PoseClass::RootDown));
    // Lying on a face: 200 x 10 on the bed, no overhang.
    assert!(
        (f.bed_contact - 2000.0).abs() < 1e-6 && f.overhang_area < 1e-9,
        "{f:?}"
    );
}

#[test]
fn plates_keep_the_chosen_poses() {
    // A blade fitted with its axes and a plain box: the layout turns each only about the
    // vertical, so every placed part keeps its chosen up direction.
    let (d, part) = demo();
    let p = medium();
    let blade_fit = fit_part(
        "blade",
        &part.mesh,
        &p,
        &with(PrintOptions {
            axes: Some(BladeAxes::of_design(&d)),
            pose: Some(PoseClass::LeadingEdgeDown),
            ..PrintOptions::DEFAULT
        }),
    )
    .unwrap();
    let boxy = Part {
        name: "box".into(),
        mesh: TriMesh::cuboid(Point3::origin(), Vector3::new(30.0, 20.0, 10.0)),
    };
    let parts = vec![part.clone(), boxy];
    let lay = layout_fitted(&parts, vec![blade_fit.clone()], &p, &LayoutOptions::DEFAULT).unwrap();
    let placed: Vec<_> = lay.plates.iter().flat_map(|pl| pl.parts.iter()).collect();
    assert_eq!(placed.len(), 2);
    for pl in placed {
        let up = Vector3::from(lay.fits[pl.part].orientation.pose().up);
        // The printer's +z in part coordinates is the third row of the rotation.
        let z = pl.placement.rotation.row(2).transpose();
        assert!((z - up).norm() < 1e-9, "{}: {z:?} vs {up:?}", pl.name);
    }
    assert_eq!(
        lay.fits[0].orientation.pose().class,
        Some(PoseClass::LeadingEdgeDown)
    );
}

#[test]
fn advice_follows_the_stated_rules() {
    // A 20 x 20 x 100 mm post: standing it is 100 mm tall on 400 mm^2 (a 20 mm square,
    // 100 > 3 x 20: brim); lying it is 20 tall on 2000 mm^2 (no brim). No overhang either
    // way: no supports. A 0.3 mm trailing edge and a 0.4 mm nozzle: not printable, at
    // most a 0.3 mm nozzle; 0.6 mm: one line; 1.0 mm: two lines (common practice).
    let post = TriMesh::cuboid(Point3::origin(), Vector3::new(20.0, 20.0, 100.0));
    let p = medium();
    // Six poses offered: the four lying faces and the two ends.
    let f = fit_part(
        "post",
        &post,
        &p,
        &with(PrintOptions {
            offered: 6,
            ..PrintOptions::DEFAULT
        }),
    )
    .unwrap();
    let lying = f.orientation.pose();
    assert!((lying.underside.height - 20.0).abs() < 1e-9, "{lying:?}");
    let a = advise(lying, &p, Some((0.3, Some(250.0))), &AdviceOptions::DEFAULT);
    assert!(!a.supports && !a.brim, "{a:?}");
    let te = a.trailing_edge.unwrap();
    assert!(!te.printable && te.largest_nozzle == 0.3 && te.why.contains("at least 0.40 mm"));
    let standing = f
        .orientation
        .poses
        .iter()
        .find(|q| (q.underside.height - 100.0).abs() < 1e-9)
        .expect("the standing pose is offered");
    let a = advise(standing, &p, Some((0.6, None)), &AdviceOptions::DEFAULT);
    assert!(a.brim && !a.supports, "{a:?}");
    let te = a.trailing_edge.unwrap();
    assert!(te.printable && te.single_line);
    let a = advise(standing, &p, Some((1.0, None)), &AdviceOptions::DEFAULT);
    assert!(!a.trailing_edge.unwrap().single_line);
}
