//! A print job: every part a design produces, with its copies, fitted to one printer and
//! laid out on plates. The verdict accounts for every copy: each is on a plate, or the
//! job does not fit and the report names what was left over.

use super::{
    advise, fit_part, layout_fitted, printability, printability_of_blade, AdviceOptions, Fit,
    FitError, FitOptions, Layout, LayoutOptions, Orientation, Placement, PrintAdvice, PrintOptions,
    Printability, PrintabilityOptions, Printer, SpanLayout,
};
use crate::check::CheckedPart;
use crate::mesh::{Part, TriMesh};
use nalgebra::{IsometryMatrix3, Rotation3, Translation3};
use serde::Serialize;

/// Largest number of copies of one part a job takes (a sanity bound against a slip of
/// the finger, far above any rotor's blade count).
pub const MAX_COPIES: usize = 1000;

/// One part of a job and how many copies to print.
#[derive(Debug, Clone, Copy)]
pub struct JobItem<'a> {
    /// The checked part (in its own frame).
    pub part: &'a CheckedPart,
    /// Copies wanted, at least 1.
    pub copies: usize,
    /// How its pose is chosen: a blade's axes (for the layer term and pose classes) and
    /// a requested pose class.
    pub print: PrintOptions,
    /// A blade's regions along the span (root, transition, stations, tip), so that
    /// printability names where an edge is thin and what would change it there.
    pub span: Option<SpanLayout>,
}

/// Where a part sits and how: the answer of the orientation search, for people and
/// scripts.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FitFigures {
    /// True when the part fits the printer, margins kept.
    pub fits: bool,
    /// Rotation as angles about x, then y, then z, degrees.
    pub angles_deg: [f64; 3],
    /// Rotation matrix (rows: the printer's axes in part coordinates).
    pub rotation: [[f64; 3]; 3],
    /// Translation, mm.
    pub translation: [f64; 3],
    /// Extents on the bed x, y, z, mm.
    pub size: [f64; 3],
    /// Gaps to the walls (x, y) and the top, mm.
    pub wall_gap: [f64; 3],
    /// Largest overshoot, mm (0 when it fits).
    pub overshoot: f64,
    /// Largest uniform scale that fits this orientation (`None`: any).
    pub scale_to_fit: Option<f64>,
    /// Placement score (lower is better).
    pub score: Option<f64>,
    /// Area resting on the bed, mm².
    pub bed_contact: f64,
    /// Area that needs support, mm².
    pub overhang_area: f64,
    /// Angular resolution of the search, degrees.
    pub resolution_deg: f64,
    /// Any orientation with this much to spare on every axis is found, mm.
    pub guarantee: f64,
    /// False when the search stopped early (the guarantee then does not hold).
    pub complete: bool,
}

impl FitFigures {
    /// The pose of a search answer.
    pub fn of(f: &Fit) -> FitFigures {
        let finite = |v: f64| v.is_finite().then_some(v);
        FitFigures {
            fits: f.fits,
            angles_deg: f.placement.angles_deg(),
            rotation: rows(&f.placement.rotation),
            translation: f.placement.translation.into(),
            size: f.size,
            wall_gap: f.wall_gap,
            overshoot: f.overshoot,
            scale_to_fit: finite(f.scale_to_fit),
            score: finite(f.score),
            bed_contact: f.bed_contact,
            overhang_area: f.overhang_area,
            resolution_deg: f.resolution_deg,
            guarantee: f.guarantee,
            complete: f.complete,
        }
    }
}

/// One distinct part of the job.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PartFit {
    /// Part name.
    pub name: String,
    /// Copies asked for.
    pub copies: usize,
    /// Triangles in its mesh.
    pub triangles: usize,
    /// Its best pose alone on a plate.
    #[serde(flatten)]
    pub pose: FitFigures,
    /// The poses offered, the one chosen and why.
    pub orientation: Orientation,
    /// Supports, brim, layers and trailing edge for the chosen pose.
    pub advice: PrintAdvice,
    /// Printability along the span.
    pub printability: Printability,
    /// Printability findings in words.
    pub findings: Vec<String>,
}

/// One copy on a plate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlateItem {
    /// Copy name.
    pub name: String,
    /// Rotation matrix rows.
    pub rotation: [[f64; 3]; 3],
    /// Translation, mm.
    pub translation: [f64; 3],
    /// Extents once placed, mm.
    pub size: [f64; 3],
}

/// The answer for a whole job.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct JobReport {
    /// The printer.
    pub printer: Printer,
    /// True when every copy of every part is on a plate.
    pub fits: bool,
    /// Every distinct part, in job order.
    pub parts: Vec<PartFit>,
    /// Plates, each with its copies; `None` when no part fits the printer.
    pub plates: Option<Vec<Vec<PlateItem>>>,
    /// Copies that are on no plate (empty when the job fits).
    pub unplaced: Vec<String>,
}

/// A planned job: the report, the copies (named `<part>-<k>` when there are several)
/// and the layout that places them.
#[derive(Debug, Clone)]
pub struct JobPlan {
    /// The answer for people and scripts.
    pub report: JobReport,
    /// The copies of the parts that fit alone, in layout input order.
    pub copies: Vec<CheckedPart>,
    /// The plate layout of those copies, when there are any.
    pub layout: Option<Layout>,
}

/// The search answers of the distinct parts, for the layout: each copy takes its part's
/// pose, so the layout never searches again.
fn copy_fits(job: &[JobItem<'_>], fits: &[Fit]) -> Vec<Fit> {
    job.iter()
        .zip(fits)
        .flat_map(|(item, f)| std::iter::repeat_n(f.clone(), item.copies))
        .collect()
}

impl JobPlan {
    /// The copies on plate `k`, moved to their places: checked parts ready for a writer.
    pub fn plate(&self, k: usize) -> Vec<CheckedPart> {
        let Some(plate) = self.layout.as_ref().and_then(|l| l.plates.get(k)) else {
            return Vec::new();
        };
        plate
            .parts
            .iter()
            .map(|p| self.copies[p.part].placed(p.name.clone(), &isometry(&p.placement)))
            .collect()
    }
}

/// A placement as a rigid motion (its rotation is a proper rotation by construction).
pub fn isometry(p: &Placement) -> IsometryMatrix3<f64> {
    IsometryMatrix3::from_parts(
        Translation3::from(p.translation),
        Rotation3::from_matrix_unchecked(p.rotation),
    )
}

fn rows(m: &nalgebra::Matrix3<f64>) -> [[f64; 3]; 3] {
    [0, 1, 2].map(|i| [m[(i, 0)], m[(i, 1)], m[(i, 2)]])
}

/// Fits every part of `job` alone, then lays out every copy on plates.
///
/// # Errors
/// [`FitError`] from the search (a part with no usable vertices).
pub fn plan_job(
    job: &[JobItem<'_>],
    printer: &Printer,
    opts: &LayoutOptions,
    checks: &PrintabilityOptions,
) -> Result<JobPlan, FitError> {
    let (parts, fits): (Vec<PartFit>, Vec<Fit>) = job
        .iter()
        .map(|item| part_fit(item, printer, &opts.fit, checks))
        .collect::<Result<Vec<_>, _>>()?
        .into_iter()
        .unzip();
    // Only copies of parts that fit alone go to the layout; the others are named.
    let fitting: Vec<usize> = (0..job.len()).filter(|&k| parts[k].pose.fits).collect();
    let too_big = (0..job.len())
        .filter(|k| !fitting.contains(k))
        .flat_map(|k| copies_of(&job[k]))
        .map(|c| c.name().to_string());
    let copies: Vec<CheckedPart> = fitting.iter().flat_map(|&k| copies_of(&job[k])).collect();
    let layout = if copies.is_empty() {
        None
    } else {
        let input: Vec<Part> = copies.iter().map(|c| c.as_part().clone()).collect();
        let items: Vec<JobItem<'_>> = fitting.iter().map(|&k| job[k]).collect();
        let chosen: Vec<Fit> = fitting.iter().map(|&k| fits[k].clone()).collect();
        Some(layout_fitted(
            &input,
            copy_fits(&items, &chosen),
            printer,
            opts,
        )?)
    };
    let mut unplaced: Vec<String> = too_big.collect();
    unplaced.extend(unplaced_copies(&copies, layout.as_ref()));
    let plates = layout.as_ref().map(|l| {
        l.plates
            .iter()
            .map(|pl| {
                pl.parts
                    .iter()
                    .map(|x| PlateItem {
                        name: x.name.clone(),
                        rotation: rows(&x.placement.rotation),
                        translation: x.placement.translation.into(),
                        size: x.size,
                    })
                    .collect()
            })
            .collect()
    });
    Ok(JobPlan {
        report: JobReport {
            printer: *printer,
            fits: unplaced.is_empty(),
            parts,
            plates,
            unplaced,
        },
        copies,
        layout,
    })
}

fn part_fit(
    item: &JobItem<'_>,
    printer: &Printer,
    opts: &FitOptions,
    checks: &PrintabilityOptions,
) -> Result<(PartFit, Fit), FitError> {
    let mesh: &TriMesh = item.part.mesh();
    let opts = FitOptions {
        print: item.print,
        ..*opts
    };
    let fit = fit_part(item.part.name(), mesh, printer, &opts)?;
    let printability = match &item.span {
        Some(span) => printability_of_blade(mesh, span, printer, checks),
        None => printability(mesh, printer, checks),
    };
    // The trailing edge matters for blades only (parts with blade axes).
    let thinnest_te = item
        .print
        .axes
        .and_then(|_| printability.min_te())
        .map(|(_, c)| (c.te_thickness, Some(c.z)));
    let advice = advise(
        fit.orientation.pose(),
        printer,
        thinnest_te,
        &AdviceOptions::DEFAULT,
    );
    let part = PartFit {
        name: item.part.name().to_string(),
        copies: item.copies,
        triangles: mesh.len(),
        pose: FitFigures::of(&fit),
        orientation: fit.orientation.clone(),
        advice,
        findings: printability.findings(),
        printability,
    };
    Ok((part, fit))
}

/// The copies of one item: the part itself when one is wanted, else `<name>-1`, ...
fn copies_of(item: &JobItem<'_>) -> Vec<CheckedPart> {
    if item.copies == 1 {
        return vec![item.part.clone()];
    }
    (1..=item.copies)
        .map(|k| item.part.renamed(format!("{}-{k}", item.part.name())))
        .collect()
}

/// Names of the copies no plate holds: all of them without a layout.
fn unplaced_copies(copies: &[CheckedPart], layout: Option<&Layout>) -> Vec<String> {
    let mut placed = vec![false; copies.len()];
    if let Some(l) = layout {
        for p in l.plates.iter().flat_map(|pl| &pl.parts) {
            if let Some(slot) = placed.get_mut(p.part) {
                *slot = true;
            }
        }
    }
    copies
        .iter()
        .zip(placed)
        .filter(|(_, on)| !on)
        .map(|(c, _)| c.name().to_string())
        .collect()
}
