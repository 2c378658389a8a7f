//! The whole job in one call: design -> sections -> blade -> skin -> mesh -> checks.
//!
//! ```no_run
//! let design = spanwright::design::load(std::path::Path::new("examples/garden-turbine.toml"))?;
//! let model = spanwright::pipeline::build(&design, &spanwright::pipeline::BuildOptions::default())?;
//! println!("{} triangles, {:.0} mm³", model.mesh().len(), model.mesh().signed_volume());
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use crate::airfoil::Section;
use crate::blade::{Blade, BladeError};
use crate::check::{check_solid, CheckOptions, CheckReport};
use crate::design::{Design, DesignError};
use crate::loft::{LoftError, Skin};
use crate::mesh::{Part, TriMesh};
use crate::root::{RootSpec, TipSpec};
use crate::tessellate::{tessellate, TessellateError, Tessellation, TessellationOptions};
use std::path::{Path, PathBuf};

/// Why the pipeline stopped.
#[derive(Debug, thiserror::Error)]
pub enum PipelineError {
    /// One or more station sections could not be found or read; every one is listed.
    #[error("{}", .0.join("\n"))]
    Sections(Vec<String>),
    /// The blade could not be built from the stations.
    #[error(transparent)]
    Blade(#[from] BladeError),
    /// The skin could not be lofted.
    #[error(transparent)]
    Loft(#[from] LoftError),
    /// The skin could not be tessellated.
    #[error(transparent)]
    Tessellate(#[from] TessellateError),
    /// An optional table (root, tip, ...) is malformed.
    #[error(transparent)]
    Design(#[from] DesignError),
    /// The built solid failed its own checks (a part that is never written).
    #[error("the solid '{name}' failed its checks:\n{report}")]
    Check {
        /// Part name.
        name: String,
        /// The graded findings.
        report: Box<CheckReport>,
    },
}

/// Options that override the design for one run.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct BuildOptions {
    /// Mesh tolerance, mm (default: the design's).
    pub tolerance: Option<f64>,
}

/// The built blade: every stage's result, for the consumers.
#[derive(Debug, Clone)]
pub struct Model {
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
    /// The tessellation of the surface model.
    pub tessellation: Tessellation,
}

impl Model {
    /// The closed mesh.
    pub fn mesh(&self) -> &TriMesh {
        &self.tessellation.mesh
    }

    /// The genus the blade must have: one per cross hole through its shank.
    pub fn expected_genus(&self) -> u32 {
        self.blade.root().map_or(0, RootSpec::genus)
    }

    /// Runs every solid check on the blade mesh (with the genus its features imply).
    pub fn check(&self) -> CheckReport {
        check_solid(
            self.mesh(),
            &CheckOptions::DEFAULT.with_expected_genus(Some(self.expected_genus())),
        )
    }

    /// The blade as a named part, after its checks: a part that fails them is an error.
    pub fn checked_part(&self) -> Result<Part, PipelineError> {
        let report = self.check();
        if !report.is_ok() {
            return Err(PipelineError::Check {
                name: self.name.clone(),
                report: Box::new(report),
            });
        }
        Ok(self.part())
    }

    /// The blade as a named part.
    pub fn part(&self) -> Part {
        Part {
            name: self.name.clone(),
            mesh: self.tessellation.mesh.clone(),
        }
    }
}

/// Steps between neighbouring stations that are steeper than a blade surface can
/// follow without risk of folding over itself: chord, sweep or prebend changing by more
/// than the radial step (45 degrees), or twist by more than 5 degrees per millimetre.
/// Each message names both stations (common practice for lofted surfaces; these are
/// warnings, the solid checks decide).
pub fn steep_steps(design: &Design) -> Vec<String> {
    let mut out = Vec::new();
    for w in design.stations.windows(2) {
        let dr = w[1].radius - w[0].radius;
        let mut what = Vec::new();
        for (name, a, b) in [
            ("chord", w[0].chord, w[1].chord),
            ("sweep", w[0].sweep, w[1].sweep),
            ("prebend", w[0].prebend, w[1].prebend),
        ] {
            if (b - a).abs() > dr {
                what.push(format!("{name} changes by {:.1} mm", (b - a).abs()));
            }
        }
        if (w[1].twist - w[0].twist).abs() > 5.0 * dr {
            what.push(format!(
                "twist changes by {:.1} degrees",
                (w[1].twist - w[0].twist).abs()
            ));
        }
        if !what.is_empty() {
            out.push(format!(
                "{} -> {}: {} over {:.1} mm of span; a step this steep may fold the surface (add stations between, or check the values)",
                w[0].origin,
                w[1].origin,
                what.join(" and "),
                dr
            ));
        }
    }
    out
}

/// Folders searched for section files: the design file's folder, then `profiles/` beside
/// it and in the working directory.
pub fn section_dirs(design: &Design) -> Vec<PathBuf> {
    let mut dirs = Vec::new();
    if let Some(dir) = design.source.as_deref().and_then(Path::parent) {
        dirs.push(dir.to_path_buf());
        dirs.push(dir.join("profiles"));
        if let Some(up) = dir.parent() {
            dirs.push(up.join("profiles"));
        }
    }
    dirs.push(PathBuf::from("profiles"));
    dirs
}

/// A trailing edge opened for printing at one station.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TeChange {
    /// Station radius, mm.
    pub radius: f64,
    /// Trailing-edge thickness before, mm.
    pub before: f64,
    /// Trailing-edge thickness after, mm.
    pub after: f64,
    /// Section area added, mm².
    pub added_area: f64,
}

/// Resolves every station's section, scales it to the station's relative thickness,
/// resamples it to the design's point structure and opens its trailing edge to the
/// design's minimum thickness. Every failure is reported at once with the station's
/// origin (file and line, or key).
pub fn resolve_sections(design: &Design) -> Result<(Vec<Section>, Vec<TeChange>), PipelineError> {
    let dirs = section_dirs(design);
    let dir_refs: Vec<&Path> = dirs.iter().map(PathBuf::as_path).collect();
    let n = design.blade.points_per_side;
    let mut cache: Vec<(String, Section)> = Vec::new();
    let mut errors = Vec::new();
    let mut out = Vec::with_capacity(design.stations.len());
    let mut te_changes = Vec::new();
    for st in &design.stations {
        let base = match cache.iter().find(|(name, _)| *name == st.section) {
            Some((_, s)) => Ok(s.clone()),
            None => crate::airfoil::resolve(&st.section, &dir_refs).map_err(|e| e.to_string()),
        };
        let base = match base {
            Ok(s) => {
                if !cache.iter().any(|(name, _)| *name == st.section) {
                    cache.push((st.section.clone(), s.clone()));
                }
                s
            }
            Err(e) => {
                errors.push(format!("{}: {e}", st.origin));
                continue;
            }
        };
        let shaped = match st.thickness {
            Some(t) => base.with_thickness(t, n),
            None => Ok(base),
        }
        .and_then(|s| {
            s.resample(n)
                .map_err(|e| crate::airfoil::SectionError::shape(&st.section, e))
        });
        let shaped = match (shaped, design.blade.min_te_thickness) {
            (Ok(s), Some(min_mm)) => {
                crate::airfoil::thicken_te(&s, (min_mm / st.chord).min(0.1), n).map(|t| {
                    if t.te_after > t.te_before {
                        te_changes.push(TeChange {
                            radius: st.radius,
                            before: t.te_before * st.chord,
                            after: t.te_after * st.chord,
                            added_area: t.area_change() * st.chord * st.chord,
                        });
                    }
                    t.section
                })
            }
            (other, _) => other,
        };
        match shaped {
            Ok(s) => out.push(in_designation_frame(&st.section, s)),
            Err(e) => errors.push(format!("{}: section '{}': {e}", st.origin, st.section)),
        }
    }
    if errors.is_empty() {
        make_trailing_edges_consistent(&mut out, design, &mut te_changes)?;
        Ok((out, te_changes))
    } else {
        Err(PipelineError::Sections(errors))
    }
}

/// Generated sections are normalised like any file (leading edge = the outline point
/// farthest from the trailing edge), but a designation's own chord line runs from the
/// mean line's origin to the trailing edge (NACA Reports 460 and 537), and twist and
/// published polars refer to that line. For a cambered section the two differ by a
/// fraction of a degree (about 0.3 degrees for a 4415), so the station section is mapped
/// back into the designation's frame: the similarity fixed by two points of the outline
/// whose positions are known in both frames. Sections from files keep their normalised
/// frame. Symmetric sections are unchanged.
fn in_designation_frame(name: &str, section: Section) -> Section {
    use crate::airfoil::{Designation, Parsed, GENERATED_POINTS};
    let Parsed::Valid(d) = Designation::parse(name) else {
        return section;
    };
    let raw = d.raw_outline(GENERATED_POINTS);
    let Ok(norm) = d.section() else {
        return section;
    };
    // Upper trailing edge and mid-chord of the upper surface: same indices in the raw
    // outline and in the normalised one (normalising only inserts the leading edge).
    let k = GENERATED_POINTS / 2;
    let (a0, ak) = (norm.points()[0], norm.points()[k]);
    let (b0, bk) = (raw[0], raw[k]);
    let (da, db) = (ak - a0, bk - b0);
    let den = da.norm_squared();
    if !(den > 0.0) {
        return section;
    }
    // Complex ratio db / da: rotation and scale.
    let (re, im) = (
        (db.x * da.x + db.y * da.y) / den,
        (db.y * da.x - db.x * da.y) / den,
    );
    section.map_points(|_, p| {
        let d = p - a0;
        nalgebra::Point2::new(b0.x + re * d.x - im * d.y, b0.y + im * d.x + re * d.y)
    })
}

/// A blade's trailing edge is either sharp at every station or blunt at every station:
/// where sharp and blunt sections mix, the sharp ones are opened to the thinnest blunt
/// trailing edge (as a fraction of chord), so the trailing-edge face never pinches to
/// zero width between stations, where the spanwise spline could let the upper and lower
/// trailing edges cross.
fn make_trailing_edges_consistent(
    sections: &mut [Section],
    design: &Design,
    te_changes: &mut Vec<TeChange>,
) -> Result<(), PipelineError> {
    const SHARP: f64 = 1e-9;
    let thinnest_blunt = sections
        .iter()
        .map(Section::te_gap)
        .filter(|&g| g > SHARP)
        .fold(f64::INFINITY, f64::min);
    if !thinnest_blunt.is_finite() {
        return Ok(());
    }
    let n = design.blade.points_per_side;
    for (s, st) in sections.iter_mut().zip(&design.stations) {
        if s.te_gap() <= SHARP {
            let t = crate::airfoil::thicken_te(s, thinnest_blunt, n).map_err(|e| {
                PipelineError::Sections(vec![format!(
                    "{}: section '{}': {e}",
                    st.origin, st.section
                )])
            })?;
            te_changes.push(TeChange {
                radius: st.radius,
                before: t.te_before * st.chord,
                after: t.te_after * st.chord,
                added_area: t.area_change() * st.chord * st.chord,
            });
            *s = t.section;
        }
    }
    Ok(())
}

/// Builds the blade of a design up to its tessellation.
pub fn build(design: &Design, opts: &BuildOptions) -> Result<Model, PipelineError> {
    let (sections, te_changes) = resolve_sections(design)?;
    let mut blade = Blade::new(&design.stations, &sections, &design.blade)?;
    if let Some(root) = design.table::<RootSpec>("root")? {
        blade = blade.with_root(root.to_mm(design.length_to_mm))?;
    }
    if let Some(mut tip) = design.table::<TipSpec>("tip")? {
        tip.length = tip.length.map(|l| l * design.length_to_mm);
        blade = blade.with_tip(tip)?;
    }
    // Rings placed so the skin follows the blade model within a share of the tolerance;
    // the mesh gets the rest (crate::rings).
    let tolerance = opts.tolerance.unwrap_or(design.blade.tolerance);
    let placed = crate::rings::place_rings(&blade, tolerance)?;
    let tess_opts = TessellationOptions {
        tolerance: placed.mesh_tolerance(tolerance),
        ..TessellationOptions::DEFAULT
    };
    let (ring_radii, skin) = (placed.radii, placed.skin);
    let mut tessellation = tessellate(&skin, &tess_opts)?;
    if let Some(root) = blade.root() {
        let (ring, cap) = (
            tessellation.root_ring.clone(),
            tessellation.root_cap.clone(),
        );
        crate::mount::add_mount_features(
            &mut tessellation.mesh,
            &ring,
            cap,
            root,
            blade.root_face(),
        )
        .map_err(|e| PipelineError::Blade(e.into()))?;
        // Holes leave the skin vertices they cut away unused: drop them so mesh files
        // list only what the triangles use.
        tessellation.mesh.compact();
    }
    Ok(Model {
        name: design.name.clone(),
        sections,
        te_changes,
        blade,
        ring_radii,
        skin,
        tessellation,
    })
}

/// The printable parts of a design (the blade), each checked: a part that fails its
/// checks is an error, never returned.
pub fn build_parts(design: &Design) -> Result<Vec<Part>, PipelineError> {
    Ok(vec![
        build(design, &BuildOptions::default())?.checked_part()?
    ])
}

/// Builds the blade and assembles the rotor of the design's `[rotor]` table (blades
/// pitched, coned and spaced about the rotor axis, plus the `[rotor.hub]` body when
/// given). A design without a `[rotor]` table is an error naming the table.
pub fn build_rotor(
    design: &Design,
    opts: &BuildOptions,
) -> Result<crate::assembly::Rotor, PipelineError> {
    let Some(spec) = crate::assembly::RotorSpec::from_design(design)? else {
        return Err(DesignError::one(design.problem(
            "rotor",
            "no [rotor] table: add one with `blades` and `hub-radius` (mm) to assemble a rotor",
        ))
        .into());
    };
    let model = build(design, opts)?;
    let mut blade_opts = design.blade.clone();
    blade_opts.tolerance = opts.tolerance.unwrap_or(blade_opts.tolerance);
    Ok(crate::assembly::assemble(
        &model,
        &spec,
        &blade_opts,
        design,
    )?)
}
