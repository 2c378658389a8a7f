//! Property tests: the section parser never panics, and normalising undoes any
//! similarity transform.

use nalgebra::{Point2, Rotation2, Vector2};
use proptest::prelude::*;
use spanwright::airfoil::{normalize, parse, resolve, Layout};

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    #[test]
    fn arbitrary_text_never_panics(text in "\\PC{0,400}") {
        let _ = parse(&text, "fuzz.dat");
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
        let _ = parse(&text, "fuzz.dat");
    }

    #[test]
    fn perturbed_sections_never_panic(
        noise in prop::collection::vec(-0.05f64..0.05, 81),
        swap in 0usize..80,
    ) {
        // A real outline with random bumps and one swapped pair: accepted or refused,
        // never a panic.
        let s = resolve("naca4412", &[]).unwrap().resample(41).unwrap();
        let mut p: Vec<Point2<f64>> = s
            .points()
            .iter()
            .zip(&noise)
            .map(|(q, n)| Point2::new(q.x, q.y + n))
            .collect();
        p.swap(swap, swap + 1);
        let text: String = p.iter().map(|q| format!("{} {}\n", q.x, q.y)).collect();
        let _ = parse(&text, "bumpy.dat");
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
        let worst = back
            .points()
            .iter()
            .zip(s.points())
            .map(|(a, b)| (a - b).norm())
            .fold(0.0, f64::max);
        prop_assert!(worst < 1e-6, "{}", worst);
        // Written in either layout and read back: the same again.
        let text = spanwright::airfoil::to_text(&back, if reversed { Layout::Sides } else { Layout::Loop }, "p", 12).unwrap();
        let again = parse(&text, "p.dat").unwrap();
        let worst = again
            .points()
            .iter()
            .zip(s.points())
            .map(|(a, b)| (a - b).norm())
            .fold(0.0, f64::max);
        prop_assert!(worst < 1e-6, "{}", worst);
    }
}
