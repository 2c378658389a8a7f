//! Blending, thickness scaling, trailing-edge thickening and measures.

use spanwright::airfoil::{blend, resolve, thicken_te, Section, SectionError};

const N: usize = 161;

fn section(name: &str) -> Section {
    resolve(name, &[]).unwrap().resample(N).unwrap()
}

fn max_distance(a: &Section, b: &Section) -> f64 {
    a.points()
        .iter()
        .zip(b.points())
        .map(|(p, q)| (p - q).norm())
        .fold(0.0, f64::max)
}

/// Report 460 thickness polynomial coefficients (open trailing edge), times 5 t.
const A: [f64; 5] = [0.2969, -0.1260, -0.3516, 0.2843, -0.1015];

#[test]
fn blend_of_0012_and_0018_is_15_percent() {
    // The 4-digit half-thickness is linear in t (NACA Report 460 thickness equation), so
    // the even blend of 0012 and 0018 at equal x is the 0015: 15 % within 0.05 %.
    let (a, b) = (section("naca0012"), section("naca0018"));
    let mid = blend(&a, &b, 0.5, N).unwrap();
    let t = mid.measures().unwrap().thickness;
    assert!((t - 0.15).abs() / 0.15 < 5e-4, "{t}");
    assert!(max_distance(&mid, &section("naca0015")) < 1e-6);
    // The ends are reproduced.
    assert!(max_distance(&blend(&a, &b, 0.0, N).unwrap(), &a) < 1e-12);
    assert!(max_distance(&blend(&a, &b, 1.0, N).unwrap(), &b) < 1e-12);
    // Sections with other structures are resampled first.
    let raw = resolve("naca2412", &[]).unwrap();
    assert_eq!(blend(&raw, &a, 0.3, 41).unwrap().points().len(), 81);
    // Weights outside [0, 1] are refused.
    assert!(matches!(
        blend(&a, &b, 1.5, N),
        Err(SectionError::Parameter { .. })
    ));
}

#[test]
fn thickness_scaling_follows_report_460_linearity() {
    // y_t is proportional to t (Report 460): 0012 scaled to the maximum thickness of the
    // 0018 is the 0018.
    let t18 = section("naca0018").measures().unwrap().thickness;
    let s = section("naca0012").with_thickness(t18, N).unwrap();
    assert!(max_distance(&s, &section("naca0018")) < 1e-6);
    // Camber is kept when a cambered section is scaled.
    let c = section("naca4412");
    let before = c.measures().unwrap();
    let after = c.with_thickness(0.15, N).unwrap().measures().unwrap();
    assert!((after.thickness - 0.15).abs() < 1e-4, "{}", after.thickness);
    assert!((after.camber - before.camber).abs() < 1e-6);
    assert!(c.with_thickness(0.0, N).is_err() && c.with_thickness(0.7, N).is_err());
}

#[test]
fn trailing_edge_thickening() {
    // Blend S(s) = s^2 (3 - 2 s) over x_t..1 added to each side: the added area is
    // (g_min - g) (1 - x_t) / 2, since the smoothstep integrates to 1/2 (elementary
    // calculus); checked against the polygon areas within 1 %.
    let s = section("naca0012-closed");
    let th = thicken_te(&s, 0.005, N).unwrap();
    assert!((th.te_after - 0.005).abs() < 1e-12, "{}", th.te_after);
    let m = s.measures().unwrap();
    let want = (0.005 - th.te_before) * (1.0 - m.thickness_at) / 2.0;
    let rel = (th.area_change() - want) / want;
    assert!(rel.abs() < 0.01, "{} vs {want}", th.area_change());
    // Nothing ahead of the thickest point moves; the leading edge is untouched.
    for (p, q) in s.points().iter().zip(th.section.points()) {
        if p.x <= m.thickness_at - 1e-3 {
            assert!((p - q).norm() < 1e-14);
        } else {
            assert!(q.y.abs() >= p.y.abs() - 1e-15);
        }
    }
    // The thickest point stays where it was, within the measuring resolution.
    let m2 = th.section.measures().unwrap();
    assert!((m2.thickness - m.thickness).abs() < 1e-6);
    // A thick enough trailing edge is left alone.
    let open = section("naca0012");
    let same = thicken_te(&open, 0.001, N).unwrap();
    assert_eq!(same.area_change(), 0.0);
    assert!(max_distance(&same.section, &open) < 1e-12);
    assert!(thicken_te(&open, -0.1, N).is_err());
}

#[test]
fn measures_of_0012_match_the_thickness_integrals() {
    // Integrals of the Report 460 polynomial y = 5t (a0 sqrt(x) + a1 x + ... + a4 x^4):
    // area  = 2 * 5t (2/3 a0 + a1/2 + a2/3 + a3/4 + a4/5)
    // x-moment = 2 * 5t (2/5 a0 + a1/3 + a2/4 + a3/5 + a4/6); centroid = moment / area;
    // derived here term by term. A symmetric section has its centroid on the chord.
    let t = 0.12;
    let area = 10.0 * t * (A[0] * 2.0 / 3.0 + A[1] / 2.0 + A[2] / 3.0 + A[3] / 4.0 + A[4] / 5.0);
    let moment = 10.0 * t * (A[0] * 2.0 / 5.0 + A[1] / 3.0 + A[2] / 4.0 + A[3] / 5.0 + A[4] / 6.0);
    let m = resolve("naca0012", &[]).unwrap().measures().unwrap();
    assert!((m.area - area).abs() / area < 5e-4, "{} vs {area}", m.area);
    assert!(
        (m.centroid[0] - moment / area).abs() < 5e-4,
        "{:?}",
        m.centroid
    );
    assert!(m.centroid[1].abs() < 1e-9);
    // Maximum thickness: the Report 460 polynomial's maximum, found here on a fine grid
    // (0.120035 at x = 0.2998; the designation rounds it to 12 % at 30 %).
    let (tmax, xmax) = (1..100_000)
        .map(|i| i as f64 / 100_000.0)
        .map(|x| {
            let y = A[0] * x.sqrt() + A[1] * x + A[2] * x * x + A[3] * x.powi(3) + A[4] * x.powi(4);
            (10.0 * t * y, x)
        })
        .fold((0.0, 0.0), |a, b| if b.0 > a.0 { b } else { a });
    assert!(
        (m.thickness - tmax).abs() < 1e-6,
        "{} vs {tmax}",
        m.thickness
    );
    assert!(
        (m.thickness_at - xmax).abs() < 2e-3,
        "{} vs {xmax}",
        m.thickness_at
    );
    assert_eq!(m.camber, 0.0);
    // Open trailing edge: 2 * 5t * sum(a) = 0.00252 (evaluated by hand).
    assert!((m.te_thickness - 0.00252).abs() < 1e-6);
}
