//! Stress estimate against closed-form results for a uniform bar.

mod props_support;

use props_support::boxed;
use spanwright::props::{span_radii, Fill, LoadCase, Material, StressTable, ThrustSpread};

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1e-30)
}

#[test]
fn spinning_bar_centrifugal_stress() {
    // Uniform bar of section A, length L along z from the rotor axis, spinning at omega.
    // The part outboard of r has mass rho A (L - r) and its centre at (L + r) / 2, so
    // F(r) = integral_r^L rho A omega^2 s ds = rho A omega^2 (L^2 - r^2) / 2 and
    // sigma(r) = F / A = rho omega^2 (L^2 - r^2) / 2 (derived here; any text on rotating
    // bars). Computed below in SI units (kg/m^3, m, Pa) as an independent unit path.
    let (b, h, l) = (12.0, 5.0, 400.0);
    let mesh = boxed(b, h, l, 8);
    let mat = Material::preset("petg").unwrap();
    let load = LoadCase {
        rpm: 3000.0,
        ..LoadCase::default()
    };
    let radii = span_radii(&mesh, 41);
    let t = StressTable::estimate(&mesh, &radii, &mat, Fill::SOLID, &load).unwrap();
    let rho = mat.density * 1000.0; // kg/m^3
    let w = 3000.0 * std::f64::consts::TAU / 60.0;
    let lm = l / 1000.0;
    for row in &t.rows {
        let r = row.section.radius / 1000.0;
        let sigma = rho * w * w * (lm * lm - r * r) / 2.0 / 1e6; // MPa
        assert!(
            (row.centrifugal_stress - sigma).abs() <= 1e-9 * sigma.max(1e-6) + 1e-9,
            "r = {}: {} vs {sigma}",
            row.section.radius,
            row.centrifugal_stress
        );
        // No thrust: bending-free, tension uniform over the section.
        assert!(close(row.max_tension, row.centrifugal_stress, 1e-9) || sigma < 1e-9);
    }
    let root = rho * w * w * lm * lm / 2.0 / 1e6;
    assert!(close(t.rows[0].centrifugal_stress, root, 1e-6));
    assert!(close(t.min_safety_factor, mat.strength / root, 1e-6));
    assert_eq!(t.passes, t.min_safety_factor >= 3.0);
    // Mass of the bar (density x volume) in grams.
    assert!(close(t.mass, mat.density * 1e-3 * b * h * l, 1e-12));
    assert!(!t.cautions.is_empty());
}

#[test]
fn cantilever_uniform_load_tip_deflection() {
    // Cantilever of length L under a uniform load q: tip deflection w = q L^4 / (8 E I),
    // root moment q L^2 / 2 (Roark's Formulas for Stress and Strain, 8th ed., Table 8.1,
    // case 2a; from memory). Extreme-fibre stress M c / I with c = h / 2 (Euler-Bernoulli).
    let (b, h, l) = (20.0, 4.0, 300.0);
    let mesh = boxed(b, h, l, 4);
    let mat = Material::preset("pla").unwrap();
    let thrust = 6.0; // N on the blade, spread uniformly: q = T / L
    let load = LoadCase {
        thrust: Some(thrust),
        spread: ThrustSpread::Uniform,
        ..LoadCase::default()
    };
    let radii = span_radii(&mesh, 301);
    let t = StressTable::estimate(&mesh, &radii, &mat, Fill::SOLID, &load).unwrap();
    let q = thrust / l;
    let i = b * h.powi(3) / 12.0;
    let w = q * l.powi(4) / (8.0 * mat.modulus * i);
    assert!(
        close(t.tip_deflection, w, 1e-3),
        "{} vs {w}",
        t.tip_deflection
    );
    // The first cut sits 1e-6 of the span outboard of the root face (see span_radii):
    // M(r) = q (L - r)^2 / 2 there.
    let r = t.rows[0].section.radius;
    assert!(r > 0.0 && r < 1e-5 * l);
    let m = q * (l - r).powi(2) / 2.0;
    assert!(close(t.rows[0].bending_moment, m, 1e-9));
    let sigma = m * (h / 2.0) / i;
    assert!(close(t.rows[0].max_tension, sigma, 1e-6));
    assert!(close(t.rows[0].max_compression, sigma, 1e-6));
    assert!(close(t.thrust_per_blade, thrust, 1e-12));
}

#[test]
fn momentum_thrust_and_annulus_moment() {
    // Momentum theory at the Betz optimum: axial induction a = 1/3, C_T = 4 a (1 - a) = 8/9,
    // T = 0.5 rho A V^2 C_T (Manwell, McGowan & Rogers, Wind Energy Explained, 2nd ed.,
    // section 3.2; from memory). Spread in proportion to r over [r0, R], the load's centre
    // lies at 2/3 (R^3 - r0^3) / (R^2 - r0^2), so the root moment is T (centre - r0)
    // (statics).
    let (b, h, r0, rt) = (30.0, 6.0, 50.0, 500.0);
    let mut mesh = boxed(b, h, rt - r0, 6);
    mesh.translate(nalgebra::Vector3::new(-b / 4.0, -h / 2.0, r0));
    let a = 1.0 / 3.0;
    let load = LoadCase {
        wind: 10.0,
        blades: 2,
        thrust_coefficient: 4.0 * a * (1.0 - a),
        ..LoadCase::default()
    };
    let mat = Material::preset("asa").unwrap();
    let t =
        StressTable::estimate(&mesh, &span_radii(&mesh, 51), &mat, Fill::DEFAULT, &load).unwrap();
    let area = std::f64::consts::PI * (rt / 1000.0).powi(2);
    let thrust = 0.5 * 1.225 * area * 100.0 * (8.0 / 9.0) / 2.0;
    assert!(close(t.thrust_per_blade, thrust, 1e-9));
    let centre = 2.0 / 3.0 * (rt.powi(3) - r0.powi(3)) / (rt * rt - r0 * r0);
    // First cut 1e-6 of the span outboard of the root face: allow 1e-5.
    assert!(close(
        t.rows[0].bending_moment,
        thrust * (centre - r0),
        1e-5
    ));
    assert!(t.rows.last().unwrap().bending_moment.abs() < 1e-6 * thrust);
    // Printed fill: section stresses are divided by the section's material fraction, our
    // stated, conservative approximation. The b x h rectangle eroded by the 1.2 mm wall
    // is (b - 2.4) x (h - 2.4) (elementary geometry), filled to 20 %, the rest solid.
    // (Until issue 14 the fraction took the shell as perimeter x wall: 0.584 here
    // instead of 0.5584.)
    let s = &t.rows[10];
    let inner = (b - 2.4) * (h - 2.4);
    let frac = (b * h - 0.8 * inner) / (b * h);
    assert!(close(s.fill, frac, 1e-6), "{} vs {frac}", s.fill);
    let bending = s.bending_moment * (h / 2.0) / (b * h.powi(3) / 12.0) / frac;
    assert!(close(s.max_compression, bending, 1e-6));
}

#[test]
fn bad_load_is_an_error_not_a_panic() {
    let mesh = boxed(10.0, 2.0, 100.0, 2);
    let mat = Material::preset("abs").unwrap();
    for load in [
        LoadCase {
            rpm: -1.0,
            ..LoadCase::default()
        },
        LoadCase {
            safety_factor: 0.5,
            ..LoadCase::default()
        },
        LoadCase {
            blades: 0,
            ..LoadCase::default()
        },
        LoadCase {
            wind: f64::NAN,
            ..LoadCase::default()
        },
    ] {
        let e = StressTable::estimate(&mesh, &span_radii(&mesh, 5), &mat, Fill::SOLID, &load);
        assert!(e.is_err());
    }
    let mut open = mesh.clone();
    open.triangles.truncate(10);
    assert!(
        StressTable::estimate(&open, &[50.0], &mat, Fill::SOLID, &LoadCase::default()).is_err()
    );
}
