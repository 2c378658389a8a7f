//! The printed part's shell and infill: what a wall thickness really takes.
//!
//! **Model.** The material within the wall thickness `w` of the surface is solid (the
//! shell: perimeters and top and bottom skins, in whatever orientation the part is
//! printed); the rest, the part eroded by a ball of radius `w` (morphological erosion,
//! J. Serra, *Image Analysis and Mathematical Morphology*, 1982), is filled to the
//! infill fraction. The printed part is the solid minus `(1 - infill)` times that inner
//! body, so its mass, centre of mass and inertia follow from the solid's (exact for the
//! mesh, [`MassProps::of_mesh`]) and the inner body's.
//!
//! **Inner body by slices.** The part is cut across its long axis (the principal axis of
//! least inertia; about the span of a blade), so its shell does not depend on where it
//! is placed; `z` below is that axis. Erosion by a ball decomposes into erosions of
//! neighbouring slices by discs: the inner body's slice at height `z` is the
//! intersection, over `|dz| <= w`, of the slice at `z + dz` eroded by a disc of radius
//! `sqrt(w^2 - dz^2)`.
//! The part is cut every `h = w / m` (`m` the smallest whole number that brings `h` under
//! [`ShellOptions::step`]), so the samples `dz = k h`, `k = -m..=m`, sit on the cuts; the
//! sample at `|dz| = w` is the neighbouring slice itself. A 2-D erosion is an inward
//! polygon offset ([`inward_offset`]), the intersections are polygon booleans.
//!
//! With the default `m = 1` for walls up to 1.5 mm this is the shell a slicer prints
//! with the layers across z: perimeters `w` wide in every slice, skins `w` deep under
//! and over every face that looks up or down. Against the isotropic ball it gives a face
//! sloping at an angle `a` from z a wall `w` wide across z instead of `w / cos a`:
//! nothing on the blade's nearly upright faces, too little shell on the slopes of caps
//! and round tips. Measured (tests/props_shell.rs): a sphere of radius 20 mm with a
//! 1.2 mm wall, sloping everywhere, gets 9.8 % too little shell at the default and 0.8 %
//! at a 0.3 mm step; the demo blade's printed mass moves by 0.5 % from the default to a
//! 0.3 mm step (35.22 to 35.40 g; 35.37 g at 0.6 mm, twice the cuts with two offsets
//! each).
//!
//! **Integration along z.** Midpoint rule on cells of height `h`, the first cell starting
//! at the lowest point; each cell is a prism of its mid-slice (area, first and second
//! moments by Green's theorem, [`SectionProps`]; `integral(z^2)` of a prism cell exactly).
//! Error: for a smooth run of inner-slice area `A(z)` over a length `L`, at most
//! `L h^2 max|A''| / 24`; where `A` jumps (`w` inside a flat cap, at a flat-bottomed
//! hole), at most `h / 2` times the jump, and nothing at the lowest end nor at the top
//! when the height is a whole number of cells. Straight prisms whose height is a whole
//! number of cells are exact to the offsets' round joins ([`OFFSET_ARC_TOLERANCE`]).
//!
//! Crate: i_overlay (its outline offset and its booleans). Compared on cambered NACA
//! outlines where the offset vanishes toward the trailing edge, i_overlay, geo (which
//! wraps i_overlay), cavalier_contours and a pure-Rust Clipper2 port all matched a
//! brute-force distance grid to 1e-4 mm^2; on 4089 real blade slices cavalier_contours
//! returned open or empty results for 366 (9 %), so it was not used despite being 20
//! times faster; i_overlay also does the intersections, so one crate serves both.

use i_overlay::core::fill_rule::FillRule;
use i_overlay::core::overlay_rule::OverlayRule;
use i_overlay::float::single::SingleFloatOverlay;
use i_overlay::mesh::float::outline::offset::OutlineOffset;
use i_overlay::mesh::float::style::{LineJoin, OutlineStyle};
use i_overlay::mesh::math::MathMode;
use nalgebra::{Matrix3, Point2, Point3, Rotation3, Translation3, Vector3};

use super::mass::volume_integrals;
use super::{Fill, MassProps, SectionProps};
use crate::mesh::{Slice, SliceError, TriMesh};

/// Angle subtended by one chord of an offset's round joins, radians (i_overlay's
/// `LineJoin::Round` parameter, chord length over radius). A chord lies within
/// `d (1 - cos(a / 2))` of its arc: 1.5e-5 mm at a 1.2 mm wall.
pub const OFFSET_ARC_ANGLE: f64 = 0.01;

/// Closed loops in the plane, material on the left.
type Loops = Vec<Vec<Point2<f64>>>;

/// Largest distance between an offset's round joins and the chords that replace them,
/// at a wall of 10 mm or less, mm (from the arc angle of the offsets); an offset region is off by
/// at most this times the arcs' length.
pub const OFFSET_ARC_TOLERANCE: f64 = 1.3e-4;

/// Points of a loop closer than this are merged before offsetting, mm.
const MERGE: f64 = 1e-6;

/// Most cuts the shell model makes; taller parts are cut every wall thickness, and an
/// error beyond that.
pub const MAX_SLICES: usize = 20_000;

/// Options of the shell model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShellOptions {
    /// Largest spacing of the cuts along z, mm (default 1.5). The spacing used is the wall
    /// divided by the smallest whole number `m` that brings it under this, so the ball's
    /// samples fall on the cuts: a 1.2 mm wall is cut every 1.2 mm (`m = 1`). A smaller
    /// step samples the ball more finely (more shell on sloping faces) at `m` offsets per
    /// cut.
    pub step: f64,
}

impl ShellOptions {
    /// The defaults.
    pub const DEFAULT: ShellOptions = ShellOptions { step: 1.5 };
}

impl Default for ShellOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// Why the shell model could not be evaluated.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ShellError {
    /// The mesh encloses no volume.
    #[error("the part encloses no volume: the mesh is empty, open or inside-out (check and repair it, or flip its triangles)")]
    NoVolume,
    /// A cut did not close.
    #[error(transparent)]
    Slice(#[from] SliceError),
    /// The part is too tall for the wall thickness.
    #[error(
        "the part is {height:.0} mm tall: a {wall} mm wall needs {slices} cuts for the shell \
         model, more than {MAX_SLICES}; check the length unit, or give a thicker wall"
    )]
    TooTall {
        /// Height along z, mm.
        height: f64,
        /// Wall thickness, mm.
        wall: f64,
        /// Cuts needed.
        slices: usize,
    },
}

/// A part's mass properties as printed with a [`Fill`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FilledMass {
    /// The part as printed: mass, centre of mass and inertia of shell plus infill.
    /// `volume` and `area` stay the solid's (enclosed volume, surface).
    pub props: MassProps,
    /// The part fully solid, same density.
    pub solid: MassProps,
    /// Volume within the wall of the surface, mm^3.
    pub shell_volume: f64,
    /// Volume inside the shell (filled to the infill fraction), mm^3.
    pub inner_volume: f64,
    /// Material volume over enclosed volume, 0..=1.
    pub fraction: f64,
    /// Spacing of the cuts, mm (0 when no cut was needed).
    pub step: f64,
    /// Number of cuts made.
    pub slices: usize,
}

fn to_xy(loops: &[Vec<Point2<f64>>]) -> Vec<Vec<[f64; 2]>> {
    loops
        .iter()
        .map(|l| l.iter().map(|p| [p.x, p.y]).collect())
        .collect()
}

fn from_shapes(shapes: Vec<Vec<Vec<[f64; 2]>>>) -> Vec<Vec<Point2<f64>>> {
    shapes
        .into_iter()
        .flatten()
        .filter(|c| c.len() >= 3)
        .map(|c| c.into_iter().map(|[x, y]| Point2::new(x, y)).collect())
        .collect()
}

/// A loop without near-duplicate points; empty when fewer than three points remain or a
/// point is not finite.
fn cleaned(ring: &[Point2<f64>]) -> Vec<[f64; 2]> {
    let mut p: Vec<[f64; 2]> = Vec::with_capacity(ring.len());
    let near = |a: [f64; 2], b: [f64; 2]| (a[0] - b[0]).hypot(a[1] - b[1]) <= MERGE;
    for q in ring {
        if !(q.x.is_finite() && q.y.is_finite()) {
            return Vec::new();
        }
        if p.last().is_none_or(|&l| !near(l, [q.x, q.y])) {
            p.push([q.x, q.y]);
        }
    }
    while p.len() > 1 && near(p[0], p[p.len() - 1]) {
        p.pop();
    }
    if p.len() < 3 {
        p.clear();
    }
    p
}

/// The region bounded by `loops` (closed, material on the left: outer boundaries
/// counter-clockwise, holes clockwise, not crossing) eroded by a disc of radius `d` mm:
/// the points of the region at least `d` from its boundary, as loops in the same
/// convention. Parts thinner than `2 d` vanish (a thin trailing edge), so the answer may
/// have more loops than the input or none. Arcs become chords within
/// [`OFFSET_ARC_TOLERANCE`]. `d <= 0` returns the loops unchanged.
pub fn inward_offset(loops: &[Vec<Point2<f64>>], d: f64) -> Vec<Vec<Point2<f64>>> {
    if !(d > 0.0) {
        return loops.to_vec();
    }
    let shape: Vec<Vec<[f64; 2]>> = loops
        .iter()
        .map(|l| cleaned(l))
        .filter(|c| !c.is_empty())
        .collect();
    if shape.is_empty() {
        return Vec::new();
    }
    // i_overlay's outline with a negative offset: the boundary moved inward (outer loops
    // shrink, holes grow, parts thinner than 2 d vanish), round joins where the moved
    // edges part, chords of at most OFFSET_ARC_ANGLE radians.
    let style = OutlineStyle::new(-d)
        .line_join(LineJoin::Round(OFFSET_ARC_ANGLE))
        .math(MathMode::Float);
    from_shapes(shape.outline(&style))
}

/// The intersection of two regions given as loops (material on the left).
pub fn intersection(a: &[Vec<Point2<f64>>], b: &[Vec<Point2<f64>>]) -> Vec<Vec<Point2<f64>>> {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    from_shapes(to_xy(a).overlay(&to_xy(b), OverlayRule::Intersect, FillRule::Positive))
}

/// Signed area of loops (material on the left), mm^2 (shoelace formula).
fn area(loops: &[Vec<Point2<f64>>]) -> f64 {
    loops
        .iter()
        .map(|l| {
            let n = l.len();
            (0..n)
                .map(|i| l[i].x * l[(i + 1) % n].y - l[(i + 1) % n].x * l[i].y)
                .sum::<f64>()
        })
        .sum::<f64>()
        / 2.0
}

impl Fill {
    /// Fraction of a cut section that is material (0..=1): the section eroded by the
    /// wall ([`inward_offset`]) is filled to the infill fraction, the rest is solid.
    /// `loops` closed, material on the left (a [`Slice`]'s loops).
    pub fn fraction_of_section(&self, loops: &[Vec<Point2<f64>>]) -> f64 {
        let infill = self.infill.clamp(0.0, 1.0);
        let whole = area(loops);
        if !(whole > 0.0) {
            return 0.0;
        }
        if infill >= 1.0 {
            return 1.0;
        }
        let inner = area(&inward_offset(loops, self.wall)).clamp(0.0, whole);
        ((whole - (1.0 - infill) * inner) / whole).clamp(0.0, 1.0)
    }
}

/// The cut grid: spacing `h = w / m` and the number of cuts, or an error for a part too
/// tall.
fn grid(height: f64, wall: f64, step: f64) -> Result<(f64, usize, usize), ShellError> {
    let step = if step > 0.0 {
        step
    } else {
        ShellOptions::DEFAULT.step
    };
    let cuts = |h: f64| (height / h).ceil().max(1.0);
    let m = (wall / step).ceil().max(1.0);
    let mut h = wall / m;
    let mut m = m as usize;
    if cuts(h) > MAX_SLICES as f64 {
        (h, m) = (wall, 1);
    }
    let n = cuts(h);
    if n > MAX_SLICES as f64 {
        return Err(ShellError::TooTall {
            height,
            wall,
            slices: n.min(usize::MAX as f64) as usize,
        });
    }
    Ok((h, m, n as usize))
}

/// Volume integrals of the inner body (see the module docs) about `origin`, and the cut
/// spacing and count.
fn inner_integrals(
    mesh: &TriMesh,
    wall: f64,
    origin: &Point3<f64>,
    opts: &ShellOptions,
) -> Result<([f64; 10], f64, usize), ShellError> {
    let bb = mesh.bounding_box().ok_or(ShellError::NoVolume)?;
    let (h, m, n) = grid(bb.max.z - bb.min.z, wall, opts.step)?;
    let zs: Vec<f64> = (0..n).map(|i| bb.min.z + (i as f64 + 0.5) * h).collect();
    let raw: Vec<Loops> = Slice::cut_many(mesh, &zs)?
        .into_iter()
        .map(|s| s.loops)
        .collect();
    // Disc radius for the sample k cuts away (k < m); k = m is the raw slice.
    let radius = |k: usize| (wall * wall - (k as f64 * h).powi(2)).max(0.0).sqrt();
    let mut eroded: Vec<Vec<Option<Loops>>> = vec![vec![None; m]; n];
    let mut s = [0.0f64; 10];
    for i in 0..n {
        if raw[i].is_empty()
            || i < m
            || i + m >= n
            || raw[i - m].is_empty()
            || raw[i + m].is_empty()
        {
            continue;
        }
        let mut region = erode(&mut eroded, &raw, i, 0, radius(0));
        for k in 1..=m {
            for j in [i - k, i + k] {
                if region.is_empty() {
                    break;
                }
                let other = if k == m {
                    raw[j].clone()
                } else {
                    erode(&mut eroded, &raw, j, k, radius(k))
                };
                region = intersection(&region, &other);
            }
        }
        let z = zs[i];
        let Some(p) = SectionProps::of_loops(z, &region) else {
            continue;
        };
        let (x, y, zr) = (p.cx - origin.x, p.cy - origin.y, z - origin.z);
        let a = p.area;
        let cell = [
            a,
            a * x,
            a * y,
            a * zr,
            p.iyy + a * x * x,
            p.ixx + a * y * y,
            a * (zr * zr + h * h / 12.0),
            p.ixy + a * x * y,
            a * y * zr,
            a * zr * x,
        ];
        for (acc, v) in s.iter_mut().zip(cell) {
            *acc += v * h;
        }
    }
    Ok((s, h, n))
}

/// The slice `j` eroded by the disc of sample `k`, computed once.
fn erode(memo: &mut [Vec<Option<Loops>>], raw: &[Loops], j: usize, k: usize, r: f64) -> Loops {
    memo[j][k]
        .get_or_insert_with(|| inward_offset(&raw[j], r))
        .clone()
}

/// The rotation that takes the part's long axis (the principal axis of least inertia,
/// pointing to the end farther from the centre of mass) to +z: the part is cut across it,
/// so a part's shell does not depend on where it is placed (three equal blades of a rotor
/// weigh the same). The identity when that axis is already +z.
fn slicing_frame(mesh: &TriMesh, solid: &MassProps) -> Rotation3<f64> {
    let mut axis = solid.principal().axes[0];
    let along = |a: &Vector3<f64>| {
        mesh.vertices
            .iter()
            .map(|v| (v - solid.centroid).dot(a))
            .fold((f64::MAX, f64::MIN), |(lo, hi), t| (lo.min(t), hi.max(t)))
    };
    let (lo, hi) = along(&axis);
    let tie = 1e-9 * (hi - lo);
    // On a tie (a symmetric part) the axis points where its largest component is positive.
    let largest = axis
        .iter()
        .copied()
        .fold(0.0f64, |m, c| if c.abs() > m.abs() { c } else { m });
    if -lo > hi + tie || ((-lo - hi).abs() <= tie && largest < 0.0) {
        axis = -axis;
    }
    if (axis - Vector3::z()).norm() < 1e-12 {
        return Rotation3::identity();
    }
    Rotation3::rotation_between(&axis, &Vector3::z())
        .unwrap_or_else(|| Rotation3::from_axis_angle(&Vector3::x_axis(), std::f64::consts::PI))
}

/// Volume integrals `[1, x, y, z, x^2, y^2, z^2, xy, yz, zx]` taken in the frame `turn`
/// maps to, back in the original frame (same origin): first moments turn with `turn^T`,
/// second moments as the tensor `turn^T S turn`.
fn rotated_back(s: &[f64; 10], turn: &Rotation3<f64>) -> [f64; 10] {
    let r = turn.matrix();
    let f = r.transpose() * Vector3::new(s[1], s[2], s[3]);
    let m = Matrix3::new(s[4], s[7], s[9], s[7], s[5], s[8], s[9], s[8], s[6]);
    let m = r.transpose() * m * r;
    [
        s[0],
        f.x,
        f.y,
        f.z,
        m[(0, 0)],
        m[(1, 1)],
        m[(2, 2)],
        m[(0, 1)],
        m[(1, 2)],
        m[(2, 0)],
    ]
}

impl FilledMass {
    /// Mass properties of a closed, outward mesh printed with `fill` in a material of
    /// `density` g/mm^3 (see the module docs for the model and its accuracy).
    pub fn of_mesh(
        mesh: &TriMesh,
        density: f64,
        fill: Fill,
        opts: &ShellOptions,
    ) -> Result<FilledMass, ShellError> {
        let origin = MassProps::origin_of(mesh).ok_or(ShellError::NoVolume)?;
        let solid_s = volume_integrals(mesh, &origin);
        let area = mesh.area();
        let solid = MassProps::from_integrals(&solid_s, &origin, area, density)
            .ok_or(ShellError::NoVolume)?;
        let infill = fill.infill.clamp(0.0, 1.0);
        let (inner, step, slices) = if infill >= 1.0 {
            ([0.0; 10], 0.0, 0)
        } else if !(fill.wall > 0.0) {
            (solid_s, 0.0, 0)
        } else {
            let turn = slicing_frame(mesh, &solid);
            let local = mesh.transformed(
                &(turn.to_homogeneous() * Translation3::from(-origin.coords).to_homogeneous()),
            );
            let (s, h, n) = inner_integrals(&local, fill.wall, &Point3::origin(), opts)?;
            (rotated_back(&s, &turn), h, n)
        };
        // The inner body lies inside the solid; keep rounding from saying otherwise.
        let scale = if inner[0] > solid.volume {
            solid.volume / inner[0]
        } else {
            1.0
        };
        let material: [f64; 10] =
            std::array::from_fn(|i| solid_s[i] - (1.0 - infill) * inner[i] * scale);
        let inner_volume = inner[0] * scale;
        let fraction = (material[0] / solid.volume).clamp(0.0, 1.0);
        let props = match MassProps::from_integrals(&material, &origin, area, density) {
            Some(p) => MassProps {
                volume: solid.volume,
                ..p
            },
            // Nothing printed at all (no wall, no infill).
            None => MassProps {
                mass: 0.0,
                inertia: Matrix3::zeros(),
                ..solid
            },
        };
        Ok(FilledMass {
            props,
            solid,
            shell_volume: solid.volume - inner_volume,
            inner_volume,
            fraction,
            step,
            slices,
        })
    }
}
