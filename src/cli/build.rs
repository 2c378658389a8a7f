//! `spanwright build`: design table in, checked solids out.

use super::{progress::Stages, Context, EXIT_CHECK_FAILED};
use anyhow::Context as _;
use spanwright::assembly::{assemble, hand_description, one_piece, HandOptions, Rotor, RotorSpec};
use spanwright::check::{check_solid, CheckOptions};
use spanwright::design::{self, Design};
use spanwright::export::{self, Format};
use spanwright::pipeline::{self, BuildOptions, Model, TeChange};
use spanwright::tessellate::max_deviation;
use std::path::{Path, PathBuf};
use std::process::ExitCode;
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
    /// Largest distance between mesh and exact surface, mm (overrides the design).
    #[arg(long, short)]
    pub tolerance: Option<f64>,
    /// Print the summary as JSON.
    #[arg(long)]
    pub json: bool,
    /// Write the blade only, even when the design has a [rotor] table (which otherwise
    /// also writes the assembled rotor as <name>-rotor.<format>).
    #[arg(long)]
    pub blade_only: bool,
}

/// Loads a design file (TOML, or CSV with an optional default section).
pub fn load_design(path: &Path, section: Option<&str>) -> anyhow::Result<Design> {
    let is_csv = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"));
    let design = if is_csv {
        design::load_csv(path, section)
    } else {
        design::load(path)
    }?;
    Ok(design)
}

/// Runs the subcommand.
pub fn run(args: Args, ctx: &Context) -> anyhow::Result<ExitCode> {
    let started = Instant::now();
    let formats = args
        .format
        .iter()
        .map(|f| f.parse::<Format>().map_err(anyhow::Error::msg))
        .collect::<anyhow::Result<Vec<Format>>>()?;
    let stages = Stages::new(ctx, 4);
    stages.set("reading the design");
    let design = load_design(&args.design, args.section.as_deref())?;
    let steep = pipeline::steep_steps(&design);
    stages.set("lofting and meshing");
    let model = pipeline::build(
        &design,
        &BuildOptions {
            tolerance: args.tolerance,
        },
    )?;
    let rotor = match RotorSpec::from_design(&design)? {
        Some(spec) if !args.blade_only => Some(assemble(&model, &spec, &design.blade, &design)?),
        _ => None,
    };
    let whole = match rotor
        .as_ref()
        .and_then(|r| r.spec.one_piece.as_ref().map(|o| (r, o)))
    {
        Some((r, o)) => Some((
            one_piece(&model, &r.spec, o, &design)?,
            u32::from(o.bore.is_some()),
        )),
        None => None,
    };
    stages.set("checking the solids");
    let report = model.check();
    if !report.is_ok() {
        stages.finish();
        eprintln!(
            "{}: the solid failed its checks; nothing was written:\n{report}",
            args.design.display()
        );
        for s in &steep {
            eprintln!("likely cause: {s}");
        }
        return Ok(ExitCode::from(EXIT_CHECK_FAILED));
    }
    if let Some(rotor) = &rotor {
        let hand = rotor.check_hand(&HandOptions::DEFAULT);
        for (part, genus) in rotor
            .parts()
            .iter()
            .zip(rotor.expected_genus())
            .skip(rotor.blades.len())
        {
            let report = check_solid(
                &part.mesh,
                &CheckOptions::DEFAULT.with_expected_genus(Some(genus)),
            );
            if !report.is_ok() {
                stages.finish();
                eprintln!(
                    "{}: the {} failed its checks; nothing was written:\n{report}",
                    args.design.display(),
                    part.name
                );
                return Ok(ExitCode::from(EXIT_CHECK_FAILED));
            }
        }
        if let Some((part, genus)) = &whole {
            let report = check_solid(
                &part.mesh,
                &CheckOptions::DEFAULT.with_expected_genus(Some(*genus)),
            );
            if !report.is_ok() {
                stages.finish();
                eprintln!(
                    "{}: the one-piece rotor failed its checks; nothing was written:\n{report}",
                    args.design.display()
                );
                return Ok(ExitCode::from(EXIT_CHECK_FAILED));
            }
        }
        if let Some(bad) = hand.iter().find(|h| !h.is_ok()) {
            stages.finish();
            eprintln!(
                "{}: the rotation-sense check failed; nothing was written:\n{bad}",
                args.design.display()
            );
            return Ok(ExitCode::from(EXIT_CHECK_FAILED));
        }
    }
    stages.finish();
    if !ctx.quiet {
        for s in &steep {
            eprintln!("warning: {s}");
        }
    }
    std::fs::create_dir_all(&args.out)
        .with_context(|| format!("cannot create the output folder {}", args.out.display()))?;
    let mut written = Vec::new();
    for format in &formats {
        let stem = match format {
            Format::StlAscii => format!("{}-ascii", model.name),
            _ => model.name.clone(),
        };
        let path = args.out.join(format!("{stem}.{}", format.extension()));
        write_format(&model, *format, &path)?;
        written.push(path);
        if let Some(rotor) = &rotor {
            let path = args
                .out
                .join(format!("{stem}-rotor.{}", format.extension()));
            write_rotor(&model, rotor, *format, &path)?;
            written.push(path);
        }
        if let (Some((part, _)), true) = (&whole, format.is_mesh()) {
            let path = args
                .out
                .join(format!("{stem}-rotor-one-piece.{}", format.extension()));
            export::write_parts(&path, *format, std::slice::from_ref(part))?;
            written.push(path);
        }
    }
    if model.blade.root().is_some() {
        // A picture of the root transition: outlines from root face to tip, along the span.
        let path = args.out.join(format!("{}-transition.svg", model.name));
        let svg = spanwright::report::transition_svg(&model.blade, 12);
        export::write_atomic(&path, |w| w.write_all(svg.as_bytes()))?;
        written.push(path);
    }
    let tolerance = args.tolerance.unwrap_or(design.blade.tolerance);
    let summary = Summary::of(&model, tolerance, &written, started.elapsed().as_secs_f64());
    if args.json {
        println!("{}", serde_json::to_string_pretty(&summary)?);
    } else if !ctx.quiet {
        summary.print();
        if let Some(rotor) = &rotor {
            println!("  rotor: {}", hand_description(&rotor.spec, &design));
            if rotor.hub.is_some() && formats.contains(&Format::Step) {
                println!("  note: the rotor's STEP file holds the blades only; the hub is written as a mesh (STL/3MF/OBJ)");
            }
        }
        if formats.contains(&Format::Step) {
            if let Some(features) = mesh_only_features(&model) {
                let start = if model.blade.root().is_some_and(|r| r.flange.is_some()) {
                    "starts at the top of the flange's fillet and "
                } else {
                    ""
                };
                println!("  note: the STEP solid {start}carries the shank and transition but not the {features} (mesh files only)");
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn write_format(model: &Model, format: Format, path: &Path) -> anyhow::Result<()> {
    match format {
        Format::Step => {
            let solid = export::step_solid(&model.skin)?;
            export::write_step(
                path,
                &[(model.name.clone(), solid)],
                &export::StepHeader::for_design(&model.name),
            )?;
        }
        _ => export::write_parts(path, format, &[model.part()])?,
    }
    Ok(())
}

/// The root features the mesh has and the exact solid lacks, in words.
fn mesh_only_features(model: &Model) -> Option<String> {
    let features = model.blade.root()?.mesh_only_features();
    (!features.is_empty()).then(|| features.join(", "))
}

/// Writes the assembled rotor: every body in one file (one object each in 3MF and OBJ);
/// in STEP the exact blade solid placed once per blade.
fn write_rotor(model: &Model, rotor: &Rotor, format: Format, path: &Path) -> anyhow::Result<()> {
    match format {
        Format::Step => {
            let solid = export::step_solid(&model.skin)?;
            let solids: Vec<_> = rotor
                .transforms
                .iter()
                .enumerate()
                .map(|(k, m)| {
                    let cols: [[f64; 4]; 4] =
                        std::array::from_fn(|c| std::array::from_fn(|r| m[(r, c)]));
                    let placed = truck_modeling::builder::transformed(
                        &solid,
                        truck_modeling::Matrix4::from(cols),
                    );
                    (format!("{}-blade-{}", model.name, k + 1), placed)
                })
                .collect();
            export::write_step(
                path,
                &solids,
                &export::StepHeader::for_design(&format!("{}-rotor", model.name)),
            )?;
        }
        _ => export::write_parts(path, format, &rotor.parts())?,
    }
    Ok(())
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
    measured_deviation_mm: f64,
    trailing_edges_opened: Vec<TeChange>,
    area_mm2: f64,
    bounding_box_mm: [[f64; 3]; 2],
    files: Vec<String>,
    seconds: f64,
}

impl Summary {
    fn of(model: &Model, tolerance: f64, files: &[PathBuf], seconds: f64) -> Summary {
        let mesh = model.mesh();
        let bb = mesh.bounding_box().expect("a built blade has vertices");
        Summary {
            name: model.name.clone(),
            stations: model.sections.len(),
            rings: model.ring_radii.len(),
            triangles: mesh.len(),
            vertices: mesh.vertices.len(),
            volume_mm3: mesh.signed_volume(),
            tolerance_mm: tolerance,
            measured_deviation_mm: max_deviation(
                &model.skin,
                &model.tessellation.us,
                &model.tessellation.vs,
                2,
            ),
            trailing_edges_opened: model.te_changes.clone(),
            area_mm2: mesh.area(),
            bounding_box_mm: [bb.min.into(), bb.max.into()],
            files: files.iter().map(|p| p.display().to_string()).collect(),
            seconds,
        }
    }

    fn print(&self) {
        let [lo, hi] = self.bounding_box_mm;
        println!(
            "{}: {} stations, {} rings lofted",
            self.name, self.stations, self.rings
        );
        println!(
            "  mesh: {} triangles, {} vertices; closed, oriented, no self-intersection",
            self.triangles, self.vertices
        );
        println!(
            "  deviation from the exact surface: {:.4} mm measured (tolerance {} mm)",
            self.measured_deviation_mm, self.tolerance_mm
        );
        println!(
            "  volume {:.1} mm³ ({:.2} cm³), surface {:.1} mm²",
            self.volume_mm3,
            self.volume_mm3 / 1000.0,
            self.area_mm2
        );
        let opened = &self.trailing_edges_opened;
        if !opened.is_empty() {
            let fold = |f: fn(&TeChange) -> f64, pick: fn(f64, f64) -> f64, start: f64| {
                opened.iter().map(f).fold(start, pick)
            };
            println!(
                "  trailing edge opened for printing at {} of {} stations: {:.3}..{:.3} mm -> {:.3} mm (section area +{:.2}..{:.2} mm²)",
                opened.len(),
                self.stations,
                fold(|t| t.before, f64::min, f64::INFINITY),
                fold(|t| t.before, f64::max, 0.0),
                fold(|t| t.after, f64::max, 0.0),
                fold(|t| t.added_area, f64::min, f64::INFINITY),
                fold(|t| t.added_area, f64::max, 0.0),
            );
        }
        println!(
            "  box x {:.1}..{:.1}, y {:.1}..{:.1}, z {:.1}..{:.1} mm",
            lo[0], hi[0], lo[1], hi[1], lo[2], hi[2]
        );
        for f in &self.files {
            println!("  wrote {f}");
        }
        println!("  {:.3} s", self.seconds);
    }
}
