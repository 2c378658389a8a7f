//! Printability along the span against the analytic thickness of an elliptic section.

use nalgebra::Point3;
use spanwright::fit::{printability, printability_of_outlines, PrintabilityOptions, PrinterSpec};
use spanwright::mesh::TriMesh;

/// Thickness of an ellipse with semi-axes a (along the chord) and b, measured across the
/// chord at distance p from one end: 2 b sqrt(1 - ((a - p) / a)^2) (elementary analytic
/// geometry, from x^2/a^2 + y^2/b^2 = 1).
fn ellipse_thickness(a: f64, b: f64, p: f64) -> f64 {
    2.0 * b * (1.0 - ((a - p) / a).powi(2)).sqrt()
}

/// Invented test solid: elliptic sections, semi-chord `a`, half-thickness tapering
/// linearly from `b0` (z = 0) to `b1` (z = len), closed by fan caps.
fn tapered(a: f64, b0: f64, b1: f64, len: f64, rings: usize, around: usize) -> TriMesh {
    let mut m = TriMesh::new();
    for k in 0..rings {
        let f = k as f64 / (rings - 1) as f64;
        let b = b0 + (b1 - b0) * f;
        for i in 0..around {
            let t = std::f64::consts::TAU * i as f64 / around as f64;
            m.push_vertex(Point3::new(a * t.cos(), b * t.sin(), len * f));
        }
    }
    let n = around as u32;
    for k in 0..rings as u32 - 1 {
        for i in 0..n {
            let j = (i + 1) % n;
            let (p, q, r, s) = (k * n + i, k * n + j, (k + 1) * n + j, (k + 1) * n + i);
            m.triangles.push([p, q, r]);
            m.triangles.push([p, r, s]);
        }
    }
    let bottom = m.push_vertex(Point3::new(0.0, 0.0, 0.0));
    let top = m.push_vertex(Point3::new(0.0, 0.0, len));
    let last = (rings as u32 - 1) * n;
    for i in 0..n {
        let j = (i + 1) % n;
        m.triangles.push([bottom, j, i]);
        m.triangles.push([top, last + i, last + j]);
    }
    m
}

#[test]
fn tapered_ellipse_against_formula() {
    let printer = PrinterSpec {
        preset: Some("medium-220".into()),
        nozzle: Some(0.4),
        min_feature: Some(0.8),
        ..Default::default()
    }
    .resolve("test")
    .unwrap();
    let (a, b0, b1, len) = (30.0, 3.0, 0.2, 100.0);
    let mesh = tapered(a, b0, b1, len, 101, 720);
    let rep = printability(&mesh, &printer, &PrintabilityOptions::DEFAULT);
    assert_eq!(rep.cuts.len(), 40);
    for (i, c) in rep.cuts.iter().enumerate() {
        let b = b0 + (b1 - b0) * c.z / len;
        assert!((c.chord - 2.0 * a).abs() < 1e-6, "chord {}", c.chord);
        // Section thickness 2b (the polygon has vertices at the ends of the minor axis).
        assert!(
            (c.thickness - 2.0 * b).abs() < 0.01,
            "cut {i}: {} vs {}",
            c.thickness,
            2.0 * b
        );
        let te = ellipse_thickness(a, b, 0.4);
        assert!(
            (c.te_thickness - te).abs() < 0.01,
            "cut {i}: te {} vs {te}",
            c.te_thickness
        );
        if (te - 0.4).abs() > 0.02 {
            assert_eq!(c.te_short, te < 0.4, "cut {i}");
        }
        if (2.0 * b - 0.8).abs() > 0.02 {
            assert_eq!(c.thin, 2.0 * b < 0.8, "cut {i}");
        }
    }
    // Half-thickness below 0.4 mm from z = (3 - 0.4) / 2.8 * 100 = 92.9 mm: the last three
    // cuts (z = 93.75, 96.25, 98.75).
    assert_eq!(rep.thin, vec![37, 38, 39]);
    assert!(!rep.te_short.is_empty() && !rep.ok());
    let text = rep.findings().join("\n");
    assert!(text.contains("min-te-thickness"), "{text}");
}

#[test]
fn outlines_given_directly() {
    // A 60 x 2 mm rectangle section with a blunt 2 mm trailing edge: thickness 2 mm
    // everywhere, so neither check fails for a 0.4 mm nozzle and 0.8 mm features.
    let printer = PrinterSpec {
        preset: Some("small-180".into()),
        ..Default::default()
    }
    .resolve("test")
    .unwrap();
    let rect = vec![[0.0, -1.0], [60.0, -1.0], [60.0, 1.0], [0.0, 1.0]];
    let rep = printability_of_outlines(&[(10.0, rect)], &printer, &PrintabilityOptions::DEFAULT);
    let c = &rep.cuts[0];
    // The chord is the longest segment: the diagonal sqrt(60^2 + 2^2).
    assert!((c.chord - (3604f64).sqrt()).abs() < 1e-9);
    assert!(
        c.te_thickness > 0.4 && c.thickness > 1.9 && rep.ok(),
        "{c:?}"
    );
}
