//! Running a design's variants side by side (`build` and `report`): each variant's files
//! in a folder of its own name, one summary table (`<design>-variants.csv` and `.json`)
//! beside them. All files appear together, or none (a variant that fails stops every
//! file of the run).

use std::path::{Path, PathBuf};
use std::time::Instant;

use anyhow::Context as _;
use rayon::prelude::*;
use spanwright::atomic::Batch;
use spanwright::design::variants::Variant;
use spanwright::design::Design;
use spanwright::report::{summary_csv, summary_json, SummaryRow};

/// What one variant's job made: its summary row, its files (staged, not yet in place)
/// and whatever else the command reports.
pub struct Done<T> {
    /// The summary row (its time is filled in by [`run_all`]).
    pub row: SummaryRow,
    /// The variant's files, staged.
    pub batch: Batch,
    /// The command's own results.
    pub extra: T,
}

/// The results of every variant, in the design's order.
pub struct Finished<T> {
    /// One row per variant.
    pub rows: Vec<SummaryRow>,
    /// The commands' own results, one per variant.
    pub extras: Vec<T>,
    /// Every file written, the summary files last.
    pub files: Vec<PathBuf>,
}

impl<T> Finished<T> {
    /// The run for scripts: the design's name, one row per variant, the files written.
    pub fn json(&self, design: &str) -> anyhow::Result<String> {
        let json = serde_json::json!({
            "design": design,
            "variants": self.rows,
            "files": self.files.iter().map(|p| p.display().to_string()).collect::<Vec<_>>(),
        });
        Ok(serde_json::to_string_pretty(&json)?)
    }

    /// The run for people: `heading`, the `notes` (one a line), the table, the files.
    pub fn text<'a>(&self, heading: &str, notes: impl IntoIterator<Item = &'a String>) -> String {
        let mut text = format!("{heading}\n");
        for line in notes {
            text.push_str(&format!("  {line}\n"));
        }
        text.push_str(&table(&self.rows));
        for f in &self.files {
            text.push_str(&format!("  wrote {}\n", f.display()));
        }
        text
    }
}

/// Runs `job(variant, folder)` for every variant in parallel (rayon; each job on one
/// thread), times each, then writes every variant's files and, when `write`, the
/// summary. A failed variant's error names it; with several failures the others are
/// printed first and bad input wins over a failed check (exit 2 before 1).
pub fn run_all<T: Send>(
    design: &Design,
    variants: &[Variant],
    out: &Path,
    write: bool,
    job: impl Fn(&Variant, &Path) -> anyhow::Result<Done<T>> + Sync,
) -> anyhow::Result<Finished<T>> {
    // The folders this run makes, removed again (when still empty) if it fails.
    let mut made = Vec::new();
    if write && !out.exists() {
        made.push(out.to_path_buf());
    }
    for v in variants.iter().filter(|_| write) {
        let dir = out.join(&v.name);
        if !dir.exists() {
            made.push(dir.clone());
        }
        std::fs::create_dir_all(&dir)
            .with_context(|| format!("cannot create the output folder {}", dir.display()))?;
    }
    let result = run_jobs(design, variants, out, write, job);
    if result.is_err() {
        for dir in made.iter().rev() {
            let _ = std::fs::remove_dir(dir);
        }
    }
    result
}

fn run_jobs<T: Send>(
    design: &Design,
    variants: &[Variant],
    out: &Path,
    write: bool,
    job: impl Fn(&Variant, &Path) -> anyhow::Result<Done<T>> + Sync,
) -> anyhow::Result<Finished<T>> {
    let results: Vec<anyhow::Result<Done<T>>> = variants
        .par_iter()
        .map(|v| {
            let started = Instant::now();
            let mut done =
                job(v, &out.join(&v.name)).with_context(|| format!("variant \"{}\"", v.name))?;
            done.row.seconds = started.elapsed().as_secs_f64();
            Ok(done)
        })
        .collect();
    let mut dones = Vec::with_capacity(results.len());
    let mut errors = Vec::new();
    for r in results {
        match r {
            Ok(d) => dones.push(d),
            Err(e) => errors.push(e),
        }
    }
    if !errors.is_empty() {
        let worst = errors
            .iter()
            .position(|e| !super::is_failed_check(e))
            .unwrap_or(0);
        let chosen = errors.swap_remove(worst);
        for e in &errors {
            eprintln!("error: {e:#}");
        }
        return Err(chosen);
    }
    let rows: Vec<SummaryRow> = dones.iter().map(|d| d.row.clone()).collect();
    let mut summary = Batch::new();
    if write {
        let stem = out.join(format!("{}-variants", design.name));
        summary.write(&stem.with_extension("csv"), |w| {
            w.write_all(summary_csv(&rows).as_bytes())
        })?;
        summary.write(&stem.with_extension("json"), |w| {
            w.write_all(summary_json(&rows).as_bytes())
        })?;
    }
    let mut files = Vec::new();
    let mut extras = Vec::with_capacity(dones.len());
    for d in dones {
        files.extend(d.batch.commit()?);
        extras.push(d.extra);
    }
    files.extend(summary.commit()?);
    Ok(Finished {
        rows,
        extras,
        files,
    })
}

/// The summary as a text table, one line per variant.
pub fn table(rows: &[SummaryRow]) -> String {
    use std::fmt::Write as _;
    let mut s = String::new();
    let _ = writeln!(
        s,
        "  {:<16} {:>9} {:>4} {:>11} {:>9} {:>7} {:>5} {:>8} {:>7}",
        "variant", "tip mm", "turn", "volume mm³", "mass g", "safety", "fits", "segments", "s"
    );
    for r in rows {
        let rotation = match r.rotation {
            spanwright::design::Rotation::Ccw => "ccw",
            spanwright::design::Rotation::Cw => "cw",
        };
        let _ = writeln!(
            s,
            "  {:<16} {:>9.2} {:>4} {:>11.0} {:>9.2} {:>7} {:>5} {:>8} {:>7.2}",
            r.variant,
            r.tip_radius_mm,
            rotation,
            r.blade_volume_mm3,
            r.blade_mass_g,
            r.safety_factor.map_or("-".into(), |f| format!("{f:.2}")),
            r.fits.map_or("-", |f| if f { "yes" } else { "no" }),
            r.segments,
            r.seconds
        );
    }
    s
}
