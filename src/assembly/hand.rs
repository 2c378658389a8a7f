//! Rotation sense and flow side, checked on the finished mesh.
//!
//! The check reads the geometry only, never the design's flags, so a blade built or
//! mirrored the wrong way is caught. At each radius the blade mesh is cut by the plane
//! across its span (in the blade's own frame, undoing the assembly's rigid transform;
//! the mesh stage's slicer, [`crate::mesh::slice::segments`]); in the cut:
//!
//! * the **chord** joins the two cut points farthest apart;
//! * the **leading edge** is the chord end nearer the section's greatest thickness
//!   (airfoils are thickest ahead of mid-chord: NACA 4-digit sections at 30 % chord,
//!   Abbott and von Doenhoff, *Theory of Wing Sections*, 1959, section 6.4);
//! * the **camber** is the mean of the mid-points between upper and lower surface along
//!   the chord, measured from the chord line; the side it bulges toward is the suction
//!   side (positive camber lifts toward the convex side).
//!
//! The leading edge must point along the blade's motion (`omega x r`, omega along -y for
//! a counter-clockwise rotor seen from upstream, +y for clockwise), and the suction side
//! must face downstream (+y) for a turbine (pressure side to the wind) or upstream for a
//! propeller or fan. Symmetric sections have no camber; their flow side is reported as
//! undetermined rather than passed or failed.

use super::rotor::RotorSpec;
use crate::design::{Flow, Rotation};
use crate::mesh::{slice, TriMesh};
use nalgebra::{Matrix4, Point2, Point3, Vector2, Vector3};
use std::fmt;

/// Tolerances of [`check_hand`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HandOptions {
    /// The leading edge leads when the cosine between its direction and the motion
    /// exceeds this. Default `0.0` (any angle under 90 degrees).
    pub min_lead: f64,
    /// Mean camber (fraction of chord) below which the flow side is undetermined.
    /// Default `0.005`.
    pub min_camber: f64,
}

impl HandOptions {
    /// The defaults (see the fields).
    pub const DEFAULT: HandOptions = HandOptions {
        min_lead: 0.0,
        min_camber: 0.005,
    };
}

impl Default for HandOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// The flow side found at one station.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Side {
    /// The pressure side faces the way the mode needs.
    Right,
    /// The pressure side faces the wrong way.
    Wrong,
    /// The section is (nearly) symmetric or edge-on to the flow: no side to tell.
    Undetermined,
}

/// What the cut at one radius shows.
#[derive(Debug, Clone, PartialEq)]
pub struct StationHand {
    /// Radius along the blade's span, mm.
    pub radius: f64,
    /// Chord measured on the cut, mm (0 when the plane misses the blade).
    pub chord: f64,
    /// Cosine between the leading-edge direction and the motion (1 = leads squarely).
    pub lead: f64,
    /// Mean camber toward downstream, fraction of chord (positive: suction side
    /// downstream).
    pub camber_downstream: f64,
    /// The flow side.
    pub side: Side,
}

/// The graded result of [`check_hand`]: every station, and the indices (into
/// [`HandReport::stations`]) that fail.
#[derive(Debug, Clone, PartialEq)]
pub struct HandReport {
    /// Rotation sense checked against.
    pub rotation: Rotation,
    /// Flow mode checked against.
    pub flow: Flow,
    /// One entry per radius asked for.
    pub stations: Vec<StationHand>,
    /// Stations whose leading edge trails.
    pub trailing: Vec<usize>,
    /// Stations whose pressure side faces the wrong way.
    pub wrong_side: Vec<usize>,
    /// Stations whose flow side could not be told (symmetric sections).
    pub undetermined: Vec<usize>,
    /// Radii where the plane missed the blade.
    pub missed: Vec<usize>,
}

impl HandReport {
    /// True when no station trails, faces the wrong way or was missed.
    pub fn is_ok(&self) -> bool {
        self.trailing.is_empty() && self.wrong_side.is_empty() && self.missed.is_empty()
    }
}

fn radii_list(stations: &[StationHand], idx: &[usize]) -> String {
    idx.iter()
        .map(|&i| format!("#{i} (r = {:.1} mm)", stations[i].radius))
        .collect::<Vec<_>>()
        .join(", ")
}

impl fmt::Display for HandReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let n = self.stations.len();
        if self.is_ok() {
            write!(
                f,
                "rotation sense and flow side: ok at {} of {n} stations",
                n - self.undetermined.len()
            )?;
        } else {
            write!(f, "rotation sense and flow side: FAILED")?;
        }
        if !self.trailing.is_empty() {
            write!(
                f,
                "\n  leading edge trails the motion at {}: the blade is mirrored for this rotation sense; check [blade] rotation",
                radii_list(&self.stations, &self.trailing)
            )?;
        }
        if !self.wrong_side.is_empty() {
            let want = match self.flow {
                Flow::Turbine => "upstream (turbine)",
                Flow::Propeller => "downstream (propeller or fan)",
            };
            write!(
                f,
                "\n  pressure side does not face {want} at {}: check [blade] flow",
                radii_list(&self.stations, &self.wrong_side)
            )?;
        }
        if !self.missed.is_empty() {
            write!(
                f,
                "\n  no section cut at {}",
                radii_list(&self.stations, &self.missed)
            )?;
        }
        if !self.undetermined.is_empty() {
            write!(
                f,
                "\n  note: symmetric section, flow side not told at {}",
                radii_list(&self.stations, &self.undetermined)
            )?;
        }
        Ok(())
    }
}

/// Radii to check on a blade: the design's stations strictly inside the span and the
/// midpoints between neighbouring stations, mm.
pub fn hand_radii(stations: &[f64]) -> Vec<f64> {
    let mut out = Vec::new();
    for (i, w) in stations.windows(2).enumerate() {
        if i > 0 {
            out.push(w[0]);
        }
        out.push(0.5 * (w[0] + w[1]));
    }
    out
}

/// Checks, on `mesh` placed by the rigid transform `frame` (blade frame to rotor
/// coordinates; the identity for a blade on its own), that at every radius in `radii`
/// (mm along the span) the leading edge leads for `rotation` and the pressure side
/// faces the right way for `flow`.
pub fn check_hand(
    mesh: &TriMesh,
    frame: &Matrix4<f64>,
    radii: &[f64],
    rotation: Rotation,
    flow: Flow,
    opts: &HandOptions,
) -> HandReport {
    let inv = frame.try_inverse().unwrap_or_else(Matrix4::identity);
    let local = mesh.transformed(&inv);
    let omega = match rotation {
        Rotation::Ccw => -Vector3::y(),
        Rotation::Cw => Vector3::y(),
    };
    let omega = inv.transform_vector(&omega);
    let axis_point = inv.transform_point(&Point3::origin());
    let flow_dir = inv.transform_vector(&Vector3::y());
    let flow2 = Vector2::new(flow_dir.x, flow_dir.y);
    let mut report = HandReport {
        rotation,
        flow,
        stations: Vec::new(),
        trailing: Vec::new(),
        wrong_side: Vec::new(),
        undetermined: Vec::new(),
        missed: Vec::new(),
    };
    // Every plane cut in one pass over the mesh.
    let cuts = slice::segments_many(&local, radii);
    for ((i, &r), segs) in radii.iter().enumerate().zip(cuts) {
        let Some(st) = station(&segs, r, &omega, &axis_point, &flow2, flow, opts) else {
            report.stations.push(StationHand {
                radius: r,
                chord: 0.0,
                lead: 0.0,
                camber_downstream: 0.0,
                side: Side::Undetermined,
            });
            report.missed.push(i);
            continue;
        };
        if st.lead <= opts.min_lead {
            report.trailing.push(i);
        }
        match st.side {
            Side::Wrong => report.wrong_side.push(i),
            Side::Undetermined => report.undetermined.push(i),
            Side::Right => {}
        }
        report.stations.push(st);
    }
    report
}

/// Thickness and mid-line of a slice across its chord (from `origin` along `e`, `chord`
/// long) at 5 % steps.
struct Profile {
    /// Chord fraction of the thickest step.
    s_thick: f64,
    /// Sum of the mid-line offsets along the chord's normal, mm.
    mean_sum: f64,
    /// Steps with both surfaces found.
    mean_n: usize,
}

fn profile(segs: &[[Point2<f64>; 2]], origin: Point2<f64>, e: Vector2<f64>, chord: f64) -> Profile {
    let nrm = Vector2::new(-e.y, e.x);
    let (mut thickest, mut s_thick, mut mean_sum, mut mean_n) = (0.0, 0.5, 0.0, 0);
    for k in 1..20 {
        let s = chord * k as f64 / 20.0;
        let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
        for [p, q] in segs {
            let (sp, sq) = ((p - origin).dot(&e), (q - origin).dot(&e));
            if (sp - s) * (sq - s) < 0.0 || (sp == s && sq != s) {
                let w = (s - sp) / (sq - sp);
                let t = (p + (q - p) * w - origin).dot(&nrm);
                lo = lo.min(t);
                hi = hi.max(t);
            }
        }
        if hi > lo {
            if hi - lo > thickest {
                thickest = hi - lo;
                s_thick = k as f64 / 20.0;
            }
            mean_sum += 0.5 * (hi + lo);
            mean_n += 1;
        }
    }
    Profile {
        s_thick,
        mean_sum,
        mean_n,
    }
}

fn station(
    segs: &[[Point2<f64>; 2]],
    r: f64,
    omega: &Vector3<f64>,
    axis_point: &Point3<f64>,
    flow2: &Vector2<f64>,
    flow: Flow,
    opts: &HandOptions,
) -> Option<StationHand> {
    if segs.len() < 3 {
        return None;
    }
    let pts: Vec<Point2<f64>> = segs.iter().flatten().copied().collect();
    let (mut best, mut a, mut b) = (0.0, pts[0], pts[0]);
    for (i, p) in pts.iter().enumerate() {
        for q in &pts[i + 1..] {
            let d = (p - q).norm_squared();
            if d > best {
                (best, a, b) = (d, *p, *q);
            }
        }
    }
    let chord = best.sqrt();
    if chord <= 0.0 {
        return None;
    }
    // The farthest pair gives the ends; the thick end is the leading edge.
    let first = profile(segs, a, (b - a) / chord, chord);
    let (le, te) = if first.s_thick <= 0.5 { (a, b) } else { (b, a) };
    // A blunt trailing edge: the farthest point is one of its two corners. The chord runs
    // to the middle of the trailing-edge face (the other corner is the point farthest
    // across the chord within 1 % of chord along it), so an opened trailing edge does not
    // tilt the chord and fake camber; a knife edge has no face and keeps its point.
    let e0 = (te - le) / chord;
    let across0 = Vector2::new(-e0.y, e0.x);
    let other = pts
        .iter()
        .filter(|p| (*p - te).dot(&e0).abs() < 0.01 * chord)
        .max_by(|p, q| {
            let d = |x: &Point2<f64>| (x - te).dot(&across0).abs();
            d(p).total_cmp(&d(q))
        })
        .copied()
        .unwrap_or(te);
    let te_mid = te + (other - te) * 0.5;
    let chord = (te_mid - le).norm();
    if chord <= 0.0 {
        return None;
    }
    let e = (te_mid - le) / chord;
    let nrm = Vector2::new(-e.y, e.x);
    let prof = profile(segs, le, e, chord);
    let (a, b) = (le, te_mid);
    let centre = Point3::new(0.5 * (a.x + b.x), 0.5 * (a.y + b.y), r);
    let v = omega.cross(&(centre - axis_point));
    let v2 = Vector2::new(v.x, v.y);
    let lead = if v2.norm() > 0.0 {
        (le - te).normalize().dot(&v2.normalize())
    } else {
        0.0
    };
    let camber = if prof.mean_n > 0 {
        prof.mean_sum / prof.mean_n as f64 / chord
    } else {
        0.0
    };
    let across = if flow2.norm() > 0.0 {
        nrm.dot(&flow2.normalize())
    } else {
        0.0
    };
    let camber_downstream = camber * across;
    let side = if camber.abs() < opts.min_camber || across.abs() < 0.1 {
        Side::Undetermined
    } else {
        let suction_downstream = camber_downstream > 0.0;
        let wanted = matches!(flow, Flow::Turbine);
        if suction_downstream == wanted {
            Side::Right
        } else {
            Side::Wrong
        }
    };
    Some(StationHand {
        radius: r,
        chord,
        lead,
        camber_downstream,
        side,
    })
}

/// Words for the user on how the rotor turns and which way its blades face, e.g.
/// "3 blades, 120 degrees apart; turns counter-clockwise seen from upstream (from the
/// side the wind comes from); leading edges lead; pressure sides face the wind".
pub fn hand_description(spec: &RotorSpec, rotation: Rotation, flow: Flow) -> String {
    let sense = match rotation {
        Rotation::Ccw => "counter-clockwise",
        Rotation::Cw => "clockwise",
    };
    let (from, sides) = match flow {
        Flow::Turbine => (
            "from the side the wind comes from",
            "pressure sides face the wind, suction sides face downwind",
        ),
        Flow::Propeller => (
            "from the side the air is drawn from",
            "suction sides face upstream, pressure sides push the air downstream",
        ),
    };
    let spacing = 360.0 / f64::from(spec.blades.max(1));
    let blades = if spec.blades == 1 {
        "1 blade".to_string()
    } else {
        let spacing = if spacing.fract() == 0.0 {
            format!("{spacing:.0}")
        } else {
            format!("{spacing:.2}")
        };
        format!("{} blades, {spacing} degrees apart", spec.blades)
    };
    format!("{blades}; turns {sense} seen from upstream ({from}); leading edges lead; {sides}")
}
