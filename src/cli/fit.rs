//! `spanwright fit`: does every part fit the printer, how to lay it, how many per plate.

use super::{load, Context, Verdict};
use anyhow::Context as _;
use spanwright::atomic::Batch;
use spanwright::check::CheckedPart;
use spanwright::design::Design;
use spanwright::export::{write_mesh_to, MeshFormat};
use spanwright::fit::{
    self, fit_part, plan_job, plate_svg, FitFigures, FitOptions, JobItem, JobPlan, JobReport,
    LayoutOptions, PoseClass, PrintOptions, PrintabilityOptions, Printer, PrinterSpec, Volume,
    MAX_COPIES,
};
use spanwright::mesh::TriMesh;
use spanwright::pipeline::{self, Outcome, PartKind};
use spanwright::segment::{Plan, Split};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// Arguments of `spanwright fit`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The part: an STL file, or a design file (.toml or .csv) whose parts are built first.
    input: PathBuf,
    /// Section for every station of a bare CSV table.
    #[arg(long, short)]
    section: Option<String>,
    /// Printer size preset: small-180, medium-220, large-300 (boxes) or round-200.
    #[arg(long)]
    printer: Option<String>,
    /// Box build volume X,Y,Z in mm (overrides the preset and the design file).
    #[arg(long, value_delimiter = ',', num_args = 1, value_name = "X,Y,Z")]
    volume: Option<Vec<f64>>,
    /// Round bed DIAMETER,HEIGHT in mm.
    #[arg(long, value_delimiter = ',', num_args = 1, value_name = "D,H")]
    round: Option<Vec<f64>>,
    /// Distance kept from the walls and the top, mm (default 5).
    #[arg(long)]
    margin: Option<f64>,
    /// Gap kept between parts on a plate, mm (default 5).
    #[arg(long)]
    clearance: Option<f64>,
    /// Nozzle diameter, mm (default 0.4).
    #[arg(long)]
    nozzle: Option<f64>,
    /// Smallest printable wall, mm (default 0.8).
    #[arg(long)]
    min_feature: Option<f64>,
    /// Copies of the blade (of an STL part) to lay out (default: the design's blade
    /// count, else 1; at most 1000).
    #[arg(long)]
    copies: Option<usize>,
    /// Angular resolution of the orientation search, degrees.
    #[arg(long, default_value_t = 0.5)]
    resolution: f64,
    /// Pose for the blade: root-down, tip-down, pressure-side-down, suction-side-down,
    /// leading-edge-down or trailing-edge-down (default: the best score: least support,
    /// layers along the span, enough bed contact).
    #[arg(long, value_name = "POSE")]
    pose: Option<String>,
    /// Folder for the plate files (STL, 3MF, SVG).
    #[arg(long, short, default_value = "out")]
    out: PathBuf,
    /// Do not write plate files.
    #[arg(long)]
    no_files: bool,
    /// Also check whether the assembled rotor fits as one part: the design's real
    /// assembly (pitch, cone, hub) when it has a [rotor] table, else the copies turned by
    /// 360/N degrees each about the rotor axis (y, blade frame).
    #[arg(long)]
    assembled: bool,
    /// Split a design's blade into segments that fit this printer: auto (the fewest),
    /// radii in mm (260,430), or none; overrides the design's [segments] split.
    #[arg(long, value_name = "auto|none|R,R,...")]
    split: Option<String>,
    /// Print the report as JSON on standard output.
    #[arg(long)]
    json: bool,
}

const CAUTION: &str = "Caution: fitting the printer says nothing about strength. Printed blades carry centrifugal and aerodynamic loads; check them against the material's data and follow local codes and licensed engineering practice before running a rotor.";

/// What `fit` reports, for people and scripts.
#[derive(Debug, serde::Serialize)]
struct FitSummary {
    #[serde(flatten)]
    job: JobReport,
    assembled: Option<Assembled>,
    files: Vec<String>,
    notes: Vec<String>,
    segments: Option<Plan>,
    #[serde(skip)]
    blade: String,
    caution: &'static str,
}

/// The assembled rotor as one part.
#[derive(Debug, serde::Serialize)]
struct Assembled {
    blades: usize,
    with_hub: bool,
    #[serde(flatten)]
    pose: FitFigures,
}

/// Runs the subcommand.
pub fn run(args: Args, ctx: &Context) -> anyhow::Result<Verdict> {
    let cli_spec = spec_from_args(&args)?;
    check_args(&args)?;
    let stl = load::has_extension(&args.input, "stl");
    let split = match &args.split {
        Some(_) if stl => {
            anyhow::bail!("--split needs a design file (.toml or .csv), not an STL part")
        }
        Some(text) => Some(
            text.parse::<Split>()
                .map_err(|e| anyhow::anyhow!("--split {e}"))?,
        ),
        None => None,
    };
    let (parts, outcome, printer) = if stl {
        let printer = resolve_printer(&args, cli_spec, None)?;
        (vec![load::stl_part(&args.input)?], None, printer)
    } else {
        let design = load::design(&args.input, args.section.as_deref())?;
        let spec = design.table_mm::<PrinterSpec>("printer")?;
        let printer = resolve_printer(&args, cli_spec, spec)?;
        let opts = pipeline::Options {
            split,
            printer: Some(printer),
            ..pipeline::Options::default()
        };
        let outcome = pipeline::run(&design, &opts)
            .with_context(|| format!("building the parts of {}", args.input.display()))?;
        (Vec::new(), Some((outcome, design)), printer)
    };
    let pose = match &args.pose {
        Some(name) => Some(name.parse::<PoseClass>().context("--pose")?),
        None => None,
    };
    let job = job_items(&parts, outcome.as_ref(), args.copies, pose);
    let fit_opts = FitOptions {
        resolution_deg: args.resolution,
        ..FitOptions::DEFAULT
    };
    let layout_opts = LayoutOptions {
        fit: fit_opts,
        ..LayoutOptions::DEFAULT
    };
    let plan = plan_job(&job, &printer, &layout_opts, &PrintabilityOptions::DEFAULT)?;
    let assembled = if args.assembled {
        Some(assembled(
            outcome.as_ref().map(|(o, _)| o),
            &job,
            &printer,
            &fit_opts,
        )?)
    } else {
        None
    };
    // Plates are written only for a job that fits whole: a partial set would mislead.
    let files = if plan.report.fits && !args.no_files {
        write_plates(&plan, &printer, &args.out, &file_stem(&args.input))?
    } else {
        Vec::new()
    };
    let summary = FitSummary {
        notes: notes(&plan.report, outcome.as_ref().map(|(o, _)| o), stl),
        job: plan.report,
        assembled,
        files: files.iter().map(|p| p.display().to_string()).collect(),
        segments: outcome.as_ref().and_then(|(o, _)| o.segments.clone()),
        blade: outcome
            .as_ref()
            .map_or_else(String::new, |(o, _)| o.blade.name.clone()),
        caution: CAUTION,
    };
    if args.json {
        outln!("{}", serde_json::to_string_pretty(&summary)?);
    } else if !ctx.quiet {
        super::emit(&text(&summary));
    }
    Ok(if summary.job.fits {
        Verdict::Done
    } else {
        Verdict::Failed
    })
}

/// The values the command line gives, checked.
fn check_args(a: &Args) -> anyhow::Result<()> {
    if !(a.resolution.is_finite() && a.resolution > 0.0 && a.resolution <= 10.0) {
        anyhow::bail!(
            "--resolution {}: give an angle in degrees between 0 and 10 (0.5 is the default)",
            a.resolution
        );
    }
    if let Some(n) = a.copies {
        if n == 0 || n > MAX_COPIES {
            anyhow::bail!(
                "--copies {n}: give a whole number from 1 to {MAX_COPIES} (the blade count is the default)"
            );
        }
    }
    Ok(())
}

fn spec_from_args(a: &Args) -> anyhow::Result<PrinterSpec> {
    let mut spec = PrinterSpec {
        preset: a.printer.clone(),
        margin: a.margin,
        clearance: a.clearance,
        nozzle: a.nozzle,
        min_feature: a.min_feature,
        ..Default::default()
    };
    if let Some(v) = &a.volume {
        let [x, y, z] = v[..] else {
            anyhow::bail!("--volume {v:?}: give three lengths in mm, as --volume 220,220,250");
        };
        spec.volume = Some([x, y, z]);
        spec.preset = None;
    }
    if let Some(r) = &a.round {
        let [d, h] = r[..] else {
            anyhow::bail!("--round {r:?}: give a diameter and a height in mm, as --round 200,300");
        };
        if spec.volume.is_some() {
            anyhow::bail!("--volume and --round both given: choose one bed shape");
        }
        spec.diameter = Some(d);
        spec.height = Some(h);
        spec.preset = None;
    }
    Ok(spec)
}

/// The printer: the command line's bed replaces the design's as a whole; other values
/// given on the command line override the design's one by one.
fn resolve_printer(
    args: &Args,
    cli: PrinterSpec,
    file: Option<PrinterSpec>,
) -> anyhow::Result<Printer> {
    let origin = match &file {
        Some(_) => format!("command line and {} [printer]", args.input.display()),
        None => "command line".to_string(),
    };
    let spec = match file {
        Some(mut f) => {
            if cli.preset.is_some() || cli.volume.is_some() || cli.diameter.is_some() {
                f.preset = None;
                f.volume = None;
                f.diameter = None;
                f.height = None;
            }
            cli.or(&f)
        }
        None => cli,
    };
    if spec.preset.is_none() && spec.volume.is_none() && spec.diameter.is_none() {
        anyhow::bail!(
            "no printer given: use --printer ({}), --volume X,Y,Z or --round D,H (mm), or a [printer] table in the design file",
            fit::preset_names()
        );
    }
    Ok(spec.resolve(&origin)?)
}

/// What goes to the printer: a design's job (see [`pipeline::design_job`]: the one-piece
/// rotor, or the blade or each of its segments once per blade, and the hub), or the STL
/// part (`--copies` copies of it).
fn job_items<'a>(
    stl: &'a [CheckedPart],
    outcome: Option<&'a (Outcome, Design)>,
    copies: Option<usize>,
    pose: Option<PoseClass>,
) -> Vec<JobItem<'a>> {
    match outcome {
        Some((o, design)) => pipeline::design_job(o, design, copies, pose),
        None => stl
            .iter()
            .map(|part| JobItem {
                part,
                copies: copies.unwrap_or(1),
                print: PrintOptions::DEFAULT,
                span: None,
            })
            .collect(),
    }
}

/// The assembled rotor as one part: the outcome's rotor bodies (blades placed with
/// pitch and cone, and the hub), else the first part's copies turned about the rotor
/// axis (y).
fn assembled(
    outcome: Option<&Outcome>,
    job: &[JobItem<'_>],
    printer: &Printer,
    opts: &FitOptions,
) -> anyhow::Result<Assembled> {
    let (envelope, blades, with_hub) = match outcome.and_then(|o| o.part(PartKind::Rotor)) {
        Some(rotor) => {
            let mut m = TriMesh::new();
            for b in &rotor.bodies {
                m.append(b.mesh());
            }
            let hub = outcome.is_some_and(|o| o.part(PartKind::Hub).is_some());
            let blades = rotor.bodies.len() - usize::from(hub);
            (m, blades, hub)
        }
        None => {
            let item = job[0];
            (
                turned_copies(item.part.mesh(), item.copies),
                item.copies,
                false,
            )
        }
    };
    let f = fit_part("rotor", &envelope, printer, opts)?;
    Ok(Assembled {
        blades,
        with_hub,
        pose: FitFigures::of(&f),
    })
}

/// `n` copies of a mesh turned by 360/n degrees each about the rotor axis (the y axis of
/// the blade frame, see `spanwright::conventions`), as one mesh (for fitting only).
fn turned_copies(mesh: &TriMesh, n: usize) -> TriMesh {
    let mut out = TriMesh::new();
    for k in 0..n {
        let turn = nalgebra::Rotation3::from_axis_angle(
            &nalgebra::Vector3::y_axis(),
            std::f64::consts::TAU * k as f64 / n as f64,
        )
        .to_homogeneous();
        out.append(&mesh.transformed(&turn));
    }
    out
}

/// The input's file stem, for the plate files.
fn file_stem(input: &Path) -> String {
    input
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "part".into())
}

/// Writes each plate as STL, 3MF and an SVG top view, all in one batch.
fn write_plates(
    plan: &JobPlan,
    printer: &Printer,
    dir: &Path,
    stem: &str,
) -> anyhow::Result<Vec<PathBuf>> {
    let Some(layout) = &plan.layout else {
        return Ok(Vec::new());
    };
    std::fs::create_dir_all(dir)
        .with_context(|| format!("creating the output folder {}", dir.display()))?;
    let mut batch = Batch::new();
    let count = layout.plates.len();
    for (k, plate) in layout.plates.iter().enumerate() {
        let placed = plan.plate(k);
        let base = dir.join(format!("{stem}-plate-{}", k + 1));
        for format in [MeshFormat::Stl, MeshFormat::ThreeMf] {
            let name = format!("{stem}-plate-{}", k + 1);
            batch.write(&base.with_extension(format.extension()), |w| {
                write_mesh_to(w, format, &name, &placed)
            })?;
        }
        let svg = plate_svg(
            plate,
            printer,
            &format!("{stem}: plate {} of {count}", k + 1),
        );
        batch.write(&base.with_extension("svg"), |w| w.write_all(svg.as_bytes()))?;
    }
    Ok(batch.commit()?)
}

/// Remarks that depend on where the parts came from.
fn notes(report: &JobReport, outcome: Option<&Outcome>, stl: bool) -> Vec<String> {
    let mut out = Vec::new();
    if let Some(o) = outcome {
        if o.part(PartKind::OnePiece).is_some() {
            out.push(
                "the design asks for a one-piece rotor: it is fitted and laid out as one part"
                    .to_string(),
            );
        }
    }
    if !report.unplaced.is_empty() {
        out.push(format!(
            "not placed on any plate: {}; the job does not fit this printer",
            report.unplaced.join(", ")
        ));
    }
    if stl {
        out.push("printability reads the file's z axis as the span (the blade frame of spanwright's own files)".to_string());
    }
    out
}

fn text(s: &FitSummary) -> String {
    let mut t = String::new();
    if let Some(plan) = &s.segments {
        t.push_str("segments of the blade:\n");
        t.push_str(&super::segments::lines(plan, &s.blade));
    }
    let printer = &s.job.printer;
    let (a, b, h) = printer.available();
    let _ = match printer.volume {
        Volume::Box { x, y, z } => writeln!(
            t,
            "printer: box {x} x {y} x {z} mm, margin {} mm (usable {a:.1} x {b:.1} x {h:.1} mm), clearance {} mm",
            printer.margin, printer.clearance
        ),
        Volume::Round { diameter, height } => writeln!(
            t,
            "printer: round bed {diameter} mm, height {height} mm, margin {} mm (usable diameter {a:.1}, height {h:.1} mm), clearance {} mm",
            printer.margin, printer.clearance
        ),
    };
    for p in &s.job.parts {
        part_text(&mut t, p);
    }
    if let Some(plates) = &s.job.plates {
        let _ = writeln!(t);
        let n: usize = plates.iter().map(Vec::len).sum();
        let _ = writeln!(t, "{n} parts on {} plate(s):", plates.len());
        for (k, p) in plates.iter().enumerate() {
            let names: Vec<&str> = p.iter().map(|x| x.name.as_str()).collect();
            let _ = writeln!(t, "  plate {}: {}", k + 1, names.join(", "));
        }
    }
    let _ = writeln!(
        t,
        "\n{}",
        if s.job.fits {
            "verdict: FITS (every part is on a plate)".to_string()
        } else {
            format!(
                "verdict: DOES NOT FIT ({} of the job's parts on no plate)",
                s.job.unplaced.len()
            )
        }
    );
    if let Some(a) = &s.assembled {
        let p = &a.pose;
        let _ =
            writeln!(
            t,
            "assembled rotor ({} blades about the y axis{}): {}; size {:.1} x {:.1} x {:.1} mm{}",
            a.blades,
            if a.with_hub { ", with the hub, bodies separate as assembled" } else { "" },
            if p.fits { "FITS as one part" } else { "does not fit as one part" },
            p.size[0],
            p.size[1],
            p.size[2],
            match (p.fits, p.scale_to_fit) {
                (false, Some(k)) => format!(", overshoot {:.1} mm, scale {k:.3} fits", p.overshoot),
                _ => String::new(),
            }
        );
    }
    for n in &s.notes {
        let _ = writeln!(t, "note: {n}");
    }
    for f in &s.files {
        let _ = writeln!(t, "wrote {f}");
    }
    let _ = writeln!(t, "\n{CAUTION}");
    t
}

fn part_text(t: &mut String, p: &fit::PartFit) {
    let f = &p.pose;
    let _ = writeln!(t);
    let copies = if p.copies > 1 {
        format!(" (x{})", p.copies)
    } else {
        String::new()
    };
    let _ = writeln!(
        t,
        "{}{copies}: {}",
        p.name,
        if f.fits { "FITS" } else { "DOES NOT FIT" }
    );
    let ang = f.angles_deg;
    let _ = writeln!(
        t,
        "  rotation: {:.2} deg about x, then {:.2} about y, then {:.2} about z",
        ang[0], ang[1], ang[2]
    );
    for r in f.rotation {
        let _ = writeln!(t, "    [{:9.6} {:9.6} {:9.6}]", r[0], r[1], r[2]);
    }
    let _ = writeln!(
        t,
        "  size on the bed: {:.2} x {:.2} x {:.2} mm; gap to walls x {:.2}, y {:.2}, top {:.2} mm",
        f.size[0], f.size[1], f.size[2], f.wall_gap[0], f.wall_gap[1], f.wall_gap[2]
    );
    if let (false, Some(k)) = (f.fits, f.scale_to_fit) {
        let _ = writeln!(
            t,
            "  smallest overshoot found: {:.2} mm; a uniform scale of {k:.4} fits this orientation",
            f.overshoot
        );
    }
    let _ = writeln!(
        t,
        "  overhang (faces down, over 45 deg from vertical): {:.0} mm^2; resting on the bed: {:.0} mm^2",
        f.overhang_area, f.bed_contact
    );
    let _ = writeln!(
        t,
        "  search: {:.2} deg resolution; any orientation with {:.2} mm to spare on every axis is found{}",
        f.resolution_deg,
        f.guarantee,
        if f.complete { "" } else { " (search stopped early: not guaranteed)" }
    );
    pose_text(t, p);
    let c = &p.printability;
    if p.orientation
        .poses
        .iter()
        .all(|q| q.span_to_layers_deg.is_none())
    {
        return; // not a blade: trailing edge and sections along a span do not apply
    }
    if p.findings.is_empty() {
        if let (Some((_, te)), Some((_, th))) = (c.min_te(), c.min_thickness()) {
            let _ = writeln!(
                t,
                "  printability: thinnest trailing edge {:.2} mm, thinnest section {:.2} mm: ok for a {:.2} mm nozzle",
                te.te_thickness, th.thickness, c.nozzle
            );
        }
    }
    for line in &p.findings {
        let _ = writeln!(t, "  printability: {line}");
    }
}

/// The pose chosen, why, the others offered, and the print advice.
fn pose_text(t: &mut String, p: &fit::PartFit) {
    let o = &p.orientation;
    let chosen = o.pose();
    let class = |q: &fit::Pose| match q.class {
        Some(c) => c.name().to_string(),
        None => format!("up ({:.2}, {:.2}, {:.2})", q.up[0], q.up[1], q.up[2]),
    };
    let _ = writeln!(
        t,
        "  pose: {}{}",
        class(chosen),
        chosen.span_to_layers_deg.map_or(String::new(), |a| format!(
            ", span {a:.0} deg from the layers"
        ))
    );
    for why in &o.why {
        let _ = writeln!(t, "    {why}");
    }
    if o.poses.len() > 1 {
        let _ = writeln!(t, "  poses offered (support / bed contact mm^2, score):");
        for (k, q) in o.poses.iter().enumerate() {
            let _ = writeln!(
                t,
                "    {} {:<20} {:>7.0} / {:>6.0}  {:.3}",
                if k == o.chosen { "*" } else { " " },
                class(q),
                q.underside.overhang_area,
                q.underside.contact_area,
                q.score
            );
        }
    }
    let a = &p.advice;
    let _ = writeln!(
        t,
        "  supports: {}; {}",
        if a.supports { "needed" } else { "none" },
        a.supports_why
    );
    let _ = writeln!(
        t,
        "  brim: {}; {}",
        if a.brim { "advised" } else { "not needed" },
        a.brim_why
    );
    if let Some(l) = &a.layers_why {
        let _ = writeln!(t, "  layers: {l}");
    }
    if let Some(te) = &a.trailing_edge {
        let _ = writeln!(t, "  trailing edge: {}", te.why);
    }
}
