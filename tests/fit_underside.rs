//! Bed contact and overhang needing support against hand-computed values (elementary
//! geometry: areas of rectangles and triangles, similar triangles for the strips cut by
//! the first layer).

use nalgebra::{Point3, Rotation3, Vector3};
use spanwright::fit::{underside, UndersideOptions};
use spanwright::mesh::TriMesh;

const B: f64 = 0.2; // first layer, mm

fn opts(overhang_deg: f64) -> UndersideOptions {
    UndersideOptions {
        overhang_deg,
        first_layer: B,
    }
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * b.abs().max(1.0)
}

/// A prism along x (length `len`) over the isosceles triangle with base `w` on z = 0 and
/// apex at height `h`, closed, facing outward.
fn prism(len: f64, w: f64, h: f64) -> TriMesh {
    let mut m = TriMesh::new();
    for x in [0.0, len] {
        m.push_vertex(Point3::new(x, -0.5 * w, 0.0));
        m.push_vertex(Point3::new(x, 0.5 * w, 0.0));
        m.push_vertex(Point3::new(x, 0.0, h));
    }
    // End x = 0 faces -x, end x = len faces +x; three side quads.
    m.triangles = vec![[0, 2, 1], [3, 4, 5]];
    for (a, b) in [(0u32, 1u32), (1, 2), (2, 0)] {
        m.triangles.push([a, b, b + 3]);
        m.triangles.push([a, b + 3, a + 3]);
    }
    assert!(m.signed_volume() > 0.0, "outward");
    m
}

#[test]
fn box_on_a_face_and_on_an_edge() {
    // On a face: the bottom rests whole (a b), no face points down steeply elsewhere.
    let (a, b, c) = (100.0, 30.0, 20.0);
    let m = TriMesh::cuboid(Point3::origin(), Vector3::new(a, b, c));
    let u = underside(&m, &Vector3::z(), &UndersideOptions::DEFAULT);
    assert!(close(u.contact_area, a * b, 1e-12), "{u:?}");
    assert!(u.overhang_area.abs() < 1e-12 && close(u.height, c, 1e-12));
    // On the edge y = z = 0 (up along (0, 1, 1)/sqrt 2): the faces -y and -z each meet the
    // first layer in a strip of width B sqrt 2 along the face, B wide on the bed: contact
    // 2 a B. With a 30 degree limit both faces (45 degrees from vertical) need support
    // above the strip: a b + a c - 2 a B sqrt 2.
    let up = Vector3::new(0.0, 1.0, 1.0);
    let u = underside(&m, &up, &opts(30.0));
    assert!(close(u.contact_area, 2.0 * a * B, 1e-9), "{u:?}");
    let over = a * b + a * c - 2.0 * a * B * 2f64.sqrt();
    assert!(close(u.overhang_area, over, 1e-9), "{u:?} vs {over}");
    // Projected on the bed: each face at 45 degrees covers cos 45 of its area.
    assert!(close(u.overhang_projected, over / 2f64.sqrt(), 1e-9));
    // With a 60 degree limit neither face needs support.
    assert!(underside(&m, &up, &opts(60.0)).overhang_area.abs() < 1e-12);
}

#[test]
fn triangular_prism_on_its_base_on_its_end_and_on_its_ridge() {
    let (len, w, h) = (50.0, 40.0, 10.0);
    let m = prism(len, w, h);
    let s = (h * h + 0.25 * w * w).sqrt(); // slant side of the triangle
                                           // On its base: contact len w; the slanted faces point up.
    let u = underside(&m, &Vector3::z(), &UndersideOptions::DEFAULT);
    assert!(
        close(u.contact_area, len * w, 1e-12) && u.overhang_area.abs() < 1e-12,
        "{u:?}"
    );
    // On its end: the triangle w h / 2 rests on the bed.
    let u = underside(&m, &Vector3::x(), &UndersideOptions::DEFAULT);
    assert!(close(u.contact_area, 0.5 * w * h, 1e-12) && u.overhang_area.abs() < 1e-12);
    // On its ridge (upside down): each slanted face points down at asin(w / 2s) = 63.4
    // degrees from vertical, steeper than 45. Along a face the height rises h per slant s:
    // the first layer cuts a strip B s / h wide, projected B w / (2 h). Contact
    // len B w / h; overhang 2 len s (1 - B / h); projected 2 len (w / 2) (1 - B / h).
    let u = underside(&m, &-Vector3::z(), &UndersideOptions::DEFAULT);
    assert!(close(u.contact_area, len * B * w / h, 1e-9), "{u:?}");
    assert!(
        close(u.overhang_area, 2.0 * len * s * (1.0 - B / h), 1e-9),
        "{u:?}"
    );
    assert!(
        close(u.overhang_projected, len * w * (1.0 - B / h), 1e-9),
        "{u:?}"
    );
    assert!(close(u.height, h, 1e-12));
}

#[test]
fn tilted_plate_resting_on_its_edge() {
    // A plate w x l x t turned by beta about x rests on its edge y = z = 0. Its bottom
    // (area w l) faces down at 90 - beta degrees from vertical, its front end (w t) at
    // beta degrees. The first layer cuts a strip B / sin(beta) of the bottom (projected
    // B / tan(beta)) and B / cos(beta) of the end (projected B tan(beta)):
    // contact = w B (cot beta + tan beta). Below 45 degrees of tilt only the bottom needs
    // support: w (l - B / sin beta).
    let (w, l, t) = (40.0, 100.0, 3.0);
    for beta_deg in [30.0f64, 20.0] {
        let beta = beta_deg.to_radians();
        let plate = TriMesh::cuboid(Point3::origin(), Vector3::new(w, l, t))
            .transformed(&Rotation3::from_axis_angle(&Vector3::x_axis(), beta).to_homogeneous());
        let u = underside(&plate, &Vector3::z(), &UndersideOptions::DEFAULT);
        let contact = w * B * (1.0 / beta.tan() + beta.tan());
        assert!(
            close(u.contact_area, contact, 1e-9),
            "{beta_deg}: {u:?} vs {contact}"
        );
        let over = w * (l - B / beta.sin());
        assert!(
            close(u.overhang_area, over, 1e-9),
            "{beta_deg}: {u:?} vs {over}"
        );
        assert!(close(u.height, l * beta.sin() + t * beta.cos(), 1e-12));
    }
    // Tilted past 45 degrees (60): the bottom is 30 degrees from vertical and prints; the
    // end is 60 degrees from vertical and needs support above its strip: w (t - B / cos 60).
    let beta = 60f64.to_radians();
    let plate = TriMesh::cuboid(Point3::origin(), Vector3::new(w, l, t))
        .transformed(&Rotation3::from_axis_angle(&Vector3::x_axis(), beta).to_homogeneous());
    let u = underside(&plate, &Vector3::z(), &UndersideOptions::DEFAULT);
    assert!(
        close(u.overhang_area, w * (t - B / beta.cos()), 1e-9),
        "{u:?}"
    );
}
