//! `spanwright build`: design table in, checked solids out.

use super::variants::{run_all, Done};
use super::{load, progress::Stages, Context, Verdict};
use anyhow::Context as _;
use spanwright::assembly::hand_description;
use spanwright::atomic::Batch;
use spanwright::coupon::{self, Coupon, CouponError, CouponKind, CouponOptions};
use spanwright::design::variants::{variants, Variant};
use spanwright::design::Design;
use spanwright::export::{file_name, stage_outcome, write_mesh_to, Format, StepNote};
use spanwright::pipeline::{self, Options, Outcome, SteepStep, TeChange, Timings};
use spanwright::props::{Fill, Material};
use spanwright::report::SummaryRow;
use spanwright::segment::{Plan, Split};
use std::path::{Path, PathBuf};
use std::time::Instant;

/// Arguments of `spanwright build`.
#[derive(Debug, clap::Args)]
#[command(after_help = "Examples:
  spanwright build examples/garden-turbine.toml
  spanwright build table.csv --section naca4412 --format stl,3mf,step
  spanwright build examples/desk-fan.toml --tolerance 0.005 --out prints/")]
pub struct Args {
    /// Design file: a TOML design, or a CSV station table (with --section when the table
    /// has no section column).
    pub design: PathBuf,
    /// Section for every station of a bare CSV table (a designation such as naca4412, or
    /// a section file).
    #[arg(long, short)]
    pub section: Option<String>,
    /// Output folder (created when missing).
    #[arg(long, short, default_value = "out")]
    pub out: PathBuf,
    /// Output formats, comma separated: stl, stl-ascii, obj, 3mf, step.
    #[arg(long, short, value_delimiter = ',', default_value = "stl")]
    pub format: Vec<String>,
    /// Largest distance between mesh and exact surface, mm (overrides the design; more
    /// than 0 and at most 10).
    #[arg(long, short)]
    pub tolerance: Option<f64>,
    /// Print the summary as JSON.
    #[arg(long)]
    pub json: bool,
    /// Print the time each stage took.
    #[arg(long)]
    pub timings: bool,
    /// Write the blade only, even when the design has a [rotor] table (which otherwise
    /// also writes the hub, the assembled rotor and the one-piece rotor it asks for).
    #[arg(long)]
    pub blade_only: bool,
    /// Fit coupons, a few grams to print before the rotor: the shank in its socket
    /// (<name>-coupon-shank, <name>-coupon-socket) and a split blade's pins and rod in a
    /// slice at its first joint (<name>-coupon-joint). auto writes them with the parts
    /// when the design has them; none; only writes just the coupons.
    #[arg(long, value_enum, default_value_t = Coupons::Auto)]
    pub coupons: Coupons,
    /// Split the blade into segments: auto (the fewest that fit the design's [printer]),
    /// radii in mm (260,430), or none; overrides the design's [segments] split.
    #[arg(long, value_name = "auto|none|R,R,...")]
    pub split: Option<String>,
}

/// When `build` writes fit coupons.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Coupons {
    /// With the parts, when the design has a root shank and hub sockets, or segments.
    Auto,
    /// Never.
    None,
    /// Only the coupons (an error when the design has nothing to test).
    Only,
}

/// Runs the subcommand.
pub fn run(args: Args, ctx: &Context) -> anyhow::Result<Verdict> {
    let started = Instant::now();
    let formats = parse_formats(&args.format)?;
    if let Some(t) = args.tolerance {
        check_tolerance(t)?;
    }
    let stages = Stages::new(ctx, 3);
    stages.set("reading the design");
    let mut timings = Timings::default();
    let design = timings.time("parse", || {
        load::design(&args.design, args.section.as_deref())
    })?;
    let split = match &args.split {
        Some(text) => Some(
            text.parse::<Split>()
                .map_err(|e| anyhow::anyhow!("--split {e}"))?,
        ),
        None => None,
    };
    let opts = Options {
        tolerance: args.tolerance,
        blade_only: args.blade_only,
        split,
        printer: None,
    };
    let variants = variants(&design)?;
    if !variants.is_empty() {
        stages.finish();
        return build_variants(&args, ctx, &formats, &opts, &design, &variants);
    }
    stages.set("lofting, meshing and checking");
    let outcome = pipeline::run(&design, &opts);
    stages.finish();
    let outcome = outcome.with_context(|| format!("building {}", args.design.display()))?;
    timings.extend(&outcome.timings);
    let coupons = coupons_for(&outcome, args.coupons)?;
    stages.set("writing files");
    let only = args.coupons == Coupons::Only;
    let (written, notes) = write_files(
        &outcome,
        design.blade.rotation,
        &coupons,
        only,
        &args.out,
        &formats,
        &mut timings,
    )?;
    let mut summary = Summary::of(&design, &outcome, &written, &notes, &timings, started);
    summary.coupons = coupons.iter().map(CouponLine::of).collect();
    if args.json {
        outln!("{}", serde_json::to_string_pretty(&summary)?);
    } else if !ctx.quiet {
        super::emit(&summary.text(args.timings));
    }
    Ok(Verdict::Done)
}

/// Builds every variant of the design side by side, each in its own folder, and writes
/// the summary table (see `cli::variants`). Masses are for PLA with the default fill
/// (1.2 mm walls, 20 % infill); `report` takes a material.
fn build_variants(
    args: &Args,
    ctx: &Context,
    formats: &[Format],
    opts: &Options,
    design: &Design,
    variants: &[Variant],
) -> anyhow::Result<Verdict> {
    let only = args.coupons == Coupons::Only;
    let material = Material::preset("pla").context("the PLA preset")?;
    let finished = run_all(design, variants, &args.out, true, |v, dir| {
        let outcome = pipeline::run(&v.design, opts)?;
        let coupons = coupons_for(&outcome, args.coupons)?;
        let mut timings = outcome.timings.clone();
        let (batch, notes) = stage_files(
            &outcome,
            v.design.blade.rotation,
            &coupons,
            only,
            dir,
            formats,
            &mut timings,
        )?;
        let row = SummaryRow::of(
            &v.name,
            &v.name,
            &v.design,
            &outcome,
            &material,
            Fill::DEFAULT,
            None,
        )?;
        let mut lines: Vec<String> = outcome
            .warnings
            .iter()
            .map(|w| format!("warning: variant \"{}\": {w}", v.name))
            .collect();
        lines.extend(
            notes
                .iter()
                .map(|n| format!("note: variant \"{}\": {n}", v.name)),
        );
        Ok(Done {
            row,
            batch,
            extra: lines,
        })
    })?;
    if args.json {
        outln!("{}", finished.json(&design.name)?);
    } else if !ctx.quiet {
        let heading = format!(
            "{}: {} variants (blade mass for PLA, walls 1.2 mm, infill 20 %)",
            design.name,
            finished.rows.len()
        );
        super::emit(&finished.text(&heading, finished.extras.iter().flatten()));
    }
    Ok(Verdict::Done)
}

/// The formats named on the command line.
fn parse_formats(names: &[String]) -> anyhow::Result<Vec<Format>> {
    let mut out: Vec<Format> = Vec::new();
    for name in names {
        let f: Format = name.parse().context("--format")?;
        if !out.contains(&f) {
            out.push(f);
        }
    }
    Ok(out)
}

/// `--tolerance` takes the same range as the design's `tolerance` key.
fn check_tolerance(t: f64) -> anyhow::Result<()> {
    let hi = spanwright::design::MAX_TOLERANCE;
    if !(t > 0.0 && t <= hi) {
        anyhow::bail!("--tolerance {t}: give a length in mm more than 0 and at most {hi} (0.01 is a fine print, 0.001 a machining file)");
    }
    Ok(())
}

/// The fit coupons `--coupons` asks for: none, or those of the design (none in `auto`
/// mode when it has nothing to test; an error in `only` mode).
fn coupons_for(outcome: &Outcome, when: Coupons) -> anyhow::Result<Vec<Coupon>> {
    match (when, coupon::coupons(outcome, &CouponOptions::DEFAULT)) {
        (Coupons::None, _) => Ok(Vec::new()),
        (Coupons::Auto, Err(CouponError::NothingToTest { .. })) => Ok(Vec::new()),
        (_, result) => Ok(result.context("--coupons")?),
    }
}

/// Writes every part in every format (only the coupons with `only`), the coupons in the
/// mesh formats, and the root-transition picture, as one batch: all files appear, or
/// none.
fn write_files(
    outcome: &Outcome,
    rotation: spanwright::design::Rotation,
    coupons: &[Coupon],
    only: bool,
    dir: &Path,
    formats: &[Format],
    timings: &mut Timings,
) -> anyhow::Result<(Vec<PathBuf>, Vec<StepNote>)> {
    let (batch, notes) = stage_files(outcome, rotation, coupons, only, dir, formats, timings)?;
    Ok((batch.commit()?, notes))
}

/// Stages the files [`write_files`] writes, in a batch not yet committed.
fn stage_files(
    outcome: &Outcome,
    rotation: spanwright::design::Rotation,
    coupons: &[Coupon],
    only: bool,
    dir: &Path,
    formats: &[Format],
    timings: &mut Timings,
) -> anyhow::Result<(Batch, Vec<StepNote>)> {
    std::fs::create_dir_all(dir)
        .with_context(|| format!("cannot create the output folder {}", dir.display()))?;
    let mut batch = Batch::new();
    // The previews are drawn while the part files are written and the root transition
    // drawn (none needs another).
    let ((staged, writers, transition), pictures) = rayon::join(
        || {
            let mut t = Timings::default();
            let staged = if only {
                Ok(Vec::new())
            } else {
                stage_outcome(&mut batch, outcome, dir, formats, &mut t)
            };
            // A picture of the root transition: outlines from root face to tip, along
            // the span.
            let transition = (!only && outcome.blade.blade.root().is_some())
                .then(|| spanwright::report::transition_svg(&outcome.blade.blade, 12));
            (staged, t, transition)
        },
        || {
            (!only).then(|| {
                let start = std::time::Instant::now();
                let pictures = spanwright::report::previews(outcome, rotation);
                (pictures, start.elapsed().as_secs_f64())
            })
        },
    );
    timings.extend(&writers);
    let notes = staged?;
    for c in coupons {
        for &format in formats {
            let name = c.part.name();
            match format {
                Format::Mesh(m) => {
                    let path = dir.join(file_name(name, format));
                    batch.write(&path, |w| {
                        write_mesh_to(w, m, name, std::slice::from_ref(&c.part))
                    })?;
                }
                Format::Step => {
                    let path = dir.join(file_name(name, format));
                    let text = spanwright::export::prism_step_text(name, &c.loops, c.length)?;
                    batch.write(&path, |w| w.write_all(text.as_bytes()))?;
                }
            }
        }
    }
    if let Some(svg) = transition {
        let path = dir.join(format!("{}-transition.svg", outcome.blade.name));
        batch.write(&path, |w| w.write_all(svg.as_bytes()))?;
    }
    if let Some((pictures, seconds)) = pictures {
        timings.add("previews", seconds);
        for (name, png) in pictures {
            batch.write(&dir.join(name), |w| w.write_all(&png))?;
        }
    }
    Ok((batch, notes))
}

/// What a build made, for people and scripts.
#[derive(Debug, serde::Serialize)]
struct Summary {
    name: String,
    stations: usize,
    rings: usize,
    triangles: usize,
    vertices: usize,
    volume_mm3: f64,
    tolerance_mm: f64,
    /// Proven bound of the mesh's distance from the skin (the B-spline surface), mm.
    measured_deviation_mm: f64,
    /// Largest distance of the skin from the blade the design describes, measured, mm.
    skin_to_design_mm: f64,
    /// Their sum: how far the mesh may be from the design's blade, mm.
    mesh_to_design_mm: f64,
    trailing_edges_opened: Vec<TeChange>,
    area_mm2: f64,
    bounding_box_mm: [[f64; 3]; 2],
    parts: Vec<PartLine>,
    rotor: Option<String>,
    segments: Option<Plan>,
    warnings: Vec<SteepStep>,
    coupons: Vec<CouponLine>,
    step_notes: Vec<StepNote>,
    files: Vec<String>,
    timings: Timings,
    seconds: f64,
}

/// One fit coupon of the summary.
#[derive(Debug, serde::Serialize)]
struct CouponLine {
    kind: coupon::CouponKind,
    name: String,
    volume_mm3: f64,
    clearance_mm: f64,
}

impl CouponLine {
    fn of(c: &Coupon) -> CouponLine {
        CouponLine {
            kind: c.kind,
            name: c.part.name().to_string(),
            volume_mm3: c.part.report().volume,
            clearance_mm: c.clearance,
        }
    }
}

/// One part of the summary.
#[derive(Debug, serde::Serialize)]
struct PartLine {
    kind: pipeline::PartKind,
    name: String,
    bodies: usize,
    triangles: usize,
    volume_mm3: f64,
}

impl Summary {
    fn of(
        design: &Design,
        outcome: &Outcome,
        files: &[PathBuf],
        notes: &[StepNote],
        timings: &Timings,
        started: Instant,
    ) -> Summary {
        let blade = outcome.blade_part();
        let report = blade.report();
        let mesh = blade.mesh();
        let bb = mesh
            .bounding_box()
            .map_or([[0.0; 3]; 2], |b| [b.min.into(), b.max.into()]);
        Summary {
            name: outcome.blade.name.clone(),
            stations: outcome.blade.sections.len(),
            rings: outcome.blade.ring_radii.len(),
            triangles: mesh.len(),
            vertices: mesh.vertices.len(),
            volume_mm3: report.volume,
            tolerance_mm: outcome.blade.tolerance,
            measured_deviation_mm: outcome.blade.deviation,
            skin_to_design_mm: outcome.blade.skin_to_design,
            mesh_to_design_mm: outcome.blade.mesh_to_design(),
            trailing_edges_opened: outcome.blade.te_changes.clone(),
            area_mm2: report.area,
            bounding_box_mm: bb,
            parts: outcome
                .parts
                .iter()
                .map(|p| PartLine {
                    kind: p.kind,
                    name: p.name.clone(),
                    bodies: p.bodies.len(),
                    triangles: p.bodies.iter().map(|b| b.mesh().len()).sum(),
                    volume_mm3: p.bodies.iter().map(|b| b.report().volume).sum(),
                })
                .collect(),
            rotor: outcome
                .rotor
                .as_ref()
                .map(|r| hand_description(&r.spec, design.blade.rotation, design.blade.flow)),
            segments: outcome.segments.clone(),
            warnings: outcome.warnings.clone(),
            coupons: Vec::new(),
            step_notes: notes.to_vec(),
            files: files.iter().map(|p| p.display().to_string()).collect(),
            timings: timings.clone(),
            seconds: started.elapsed().as_secs_f64(),
        }
    }

    fn text(&self, with_timings: bool) -> String {
        use std::fmt::Write as _;
        let mut s = String::new();
        for w in &self.warnings {
            let _ = writeln!(s, "warning: {w}");
        }
        let [lo, hi] = self.bounding_box_mm;
        let _ = writeln!(
            s,
            "{}: {} stations, {} rings lofted",
            self.name, self.stations, self.rings
        );
        let _ = writeln!(
            s,
            "  mesh: {} triangles, {} vertices; closed, oriented, no self-intersection",
            self.triangles, self.vertices
        );
        let _ = writeln!(
            s,
            "  deviation from the design: at most {:.4} mm (tolerance {} mm): mesh to surface {:.4} mm (proven bound), surface to design {:.4} mm (measured)",
            self.mesh_to_design_mm, self.tolerance_mm, self.measured_deviation_mm, self.skin_to_design_mm
        );
        let _ = writeln!(
            s,
            "  volume {:.1} mm³ ({:.2} cm³), surface {:.1} mm²",
            self.volume_mm3,
            self.volume_mm3 / 1000.0,
            self.area_mm2
        );
        if let Some(line) = opened_line(&self.trailing_edges_opened, self.stations) {
            let _ = writeln!(s, "  {line}");
        }
        let _ = writeln!(
            s,
            "  box x {:.1}..{:.1}, y {:.1}..{:.1}, z {:.1}..{:.1} mm",
            lo[0], hi[0], lo[1], hi[1], lo[2], hi[2]
        );
        for p in self.parts.iter().skip(1) {
            let _ = writeln!(
                s,
                "  {}: {} bod{}, {} triangles, {:.1} cm³; checked{}",
                p.name,
                p.bodies,
                if p.bodies == 1 { "y" } else { "ies" },
                p.triangles,
                p.volume_mm3 / 1000.0,
                if p.bodies > 1 {
                    ", no two bodies meet"
                } else {
                    ""
                }
            );
        }
        if let Some(r) = &self.rotor {
            let _ = writeln!(s, "  rotor: {r}");
        }
        if !self.coupons.is_empty() {
            let list: Vec<String> = self
                .coupons
                .iter()
                .map(|c| format!("{} {:.2} cm³", c.name, c.volume_mm3 / 1000.0))
                .collect();
            let mut fits = Vec::new();
            if let Some(c) = self.coupons.iter().find(|c| c.kind == CouponKind::Socket) {
                fits.push(format!(
                    "the socket is {:.2} mm wider than the shank (rotor.hub.socket-clearance)",
                    c.clearance_mm
                ));
            }
            if let Some(c) = self.coupons.iter().find(|c| c.kind == CouponKind::Joint) {
                fits.push(format!(
                    "the joint's pin holes are {:.2} mm wider than the pins (segments.dowels.clearance)",
                    c.clearance_mm
                ));
            }
            let _ = writeln!(
                s,
                "  fit coupons: {}; {}: print them before the rotor",
                list.join(", "),
                fits.join("; ")
            );
        }
        if let Some(plan) = &self.segments {
            s.push_str(&super::segments::lines(plan, &self.name));
        }
        for n in &self.step_notes {
            let _ = writeln!(s, "  note: {n}");
        }
        if self.files.iter().any(|f| f.ends_with("-preview.png")) {
            let _ = writeln!(s, "  previews: {}", spanwright::report::PREVIEW_VIEW);
        }
        for f in &self.files {
            let _ = writeln!(s, "  wrote {f}");
        }
        if with_timings {
            let _ = writeln!(s, "  timings: {}", self.timings.line());
        }
        let _ = writeln!(s, "  {:.3} s", self.seconds);
        s
    }
}

/// The trailing edges opened for printing, in one line.
fn opened_line(opened: &[TeChange], stations: usize) -> Option<String> {
    if opened.is_empty() {
        return None;
    }
    let fold = |f: fn(&TeChange) -> f64, pick: fn(f64, f64) -> f64, start: f64| {
        opened.iter().map(f).fold(start, pick)
    };
    Some(format!(
        "trailing edge opened for printing at {} of {} stations: {:.3}..{:.3} mm -> {:.3} mm (section area +{:.2}..{:.2} mm²)",
        opened.len(),
        stations,
        fold(|t| t.before, f64::min, f64::INFINITY),
        fold(|t| t.before, f64::max, 0.0),
        fold(|t| t.after, f64::max, 0.0),
        fold(|t| t.added_area, f64::min, f64::INFINITY),
        fold(|t| t.added_area, f64::max, 0.0),
    ))
}
