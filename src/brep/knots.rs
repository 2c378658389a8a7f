//! Knot vectors as a STEP file carries them.
//!
//! ISO 10303-42 (`b_spline_curve_with_knots`) writes distinct knot values with their
//! multiplicities. truck-stepio groups knots closer than truck's tolerance (1e-6) into one
//! value, and readers refuse or drop a curve or surface whose multiplicities do not add
//! up: a knot repeated more than the degree inside the vector (the curve would break
//! apart there), or ends not repeated degree + 1 times. Every solid is checked with
//! [`check_knots`] before it is handed out, so no such file is ever written.

use super::BrepError;
use truck_modeling::{Curve, Solid, Surface};

/// truck's tolerance, below which truck-stepio merges two knots into one.
const MERGE: f64 = 1e-6;

/// The distinct knot values and multiplicities the STEP writer makes of `knots`.
pub(crate) fn grouped(knots: &[f64]) -> Vec<(f64, usize)> {
    let mut out: Vec<(f64, usize)> = Vec::new();
    let mut prev: Option<f64> = None;
    for &k in knots {
        match (prev, out.last_mut()) {
            (Some(p), Some(last)) if (k - p).abs() <= MERGE => last.1 += 1,
            _ => out.push((k, 1)),
        }
        prev = Some(k);
    }
    out
}

/// Checks one knot vector of degree `degree`: finite, not decreasing, no two distinct
/// values merged by the writer, ends clamped (multiplicity `degree + 1`), interior
/// multiplicities at most `degree`.
pub fn check_knot_vector(knots: &[f64], degree: usize, entity: &str) -> Result<(), BrepError> {
    // Distinct values, and those repeated (the full list can run to hundreds).
    let show = |g: &[(f64, usize)]| {
        let repeated: Vec<String> = g
            .iter()
            .filter(|(_, m)| *m > 1)
            .map(|(k, m)| format!("{k}x{m}"))
            .collect();
        format!(
            "{} distinct values, repeated: {}",
            g.len(),
            repeated.join(", ")
        )
    };
    let bad = |problem: String| BrepError::BadKnots {
        entity: entity.to_string(),
        knots: show(&grouped(knots)),
        problem,
    };
    if knots.iter().any(|k| !k.is_finite()) {
        return Err(bad("a knot is not finite".into()));
    }
    if let Some(w) = knots.windows(2).find(|w| w[1] < w[0]) {
        return Err(bad(format!(
            "knot {} follows {}: knots must not decrease",
            w[1], w[0]
        )));
    }
    if let Some(w) = knots
        .windows(2)
        .find(|w| w[1] != w[0] && (w[1] - w[0]).abs() <= MERGE)
    {
        return Err(bad(format!(
            "the knots {} and {} differ by less than {MERGE}, so the file would merge them into one",
            w[0], w[1]
        )));
    }
    let g = grouped(knots);
    if g.len() < 2 {
        return Err(bad("fewer than two distinct knots".into()));
    }
    let (first, last) = (g[0].1, g[g.len() - 1].1);
    if first != degree + 1 || last != degree + 1 {
        return Err(bad(format!(
            "the end knots are repeated {first} and {last} times; degree {degree} needs {} (clamped)",
            degree + 1
        )));
    }
    if let Some((k, m)) = g[1..g.len() - 1].iter().find(|(_, m)| *m > degree) {
        return Err(bad(format!(
            "the inner knot {k} is repeated {m} times, more than the degree {degree}"
        )));
    }
    Ok(())
}

fn check_surface(s: &Surface, entity: &str) -> Result<(), BrepError> {
    let (ku, kv, pu, pv) = match s {
        Surface::Plane(_) => return Ok(()),
        Surface::BSplineSurface(b) => (b.uknot_vec(), b.vknot_vec(), b.udegree(), b.vdegree()),
        Surface::NurbsSurface(n) => (
            n.uknot_vec(),
            n.vknot_vec(),
            n.non_rationalized().udegree(),
            n.non_rationalized().vdegree(),
        ),
        Surface::RevolutedCurve(r) => return check_curve(r.entity().entity_curve(), entity),
    };
    check_knot_vector(ku.as_slice(), pu, &format!("{entity} (u)"))?;
    check_knot_vector(kv.as_slice(), pv, &format!("{entity} (v)"))
}

fn check_curve(c: &Curve, entity: &str) -> Result<(), BrepError> {
    match c {
        Curve::Line(_) => Ok(()),
        Curve::BSplineCurve(b) => check_knot_vector(b.knot_vec().as_slice(), b.degree(), entity),
        Curve::NurbsCurve(n) => check_knot_vector(n.knot_vec().as_slice(), n.degree(), entity),
        Curve::IntersectionCurve(_) => Err(BrepError::BadKnots {
            entity: entity.to_string(),
            knots: String::new(),
            problem: "intersection curves are not written by this crate's STEP writer".into(),
        }),
    }
}

/// Checks the knot vector of every surface and edge curve of `solid` (see the module
/// docs). Errors name the face or edge by its position in the solid.
///
/// # Errors
/// [`BrepError::BadKnots`].
pub fn check_knots(solid: &Solid) -> Result<(), BrepError> {
    for (s, shell) in solid.boundaries().iter().enumerate() {
        for (f, face) in shell.face_iter().enumerate() {
            check_surface(&face.surface(), &format!("shell {s} face {f} surface"))?;
        }
        for (e, edge) in shell.edge_iter().enumerate() {
            check_curve(&edge.curve(), &format!("shell {s} edge {e} curve"))?;
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn multiplicities_as_the_writer_groups_them() {
        // ISO 10303-42 b_spline_curve_with_knots: clamped cubic, interior multiplicity
        // at most the degree.
        assert!(check_knot_vector(&[0., 0., 0., 0., 0.5, 1., 1., 1., 1.], 3, "c").is_ok());
        assert!(
            check_knot_vector(&[0., 0., 0., 0., 0.5, 0.5, 0.5, 1., 1., 1., 1.], 3, "c").is_ok()
        );
        // The case of the reproducer 05-step-bad-knots: a cut 1e-7 below a knot gives
        // four copies plus the knot, which the writer merges into multiplicity 5.
        let k = [
            0., 0., 0., 0., 0.4999999, 0.4999999, 0.4999999, 0.4999999, 0.5, 1., 1., 1., 1.,
        ];
        let e = check_knot_vector(&k, 3, "c").unwrap_err().to_string();
        assert!(e.contains("merge"), "{e}");
        let k = [0., 0., 0., 0., 0.5, 0.5, 0.5, 0.5, 1., 1., 1., 1.];
        let e = check_knot_vector(&k, 3, "c").unwrap_err().to_string();
        assert!(e.contains("repeated 4 times"), "{e}");
        assert!(check_knot_vector(&[0., 0., 0., 0.5, 1., 1., 1., 1.], 3, "c").is_err());
        assert_eq!(
            grouped(&[0., 0., 0.3, 1., 1.]),
            vec![(0., 2), (0.3, 1), (1., 2)]
        );
    }
}
