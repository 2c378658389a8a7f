//! Property tests: the section parser never panics, every section it accepts keeps the
//! section conventions (point order, frame by chord line, resampled structure), and
//! normalising undoes any similarity transform.

use nalgebra::{Point2, Rotation2, Vector2};
use proptest::prelude::*;
use proptest::test_runner::TestCaseError;
use spanwright::airfoil::{
    cosine_stations, normalize, parse, resolve, ChordLine, Layout, Section, NORMALISED_TOLERANCE,
};

/// Points per side the parser proves a section resamples to (its own check,
/// `airfoil/import.rs`).
const RESAMPLED: usize = 101;

/// Distance from `p` to the polyline through `pts`.
fn to_polyline(p: Point2<f64>, pts: &[Point2<f64>]) -> f64 {
    pts.windows(2)
        .map(|w| {
            let ab = w[1] - w[0];
            let t = ((p - w[0]).dot(&ab) / ab.norm_squared().max(1e-300)).clamp(0.0, 1.0);
            (p - (w[0] + ab * t)).norm()
        })
        .fold(f64::INFINITY, f64::min)
}

/// The section invariants stated in src/conventions.rs ("Section frame") and
/// src/airfoil/section.rs, for a section read from a file:
/// * point order: upper trailing edge -> leading edge -> lower trailing edge,
///   counter-clockwise (positive shoelace area), the leading-edge point interior and
///   foremost (smallest x);
/// * frame by chord line: a file's chord line is `Kept` (trailing-edge midpoint and the
///   outline within `NORMALISED_TOLERANCE` of (1, 0) and (0, 0)) or `Normalised`
///   (trailing-edge midpoint at (1, 0) and leading-edge point, the farthest, at (0, 0));
///   never `Published`, which only generated designations have;
/// * resampled structure: `2n - 1` points, the leading edge in the middle and unchanged,
///   the ends unchanged, each side's x at the cosine stations from the leading edge to
///   that side's trailing edge, the same chord line, and resampling again gives the same
///   points.
fn section_invariants(s: &Section) -> Result<(), TestCaseError> {
    let p = s.points();
    let (n, le) = (p.len(), s.leading_edge_index());
    prop_assert!(le > 0 && le + 1 < n, "leading edge at {le} of {n}");
    prop_assert!(s.signed_area() > 0.0, "clockwise: area {}", s.signed_area());
    let foremost = p.iter().map(|q| q.x).fold(f64::INFINITY, f64::min);
    prop_assert!(
        p[le].x <= foremost + 1e-9,
        "leading edge {:?} not foremost ({foremost})",
        p[le]
    );
    let te = nalgebra::center(&p[0], &p[n - 1]);
    let one = Point2::new(1.0, 0.0);
    match s.chord_line() {
        ChordLine::Normalised(_) => {
            prop_assert!((te - one).norm() < 1e-9, "trailing edge at {te:?}");
            prop_assert!(p[le].coords.norm() < 1e-9, "leading edge at {:?}", p[le]);
        }
        ChordLine::Kept => {
            prop_assert!(
                (te - one).norm() <= NORMALISED_TOLERANCE,
                "trailing edge at {te:?}"
            );
            let d = to_polyline(Point2::origin(), p);
            prop_assert!(d <= NORMALISED_TOLERANCE, "outline {d} from (0, 0)");
        }
        ChordLine::Published => prop_assert!(false, "a file section with a published chord line"),
    }
    let r = s
        .resample(RESAMPLED)
        .map_err(|e| TestCaseError::fail(format!("does not resample: {e}")))?;
    let q = r.points();
    prop_assert_eq!(q.len(), 2 * RESAMPLED - 1);
    prop_assert_eq!(r.points_per_side(), Some(RESAMPLED));
    prop_assert_eq!(r.chord_line(), s.chord_line());
    prop_assert_eq!(q[RESAMPLED - 1], p[le]);
    prop_assert_eq!((q[0], q[q.len() - 1]), (p[0], p[n - 1]));
    let c = cosine_stations(RESAMPLED);
    for side in [r.upper_le_to_te(), r.lower_le_to_te().to_vec()] {
        let (x0, x1) = (side[0].x, side[RESAMPLED - 1].x);
        for (k, pt) in side.iter().enumerate() {
            let want = x0 + c[k] * (x1 - x0);
            prop_assert!(
                (pt.x - want).abs() < 1e-9,
                "station {k}: x {} vs {want}",
                pt.x
            );
        }
    }
    let again = r
        .resample(RESAMPLED)
        .map_err(|e| TestCaseError::fail(format!("does not resample again: {e}")))?;
    let moved = farthest_apart(again.points(), q);
    prop_assert!(moved < 1e-9, "resampling again moved a point by {moved}");
    Ok(())
}

/// The largest distance between corresponding points.
fn farthest_apart(a: &[Point2<f64>], b: &[Point2<f64>]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(p, q)| (p - q).norm())
        .fold(0.0, f64::max)
}

/// Accepted sections keep the invariants; refused ones are an error, not a panic.
fn parsed_keeps_invariants(text: &str, file: &str) -> Result<(), TestCaseError> {
    match parse(text, file) {
        Ok(s) => section_invariants(&s),
        Err(_) => Ok(()),
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    #[test]
    fn arbitrary_text_never_panics(text in "\\PC{0,400}") {
        parsed_keeps_invariants(&text, "fuzz.dat")?;
    }

    #[test]
    fn arbitrary_numbers_never_panic(
        pts in prop::collection::vec((-1e6f64..1e6, -1e6f64..1e6), 0..60),
        counts in prop::option::of((0u32..40, 0u32..40)),
    ) {
        let mut text = String::from("fuzz\n");
        if let Some((a, b)) = counts {
            text.push_str(&format!("{a} {b}\n"));
        }
        for (x, y) in &pts {
            text.push_str(&format!("{x} {y}\n"));
        }
        parsed_keeps_invariants(&text, "fuzz.dat")?;
    }

    #[test]
    fn perturbed_sections_never_panic(
        noise in prop::collection::vec(-0.05f64..0.05, 81),
        swap in 0usize..80,
    ) {
        // A real outline with random bumps and one swapped pair: refused, or accepted
        // keeping the invariants; never a panic.
        let s = resolve("naca4412", &[]).unwrap().resample(41).unwrap();
        let mut p: Vec<Point2<f64>> = s
            .points()
            .iter()
            .zip(&noise)
            .map(|(q, n)| Point2::new(q.x, q.y + n))
            .collect();
        p.swap(swap, swap + 1);
        let text: String = p.iter().map(|q| format!("{} {}\n", q.x, q.y)).collect();
        parsed_keeps_invariants(&text, "bumpy.dat")?;
    }

    #[test]
    fn slightly_bumpy_sections_are_accepted_keeping_the_invariants(
        noise in prop::collection::vec(-1e-4f64..1e-4, 81),
        in_mm in any::<bool>(),
    ) {
        // A real outline with bumps far smaller than its thickness (0.0025 chord even at
        // the 4412's open trailing edge) is a valid section: accepted, in unit chord
        // (chord line kept) or in millimetres and shifted (normalised).
        let s = resolve("naca4412", &[]).unwrap().resample(41).unwrap();
        let text: String = s
            .points()
            .iter()
            .zip(&noise)
            .map(|(q, n)| {
                let (x, y) = (q.x, q.y + n);
                if in_mm {
                    format!("{} {}\n", 150.0 * x + 20.0, 150.0 * y - 5.0)
                } else {
                    format!("{x} {y}\n")
                }
            })
            .collect();
        let parsed = parse(&text, "bumpy.dat");
        prop_assert!(parsed.is_ok(), "{:?}", parsed.err());
        let parsed = parsed.unwrap();
        let normalised = matches!(parsed.chord_line(), ChordLine::Normalised(_));
        prop_assert_eq!(normalised, in_mm);
        section_invariants(&parsed)?;
    }

    #[test]
    fn normalising_undoes_a_similarity(
        angle in -3.1f64..3.1,
        scale in 1e-2f64..1e3,
        dx in -1e3f64..1e3,
        dy in -1e3f64..1e3,
        reversed in any::<bool>(),
    ) {
        // Geometry: normalising depends only on the trailing-edge midpoint and the
        // farthest point, which a similarity transform carries along: the moved outline
        // normalises to the same section as the unmoved one.
        let published = resolve("naca2412", &[]).unwrap().resample(61).unwrap();
        let s = normalize("s", published.points()).unwrap();
        let rot = Rotation2::new(angle);
        let mut moved: Vec<Point2<f64>> = published
            .points()
            .iter()
            .map(|p| Point2::from(rot * p.coords * scale + Vector2::new(dx, dy)))
            .collect();
        if reversed {
            moved.reverse();
        }
        let back = normalize("m", &moved).unwrap();
        section_invariants(&back)?;
        let worst = farthest_apart(back.points(), s.points());
        prop_assert!(worst < 1e-6, "{}", worst);
        // Written in either layout and read back: the same again.
        let text = spanwright::airfoil::to_text(&back, if reversed { Layout::Sides } else { Layout::Loop }, "p", 12).unwrap();
        let again = parse(&text, "p.dat").unwrap();
        section_invariants(&again)?;
        let worst = farthest_apart(again.points(), s.points());
        prop_assert!(worst < 1e-6, "{}", worst);
    }
}
