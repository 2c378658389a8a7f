//! Planar polygons shared by every cap and face builder: the even-odd point-in-polygon
//! rule and a constrained Delaunay triangulation of a region bounded by loops (an outer
//! loop and any holes), without added points, so the region's boundary vertices are
//! exactly the ones the caller already has (watertight joins by construction).

use nalgebra::Point2;
use std::ops::Range;

/// Even-odd (crossing-number) rule: true when `q` is inside the closed polygon `poly`
/// (Haines, "Point in Polygon Strategies", Graphics Gems IV, 1994).
pub fn point_in_polygon(poly: &[Point2<f64>], q: &Point2<f64>) -> bool {
    let mut c = false;
    let n = poly.len();
    for i in 0..n {
        let (a, b) = (poly[i], poly[(i + 1) % n]);
        if (a.y > q.y) != (b.y > q.y) {
            let x = a.x + (q.y - a.y) * (b.x - a.x) / (b.y - a.y);
            if q.x < x {
                c = !c;
            }
        }
    }
    c
}

/// Triangulates the region bounded by the closed loops `points[loops[k]]` (the region is
/// what lies inside an odd number of loops: an outer loop with holes). Triangles index
/// `points` and are oriented counter-clockwise. `None` when two loop edges cross or two
/// points coincide (no triangulation without added points exists then).
///
/// Method: constrained Delaunay triangulation (spade) of all loop edges, keeping the
/// triangles whose centroid is inside the region; a constrained triangulation never
/// crosses a loop edge, so each triangle is wholly inside or wholly outside.
pub fn triangulate(points: &[Point2<f64>], loops: &[Range<usize>]) -> Option<Vec<[usize; 3]>> {
    use spade::{ConstrainedDelaunayTriangulation, Point2 as SPoint, Triangulation};
    let vertices: Vec<SPoint<f64>> = points.iter().map(|p| SPoint::new(p.x, p.y)).collect();
    let mut edges = Vec::new();
    for r in loops {
        for i in r.clone() {
            edges.push([i, if i + 1 == r.end { r.start } else { i + 1 }]);
        }
    }
    let mut conflict = false;
    let cdt: ConstrainedDelaunayTriangulation<SPoint<f64>> =
        ConstrainedDelaunayTriangulation::try_bulk_load_cdt(vertices, edges, |_| conflict = true)
            .ok()?;
    if conflict || cdt.num_vertices() != points.len() {
        return None;
    }
    let polys: Vec<&[Point2<f64>]> = loops.iter().map(|r| &points[r.clone()]).collect();
    let mut out = Vec::new();
    for face in cdt.inner_faces() {
        let [a, b, c] = face.vertices().map(|v| v.fix().index());
        let q = Point2::from((points[a].coords + points[b].coords + points[c].coords) / 3.0);
        let inside = polys.iter().filter(|p| point_in_polygon(p, &q)).count() % 2 == 1;
        if inside {
            let area = (points[b] - points[a]).perp(&(points[c] - points[a]));
            out.push(if area >= 0.0 { [a, b, c] } else { [a, c, b] });
        }
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn square_with_a_square_hole() {
        // Area of the triangulation = 16 - 4 (elementary geometry).
        let p = |x: f64, y: f64| Point2::new(x, y);
        let pts = vec![
            p(0.0, 0.0),
            p(4.0, 0.0),
            p(4.0, 4.0),
            p(0.0, 4.0),
            p(1.0, 1.0),
            p(1.0, 3.0),
            p(3.0, 3.0),
            p(3.0, 1.0),
        ];
        let tris = triangulate(&pts, &[0..4, 4..8]).unwrap();
        let area: f64 = tris
            .iter()
            .map(|t| 0.5 * (pts[t[1]] - pts[t[0]]).perp(&(pts[t[2]] - pts[t[0]])))
            .sum();
        assert!((area - 12.0).abs() < 1e-12);
        assert!(tris.len() == 8, "{} triangles", tris.len());
        // Crossing loops are refused.
        let bow = vec![p(0.0, 0.0), p(1.0, 1.0), p(1.0, 0.0), p(0.0, 1.0)];
        let outline = 0..4;
        assert!(triangulate(&bow, &[outline]).is_none());
    }
}
