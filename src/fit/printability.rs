//! Printability along the span: section and trailing-edge thickness against the nozzle
//! and the smallest printable feature.
//!
//! The blade is cut by planes z = const (z is the span axis, see
//! [`crate::conventions`]), or its section outlines are given directly. In each section
//! the chord is the longest segment between two outline points; thickness at a chord
//! station is the outline's extent across the chord there. The **section thickness** is
//! the largest thickness along the chord; the **trailing-edge thickness** is the
//! thickness at [`PrintabilityOptions::te_probe`] from the thinner end of the chord (the
//! trailing edge is the sharper end). A trailing edge thinner than the nozzle diameter
//! prints as a ragged or missing edge; a section thinner than the minimum feature size
//! cannot be printed as a solid wall (both common practice). The section layer can
//! thicken the trailing edge: set `[blade] min-te-thickness` in the design file.

use super::hull;
use super::Printer;
use crate::mesh::TriMesh;
use nalgebra::Point2;

/// A point in the plane, mm (the slicer's own; [`hull`] takes `Point2`).
type P2 = [f64; 2];

/// Options of the printability check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PrintabilityOptions {
    /// Number of cutting planes, spread evenly between root and tip (default 40).
    pub cuts: usize,
    /// Distance from the trailing edge where its thickness is measured, mm (default:
    /// the nozzle diameter).
    pub te_probe: Option<f64>,
    /// Chord stations sampled for the section thickness (default 200).
    pub stations: usize,
}

impl PrintabilityOptions {
    /// The defaults.
    pub const DEFAULT: PrintabilityOptions = PrintabilityOptions {
        cuts: 40,
        te_probe: None,
        stations: 200,
    };
}

impl Default for PrintabilityOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// Measurements of one section.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Cut {
    /// Span position of the section, mm.
    pub z: f64,
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
    /// Indices of sections whose trailing edge is thinner than the nozzle.
    pub te_short: Vec<usize>,
    /// Indices of sections thinner than the minimum feature size.
    pub thin: Vec<usize>,
}

impl Printability {
    /// True when no section falls short.
    pub fn ok(&self) -> bool {
        self.te_short.is_empty() && self.thin.is_empty()
    }

    /// The thinnest trailing edge: `(index, cut)`.
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

    /// Plain-language findings, one line each (empty when all is well).
    pub fn findings(&self) -> Vec<String> {
        let mut out = Vec::new();
        let span = |idx: &[usize]| {
            let z: Vec<f64> = idx.iter().map(|&i| self.cuts[i].z).collect();
            let lo = z.iter().copied().fold(f64::MAX, f64::min);
            let hi = z.iter().copied().fold(f64::MIN, f64::max);
            format!("z = {lo:.1} to {hi:.1} mm")
        };
        if !self.te_short.is_empty() {
            if let Some((_, c)) = self.min_te() {
                out.push(format!(
                    "trailing edge thinner than the {:.2} mm nozzle at {} sections ({}), thinnest {:.3} mm at z = {:.1} mm; thicken it with [blade] min-te-thickness = {:.2} (mm) in the design file",
                    self.nozzle,
                    self.te_short.len(),
                    span(&self.te_short),
                    c.te_thickness,
                    c.z,
                    self.nozzle
                ));
            }
        }
        if !self.thin.is_empty() {
            if let Some((_, c)) = self.min_thickness() {
                out.push(format!(
                    "section thinner than the {:.2} mm minimum feature at {} sections ({}), thinnest {:.3} mm at z = {:.1} mm",
                    self.min_feature,
                    self.thin.len(),
                    span(&self.thin),
                    c.thickness,
                    c.z
                ));
            }
        }
        out
    }
}

/// Segments where the plane z = `z` cuts the mesh, as planar point pairs (triangles
/// naming missing vertices are skipped).
pub fn slice(mesh: &TriMesh, z: f64) -> Vec<[P2; 2]> {
    let mut out = Vec::new();
    let count = mesh.vertices.len();
    for tri in &mesh.triangles {
        if tri.iter().any(|&v| v as usize >= count) {
            continue; // a broken triangle cuts nothing
        }
        let c = tri.map(|v| mesh.vertices[v as usize]);
        let mut pts: Vec<P2> = Vec::with_capacity(2);
        for k in 0..3 {
            let (a, b) = (c[k], c[(k + 1) % 3]);
            let (da, db) = (a.z - z, b.z - z);
            if (da < 0.0 && db >= 0.0) || (da >= 0.0 && db < 0.0) {
                let s = da / (da - db);
                pts.push([a.x + s * (b.x - a.x), a.y + s * (b.y - a.y)]);
            }
        }
        if pts.len() == 2 {
            out.push([pts[0], pts[1]]);
        }
    }
    out
}

/// Measures one section given as segments: `(chord, thickness, te_thickness)`.
fn measure(segments: &[[P2; 2]], probe: f64, stations: usize) -> Option<(f64, f64, f64)> {
    let pts: Vec<P2> = segments.iter().flat_map(|s| [s[0], s[1]]).collect();
    let pts: Vec<Point2<f64>> = pts.iter().map(|&p| p.into()).collect();
    let h: Vec<P2> = hull::convex_hull(&pts).iter().map(|p| [p.x, p.y]).collect();
    if h.len() < 2 {
        return None;
    }
    let mut best = (0.0, h[0], h[0]);
    for i in 0..h.len() {
        for j in i + 1..h.len() {
            let d = ((h[i][0] - h[j][0]).powi(2) + (h[i][1] - h[j][1]).powi(2)).sqrt();
            if d > best.0 {
                best = (d, h[i], h[j]);
            }
        }
    }
    let (chord, a, b) = best;
    if chord <= 0.0 {
        return None;
    }
    let t = [(b[0] - a[0]) / chord, (b[1] - a[1]) / chord];
    let nrm = [-t[1], t[0]];
    // Thickness at chord station s (distance from a along t).
    let across = |s: f64| -> f64 {
        let (mut lo, mut hi) = (f64::MAX, f64::MIN);
        for seg in segments {
            let sa = (seg[0][0] - a[0]) * t[0] + (seg[0][1] - a[1]) * t[1];
            let sb = (seg[1][0] - a[0]) * t[0] + (seg[1][1] - a[1]) * t[1];
            if (sa - s) * (sb - s) > 0.0 || sa == sb {
                continue;
            }
            let f = (s - sa) / (sb - sa);
            let p = [
                seg[0][0] + f * (seg[1][0] - seg[0][0]),
                seg[0][1] + f * (seg[1][1] - seg[0][1]),
            ];
            let q = (p[0] - a[0]) * nrm[0] + (p[1] - a[1]) * nrm[1];
            lo = lo.min(q);
            hi = hi.max(q);
        }
        if hi >= lo {
            hi - lo
        } else {
            0.0
        }
    };
    let n = stations.max(2);
    let thickness = (1..n)
        .map(|i| across(chord * i as f64 / n as f64))
        .fold(0.0, f64::max);
    let p = probe.min(0.5 * chord);
    let te = across(p).min(across(chord - p));
    Some((chord, thickness, te))
}

/// Checks sections given as outlines `(z, points)` (closed polygons, mm).
pub fn printability_of_outlines(
    outlines: &[(f64, Vec<P2>)],
    printer: &Printer,
    opts: &PrintabilityOptions,
) -> Printability {
    let segs: Vec<(f64, Vec<[P2; 2]>)> = outlines
        .iter()
        .map(|(z, pts)| {
            let n = pts.len();
            (*z, (0..n).map(|i| [pts[i], pts[(i + 1) % n]]).collect())
        })
        .collect();
    grade(&segs, printer, opts)
}

fn grade(
    sections: &[(f64, Vec<[P2; 2]>)],
    printer: &Printer,
    opts: &PrintabilityOptions,
) -> Printability {
    let probe = opts.te_probe.unwrap_or(printer.nozzle);
    let mut cuts = Vec::new();
    for (z, segs) in sections {
        if let Some((chord, thickness, te)) = measure(segs, probe, opts.stations) {
            cuts.push(Cut {
                z: *z,
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
    Printability {
        cuts,
        nozzle: printer.nozzle,
        min_feature: printer.min_feature,
        te_probe: probe,
        te_short,
        thin,
    }
}

/// Cuts a blade mesh (blade frame: span along z) at [`PrintabilityOptions::cuts`] planes
/// spread evenly between root and tip (the planes sit half a step inside the ends, away
/// from the caps) and grades each section.
pub fn printability(mesh: &TriMesh, printer: &Printer, opts: &PrintabilityOptions) -> Printability {
    let Some(bb) = mesh.bounding_box() else {
        return grade(&[], printer, opts);
    };
    let n = opts.cuts.max(1);
    let span = bb.max.z - bb.min.z;
    let sections: Vec<(f64, Vec<[P2; 2]>)> = (0..n)
        .map(|i| {
            let z = bb.min.z + span * (i as f64 + 0.5) / n as f64;
            (z, slice(mesh, z))
        })
        .collect();
    grade(&sections, printer, opts)
}
