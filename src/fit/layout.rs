//! Plate layout: several parts on as few plates as possible, clearance kept.
//!
//! Each part is laid in the pose chosen by [`super::fit_part`] (its orientation for
//! printing: [`super::orient`]; [`layout_fitted`] takes poses chosen beforehand), turned about
//! the vertical so its footprint is narrowest across the bed (the narrowest width of a
//! convex polygon is found with one of its edges along the bed's x axis, so only edge
//! directions are tried), and placed by a bottom-left heuristic: for every candidate x
//! (against the left margin, beside or aligned with a placed part) the part slides down
//! to the lowest free y, trying it as is and turned by 180 degrees (tapered blades nest
//! head to tail). The lowest, then leftmost, spot over all open plates wins (first plate
//! first); a part that finds no spot opens a new plate.
//!
//! Footprints are convex polygons enclosing the hull of the placed vertices (the
//! intersection of the half-planes bounding it in 64 directions, at most about
//! `R (1 / cos(pi / 64) - 1)` = 0.12 % of R larger than the hull), so clearance kept
//! between footprints is kept between the parts. Parts only touch the plate at z >= 0,
//! so footprints that keep apart keep the solids apart.
//! Round beds: the same search with every footprint vertex also kept inside the usable
//! circle (for a fixed x, that is an interval of y, found exactly), with more candidate
//! x positions across the bed. A part that finds no spot even on an empty plate (it fits
//! only as [`super::fit_part`] placed it, e.g. diagonally or tilted) gets a plate of its
//! own in that placement.

use super::hull;
use super::search::{fit_part, Fit, FitOptions, Placement};
use super::{FitError, Printer, Volume};
use crate::mesh::Part;
use nalgebra::{Matrix3, Point2, Rotation3, Vector2, Vector3};

/// Options of the layout.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LayoutOptions {
    /// Options of the single-part search.
    pub fit: FitOptions,
    /// Try each part turned by 180 degrees as well (default true).
    pub flips: bool,
}

impl LayoutOptions {
    /// The defaults.
    pub const DEFAULT: LayoutOptions = LayoutOptions {
        fit: FitOptions::DEFAULT,
        flips: true,
    };
}

impl Default for LayoutOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// One part placed on a plate.
#[derive(Debug, Clone, PartialEq)]
pub struct Placed {
    /// Index of the part in the input.
    pub part: usize,
    /// Its name.
    pub name: String,
    /// Where it goes, in the printer frame.
    pub placement: Placement,
    /// Its footprint on the bed (convex, counter-clockwise), printer frame, mm.
    pub footprint: Vec<Point2<f64>>,
    /// Extents along x, y, z once placed, mm.
    pub size: [f64; 3],
}

/// One build plate.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Plate {
    /// The parts on it.
    pub parts: Vec<Placed>,
}

/// The answer of [`layout`].
#[derive(Debug, Clone, PartialEq)]
pub struct Layout {
    /// Plates in order.
    pub plates: Vec<Plate>,
    /// Parts that fit no plate even alone, with their single-part answer.
    pub unplaced: Vec<(usize, Fit)>,
    /// Single-part answers for every input part, in input order.
    pub fits: Vec<Fit>,
}

impl Layout {
    /// The placed meshes of one plate, ready to write as one multi-part file.
    pub fn plate_parts(&self, plate: usize, parts: &[Part]) -> Vec<Part> {
        self.plates
            .get(plate)
            .map(|p| {
                p.parts
                    .iter()
                    .filter_map(|pl| {
                        parts.get(pl.part).map(|src| Part {
                            name: pl.name.clone(),
                            mesh: pl.placement.place(&src.mesh),
                        })
                    })
                    .collect()
            })
            .unwrap_or_default()
    }
}

/// Distance between two convex polygons (0 when they overlap), mm.
pub fn polygon_distance(p: &[Point2<f64>], q: &[Point2<f64>]) -> f64 {
    if overlap(p, q) {
        return 0.0;
    }
    let mut d = f64::MAX;
    for (a, b) in [(p, q), (q, p)] {
        for &v in a {
            for i in 0..b.len() {
                d = d.min(point_segment(v, b[i], b[(i + 1) % b.len()]));
            }
        }
    }
    d
}

fn point_segment(p: Point2<f64>, a: Point2<f64>, b: Point2<f64>) -> f64 {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let l2 = dx * dx + dy * dy;
    let t = if l2 > 0.0 {
        (((p.x - a.x) * dx + (p.y - a.y) * dy) / l2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    ((p.x - a.x - t * dx).powi(2) + (p.y - a.y - t * dy).powi(2)).sqrt()
}

/// Separating-axis test for convex polygons (touching counts as overlap).
fn overlap(p: &[Point2<f64>], q: &[Point2<f64>]) -> bool {
    for poly in [p, q] {
        let n = poly.len();
        if n < 2 {
            continue;
        }
        for i in 0..n {
            let (a, b) = (poly[i], poly[(i + 1) % n]);
            let axis = Vector2::new(a.y - b.y, b.x - a.x);
            let proj = |s: &[Point2<f64>]| {
                s.iter().fold((f64::MAX, f64::MIN), |(lo, hi), v| {
                    let d = v.x * axis.x + v.y * axis.y;
                    (lo.min(d), hi.max(d))
                })
            };
            let (p0, p1) = proj(p);
            let (q0, q1) = proj(q);
            if p1 < q0 || q1 < p0 {
                return false;
            }
        }
    }
    true
}

/// A convex polygon enclosing `hull` bounded by its support lines in `k` directions.
fn circumscribed(hull: &[Point2<f64>], k: usize) -> Vec<Point2<f64>> {
    if hull.len() < 3 {
        return hull.to_vec();
    }
    let h: Vec<(f64, f64, f64)> = (0..k)
        .map(|i| {
            let t = std::f64::consts::TAU * i as f64 / k as f64;
            let (c, s) = (t.cos(), t.sin());
            let sup = hull
                .iter()
                .map(|p| p.x * c + p.y * s)
                .fold(f64::MIN, f64::max);
            (c, s, sup)
        })
        .collect();
    let mut out: Vec<Point2<f64>> = (0..k)
        .map(|i| {
            let (a, b) = (h[i], h[(i + 1) % k]);
            let det = a.0 * b.1 - a.1 * b.0;
            Point2::new((a.2 * b.1 - a.1 * b.2) / det, (a.0 * b.2 - a.2 * b.0) / det)
        })
        .collect();
    out = hull::convex_hull(&out);
    out
}

fn bbox(p: &[Point2<f64>]) -> [f64; 4] {
    p.iter()
        .fold([f64::MAX, f64::MAX, f64::MIN, f64::MIN], |b, v| {
            [b[0].min(v.x), b[1].min(v.y), b[2].max(v.x), b[3].max(v.y)]
        })
}

fn shifted(p: &[Point2<f64>], dx: f64, dy: f64) -> Vec<Point2<f64>> {
    p.iter().map(|v| Point2::new(v.x + dx, v.y + dy)).collect()
}

/// A part ready to pack: rotation and footprint with its box corner at the origin.
struct Shape {
    rotation: Matrix3<f64>,
    /// Footprint moved so its box starts at (0, 0), with the offset applied.
    poly: Vec<Point2<f64>>,
    offset: Vector2<f64>,
    z0: f64,
    size: [f64; 3],
}

/// The bits of a footprint and its pose: equal keys place alike.
fn footprint_key(s: &Shape) -> Vec<u64> {
    s.poly
        .iter()
        .flat_map(|p| [p.x.to_bits(), p.y.to_bits()])
        .chain(s.rotation.iter().map(|v| v.to_bits()))
        .collect()
}

fn shape(part: &Part, rotation: Matrix3<f64>) -> Shape {
    let pts: Vec<Vector3<f64>> = part
        .mesh
        .vertices
        .iter()
        .filter(|v| v.coords.iter().all(|c| c.is_finite()))
        .map(|v| rotation * v.coords)
        .collect();
    let p2: Vec<Point2<f64>> = pts.iter().map(|p| Point2::new(p.x, p.y)).collect();
    let (z0, z1) = pts
        .iter()
        .fold((f64::MAX, f64::MIN), |(a, b), p| (a.min(p.z), b.max(p.z)));
    let poly = circumscribed(&hull::convex_hull(&p2), 64);
    Shape::new(rotation, poly, z0, z1 - z0)
}

impl Shape {
    fn new(rotation: Matrix3<f64>, poly: Vec<Point2<f64>>, z0: f64, height: f64) -> Shape {
        let b = bbox(&poly);
        Shape {
            rotation,
            poly: shifted(&poly, -b[0], -b[1]),
            offset: Vector2::new(b[0], b[1]),
            z0,
            size: [b[2] - b[0], b[3] - b[1], height],
        }
    }

    /// The same part turned by `t` about the vertical: the footprint of the turned part
    /// is the turned footprint, so the polygon turns and nothing is re-projected.
    fn turned(&self, t: f64) -> Shape {
        let (c, s) = (t.cos(), t.sin());
        let poly: Vec<Point2<f64>> = self
            .poly
            .iter()
            .map(|p| {
                let (x, y) = (p.x + self.offset.x, p.y + self.offset.y);
                Point2::new(c * x - s * y, s * x + c * y)
            })
            .collect();
        let rot = Rotation3::from_axis_angle(&Vector3::z_axis(), t).into_inner() * self.rotation;
        Shape::new(rot, poly, self.z0, self.size[2])
    }
}

/// The lowest y in `[y0, y1]` at which `poly` (box at the origin) shifted to x is at least
/// `c` from every obstacle, if any.
fn lowest_y(
    poly: &[Point2<f64>],
    x: f64,
    y0: f64,
    y1: f64,
    obstacles: &[Vec<Point2<f64>>],
    c: f64,
) -> Option<f64> {
    if y1 < y0 {
        return None;
    }
    let pb = bbox(poly);
    let mut blocked: Vec<(f64, f64)> = Vec::new();
    for q in obstacles {
        let qb = bbox(q);
        if x + pb[2] + c <= qb[0] || qb[2] + c <= x + pb[0] {
            continue;
        }
        let lo = qb[1] - pb[3] - c;
        let hi = qb[3] - pb[1] + c;
        let d = |y: f64| polygon_distance(&shifted(poly, x, y), q);
        // d is convex in y (distance between convex sets under translation): find its
        // minimum by golden-section search, then both crossings of c by bisection.
        let (mut a, mut b) = (lo, hi);
        for _ in 0..60 {
            let m1 = a + 0.382 * (b - a);
            let m2 = a + 0.618 * (b - a);
            if d(m1) <= d(m2) {
                b = m2;
            } else {
                a = m1;
            }
        }
        let ym = 0.5 * (a + b);
        if d(ym) >= c {
            continue;
        }
        let cross = |mut inside: f64, mut outside: f64| {
            for _ in 0..50 {
                let m = 0.5 * (inside + outside);
                if d(m) < c {
                    inside = m;
                } else {
                    outside = m;
                }
            }
            outside
        };
        blocked.push((cross(ym, lo), cross(ym, hi)));
    }
    blocked.sort_by(|p, q| p.0.total_cmp(&q.0));
    let mut y = y0;
    for (lo, hi) in blocked {
        if lo >= y {
            // [y, lo] is free: the part stays at y.
            break;
        }
        if hi > y {
            y = hi;
        }
    }
    // Re-check against every obstacle (the blocked sets may chain).
    let placed = shifted(poly, x, y);
    let ok = obstacles
        .iter()
        .all(|q| polygon_distance(&placed, q) >= c - 1e-9);
    (y <= y1 && ok).then_some(y)
}

/// Bottom `y` range in which `poly` (box at the origin) shifted to `x` stays inside the
/// circle of radius `r` about the origin, if any.
fn in_circle(poly: &[Point2<f64>], x: f64, r: f64) -> Option<(f64, f64)> {
    let (mut lo, mut hi) = (f64::MIN, f64::MAX);
    for v in poly {
        let u = v.x + x;
        if u.abs() > r {
            return None;
        }
        let h = (r * r - u * u).sqrt();
        lo = lo.max(-h - v.y);
        hi = hi.min(h - v.y);
    }
    (lo <= hi).then_some((lo, hi))
}

/// The lowest, then leftmost, free spot `(y, x, variant)` for a part among `obstacles`.
fn spot(
    variants: &[Shape],
    obstacles: &[Vec<Point2<f64>>],
    bed: &Bed,
) -> Option<(f64, f64, usize)> {
    let (rect, c, circle) = (bed.rect, bed.clearance, bed.circle);
    let mut best: Option<(f64, f64, usize)> = None;
    for (vi, v) in variants.iter().enumerate() {
        let mut xs = vec![rect[0]];
        for q in obstacles {
            let qb = bbox(q);
            xs.push(qb[2] + c);
            xs.push(qb[0]);
        }
        if circle.is_some() {
            // Round bed: also across the bed, the centred spot included.
            let span = rect[2] - rect[0] - v.size[0];
            xs.extend((0..=16).map(|k| rect[0] + span * k as f64 / 16.0));
        }
        for x in xs {
            if x < rect[0] - 1e-9 || x + v.size[0] > rect[2] + 1e-9 {
                continue;
            }
            let (mut y0, mut y1) = (rect[1], rect[3] - v.size[1]);
            if let Some(r) = circle {
                let Some((lo, hi)) = in_circle(&v.poly, x, r) else {
                    continue;
                };
                y0 = y0.max(lo);
                y1 = y1.min(hi);
            }
            if let Some(y) = lowest_y(&v.poly, x, y0, y1, obstacles, c) {
                let better = match best {
                    None => true,
                    Some((by, bx, _)) => y < by - 1e-9 || (y < by + 1e-9 && x < bx),
                };
                if better {
                    best = Some((y, x, vi));
                }
            }
        }
    }
    best
}

/// Lays parts out on as few plates as the heuristic finds (see the module docs), each in
/// the pose [`fit_part`] chooses with `opts.fit` (copies of one mesh share one search).
pub fn layout(parts: &[Part], printer: &Printer, opts: &LayoutOptions) -> Result<Layout, FitError> {
    let mut fits: Vec<Fit> = Vec::with_capacity(parts.len());
    for (i, part) in parts.iter().enumerate() {
        // Copies of one mesh (the blades of a rotor) share one search.
        let same = (0..i).find(|&j| parts[j].mesh == part.mesh);
        fits.push(match same {
            Some(j) => fits[j].clone(),
            None => fit_part(&part.name, &part.mesh, printer, &opts.fit)?,
        });
    }
    layout_fitted(parts, fits, printer, opts)
}

/// Lays parts out in poses already chosen: `fits[i]` is the answer of [`fit_part`] for
/// `parts[i]` (each part may have had its own options, e.g. a blade's axes and a
/// requested pose class, and the hub none). Parts without an entry are fitted with
/// `opts.fit`. Each part keeps its pose and only turns about the vertical.
pub fn layout_fitted(
    parts: &[Part],
    mut fits: Vec<Fit>,
    printer: &Printer,
    opts: &LayoutOptions,
) -> Result<Layout, FitError> {
    fits.truncate(parts.len());
    for part in &parts[fits.len()..] {
        fits.push(fit_part(&part.name, &part.mesh, printer, &opts.fit)?);
    }
    let bed = Bed::of(printer);
    let mut unplaced = Vec::new();
    let mut shapes: Vec<(usize, Shape, f64)> = Vec::new();
    let mut alone: Vec<Placed> = Vec::new();
    for (i, part) in parts.iter().enumerate() {
        let f = &fits[i];
        if !f.fits {
            unplaced.push((i, f.clone()));
            continue;
        }
        match narrowest(part, f.placement.rotation, bed.rect) {
            Some(s) => {
                let area = hull::area(&s.poly).abs();
                shapes.push((i, s, area));
            }
            None => alone.push(as_fitted(i, part, f)),
        }
    }
    // Largest footprint first (input order among equals).
    shapes.sort_by(|p, q| q.2.total_cmp(&p.2).then(p.0.cmp(&q.0)));
    let mut plates = pack(shapes, parts, &fits, &bed, opts.flips, &mut alone);
    for p in alone {
        plates.push(Plate { parts: vec![p] });
    }
    for p in &mut plates {
        p.parts.sort_by_key(|x| x.part);
    }
    Ok(Layout {
        plates,
        unplaced,
        fits,
    })
}

/// The usable bed: the rectangle parts are placed in (for a round bed, the square
/// around the usable circle, whose radius `circle` is), and the clearance between parts.
struct Bed {
    rect: [f64; 4],
    circle: Option<f64>,
    clearance: f64,
}

impl Bed {
    fn of(printer: &Printer) -> Bed {
        let (a, _, _) = printer.available();
        let m = printer.margin;
        let (rect, circle) = match printer.volume {
            Volume::Box { x, y, .. } => ([m, m, x - m, y - m], None),
            Volume::Round { .. } => {
                let r = 0.5 * a;
                ([-r, -r, r, r], Some(r))
            }
        };
        Bed {
            rect,
            circle,
            clearance: printer.clearance,
        }
    }
}

/// The part in `rotation`, turned about the vertical so its footprint is narrowest
/// across the bed (an edge of the footprint along x), if it then fits `rect`.
fn narrowest(part: &Part, rotation: Matrix3<f64>, rect: [f64; 4]) -> Option<Shape> {
    let (ra, rb) = (rect[2] - rect[0], rect[3] - rect[1]);
    let base = shape(part, rotation);
    let mut best: Option<Shape> = None;
    let n = base.poly.len();
    for k in 0..n.max(1) {
        let t = if n >= 2 {
            let (p, q) = (base.poly[k], base.poly[(k + 1) % n]);
            -(q.y - p.y).atan2(q.x - p.x)
        } else {
            0.0
        };
        let s = base.turned(t);
        if s.size[0] <= ra + 1e-9
            && s.size[1] <= rb + 1e-9
            && best.as_ref().is_none_or(|bs| s.size[1] < bs.size[1])
        {
            best = Some(s);
        }
    }
    best
}

/// Part `i` exactly as the single-part search placed it (it fits the volume only so):
/// for a plate of its own.
fn as_fitted(i: usize, part: &Part, f: &Fit) -> Placed {
    let pts: Vec<Point2<f64>> = part
        .mesh
        .vertices
        .iter()
        .map(|v| {
            let q = f.placement.apply(v);
            Point2::new(q.x, q.y)
        })
        .collect();
    Placed {
        part: i,
        name: part.name.clone(),
        placement: f.placement,
        footprint: hull::convex_hull(&pts),
        size: f.size,
    }
}

/// Places the shapes in order at the lowest, then leftmost, free spot of the first
/// plate that has one (as they are, or turned by 180 degrees with `flips`), opening a
/// new plate when none has; a shape that finds no spot even on an empty plate goes to
/// `alone` as fitted.
fn pack(
    shapes: Vec<(usize, Shape, f64)>,
    parts: &[Part],
    fits: &[Fit],
    bed: &Bed,
    flips: bool,
    alone: &mut Vec<Placed>,
) -> Vec<Plate> {
    let mut plates: Vec<(Plate, Vec<Vec<Point2<f64>>>)> = Vec::new();
    // Footprints that found no spot on a plate: obstacles only grow, so the same
    // footprint (a copy of the same part in the same pose) would fail there again. With
    // it, copies cost one search on the plate being filled rather than one on every
    // plate before it, and the layout grows about linearly with the copies.
    let mut failed: Vec<std::collections::HashSet<Vec<u64>>> = Vec::new();
    for (i, s, _) in shapes {
        let key = footprint_key(&s);
        let mut variants = vec![s];
        if flips {
            let flipped = variants[0].turned(std::f64::consts::PI);
            variants.push(flipped);
        }
        let mut found = None;
        for (pi, (_, obstacles)) in plates.iter().enumerate() {
            if failed[pi].contains(&key) {
                continue;
            }
            if let Some(b) = spot(&variants, obstacles, bed) {
                found = Some((pi, b));
                break;
            }
            failed[pi].insert(key.clone());
        }
        if found.is_none() {
            if let Some(b) = spot(&variants, &[], bed) {
                plates.push((Plate::default(), Vec::new()));
                failed.push(std::collections::HashSet::new());
                found = Some((plates.len() - 1, b));
            }
        }
        let Some((pi, (y, x, vi))) = found else {
            alone.push(as_fitted(i, &parts[i], &fits[i]));
            continue;
        };
        let v = &variants[vi];
        let poly = shifted(&v.poly, x, y);
        let t = Vector3::new(x - v.offset.x, y - v.offset.y, -v.z0);
        let placed = Placed {
            part: i,
            name: parts[i].name.clone(),
            placement: Placement {
                rotation: v.rotation,
                translation: t,
            },
            footprint: poly.clone(),
            size: v.size,
        };
        plates[pi].0.parts.push(placed);
        plates[pi].1.push(poly);
    }
    plates.into_iter().map(|p| p.0).collect()
}
