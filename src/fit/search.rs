//! Single-part fit: the orientation search and the exact check of the placement found.
//!
//! # Method
//! An orientation is a "down" direction (the part's direction that faces the bed) and a
//! yaw about the vertical. For a fixed down direction the height is exact and the best
//! yaw is found exactly: by rotating calipers on the footprint's convex hull for a box
//! volume ([`super::yaw`]), by the smallest enclosing circle for a round bed (yaw does
//! not matter there). Down directions are searched by best-first branch and bound over
//! the sphere, cut into cells by a cube map (gnomonic squares on the faces x, y, z; a
//! direction and its opposite give the same extents, so three faces cover every case).
//!
//! The objective is the largest ratio of the part's extent to the space available on
//! the three printer axes (at most 1 means it fits). Turning a part by an angle `a`
//! moves every vertex by at most `a R` (R: the largest distance from the part's centre),
//! so every extent changes by at most `L a` with `L = 2R`. A cell whose centre has ratio
//! `r` and whose corners lie within angle `a` of the centre contains no orientation
//! better than `r - L a / s` (s: the smallest available length): such a cell is dropped
//! when that bound cannot beat the best found. Cells are split until their radius is
//! below the angular resolution `eps`.
//!
//! # Resolution guarantee
//! With resolution `eps` (radians) and `L = 2R`: **if some orientation fits with at least
//! `L eps` to spare on every axis, a fit is found.** When the search reports no fit, no
//! orientation has a ratio below the reported best minus `L eps / s`. The guarantee is
//! stated in the report in millimetres ([`Fit::guarantee`]).
//!
//! Besides the cells, the part's own axes and the normals of its large flat faces on
//! the hull are tried as down directions, so parts that fit only just, face down, are
//! found whatever the resolution.
//!
//! # Preference
//! Once a fit exists, the pose printed is chosen among fitting down directions by the
//! print score of [`super::orient`]: overhang needing support, contact with the bed, the
//! layers against the main stress (blades) and height; the best few poses are offered in
//! [`Fit::orientation`] with their figures and the reasons for the choice, and a pose
//! class can be asked for ([`PrintOptions::pose`]). Each direction's yaw maximises the
//! room to spare (smallest largest extent-to-space ratio); the part is centred on the
//! bed. Ties are broken by a fixed rule, never by hash or memory order.
//!
//! # Exactness
//! The search runs on a subset of the convex hull's vertices (extremes along many
//! directions, [`super::hull::support_subset`]): extents on a subset are never larger than
//! the true ones, so "no fit" on the subset proves "no fit". Every fit reported is then
//! checked on **every vertex** of the mesh in the reported orientation; vertices that
//! break it join the subset and the search goes on. The numbers reported (size, gaps,
//! overshoot, scale) are measured on every vertex.

use super::hull;
use super::orient::{
    rank_key, reasons, span_to_layers_deg, Choice, Orientation, Pose, PrintOptions, Scored, Scorer,
};
use super::pose::PoseClass;
use super::yaw::best_yaw;
use super::{FitError, Printer, Volume};
use crate::mesh::TriMesh;
use nalgebra::{Matrix3, Matrix4, Point2, Point3, Rotation3, Vector3};
use rayon::prelude::*;
use std::cmp::Ordering;
use std::collections::{BTreeMap, BinaryHeap};

/// Options of the orientation search.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitOptions {
    /// Angular resolution of the search over down directions, degrees (default 0.5).
    pub resolution_deg: f64,
    /// Directions used to pick the hull vertices searched on (default 1000).
    pub support_directions: usize,
    /// Slack allowed when comparing an extent with the space available, mm (default 1e-6,
    /// for rounding only).
    pub tolerance: f64,
    /// Most down directions evaluated before the search gives up its guarantee (default
    /// 200 000).
    pub max_evaluations: usize,
    /// What the pose is chosen by besides fitting (default [`PrintOptions::DEFAULT`]).
    pub print: PrintOptions,
}

impl FitOptions {
    /// The defaults.
    pub const DEFAULT: FitOptions = FitOptions {
        resolution_deg: 0.5,
        support_directions: 1000,
        tolerance: 1e-6,
        max_evaluations: 200_000,
        print: PrintOptions::DEFAULT,
    };
}

impl Default for FitOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// A rigid placement from the part's frame to the printer's frame: `p' = R p + t`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Placement {
    /// Rotation matrix (rows: the printer's x, y, z axes in part coordinates).
    pub rotation: Matrix3<f64>,
    /// Translation, mm.
    pub translation: Vector3<f64>,
}

impl Placement {
    /// The 4x4 homogeneous matrix.
    pub fn matrix(&self) -> Matrix4<f64> {
        let mut m = Matrix4::identity();
        m.fixed_view_mut::<3, 3>(0, 0).copy_from(&self.rotation);
        m.fixed_view_mut::<3, 1>(0, 3).copy_from(&self.translation);
        m
    }

    /// Places one point.
    pub fn apply(&self, p: &Point3<f64>) -> Point3<f64> {
        Point3::from(self.rotation * p.coords + self.translation)
    }

    /// A placed copy of a mesh.
    pub fn place(&self, mesh: &TriMesh) -> TriMesh {
        mesh.transformed(&self.matrix())
    }

    /// Rotation angles in degrees `[about x, about y, about z]`, applied in that order
    /// about the fixed printer axes: `R = Rz * Ry * Rx`.
    pub fn angles_deg(&self) -> [f64; 3] {
        let (rx, ry, rz) = Rotation3::from_matrix_unchecked(self.rotation).euler_angles();
        [rx.to_degrees(), ry.to_degrees(), rz.to_degrees()]
    }
}

/// The answer for one part.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    /// True when the part fits inside the volume, margin kept, in [`Fit::placement`].
    pub fits: bool,
    /// The placement found: the preferred fitting one, or the one closest to fitting.
    pub placement: Placement,
    /// Extents along the printer's x, y, z in that placement, mm.
    pub size: [f64; 3],
    /// Distance from the part to the walls, mm: x and y the smaller of the two sides (for
    /// a round bed both are the radial gap), z the gap below the top. Fits when each is at
    /// least the margin.
    pub wall_gap: [f64; 3],
    /// Largest amount by which an extent exceeds the space available, mm (0 when it fits).
    pub overshoot: f64,
    /// Largest uniform scale of the part that fits in this placement (below 1 when it
    /// does not fit).
    pub scale_to_fit: f64,
    /// Print score of the placement (lower is better; see [`super::orient`]); infinite
    /// when it does not fit.
    pub score: f64,
    /// Area resting on the bed in the chosen pose, mm^2 (see [`super::underside()`]).
    pub bed_contact: f64,
    /// Area needing support in the chosen pose, mm^2: faces steeper than the overhang
    /// angle (default 45 degrees from vertical, common practice) above the first layer.
    pub overhang_area: f64,
    /// Angular resolution used, degrees.
    pub resolution_deg: f64,
    /// Any orientation that fits with this much to spare on every axis is found, mm
    /// (`2 R eps`, see the module docs).
    pub guarantee: f64,
    /// False when the search stopped at [`FitOptions::max_evaluations`] before finishing
    /// (the guarantee then does not hold).
    pub complete: bool,
    /// Down directions evaluated.
    pub evaluated: usize,
    /// The poses offered, the one chosen and why.
    pub orientation: Orientation,
}

#[derive(Debug, Clone, Copy)]
struct Avail {
    a: f64,
    b: f64,
    h: f64,
    round: bool,
}

impl Avail {
    fn of(p: &Printer) -> Self {
        let (a, b, h) = p.available();
        Avail {
            a,
            b,
            h,
            round: matches!(p.volume, Volume::Round { .. }),
        }
    }
    fn min(&self) -> f64 {
        self.a.min(self.b).min(self.h)
    }
}

#[derive(Debug, Clone, Copy)]
struct Eval {
    up: Vector3<f64>,
    yaw: f64,
    ratio: f64,
}

fn frame(up: &Vector3<f64>) -> (Vector3<f64>, Vector3<f64>) {
    let seed = if up.x.abs() < 0.9 {
        Vector3::x()
    } else {
        Vector3::y()
    };
    let b1 = (seed - up * seed.dot(up)).normalize();
    let b2 = up.cross(&b1);
    (b1, b2)
}

fn rotation(up: &Vector3<f64>, yaw: f64) -> Matrix3<f64> {
    let (b1, b2) = frame(up);
    let (c, s) = (yaw.cos(), yaw.sin());
    let e1 = b1 * c + b2 * s;
    let e2 = -b1 * s + b2 * c;
    Matrix3::from_rows(&[e1.transpose(), e2.transpose(), up.transpose()])
}

fn evaluate(pts: &[Vector3<f64>], up: Vector3<f64>, av: &Avail) -> Eval {
    let (b1, b2) = frame(&up);
    let (mut z0, mut z1) = (f64::MAX, f64::MIN);
    let p2: Vec<Point2<f64>> = pts
        .iter()
        .map(|v| {
            let z = up.dot(v);
            z0 = z0.min(z);
            z1 = z1.max(z);
            Point2::new(b1.dot(v), b2.dot(v))
        })
        .collect();
    let hull2 = hull::convex_hull(&p2);
    let height_ratio = if pts.is_empty() {
        0.0
    } else {
        (z1 - z0) / av.h
    };
    let (yaw, fp) = if av.round {
        let (_, r) = hull::enclosing_circle(&hull2);
        (0.0, 2.0 * r / av.a)
    } else {
        let y = best_yaw(&hull2, av.a, av.b);
        (y.angle, y.ratio)
    };
    Eval {
        up,
        yaw,
        ratio: fp.max(height_ratio),
    }
}

struct Cell {
    face: usize,
    a: [f64; 2],
    b: [f64; 2],
    alpha: f64,
    ev: Eval,
    lb: f64,
}

struct Queued(f64, usize);
impl PartialEq for Queued {
    fn eq(&self, o: &Self) -> bool {
        self.0.total_cmp(&o.0) == Ordering::Equal
    }
}
impl Eq for Queued {}
impl PartialOrd for Queued {
    fn partial_cmp(&self, o: &Self) -> Option<Ordering> {
        Some(self.cmp(o))
    }
}
impl Ord for Queued {
    fn cmp(&self, o: &Self) -> Ordering {
        // Reversed: BinaryHeap pops the smallest bound first.
        o.0.total_cmp(&self.0).then(o.1.cmp(&self.1))
    }
}

fn cube_dir(face: usize, a: f64, b: f64) -> Vector3<f64> {
    let mut v = Vector3::zeros();
    v[face] = 1.0;
    v[(face + 1) % 3] = a;
    v[(face + 2) % 3] = b;
    v.normalize()
}

struct Search {
    best: Eval,
    evaluated: usize,
    complete: bool,
}

/// What a search is asked.
#[derive(Clone, Copy, PartialEq)]
enum Question {
    /// The best direction (the smallest ratio), fitting or not.
    Best,
    /// Only whether some direction fits: the search stops once no cell left can hold
    /// one (every direction in a cell has a ratio of at least the cell's lower bound),
    /// which gives the same answer as [`Question::Best`] with less work where none fits.
    Fits,
}

/// Best-first branch and bound over down directions (see the module docs).
fn branch_and_bound(
    pts: &[Vector3<f64>],
    lip: f64,
    av: &Avail,
    opts: &FitOptions,
    question: Question,
) -> Search {
    let eps = opts.resolution_deg.to_radians().max(1e-6);
    let slope = lip / av.min();
    let mut cells: Vec<Cell> = Vec::new();
    let mut heap = BinaryHeap::new();
    let make = |(face, a, b): (usize, [f64; 2], [f64; 2])| {
        let (am, bm) = (0.5 * (a[0] + a[1]), 0.5 * (b[0] + b[1]));
        let c = cube_dir(face, am, bm);
        let alpha = [(a[0], b[0]), (a[0], b[1]), (a[1], b[0]), (a[1], b[1])]
            .iter()
            .map(|&(x, y)| c.dot(&cube_dir(face, x, y)).clamp(-1.0, 1.0).acos())
            .fold(0.0, f64::max);
        let ev = evaluate(pts, c, av);
        let lb = ev.ratio - slope * alpha;
        Cell {
            face,
            a,
            b,
            alpha,
            ev,
            lb,
        }
    };
    // Cells are evaluated side by side (each is a function of its patch alone) and
    // queued in a fixed order: the search takes the same steps on any thread count.
    let evaluate_all = |patches: Vec<(usize, [f64; 2], [f64; 2])>| -> Vec<Cell> {
        patches.into_par_iter().map(make).collect()
    };
    const START: usize = 6;
    let s = 2.0 / START as f64;
    let start: Vec<(usize, [f64; 2], [f64; 2])> = (0..3)
        .flat_map(|face| {
            (0..START).flat_map(move |i| {
                (0..START).map(move |j| {
                    let a = [-1.0 + s * i as f64, -1.0 + s * (i + 1) as f64];
                    let b = [-1.0 + s * j as f64, -1.0 + s * (j + 1) as f64];
                    (face, a, b)
                })
            })
        })
        .collect();
    let mut evaluated = start.len();
    for cell in evaluate_all(start) {
        heap.push(Queued(cell.lb, cells.len()));
        cells.push(cell);
    }
    let mut best: Option<Eval> = None;
    for c in &cells {
        if best.is_none_or(|b| c.ev.ratio < b.ratio) {
            best = Some(c.ev);
        }
    }
    let mut best = best.unwrap_or(Eval {
        up: Vector3::z(),
        yaw: 0.0,
        ratio: f64::MAX,
    });
    let limit = 1.0 + opts.tolerance / av.min();
    let fits = |e: &Eval| e.ratio <= limit;
    let mut complete = true;
    while let Some(Queued(lb, k)) = heap.pop() {
        if fits(&best) || lb >= best.ratio || (question == Question::Fits && lb > limit) {
            break;
        }
        if evaluated >= opts.max_evaluations {
            complete = false;
            break;
        }
        let (face, a, b, alpha) = (cells[k].face, cells[k].a, cells[k].b, cells[k].alpha);
        if alpha < eps {
            continue;
        }
        let (am, bm) = (0.5 * (a[0] + a[1]), 0.5 * (b[0] + b[1]));
        let children = vec![
            (face, [a[0], am], [b[0], bm]),
            (face, [a[0], am], [bm, b[1]]),
            (face, [am, a[1]], [b[0], bm]),
            (face, [am, a[1]], [bm, b[1]]),
        ];
        for cell in evaluate_all(children) {
            evaluated += 1;
            if cell.ev.ratio < best.ratio {
                best = cell.ev;
            }
            heap.push(Queued(cell.lb, cells.len()));
            cells.push(cell);
        }
    }
    Search {
        best,
        evaluated,
        complete,
    }
}

/// Triangles of one normal direction: summed scaled normal, `(triangle, area)` pairs.
type Group = (Vector3<f64>, Vec<(usize, f64)>);

/// Large flat faces of the mesh that lie on its convex hull: `(outward normal, area)`.
fn flats(mesh: &TriMesh) -> Vec<(Vector3<f64>, f64)> {
    // Ordered map: the same mesh gives the same list every run (issue: ties in hash order).
    let mut groups: BTreeMap<[i32; 3], Group> = BTreeMap::new();
    for t in 0..mesh.len() {
        let n = mesh.scaled_normal(t);
        let len = n.norm();
        if len.is_nan() || len <= 0.0 || !len.is_finite() {
            continue;
        }
        let u = n / len;
        let key = [
            (u.x * 300.0).round() as i32,
            (u.y * 300.0).round() as i32,
            (u.z * 300.0).round() as i32,
        ];
        let g = groups.entry(key).or_insert((Vector3::zeros(), Vec::new()));
        g.0 += n;
        g.1.push((t, 0.5 * len));
    }
    let mut list: Vec<(Group, f64)> = groups
        .into_values()
        .map(|g| {
            let area = g.1.iter().map(|x| x.1).sum();
            (g, area)
        })
        .collect();
    list.sort_by(|p, q| q.1.total_cmp(&p.1));
    list.truncate(12);
    let size = mesh
        .bounding_box()
        .map(|b| b.size().norm())
        .unwrap_or(1.0)
        .max(1e-9);
    let tol = 1e-6 * size;
    list.into_iter()
        .filter_map(|((n, tris), _)| {
            let n = n.try_normalize(0.0)?;
            let support = mesh
                .vertices
                .iter()
                .map(|v| n.dot(&v.coords))
                .fold(f64::MIN, f64::max);
            let area: f64 = tris
                .iter()
                .filter(|(t, _)| {
                    mesh.corners(*t)
                        .iter()
                        .all(|c| n.dot(&c.coords) >= support - tol)
                })
                .map(|x| x.1)
                .sum();
            (area > 0.0).then_some((n, area))
        })
        .collect()
}

/// Size, gaps, fit and placement of every vertex in a rotation; the indices of the
/// vertices that bound each axis (for the subset).
struct Measure {
    placement: Placement,
    size: [f64; 3],
    wall_gap: [f64; 3],
    fits: bool,
    overshoot: f64,
    scale: f64,
    extremes: Vec<usize>,
}

fn measure(
    verts: &[Point3<f64>],
    rot: Matrix3<f64>,
    printer: &Printer,
    av: &Avail,
    tol: f64,
) -> Measure {
    let mut lo = [f64::MAX; 3];
    let mut hi = [f64::MIN; 3];
    let mut ilo = [0usize; 3];
    let mut ihi = [0usize; 3];
    let rotated: Vec<Vector3<f64>> = verts.iter().map(|v| rot * v.coords).collect();
    for (i, p) in rotated.iter().enumerate() {
        for k in 0..3 {
            if p[k] < lo[k] {
                lo[k] = p[k];
                ilo[k] = i;
            }
            if p[k] > hi[k] {
                hi[k] = p[k];
                ihi[k] = i;
            }
        }
    }
    let size = [hi[0] - lo[0], hi[1] - lo[1], hi[2] - lo[2]];
    let mut extremes: Vec<usize> = ilo.iter().chain(ihi.iter()).copied().collect();
    let (cx, cy) = printer.bed_centre();
    match printer.volume {
        Volume::Box { x, y, z } => {
            let t = Vector3::new(
                cx - 0.5 * (lo[0] + hi[0]),
                cy - 0.5 * (lo[1] + hi[1]),
                -lo[2],
            );
            let wall_gap = [0.5 * (x - size[0]), 0.5 * (y - size[1]), z - size[2]];
            let over = [size[0] - av.a, size[1] - av.b, size[2] - av.h];
            Measure {
                placement: Placement {
                    rotation: rot,
                    translation: t,
                },
                size,
                wall_gap,
                fits: over.iter().all(|&o| o <= tol),
                overshoot: over.iter().fold(0.0, |m, &o| m.max(o)),
                scale: (av.a / size[0]).min(av.b / size[1]).min(av.h / size[2]),
                extremes,
            }
        }
        Volume::Round { diameter, height } => {
            let p2: Vec<Point2<f64>> = rotated.iter().map(|p| Point2::new(p.x, p.y)).collect();
            let h2 = hull::convex_hull(&p2);
            let (c, r) = hull::enclosing_circle(&h2);
            let t = Vector3::new(cx - c.x, cy - c.y, -lo[2]);
            // Exact radial reach of the placed vertices from the bed centre.
            let (mut reach, mut far) = (0.0f64, 0usize);
            for (i, p) in p2.iter().enumerate() {
                let d = ((p.x - c.x).powi(2) + (p.y - c.y).powi(2)).sqrt();
                if d > reach {
                    reach = d;
                    far = i;
                }
            }
            extremes.push(far);
            let reach = reach.max(r);
            let gap = 0.5 * diameter - reach;
            let over = [2.0 * reach - av.a, size[2] - av.h];
            Measure {
                placement: Placement {
                    rotation: rot,
                    translation: t,
                },
                size,
                wall_gap: [gap, gap, height - size[2]],
                fits: over.iter().all(|&o| o <= tol),
                overshoot: over.iter().fold(0.0, |m, &o| m.max(o)),
                scale: (av.a / (2.0 * reach)).min(av.h / size[2]),
                extremes,
            }
        }
    }
}

/// A fitting candidate with its print figures.
#[derive(Debug, Clone, Copy)]
struct Cand {
    e: Eval,
    s: Scored,
}

impl Cand {
    fn key(&self) -> [i64; 4] {
        rank_key(self.s.score, &self.e.up)
    }
}

/// Finds how a part fits the printer (see the module docs for the method and the
/// guarantee) and, among the orientations that fit, the pose to print
/// ([`super::orient`]). Errors only when the mesh has no finite vertex.
pub fn fit_part(
    name: &str,
    mesh: &TriMesh,
    printer: &Printer,
    opts: &FitOptions,
) -> Result<Fit, FitError> {
    check_indices(name, mesh)?;
    let mut run = PoseSearch::new(name, mesh, printer, opts)?;
    let mut subset: Vec<usize> = hull::support_subset(&run.verts, opts.support_directions);
    for round in 0..4 {
        if round == 3 {
            // Last resort: every vertex (always exact, slower).
            subset = (0..run.verts.len()).collect();
        }
        match run.round(&subset) {
            Round::NoFit(best) => {
                let poses = vec![run.no_fit(&best)];
                return Ok(run.finish(poses, Choice::NoFit));
            }
            Round::Fits(offered) => return Ok(run.finish(offered, Choice::Best)),
            Round::Grow(extra) => {
                subset.extend(extra);
                subset.sort_unstable();
                subset.dedup();
            }
        }
    }
    // Unreachable in practice: the last round searched every vertex, and a fit found
    // there is exact. Report the closest placement found.
    let pts: Vec<Vector3<f64>> = run.verts.iter().map(|v| v - run.centre).collect();
    let search = branch_and_bound(&pts, run.lip, &run.av, opts, Question::Best);
    run.evaluated += search.evaluated;
    run.complete = false;
    let poses = vec![run.no_fit(&search.best)];
    Ok(run.finish(poses, Choice::NoFit))
}

/// Every triangle names a vertex of the mesh.
fn check_indices(name: &str, mesh: &TriMesh) -> Result<(), FitError> {
    let count = mesh.vertices.len();
    for (t, tri) in mesh.triangles.iter().enumerate() {
        if let Some(&v) = tri.iter().find(|&&v| v as usize >= count) {
            return Err(FitError::BadIndex {
                part: name.to_string(),
                triangle: t,
                vertex: v,
                count,
            });
        }
    }
    Ok(())
}

/// What one round of the search found on a subset of the vertices.
enum Round {
    /// Proven on the subset: no orientation fits; the closest found.
    NoFit(Eval),
    /// Poses that fit, checked on every vertex, best first.
    Fits(Vec<(Cand, Measure)>),
    /// No candidate survived the exact check: the vertices that broke them.
    Grow(Vec<usize>),
}

/// The search for one part: its finite vertices about their box centre, what the
/// printer offers, the print scorer, and the count of down directions evaluated.
struct PoseSearch<'a> {
    verts: Vec<Point3<f64>>,
    centre: Point3<f64>,
    /// `L = 2 R`: how fast extents change with the angle turned (module docs).
    lip: f64,
    av: Avail,
    printer: &'a Printer,
    opts: &'a FitOptions,
    scorer: Scorer,
    /// Large flat faces on the hull: `(outward normal, area)`.
    flats: Vec<(Vector3<f64>, f64)>,
    /// Angular resolution, radians.
    eps: f64,
    /// Largest ratio that still fits (the tolerance for rounding).
    fit_limit: f64,
    evaluated: usize,
    complete: bool,
}

impl<'a> PoseSearch<'a> {
    fn new(
        name: &str,
        mesh: &TriMesh,
        printer: &'a Printer,
        opts: &'a FitOptions,
    ) -> Result<Self, FitError> {
        let verts: Vec<Point3<f64>> = mesh
            .vertices
            .iter()
            .copied()
            .filter(|v| v.coords.iter().all(|c| c.is_finite()))
            .collect();
        if verts.is_empty() {
            return Err(FitError::EmptyPart(name.to_string()));
        }
        let av = Avail::of(printer);
        let bb =
            crate::mesh::Aabb::of_points(&verts).ok_or_else(|| FitError::EmptyPart(name.into()))?;
        let centre = nalgebra::center(&bb.min, &bb.max);
        let radius = verts
            .iter()
            .map(|v| (v - centre).norm())
            .fold(0.0, f64::max);
        Ok(PoseSearch {
            verts,
            centre,
            lip: 2.0 * radius,
            av,
            printer,
            opts,
            scorer: Scorer::new(mesh, av.h, &opts.print),
            flats: flats(mesh),
            eps: opts.resolution_deg.to_radians().max(1e-6),
            fit_limit: 1.0 + opts.tolerance / av.min(),
            evaluated: 0,
            complete: true,
        })
    }

    /// One round on the vertices `subset`: the best down direction (no fit when even it
    /// does not fit), candidates, each class's best refined, then the exact check.
    fn round(&mut self, subset: &[usize]) -> Round {
        let pts: Vec<Vector3<f64>> = subset
            .iter()
            .map(|&i| self.verts[i] - self.centre)
            .collect();
        let best = self.best_down(&pts);
        if best.ratio > self.fit_limit {
            return Round::NoFit(best);
        }
        let mut cands = self.candidates(&pts, &best);
        // Refine the best of each class (or the best few apart) by a pattern search that
        // keeps the class and the fit.
        let opts = self.opts;
        let starts = distinct(&cands, opts.print.offered.max(3), opts.print.axes.is_some());
        let refined: Vec<Cand> = starts
            .into_iter()
            .map(|start| self.refine(&pts, start))
            .collect();
        cands.extend(refined);
        cands.sort_by_key(Cand::key);
        let (mut offered, extra) = self.check_exactly(&pts, &cands);
        if offered.is_empty() {
            return Round::Grow(extra);
        }
        offered.sort_by_key(|o| o.0.key());
        Round::Fits(offered)
    }

    /// Evaluates `up` on `pts`, counting it.
    fn evaluate(&mut self, pts: &[Vector3<f64>], up: Vector3<f64>) -> Eval {
        self.evaluated += 1;
        evaluate(pts, up, &self.av)
    }

    /// The part's flat faces down, then its axes both ways.
    fn special_directions(&self) -> impl Iterator<Item = Vector3<f64>> + '_ {
        let axes = [Vector3::x(), Vector3::y(), Vector3::z()]
            .into_iter()
            .flat_map(|e| [e, -e]);
        self.flats.iter().map(|(n, _)| -n).chain(axes)
    }

    /// The best down direction: the branch and bound's, or a special direction
    /// evaluated exactly (parts that fit only just, face down, are found whatever the
    /// resolution).
    fn best_down(&mut self, pts: &[Vector3<f64>]) -> Eval {
        let search = branch_and_bound(pts, self.lip, &self.av, self.opts, Question::Best);
        self.evaluated += search.evaluated;
        self.complete &= search.complete;
        let mut best = search.best;
        let ups: Vec<Vector3<f64>> = self.special_directions().collect();
        for up in ups {
            let e = self.evaluate(pts, up);
            if e.ratio < best.ratio {
                best = e;
            }
        }
        best
    }

    /// The fitting candidates, best first: an even lattice, the special directions,
    /// the classes' centres, the best found and its opposite.
    fn candidates(&mut self, pts: &[Vector3<f64>], best: &Eval) -> Vec<Cand> {
        let mut ups: Vec<Vector3<f64>> = hull::sphere_directions(CANDIDATES);
        ups.extend(self.special_directions());
        if let Some(ax) = &self.opts.print.axes {
            ups.extend(PoseClass::ALL.iter().filter_map(|c| ax.centre(*c)));
        }
        ups.push(best.up);
        ups.push(-best.up);
        let mut cands: Vec<Cand> = Vec::new();
        for up in ups {
            let e = self.evaluate(pts, up);
            if e.ratio <= self.fit_limit {
                cands.push(Cand {
                    e,
                    s: self.scorer.score(&e.up),
                });
            }
        }
        cands.sort_by_key(Cand::key);
        cands
    }

    /// Pattern search from `start` over down directions of its class that still fit,
    /// halving the step until it is below half the resolution.
    fn refine(&mut self, pts: &[Vector3<f64>], start: Cand) -> Cand {
        let mut cur = start;
        let mut step = 4f64.to_radians();
        let mut moves = 0;
        while step >= 0.5 * self.eps && moves < 200 {
            let (b1, b2) = frame(&cur.e.up);
            let mut improved = false;
            for axis in [b1, b2, -b1, -b2] {
                let r = Rotation3::from_axis_angle(&nalgebra::Unit::new_normalize(axis), step);
                let up = r * cur.e.up;
                if self.scorer.class(&up) != start.s.class {
                    continue;
                }
                let e = self.evaluate(pts, up);
                if e.ratio > self.fit_limit {
                    continue;
                }
                let c = Cand {
                    e,
                    s: self.scorer.score(&up),
                };
                if c.key() < cur.key() {
                    cur = c;
                    improved = true;
                    moves += 1;
                    break;
                }
            }
            if !improved {
                step *= 0.5;
            }
        }
        cur
    }

    /// Exact check on every vertex, growing the subset when a vertex breaks a fit: the
    /// best few distinct poses (one per class for a blade) and the requested class.
    /// Returns them and the vertices that broke fits.
    fn check_exactly(
        &mut self,
        pts: &[Vector3<f64>],
        cands: &[Cand],
    ) -> (Vec<(Cand, Measure)>, Vec<usize>) {
        let opts = self.opts;
        let print = &opts.print;
        let mut extra: Vec<usize> = Vec::new();
        let mut offered: Vec<(Cand, Measure)> = Vec::new();
        let want = print.offered.max(1);
        let mut checked = 0;
        for cand in cands {
            let have_requested = print
                .pose
                .is_none_or(|r| offered.iter().any(|o| o.0.s.class == Some(r)));
            if (offered.len() >= want && have_requested) || checked >= MAX_EXACT {
                break;
            }
            if offered.len() >= want && cand.s.class != print.pose {
                continue;
            }
            let apart = |o: &(Cand, Measure)| match print.axes {
                Some(_) => o.0.s.class != cand.s.class,
                None => o.0.e.up.dot(&cand.e.up) < APART_COS,
            };
            if !offered.iter().all(apart) {
                continue;
            }
            checked += 1;
            let mut e = cand.e;
            for _ in 0..8 {
                let m = self.measure(&e);
                if m.fits {
                    offered.push((Cand { e, s: cand.s }, m));
                    break;
                }
                extra.extend(&m.extremes);
                let mut local = pts.to_vec();
                local.extend(extra.iter().map(|&i| self.verts[i] - self.centre));
                e = self.evaluate(&local, e.up);
                if e.ratio > self.fit_limit {
                    break;
                }
            }
        }
        (offered, extra)
    }

    /// Every vertex placed in the orientation of `e`.
    fn measure(&self, e: &Eval) -> Measure {
        let rot = rotation(&e.up, e.yaw);
        measure(
            &self.verts,
            rot,
            self.printer,
            &self.av,
            self.opts.tolerance,
        )
    }

    /// The closest placement when nothing fits.
    fn no_fit(&self, e: &Eval) -> (Cand, Measure) {
        let m = self.measure(e);
        (
            Cand {
                e: *e,
                s: self.scorer.score(&e.up),
            },
            m,
        )
    }

    /// The answer: the poses offered (best first), the one chosen (the requested class
    /// when it fits) and why.
    fn finish(&self, poses: Vec<(Cand, Measure)>, choice: Choice) -> Fit {
        let opts = self.opts;
        let poses: Vec<(Pose, Measure)> = poses
            .into_iter()
            .map(|(c, m)| (pose_of(&c, &m, &opts.print), m))
            .collect();
        let requested = opts.print.pose;
        let (chosen, choice) = match (choice, requested) {
            (Choice::NoFit, _) => (0, Choice::NoFit),
            (_, Some(r)) => match poses.iter().position(|p| p.0.class == Some(r)) {
                Some(i) => (i, Choice::Requested),
                None => (0, Choice::RequestedDoesNotFit),
            },
            _ => (0, Choice::Best),
        };
        let m = &poses[chosen].1;
        let (fits, placement, size, wall_gap, overshoot, scale) = (
            m.fits,
            m.placement,
            m.size,
            m.wall_gap,
            m.overshoot,
            m.scale,
        );
        let poses: Vec<Pose> = poses.into_iter().map(|p| p.0).collect();
        let why = reasons(&poses, chosen, choice, requested, opts.print.axes.is_some());
        let p = &poses[chosen];
        Fit {
            fits,
            placement,
            size,
            wall_gap,
            overshoot,
            scale_to_fit: scale,
            score: if fits { p.score } else { f64::INFINITY },
            bed_contact: p.underside.contact_area,
            overhang_area: p.underside.overhang_area,
            resolution_deg: opts.resolution_deg,
            guarantee: self.lip * self.eps,
            complete: self.complete,
            evaluated: self.evaluated,
            orientation: Orientation {
                chosen,
                choice,
                requested,
                underside_options: opts.print.underside,
                why,
                poses,
            },
        }
    }
}

/// The extents on the printer's axes of the points in an orientation where they fit, or
/// `None`; no pose is chosen:
/// the branch and bound of [`fit_part`] (same method and guarantee) with the part's own
/// axes tried too, the direction found checked exactly on every point, the subset grown
/// when a point breaks it. Much cheaper than [`fit_part`] when only the answer is needed
/// (planning segments); `false` when the search stops early without a fit.
pub fn fit_extents(
    points: &[Point3<f64>],
    printer: &Printer,
    opts: &FitOptions,
) -> Option<[f64; 3]> {
    let verts: Vec<Point3<f64>> = points
        .iter()
        .copied()
        .filter(|v| v.coords.iter().all(|c| c.is_finite()))
        .collect();
    let bb = crate::mesh::Aabb::of_points(&verts)?;
    let av = Avail::of(printer);
    let centre = nalgebra::center(&bb.min, &bb.max);
    let lip = 2.0
        * verts
            .iter()
            .map(|v| (v - centre).norm())
            .fold(0.0, f64::max);
    let fit_limit = 1.0 + opts.tolerance / av.min();
    let mut subset = hull::support_subset(&verts, opts.support_directions);
    for round in 0..4 {
        if round == 3 {
            subset = (0..verts.len()).collect();
        }
        let pts: Vec<Vector3<f64>> = subset.iter().map(|&i| verts[i] - centre).collect();
        let mut best = [Vector3::x(), Vector3::y(), Vector3::z()]
            .into_iter()
            .map(|up| evaluate(&pts, up, &av))
            .min_by(|a, b| a.ratio.total_cmp(&b.ratio))
            .expect("three axes");
        if best.ratio > fit_limit {
            let search = branch_and_bound(&pts, lip, &av, opts, Question::Fits);
            if search.best.ratio < best.ratio {
                best = search.best;
            }
        }
        if best.ratio > fit_limit {
            return None;
        }
        let m = measure(
            &verts,
            rotation(&best.up, best.yaw),
            printer,
            &av,
            opts.tolerance,
        );
        if m.fits {
            return Some(m.size);
        }
        subset.extend(m.extremes);
        subset.sort_unstable();
        subset.dedup();
    }
    None
}

/// Down directions of the even lattice tried for the pose.
const CANDIDATES: usize = 400;
/// Most candidates checked on every vertex in one round.
const MAX_EXACT: usize = 60;
/// Poses offered without blade axes are at least 30 degrees apart.
const APART_COS: f64 = 0.866_025_403_784_438_6;

/// The best candidate of each class (blades), or the best `n` at least 30 degrees apart,
/// from a sorted list.
fn distinct(sorted: &[Cand], n: usize, by_class: bool) -> Vec<Cand> {
    let mut out: Vec<Cand> = Vec::new();
    for c in sorted {
        let new = if by_class {
            out.iter().all(|o| o.s.class != c.s.class)
        } else {
            out.len() < n && out.iter().all(|o| o.e.up.dot(&c.e.up) < APART_COS)
        };
        if new {
            out.push(*c);
        }
    }
    out
}

fn pose_of(c: &Cand, m: &Measure, opts: &PrintOptions) -> Pose {
    let r = &m.placement.rotation;
    let t = &m.placement.translation;
    Pose {
        class: c.s.class,
        up: [c.e.up.x, c.e.up.y, c.e.up.z],
        rotation: [0, 1, 2].map(|i| [r[(i, 0)], r[(i, 1)], r[(i, 2)]]),
        translation: [t.x, t.y, t.z],
        angles_deg: m.placement.angles_deg(),
        size: m.size,
        underside: c.s.underside,
        span_to_layers_deg: opts.axes.map(|a| span_to_layers_deg(&a, &c.e.up)),
        terms: c.s.terms,
        score: c.s.score,
    }
}
