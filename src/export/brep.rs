//! The exact closed solid of a blade skin, as a truck B-rep: the skin split at the leading
//! edge into an upper and a lower B-spline face, a ruled trailing-edge face when the
//! trailing edge is blunt, and planar root and tip caps.

use super::ExportError;
use crate::loft::Skin;
use truck_modeling::{
    BSplineSurface, Curve, Edge, Face, KnotVec, Line, Plane, Point3, Shell, ShellCondition, Solid,
    Surface, Vertex, Wire,
};

/// Tolerances of [`step_solid_with`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BrepOptions {
    /// Largest distance (mm) between the upper and lower trailing-edge curves' control
    /// points for the trailing edge to count as sharp (one shared edge, no trailing-edge
    /// face). Default 1e-6 mm.
    pub sharp_te: f64,
    /// Largest spread (mm) of the root (tip) boundary's control points in z for the cap to
    /// count as planar. Default 1e-6 mm.
    pub planar: f64,
}

impl BrepOptions {
    /// The defaults: 1e-6 mm for both.
    pub const DEFAULT: BrepOptions = BrepOptions {
        sharp_te: 1e-6,
        planar: 1e-6,
    };
}

impl Default for BrepOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// [`step_solid_with`] with [`BrepOptions::DEFAULT`].
///
/// # Errors
/// See [`step_solid_with`].
pub fn step_solid(skin: &Skin) -> Result<Solid, ExportError> {
    step_solid_with(skin, &BrepOptions::DEFAULT)
}

fn bad(key: &'static str, value: impl ToString, problem: impl ToString) -> ExportError {
    ExportError::BadSkin {
        key,
        value: value.to_string(),
        problem: problem.to_string(),
        fix: "rebuild the skin with the lofter (clamped knots on [0, 1], sections in planes z = const)",
    }
}

fn brep(what: &'static str) -> impl Fn(truck_topology::errors::Error) -> ExportError {
    move |e| ExportError::Brep {
        what,
        detail: e.to_string(),
    }
}

/// Checks the structure of a skin: degrees, knot counts, clamping, monotone knots,
/// finite control points, `0 < u_le < 1`.
fn check_skin(skin: &Skin) -> Result<(), ExportError> {
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

fn pt(p: &nalgebra::Point3<f64>) -> Point3 {
    Point3::new(p.x, p.y, p.z)
}

/// The z of a boundary row of control points, checked for planarity.
fn cap_z(row: &[Point3], key: &'static str, tol: f64) -> Result<f64, ExportError> {
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

/// Builds the closed solid bounded by `skin`:
///
/// * the skin split at `u_le` into an upper face (`0 <= u <= u_le`) and a lower face
///   (`u_le <= u <= 1`), sharing the leading-edge curve (truck refuses closed edges);
/// * when the curves `u = 0` and `u = 1` differ by more than `opts.sharp_te` anywhere, a
///   ruled trailing-edge face between them; otherwise both skin faces share one
///   trailing-edge edge;
/// * planar root and tip caps bounded by the curves `v = 0` and `v = 1` (and the straight
///   trailing-edge segments when blunt).
///
/// Faces face outward whichever way the sections run (counter-clockwise or, after a
/// mirror, clockwise) and whichever end is the root: the sign of the root section's
/// control-polygon area times the root-to-tip z step decides. The kernel's own check
/// must grade the shell [`ShellCondition::Closed`].
///
/// # Errors
/// [`ExportError::BadSkin`] for a malformed skin (named field and value), a non-planar
/// cap, a trailing edge sharp at one end only, or root and tip in one plane;
/// [`ExportError::Brep`] when the kernel refuses the result.
pub fn step_solid_with(skin: &Skin, opts: &BrepOptions) -> Result<Solid, ExportError> {
    check_skin(skin)?;
    let knots_u = KnotVec::try_from(skin.knots_u.clone()).map_err(|e| bad("knots_u", "", e))?;
    let knots_v = KnotVec::try_from(skin.knots_v.clone()).map_err(|e| bad("knots_v", "", e))?;
    let control: Vec<Vec<Point3>> = skin
        .control
        .iter()
        .map(|row| row.iter().map(pt).collect())
        .collect();
    let full = BSplineSurface::try_new((knots_u, knots_v.clone()), control)
        .map_err(|e| bad("control", "", e))?;
    let mut upper = full;
    let mut lower = upper.ucut(skin.u_le);
    let nu_up = upper.control_points().len();
    let nu_lo = lower.control_points().len();
    let nv = upper.control_points()[0].len();
    // The split row is shared: make it bit-identical in both halves.
    for j in 0..nv {
        *lower.control_point_mut(0, j) = *upper.control_point(nu_up - 1, j);
    }
    // Sharp or blunt trailing edge.
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
                "trailing-edge gap {} mm at the root, {} mm at the tip",
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
    let root_row: Vec<Point3> = (0..nu_up)
        .map(|i| *upper.control_point(i, 0))
        .chain((0..nu_lo).map(|i| *lower.control_point(i, 0)))
        .collect();
    let tip_row: Vec<Point3> = (0..nu_up)
        .map(|i| *upper.control_point(i, nv - 1))
        .chain((0..nu_lo).map(|i| *lower.control_point(i, nv - 1)))
        .collect();
    let z_root = cap_z(&root_row, "control (root row, v = 0)", opts.planar)?;
    let z_tip = cap_z(&tip_row, "control (tip row, v = 1)", opts.planar)?;
    if (z_tip - z_root).abs() <= opts.planar {
        return Err(bad(
            "control",
            format!("root z = {z_root} mm, tip z = {z_tip} mm"),
            "root and tip lie in one plane: the skin has no span",
        ));
    }
    // Outward test: the natural normal (d/du x d/dv) points outward when the root
    // section runs counter-clockwise seen from +z and the tip lies above the root.
    let area2: f64 = (0..root_row.len())
        .map(|k| {
            let (a, b) = (root_row[k], root_row[(k + 1) % root_row.len()]);
            a.x * b.y - b.x * a.y
        })
        .sum();
    if area2.abs() < f64::EPSILON * 1e3 {
        return Err(bad(
            "control",
            "root section",
            "the root section encloses no area; check the section points",
        ));
    }
    let outward = area2 * (z_tip - z_root) > 0.0;

    // Vertices.
    let (lu, ll, lv) = (nu_up - 1, nu_lo - 1, nv - 1);
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
    let edge = |a: &Vertex, b: &Vertex, c: Curve| Edge::try_new(a, b, c).map_err(brep("edge"));
    let bs = Curve::BSplineCurve;
    // Span-wise edges (root -> tip) and section-wise edges (along u).
    let e_te_u = edge(&te_u_r, &te_u_t, bs(upper.column_curve(0)))?;
    let e_le = edge(&le_r, &le_t, bs(upper.column_curve(lu)))?;
    let e_te_l = if sharp {
        e_te_u.clone()
    } else {
        edge(&te_l_r, &te_l_t, bs(lower.column_curve(ll)))?
    };
    let e_root_u = edge(&te_u_r, &le_r, bs(upper.row_curve(0)))?;
    let e_tip_u = edge(&te_u_t, &le_t, bs(upper.row_curve(lv)))?;
    let e_root_l = edge(&le_r, &te_l_r, bs(lower.row_curve(0)))?;
    let e_tip_l = edge(&le_t, &te_l_t, bs(lower.row_curve(lv)))?;

    let face = |edges: Vec<Edge>, s: Surface| {
        Face::try_new(vec![Wire::from(edges)], s).map_err(brep("face"))
    };
    let mut faces = Vec::with_capacity(5);
    // Loops run counter-clockwise in each face's (u, v) parameter plane.
    faces.push(face(
        vec![
            e_root_u.clone(),
            e_le.clone(),
            e_tip_u.inverse(),
            e_te_u.inverse(),
        ],
        Surface::BSplineSurface(upper.clone()),
    )?);
    faces.push(face(
        vec![
            e_root_l.clone(),
            e_te_l.clone(),
            e_tip_l.inverse(),
            e_le.inverse(),
        ],
        Surface::BSplineSurface(lower.clone()),
    )?);
    let z = |zz: f64| Point3::new(0.0, 0.0, zz);
    let (ex, ey) = (
        truck_modeling::Vector3::unit_x(),
        truck_modeling::Vector3::unit_y(),
    );
    // Each cap's plane must face the way its loop runs (right-hand rule). The root loop
    // runs clockwise seen from +z when the sections run counter-clockwise: normal -z
    // (y x x) at the root, +z (x x y) at the tip; the other way round for clockwise
    // sections. The final inversion below then turns every face outward.
    let down = |zz: f64| Plane::new(z(zz), z(zz) + ey, z(zz) + ex);
    let up = |zz: f64| Plane::new(z(zz), z(zz) + ex, z(zz) + ey);
    let (root_plane, tip_plane) = if area2 > 0.0 {
        (down(z_root), up(z_tip))
    } else {
        (up(z_root), down(z_tip))
    };
    if sharp {
        faces.push(face(
            vec![e_root_u.inverse(), e_root_l.inverse()],
            Surface::Plane(root_plane),
        )?);
        faces.push(face(
            vec![e_tip_u.clone(), e_tip_l.clone()],
            Surface::Plane(tip_plane),
        )?);
    } else {
        let e_te_root = edge(
            &te_l_r,
            &te_u_r,
            Curve::Line(Line(te_l_r.point(), te_u_r.point())),
        )?;
        let e_te_tip = edge(
            &te_l_t,
            &te_u_t,
            Curve::Line(Line(te_l_t.point(), te_u_t.point())),
        )?;
        // Ruled trailing-edge face: u from the lower curve to the upper one.
        let ruled = BSplineSurface::try_new(
            (KnotVec::bezier_knot(1), lower.vknot_vec().clone()),
            vec![
                lower.control_points()[ll].clone(),
                upper.control_points()[0].clone(),
            ],
        )
        .map_err(|e| bad("control", "trailing edge", e))?;
        faces.push(face(
            vec![
                e_te_root.clone(),
                e_te_u.clone(),
                e_te_tip.inverse(),
                e_te_l.inverse(),
            ],
            Surface::BSplineSurface(ruled),
        )?);
        faces.push(face(
            vec![e_root_u.inverse(), e_te_root.inverse(), e_root_l.inverse()],
            Surface::Plane(root_plane),
        )?);
        faces.push(face(
            vec![e_tip_u.clone(), e_tip_l.clone(), e_te_tip.clone()],
            Surface::Plane(tip_plane),
        )?);
    }
    if !outward {
        for f in &mut faces {
            f.invert();
        }
    }
    let shell: Shell = faces.into();
    let grade = shell.shell_condition();
    if grade != ShellCondition::Closed {
        return Err(ExportError::Brep {
            what: "shell",
            detail: format!("the kernel grades it {grade:?}, not Closed"),
        });
    }
    Solid::try_new(vec![shell]).map_err(brep("solid"))
}
