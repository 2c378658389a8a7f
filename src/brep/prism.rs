//! A straight prism: planar loops (an outer loop and holes) swept along z. The fit
//! coupons ([`crate::coupon`]) are such prisms, meshed from the same loops, so the exact
//! solid and the mesh are the same polyhedron.

use super::BrepError;
use nalgebra::Point2;
use truck_modeling::{builder, Point3, Solid, Vector3, Wire};

/// The prism of the region bounded by `loops` (the first counter-clockwise, the others
/// clockwise holes inside it, as [`crate::coupon::prism`] takes them), from z = 0 to
/// z = `length`: one planar face per loop edge and the two planar ends.
///
/// # Errors
/// [`BrepError::BadFeature`] when a loop has fewer than three points, the length is not
/// positive, or the loops do not bound a planar face.
pub fn prism_solid(loops: &[Vec<Point2<f64>>], length: f64) -> Result<Solid, BrepError> {
    let bad = |problem: String| BrepError::BadFeature {
        feature: "prism".to_string(),
        problem,
        fix: "give closed loops of at least three points and a positive length".to_string(),
    };
    if !(length > 0.0 && length.is_finite()) {
        return Err(bad(format!("length {length} mm")));
    }
    let mut wires = Vec::with_capacity(loops.len());
    for (k, l) in loops.iter().enumerate() {
        if l.len() < 3 {
            return Err(bad(format!("loop {k} has {} points", l.len())));
        }
        let vs: Vec<_> = l
            .iter()
            .map(|p| builder::vertex(Point3::new(p.x, p.y, 0.0)))
            .collect();
        let n = vs.len();
        let wire: Wire = (0..n)
            .map(|i| builder::line(&vs[i], &vs[(i + 1) % n]))
            .collect();
        wires.push(wire);
    }
    let face = builder::try_attach_plane(&wires).map_err(|e| bad(format!("{e}")))?;
    // truck orients the plane by the first wire's sense (counter-clockwise seen from +z:
    // facing +z) and sweeping it along +z gives an outward-facing solid (checked by the
    // signed volume of the read-back file in tests/coupon_fit.rs).
    Ok(builder::tsweep(&face, Vector3::new(0.0, 0.0, length)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use truck_modeling::ShellCondition;

    #[test]
    fn square_with_a_square_hole_is_a_closed_solid_of_the_right_shape() {
        // A 10 x 10 mm square with a 4 x 4 mm hole, 5 mm long: 4 + 4 side faces, 2 ends.
        let sq = |h: f64, ccw: bool| {
            let mut v = vec![
                Point2::new(-h, -h),
                Point2::new(h, -h),
                Point2::new(h, h),
                Point2::new(-h, h),
            ];
            if !ccw {
                v.reverse();
            }
            v
        };
        let solid = prism_solid(&[sq(5.0, true), sq(2.0, false)], 5.0).unwrap();
        let shell = &solid.boundaries()[0];
        assert_eq!(shell.shell_condition(), ShellCondition::Closed);
        assert_eq!(shell.len(), 10);
        assert!(prism_solid(&[sq(5.0, true)], 0.0).is_err());
    }
}
