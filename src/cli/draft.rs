//! `spanwright draft`: a station table from optimum-rotor theory, written as CSV that
//! `spanwright build` reads.

use anyhow::{bail, Context as _};
use spanwright::atomic::Batch;
use spanwright::design::Flow;
use spanwright::draft::{
    self as drafting, DraftSpec, DraftTable, LinearRange, Method, Severity, Spacing,
};
use std::io::Write;
use std::path::{Path, PathBuf};

/// Optimum rotor giving the planform.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum MethodArg {
    /// Betz optimum without wake rotation.
    Betz,
    /// Glauert optimum with wake rotation.
    Glauert,
}

/// Flow mode.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum FlowArg {
    /// Wind or water turbine.
    Turbine,
    /// Propeller or fan (refused: the methods here are for turbines).
    Propeller,
}

/// Arguments of `spanwright draft`.
#[derive(Debug, clap::Args)]
#[command(
    after_help = "Example (demo values; take Cl and alpha from your section's polar):
  spanwright draft --tip-radius 600 --inner-radius 90 --blades 3 --tip-speed-ratio 6 \\
    --design-cl 1.0 --design-alpha 6 --tip-loss --linear 50..90 --wind 10 -o table.csv
  spanwright build table.csv --section naca4412"
)]
pub struct Args {
    /// Read the spec from a TOML or JSON file (keys as in the library's DraftSpec);
    /// options given on the command line override its values.
    #[arg(long, value_name = "FILE")]
    spec: Option<PathBuf>,
    /// Tip radius, mm.
    #[arg(long, value_name = "MM", allow_negative_numbers = true)]
    tip_radius: Option<f64>,
    /// Radius of the first (innermost) station, where the drafted blade starts, mm.
    #[arg(long, value_name = "MM", allow_negative_numbers = true)]
    inner_radius: Option<f64>,
    /// The old name of --inner-radius, still read (with a note to use the new one).
    #[arg(
        long,
        value_name = "MM",
        allow_negative_numbers = true,
        hide = true,
        conflicts_with = "inner_radius"
    )]
    hub_radius: Option<f64>,
    /// Number of blades.
    #[arg(long, value_name = "N")]
    blades: Option<u32>,
    /// Design tip speed ratio (tip speed / wind speed).
    #[arg(long, value_name = "LAMBDA", allow_negative_numbers = true)]
    tip_speed_ratio: Option<f64>,
    /// Design lift coefficient of the section (from its polar, at best lift-to-drag).
    #[arg(long, value_name = "CL", allow_negative_numbers = true)]
    design_cl: Option<f64>,
    /// Design angle of attack of the section, degrees.
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    design_alpha: Option<f64>,
    /// Optimum rotor giving the planform [default: glauert].
    #[arg(long, value_enum)]
    method: Option<MethodArg>,
    /// Multiply the chord by Prandtl's tip-loss factor,
    /// F = (2/pi) arccos(exp(-B (R - r) / (2 r sin phi))), so c = F c_optimum; the power
    /// estimate then carries F too.
    #[arg(long)]
    tip_loss: bool,
    /// Make chord and twist straight: least-squares lines over this span range, in percent
    /// of the tip radius, applied over the whole blade (e.g. 50..90).
    #[arg(long, value_name = "FROM..TO", value_parser = parse_range)]
    linear: Option<LinearRange>,
    /// Number of stations, hub and tip included [default: 20].
    #[arg(long, value_name = "N")]
    stations: Option<usize>,
    /// Space stations closer toward the tip (half-cosine) instead of evenly.
    #[arg(long)]
    cosine: bool,
    /// Wind speed, m/s, for rotor speed, tip speed and the overspeed caution.
    #[arg(long, value_name = "M/S", allow_negative_numbers = true)]
    wind: Option<f64>,
    /// Section name written in the table [default: naca4412].
    #[arg(long, value_name = "NAME")]
    section: Option<String>,
    /// Flow mode [default: turbine].
    #[arg(long, value_enum)]
    flow: Option<FlowArg>,
    /// Lift-to-drag ratio of the section at its design point, for the power estimate.
    #[arg(long, value_name = "RATIO", allow_negative_numbers = true)]
    lift_drag: Option<f64>,
    /// Smallest chord written, mm [default: 1 % of the tip radius].
    #[arg(long, value_name = "MM", allow_negative_numbers = true)]
    min_chord: Option<f64>,
    /// Angle of attack above which the section stalls, degrees [default: 14].
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    stall_alpha: Option<f64>,
    /// Design name; names the default output file out/<NAME>.csv [default: draft].
    #[arg(long)]
    name: Option<String>,
    /// Output CSV file, or `-` for standard output [default: out/<NAME>.csv].
    #[arg(long, short, value_name = "PATH")]
    output: Option<PathBuf>,
    /// Also write the whole draft (spec, stations with flow angle, angle of attack,
    /// tip-loss factor and solidity, power coefficient, remarks) as JSON to this file.
    #[arg(long, value_name = "PATH")]
    json: Option<PathBuf>,
    /// Also print every station with flow angle, angle of attack, tip-loss factor and
    /// solidity.
    #[arg(long)]
    details: bool,
}

/// Parses `FROM..TO` in percent of the tip radius.
fn parse_range(text: &str) -> Result<LinearRange, String> {
    let (a, b) = text
        .split_once("..")
        .ok_or_else(|| format!("`{text}`: expected FROM..TO in percent, e.g. 50..90"))?;
    let num = |s: &str| -> Result<f64, String> {
        s.trim()
            .trim_end_matches('%')
            .parse::<f64>()
            .map_err(|_| format!("`{s}` in `{text}` is not a number; expected e.g. 50..90"))
    };
    let (from, to) = (num(a)?, num(b)?);
    if !(from.is_finite() && to.is_finite() && 0.0 <= from && from < to && to <= 100.0) {
        return Err(format!(
            "`{text}`: need 0 <= FROM < TO <= 100 (percent of the tip radius), e.g. 50..90"
        ));
    }
    Ok(LinearRange {
        from: from / 100.0,
        to: to / 100.0,
    })
}

/// The note printed when a spec or the command line uses the old name of
/// `inner_radius`.
const OLD_NAME_NOTE: &str = "note: the hub radius of a draft is now called the inner radius \
    (--inner-radius, inner_radius in a spec file): the radius of the first station, where the \
    drafted blade starts; the old name still works";

/// True when a spec file's text uses the old key `hub_radius` at its top level.
fn uses_old_name(text: &str, is_json: bool) -> bool {
    if is_json {
        serde_json::from_str::<serde_json::Value>(text)
            .ok()
            .is_some_and(|v| v.get("hub_radius").is_some())
    } else {
        toml::from_str::<toml::Table>(text)
            .ok()
            .is_some_and(|t| t.contains_key("hub_radius"))
    }
}

/// Reads a spec file (TOML, or JSON when the name ends in `.json`); true when it uses the
/// old name of `inner_radius`.
fn read_spec(path: &Path) -> anyhow::Result<(DraftSpec, bool)> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("reading the draft spec {}", path.display()))?;
    let is_json = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("json"));
    let spec = if is_json {
        serde_json::from_str(&text).with_context(|| {
            format!(
                "{}: not a valid draft spec (JSON); keys: tip_radius, inner_radius, blades, \
                 tip_speed_ratio, design_cl, design_alpha, and optional ones",
                path.display()
            )
        })?
    } else {
        toml::from_str(&text).with_context(|| {
            format!(
                "{}: not a valid draft spec (TOML); keys: tip_radius, inner_radius, blades, \
                 tip_speed_ratio, design_cl, design_alpha, and optional ones",
                path.display()
            )
        })?
    };
    Ok((spec, uses_old_name(&text, is_json)))
}

/// Builds the spec from the file (if any) and the command-line values; true when either
/// used the old name of `inner_radius`.
fn spec_from(args: &Args) -> anyhow::Result<(DraftSpec, bool)> {
    let mut old_name = args.hub_radius.is_some();
    let mut spec = match &args.spec {
        Some(path) => {
            let (spec, old) = read_spec(path)?;
            old_name |= old;
            spec
        }
        None => {
            let mut missing = Vec::new();
            if args.tip_radius.is_none() {
                missing.push("--tip-radius <MM>");
            }
            if args.inner_radius.is_none() && args.hub_radius.is_none() {
                missing.push("--inner-radius <MM>");
            }
            if args.blades.is_none() {
                missing.push("--blades <N>");
            }
            if args.tip_speed_ratio.is_none() {
                missing.push("--tip-speed-ratio <LAMBDA>");
            }
            if args.design_cl.is_none() {
                missing.push("--design-cl <CL>");
            }
            if args.design_alpha.is_none() {
                missing.push("--design-alpha <DEG>");
            }
            if !missing.is_empty() {
                bail!(
                    "missing {}: give them on the command line or in a spec file (--spec FILE); \
                     the design Cl and angle of attack come from the section's polar",
                    missing.join(", ")
                );
            }
            DraftSpec::new(0.0, 0.0, 0, 0.0, 0.0, 0.0)
        }
    };
    macro_rules! take {
        ($field:ident) => {
            if let Some(v) = args.$field.clone() {
                spec.$field = v;
            }
        };
    }
    take!(tip_radius);
    take!(inner_radius);
    if let Some(v) = args.hub_radius {
        spec.inner_radius = v;
    }
    take!(blades);
    take!(tip_speed_ratio);
    take!(design_cl);
    take!(design_alpha);
    take!(stations);
    take!(section);
    take!(name);
    take!(stall_alpha);
    if let Some(m) = args.method {
        spec.method = match m {
            MethodArg::Betz => Method::Betz,
            MethodArg::Glauert => Method::Glauert,
        };
    }
    if let Some(f) = args.flow {
        spec.flow = match f {
            FlowArg::Turbine => Flow::Turbine,
            FlowArg::Propeller => Flow::Propeller,
        };
    }
    if args.tip_loss {
        spec.tip_loss = true;
    }
    if args.cosine {
        spec.spacing = Spacing::Cosine;
    }
    if args.linear.is_some() {
        spec.linear = args.linear;
    }
    if args.wind.is_some() {
        spec.wind_speed = args.wind;
    }
    if args.lift_drag.is_some() {
        spec.lift_drag = args.lift_drag;
    }
    if args.min_chord.is_some() {
        spec.min_chord = args.min_chord;
    }
    Ok((spec, old_name))
}

/// Creates the folder a file goes into, when it has one.
fn folder_of(path: &Path) -> anyhow::Result<()> {
    match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => std::fs::create_dir_all(d)
            .with_context(|| format!("creating the output folder {}", d.display())),
        _ => Ok(()),
    }
}

/// Prints the summary (unless quiet) and the remarks to standard error.
fn report(table: &DraftTable, args: &Args, ctx: &super::Context, target: &str) {
    let spec = &table.spec;
    let mut err = std::io::stderr().lock();
    if !ctx.quiet {
        let _ = writeln!(
            err,
            "drafted {} stations ({}{}{}) for R = {} mm, first station at {} mm, {} blades, tip speed ratio {}, \
             Cl {}, alpha {}° -> {}",
            table.stations.len(),
            spec.method,
            if spec.tip_loss { ", Prandtl tip loss" } else { "" },
            match spec.linear {
                Some(r) => format!(", linear over {:.0}..{:.0} %", r.from * 100.0, r.to * 100.0),
                None => String::new(),
            },
            spec.tip_radius,
            spec.inner_radius,
            spec.blades,
            spec.tip_speed_ratio,
            spec.design_cl,
            spec.design_alpha,
            target
        );
        let _ = writeln!(
            err,
            "ideal power coefficient C_P = {:.3} (optimum rotor with wake rotation between hub and \
             tip{}{}; Betz limit 16/27 = {:.3}); a built blade reaches less",
            table.power_coefficient,
            if spec.tip_loss { ", with tip loss" } else { "" },
            match spec.lift_drag {
                Some(ld) => format!(", lift-to-drag {ld}"),
                None => ", no drag".to_owned(),
            },
            drafting::optimum::BETZ_LIMIT
        );
        let _ = writeln!(
            err,
            "blade as written: C_P about {:.3} (rough blade-element estimate: lift slope 2 pi \
             per radian up to stall{})",
            table.blade_power_coefficient,
            if spec.lift_drag.is_some() {
                ", constant drag"
            } else {
                ", no drag"
            }
        );
        if let (Some(n), Some(u)) = (table.rpm, table.tip_speed) {
            let _ = writeln!(
                err,
                "at {} m/s wind: {n:.0} rpm, tip speed {u:.1} m/s",
                spec.wind_speed.unwrap_or(0.0)
            );
        }
        if args.details {
            let _ = writeln!(
                err,
                "{:>4} {:>10} {:>10} {:>9} {:>9} {:>9} {:>7} {:>9}",
                "i", "radius mm", "chord mm", "twist °", "phi °", "alpha °", "F", "solidity"
            );
            for (i, s) in table.stations.iter().enumerate() {
                let _ = writeln!(
                    err,
                    "{i:>4} {:>10.2} {:>10.2} {:>9.2} {:>9.2} {:>9.2} {:>7.3} {:>9.3}",
                    s.radius, s.chord, s.twist, s.flow_angle, s.alpha, s.tip_loss, s.solidity
                );
            }
        }
    }
    for r in &table.remarks {
        if r.severity == Severity::Note && ctx.quiet {
            continue;
        }
        let _ = writeln!(err, "{r}");
    }
}

/// Runs the subcommand.
pub fn run(args: Args, ctx: &super::Context) -> anyhow::Result<super::Verdict> {
    let (spec, old_name) = spec_from(&args)?;
    if old_name && !ctx.quiet {
        eprintln!("{OLD_NAME_NOTE}");
    }
    let table = drafting::draft(&spec)?;
    let to_stdout = args.output.as_deref() == Some(Path::new("-"));
    // Both files appear together or not at all.
    let mut batch = Batch::new();
    let target = if to_stdout {
        "standard output".to_owned()
    } else {
        let path = args
            .output
            .clone()
            .unwrap_or_else(|| Path::new("out").join(format!("{}.csv", spec.name)));
        folder_of(&path)?;
        batch.write(&path, |w| table.write_csv(w).map_err(std::io::Error::other))?;
        path.display().to_string()
    };
    if let Some(path) = &args.json {
        folder_of(path)?;
        batch.write(path, |w| {
            serde_json::to_writer_pretty(&mut *w, &table)?;
            writeln!(w)
        })?;
    }
    batch.commit()?;
    if to_stdout {
        let mut csv = Vec::new();
        table
            .write_csv(&mut csv)
            .context("writing the table to standard output")?;
        super::emit(&String::from_utf8_lossy(&csv));
    }
    report(&table, &args, ctx, &target);
    Ok(super::Verdict::Done)
}
