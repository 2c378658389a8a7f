//! Orientation for printing: the demo blade's pose, pose classes, ties.

use spanwright::fit::{fit_part, BladeAxes, FitOptions, PoseClass, PrintOptions, PrinterSpec};

fn demo() -> (spanwright::design::Design, spanwright::mesh::Part) {
    let d = spanwright::design::load(std::path::Path::new("examples/garden-turbine.toml"))
        .expect("example loads");
    let model = spanwright::pipeline::build(&d, &Default::default()).expect("builds");
    let part = model.checked_part().expect("part");
    (d, part)
}

#[test]
fn explore() {
    let (d, part) = demo();
    let printer = PrinterSpec {
        preset: Some("medium-220".into()),
        ..Default::default()
    }
    .resolve("test")
    .unwrap();
    let axes = BladeAxes::of_design(&d);
    println!("axes {axes:?} tris {}", part.mesh.len());
    for axes in [None, Some(axes)] {
        let t = std::time::Instant::now();
        let f = fit_part(
            "blade",
            &part.mesh,
            &printer,
            &FitOptions {
                print: PrintOptions {
                    axes,
                    ..PrintOptions::DEFAULT
                },
                ..FitOptions::DEFAULT
            },
        )
        .unwrap();
        println!("time {:?} evaluated {}", t.elapsed(), f.evaluated);
        for p in &f.orientation.poses {
            println!(
                "{:?} up {:?} over {:.0} contact {:.1} h {:.1} layers {:?} terms {:?} score {:.3}",
                p.class,
                p.up,
                p.underside.overhang_area,
                p.underside.contact_area,
                p.underside.height,
                p.span_to_layers_deg,
                p.terms,
                p.score
            );
        }
        println!("{:#?}", f.orientation.why);
    }
    let _ = PoseClass::ALL;
}

#[test]
fn timing_measure() {
    let (_, part) = demo();
    let s = spanwright::fit::underside::Surfaces::new(&part.mesh);
    let t = std::time::Instant::now();
    let mut acc = 0.0;
    for d in spanwright::fit::hull::sphere_directions(400) {
        acc += s.measure(&d, &Default::default()).overhang_area;
    }
    println!("400 measures {:?} {acc}", t.elapsed());
}
