//! Planar convex hulls, the smallest enclosing circle, and the support subset of a
//! point cloud in space.

use nalgebra::{Point2, Point3, Vector3};

fn cross(o: Point2<f64>, a: Point2<f64>, b: Point2<f64>) -> f64 {
    (a.x - o.x) * (b.y - o.y) - (a.y - o.y) * (b.x - o.x)
}

/// Convex hull of planar points by Andrew's monotone chain (A. M. Andrew, "Another
/// efficient algorithm for convex hulls in two dimensions", Information Processing
/// Letters 9, 1979). Counter-clockwise, without repeated or collinear points; one or two
/// points when the input is degenerate, none when it is empty. Non-finite points are
/// skipped.
pub fn convex_hull(points: &[Point2<f64>]) -> Vec<Point2<f64>> {
    let mut pts: Vec<Point2<f64>> = points
        .iter()
        .copied()
        .filter(|p| p.x.is_finite() && p.y.is_finite())
        .collect();
    pts.sort_by(|a, b| a.x.total_cmp(&b.x).then(a.y.total_cmp(&b.y)));
    pts.dedup();
    if pts.len() < 3 {
        return pts;
    }
    let mut hull: Vec<Point2<f64>> = Vec::with_capacity(2 * pts.len());
    for pass in 0..2 {
        let start = hull.len();
        let iter: Box<dyn Iterator<Item = &Point2<f64>>> = if pass == 0 {
            Box::new(pts.iter())
        } else {
            Box::new(pts.iter().rev())
        };
        for &p in iter {
            while hull.len() >= start + 2
                && cross(hull[hull.len() - 2], hull[hull.len() - 1], p) <= 0.0
            {
                hull.pop();
            }
            hull.push(p);
        }
        hull.pop();
    }
    if hull.len() < 3 {
        // All points collinear: keep the two ends.
        return vec![pts[0], pts[pts.len() - 1]];
    }
    hull
}

/// Area of a simple polygon by the shoelace formula, positive counter-clockwise, mm^2.
pub fn area(poly: &[Point2<f64>]) -> f64 {
    let n = poly.len();
    (0..n)
        .map(|i| {
            let (a, b) = (poly[i], poly[(i + 1) % n]);
            a.x * b.y - a.y * b.x
        })
        .sum::<f64>()
        * 0.5
}

/// Smallest circle enclosing the points: `(centre, radius)`, by Welzl's move-to-front
/// algorithm (E. Welzl, "Smallest enclosing disks (balls and ellipsoids)", LNCS 555,
/// 1991), on a fixed pseudo-random order so results are reproducible.
pub fn enclosing_circle(points: &[Point2<f64>]) -> (Point2<f64>, f64) {
    if points.is_empty() {
        return (Point2::origin(), 0.0);
    }
    let mut pts = points.to_vec();
    // Deterministic shuffle (linear congruential generator) for expected linear time.
    let mut state: u64 = 0x9E37_79B9_7F4A_7C15;
    for i in (1..pts.len()).rev() {
        state = state
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        let j = (state >> 33) as usize % (i + 1);
        pts.swap(i, j);
    }
    let eps = 1e-12;
    let inside = |c: (Point2<f64>, f64), p: Point2<f64>| {
        ((p.x - c.0.x).powi(2) + (p.y - c.0.y).powi(2)).sqrt() <= c.1 * (1.0 + eps) + eps
    };
    let mut c = (pts[0], 0.0);
    for i in 1..pts.len() {
        if inside(c, pts[i]) {
            continue;
        }
        c = (pts[i], 0.0);
        for j in 0..i {
            if inside(c, pts[j]) {
                continue;
            }
            c = circle2(pts[i], pts[j]);
            for k in 0..j {
                if !inside(c, pts[k]) {
                    c = circle3(pts[i], pts[j], pts[k]);
                }
            }
        }
    }
    c
}

fn circle2(a: Point2<f64>, b: Point2<f64>) -> (Point2<f64>, f64) {
    let c = Point2::new(0.5 * (a.x + b.x), 0.5 * (a.y + b.y));
    (c, 0.5 * ((a.x - b.x).powi(2) + (a.y - b.y).powi(2)).sqrt())
}

fn circle3(a: Point2<f64>, b: Point2<f64>, c: Point2<f64>) -> (Point2<f64>, f64) {
    let (bx, by) = (b.x - a.x, b.y - a.y);
    let (cx, cy) = (c.x - a.x, c.y - a.y);
    let d = 2.0 * (bx * cy - by * cx);
    if d.abs() < 1e-300 {
        // Collinear: the circle on the farthest pair.
        let cands = [circle2(a, b), circle2(a, c), circle2(b, c)];
        return cands
            .into_iter()
            .max_by(|p, q| p.1.total_cmp(&q.1))
            .unwrap_or(circle2(a, b));
    }
    let b2 = bx * bx + by * by;
    let c2 = cx * cx + cy * cy;
    let ux = (cy * b2 - by * c2) / d;
    let uy = (bx * c2 - cx * b2) / d;
    (Point2::new(a.x + ux, a.y + uy), (ux * ux + uy * uy).sqrt())
}

/// Unit directions spread evenly over the sphere (Fibonacci lattice).
pub fn sphere_directions(count: usize) -> Vec<Vector3<f64>> {
    let n = count.max(1) as f64;
    let golden = std::f64::consts::PI * (3.0 - 5f64.sqrt());
    (0..count.max(1))
        .map(|i| {
            let z = 1.0 - 2.0 * (i as f64 + 0.5) / n;
            let r = (1.0 - z * z).max(0.0).sqrt();
            let phi = golden * i as f64;
            Vector3::new(r * phi.cos(), r * phi.sin(), z)
        })
        .collect()
}

/// Indices of the vertices that are extreme along any of `count` directions spread over
/// the sphere, plus the extremes along the coordinate axes: a subset of the convex hull's
/// vertices. Every extent computed on the subset is at most the true one, so a search
/// that finds no fit on the subset proves there is none; fits found on it are checked
/// again on every vertex (see [`super::search`]).
pub fn support_subset(vertices: &[Point3<f64>], count: usize) -> Vec<usize> {
    let mut dirs = sphere_directions(count);
    for k in 0..3 {
        let mut e = Vector3::zeros();
        e[k] = 1.0;
        dirs.push(e);
        dirs.push(-e);
    }
    // Directions as separate coordinate arrays; one pass over the vertices with the
    // directions in the inner loop (vectorises well).
    let dx: Vec<f64> = dirs.iter().map(|d| d.x).collect();
    let dy: Vec<f64> = dirs.iter().map(|d| d.y).collect();
    let dz: Vec<f64> = dirs.iter().map(|d| d.z).collect();
    // The first vertex of `chunk` (from index `offset`) reaching the largest value along
    // each direction.
    let extremes = |offset: usize, chunk: &[Point3<f64>]| {
        let mut best = vec![f64::NEG_INFINITY; dirs.len()];
        let mut arg = vec![usize::MAX; dirs.len()];
        for (i, v) in chunk.iter().enumerate() {
            if !v.coords.iter().all(|c| c.is_finite()) {
                continue;
            }
            let (x, y, z) = (v.x, v.y, v.z);
            for k in 0..dx.len() {
                let d = x * dx[k] + y * dy[k] + z * dz[k];
                if d > best[k] {
                    best[k] = d;
                    arg[k] = offset + i;
                }
            }
        }
        (best, arg)
    };
    // Large meshes in chunks side by side, merged in order keeping the earlier vertex on
    // a tie: the same vertices as one pass.
    const CHUNK: usize = 16_384;
    let (_, arg) = if vertices.len() <= 2 * CHUNK {
        extremes(0, vertices)
    } else {
        use rayon::prelude::*;
        let parts: Vec<(Vec<f64>, Vec<usize>)> = vertices
            .par_chunks(CHUNK)
            .enumerate()
            .map(|(c, chunk)| extremes(c * CHUNK, chunk))
            .collect();
        parts
            .into_iter()
            .reduce(|(mut best, mut arg), (b, a)| {
                for k in 0..best.len() {
                    if b[k] > best[k] {
                        best[k] = b[k];
                        arg[k] = a[k];
                    }
                }
                (best, arg)
            })
            .unwrap_or_default()
    };
    let mut keep: Vec<usize> = arg.into_iter().filter(|&i| i != usize::MAX).collect();
    keep.sort_unstable();
    keep.dedup();
    keep
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pts(xy: &[[f64; 2]]) -> Vec<Point2<f64>> {
        xy.iter().map(|&[x, y]| Point2::new(x, y)).collect()
    }

    #[test]
    fn hull_of_square_with_inner_and_edge_points() {
        // Elementary geometry: the hull of a square's corners plus inner and edge points
        // is the square, area 4.
        let pts = pts(&[
            [0.0, 0.0],
            [2.0, 0.0],
            [2.0, 2.0],
            [0.0, 2.0],
            [1.0, 1.0],
            [1.0, 0.0],
            [0.5, 1.5],
        ]);
        let h = convex_hull(&pts);
        assert_eq!(h.len(), 4);
        assert!((area(&h) - 4.0).abs() < 1e-12);
    }

    #[test]
    fn circle_of_triangle_and_square() {
        // Elementary geometry: the smallest circle of a right triangle has the hypotenuse
        // as diameter; of a unit square, half its diagonal as radius.
        let (c, r) = enclosing_circle(&pts(&[[0.0, 0.0], [4.0, 0.0], [0.0, 3.0], [1.0, 1.0]]));
        assert!((r - 2.5).abs() < 1e-12 && (c.x - 2.0).abs() < 1e-12 && (c.y - 1.5).abs() < 1e-12);
        let (_, r) = enclosing_circle(&pts(&[[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]]));
        assert!((r - 0.5 * 2f64.sqrt()).abs() < 1e-12);
        // Acute triangle: the circumcircle, R = a / (2 sin A); equilateral side 1: 1/sqrt 3.
        let (_, r) = enclosing_circle(&pts(&[[0.0, 0.0], [1.0, 0.0], [0.5, 0.75f64.sqrt()]]));
        assert!((r - 1.0 / 3f64.sqrt()).abs() < 1e-12);
    }
}
