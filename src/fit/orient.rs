//! Choosing the pose a person would print: among the orientations that fit, the one that
//! needs the least support, rests on the bed, and lays its layers along the main stress.
//!
//! # Score (lower is better)
//! For a pose with `up` (part frame) pointing away from the bed:
//!
//! ```text
//! score = 1.0 * support + 1.0 * layers + 0.25 * footing + 0.1 * height
//! support = overhang area / (half the part's surface area), at most 1
//! layers  = sin^2(angle between the span and the bed plane)    (0 without blade axes)
//! footing = 1 - contact area / (height / 3)^2, between 0 and 1
//! height  = part height / usable printer height
//! ```
//!
//! * **support**: the surface needing support ([`super::underside()`]) against half the
//!   surface (a closed part turns about half its surface downward).
//! * **layers**: a blade's main stress runs along its span (bending about the chord and
//!   centrifugal tension, see [`crate::props`]). For a uniaxial stress `s` along a
//!   direction at angle `phi` to the layer plane, the normal stress across the layer
//!   boundaries is `s sin^2(phi)` (plane-stress transformation, e.g. Gere & Goodno,
//!   *Mechanics of Materials*, plane stress, `s_n = s cos^2(theta)` with `theta` measured
//!   from the boundary's normal). Layers bond less well than the filament is strong, so
//!   **layers across the span (span vertical, `phi` = 90 degrees) are weakest in
//!   bending**; layers along the span carry it best (common practice).
//! * **footing**: the contact that makes the brim rule of [`super::advice`] unnecessary
//!   (a part taller than three times the side of a square of its contact area wants a
//!   brim, common practice); less contact costs up to 0.25.
//! * **height**: fewer layers print sooner; a small preference only.
//!
//! Support and layers weigh the same: a blade stood on its root (layers across the
//! span) scores about as badly as one lying with its whole underside on support.
//!
//! # Candidates and ties
//! Down directions are tried over an even lattice on the sphere (400), the part's flat
//! faces on its hull, its own axes and, for a blade, the centre of each pose class; each
//! class's best (or, without blade axes, the best few at least 30 degrees apart) is
//! refined by a pattern search that keeps the class and the fit. Poses are ranked by
//! score rounded to 1e-9; **ties go to the pose whose `up` is nearest the part's own +z,
//! then +y, then +x** (compared after rounding to 1e-9), so equal poses, such as the six
//! faces of a cube, are chosen the same way every run.

use super::pose::{BladeAxes, PoseClass};
use super::search::Placement;
use super::underside::{Surfaces, Underside, UndersideOptions};
use crate::mesh::TriMesh;
use nalgebra::{Matrix3, Vector3};

/// Weight of the support term (see the module docs).
pub const W_SUPPORT: f64 = 1.0;
/// Weight of the layer-direction term.
pub const W_LAYERS: f64 = 1.0;
/// Weight of the footing term.
pub const W_FOOTING: f64 = 0.25;
/// Weight of the height term.
pub const W_HEIGHT: f64 = 0.1;
/// A part taller than this many times the side of a square of its bed contact wants a
/// brim (common practice).
pub const BRIM_ASPECT: f64 = 3.0;

/// What the orientation search weighs besides fitting.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PrintOptions {
    /// Overhang angle and first layer.
    pub underside: UndersideOptions,
    /// The blade's directions, when the part is a blade in a known frame (default none:
    /// no layer term, no pose classes).
    pub axes: Option<BladeAxes>,
    /// The pose class asked for (default none: the best score). Needs `axes`.
    pub pose: Option<PoseClass>,
    /// How many poses to offer (default 4; the requested class's best is added).
    pub offered: usize,
}

impl PrintOptions {
    /// The defaults.
    pub const DEFAULT: PrintOptions = PrintOptions {
        underside: UndersideOptions::DEFAULT,
        axes: None,
        pose: None,
        offered: 4,
    };
}

impl Default for PrintOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// The terms of a pose's score (each between 0 and 1, see the module docs).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct ScoreTerms {
    /// Overhang area over half the surface area.
    pub support: f64,
    /// `sin^2` of the angle between the span and the layers (0 without blade axes).
    pub layers: f64,
    /// Missing share of the contact the brim rule asks for.
    pub footing: f64,
    /// Height over the usable height.
    pub height: f64,
}

impl ScoreTerms {
    /// The weighted sum.
    pub fn score(&self) -> f64 {
        W_SUPPORT * self.support
            + W_LAYERS * self.layers
            + W_FOOTING * self.footing
            + W_HEIGHT * self.height
    }
}

/// One pose offered, with its figures. Serialises as plain numbers.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Pose {
    /// Its class (blades only).
    pub class: Option<PoseClass>,
    /// The part's direction pointing up, away from the bed (part frame, unit).
    pub up: [f64; 3],
    /// Rotation from the part's frame to the printer's (rows: printer x, y, z in part
    /// coordinates).
    pub rotation: [[f64; 3]; 3],
    /// Translation after the rotation, mm (the part centred on the bed, resting on it).
    pub translation: [f64; 3],
    /// Rotation angles about x, then y, then z (fixed axes), degrees.
    pub angles_deg: [f64; 3],
    /// Extents along the printer's x, y, z, mm.
    pub size: [f64; 3],
    /// Bed contact, overhang and height.
    pub underside: Underside,
    /// Angle between the span and the layers (the bed plane), degrees: 0 = layers along
    /// the span (strongest in bending), 90 = across it (weakest). Blades only.
    pub span_to_layers_deg: Option<f64>,
    /// The score's terms.
    pub terms: ScoreTerms,
    /// The score (lower is better).
    pub score: f64,
}

impl Pose {
    /// The placement as a rigid transform.
    pub fn placement(&self) -> Placement {
        Placement {
            rotation: Matrix3::from_fn(|i, j| self.rotation[i][j]),
            translation: Vector3::from(self.translation),
        }
    }
}

/// Why the chosen pose was chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Choice {
    /// The best score among the fitting poses.
    Best,
    /// The class asked for (its best pose).
    Requested,
    /// The class asked for has no pose that fits: the best score instead.
    RequestedDoesNotFit,
    /// Nothing fits: the closest placement found.
    NoFit,
}

/// The poses offered and the one chosen.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Orientation {
    /// Poses offered, best score first (the requested one included).
    pub poses: Vec<Pose>,
    /// Index of the chosen pose in `poses`.
    pub chosen: usize,
    /// How it was chosen.
    pub choice: Choice,
    /// The class asked for, if any.
    pub requested: Option<PoseClass>,
    /// Overhang angle and first layer used.
    pub underside_options: UndersideOptions,
    /// The reasons, in words.
    pub why: Vec<String>,
}

impl Orientation {
    /// The chosen pose.
    pub fn pose(&self) -> &Pose {
        &self.poses[self.chosen]
    }
}

/// Scores poses of one part.
#[derive(Debug, Clone)]
pub(super) struct Scorer {
    surfaces: Surfaces,
    half_area: f64,
    usable_height: f64,
    opts: PrintOptions,
}

/// A pose's figures before the exact fit check.
#[derive(Debug, Clone, Copy)]
pub(super) struct Scored {
    pub class: Option<PoseClass>,
    pub underside: Underside,
    pub terms: ScoreTerms,
    pub score: f64,
}

impl Scorer {
    pub(super) fn new(mesh: &TriMesh, usable_height: f64, opts: &PrintOptions) -> Scorer {
        let surfaces = Surfaces::new(mesh);
        let half_area = 0.5 * surfaces.area();
        Scorer {
            surfaces,
            half_area,
            usable_height,
            opts: *opts,
        }
    }

    pub(super) fn class(&self, up: &Vector3<f64>) -> Option<PoseClass> {
        self.opts.axes.and_then(|a| a.classify(up))
    }

    pub(super) fn score(&self, up: &Vector3<f64>) -> Scored {
        let u = self.surfaces.measure(up, &self.opts.underside);
        let support = if self.half_area > 0.0 {
            (u.overhang_area / self.half_area).min(1.0)
        } else {
            0.0
        };
        let layers = self.opts.axes.map_or(0.0, |a| a.across_layers(up));
        let need = (u.height / BRIM_ASPECT).powi(2);
        let footing = if need > 0.0 {
            (1.0 - u.contact_area / need).clamp(0.0, 1.0)
        } else {
            0.0
        };
        let height = if self.usable_height > 0.0 {
            u.height / self.usable_height
        } else {
            0.0
        };
        let terms = ScoreTerms {
            support,
            layers,
            footing,
            height,
        };
        Scored {
            class: self.class(up),
            underside: u,
            terms,
            score: terms.score(),
        }
    }
}

/// Ranking key: score rounded to 1e-9, then `up` nearest +z, +y, +x (see the module docs).
pub(super) fn rank_key(score: f64, up: &Vector3<f64>) -> [i64; 4] {
    let q = |x: f64| (x * 1e9).round() as i64;
    [q(score), -q(up.z), -q(up.y), -q(up.x)]
}

/// Angle between the span and the bed plane for `up`, degrees.
pub(super) fn span_to_layers_deg(axes: &BladeAxes, up: &Vector3<f64>) -> f64 {
    axes.across_layers(up)
        .sqrt()
        .clamp(0.0, 1.0)
        .asin()
        .to_degrees()
}

/// The reasons for the choice, in words.
pub(super) fn reasons(
    poses: &[Pose],
    chosen: usize,
    choice: Choice,
    requested: Option<PoseClass>,
    has_axes: bool,
) -> Vec<String> {
    let mut why = Vec::new();
    let p = &poses[chosen];
    let name = |p: &Pose| {
        p.class
            .map_or_else(|| "this pose".to_string(), |c| c.name().to_string())
    };
    match (choice, requested) {
        (Choice::Requested, Some(c)) => why.push(format!("the pose class {c} was asked for")),
        (Choice::RequestedDoesNotFit, Some(c)) if !has_axes => why.push(format!(
            "the pose class {c} was asked for, but the part's blade axes are unknown, so poses cannot be classed; the best-scoring pose was chosen instead"
        )),
        (Choice::RequestedDoesNotFit, Some(c)) => why.push(format!(
            "no pose of the class {c} that was asked for fits the printer; the best-scoring pose that fits was chosen instead"
        )),
        (Choice::NoFit, _) => why.push("no orientation fits the printer: the closest placement found is shown".into()),
        _ => why.push(format!(
            "{} has the lowest score ({:.3}) of the {} pose(s) offered",
            name(p),
            p.score,
            poses.len()
        )),
    }
    why.push(format!(
        "overhang needing support: {:.0} mm^2; resting on the bed: {:.0} mm^2; height {:.1} mm",
        p.underside.overhang_area, p.underside.contact_area, p.underside.height
    ));
    if let Some(a) = p.span_to_layers_deg {
        why.push(format!(
            "the span is {a:.0} degrees from the layers ({}; layers across the span are weakest in bending)",
            if a < 30.0 {
                "layers run along the span and carry bending best"
            } else if a < 60.0 {
                "layers run obliquely across the span"
            } else {
                "layers run across the span"
            }
        ));
    }
    if let Some(next) = poses
        .iter()
        .enumerate()
        .find(|(i, _)| *i != chosen)
        .map(|x| x.1)
    {
        why.push(format!(
            "next: {} with {:.0} mm^2 of overhang, {:.0} mm^2 on the bed{} (score {:.3})",
            name(next),
            next.underside.overhang_area,
            next.underside.contact_area,
            next.span_to_layers_deg
                .map(|a| format!(", span {a:.0} degrees from the layers"))
                .unwrap_or_default(),
            next.score
        ));
    }
    why
}
