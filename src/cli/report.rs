//! `spanwright report`: mass and section properties, balance, a stress estimate with
//! cautions, pictures (SVG) and reports (HTML, JSON).

use std::io::IsTerminal as _;
use std::path::{Path, PathBuf};

use super::{load, Verdict};
use anyhow::Context as _;
use spanwright::atomic::Batch;
use spanwright::props::{Fill, LoadCase, Material, ThrustSpread, CAUTIONS};
use spanwright::report::{self, Pictures, Report, ReportInput, STEPS};

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
    /// Thrust per blade, N (instead of momentum theory).
    #[arg(long)]
    thrust: Option<f64>,
    /// Thrust coefficient (default 8/9, the Betz optimum).
    #[arg(long)]
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

/// Runs the subcommand.
pub fn run(args: Args, ctx: &super::Context) -> anyhow::Result<Verdict> {
    let material: Material = args.material.parse()?;
    let fill = if args.solid {
        Fill::SOLID
    } else {
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
        Fill {
            wall: args.wall,
            infill: args.infill / 100.0,
        }
    };
    for r in &args.at {
        check_number("at", *r, true, "give radii in mm")?;
    }
    if args.cuts < 3 || args.cuts > 10_000 {
        anyhow::bail!(
            "--cuts {}: give a number from 3 to 10000 (101 is the default)",
            args.cuts
        );
    }
    let first = &args.input[0];
    let (name, parts, design, outcome) = if args.input.iter().all(|p| load::has_extension(p, "stl"))
    {
        let mut parts = Vec::new();
        for p in &args.input {
            parts.push(load::stl_part(p)?);
        }
        (parts[0].name().to_string(), parts, None, None)
    } else if args.input.len() == 1 {
        let design = load::design(first, None)?;
        let outcome = spanwright::pipeline::run(&design, &spanwright::pipeline::Options::default())
            .with_context(|| format!("building the parts of {}", first.display()))?;
        let blade = outcome.blade_part().clone();
        (
            design.name.clone(),
            vec![blade],
            Some(design),
            Some(outcome),
        )
    } else {
        anyhow::bail!(
            "{} inputs given: give one design file, or one or more STL files",
            args.input.len()
        );
    };
    let source = args
        .input
        .iter()
        .map(|p| p.display().to_string())
        .collect::<Vec<_>>()
        .join(", ");
    let design_blades = match &design {
        Some(d) => spanwright::pipeline::read_rotor(d)?.map(|r| r.blades),
        None => None,
    };
    let load = if args.rpm.is_some() || args.wind.is_some() || args.thrust.is_some() {
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
    } else {
        None
    };
    let input = ReportInput {
        name: name.clone(),
        source: Some(source),
        parts: &parts,
        stations: design.as_ref().map(|d| d.stations.as_slice()),
        blade: outcome.as_ref().map(|o| &o.blade.blade),
        material,
        fill,
        load,
        extra_radii: args.at.clone(),
        stress_cuts: args.cuts,
        picture_cuts: 11,
    };
    let show = !ctx.quiet && std::io::stderr().is_terminal();
    let bar = if show {
        let b = indicatif::ProgressBar::new(STEPS);
        if let Ok(style) = indicatif::ProgressStyle::with_template("{bar:30} {pos}/{len} {msg}") {
            b.set_style(style);
        }
        b
    } else {
        indicatif::ProgressBar::hidden()
    };
    let (rep, pictures) = report::build(&input, &mut |step, msg| {
        bar.set_position(step);
        bar.set_message(msg.to_string());
    })
    .with_context(|| format!("reporting on {}", first.display()))?;
    let mut rep = rep;
    if let Some(o) = outcome.as_ref() {
        let segments = o.segment_parts();
        if let (Some(plan), false) = (&o.segments, segments.is_empty()) {
            let bodies: Vec<&spanwright::check::CheckedPart> =
                segments.iter().map(|p| &p.bodies[0]).collect();
            rep.segments = Some(
                report::segments_summary(
                    o.blade_part(),
                    &bodies,
                    plan,
                    &input.material,
                    input.fill,
                    input.load.as_ref(),
                )
                .with_context(|| format!("reporting on the segments of {}", first.display()))?,
            );
        }
    }
    bar.finish_and_clear();
    let json = serde_json::to_string_pretty(&rep).context("encoding the JSON report")?;
    let mut written = Vec::new();
    if !args.no_files {
        written = write_files(&args.out, &file_stem(&name), &rep, &pictures, &json)?;
    }
    if args.json {
        outln!("{json}");
    } else if !ctx.quiet {
        super::emit(&summary(&rep, &written));
    }
    // Cautions go out even with --quiet: they bear on safety.
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
    Ok(match &rep.stress {
        Some(t) if !t.passes => Verdict::Failed,
        _ => Verdict::Done,
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
    Ok(batch.commit()?)
}

fn summary(rep: &Report, written: &[PathBuf]) -> String {
    use std::fmt::Write as _;
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{} ({}, walls {} mm, infill {:.0} %)",
        rep.name,
        rep.material.name,
        rep.fill.wall,
        rep.fill.infill * 100.0
    );
    for p in &rep.parts {
        let _ = writeln!(
        out,
            "  {}: mass {:.1} g, volume {:.0} mm3, centre of mass ({:.1}, {:.1}, {:.1}) mm, I about rotor axis {:.4e} g mm2",
            p.name, p.mass, p.volume, p.centroid[0], p.centroid[1], p.centroid[2], p.inertia_rotor_axis
        );
    }
    if let Some(b) = &rep.balance {
        let _ = writeln!(
            out,
            "  balance: {:.1} g mm static imbalance ({:.3} mm offset), parts differ by {:.2} g",
            b.imbalance, b.offset, b.mass_spread
        );
    }
    if !rep.sections.is_empty() {
        let _ = writeln!(out, "  sections (mm, mm2, mm4, deg):");
        let _ = writeln!(
            out,
            "  {:>9} {:>9} {:>11} {:>11} {:>11} {:>7}",
            "r", "area", "Ixx", "Iyy", "Ixy", "angle"
        );
        for s in &rep.sections {
            let _ = writeln!(
                out,
                "  {:>9.2} {:>9.2} {:>11.4e} {:>11.4e} {:>11.4e} {:>7.2}",
                s.radius, s.area, s.ixx, s.iyy, s.ixy, s.angle
            );
        }
    }
    if let Some(t) = &rep.stress {
        let _ = writeln!(
        out,
            "  stress at {} rpm, {} m/s: smallest safety factor {:.2} at r = {:.1} mm ({} the required {}), tip deflection {:.2} mm",
            t.load.rpm,
            t.load.wind,
            t.min_safety_factor,
            t.critical_radius,
            if t.passes { "reaches" } else { "DOES NOT reach" },
            t.load.safety_factor,
            t.tip_deflection
        );
    }
    if let Some(seg) = &rep.segments {
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
    for w in written {
        let _ = writeln!(out, "  wrote {}", w.display());
    }
    out
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
