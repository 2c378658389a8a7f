//! Printability along the span: section and trailing-edge thickness against the nozzle
//! and the smallest printable feature, over the whole part, root to tip end.
//!
//! The blade is cut by planes z = const (z is the span axis, see [`crate::conventions`])
//! every [`PrintabilityOptions::step`] from half a step above the lowest point to half a
//! step below the highest, so the shank, the transition and a round tip are measured as
//! well as the stations; or its section outlines are given directly. In each section the
//! chord is the longest segment between two outline points; thickness at a chord station
//! is the outline's extent across the chord there. The **section thickness** is the
//! largest thickness along the chord; the **trailing-edge thickness** is the thickness at
//! [`PrintabilityOptions::te_probe`] from the thinner end of the chord (the trailing edge
//! is the sharper end). A trailing edge thinner than the nozzle diameter prints as a
//! ragged or missing edge; a section thinner than the minimum feature size cannot be
//! printed as a solid wall (both common practice).
//!
//! With the design's span layout ([`SpanLayout`], from [`SpanLayout::of_blade`]) each
//! cut is put in its region (root shank, transition, blade stations, round tip), and the
//! advice says what would change a thin edge there: `[blade] min-te-thickness` thickens
//! the section at the stations (and so the transition that blends into the first one);
//! a round tip scales the last station's section down toward a point, so its last
//! millimetres are thin whatever that key says, and only the tip's own keys change them.

use nalgebra::{Point2, Vector2};

use super::hull;
use super::Printer;
use crate::blade::Blade;
use crate::mesh::{slice, TriMesh};

/// Options of the printability check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PrintabilityOptions {
    /// Spacing of the cutting planes along the span, mm (default 0.25). Raised when the
    /// span would need more than [`PrintabilityOptions::max_cuts`] planes.
    pub step: f64,
    /// Largest number of cutting planes (default 4000).
    pub max_cuts: usize,
    /// Distance from the trailing edge where its thickness is measured, mm (default:
    /// the nozzle diameter).
    pub te_probe: Option<f64>,
    /// Chord stations sampled for the section thickness (default 200).
    pub stations: usize,
}

impl PrintabilityOptions {
    /// The defaults.
    pub const DEFAULT: PrintabilityOptions = PrintabilityOptions {
        step: 0.25,
        max_cuts: 4000,
        te_probe: None,
        stations: 200,
    };
}

impl Default for PrintabilityOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// Where along the span a cut lies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum SpanRegion {
    /// The round root shank, from the root face to the transition (`[root]`).
    Root,
    /// The transition from the shank into the first station (`[root]`).
    Transition,
    /// Between the first and the last station: the design table's sections.
    Blade,
    /// The round tip's closure beyond the last station (`[tip] shape = "round"`).
    Tip,
}

impl SpanRegion {
    /// The region's name in messages.
    pub fn name(self) -> &'static str {
        match self {
            SpanRegion::Root => "root shank",
            SpanRegion::Transition => "root transition",
            SpanRegion::Blade => "blade",
            SpanRegion::Tip => "round tip",
        }
    }
}

/// The design's span layout, mm along z (the blade frame): enough to name the region of a
/// cut and to tell whether the design's trailing-edge thickening reaches it.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct SpanLayout {
    /// Where the root transition begins (the end of the shank); `None` without a `[root]`
    /// table.
    pub transition_start: Option<f64>,
    /// First station radius.
    pub first_station: f64,
    /// Last station radius.
    pub last_station: f64,
    /// End of the part: the last station for a flat tip, beyond it for a round tip.
    pub tip_end: f64,
    /// The design's `[blade] min-te-thickness`, mm, if set.
    pub min_te_thickness: Option<f64>,
}

impl SpanLayout {
    /// The layout of a built blade, with the design's `[blade] min-te-thickness` (mm).
    pub fn of_blade(blade: &Blade, min_te_thickness: Option<f64>) -> SpanLayout {
        let first = blade.root_radius();
        SpanLayout {
            transition_start: blade.root().map(|r| first - r.transition_length),
            first_station: first,
            last_station: blade.tip_radius(),
            tip_end: blade.tip_end(),
            min_te_thickness,
        }
    }

    /// The region of the plane z.
    pub fn region(&self, z: f64) -> SpanRegion {
        if z > self.last_station && self.tip_end > self.last_station {
            SpanRegion::Tip
        } else if z >= self.first_station {
            SpanRegion::Blade
        } else {
            match self.transition_start {
                Some(t) if z >= t => SpanRegion::Transition,
                Some(_) => SpanRegion::Root,
                None => SpanRegion::Blade,
            }
        }
    }

    /// True when `[blade] min-te-thickness` acts on the sections of `region`: the
    /// stations and the transition blending into the first one. A round tip scales the
    /// last section down, its edge with it; a round shank has no trailing edge.
    pub fn thickening_reaches(region: SpanRegion) -> bool {
        matches!(region, SpanRegion::Blade | SpanRegion::Transition)
    }

    /// Length of the round tip's closure, mm (0 for a flat tip).
    pub fn tip_length(&self) -> f64 {
        (self.tip_end - self.last_station).max(0.0)
    }
}

/// Measurements of one section.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Cut {
    /// Span position of the section, mm.
    pub z: f64,
    /// Region of the span, when the design's layout is known.
    pub region: Option<SpanRegion>,
    /// Chord length, mm.
    pub chord: f64,
    /// Largest thickness across the chord, mm.
    pub thickness: f64,
    /// Thickness at the probe distance from the trailing edge, mm.
    pub te_thickness: f64,
    /// True when the trailing edge is thinner than the nozzle diameter.
    pub te_short: bool,
    /// True when the section is thinner than the minimum feature size.
    pub thin: bool,
}

/// What falls short.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Shortfall {
    /// Trailing edge thinner than the nozzle.
    TrailingEdge,
    /// Section thinner than the minimum feature.
    Section,
}

/// A run of neighbouring cuts in one region that fall short the same way.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Zone {
    /// What falls short.
    pub kind: Shortfall,
    /// Region, when the design's layout is known.
    pub region: Option<SpanRegion>,
    /// Lowest and highest cut of the run, mm.
    pub z: [f64; 2],
    /// Index (into [`Printability::cuts`]) of the thinnest cut of the run.
    pub thinnest: usize,
    /// Its thickness (trailing edge or section, after `kind`), mm.
    pub thickness: f64,
    /// True when the design sets `[blade] min-te-thickness` to at least the nozzle
    /// diameter and that setting acts on this region: a short trailing edge here means
    /// the mesh was not built with it. `false` without a layout.
    pub design_covers: bool,
}

/// The answer of [`printability`]: graded per section, naming the offending ones.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Printability {
    /// Every section measured, root to tip.
    pub cuts: Vec<Cut>,
    /// Nozzle diameter compared against, mm.
    pub nozzle: f64,
    /// Minimum feature size compared against, mm.
    pub min_feature: f64,
    /// Probe distance used for the trailing edge, mm.
    pub te_probe: f64,
    /// The design's span layout, when known.
    pub layout: Option<SpanLayout>,
    /// Indices of sections whose trailing edge is thinner than the nozzle.
    pub te_short: Vec<usize>,
    /// Indices of sections thinner than the minimum feature size.
    pub thin: Vec<usize>,
    /// The short sections as runs, root to tip, trailing-edge runs first.
    pub zones: Vec<Zone>,
}

impl Printability {
    /// True when no section falls short.
    pub fn ok(&self) -> bool {
        self.te_short.is_empty() && self.thin.is_empty()
    }

    /// The thinnest trailing edge over the whole part: `(index, cut)`.
    pub fn min_te(&self) -> Option<(usize, &Cut)> {
        self.cuts
            .iter()
            .enumerate()
            .min_by(|a, b| a.1.te_thickness.total_cmp(&b.1.te_thickness))
    }

    /// The thinnest section: `(index, cut)`.
    pub fn min_thickness(&self) -> Option<(usize, &Cut)> {
        self.cuts
            .iter()
            .enumerate()
            .min_by(|a, b| a.1.thickness.total_cmp(&b.1.thickness))
    }

    /// True when the design's `[blade] min-te-thickness` should have made some short
    /// trailing edge thick enough (see [`Zone::design_covers`]): the mesh was not built
    /// with that setting. A short edge only in a round tip is not such a case.
    pub fn thickening_missing(&self) -> bool {
        self.zones.iter().any(|z| z.design_covers)
    }

    /// Plain-language findings, one line per zone (empty when all is well), each with
    /// what would change it.
    pub fn findings(&self) -> Vec<String> {
        self.zones.iter().map(|z| self.finding(z)).collect()
    }

    fn finding(&self, zone: &Zone) -> String {
        let c = &self.cuts[zone.thinnest];
        let (what, limit) = match zone.kind {
            Shortfall::TrailingEdge => ("trailing edge", format!("{:.2} mm nozzle", self.nozzle)),
            Shortfall::Section => (
                "section",
                format!("{:.2} mm minimum feature", self.min_feature),
            ),
        };
        let place = match zone.region {
            Some(r) => format!(" in the {}", r.name()),
            None => String::new(),
        };
        let head = format!(
            "{what} thinner than the {limit}{place} from z = {:.1} to {:.1} mm, thinnest {:.3} mm at z = {:.1} mm",
            zone.z[0], zone.z[1], zone.thickness, c.z
        );
        format!("{head}; {}", self.advice(zone))
    }

    fn advice(&self, zone: &Zone) -> String {
        let nozzle = self.nozzle;
        let set = self.layout.and_then(|l| l.min_te_thickness);
        match (zone.region, zone.kind) {
            (Some(SpanRegion::Tip), kind) => {
                let (l, thin) = self.layout.map_or((0.0, 0.0), |l| {
                    (l.tip_length(), (l.tip_end - zone.z[0]).max(0.0))
                });
                let why = match kind {
                    Shortfall::TrailingEdge => " whatever [blade] min-te-thickness says (it acts at the stations)",
                    Shortfall::Section => "",
                };
                format!(
                    "a round tip scales the last station's section down to a point over its {l:.1} mm, \
                     so its last {thin:.1} mm are this thin{why}; a shorter [tip] length shortens that \
                     part, [tip] shape = \"flat\" ends the blade at the last station with its full section, \
                     or print the tip with a finer nozzle"
                )
            }
            (Some(SpanRegion::Root), _) => {
                "the root shank is round and has no trailing edge: check the [root] shank sizes".into()
            }
            (_, Shortfall::Section) => {
                "the section itself is too thin to print solid: a thicker section (a thicker airfoil or a longer chord) at these stations would change it".into()
            }
            (region, Shortfall::TrailingEdge) => match set {
                Some(t) if t >= nozzle && region.is_some() => format!(
                    "the design sets [blade] min-te-thickness = {t:.2} mm, which reaches here, so this mesh was not built with it: rebuild the part from the design"
                ),
                Some(t) => format!(
                    "[blade] min-te-thickness = {t:.2} mm is under the nozzle; set it to {nozzle:.2} (mm) in the design file"
                ),
                None if region.is_some() => format!(
                    "thicken it with [blade] min-te-thickness = {nozzle:.2} (mm) in the design file"
                ),
                None => format!(
                    "for a blade built from a design, [blade] min-te-thickness = {nozzle:.2} (mm) thickens \
                     the edge at the stations (not in a round tip's closure, which keys of [tip] change)"
                ),
            },
        }
    }
}

/// Measures one section given as segments: `(chord, thickness, te_thickness)`.
fn measure(segments: &[[Point2<f64>; 2]], probe: f64, stations: usize) -> Option<(f64, f64, f64)> {
    // The chord: the diameter of the point set, found on its convex hull.
    let pts: Vec<Point2<f64>> = segments.iter().flatten().copied().collect();
    let h: Vec<Point2<f64>> = hull::convex_hull(&pts);
    if h.len() < 2 {
        return None;
    }
    let (best, a, b) = diameter(&h);
    let chord = best;
    if !(chord > 0.0) {
        return None;
    }
    let t: Vector2<f64> = (b - a) / chord;
    let nrm = Vector2::new(-t.y, t.x);
    let n = stations.max(2);
    let p = probe.min(0.5 * chord);
    // Chord positions sampled: the interior stations, then the two probe positions.
    let mut at: Vec<f64> = (1..n).map(|i| chord * i as f64 / n as f64).collect();
    at.extend([p, chord - p]);
    let extent = across(segments, a, t, nrm, &at);
    let thickness = extent[..n - 1].iter().copied().fold(0.0, f64::max);
    let te = extent[n - 1].min(extent[n]);
    Some((chord, thickness, te))
}

/// The farthest pair of a convex polygon (counter-clockwise, no repeated points), by
/// rotating calipers over its antipodal pairs (M. I. Shamos, "Computational Geometry",
/// PhD thesis, Yale, 1978): `(distance, a, b)`.
fn diameter(h: &[Point2<f64>]) -> (f64, Point2<f64>, Point2<f64>) {
    let n = h.len();
    let mut best = (0.0, h[0], h[0]);
    let mut consider = |p: Point2<f64>, q: Point2<f64>| {
        let d = (q - p).norm();
        if d > best.0 {
            best = (d, p, q);
        }
    };
    if n < 3 {
        consider(h[0], h[n - 1]);
        return best;
    }
    let reach = |i: usize, j: usize| (h[(i + 1) % n] - h[i]).perp(&(h[j % n] - h[i]));
    let mut j = 1;
    for i in 0..n {
        // Advance to the vertex farthest from the edge (i, i + 1).
        let mut steps = 0;
        while reach(i, j + 1) > reach(i, j) && steps < n {
            j += 1;
            steps += 1;
        }
        // An edge parallel to (i, i + 1) ties its two ends: take both.
        for k in [j, j + 1] {
            consider(h[i], h[k % n]);
            consider(h[(i + 1) % n], h[k % n]);
        }
    }
    best
}

/// The outline's extent across the chord (along `nrm`) at each chord position of `at`
/// (distances from `a` along `t`), 0 where nothing crosses. One pass over the segments:
/// each updates only the positions it spans.
fn across(
    segments: &[[Point2<f64>; 2]],
    a: Point2<f64>,
    t: Vector2<f64>,
    nrm: Vector2<f64>,
    at: &[f64],
) -> Vec<f64> {
    let mut order: Vec<usize> = (0..at.len()).collect();
    order.sort_by(|&i, &j| at[i].total_cmp(&at[j]));
    let sorted: Vec<f64> = order.iter().map(|&i| at[i]).collect();
    let mut lo = vec![f64::MAX; at.len()];
    let mut hi = vec![f64::MIN; at.len()];
    for [p, q] in segments {
        let (sa, sb) = ((p - a).dot(&t), (q - a).dot(&t));
        if sa == sb {
            continue;
        }
        let (s0, s1) = (sa.min(sb), sa.max(sb));
        let first = sorted.partition_point(|&s| s < s0);
        let last = sorted.partition_point(|&s| s <= s1);
        for &k in &order[first..last.max(first)] {
            let f = (at[k] - sa) / (sb - sa);
            let y = (p + (q - p) * f - a).dot(&nrm);
            lo[k] = lo[k].min(y);
            hi[k] = hi[k].max(y);
        }
    }
    lo.iter()
        .zip(&hi)
        .map(|(l, h)| if h >= l { h - l } else { 0.0 })
        .collect()
}

/// Checks sections given as outlines `(z, points)` (closed polygons, mm).
pub fn printability_of_outlines(
    outlines: &[(f64, Vec<Point2<f64>>)],
    printer: &Printer,
    opts: &PrintabilityOptions,
) -> Printability {
    let segs: Vec<(f64, Vec<[Point2<f64>; 2]>)> = outlines
        .iter()
        .map(|(z, pts)| {
            let n = pts.len();
            (*z, (0..n).map(|i| [pts[i], pts[(i + 1) % n]]).collect())
        })
        .collect();
    grade(&segs, printer, opts, None)
}

fn grade(
    sections: &[(f64, Vec<[Point2<f64>; 2]>)],
    printer: &Printer,
    opts: &PrintabilityOptions,
    layout: Option<&SpanLayout>,
) -> Printability {
    let probe = opts.te_probe.unwrap_or(printer.nozzle);
    let mut cuts = Vec::new();
    for (z, segs) in sections {
        if let Some((chord, thickness, te)) = measure(segs, probe, opts.stations) {
            cuts.push(Cut {
                z: *z,
                region: layout.map(|l| l.region(*z)),
                chord,
                thickness,
                te_thickness: te,
                te_short: te < printer.nozzle,
                thin: thickness < printer.min_feature,
            });
        }
    }
    let te_short = (0..cuts.len()).filter(|&i| cuts[i].te_short).collect();
    let thin = (0..cuts.len()).filter(|&i| cuts[i].thin).collect();
    let mut zones = runs(&cuts, Shortfall::TrailingEdge, layout, printer.nozzle);
    zones.extend(runs(&cuts, Shortfall::Section, layout, printer.nozzle));
    Printability {
        cuts,
        nozzle: printer.nozzle,
        min_feature: printer.min_feature,
        te_probe: probe,
        layout: layout.copied(),
        te_short,
        thin,
        zones,
    }
}

/// Runs of neighbouring cuts in one region that fall short as `kind` says.
fn runs(cuts: &[Cut], kind: Shortfall, layout: Option<&SpanLayout>, nozzle: f64) -> Vec<Zone> {
    let short = |c: &Cut| match kind {
        Shortfall::TrailingEdge => c.te_short,
        Shortfall::Section => c.thin,
    };
    let value = |c: &Cut| match kind {
        Shortfall::TrailingEdge => c.te_thickness,
        Shortfall::Section => c.thickness,
    };
    let covers = |region: Option<SpanRegion>| {
        kind == Shortfall::TrailingEdge
            && region.is_some_and(SpanLayout::thickening_reaches)
            && layout
                .and_then(|l| l.min_te_thickness)
                .is_some_and(|t| t >= nozzle)
    };
    let mut out: Vec<Zone> = Vec::new();
    let mut open = false;
    for (i, c) in cuts.iter().enumerate() {
        if !short(c) {
            open = false;
            continue;
        }
        match out.last_mut() {
            Some(z) if open && z.region == c.region => {
                z.z[1] = c.z;
                if value(c) < z.thickness {
                    z.thinnest = i;
                    z.thickness = value(c);
                }
            }
            _ => out.push(Zone {
                kind,
                region: c.region,
                z: [c.z, c.z],
                thinnest: i,
                thickness: value(c),
                design_covers: covers(c.region),
            }),
        }
        open = true;
    }
    out
}

/// The planes: every `step` (or wider, at most `max_cuts`) from half a step above `lo` to
/// half a step below `hi`.
fn planes(lo: f64, hi: f64, opts: &PrintabilityOptions) -> Vec<f64> {
    let span = hi - lo;
    if !(span > 0.0) {
        return Vec::new();
    }
    let step = if opts.step > 0.0 {
        opts.step
    } else {
        PrintabilityOptions::DEFAULT.step
    };
    let n = ((span / step).ceil() as usize).clamp(1, opts.max_cuts.max(1));
    (0..n)
        .map(|i| lo + span * (i as f64 + 0.5) / n as f64)
        .collect()
}

/// Cuts a part's mesh (blade frame: span along z) by planes every
/// [`PrintabilityOptions::step`] over its whole height and grades each section. The
/// regions are unknown: see [`printability_of_blade`].
pub fn printability(mesh: &TriMesh, printer: &Printer, opts: &PrintabilityOptions) -> Printability {
    graded_cuts(mesh, printer, opts, None)
}

/// [`printability`] of a blade built from a design, with its span layout: each cut is
/// put in its region and the advice fits the region (see the module docs).
pub fn printability_of_blade(
    mesh: &TriMesh,
    layout: &SpanLayout,
    printer: &Printer,
    opts: &PrintabilityOptions,
) -> Printability {
    graded_cuts(mesh, printer, opts, Some(layout))
}

fn graded_cuts(
    mesh: &TriMesh,
    printer: &Printer,
    opts: &PrintabilityOptions,
    layout: Option<&SpanLayout>,
) -> Printability {
    let Some(bb) = mesh.bounding_box() else {
        return grade(&[], printer, opts, layout);
    };
    let zs = planes(bb.min.z, bb.max.z, opts);
    let sections: Vec<(f64, Vec<[Point2<f64>; 2]>)> = zs
        .iter()
        .copied()
        .zip(slice::segments_many(mesh, &zs))
        .collect();
    grade(&sections, printer, opts, layout)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn calipers_find_the_farthest_pair() {
        // Against the definition (every pair compared), on hulls of scattered points and
        // on a regular 7-gon, whose diameter is 2 R sin(3 pi / 7) (elementary geometry).
        let mut seed = 7u64;
        let mut rnd = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        for n in [3usize, 4, 10, 50, 300] {
            let pts: Vec<Point2<f64>> = (0..n)
                .map(|_| Point2::new(rnd() * 40.0, rnd() * 3.0))
                .collect();
            let h: Vec<Point2<f64>> = hull::convex_hull(&pts);
            let brute = h
                .iter()
                .flat_map(|p| h.iter().map(move |q| (q - p).norm()))
                .fold(0.0, f64::max);
            assert!((diameter(&h).0 - brute).abs() < 1e-12, "n = {n}");
        }
        // Symmetric shapes have parallel edges (ties between antipodal vertices).
        let rect =
            [(0.0, 0.0), (60.0, 0.0), (60.0, 2.0), (0.0, 2.0)].map(|(x, y)| Point2::new(x, y));
        assert!((diameter(&rect).0 - 3604f64.sqrt()).abs() < 1e-12);
        let oval: Vec<Point2<f64>> = (0..720)
            .map(|k| {
                let t = std::f64::consts::TAU * k as f64 / 720.0;
                Point2::new(30.0 * t.cos(), 0.5 * t.sin())
            })
            .collect();
        assert!((diameter(&oval).0 - 60.0).abs() < 1e-12);
        let r = 5.0;
        let gon: Vec<Point2<f64>> = (0..7)
            .map(|k| {
                let t = std::f64::consts::TAU * k as f64 / 7.0;
                Point2::new(r * t.cos(), r * t.sin())
            })
            .collect();
        let want = 2.0 * r * (3.0 * std::f64::consts::PI / 7.0).sin();
        assert!((diameter(&gon).0 - want).abs() < 1e-12);
    }
}
