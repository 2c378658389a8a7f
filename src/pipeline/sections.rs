//! Station sections: each station's section resolved by name, scaled to the station's
//! thickness, resampled to the design's point structure, its trailing edge opened to
//! the design's minimum thickness, and sharp and blunt trailing edges made consistent.

use super::PipelineError;
use crate::airfoil::{Section, SectionError};
use crate::design::Design;
use std::fmt;
use std::path::{Path, PathBuf};

/// A station whose section could not be found, read or shaped.
#[derive(Debug)]
pub struct StationSectionError {
    /// Where the station is written (file and line, or key).
    pub origin: String,
    /// The section name the station gives.
    pub section: String,
    /// What went wrong.
    pub error: SectionError,
}

impl fmt::Display for StationSectionError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{}: section '{}': {}",
            self.origin, self.section, self.error
        )
    }
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
            None => crate::airfoil::resolve(&st.section, &dir_refs),
        };
        let base = match base {
            Ok(s) => {
                if !cache.iter().any(|(name, _)| *name == st.section) {
                    cache.push((st.section.clone(), s.clone()));
                }
                s
            }
            Err(error) => {
                errors.push(StationSectionError {
                    origin: st.origin.clone(),
                    section: st.section.clone(),
                    error,
                });
                continue;
            }
        };
        let shaped = match st.thickness {
            Some(t) => base.with_thickness(t, n),
            None => Ok(base),
        }
        .and_then(|s| {
            s.resample(n)
                .map_err(|e| SectionError::shape(&st.section, e))
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
            Ok(s) => out.push(s),
            Err(error) => errors.push(StationSectionError {
                origin: st.origin.clone(),
                section: st.section.clone(),
                error,
            }),
        }
    }
    if errors.is_empty() {
        make_trailing_edges_consistent(&mut out, design, &mut te_changes)?;
        Ok((out, te_changes))
    } else {
        Err(PipelineError::Sections(errors))
    }
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
            let t = crate::airfoil::thicken_te(s, thinnest_blunt, n).map_err(|error| {
                PipelineError::Sections(vec![StationSectionError {
                    origin: st.origin.clone(),
                    section: st.section.clone(),
                    error,
                }])
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
