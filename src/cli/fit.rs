//! `spanwright fit`: does each part fit the printer, how to lay it, how many per plate.

use anyhow::Context as _;
use spanwright::export::{write_atomic, write_parts, Format};
use spanwright::fit::{
    self, layout, plate_svg, printability, Fit, FitOptions, LayoutOptions, Printability,
    PrintabilityOptions, Printer, PrinterSpec, Volume,
};
use spanwright::mesh::Part;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

/// Arguments of `spanwright fit`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The part: an STL file, or a design file (.toml or .csv) whose parts are built first.
    input: PathBuf,
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
    /// Copies of each part to lay out (default: the design's blade count, else 1).
    #[arg(long)]
    copies: Option<usize>,
    /// Angular resolution of the orientation search, degrees.
    #[arg(long, default_value_t = 0.5)]
    resolution: f64,
    /// Folder for the plate files (STL, 3MF, SVG).
    #[arg(long, short, default_value = "out")]
    out: PathBuf,
    /// Do not write plate files.
    #[arg(long)]
    no_files: bool,
    /// Also check whether the blades assembled around the rotor axis (y, blade frame) fit
    /// as one part: the copies turned by 360/N degrees each, without a hub.
    #[arg(long)]
    assembled: bool,
    /// Print the report as JSON on standard output.
    #[arg(long)]
    json: bool,
}

const CAUTION: &str = "Caution: fitting the printer says nothing about strength. Printed blades carry centrifugal and aerodynamic loads; check them against the material's data and follow local codes and licensed engineering practice before running a rotor.";

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

fn is_stl(p: &Path) -> bool {
    p.extension()
        .map(|e| e.to_string_lossy().eq_ignore_ascii_case("stl"))
        .unwrap_or(false)
}

/// Runs the subcommand.
pub fn run(args: Args, ctx: &super::Context) -> anyhow::Result<ExitCode> {
    let cli_spec = spec_from_args(&args)?;
    if !(args.resolution.is_finite() && args.resolution > 0.0 && args.resolution <= 10.0) {
        anyhow::bail!(
            "--resolution {}: give an angle in degrees between 0 and 10 (0.5 is the default)",
            args.resolution
        );
    }
    let mut design_te: Option<f64> = None;
    // The design's assembled rotor (pitch, cone, hub), when it has a [rotor] table.
    let mut rotor: Option<spanwright::assembly::Rotor> = None;
    let (parts, file_spec, blades) = if is_stl(&args.input) {
        (vec![fit::read_stl_part(&args.input)?], None, None)
    } else {
        let design = spanwright::design::load(&args.input)?;
        let spec = design
            .table::<PrinterSpec>("printer")?
            .map(|s| s.scaled(design.length_to_mm));
        design_te = design.blade.min_te_thickness;
        // One build serves both the checked blade and the rotor assembly.
        let model = spanwright::pipeline::build(&design, &Default::default())
            .with_context(|| format!("building the parts of {}", args.input.display()))?;
        let parts = vec![model
            .checked_part()
            .with_context(|| format!("building the parts of {}", args.input.display()))?];
        let rotor_spec = spanwright::assembly::RotorSpec::from_design(&design)?;
        let blades = rotor_spec.as_ref().map(|s| s.blades as usize);
        if let Some(spec) = &rotor_spec {
            rotor = Some(
                spanwright::assembly::assemble(&model, spec, &design.blade, &design)
                    .with_context(|| format!("assembling the rotor of {}", args.input.display()))?,
            );
        }
        (parts, spec, blades)
    };
    let origin = match &file_spec {
        Some(_) => format!("command line and {} [printer]", args.input.display()),
        None => "command line".to_string(),
    };
    let spec = match &file_spec {
        Some(f) => {
            // A bed given on the command line replaces the file's bed as a whole.
            let mut f = f.clone();
            if cli_spec.preset.is_some() || cli_spec.volume.is_some() || cli_spec.diameter.is_some()
            {
                f.preset = None;
                f.volume = None;
                f.diameter = None;
                f.height = None;
            }
            cli_spec.or(&f)
        }
        None => cli_spec,
    };
    if spec.preset.is_none() && spec.volume.is_none() && spec.diameter.is_none() {
        anyhow::bail!(
            "no printer given: use --printer ({}), --volume X,Y,Z or --round D,H (mm), or a [printer] table in the design file",
            fit::preset_names()
        );
    }
    let printer = spec.resolve(&origin)?;
    let copies = args.copies.or(blades).unwrap_or(1).max(1);
    let fit_opts = FitOptions {
        resolution_deg: args.resolution,
        ..FitOptions::DEFAULT
    };
    let mut plate_input: Vec<Part> = Vec::new();
    // The hub goes on the plates with the blades.
    plate_input.extend(rotor.as_ref().and_then(|r| r.hub.clone()));
    for p in &parts {
        for k in 0..copies {
            plate_input.push(Part {
                name: if copies > 1 {
                    format!("{}-{}", p.name, k + 1)
                } else {
                    p.name.clone()
                },
                mesh: p.mesh.clone(),
            });
        }
    }
    let fits: Vec<Fit> = parts
        .iter()
        .map(|p| fit::fit_part(&p.name, &p.mesh, &printer, &fit_opts))
        .collect::<Result<_, _>>()?;
    let all_fit = fits.iter().all(|f| f.fits);
    let assembled = if args.assembled {
        let envelope = match &rotor {
            Some(r) => r.envelope(),
            None => assemble(&parts, copies),
        };
        Some(fit::fit_part("rotor", &envelope, &printer, &fit_opts)?)
    } else {
        None
    };
    let lay = if all_fit {
        Some(layout(
            &plate_input,
            &printer,
            &LayoutOptions {
                fit: fit_opts,
                ..LayoutOptions::DEFAULT
            },
        )?)
    } else {
        None
    };
    let checks: Vec<Printability> = parts
        .iter()
        .map(|p| printability(&p.mesh, &printer, &PrintabilityOptions::DEFAULT))
        .collect();
    let stem = args
        .input
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "part".into());
    let mut written: Vec<PathBuf> = Vec::new();
    if let (Some(lay), false) = (&lay, args.no_files) {
        std::fs::create_dir_all(&args.out)
            .with_context(|| format!("creating the output folder {}", args.out.display()))?;
        for k in 0..lay.plates.len() {
            let placed = lay.plate_parts(k, &plate_input);
            let base = args.out.join(format!("{stem}-plate-{}", k + 1));
            for (ext, format) in [("stl", Format::Stl), ("3mf", Format::ThreeMf)] {
                let path = base.with_extension(ext);
                write_parts(&path, format, &placed)
                    .with_context(|| format!("writing {}", path.display()))?;
                written.push(path);
            }
            let svg = plate_svg(
                &lay.plates[k],
                &printer,
                &format!("{stem}: plate {} of {}", k + 1, lay.plates.len()),
            );
            let path = base.with_extension("svg");
            write_atomic(&path, |w| w.write_all(svg.as_bytes()))
                .with_context(|| format!("writing {}", path.display()))?;
            written.push(path);
        }
    }
    if args.json {
        let v = serde_json::json!({
            "printer": printer,
            "fits": all_fit,
            "parts": parts.iter().zip(&fits).zip(&checks).map(|((p, f), c)| part_json(p, f, c)).collect::<Vec<_>>(),
            "plates": lay.as_ref().map(|l| l.plates.iter().map(|pl| pl.parts.iter().map(|x| serde_json::json!({
                "name": x.name,
                "rotation": rows(&x.placement.rotation),
                "translation": [x.placement.translation.x, x.placement.translation.y, x.placement.translation.z],
                "size": x.size,
            })).collect::<Vec<_>>()).collect::<Vec<_>>()),
            "assembled": assembled.as_ref().map(|f| serde_json::json!({
                "blades": copies,
                "fits": f.fits,
                "angles_deg": f.placement.angles_deg(),
                "rotation": rows(&f.placement.rotation),
                "size": f.size,
                "wall_gap": f.wall_gap,
                "overshoot": f.overshoot,
                "scale_to_fit": finite(f.scale_to_fit),
            })),
            "files": written.iter().map(|p| p.display().to_string()).collect::<Vec<_>>(),
            "caution": CAUTION,
        });
        emit(&format!("{}\n", serde_json::to_string_pretty(&v)?));
    } else if !ctx.quiet {
        let mut text = print_text(&printer, &parts, &fits, &checks, lay.as_ref(), &written);
        if let Some(te) = design_te {
            if checks.iter().any(|c| !c.te_short.is_empty()) {
                let _ = writeln!(
                    text,
                    "note: the design asks for [blade] min-te-thickness = {te} mm, yet the mesh's trailing edge is thinner: the thickening has not been applied to this mesh"
                );
            }
        }
        if let Some(f) = &assembled {
            let _ = writeln!(
                text,
                "assembled rotor ({copies} blades about the y axis{}): {}; size {:.1} x {:.1} x {:.1} mm{}",
                match &rotor {
                    Some(r) if r.hub.is_some() => ", with pitch, cone and hub; bodies separate, as assembled",
                    Some(_) => ", with pitch and cone",
                    None => ", no hub",
                },
                if f.fits { "FITS as one part" } else { "does not fit as one part" },
                f.size[0],
                f.size[1],
                f.size[2],
                if f.fits {
                    String::new()
                } else {
                    format!(", overshoot {:.1} mm, scale {:.3} fits", f.overshoot, f.scale_to_fit)
                }
            );
        }
        if is_stl(&args.input) {
            let _ = writeln!(
                text,
                "note: printability reads the file's z axis as the span (the blade frame of spanwright's own files)"
            );
        }
        let _ = writeln!(text, "\n{CAUTION}");
        emit(&text);
    }
    Ok(if all_fit {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(super::EXIT_CHECK_FAILED)
    })
}

/// The parts repeated `n` times about the rotor axis (the y axis of the blade frame, see
/// `spanwright::conventions`), turned by 360/n degrees each, as one mesh.
fn assemble(parts: &[Part], n: usize) -> spanwright::mesh::TriMesh {
    let mut out = spanwright::mesh::TriMesh::new();
    for k in 0..n {
        let turn = nalgebra::Rotation3::from_axis_angle(
            &nalgebra::Vector3::y_axis(),
            std::f64::consts::TAU * k as f64 / n as f64,
        )
        .to_homogeneous();
        for p in parts {
            out.append(&p.mesh.transformed(&turn));
        }
    }
    out
}

/// Writes to standard output; a closed pipe (as with `| head`) is not an error.
fn emit(text: &str) {
    use std::io::Write;
    let _ = std::io::stdout().lock().write_all(text.as_bytes());
}

fn rows(m: &nalgebra::Matrix3<f64>) -> [[f64; 3]; 3] {
    [0, 1, 2].map(|i| [m[(i, 0)], m[(i, 1)], m[(i, 2)]])
}

fn finite(v: f64) -> Option<f64> {
    v.is_finite().then_some(v)
}

fn part_json(p: &Part, f: &Fit, c: &Printability) -> serde_json::Value {
    serde_json::json!({
        "name": p.name,
        "triangles": p.mesh.len(),
        "fits": f.fits,
        "angles_deg": f.placement.angles_deg(),
        "rotation": rows(&f.placement.rotation),
        "translation": [f.placement.translation.x, f.placement.translation.y, f.placement.translation.z],
        "size": f.size,
        "wall_gap": f.wall_gap,
        "overshoot": f.overshoot,
        "scale_to_fit": finite(f.scale_to_fit),
        "score": finite(f.score),
        "bed_contact": f.bed_contact,
        "overhang_area": f.overhang_area,
        "resolution_deg": f.resolution_deg,
        "guarantee": f.guarantee,
        "complete": f.complete,
        "printability": c,
        "findings": c.findings(),
    })
}

fn print_text(
    printer: &Printer,
    parts: &[Part],
    fits: &[Fit],
    checks: &[Printability],
    lay: Option<&fit::Layout>,
    written: &[PathBuf],
) -> String {
    let mut s = String::new();
    let (a, b, h) = printer.available();
    let _ = match printer.volume {
        Volume::Box { x, y, z } => writeln!(
            s,
            "printer: box {x} x {y} x {z} mm, margin {} mm (usable {a:.1} x {b:.1} x {h:.1} mm), clearance {} mm",
            printer.margin, printer.clearance
        ),
        Volume::Round { diameter, height } => writeln!(
            s,
            "printer: round bed {diameter} mm, height {height} mm, margin {} mm (usable diameter {a:.1}, height {h:.1} mm), clearance {} mm",
            printer.margin, printer.clearance
        ),
    };
    for ((p, f), c) in parts.iter().zip(fits).zip(checks) {
        let ang = f.placement.angles_deg();
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "{}: {}",
            p.name,
            if f.fits { "FITS" } else { "DOES NOT FIT" }
        );
        let _ = writeln!(
            s,
            "  rotation: {:.2} deg about x, then {:.2} about y, then {:.2} about z",
            ang[0], ang[1], ang[2]
        );
        for r in rows(&f.placement.rotation) {
            let _ = writeln!(s, "    [{:9.6} {:9.6} {:9.6}]", r[0], r[1], r[2]);
        }
        let _ = writeln!(
            s,
            "  size on the bed: {:.2} x {:.2} x {:.2} mm; gap to walls x {:.2}, y {:.2}, top {:.2} mm",
            f.size[0], f.size[1], f.size[2], f.wall_gap[0], f.wall_gap[1], f.wall_gap[2]
        );
        if !f.fits {
            let _ = writeln!(
            s,
                "  smallest overshoot found: {:.2} mm; a uniform scale of {:.4} fits this orientation",
                f.overshoot, f.scale_to_fit
            );
        }
        let _ = writeln!(
            s,
            "  overhang (faces down, over 45 deg from vertical): {:.0} mm^2; resting on the bed: {:.0} mm^2",
            f.overhang_area, f.bed_contact
        );
        let _ = writeln!(
            s,
            "  search: {:.2} deg resolution; any orientation with {:.2} mm to spare on every axis is found{}",
            f.resolution_deg,
            f.guarantee,
            if f.complete { "" } else { " (search stopped early: not guaranteed)" }
        );
        let findings = c.findings();
        if findings.is_empty() {
            if let (Some((_, te)), Some((_, th))) = (c.min_te(), c.min_thickness()) {
                let _ = writeln!(
            s,
                    "  printability: thinnest trailing edge {:.2} mm, thinnest section {:.2} mm: ok for a {:.2} mm nozzle",
                    te.te_thickness, th.thickness, c.nozzle
                );
            }
        }
        for line in findings {
            let _ = writeln!(s, "  printability: {line}");
        }
    }
    if let Some(l) = lay {
        let _ = writeln!(s);
        let n: usize = l.plates.iter().map(|p| p.parts.len()).sum();
        let _ = writeln!(s, "{n} parts on {} plate(s):", l.plates.len());
        for (k, p) in l.plates.iter().enumerate() {
            let names: Vec<&str> = p.parts.iter().map(|x| x.name.as_str()).collect();
            let _ = writeln!(s, "  plate {}: {}", k + 1, names.join(", "));
        }
    }
    for w in written {
        let _ = writeln!(s, "wrote {}", w.display());
    }
    s
}
