//! The generic exact-solid builders on a simple skin (a lofted round section, so every
//! feature's volume has an elementary formula): split pieces, end holes (flat floor,
//! drill point, through channel, off-axis pin hole), cross holes and the flange with its
//! fillet. Each solid is written to STEP, read back with truck-stepio (closed, every edge
//! used twice in opposite senses, knots valid to ISO 10303-42) and tessellated with
//! truck-meshalgo; its volume is compared with the formula.

mod brep_support;

use brep_support::{assert_closed, assert_knots_valid, brep_volume, dump, read_shells, simpson};
use nalgebra::Point3;
use spanwright::brep::{
    piece_solid, Bottom, BrepError, CrossHole, Cut, End, EndHole, Flange, PieceSpec, SkinOptions,
};
use spanwright::export::{step_text, StepHeader};
use spanwright::loft::Skin;
use std::f64::consts::PI;

/// Radius of the round test skin, mm.
const R: f64 = 10.0;

/// A straight round skin of radius `R` from `z0` to `z1` (9 rings of 97 points from
/// angle 0 round to 2 pi, so the "trailing edge" at angle 0 is sharp and the "leading
/// edge" at pi), lofted by the project's lofter.
fn round_skin(z0: f64, z1: f64) -> Skin {
    let rings: Vec<Vec<Point3<f64>>> = (0..9)
        .map(|l| {
            let z = z0 + (z1 - z0) * l as f64 / 8.0;
            (0..97)
                .map(|k| {
                    let a = 2.0 * PI * k as f64 / 96.0;
                    Point3::new(R * a.cos(), R * a.sin(), z)
                })
                .collect()
        })
        .collect();
    Skin::interpolate(&rings, 48).unwrap()
}

/// Area of the skin's section, by Green's theorem on 20 000 points of the iso-curve
/// (independent of the B-rep): the lofted circle's own area, within 1e-6 of pi R^2.
fn section_area(skin: &Skin) -> f64 {
    let us: Vec<f64> = (0..20_000).map(|i| i as f64 / 20_000.0).collect();
    let p = skin.iso_v(0.5, &us);
    0.5 * (0..p.len())
        .map(|i| {
            let (a, b) = (p[i], p[(i + 1) % p.len()]);
            a.x * b.y - b.x * a.y
        })
        .sum::<f64>()
}

/// Builds, writes, reads back and measures a piece: returns the read-back volume.
fn measured(skin: &Skin, spec: &PieceSpec, name: &str, faces: usize) -> f64 {
    let solid =
        piece_solid(skin, spec, &SkinOptions::DEFAULT).unwrap_or_else(|e| panic!("{name}: {e}"));
    let text = step_text(
        &[(name.to_string(), solid)],
        &StepHeader::default(),
        "p.step",
    );
    dump(&format!("{name}.step"), &text);
    assert!(assert_knots_valid(&text) > 0);
    let shells = read_shells(&text);
    assert_eq!(shells.len(), 1, "{name}");
    assert_closed(&shells[0], name);
    assert_eq!(shells[0].faces.len(), faces, "{name}: faces");
    brep_volume(&shells[0])
}

fn close(v: f64, exact: f64, rel: f64, what: &str) {
    assert!(
        ((v - exact) / exact).abs() < rel,
        "{what}: {v} vs {exact} ({:.2e})",
        (v - exact) / exact
    );
}

/// Volume of a cone of base radius `r` and height `h`: pi r^2 h / 3 (elementary
/// geometry, e.g. any handbook of mathematics; from memory).
fn cone(r: f64, h: f64) -> f64 {
    PI * r * r * h / 3.0
}

#[test]
fn whole_and_split_pieces_have_prism_volumes() {
    let skin = round_skin(0.0, 100.0);
    let a = section_area(&skin);
    assert!((a / (PI * R * R) - 1.0).abs() < 1e-5);
    // Chordal tessellation at 0.003 mm loses about (2/3) 0.003 x perimeter per
    // section (the area between a circle and its inscribed polygon), 4e-4 of the area
    // here: within 1e-3.
    let v = measured(&skin, &PieceSpec::whole(), "whole", 4);
    close(v, a * 100.0, 1e-6, "whole");
    // Split faces at z = 30 and 70 mm: a prism of 40 mm (planar, exact cuts).
    let v = measured(
        &skin,
        &PieceSpec::between(Cut::Plane(30.0), Cut::Plane(70.0)),
        "split",
        4,
    );
    close(v, a * 40.0, 1e-6, "split");
    let v = measured(
        &skin,
        &PieceSpec::between(Cut::SkinEnd, Cut::Plane(12.5)),
        "root piece",
        4,
    );
    close(v, a * 12.5, 1e-6, "root piece");
    // Out of range.
    let e = piece_solid(
        &skin,
        &PieceSpec::between(Cut::Plane(-5.0), Cut::SkinEnd),
        &SkinOptions::DEFAULT,
    )
    .unwrap_err();
    assert!(matches!(e, BrepError::BadFeature { .. }), "{e}");
}

#[test]
fn end_holes_subtract_cylinders_and_cones() {
    let skin = round_skin(0.0, 100.0);
    let a = section_area(&skin);
    let hole = |end, centre, d: f64, depth: f64, bottom| EndHole {
        end,
        centre,
        diameter: d,
        depth,
        bottom,
    };
    // Flat floor: cylinder pi r^2 depth.
    let spec = PieceSpec {
        end_holes: vec![hole(End::Low, [0.0, 0.0], 6.0, 20.0, Bottom::Flat)],
        ..PieceSpec::whole()
    };
    let v = measured(&skin, &spec, "bore flat", 4 + 3);
    close(v, a * 100.0 - PI * 9.0 * 20.0, 1e-6, "bore flat");
    // 118 degree drill point: cylinder plus cone of height r / tan 59 degrees.
    let h = 3.0 / 59f64.to_radians().tan();
    let spec = PieceSpec {
        end_holes: vec![hole(End::Low, [0.0, 0.0], 6.0, 20.0, Bottom::Point(118.0))],
        ..PieceSpec::whole()
    };
    let v = measured(&skin, &spec, "bore point", 4 + 4);
    close(
        v,
        a * 100.0 - PI * 9.0 * 20.0 - cone(3.0, h),
        1e-6,
        "bore point",
    );
    // A segment: spar channel through, and an off-axis pin hole from the high split face.
    let spec = PieceSpec {
        end_holes: vec![
            hole(End::Low, [0.0, 0.0], 4.0, 0.0, Bottom::Through),
            hole(End::High, [5.0, 2.0], 2.0, 6.0, Bottom::Point(118.0)),
            hole(End::Low, [-5.0, -1.0], 2.0, 6.0, Bottom::Flat),
        ],
        ..PieceSpec::between(Cut::Plane(30.0), Cut::Plane(70.0))
    };
    let hp = 1.0 / 59f64.to_radians().tan();
    let v = measured(&skin, &spec, "segment", 4 + 2 + 4 + 3);
    let exact = a * 40.0 - PI * 4.0 * 40.0 - (PI * 6.0 + cone(1.0, hp)) - PI * 6.0;
    close(v, exact, 1e-6, "segment");
    // A hole that breaks out of the section is refused, naming it.
    let spec = PieceSpec {
        end_holes: vec![hole(End::Low, [8.0, 0.0], 6.0, 10.0, Bottom::Flat)],
        ..PieceSpec::whole()
    };
    let e = piece_solid(&skin, &spec, &SkinOptions::DEFAULT)
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("end hole 1") && e.contains("outside the section"),
        "{e}"
    );
}

#[test]
fn cross_hole_removes_the_bicylinder_volume() {
    let skin = round_skin(0.0, 100.0);
    let a = section_area(&skin);
    // A hole of radius r along y through the axis of a round shank of radius R removes
    // V = integral_{-r}^{r} 2 sqrt(r^2 - x^2) 2 sqrt(R^2 - x^2) dx (chord length through
    // the shank times the hole's width at x; elementary calculus), by Simpson's rule.
    let r = 3.0;
    let removed = simpson(
        |x| 4.0 * ((r * r - x * x).max(0.0) * (R * R - x * x)).sqrt(),
        -r,
        r,
        20_000,
    );
    let spec = PieceSpec {
        cross_holes: vec![CrossHole {
            x: 0.0,
            z: 40.0,
            diameter: 2.0 * r,
        }],
        ..PieceSpec::whole()
    };
    let v = measured(&skin, &spec, "cross hole", 4 + 2);
    close(v, a * 100.0 - removed, 1e-6, "cross hole");
    // Two holes and a bore from the root face.
    let spec = PieceSpec {
        cross_holes: vec![
            CrossHole {
                x: 0.0,
                z: 40.0,
                diameter: 2.0 * r,
            },
            CrossHole {
                x: 0.0,
                z: 60.0,
                diameter: 2.0 * r,
            },
        ],
        end_holes: vec![EndHole {
            end: End::Low,
            centre: [0.0, 0.0],
            diameter: 5.0,
            depth: 25.0,
            bottom: Bottom::Point(118.0),
        }],
        ..PieceSpec::whole()
    };
    let v = measured(&skin, &spec, "cross holes and bore", 4 + 4 + 4);
    let h = 2.5 / 59f64.to_radians().tan();
    close(
        v,
        a * 100.0 - 2.0 * removed - PI * 6.25 * 25.0 - cone(2.5, h),
        1e-6,
        "cross holes and bore",
    );
    // A hole meeting the bore is refused.
    let spec = PieceSpec {
        cross_holes: vec![CrossHole {
            x: 0.0,
            z: 20.0,
            diameter: 4.0,
        }],
        end_holes: vec![EndHole {
            end: End::Low,
            centre: [0.0, 0.0],
            diameter: 5.0,
            depth: 25.0,
            bottom: Bottom::Flat,
        }],
        ..PieceSpec::whole()
    };
    let e = piece_solid(&skin, &spec, &SkinOptions::DEFAULT)
        .unwrap_err()
        .to_string();
    assert!(e.contains("meets cross hole 1"), "{e}");
}

#[test]
fn flange_with_fillet_adds_plate_and_fillet_ring() {
    // Skin from the top of the fillet (z = t + f) up; plate from z = 0 to t.
    let (t, f, rf) = (3.0, 2.0, 20.0);
    let skin = round_skin(t + f, 100.0);
    let a = section_area(&skin);
    // The fillet ring: the square [R, R + f] x [0, f] (in radius and height) less the
    // quarter disc about (R + f, f), revolved: Pappus's second centroid theorem,
    // V = 2 pi x_c A, with the centroids of a square and of a quarter disc (4 f / 3 pi
    // from its corner) from any table of centroids (from memory).
    let sq = f * f;
    let qd = PI * f * f / 4.0;
    let xc = (sq * (R + 0.5 * f) - qd * (R + f - 4.0 * f / (3.0 * PI))) / (sq - qd);
    let ring = 2.0 * PI * xc * (sq - qd);
    let flange = Flange {
        centre: [0.0, 0.0],
        diameter: 2.0 * rf,
        thickness: t,
        fillet: f,
        shank_radius: R,
    };
    let spec = PieceSpec {
        flange: Some(flange),
        ..PieceSpec::whole()
    };
    // Faces: skin 2, tip cap, fillet 2, plate top, rim 2, plate face.
    let v = measured(&skin, &spec, "flange", 2 + 1 + 2 + 1 + 2 + 1);
    // The shank's core runs down to the plate through the fillet's height.
    close(v, a * (100.0 - t) + PI * rf * rf * t + ring, 1e-6, "flange");
    // With a bore through the plate, and no fillet.
    let spec = PieceSpec {
        flange: Some(Flange {
            fillet: 0.0,
            ..flange
        }),
        end_holes: vec![EndHole {
            end: End::Low,
            centre: [0.0, 0.0],
            diameter: 6.0,
            depth: 15.0,
            bottom: Bottom::Flat,
        }],
        ..PieceSpec::whole()
    };
    let skin = round_skin(t, 100.0);
    let v = measured(&skin, &spec, "flange bore", 2 + 1 + 1 + 2 + 1 + 3);
    close(
        v,
        a * (100.0 - t) + PI * rf * rf * t - PI * 9.0 * 15.0,
        1e-6,
        "flange bore",
    );
}

/// A round skin whose section starts at angle `a0` (the "trailing edge" seam there) and
/// with semi-axes `R` and `b` along x and y.
fn skin_from(a0: f64, b: f64) -> Skin {
    let rings: Vec<Vec<Point3<f64>>> = (0..5)
        .map(|l| {
            let z = 25.0 * l as f64;
            (0..97)
                .map(|k| {
                    let a = a0 + 2.0 * PI * k as f64 / 96.0;
                    Point3::new(R * a.cos(), b * a.sin(), z)
                })
                .collect()
        })
        .collect();
    Skin::interpolate(&rings, 48).unwrap()
}

#[test]
fn features_that_cannot_be_exact_are_refused_with_the_reason() {
    // A cross hole whose rim would cross the seam where the skin's faces meet.
    let skin = skin_from(0.5 * PI, R);
    let spec = PieceSpec {
        cross_holes: vec![CrossHole {
            x: 0.0,
            z: 50.0,
            diameter: 4.0,
        }],
        ..PieceSpec::whole()
    };
    let e = piece_solid(&skin, &spec, &SkinOptions::DEFAULT).unwrap_err();
    assert!(
        matches!(
            e,
            BrepError::NotExact {
                feature: "cross hole",
                ..
            }
        ),
        "{e}"
    );
    // A fillet on a shank that is not round (elliptical): the mesh's radial offset is
    // no surface a STEP file holds exactly.
    let skin = skin_from(0.0, 0.7 * R);
    let flange = Flange {
        centre: [0.0, 0.0],
        diameter: 40.0,
        thickness: 3.0,
        fillet: 2.0,
        shank_radius: R,
    };
    let spec = PieceSpec {
        flange: Some(flange),
        ..PieceSpec::whole()
    };
    let e = piece_solid(&skin, &spec, &SkinOptions::DEFAULT).unwrap_err();
    assert!(
        matches!(
            e,
            BrepError::NotExact {
                feature: "flange fillet",
                ..
            }
        ),
        "{e}"
    );
    // Without the fillet the same flange is exact: plate pi r^2 t plus the elliptic
    // skin's prism (section area by Green's theorem).
    let spec = PieceSpec {
        flange: Some(Flange {
            fillet: 0.0,
            ..flange
        }),
        ..PieceSpec::whole()
    };
    let v = measured(&skin, &spec, "elliptic flange", 2 + 1 + 1 + 2 + 1);
    close(
        v,
        section_area(&skin) * 100.0 + PI * 400.0 * 3.0,
        1e-6,
        "elliptic flange",
    );
}
