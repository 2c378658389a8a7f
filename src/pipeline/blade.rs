//! The blade up to its mesh: sections -> blade model (root, tip) -> skin -> mesh with
//! its mounting features.

use super::sections::{resolve_sections, TeChange};
use super::{Options, PipelineError, Timings};
use crate::airfoil::Section;
use crate::blade::{Blade, BladeError};
use crate::design::Design;
use crate::loft::Skin;
use crate::mesh::{Part, TriMesh};
use crate::rings::place_rings;
use crate::root::{RootSpec, TipSpec};
use crate::tessellate::{estimate, tessellate, Tessellation, TessellationOptions};

/// The built blade: every stage's result, for the consumers (parts, reports, STEP).
#[derive(Debug, Clone)]
pub struct BuiltBlade {
    /// Design name.
    pub name: String,
    /// The resolved station sections (resampled, one per station).
    pub sections: Vec<Section>,
    /// Trailing edges opened for printing.
    pub te_changes: Vec<TeChange>,
    /// The spanwise-interpolated blade.
    pub blade: Blade,
    /// Radii of the rings the skin interpolates, mm.
    pub ring_radii: Vec<f64>,
    /// The surface model.
    pub skin: Skin,
    /// The tessellation of the surface model, with the mounting features cut in.
    pub tessellation: Tessellation,
    /// The mesh tolerance used, mm.
    pub tolerance: f64,
    /// Proven upper bound of the distance from the skin to its mesh, mm
    /// ([`crate::tessellate::mesh_deviation`]).
    pub deviation: f64,
    /// Largest distance from the skin to the blade the design describes, measured between
    /// the rings, mm ([`crate::rings::skin_to_design`]).
    pub skin_to_design: f64,
}

impl BuiltBlade {
    /// How far the mesh may be from the design's blade, mm: the mesh-to-skin bound plus
    /// the skin-to-design distance (triangle inequality). At most the tolerance.
    pub fn mesh_to_design(&self) -> f64 {
        self.deviation + self.skin_to_design
    }
}

impl BuiltBlade {
    /// The closed mesh (not yet checked: the parts stage checks it).
    pub fn mesh(&self) -> &TriMesh {
        &self.tessellation.mesh
    }

    /// The genus the blade must have: one per cross hole through its shank.
    pub fn expected_genus(&self) -> u32 {
        self.blade.root().map_or(0, RootSpec::genus)
    }

    /// The blade as a named, unchecked part.
    pub fn part(&self) -> Part {
        Part {
            name: self.name.clone(),
            mesh: self.tessellation.mesh.clone(),
        }
    }
}

/// Builds the blade of a design up to its tessellation (no checks yet).
///
/// # Errors
/// Every stage's error: sections, blade, root and tip tables, loft, tessellation and
/// mounting features.
pub fn build_blade(design: &Design, opts: &Options) -> Result<BuiltBlade, PipelineError> {
    build_blade_timed(design, opts, &mut Timings::default())
}

/// [`build_blade`], adding each stage's time to `timings`.
///
/// # Errors
/// As [`build_blade`].
pub fn build_blade_timed(
    design: &Design,
    opts: &Options,
    timings: &mut Timings,
) -> Result<BuiltBlade, PipelineError> {
    if let Some(t) = opts.tolerance {
        design.check_tolerance(t, "the tolerance given for this build")?;
    }
    let (sections, te_changes) = timings.time("sections", || resolve_sections(design))?;
    let blade = timings.time("blade", || blade_model(design, &sections))?;
    // Rings placed so the skin follows the blade model within a share of the tolerance;
    // the mesh gets the rest (see `crate::rings`).
    let tolerance = opts.tolerance.unwrap_or(design.blade.tolerance);
    let placed = timings.time("skin", || place_rings(&blade, tolerance))?;
    let tess_opts = TessellationOptions {
        tolerance: placed.mesh_tolerance(tolerance),
        ..TessellationOptions::DEFAULT
    };
    let skin_to_design = placed.skin_to_design.max;
    let (ring_radii, skin) = (placed.radii, placed.skin);
    timings.time("estimate", || {
        check_work(&skin, tess_opts.tolerance, tolerance, available_memory())
    })?;
    let mut tessellation = timings.time("tessellation", || tessellate(&skin, &tess_opts))?;
    let deviation = timings.time("deviation", || tessellation.measured_deviation(&skin, 2));
    // The per-cell bounds served the measurement; the checks need the memory.
    tessellation.known = Default::default();
    if let Some(root) = blade.root() {
        timings.time("mount features", || {
            cut_mount_features(&mut tessellation, root, blade.root_face())
        })?;
    }
    Ok(BuiltBlade {
        name: design.name.clone(),
        sections,
        te_changes,
        blade,
        ring_radii,
        skin,
        tessellation,
        tolerance,
        deviation,
        skin_to_design,
    })
}

/// Share of the free memory a build may plan to use.
const MEMORY_SHARE: f64 = 0.8;

/// Refuses a mesh whose estimated peak memory ([`crate::tessellate::estimate`]) exceeds
/// `MEMORY_SHARE` (80 %) of `available` bytes, before any meshing. `mesh_tolerance` is the
/// tessellation's tolerance, `tolerance` the one asked for (named in the message).
///
/// # Errors
/// [`PipelineError::TooLarge`] with the figures and a tolerance that would fit.
pub fn check_work(
    skin: &Skin,
    mesh_tolerance: f64,
    tolerance: f64,
    available: f64,
) -> Result<(), PipelineError> {
    let work = estimate(skin, mesh_tolerance);
    let budget = MEMORY_SHARE * available;
    if work.peak_bytes <= budget {
        return Ok(());
    }
    // Triangles grow as 1 / tolerance (the grid spacing as its square root both ways).
    let suggest = tolerance * work.peak_bytes / budget;
    Err(PipelineError::TooLarge {
        tolerance,
        triangles: work.triangles,
        bytes: work.peak_bytes,
        available,
        suggest,
    })
}

/// Free memory, bytes: `MemAvailable` of `/proc/meminfo` where there is one (Linux),
/// else 4 GB.
fn available_memory() -> f64 {
    const FALLBACK: f64 = 4e9;
    let Ok(text) = std::fs::read_to_string("/proc/meminfo") else {
        return FALLBACK;
    };
    text.lines()
        .find_map(|l| l.strip_prefix("MemAvailable:"))
        .and_then(|rest| {
            rest.trim()
                .trim_end_matches("kB")
                .trim()
                .parse::<f64>()
                .ok()
        })
        .map_or(FALLBACK, |kb| kb * 1024.0)
}

/// The blade model: stations interpolated along the span, with the design's `[root]`
/// and `[tip]` tables.
fn blade_model(design: &Design, sections: &[Section]) -> Result<Blade, PipelineError> {
    let mut blade = Blade::new(&design.stations, sections, &design.blade)?;
    if let Some(root) = design.table_mm::<RootSpec>("root")? {
        blade = blade.with_root(root).map_err(|e| in_table(design, e))?;
    }
    if let Some(tip) = design.table_mm::<TipSpec>("tip")? {
        blade = blade.with_tip(tip).map_err(|e| in_table(design, e))?;
    }
    Ok(blade)
}

/// A `[root]` or `[tip]` error as a design problem naming the file, line and key.
fn in_table(design: &Design, e: BladeError) -> PipelineError {
    match e.key() {
        Some(key) => PipelineError::Table {
            problem: Box::new(design.problem(&key, e.to_string())),
            cause: e,
        },
        None => e.into(),
    }
}

/// Cuts the root's flange, bore and cross holes into the mesh, then drops the skin
/// vertices the holes left unused, so mesh files list only what the triangles use.
fn cut_mount_features(
    tessellation: &mut Tessellation,
    root: &RootSpec,
    root_face: f64,
) -> Result<(), PipelineError> {
    let (ring, cap) = (
        tessellation.root_ring.clone(),
        tessellation.root_cap.clone(),
    );
    crate::mount::add_mount_features(&mut tessellation.mesh, &ring, cap, root, root_face)?;
    if let Some(map) = tessellation.mesh.compact_map() {
        let grid = tessellation.us.len() * tessellation.vs.len();
        tessellation.grid_ids = Some(match tessellation.grid_ids.take() {
            Some(ids) => ids
                .iter()
                .map(|&v| map.get(v as usize).copied().unwrap_or(u32::MAX))
                .collect(),
            None => map[..grid].to_vec(),
        });
    }
    Ok(())
}
