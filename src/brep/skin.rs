//! The skin faces of one span piece: the lofted B-spline between two ends (the skin's
//! own root and tip, or planes `z = const`), split at the leading edge into an upper and
//! a lower face (truck refuses closed edges), plus the ruled trailing-edge face when the
//! trailing edge is blunt. The ends are left open as loops for the end faces.
//!
//! A plane `z = c` cuts the skin exactly along an iso-curve `v = v(c)`: the lofter
//! interpolates rings that each lie in a plane `z = const`, and B-spline interpolation
//! reproduces a constant, so every control point of one column `j` has the same `z_j`
//! and `z(u, v) = sum_j N_j(v) z_j` does not depend on `u`. Cutting by knot insertion
//! (`vcut`) then gives the piece between two planes with no approximation.

use super::geom::{curve_edge, line_edge, pt};
use super::BrepError;
use crate::loft::{Basis, Skin};
use truck_modeling::{BSplineSurface, Curve, Edge, Face, KnotVec, Point3, Surface, Vertex, Wire};

/// Tolerances of the skin faces.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SkinOptions {
    /// Largest distance (mm) between the upper and lower trailing-edge curves' control
    /// points for the trailing edge to count as sharp (one shared edge, no trailing-edge
    /// face). Default 1e-6 mm.
    pub sharp_te: f64,
    /// Largest spread (mm) in z of an end's control points for the end to count as
    /// planar. Default 1e-6 mm.
    pub planar: f64,
}

impl SkinOptions {
    /// The defaults: 1e-6 mm for both.
    pub const DEFAULT: SkinOptions = SkinOptions {
        sharp_te: 1e-6,
        planar: 1e-6,
    };
}

impl Default for SkinOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

fn bad(key: &'static str, value: impl ToString, problem: impl ToString) -> BrepError {
    BrepError::BadSkin {
        key,
        value: value.to_string(),
        problem: problem.to_string(),
        fix: "rebuild the skin with the lofter (clamped knots on [0, 1], sections in planes z = const)",
    }
}

/// Checks the structure of a skin: degrees, knot counts, clamping, monotone knots,
/// finite control points, `0 < u_le < 1`.
pub(crate) fn check_skin(skin: &Skin) -> Result<(), BrepError> {
    let (pu, pv) = (skin.degree_u, skin.degree_v);
    if pu == 0 || pv == 0 {
        return Err(bad(
            "degree_u/degree_v",
            format!("{pu}/{pv}"),
            "degrees must be at least 1",
        ));
    }
    let nu = skin.control.len();
    let nv = skin.control.first().map_or(0, Vec::len);
    if nu <= pu || nv <= pv {
        return Err(bad(
            "control",
            format!("{nu} x {nv} points"),
            format!("need more than degree_u x degree_v = {pu} x {pv} control points"),
        ));
    }
    if let Some(i) = skin.control.iter().position(|r| r.len() != nv) {
        return Err(bad(
            "control",
            format!("row {i} has {} points", skin.control[i].len()),
            format!("every row must have {nv} points like row 0"),
        ));
    }
    for (key, knots, p, n) in [
        ("knots_u", &skin.knots_u, pu, nu),
        ("knots_v", &skin.knots_v, pv, nv),
    ] {
        if knots.len() != n + p + 1 {
            return Err(bad(
                key,
                format!("{} knots", knots.len()),
                format!("expected {} (control points + degree + 1)", n + p + 1),
            ));
        }
        if let Some(i) = knots
            .windows(2)
            .position(|w| !w[0].is_finite() || !w[1].is_finite() || w[1] < w[0])
        {
            return Err(bad(
                key,
                format!("knot {} = {}", i + 1, knots[i + 1]),
                "knots must not decrease",
            ));
        }
        let clamped = knots[..=p].iter().all(|&k| k == 0.0)
            && knots[knots.len() - p - 1..].iter().all(|&k| k == 1.0);
        if !clamped {
            return Err(bad(
                key,
                format!("{:?}..{:?}", &knots[..=p], &knots[knots.len() - p - 1..]),
                format!(
                    "the first and last {} knots must be 0 and 1 (clamped)",
                    p + 1
                ),
            ));
        }
    }
    for (i, row) in skin.control.iter().enumerate() {
        for (j, q) in row.iter().enumerate() {
            if !(q.x.is_finite() && q.y.is_finite() && q.z.is_finite()) {
                return Err(bad("control", format!("[{i}][{j}] = {q:?}"), "not finite"));
            }
        }
    }
    if !(skin.u_le > 0.0 && skin.u_le < 1.0) {
        return Err(bad(
            "u_le",
            skin.u_le,
            "the leading edge must lie strictly inside (0, 1)",
        ));
    }
    Ok(())
}

/// The z of a boundary row of control points, checked for planarity.
fn end_z(row: &[Point3], key: &'static str, tol: f64) -> Result<f64, BrepError> {
    let (lo, hi) = row
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
            (a.min(p.z), b.max(p.z))
        });
    if hi - lo > tol {
        return Err(bad(
            key,
            format!("z from {lo} to {hi} mm"),
            format!(
                "the section is not in a plane z = const (spread {} mm > {tol} mm)",
                hi - lo
            ),
        ));
    }
    Ok(0.5 * (lo + hi))
}

/// Two knots closer than this are merged by the STEP writer (truck's tolerance).
const KNOT_MERGE: f64 = 1e-6;

/// `t` moved onto a knot of `knots` when it lies within twice the writer's merge
/// distance of one (cutting there changes where two faces meet, not the part).
fn snap_to_knot(knots: &[f64], t: f64) -> f64 {
    knots
        .iter()
        .copied()
        .filter(|k| (k - t).abs() <= 2.0 * KNOT_MERGE)
        .min_by(|a, b| (a - t).abs().total_cmp(&(b - t).abs()))
        .unwrap_or(t)
}

/// The span function `z(v)` of a skin whose columns lie in planes (see the module docs).
pub(crate) struct SpanMap<'a> {
    skin: &'a Skin,
    z: Vec<f64>,
    /// `z` grows with `v`.
    rising: bool,
    /// `z(v)` is monotone (checked on 20 samples per knot span).
    monotone: bool,
}

impl<'a> SpanMap<'a> {
    /// Checks that every column of control points lies in one plane `z = z_j`.
    pub(crate) fn new(skin: &'a Skin, tol: f64) -> Result<SpanMap<'a>, BrepError> {
        let nv = skin.control[0].len();
        let mut z = Vec::with_capacity(nv);
        for j in 0..nv {
            let col: Vec<Point3> = skin.control.iter().map(|row| pt(&row[j])).collect();
            z.push(end_z(&col, "control (a column along u)", tol)?);
        }
        let mut map = SpanMap {
            skin,
            z,
            rising: true,
            monotone: true,
        };
        let samples = 20 * skin.knots_v.len();
        let zs: Vec<f64> = (0..=samples)
            .map(|i| map.z(i as f64 / samples as f64))
            .collect();
        map.rising = zs[samples] > zs[0];
        map.monotone = zs
            .windows(2)
            .all(|w| if map.rising { w[1] > w[0] } else { w[1] < w[0] });
        Ok(map)
    }

    /// `z(v)`.
    pub(crate) fn z(&self, v: f64) -> f64 {
        let b = Basis::at(&self.skin.knots_v, self.skin.degree_v, v);
        b.values()
            .iter()
            .enumerate()
            .map(|(k, w)| w * self.z[b.first + k])
            .sum()
    }

    /// `v_at` refined by Newton from `guess` (falls back to bisection when Newton
    /// leaves the skin or stalls): for many nearby planes.
    pub(crate) fn v_near(&self, c: f64, guess: f64, what: &str) -> Result<f64, BrepError> {
        let mut v = guess.clamp(0.0, 1.0);
        for _ in 0..8 {
            let h = 1e-7;
            let (a, b) = ((v - h).max(0.0), (v + h).min(1.0));
            let dz = (self.z(b) - self.z(a)) / (b - a);
            let f = self.z(v) - c;
            if f.abs() <= 1e-12 * c.abs().max(1.0) {
                return Ok(v);
            }
            if !(dz.abs() > 0.0) {
                break;
            }
            v -= f / dz;
            if !(0.0..=1.0).contains(&v) {
                break;
            }
        }
        self.v_at(c, what)
    }

    /// The `v` where the skin crosses the plane `z = c`, strictly inside the skin
    /// (bisection to 1e-16).
    pub(crate) fn v_at(&self, c: f64, what: &str) -> Result<f64, BrepError> {
        if !self.monotone {
            return Err(bad(
                "control",
                "z along the span",
                "the skin's sections do not advance monotonically along z, so a plane z = const cuts it more than once",
            ));
        }
        let (z0, z1) = (self.z(0.0), self.z(1.0));
        let (lo_z, hi_z) = (z0.min(z1), z0.max(z1));
        let margin = 1e-9 * (hi_z - lo_z);
        if !(c > lo_z + margin && c < hi_z - margin) {
            return Err(BrepError::feature(
                what.to_string(),
                format!("the plane z = {c} mm is not strictly inside the skin's span {lo_z} .. {hi_z} mm"),
                "put split planes and holes between the skin's ends",
            ));
        }
        let (mut a, mut b) = (0.0f64, 1.0f64);
        for _ in 0..64 {
            let m = 0.5 * (a + b);
            if (self.z(m) < c) == self.rising {
                a = m;
            } else {
                b = m;
            }
            if b - a < 1e-16 {
                break;
            }
        }
        Ok(0.5 * (a + b))
    }
}

/// One end of a piece of skin: the skin's own end, or a plane `z = const`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Cut {
    /// The skin's own end (`v = 0` at the low end, `v = 1` at the high end).
    SkinEnd,
    /// The plane `z = ` this value (mm), normal to the span axis.
    Plane(f64),
}

/// The skin faces of a piece, before any feature is cut into them.
pub(crate) struct SkinPiece {
    upper: BSplineSurface<Point3>,
    lower: BSplineSurface<Point3>,
    te: Option<BSplineSurface<Point3>>,
    e_te_u: Edge,
    e_le: Edge,
    e_te_l: Edge,
    low_u: Edge,
    low_l: Edge,
    high_u: Edge,
    high_l: Edge,
    te_low: Option<Edge>,
    te_high: Option<Edge>,
    /// `S_u x S_v` points out of the solid.
    pub outward: bool,
    /// z of the low end (`v` smaller), mm.
    pub z_low: f64,
    /// z of the high end, mm.
    pub z_high: f64,
    /// Inner loops of the upper (0) and lower (1) faces, turning clockwise in the
    /// face's `(u, v)` parameters.
    holes: [Vec<Wire>; 2],
}

/// The `v` where the plane `z = c` cuts `skin`, refused when it lies so close to an
/// inner knot that a STEP file could not tell the two apart.
fn plane_v(skin: &Skin, c: f64, what: &str, planar: f64) -> Result<f64, BrepError> {
    let map = SpanMap::new(skin, planar)?;
    let v = map.v_at(c, what)?;
    let inner = &skin.knots_v[skin.degree_v + 1..skin.knots_v.len() - skin.degree_v - 1];
    if let Some(k) = inner
        .iter()
        .find(|&&k| k != v && (k - v).abs() <= 2.0 * KNOT_MERGE)
    {
        let dz = (map.z(*k) - c).abs();
        return Err(BrepError::feature(
            what.to_string(),
            format!(
                "the plane z = {c} mm lies {dz:.2e} mm from a knot of the skin, too close for a STEP file to tell them apart"
            ),
            format!("move the plane by at least {:.4} mm", 4.0 * dz.max(1e-6)),
        ));
    }
    Ok(v)
}

/// The skin's surface (checked) cut to the span between `low` and `high`.
fn span_surface(
    skin: &Skin,
    low: Cut,
    high: Cut,
    opts: &SkinOptions,
) -> Result<BSplineSurface<Point3>, BrepError> {
    check_skin(skin)?;
    let knots_u = KnotVec::try_from(skin.knots_u.clone()).map_err(|e| bad("knots_u", "", e))?;
    let knots_v = KnotVec::try_from(skin.knots_v.clone()).map_err(|e| bad("knots_v", "", e))?;
    let control: Vec<Vec<Point3>> = skin
        .control
        .iter()
        .map(|row| row.iter().map(pt).collect())
        .collect();
    let mut piece =
        BSplineSurface::try_new((knots_u, knots_v), control).map_err(|e| bad("control", "", e))?;
    let v_of = |cut: Cut, skin_end: f64| match cut {
        Cut::SkinEnd => Ok(skin_end),
        Cut::Plane(c) => plane_v(skin, c, &format!("split plane z = {c} mm"), opts.planar),
    };
    let v_low = v_of(low, 0.0)?;
    let v_high = v_of(high, 1.0)?;
    if !(v_high > v_low) {
        return Err(BrepError::feature(
            "piece",
            format!("its ends {low:?} and {high:?} leave no skin between them"),
            "give the low end below the high end along the skin",
        ));
    }
    if v_high < 1.0 {
        piece.vcut(v_high);
    }
    if v_low > 0.0 {
        piece = piece.vcut(v_low);
    }
    Ok(piece)
}

/// The piece's surface split at the leading edge: `upper` runs from the trailing edge
/// (`u = 0`) to the leading edge, `lower` from the leading edge back to the trailing
/// edge; they share the split row bit for bit, and the trailing-edge row too when
/// `sharp`.
struct Halves {
    upper: BSplineSurface<Point3>,
    lower: BSplineSurface<Point3>,
    sharp: bool,
}

impl Halves {
    /// Splits `piece` at the leading edge (on a knot when one is as close as the
    /// writer's tolerance) and closes a sharp trailing edge.
    fn split(
        skin: &Skin,
        piece: BSplineSurface<Point3>,
        opts: &SkinOptions,
    ) -> Result<Halves, BrepError> {
        let u_le = snap_to_knot(&skin.knots_u, skin.u_le);
        let mut upper = piece;
        let mut lower = upper.ucut(u_le);
        let nu_up = upper.control_points().len();
        let nv = upper.control_points()[0].len();
        // The split row is shared: make it bit-identical in both halves.
        for j in 0..nv {
            *lower.control_point_mut(0, j) = *upper.control_point(nu_up - 1, j);
        }
        let mut halves = Halves {
            upper,
            lower,
            sharp: false,
        };
        halves.sharp = halves.close_trailing_edge(opts)?;
        Ok(halves)
    }

    /// Whether the trailing edge is sharp (then the lower half's trailing-edge row is
    /// made the upper half's); refused when it is sharp at one end only.
    fn close_trailing_edge(&mut self, opts: &SkinOptions) -> Result<bool, BrepError> {
        let (upper, lower) = (&self.upper, &mut self.lower);
        let nu_lo = lower.control_points().len();
        let nv = upper.control_points()[0].len();
        let gap = (0..nv)
            .map(|j| {
                let (a, b) = (upper.control_point(0, j), lower.control_point(nu_lo - 1, j));
                ((a.x - b.x).powi(2) + (a.y - b.y).powi(2) + (a.z - b.z).powi(2)).sqrt()
            })
            .collect::<Vec<_>>();
        let sharp = gap.iter().all(|&g| g <= opts.sharp_te);
        if !sharp && (gap[0] <= opts.sharp_te || gap[nv - 1] <= opts.sharp_te) {
            return Err(bad(
                "control",
                format!(
                    "trailing-edge gap {} mm at the low end, {} mm at the high end",
                    gap[0],
                    gap[nv - 1]
                ),
                "the trailing edge is sharp at one end and blunt elsewhere; make it sharp or blunt \
                 along the whole span",
            ));
        }
        if sharp {
            for j in 0..nv {
                *lower.control_point_mut(nu_lo - 1, j) = *upper.control_point(0, j);
            }
        }
        Ok(sharp)
    }

    /// The control points of both halves at column `j` (an end row of the section).
    fn end_row(&self, j: usize) -> Vec<Point3> {
        let (nu_up, nu_lo) = (
            self.upper.control_points().len(),
            self.lower.control_points().len(),
        );
        (0..nu_up)
            .map(|i| *self.upper.control_point(i, j))
            .chain((0..nu_lo).map(|i| *self.lower.control_point(i, j)))
            .collect()
    }

    /// The planes of both ends and which way the natural normal points.
    fn ends(&self, opts: &SkinOptions) -> Result<Ends, BrepError> {
        let nv = self.upper.control_points()[0].len();
        let low_row = self.end_row(0);
        let high_row = self.end_row(nv - 1);
        let z_low = end_z(&low_row, "control (root-side end row)", opts.planar)?;
        let z_high = end_z(&high_row, "control (tip-side end row)", opts.planar)?;
        if (z_high - z_low).abs() <= opts.planar {
            return Err(bad(
                "control",
                format!("low end z = {z_low} mm, high end z = {z_high} mm"),
                "both ends lie in one plane: the skin has no span",
            ));
        }
        // The natural normal (d/du x d/dv) points outward when the low section runs
        // counter-clockwise seen from +z and the high end lies above the low end.
        let area2: f64 = (0..low_row.len())
            .map(|k| {
                let (a, b) = (low_row[k], low_row[(k + 1) % low_row.len()]);
                a.x * b.y - b.x * a.y
            })
            .sum();
        if area2.abs() < f64::EPSILON * 1e3 {
            return Err(bad(
                "control",
                "low end section",
                "the section encloses no area; check the section points",
            ));
        }
        Ok(Ends {
            z_low,
            z_high,
            outward: area2 * (z_high - z_low) > 0.0,
        })
    }
}

/// The ends of a piece: their planes and the sense of the skin's natural normal.
struct Ends {
    /// z of the low end, mm.
    z_low: f64,
    /// z of the high end, mm.
    z_high: f64,
    /// `S_u x S_v` points out of the solid.
    outward: bool,
}

/// The boundary edges of the skin faces (see [`SkinPiece`]) and the ruled
/// trailing-edge face when the trailing edge is blunt.
struct Boundary {
    e_te_u: Edge,
    e_le: Edge,
    e_te_l: Edge,
    low_u: Edge,
    low_l: Edge,
    high_u: Edge,
    high_l: Edge,
    te: Option<TrailingFace>,
}

/// The ruled face of a blunt trailing edge and its edges across the ends.
struct TrailingFace {
    surface: BSplineSurface<Point3>,
    low: Edge,
    high: Edge,
}

impl Boundary {
    /// The edges along the trailing edge(s), the leading edge and both ends; the
    /// trailing-edge face when the edge is blunt.
    fn new(h: &Halves) -> Result<Boundary, BrepError> {
        let (upper, lower, sharp) = (&h.upper, &h.lower, h.sharp);
        let (lu, ll) = (
            upper.control_points().len() - 1,
            lower.control_points().len() - 1,
        );
        let lv = upper.control_points()[0].len() - 1;
        let te_u_r = Vertex::new(*upper.control_point(0, 0));
        let te_u_t = Vertex::new(*upper.control_point(0, lv));
        let le_r = Vertex::new(*upper.control_point(lu, 0));
        let le_t = Vertex::new(*upper.control_point(lu, lv));
        let (te_l_r, te_l_t) = if sharp {
            (te_u_r.clone(), te_u_t.clone())
        } else {
            (
                Vertex::new(*lower.control_point(ll, 0)),
                Vertex::new(*lower.control_point(ll, lv)),
            )
        };
        let bs = Curve::BSplineCurve;
        let e_te_u = curve_edge(&te_u_r, &te_u_t, bs(upper.column_curve(0)))?;
        let e_le = curve_edge(&le_r, &le_t, bs(upper.column_curve(lu)))?;
        let e_te_l = if sharp {
            e_te_u.clone()
        } else {
            curve_edge(&te_l_r, &te_l_t, bs(lower.column_curve(ll)))?
        };
        let low_u = curve_edge(&te_u_r, &le_r, bs(upper.row_curve(0)))?;
        let high_u = curve_edge(&te_u_t, &le_t, bs(upper.row_curve(lv)))?;
        let low_l = curve_edge(&le_r, &te_l_r, bs(lower.row_curve(0)))?;
        let high_l = curve_edge(&le_t, &te_l_t, bs(lower.row_curve(lv)))?;
        let te = if sharp {
            None
        } else {
            // Ruled trailing-edge face: u from the lower curve to the upper one.
            let surface = BSplineSurface::try_new(
                (KnotVec::bezier_knot(1), lower.vknot_vec().clone()),
                vec![
                    lower.control_points()[ll].clone(),
                    upper.control_points()[0].clone(),
                ],
            )
            .map_err(|e| bad("control", "trailing edge", e))?;
            Some(TrailingFace {
                surface,
                low: line_edge(&te_l_r, &te_u_r)?,
                high: line_edge(&te_l_t, &te_u_t)?,
            })
        };
        Ok(Boundary {
            e_te_u,
            e_le,
            e_te_l,
            low_u,
            low_l,
            high_u,
            high_l,
            te,
        })
    }
}

impl SkinPiece {
    /// The piece of `skin` between `low` (the end at smaller `v`) and `high`.
    pub(crate) fn new(
        skin: &Skin,
        low: Cut,
        high: Cut,
        opts: &SkinOptions,
    ) -> Result<SkinPiece, BrepError> {
        let piece = span_surface(skin, low, high, opts)?;
        let halves = Halves::split(skin, piece, opts)?;
        let ends = halves.ends(opts)?;
        let b = Boundary::new(&halves)?;
        let (te, te_low, te_high) = match b.te {
            Some(t) => (Some(t.surface), Some(t.low), Some(t.high)),
            None => (None, None, None),
        };
        Ok(SkinPiece {
            upper: halves.upper,
            lower: halves.lower,
            te,
            e_te_u: b.e_te_u,
            e_le: b.e_le,
            e_te_l: b.e_te_l,
            low_u: b.low_u,
            low_l: b.low_l,
            high_u: b.high_u,
            high_l: b.high_l,
            te_low,
            te_high,
            outward: ends.outward,
            z_low: ends.z_low,
            z_high: ends.z_high,
            holes: [Vec::new(), Vec::new()],
        })
    }

    /// The closed loop of edges around the low end (in no particular sense).
    pub(crate) fn low_loop(&self) -> Wire {
        let mut w = vec![self.low_u.clone(), self.low_l.clone()];
        w.extend(self.te_low.clone());
        Wire::from(w)
    }

    /// The closed loop of edges around the high end (in no particular sense).
    pub(crate) fn high_loop(&self) -> Wire {
        let mut w = vec![self.high_u.clone(), self.high_l.clone()];
        w.extend(self.te_high.clone());
        Wire::from(w)
    }

    /// Unit vector along +z when the high end lies above the low end, else -z: the low
    /// end faces against it, the high end along it.
    pub(crate) fn span_sign(&self) -> f64 {
        if self.z_high > self.z_low {
            1.0
        } else {
            -1.0
        }
    }

    /// Adds an inner loop to the upper (`0`) or lower (`1`) face; it must turn
    /// clockwise in the face's `(u, v)` parameters.
    pub(crate) fn add_hole(&mut self, side: usize, w: Wire) {
        self.holes[side].push(w);
    }

    /// The faces, every one facing out of the solid.
    pub(crate) fn faces(self) -> Result<Vec<Face>, BrepError> {
        let face = |mut loops: Vec<Wire>, holes: &[Wire], s: Surface| {
            loops.extend(holes.iter().cloned());
            let mut f = Face::try_new(loops, s).map_err(BrepError::kernel("face"))?;
            if !self.outward {
                f.invert();
            }
            Ok::<Face, BrepError>(f)
        };
        // Loops run counter-clockwise in each face's (u, v) parameter plane.
        let mut faces = vec![
            face(
                vec![Wire::from(vec![
                    self.low_u.clone(),
                    self.e_le.clone(),
                    self.high_u.inverse(),
                    self.e_te_u.inverse(),
                ])],
                &self.holes[0],
                Surface::BSplineSurface(self.upper.clone()),
            )?,
            face(
                vec![Wire::from(vec![
                    self.low_l.clone(),
                    self.e_te_l.clone(),
                    self.high_l.inverse(),
                    self.e_le.inverse(),
                ])],
                &self.holes[1],
                Surface::BSplineSurface(self.lower.clone()),
            )?,
        ];
        if let (Some(ruled), Some(te_low), Some(te_high)) = (&self.te, &self.te_low, &self.te_high)
        {
            faces.push(face(
                vec![Wire::from(vec![
                    te_low.clone(),
                    self.e_te_u.clone(),
                    te_high.inverse(),
                    self.e_te_l.inverse(),
                ])],
                &[],
                Surface::BSplineSurface(ruled.clone()),
            )?);
        }
        Ok(faces)
    }
}
