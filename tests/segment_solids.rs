//! The segments of the barn-turbine demo as solids: each closed and consistently oriented
//! with the genus its holes give it (Euler's polyhedron formula, counted here); volumes
//! that add up to the whole blade with the holes' cylinders and cones; a spar channel
//! that keeps its wall in every cut; pins on the same axes on both halves of a joint;
//! layouts that fit one way only and differ from joint to joint (checked by trying every
//! rigid alignment, not by the tool's own test).

#[macro_use]
mod support;

use nalgebra::{Point2, Vector2};
use spanwright::design::load;
use spanwright::fit::PrinterSpec;
use spanwright::mesh::TriMesh;
use spanwright::pipeline::{run, Options, Outcome};
use spanwright::props::Slice;
use std::collections::HashMap;
use std::path::Path;
use std::sync::OnceLock;

/// The demo on its own printer, and on a 180 mm cube (more segments, a joint the
/// channel does not reach).
fn cases() -> &'static [Outcome] {
    static OUT: OnceLock<Vec<Outcome>> = OnceLock::new();
    OUT.get_or_init(|| {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/barn-turbine.toml");
        let design = load(&path).expect("demo design");
        let small = PrinterSpec {
            volume: Some([180.0, 180.0, 180.0]),
            ..Default::default()
        }
        .resolve("test")
        .unwrap();
        [None, Some(small)]
            .into_iter()
            .map(|printer| {
                run(
                    &design,
                    &Options {
                        blade_only: true,
                        printer,
                        ..Options::default()
                    },
                )
                .expect("the demo builds")
            })
            .collect()
    })
}

fn segments(o: &Outcome) -> Vec<&TriMesh> {
    o.segment_parts()
        .iter()
        .map(|p| p.bodies[0].mesh())
        .collect()
}

/// Every edge used exactly once in each direction (closed, consistently oriented); the
/// Euler characteristic V - E + F.
fn euler(m: &TriMesh) -> i64 {
    let mut edges: HashMap<(u32, u32), u32> = HashMap::new();
    for t in &m.triangles {
        for k in 0..3 {
            *edges.entry((t[k], t[(k + 1) % 3])).or_default() += 1;
        }
    }
    for (&(a, b), &n) in &edges {
        assert_eq!(n, 1, "edge ({a}, {b}) used {n} times one way");
        assert_eq!(edges.get(&(b, a)), Some(&1), "edge ({a}, {b}) has no twin");
    }
    let mut used = vec![false; m.vertices.len()];
    for t in &m.triangles {
        for &v in t {
            used[v as usize] = true;
        }
    }
    let v = used.iter().filter(|&&u| u).count() as i64;
    v - (edges.len() / 2) as i64 + m.triangles.len() as i64
}

#[test]
fn segments_are_closed_oriented_with_their_genus() {
    for o in cases() {
        segments_are_closed_oriented_with_their_genus_of(o);
    }
}

fn segments_are_closed_oriented_with_their_genus_of(o: &Outcome) {
    let plan = o.segments.as_ref().expect("the demo is split");
    let segs = segments(o);
    assert!(segs.len() >= 2, "the demo needs splitting on its printer");
    assert_eq!(segs.len(), plan.count);
    let c = plan.channel.as_ref().expect("the demo has a spar channel");
    for (k, m) in segs.iter().enumerate() {
        let (from, to) = (
            if k == 0 {
                c.start - 1.0
            } else {
                plan.joints[k - 1].radius
            },
            plan.joints.get(k).map_or(f64::INFINITY, |j| j.radius),
        );
        // A channel entering the segment's lower face and leaving by its upper one is a
        // through hole: genus 1 (Euler's formula V - E + F = 2 - 2g for a closed
        // orientable surface).
        let through = c.start <= from + 1.0 && c.end > to;
        let g = i64::from(through);
        assert_eq!(euler(m), 2 - 2 * g, "segment {}", k + 1);
        assert!(m.signed_volume() > 0.0);
    }
}

#[test]
fn volumes_add_up_to_the_whole_blade() {
    for o in cases() {
        volumes_add_up_to_the_whole_blade_of(o);
    }
}

fn volumes_add_up_to_the_whole_blade_of(o: &Outcome) {
    // The segments plus what the holes remove make the blade: a cylinder pi r^2 L and a
    // cone pi r^2 h / 3 per hole (elementary geometry). Each mesh lies within the
    // tolerance of the same exact surface, and hole polygons within it of their circles,
    // so the sum may differ by at most tolerance x (all surface areas).
    let plan = o.segments.as_ref().unwrap();
    let tol = o.blade.tolerance;
    let blade = o.blade_part().mesh();
    let segs = segments(o);
    let mut removed = 0.0;
    let cone = |r: f64, h: f64| std::f64::consts::PI * r * r * h / 3.0;
    let cyl = |r: f64, l: f64| std::f64::consts::PI * r * r * l;
    if let Some(c) = &plan.channel {
        let r = c.hole_radius();
        removed += cyl(r, c.end - c.start) + cone(r, c.point_depth);
        if !c.opens_at_root {
            removed += cone(r, c.point_depth);
        }
    }
    for j in &plan.joints {
        let r = 0.5 * j.hole_diameter;
        removed += j.pins.len() as f64 * 2.0 * (cyl(r, j.depth) + cone(r, j.point_depth));
    }
    let sum: f64 = segs.iter().map(|m| m.signed_volume()).sum();
    let area: f64 = blade.area() + segs.iter().map(|m| m.area()).sum::<f64>();
    assert_near!(
        sum + removed,
        blade.signed_volume(),
        tol * area,
        "segments + holes vs the whole blade (elementary cylinder and cone volumes)"
    );
    assert!(removed > 1000.0, "the holes remove something: {removed}");
}

/// Loops of a cut that are holes (clockwise: the material is on their left, see
/// `Slice`), with their centroid.
fn holes(s: &Slice) -> Vec<(Point2<f64>, &Vec<Point2<f64>>)> {
    s.loops
        .iter()
        .filter(|l| signed_area(l) < 0.0)
        .map(|l| {
            let c = l.iter().fold(Vector2::zeros(), |a, p| a + p.coords) / l.len() as f64;
            (Point2::from(c), l)
        })
        .collect()
}

fn signed_area(l: &[Point2<f64>]) -> f64 {
    (0..l.len())
        .map(|i| {
            let (a, b) = (l[i], l[(i + 1) % l.len()]);
            a.x * b.y - b.x * a.y
        })
        .sum::<f64>()
        * 0.5
}

fn dist_to_loop(p: &Point2<f64>, l: &[Point2<f64>]) -> f64 {
    (0..l.len())
        .map(|i| {
            let (a, b) = (l[i], l[(i + 1) % l.len()]);
            let ab = b - a;
            let t = ((p - a).dot(&ab) / ab.norm_squared()).clamp(0.0, 1.0);
            (p - (a + ab * t)).norm()
        })
        .fold(f64::INFINITY, f64::min)
}

#[test]
fn channel_keeps_its_wall_in_every_cut() {
    for o in cases() {
        channel_keeps_its_wall_in_every_cut_of(o);
    }
}

fn channel_keeps_its_wall_in_every_cut_of(o: &Outcome) {
    // Wall: the smallest distance from the channel's hole to the outline in a plane cut
    // (the cut of each segment by z = const, through props::Slice). The design's
    // min-wall must hold along the whole reach (common practice: a printed wall of at
    // least the given thickness).
    let plan = o.segments.as_ref().unwrap();
    let c = plan.channel.as_ref().unwrap();
    let axis = Point2::new(c.axis[0], c.axis[1]);
    let segs = segments(o);
    let bounds: Vec<f64> = plan.joints.iter().map(|j| j.radius).collect();
    let mut cuts = 0;
    let mut z = c.start + 0.05;
    while z < c.end {
        let k = bounds.iter().filter(|&&b| b < z).count();
        if bounds.iter().any(|&b| (b - z).abs() < 1e-3) {
            z += 0.5;
            continue;
        }
        let s = Slice::cut(segs[k], z).unwrap();
        let outer: Vec<&Vec<Point2<f64>>> =
            s.loops.iter().filter(|l| signed_area(l) > 0.0).collect();
        assert_eq!(outer.len(), 1, "one outline at z = {z}");
        let hs = holes(&s);
        let (_, hole) = hs
            .iter()
            .min_by(|a, b| (a.0 - axis).norm().total_cmp(&(b.0 - axis).norm()))
            .expect("the channel's hole");
        let wall = hole
            .iter()
            .map(|p| dist_to_loop(p, outer[0]))
            .fold(f64::INFINITY, f64::min);
        assert!(
            wall >= c.min_wall,
            "wall {wall:.4} mm under {} mm at z = {z:.2}",
            c.min_wall
        );
        cuts += 1;
        z += 0.5;
    }
    assert!(cuts > 200, "{cuts} cuts");
    assert_near!(c.rod_length, c.end - c.start, 1e-9, "rod = straight part");
}

/// All rigid motions of the plane that carry two holes of `a` onto two of `b` of the
/// same diameters; true when one of them (other than the identity, when `a` is `b`)
/// carries every hole within `tol` of one of the same diameter.
fn aligns(a: &[(Point2<f64>, f64)], b: &[(Point2<f64>, f64)], tol: f64, same: bool) -> bool {
    if a.len() != b.len() {
        return false;
    }
    for i in 0..a.len() {
        for j in 0..a.len() {
            if i == j {
                continue;
            }
            for k in 0..b.len() {
                for l in 0..b.len() {
                    if k == l || a[i].1 != b[k].1 || a[j].1 != b[l].1 {
                        continue;
                    }
                    let (va, vb) = (a[j].0 - a[i].0, b[l].0 - b[k].0);
                    if (va.norm() - vb.norm()).abs() > 2.0 * tol {
                        continue;
                    }
                    let ang = vb.y.atan2(vb.x) - va.y.atan2(va.x);
                    let (s, c) = ang.sin_cos();
                    let map = |p: Point2<f64>| {
                        let d = p - a[i].0;
                        b[k].0 + Vector2::new(c * d.x - s * d.y, s * d.x + c * d.y)
                    };
                    let identity = same && i == k && j == l;
                    if !identity
                        && a.iter().all(|(p, d)| {
                            b.iter().any(|(q, e)| e == d && (map(*p) - q).norm() < tol)
                        })
                    {
                        return true;
                    }
                }
            }
        }
    }
    false
}

#[test]
fn joints_share_pin_axes_and_are_keyed() {
    for o in cases() {
        joints_share_pin_axes_and_are_keyed_of(o);
    }
}

fn joints_share_pin_axes_and_are_keyed_of(o: &Outcome) {
    let plan = o.segments.as_ref().unwrap();
    let c = plan.channel.as_ref();
    let segs = segments(o);
    let mut layouts = Vec::new();
    for (k, j) in plan.joints.iter().enumerate() {
        // Cut both halves halfway down their pin holes: the holes' centres must be the
        // same points, and the plan's pins.
        let below = Slice::cut(segs[k], j.radius - 0.5 * j.depth).unwrap();
        let above = Slice::cut(segs[k + 1], j.radius + 0.5 * j.depth).unwrap();
        let pin_holes = |s: &Slice| {
            let mut v: Vec<Point2<f64>> = holes(s)
                .into_iter()
                .filter(|(_, l)| {
                    // A pin hole's area: pi r^2 (elementary), within 5 %.
                    let want = std::f64::consts::PI * (0.5 * j.hole_diameter).powi(2);
                    (signed_area(l).abs() / want - 1.0).abs() < 0.05
                })
                .map(|(p, _)| p)
                .collect();
            v.sort_by(|a, b| a.x.total_cmp(&b.x));
            v
        };
        let (lo, hi) = (pin_holes(&below), pin_holes(&above));
        assert_eq!(lo.len(), j.pins.len(), "joint {}: holes below", j.index);
        assert_eq!(hi.len(), j.pins.len(), "joint {}: holes above", j.index);
        for ((a, b), p) in lo.iter().zip(&hi).zip(&j.pins) {
            // Both halves use the very same loop vertices: the axes agree to rounding.
            assert_near!((a - b).norm(), 0.0, 1e-9, "pin axes of both halves");
            assert_near!(
                (a - Point2::new(p[0], p[1])).norm(),
                0.0,
                1e-9,
                "the planned pin"
            );
        }
        let mut layout: Vec<(Point2<f64>, f64)> =
            lo.iter().map(|p| (*p, j.hole_diameter)).collect();
        if j.channel {
            let c = c.expect("a joint crossed by the channel");
            layout.push((Point2::new(c.axis[0], c.axis[1]), c.hole_diameter));
        }
        assert!(layout.len() >= 3, "three holes at least key a joint");
        // One way round: no rigid motion but the identity carries the layout onto
        // itself within half a pin hole's radius.
        let tol = 0.25 * j.hole_diameter;
        assert!(
            !aligns(&layout, &layout, tol, true),
            "joint {} fits two ways",
            j.index
        );
        layouts.push((layout, tol));
    }
    for a in 0..layouts.len() {
        for b in a + 1..layouts.len() {
            assert!(
                !aligns(&layouts[a].0, &layouts[b].0, layouts[a].1, false),
                "joints {} and {} share a layout",
                a + 1,
                b + 1
            );
        }
    }
}

#[test]
fn split_faces_are_planar_and_shared() {
    for o in cases() {
        split_faces_are_planar_and_shared_of(o);
    }
}

fn split_faces_are_planar_and_shared_of(o: &Outcome) {
    // The faces of both halves of a joint lie in the plane z = r exactly (the split
    // rows are put on it) and have the same outline.
    let plan = o.segments.as_ref().unwrap();
    let segs = segments(o);
    for (k, j) in plan.joints.iter().enumerate() {
        let top: Vec<_> = segs[k]
            .vertices
            .iter()
            .filter(|p| (p.z - j.radius).abs() < 1e-6)
            .collect();
        let bottom: Vec<_> = segs[k + 1]
            .vertices
            .iter()
            .filter(|p| (p.z - j.radius).abs() < 1e-6)
            .collect();
        assert!(top.len() > 100);
        assert_eq!(top.len(), bottom.len(), "joint {}", j.index);
        for p in top.iter().chain(&bottom) {
            assert_eq!(p.z, j.radius, "exactly on the plane");
        }
        assert!(segs[k].vertices.iter().all(|p| p.z <= j.radius));
        assert!(segs[k + 1].vertices.iter().all(|p| p.z >= j.radius));
    }
}
