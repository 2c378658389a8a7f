//! Where the skin's rings go along the span, so that the skin follows the blade the design
//! describes within a set share of the tolerance, and how far it is from it.
//!
//! The skin ([`crate::loft::Skin`]) interpolates placed sections ("rings",
//! [`Blade::ring`]); between rings it is a cubic spline along the span, while the blade
//! model is the design's own law (monotone cubic between stations, the root transition,
//! the elliptic round tip). Where sections change fast (a chord stepping between close
//! stations, a tip closing), a spline through widely spaced rings strays from that law.
//!
//! **Placement.** Rings start at every station and every region boundary, with even
//! steps of at most a sixteenth of the span between them ([`Blade::ring_radii`]); then,
//! round after round, the skin's spanwise curves through the section points (which are
//! the skin's points at the section parameters, [`SpanCurves`]) are built and compared
//! with the blade model at the midpoint of every ring interval, and every interval where
//! the two differ by more than [`SHARE`] of the tolerance is cut in two, or in four or
//! eight where it strays far more (`pieces_for`), until none does.
//!
//! **Skin-to-design distance** ([`skin_to_design`]): at a radius `r`, every section point
//! `k` of the blade model, `Blade::ring(r).points[k]`, against the skin point with the
//! same section parameter on the skin's cut at `z = r` (the skin's cross-sections are
//! planar: every ring lies in its plane `z = r`, so the skin's `z` depends on `v` alone).
//! The largest such distance over the midpoints and quarter points of every ring
//! interval is reported ([`place_rings`] measures it on the skin's spanwise curves,
//! [`SpanCurves`], which pass through exactly those skin points, while it builds the
//! skin); at the rings themselves the skin passes through the model's
//! points exactly. The mesh then only needs to stay within the rest of the tolerance of
//! the skin ([`RingPlacement::mesh_tolerance`]), so that the distance from the mesh to
//! the design, at most mesh-to-skin plus skin-to-design, stays within the tolerance.

use crate::blade::Blade;
use crate::loft::{
    eval_curve, section_parameters, span_parameters, Basis, LoftError, Skin, SpanCurves,
};
use nalgebra::Point3;
use rayon::prelude::*;
use std::collections::HashMap;

/// Share of the tolerance the skin may stray from the blade model.
pub const SHARE: f64 = 0.1;
/// Most rings placed (placement stops there; the measured distance says how close it
/// came).
pub const MAX_RINGS: usize = 4096;
/// Rounds of interval halving.
const MAX_ROUNDS: usize = 24;
/// Shortest ring interval, as a fraction of the span: at a kink of the design's law
/// (the shank meeting the transition, say) no spline through rings follows the corner,
/// and halving would go on to rings a few nanometres apart, whose knots an exact-solid
/// file cannot tell apart (the B-rep checks refuse knots closer than 1e-6 of the
/// parameter range). The distance left there is measured and reported.
const MIN_INTERVAL: f64 = 1e-5;
/// Where each ring interval is compared with the model when measuring, as fractions of
/// the interval.
const PROBES: [f64; 3] = [0.25, 0.5, 0.75];
/// Where each ring interval is compared with the model while placing rings.
const PLACING: [f64; 1] = [0.5];

/// Rings placed for a tolerance, with the skin through them.
#[derive(Debug, Clone)]
pub struct RingPlacement {
    /// Ring radii, root to tip, mm.
    pub radii: Vec<f64>,
    /// The skin interpolating the rings.
    pub skin: Skin,
    /// The measured skin-to-design distance.
    pub skin_to_design: SkinToDesign,
}

impl RingPlacement {
    /// The tolerance left for the mesh against the skin: `tolerance` minus the measured
    /// skin-to-design distance (at least half the tolerance).
    pub fn mesh_tolerance(&self, tolerance: f64) -> f64 {
        (tolerance - self.skin_to_design.max).max(0.5 * tolerance)
    }
}

/// How far the skin is from the blade model (see the module docs), mm.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct SkinToDesign {
    /// Largest distance found.
    pub max: f64,
    /// Radius where it was found, mm.
    pub at_radius: f64,
    /// Radii compared.
    pub radii_compared: usize,
}

/// The skin's cut at `z = r`: its `v` parameter, found between the two rings around `r`
/// (the skin's `z` passes through each ring's radius at the ring's `v`) by regula falsi
/// with the Illinois modification (M. Dowell & P. Jarratt, "A modified regula falsi
/// method for computing the root of an equation", BIT 11, 1971), which keeps the root
/// bracketed like bisection and converges superlinearly on the smooth, nearly linear
/// `z(v)`: a handful of evaluations instead of bisection's fifty. `z` is the curve of
/// knots, degree and control points `zc` (any spanwise curve of the skin: every ring is
/// planar). Stops once `z` is within `1e-12 r` of `r` (nanometres on a metre-long
/// blade) or the bracket cannot shrink.
fn v_at(zc: (&[f64], usize, &[Point3<f64>]), vbar: &[f64], radii: &[f64], r: f64) -> f64 {
    let (knots, q, control) = zc;
    let off = |v: f64| eval_curve(control, &Basis::at(knots, q, v)).z - r;
    let i = radii.partition_point(|&x| x <= r).clamp(1, radii.len() - 1) - 1;
    let (mut lo, mut hi) = (vbar[i], vbar[i + 1]);
    let (mut f_lo, mut f_hi) = (off(lo), off(hi));
    let close = 1e-12 * r.abs().max(1.0);
    if f_lo.abs() <= close {
        return lo;
    }
    if f_hi.abs() <= close {
        return hi;
    }
    // Which end moved last (-1 low, +1 high, 0 neither): when one end moves twice in a
    // row, the other end's value is halved, so that it moves too.
    let mut moved = 0;
    for _ in 0..100 {
        let mut v = if f_lo.is_finite() && f_hi.is_finite() && f_lo * f_hi < 0.0 {
            lo - f_lo * (hi - lo) / (f_hi - f_lo)
        } else {
            0.5 * (lo + hi)
        };
        if !(v > lo && v < hi) {
            v = 0.5 * (lo + hi);
            if !(v > lo && v < hi) {
                break; // lo and hi are neighbouring numbers
            }
        }
        let f = off(v);
        if f.abs() <= close {
            return v;
        }
        if (f < 0.0) == (f_lo < 0.0) {
            (lo, f_lo) = (v, f);
            if moved == -1 {
                f_hi *= 0.5;
            }
            moved = -1;
        } else {
            (hi, f_hi) = (v, f);
            if moved == 1 {
                f_lo *= 0.5;
            }
            moved = 1;
        }
    }
    0.5 * (lo + hi)
}

/// Measures the skin-to-design distance of `skin`, built on the rings of `blade` at
/// `radii`, at the midpoint and quarter points of every ring interval (see the module
/// docs).
///
/// # Errors
/// [`LoftError`] when the rings cannot be parametrised (coincident points).
pub fn skin_to_design(
    blade: &Blade,
    skin: &Skin,
    radii: &[f64],
) -> Result<SkinToDesign, LoftError> {
    let rings: Vec<Vec<Point3<f64>>> = radii.par_iter().map(|&r| blade.ring(r).points).collect();
    let mut cache = HashMap::new();
    let worst = Comparison::new(skin, &rings, radii)?.intervals(blade, &PROBES, &mut cache);
    Ok(summary(radii, &worst, PROBES.len()))
}

fn summary(radii: &[f64], worst: &[(f64, f64)], probes: usize) -> SkinToDesign {
    let (max, at_radius) = worst.iter().fold(
        (0.0, radii[0]),
        |m, &(d, r)| if d > m.0 { (d, r) } else { m },
    );
    SkinToDesign {
        max,
        at_radius,
        radii_compared: worst.len() * probes,
    }
}

/// What is compared with the model: the skin, or, while rings are being placed, only
/// its spanwise curves through the section points ([`SpanCurves`]), which give the very
/// points the comparison looks at for half the work.
enum Along<'a> {
    /// The skin, with the basis values at its section parameters.
    Skin { skin: &'a Skin, ubases: Vec<Basis> },
    /// The spanwise curves of the skin the rings would give.
    Curves(SpanCurves),
}

/// A skin (or its spanwise curves) with the parameters of its rings, ready to be
/// compared with the model.
struct Comparison<'a> {
    along: Along<'a>,
    radii: &'a [f64],
    vbar: Vec<f64>,
}

impl<'a> Comparison<'a> {
    fn new(
        skin: &'a Skin,
        rings: &[Vec<Point3<f64>>],
        radii: &'a [f64],
    ) -> Result<Self, LoftError> {
        let ubar = section_parameters(rings)?;
        let ubases = ubar
            .iter()
            .map(|&u| Basis::at(&skin.knots_u, skin.degree_u, u))
            .collect();
        Ok(Comparison {
            along: Along::Skin { skin, ubases },
            radii,
            vbar: span_parameters(rings)?,
        })
    }

    /// The comparison of the skin `rings` would give, through its spanwise curves.
    fn of_curves(rings: &[Vec<Point3<f64>>], radii: &'a [f64]) -> Result<Self, LoftError> {
        let curves = SpanCurves::interpolate(rings)?;
        Ok(Comparison {
            vbar: curves.vbar.clone(),
            along: Along::Curves(curves),
            radii,
        })
    }

    /// The spanwise curve giving `z`.
    fn z_curve(&self) -> (&[f64], usize, &[Point3<f64>]) {
        match &self.along {
            Along::Skin { skin, .. } => (&skin.knots_v, skin.degree_v, &skin.control[0]),
            Along::Curves(c) => (&c.knots_v, c.degree_v, &c.control[0]),
        }
    }

    /// Largest distance between the model's section points at `r` (`design`) and the
    /// skin points with the same section parameters on the skin's cut at `v`.
    fn distance_at(&self, v: f64, design: &[Point3<f64>]) -> f64 {
        let far = |pts: &mut dyn Iterator<Item = Point3<f64>>| {
            pts.zip(design)
                .map(|(q, p)| (q - p).norm())
                .fold(0.0, f64::max)
        };
        match &self.along {
            Along::Skin { skin, ubases } => {
                let c = skin.iso_v_control(&Basis::at(&skin.knots_v, skin.degree_v, v));
                far(&mut ubases.iter().map(|b| eval_curve(&c, b)))
            }
            Along::Curves(curves) => far(&mut curves.section_at(v)),
        }
    }

    /// The largest distance in each ring interval and the radius where it was found;
    /// the model's rings at the probe radii are kept in `cache` (keyed by the radius'
    /// bits) for the next round.
    fn intervals(
        &self,
        blade: &Blade,
        at: &[f64],
        cache: &mut HashMap<u64, Vec<Point3<f64>>>,
    ) -> Vec<(f64, f64)> {
        let probes: Vec<f64> = self
            .radii
            .windows(2)
            .flat_map(|w| at.iter().map(move |f| w[0] + f * (w[1] - w[0])))
            .collect();
        let missing: Vec<f64> = probes
            .iter()
            .copied()
            .filter(|r| !cache.contains_key(&r.to_bits()))
            .collect();
        let fresh: Vec<Vec<Point3<f64>>> =
            missing.par_iter().map(|&r| blade.ring(r).points).collect();
        for (r, ring) in missing.iter().zip(fresh) {
            cache.insert(r.to_bits(), ring);
        }
        let cache = &*cache;
        probes
            .par_chunks(at.len())
            .map(|chunk| {
                chunk
                    .iter()
                    .map(|&r| {
                        let v = v_at(self.z_curve(), &self.vbar, self.radii, r);
                        (self.distance_at(v, &cache[&r.to_bits()]), r)
                    })
                    .fold((0.0, chunk[0]), |m, x| if x.0 > m.0 { x } else { m })
            })
            .collect()
    }
}

/// Into how many even pieces to cut a ring interval whose midpoint strays `excess`
/// times the target from the model and which is `room` times the shortest interval
/// that may still be halved: the skin between cubic-spline rings strays as the fourth
/// power of their spacing where the model is smooth (C. de Boor, *A Practical Guide to
/// Splines*, rev. ed. 2001, chapter V, the error of cubic spline interpolation), so
/// `excess` asks for `log2(excess) / 4` halvings; at least one, at most three per round
/// (where the model has a kink the error falls more slowly, and later rounds split
/// again), and never below the shortest interval.
fn pieces_for(excess: f64, room: f64) -> usize {
    let halvings = (excess.log2() / 4.0).ceil().clamp(1.0, 3.0) as u32;
    let mut n = 1usize << halvings;
    while n > 2 && (n as f64) > 2.0 * room {
        n /= 2;
    }
    n
}

/// Places rings for `tolerance` (mm; see the module docs) and builds the skin through
/// them.
///
/// # Errors
/// [`LoftError`] when the skin cannot be built through the rings.
pub fn place_rings(blade: &Blade, tolerance: f64) -> Result<RingPlacement, LoftError> {
    let span = blade.tip_end() - blade.skin_start();
    let mut radii = blade.ring_radii(span / 16.0);
    let target = SHARE * tolerance;
    let mut rings: HashMap<u64, Vec<Point3<f64>>> = radii
        .par_iter()
        .map(|&r| (r.to_bits(), blade.ring(r).points))
        .collect();
    let mut probes = HashMap::new();
    let mut round = 0;
    loop {
        let placed: Vec<Vec<Point3<f64>>> =
            radii.iter().map(|r| rings[&r.to_bits()].clone()).collect();
        let cmp = Comparison::of_curves(&placed, &radii)?;
        let worst = cmp.intervals(blade, &PLACING, &mut probes);
        let shortest = 2.0 * MIN_INTERVAL * span;
        let split: Vec<bool> = worst
            .iter()
            .enumerate()
            .map(|(i, &(d, _))| d > target && radii[i + 1] - radii[i] >= shortest)
            .collect();
        let room = MAX_RINGS.saturating_sub(radii.len());
        // A tolerance that is not a positive number is refused by the tessellation.
        let valid = target > 0.0 && target.is_finite();
        if !valid || !split.contains(&true) || round >= MAX_ROUNDS || room == 0 {
            // The skin itself, built while the reported distance is measured (the
            // quarter points too) on its spanwise curves, which give the same points.
            let (skin, measured) = rayon::join(
                || Skin::interpolate(&placed, blade.le_index()),
                || cmp.intervals(blade, &PROBES, &mut probes),
            );
            let skin = skin?;
            return Ok(RingPlacement {
                skin_to_design: summary(&radii, &measured, PROBES.len()),
                radii,
                skin,
            });
        }
        round += 1;
        // Split the worst intervals first when the ring budget runs short.
        let mut order: Vec<usize> = (0..split.len()).filter(|&i| split[i]).collect();
        order.sort_by(|&a, &b| worst[b].0.total_cmp(&worst[a].0).then(a.cmp(&b)));
        let mut pieces = vec![1usize; split.len()];
        let mut left = room;
        for &i in &order {
            let wanted = pieces_for(worst[i].0 / target, (radii[i + 1] - radii[i]) / shortest);
            let n = wanted.min(left + 1);
            if n < 2 {
                break;
            }
            pieces[i] = n;
            left -= n - 1;
        }
        let mut next = Vec::with_capacity(radii.len() * 2);
        for (i, &r) in radii.iter().enumerate() {
            next.push(r);
            if i + 1 < radii.len() {
                let (n, step) = (pieces[i], radii[i + 1] - r);
                next.extend((1..n).map(|k| r + step * k as f64 / n as f64));
            }
        }
        let fresh: Vec<(u64, Vec<Point3<f64>>)> = next
            .par_iter()
            .filter(|r| !rings.contains_key(&r.to_bits()))
            .map(|&r| (r.to_bits(), blade.ring(r).points))
            .collect();
        rings.extend(fresh);
        radii = next;
    }
}
