//! `spanwright report`: mass and section properties, balance, a stress estimate with
//! cautions, pictures (SVG) and reports (HTML, JSON).

use std::fmt::Write as _;
use std::io::IsTerminal as _;
use std::path::{Path, PathBuf};

use super::variants::{run_all, Done};
use super::{load, Verdict};
use anyhow::Context as _;
use spanwright::atomic::Batch;
use spanwright::design::variants::{variants, Variant};
use spanwright::design::Design;
use spanwright::pipeline;
use spanwright::props::{Fill, LoadCase, Material, ThrustSpread, CAUTIONS};
use spanwright::report::numbers::{number, Decimals, Decimals as D};
use spanwright::report::{self, Pictures, Report, ReportInput, SummaryRow, STEPS};

/// Arguments of `spanwright report`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The part: a design file (.toml or .csv) whose parts are built first, or STL files
    /// (mm). Sections and stress are for the first part, which must be one whole blade in
    /// the blade frame; with several STL files (the parts of a rotor, each placed about the
    /// rotor axis) the static balance is reported too.
    #[arg(required = true, num_args = 1..)]
    input: Vec<PathBuf>,
    /// Material preset: pla, petg, abs, asa, pa12 (nylon), pc, al6061.
    #[arg(long, default_value = "pla")]
    material: String,
    /// Wall thickness of the printed shell, mm.
    #[arg(long, default_value_t = 1.2)]
    wall: f64,
    /// Infill, percent of the volume inside the shell.
    #[arg(long, default_value_t = 20.0)]
    infill: f64,
    /// Treat the part as fully solid (machined, or 100 % infill).
    #[arg(long, conflicts_with_all = ["wall", "infill"])]
    solid: bool,
    /// Rotor speed, rev/min, for the stress estimate.
    #[arg(long)]
    rpm: Option<f64>,
    /// Wind speed, m/s, for the thrust (momentum theory).
    #[arg(long)]
    wind: Option<f64>,
    /// Thrust per blade, N (instead of momentum theory); more than 0.
    #[arg(long, allow_negative_numbers = true)]
    thrust: Option<f64>,
    /// Thrust coefficient (default 8/9, the Betz optimum); above 0, at most 2.
    #[arg(long, allow_negative_numbers = true)]
    thrust_coefficient: Option<f64>,
    /// How thrust is spread along the span: annulus (q ~ r) or uniform.
    #[arg(long, default_value = "annulus", value_parser = ["annulus", "uniform"])]
    spread: String,
    /// Number of blades sharing the thrust (default: the design's [rotor] blades, else 3).
    #[arg(long)]
    blades: Option<u32>,
    /// Air density, kg/m^3.
    #[arg(long, default_value_t = 1.225)]
    air_density: f64,
    /// Required safety factor on the material strength.
    #[arg(long, default_value_t = 3.0)]
    safety_factor: f64,
    /// Extra radii for the section table, mm (comma-separated).
    #[arg(long, value_delimiter = ',', value_name = "R,R,...")]
    at: Vec<f64>,
    /// Number of cuts along the span for the stress estimate.
    #[arg(long, default_value_t = 101)]
    cuts: usize,
    /// Folder for the report files.
    #[arg(long, short, default_value = "out")]
    out: PathBuf,
    /// Do not write files.
    #[arg(long)]
    no_files: bool,
    /// Print the JSON report on standard output.
    #[arg(long)]
    json: bool,
}

fn check_number(name: &str, v: f64, ok: bool, hint: &str) -> anyhow::Result<()> {
    if !(v.is_finite() && ok) {
        anyhow::bail!("--{name} {v}: {hint}");
    }
    Ok(())
}

/// Largest thrust coefficient accepted. Momentum theory gives at most 1 (C_T = 4a(1 - a)
/// at a = 1/2); heavily loaded rotors in the turbulent wake state reach about 2 by
/// Glauert's empirical relation (from memory), and no more.
const MAX_THRUST_COEFFICIENT: f64 = 2.0;

/// `--thrust` is a positive force and `--thrust-coefficient` lies in
/// 0..[`MAX_THRUST_COEFFICIENT`].
fn check_thrust(args: &Args) -> anyhow::Result<()> {
    if let Some(t) = args.thrust {
        check_number(
            "thrust",
            t,
            t > 0.0,
            "give the thrust on one blade as a positive force in N (its direction follows \
             from the flow mode); leave --thrust out to take it from --wind by momentum theory",
        )?;
    }
    if let Some(c) = args.thrust_coefficient {
        check_number(
            "thrust-coefficient",
            c,
            c > 0.0 && c <= MAX_THRUST_COEFFICIENT,
            "give a thrust coefficient above 0 and at most 2: momentum theory gives at most 1 \
             (8/9 at the Betz optimum, the default), heavily loaded rotors reach about 2",
        )?;
    }
    Ok(())
}

/// Runs the subcommand.
pub fn run(args: Args, ctx: &super::Context) -> anyhow::Result<Verdict> {
    let material: Material = args.material.parse()?;
    let fill = checked_fill(&args)?;
    check_options(&args)?;
    let first = &args.input[0];
    let subject = match load_subject(&args)? {
        Loaded::Subject(s) => *s,
        Loaded::Variants(design, variants) => {
            return report_variants(&args, ctx, &material, fill, &design, &variants)
        }
    };
    let input = subject.report_input(&args, material, fill)?;
    let bar = progress_bar(ctx);
    let (mut rep, pictures) = report::build(&input, &mut |step, msg| {
        bar.set_position(step);
        bar.set_message(msg.to_string());
    })
    .with_context(|| format!("reporting on {}", first.display()))?;
    if let Some(o) = subject.outcome.as_ref() {
        if let Some(s) = segments_report(o, &input, first)? {
            rep.segments = Some(s);
        }
    }
    bar.finish_and_clear();
    let json = serde_json::to_string_pretty(&rep).context("encoding the JSON report")?;
    let mut written = Vec::new();
    if !args.no_files {
        written = write_files(&args.out, &file_stem(&subject.name), &rep, &pictures, &json)?;
    }
    if args.json {
        outln!("{json}");
    } else if !ctx.quiet {
        super::emit(&summary(&rep, &written));
    }
    print_cautions(&rep);
    Ok(match &rep.stress {
        Some(t) if !t.passes => Verdict::Failed,
        _ => Verdict::Done,
    })
}

/// The fill from `--solid`, or from `--wall` and `--infill` once checked.
fn checked_fill(args: &Args) -> anyhow::Result<Fill> {
    if args.solid {
        return Ok(Fill::SOLID);
    }
    check_number(
        "wall",
        args.wall,
        args.wall >= 0.0,
        "give a thickness of 0 or more mm (1.2 is common)",
    )?;
    check_number(
        "infill",
        args.infill,
        (0.0..=100.0).contains(&args.infill),
        "give a percentage from 0 to 100",
    )?;
    Ok(Fill {
        wall: args.wall,
        infill: args.infill / 100.0,
    })
}

/// `--at`, `--cuts` and the thrust options are in range.
fn check_options(args: &Args) -> anyhow::Result<()> {
    for r in &args.at {
        check_number("at", *r, true, "give radii in mm")?;
    }
    if args.cuts < 3 || args.cuts > 10_000 {
        anyhow::bail!(
            "--cuts {}: give a number from 3 to 10000 (101 is the default)",
            args.cuts
        );
    }
    check_thrust(args)
}

/// What the report is on: STL parts, or a design's built blade.
struct Subject {
    /// Design or first part name.
    name: String,
    /// The parts; the first is the blade.
    parts: Vec<spanwright::check::CheckedPart>,
    /// The design, when the input is one.
    design: Option<Design>,
    /// The design's built parts.
    outcome: Option<pipeline::Outcome>,
}

/// What the inputs load to.
enum Loaded {
    /// One subject.
    Subject(Box<Subject>),
    /// A design with variants, each reported on in turn.
    Variants(Box<Design>, Vec<Variant>),
}

/// Loads the inputs: every STL file, or one design (built, unless it has variants).
fn load_subject(args: &Args) -> anyhow::Result<Loaded> {
    let first = &args.input[0];
    if args.input.iter().all(|p| load::has_extension(p, "stl")) {
        let mut parts = Vec::new();
        for p in &args.input {
            parts.push(load::stl_part(p)?);
        }
        return Ok(Loaded::Subject(Box::new(Subject {
            name: parts[0].name().to_string(),
            parts,
            design: None,
            outcome: None,
        })));
    }
    if args.input.len() != 1 {
        anyhow::bail!(
            "{} inputs given: give one design file, or one or more STL files",
            args.input.len()
        );
    }
    let design = load::design(first, None)?;
    let variants = variants(&design)?;
    if !variants.is_empty() {
        return Ok(Loaded::Variants(Box::new(design), variants));
    }
    let outcome = spanwright::pipeline::run(&design, &spanwright::pipeline::Options::default())
        .with_context(|| format!("building the parts of {}", first.display()))?;
    let blade = outcome.blade_part().clone();
    Ok(Loaded::Subject(Box::new(Subject {
        name: design.name.clone(),
        parts: vec![blade],
        design: Some(design),
        outcome: Some(outcome),
    })))
}

impl Subject {
    /// The report's input: the subject with the command line's material, fill, load
    /// case and radii.
    fn report_input(
        &self,
        args: &Args,
        material: Material,
        fill: Fill,
    ) -> anyhow::Result<ReportInput<'_>> {
        let source = args
            .input
            .iter()
            .map(|p| p.display().to_string())
            .collect::<Vec<_>>()
            .join(", ");
        let design_blades = match &self.design {
            Some(d) => spanwright::pipeline::read_rotor(d)?.map(|r| r.blades),
            None => None,
        };
        Ok(ReportInput {
            name: self.name.clone(),
            source: Some(source),
            parts: &self.parts,
            stations: self.design.as_ref().map(|d| d.stations.as_slice()),
            blade: self.outcome.as_ref().map(|o| &o.blade.blade),
            rotation: self.design.as_ref().map(|d| d.blade.rotation),
            material,
            fill,
            load: load_case(args, design_blades),
            extra_radii: args.at.clone(),
            stress_cuts: args.cuts,
            picture_cuts: 11,
        })
    }
}

/// A progress bar on a terminal (hidden with `--quiet` or when standard error is not
/// one).
fn progress_bar(ctx: &super::Context) -> indicatif::ProgressBar {
    if ctx.quiet || !std::io::stderr().is_terminal() {
        return indicatif::ProgressBar::hidden();
    }
    let b = indicatif::ProgressBar::new(STEPS);
    if let Ok(style) = indicatif::ProgressStyle::with_template("{bar:30} {pos}/{len} {msg}") {
        b.set_style(style);
    }
    b
}

/// The segments' masses and joints, when the design's blade is split.
fn segments_report(
    o: &pipeline::Outcome,
    input: &ReportInput<'_>,
    first: &Path,
) -> anyhow::Result<Option<report::SegmentsSummary>> {
    let segments = o.segment_parts();
    let (Some(plan), false) = (&o.segments, segments.is_empty()) else {
        return Ok(None);
    };
    let bodies: Vec<&spanwright::check::CheckedPart> =
        segments.iter().map(|p| &p.bodies[0]).collect();
    let summary = report::segments_summary(
        o.blade_part(),
        &bodies,
        plan,
        &input.material,
        input.fill,
        input.load.as_ref(),
    )
    .with_context(|| format!("reporting on the segments of {}", first.display()))?;
    Ok(Some(summary))
}

/// The cautions, even with `--quiet`: they bear on safety.
fn print_cautions(rep: &Report) {
    if rep.stress.is_some() || rep.balance.is_some() {
        for c in CAUTIONS {
            eprintln!("caution: {c}");
        }
    }
    if rep.segments.is_some() {
        for c in report::JOINT_CAUTIONS {
            eprintln!("caution: {c}");
        }
    }
}

/// The operating point the command line asks for (`None` without `--rpm`, `--wind` or
/// `--thrust`); the blade count from `--blades`, else the design's, else the default.
fn load_case(args: &Args, design_blades: Option<u32>) -> Option<LoadCase> {
    if args.rpm.is_none() && args.wind.is_none() && args.thrust.is_none() {
        return None;
    }
    let defaults = LoadCase::default();
    Some(LoadCase {
        rpm: args.rpm.unwrap_or(0.0),
        wind: args.wind.unwrap_or(0.0),
        blades: args.blades.or(design_blades).unwrap_or(defaults.blades),
        air_density: args.air_density,
        thrust_coefficient: args
            .thrust_coefficient
            .unwrap_or(defaults.thrust_coefficient),
        thrust: args.thrust,
        spread: if args.spread == "uniform" {
            ThrustSpread::Uniform
        } else {
            ThrustSpread::Annulus
        },
        safety_factor: args.safety_factor,
    })
}

/// Reports on every variant of the design side by side, each in its own folder, and
/// writes the summary table (see `cli::variants`).
fn report_variants(
    args: &Args,
    ctx: &super::Context,
    material: &Material,
    fill: Fill,
    design: &Design,
    variants: &[Variant],
) -> anyhow::Result<Verdict> {
    let source = args.input[0].display().to_string();
    let finished = run_all(design, variants, &args.out, !args.no_files, |v, dir| {
        let d = &v.design;
        let outcome = pipeline::run(d, &pipeline::Options::default())?;
        let parts = vec![outcome.blade_part().clone()];
        let input = ReportInput {
            name: d.name.clone(),
            source: Some(source.clone()),
            parts: &parts,
            stations: Some(&d.stations),
            blade: Some(&outcome.blade.blade),
            rotation: Some(d.blade.rotation),
            material: material.clone(),
            fill,
            load: load_case(args, pipeline::read_rotor(d)?.map(|r| r.blades)),
            extra_radii: args.at.clone(),
            stress_cuts: args.cuts,
            picture_cuts: 11,
        };
        let (rep, pictures) = report::build(&input, &mut |_, _| {})?;
        let batch = if args.no_files {
            Batch::new()
        } else {
            let json = serde_json::to_string_pretty(&rep).context("encoding the JSON report")?;
            stage_files(dir, &file_stem(&d.name), &rep, &pictures, &json)?
        };
        let row = SummaryRow::of(
            &v.name,
            &v.name,
            d,
            &outcome,
            material,
            fill,
            rep.stress.as_ref(),
        )?;
        Ok(Done {
            row,
            batch,
            extra: rep.stress.as_ref().map(|t| t.passes),
        })
    })?;
    if args.json {
        outln!("{}", finished.json(&design.name)?);
    } else if !ctx.quiet {
        let heading = format!(
            "{}: {} variants ({}, walls {} mm, infill {} %)",
            design.name,
            finished.rows.len(),
            material.name,
            number(fill.wall, Decimals::Mm),
            number(fill.infill * 100.0, Decimals::Percent)
        );
        super::emit(&finished.text(&heading, &[]));
    }
    if args.rpm.is_some() || args.wind.is_some() || args.thrust.is_some() {
        for c in CAUTIONS {
            eprintln!("caution: {c}");
        }
    }
    Ok(if finished.extras.contains(&Some(false)) {
        Verdict::Failed
    } else {
        Verdict::Done
    })
}

/// A safe file stem from a name.
fn file_stem(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' {
                c
            } else {
                '_'
            }
        })
        .collect();
    if s.is_empty() {
        "part".into()
    } else {
        s
    }
}

fn write_files(
    out: &Path,
    stem: &str,
    rep: &Report,
    pictures: &Pictures,
    json: &str,
) -> anyhow::Result<Vec<PathBuf>> {
    std::fs::create_dir_all(out)
        .with_context(|| format!("creating the output folder {}", out.display()))?;
    Ok(stage_files(out, stem, rep, pictures, json)?.commit()?)
}

/// Stages the report's files (JSON, HTML, pictures) in `out`, not yet committed.
fn stage_files(
    out: &Path,
    stem: &str,
    rep: &Report,
    pictures: &Pictures,
    json: &str,
) -> anyhow::Result<Batch> {
    let decl = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
    let mut files: Vec<(String, String)> = vec![
        (format!("{stem}-report.json"), format!("{json}\n")),
        (format!("{stem}-report.html"), report::html(rep, pictures)),
        (
            format!("{stem}-sections.svg"),
            format!("{decl}{}", pictures.sections),
        ),
        (
            format!("{stem}-views.svg"),
            format!("{decl}{}", pictures.three_view),
        ),
    ];
    if let Some(p) = &pictures.planform {
        files.push((format!("{stem}-planform.svg"), format!("{decl}{p}")));
    }
    if let Some(p) = &pictures.stress {
        files.push((format!("{stem}-stress.svg"), format!("{decl}{p}")));
    }
    let mut batch = Batch::new();
    for (file, text) in files {
        batch.write(&out.join(file), |w| w.write_all(text.as_bytes()))?;
    }
    if let Some(p) = &pictures.preview {
        batch.write(&out.join(format!("{stem}-preview.png")), |w| {
            w.write_all(&p.png)
        })?;
    }
    Ok(batch)
}

/// The report in words, numbers written as in the HTML report (`report::numbers`).
fn summary(rep: &Report, written: &[PathBuf]) -> String {
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{} ({}, walls {} mm, infill {} %)",
        rep.name,
        rep.material.name,
        number(rep.fill.wall, D::Mm),
        number(rep.fill.infill * 100.0, D::Percent)
    );
    summary_parts(&mut out, rep);
    summary_sections(&mut out, rep);
    summary_stress(&mut out, rep);
    if let Some(seg) = &rep.segments {
        summary_segments(&mut out, seg);
    }
    for w in written {
        let _ = writeln!(out, "  wrote {}", w.display());
    }
    out
}

/// Each part's mass properties and the balance.
fn summary_parts(out: &mut String, rep: &Report) {
    for p in &rep.parts {
        let _ = writeln!(
            out,
            "  {}: mass {} g, volume {} mm³, centre of mass ({}, {}, {}) mm, I about rotor axis {} g mm²",
            p.name,
            number(p.mass, D::G),
            number(p.volume, D::Mm3),
            number(p.centroid[0], D::Mm),
            number(p.centroid[1], D::Mm),
            number(p.centroid[2], D::Mm),
            number(p.inertia_rotor_axis, D::GMm2)
        );
    }
    if let Some(b) = &rep.balance {
        let _ = writeln!(
            out,
            "  balance: {} g mm static imbalance ({} mm offset), parts differ by {} g",
            number(b.imbalance, D::GMm),
            number(b.offset, D::Mm),
            number(b.mass_spread, D::G)
        );
    }
}

/// The section table.
fn summary_sections(out: &mut String, rep: &Report) {
    if rep.sections.is_empty() {
        return;
    }
    let _ = writeln!(out, "  sections (mm, mm², mm⁴, deg):");
    let _ = writeln!(
        out,
        "  {:>9} {:>9} {:>11} {:>11} {:>11} {:>7}",
        "r", "area", "Ixx", "Iyy", "Ixy", "angle"
    );
    for s in &rep.sections {
        let _ = writeln!(
            out,
            "  {:>9} {:>9} {:>11} {:>11} {:>11} {:>7}",
            number(s.radius, D::Mm),
            number(s.area, D::Mm2),
            number(s.ixx, D::Mm4),
            number(s.iyy, D::Mm4),
            number(s.ixy, D::Mm4),
            number(s.angle, D::Deg)
        );
    }
}

/// The stress estimate's verdict.
fn summary_stress(out: &mut String, rep: &Report) {
    if let Some(t) = &rep.stress {
        let _ = writeln!(
            out,
            "  stress at {} rpm, {} m/s: smallest safety factor {} at r = {} mm ({} the required {}), tip deflection {} mm",
            number(t.load.rpm, D::Rpm),
            number(t.load.wind, D::MPerS),
            number(t.min_safety_factor, D::Ratio),
            number(t.critical_radius, D::Mm),
            if t.passes { "reaches" } else { "DOES NOT reach" },
            number(t.load.safety_factor, D::Ratio),
            number(t.tip_deflection, D::Mm)
        );
    }
}

/// The segments' masses, the rod and each joint's section and stress.
fn summary_segments(out: &mut String, seg: &report::SegmentsSummary) {
    for p in &seg.segments {
        let _ = writeln!(
            out,
            "  {}: mass {:.1} g, volume {:.0} mm3",
            p.name, p.mass, p.volume
        );
    }
    if let Some([d, l]) = seg.rod {
        let _ = writeln!(out, "  rod: {d} mm diameter, cut to {l:.1} mm");
    }
    for j in &seg.joints {
        let _ = write!(
            out,
            "  joint {} at {:.1} mm: net section {:.1} mm2 of {:.1} mm2 ({} holes), Ixx {:.4e} mm4",
            j.joint, j.radius, j.net.area, j.gross.area, j.holes, j.net.ixx
        );
        match &j.stress {
            Some(s) => {
                let _ = writeln!(
                    out,
                    "; on it {:.1} MPa tension, {:.1} MPa compression (force {:.1} N, moment {:.0} N mm): safety factor {:.2} in the plastic alone",
                    s.max_tension, s.max_compression, s.centrifugal_force, s.bending_moment, s.safety_factor
                );
            }
            None => {
                let _ = writeln!(out);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::file_stem;

    #[test]
    fn stems_are_safe() {
        assert_eq!(file_stem("my blade/1"), "my_blade_1");
        assert_eq!(file_stem(""), "part");
    }
}
