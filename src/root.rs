//! Root and tip: the round shank for hub mounting, its smooth transition into the first
//! airfoil station, the mounting features, and the tip closure.
//!
//! ```text
//!  z (span) ->
//!  root face      shank end        first station                 tip station   tip end
//!  |<- shank-length ->|<- transition-length ->|<------ blade ------>|<- tip-length ->|
//!  [flange]  circle (or ellipse)   circle -> airfoil                 airfoil -> small cap
//!  [bore from the root face] [cross holes along y] [flat]
//! ```
//!
//! A `[root]` table, lengths in the design's unit:
//!
//! ```toml
//! [root]
//! shank-diameter = 24
//! shank-length = 25
//! transition-length = 30
//! # shank-thickness = 20      # elliptical shank (along the rotor axis)
//! # flat-depth = 1.5          # flat against rotation (round or elliptical shank)
//! # min-wall = 0.8            # default: two 0.4 mm nozzle widths (common practice)
//! flange = { diameter = 40, thickness = 3, fillet = 2 }
//! bore = { diameter = 6.4, depth = 10 }   # point-angle = 118 by default
//! cross-holes = [{ diameter = 4, at = 18 }]   # at: from the root face
//!
//! [tip]
//! shape = "round"             # or "flat" (default); length = half the tip chord
//! ```
//!
//! * **Shank**: a circle of `shank-diameter` (an ellipse when `shank-thickness` is given,
//!   the thickness measured along the rotor axis) centred on the stacking axis.
//! * **Transition**: the outline is a width (blended geometrically from the shank
//!   diameter to the chord) times a normalised shape (blended linearly from the shank's
//!   to the airfoil's), with the blend chosen so the section area follows a cubic Hermite
//!   law in log(area) from the shank (zero slope) to the first station (the blade's own
//!   slope); a Hermite slope term continues the blade's spanwise slope. Position and
//!   slope are continuous at both ends (no kink) and the area is monotone (no waist, no
//!   bulge), which [`crate::blade::Blade::with_root`] checks on 65 sections. Twist and
//!   offsets continue the blade's slope into the transition the same way; the shank is
//!   centred on the stacking axis. The shank outline shares the airfoil's point
//!   structure (cosine stations, which on a circle are even steps of angle); its two
//!   trailing-edge points are held the airfoil's trailing-edge gap apart, and that gap
//!   is kept through the transition (never below the first station's), so a trailing
//!   edge opened for printing stays printable. Upper and lower points of a station move
//!   at one chordwise position, so thickness never turns negative and no section
//!   crosses itself.
//! * **Flat** (`flat-depth`): the shank's lower (pressure) side is cut flat at
//!   `thickness/2 - depth` from the axis along the straight shank, against rotation in
//!   the hub; the transition blends it away. It is part of the skin, so STEP has it.
//! * **Mounting features** ([`RootSpec::mount_features`]): an optional flange plate with
//!   a fillet at the root face, a coaxial blind bore with a drill-point cone, built in
//!   the mesh as surfaces of revolution sharing the skin's root ring (see
//!   [`crate::mount`]) and in the exact solid from the same dimensions (see
//!   [`crate::brep`]). The wall left
//!   around the bore (to the shank, the flat, and beyond its point) is checked against
//!   `min-wall`. Cross holes through the straight round shank along the rotor axis are cut
//!   into the skin's mesh (see [`crate::mount`]); each raises the genus by one.
//! * **Tip**: a flat cap, or a rounded tip that scales the outline down on an elliptic law
//!   (`sqrt(1 - s^2)`) over `tip-length`, continuing the blade's slope (C1), to 5 % of its
//!   size, closed by a small flat cap (so no triangle degenerates at a point).
//!
//! The picture of the transition is drawn by [`crate::report::transition_svg`].
//!
//! Rules of thumb used as defaults (common practice, not from a standard): a printed wall
//! of at least two nozzle widths (`min-wall = 0.8` mm for a 0.4 mm nozzle); a heat-set
//! insert hole slightly under the insert's outer diameter (choose `bore.diameter` so);
//! transitions no steeper than 45 degrees, which also print without support.

use crate::design::Lengths;
use serde::Deserialize;

/// The `[root]` table of a design file (lengths in the file's unit, converted to mm by
/// [`RootSpec::to_mm`]).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct RootSpec {
    /// Shank diameter (chordwise extent), mm.
    pub shank_diameter: f64,
    /// Shank thickness along the rotor axis for an elliptical shank, mm (default: round).
    pub shank_thickness: Option<f64>,
    /// Length of the constant shank from the root face, mm.
    pub shank_length: f64,
    /// Length of the transition from the shank to the first station, mm.
    pub transition_length: f64,
    /// Minimum wall left around holes, mm (default 0.8: two 0.4 mm nozzle widths,
    /// common practice).
    #[serde(default = "default_min_wall")]
    pub min_wall: f64,
    /// Depth of an optional flat on the shank's lower (pressure) side, against rotation
    /// in the hub, mm. It runs along the straight shank and fades out through the
    /// transition.
    pub flat_depth: Option<f64>,
    /// Optional flange plate at the root face.
    pub flange: Option<FlangeSpec>,
    /// Optional coaxial blind bore from the root face.
    pub bore: Option<BoreSpec>,
    /// Cross holes through the round shank along the rotor axis (y), e.g. for a pin or
    /// a bolt through the hub; each makes the part one genus higher.
    #[serde(default)]
    pub cross_holes: Vec<CrossHoleSpec>,
    /// Shank centre in the blade frame (x, y), mm: set by
    /// [`crate::blade::Blade::with_root`] for the mount features.
    #[serde(skip)]
    pub(crate) centre: Option<nalgebra::Point2<f64>>,
}

fn default_min_wall() -> f64 {
    0.8
}

/// A round flange plate at the root face with a fillet up to the shank.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct FlangeSpec {
    /// Plate diameter, mm.
    pub diameter: f64,
    /// Plate thickness, mm.
    pub thickness: f64,
    /// Fillet radius between plate and shank, mm (0 for none).
    #[serde(default)]
    pub fillet: f64,
}

/// A hole through the straight round shank, along the rotor axis (y in the blade frame),
/// its axis crossing the shank's axis.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct CrossHoleSpec {
    /// Hole diameter, mm.
    pub diameter: f64,
    /// Distance of the hole's axis from the root face, mm.
    pub at: f64,
}

/// A coaxial blind bore from the root face (bolt or heat-set insert).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct BoreSpec {
    /// Bore diameter, mm.
    pub diameter: f64,
    /// Depth of the cylindrical part from the root face, mm.
    pub depth: f64,
    /// Included angle of the drill point, degrees (default 118, a common twist-drill
    /// point; 180 gives a flat bottom).
    #[serde(default = "default_point_angle")]
    pub point_angle: f64,
}

fn default_point_angle() -> f64 {
    118.0
}

/// The `[tip]` table.
#[derive(Debug, Clone, Copy, PartialEq, Deserialize, Default)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct TipSpec {
    /// `flat` (default) or `round`.
    #[serde(default)]
    pub shape: TipShape,
    /// Length over which a round tip closes, mm (default: half the tip chord).
    pub length: Option<f64>,
}

impl Lengths for TipSpec {
    fn to_mm(mut self, k: f64) -> Self {
        self.length = self.length.map(|l| l * k);
        self
    }
}

/// How the blade ends at the tip.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum TipShape {
    /// A flat cap at the last station.
    #[default]
    Flat,
    /// An elliptic closure beyond the last station.
    Round,
}

/// A root setting that cannot be built, with what to change.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RootError {
    /// A length, diameter or angle is out of its range (see [`RootError::rule`]).
    #[error("root.{key} = {value}: {}", RootError::rule(key))]
    NotPositive {
        /// Key path below `root`.
        key: &'static str,
        /// The value given.
        value: f64,
    },
    /// The root face would lie inside the rotor axis.
    #[error("the root face would be at radius {0:.2} mm (first station minus shank and transition lengths); shorten root.shank-length or root.transition-length")]
    BehindAxis(f64),
    /// The transition is too steep for the change of outline it must make.
    #[error("root.transition-length = {given:.2} mm is too short: the outline must move {travel:.2} mm sideways, so the transition needs at least {travel:.2} mm (45 degrees); lengthen it by {:.2} mm", travel - given)]
    TransitionTooShort {
        /// Length given, mm.
        given: f64,
        /// Largest sideways travel of an outline point, mm.
        travel: f64,
    },
    /// The section area does not vary monotonically along the transition.
    #[error("the transition's section area is not monotone (it reaches {min_area:.1} mm² between the shank's {start:.1} mm² and the first station's {end:.1} mm²): the shank's area must differ from the first station's in the sense the blade's area changes there (usually: larger, as the blade tapers outward), by enough for the transition's length; change root.shank-diameter (a larger shank as a rule) or shorten root.transition-length")]
    Waist {
        /// The area farthest outside the range from shank to first station, mm².
        min_area: f64,
        /// Shank area, mm².
        start: f64,
        /// First station area, mm².
        end: f64,
    },
    /// A hole leaves too thin a wall.
    #[error("{what}: the wall left is {wall:.2} mm, {:.2} mm under root.min-wall = {min:.2} mm; {fix}", min - wall)]
    ThinWall {
        /// Which feature.
        what: &'static str,
        /// Wall left, mm (negative when the hole breaks out).
        wall: f64,
        /// Required wall, mm.
        min: f64,
        /// How to fix it.
        fix: &'static str,
    },
    /// The flat takes away too much of the shank.
    #[error("root.flat-depth = {depth:.2} mm is too deep: at most {most:.2} mm (a quarter of the shank thickness) keeps the shank round enough to carry its load; make the flat shallower")]
    FlatTooDeep {
        /// Depth given, mm.
        depth: f64,
        /// Deepest flat allowed, mm.
        most: f64,
    },
    /// Cross holes need a round shank without a flat.
    #[error("root.cross-holes need a round shank without a flat: remove root.shank-thickness and root.flat-depth, or the cross holes")]
    CrossHoleShank,
    /// The flange and its fillet do not leave any straight shank.
    #[error("root.flange.thickness + root.flange.fillet = {height:.2} mm must be less than root.shank-length = {shank:.2} mm; lengthen the shank or thin the flange")]
    FlangeTooLong {
        /// Flange thickness plus fillet, mm.
        height: f64,
        /// Shank length, mm.
        shank: f64,
    },
    /// The flange is not larger than the shank and its fillet.
    #[error("root.flange.diameter = {diameter:.2} mm must exceed the shank diameter plus twice the fillet ({needed:.2} mm); enlarge it by {:.2} mm or reduce the fillet", needed - diameter)]
    FlangeTooSmall {
        /// Flange diameter given, mm.
        diameter: f64,
        /// Smallest diameter that works, mm.
        needed: f64,
    },
}

impl RootError {
    /// What a value of the key below `root` must be, for [`RootError::NotPositive`].
    pub fn rule(key: &str) -> &'static str {
        match key {
            "bore.point-angle" => {
                "must be an angle of more than 0 and at most 180 degrees (118 is the common \
                 drill point)"
            }
            "shank-length" | "flange.fillet" => "must be 0 or more millimetres",
            "cross-holes.at" => "must be a distance in millimetres",
            _ => "must be a positive number of millimetres",
        }
    }

    /// The design key at fault (`root.shank-length`, ...), for messages that name the
    /// file and line.
    pub fn key(&self) -> String {
        let key = match self {
            RootError::NotPositive { key, .. } => return format!("root.{key}"),
            RootError::ThinWall { what, .. } => return (*what).to_string(),
            RootError::BehindAxis(_) => "shank-length",
            RootError::TransitionTooShort { .. } => "transition-length",
            RootError::Waist { .. } => "shank-diameter",
            RootError::FlatTooDeep { .. } => "flat-depth",
            RootError::CrossHoleShank => "cross-holes",
            RootError::FlangeTooLong { .. } => "flange.thickness",
            RootError::FlangeTooSmall { .. } => "flange.diameter",
        };
        format!("root.{key}")
    }
}

impl Lengths for RootSpec {
    fn to_mm(mut self, k: f64) -> Self {
        self.shank_diameter *= k;
        self.shank_thickness = self.shank_thickness.map(|t| t * k);
        self.shank_length *= k;
        self.transition_length *= k;
        self.min_wall *= k;
        self.flat_depth = self.flat_depth.map(|t| t * k);
        if let Some(f) = &mut self.flange {
            f.diameter *= k;
            f.thickness *= k;
            f.fillet *= k;
        }
        if let Some(b) = &mut self.bore {
            b.diameter *= k;
            b.depth *= k;
        }
        for h in &mut self.cross_holes {
            h.diameter *= k;
            h.at *= k;
        }
        self
    }
}

impl RootSpec {
    /// Shank thickness along the rotor axis, mm.
    pub fn thickness(&self) -> f64 {
        self.shank_thickness.unwrap_or(self.shank_diameter)
    }

    /// Checks the settings that do not depend on the airfoil (the transition is checked
    /// by the blade, which knows the first station).
    pub fn validate(&self) -> Result<(), RootError> {
        let positive = |key: &'static str, value: f64| {
            if value > 0.0 && value.is_finite() {
                Ok(())
            } else {
                Err(RootError::NotPositive { key, value })
            }
        };
        positive("shank-diameter", self.shank_diameter)?;
        positive("shank-thickness", self.thickness())?;
        positive("transition-length", self.transition_length)?;
        positive("min-wall", self.min_wall)?;
        if !(self.shank_length >= 0.0 && self.shank_length.is_finite()) {
            return Err(RootError::NotPositive {
                key: "shank-length",
                value: self.shank_length,
            });
        }
        let small = self.shank_diameter.min(self.thickness());
        // Radial room on the flat side: half the thickness less the flat's depth.
        let mut half_small = 0.5 * small;
        if let Some(depth) = self.flat_depth {
            positive("flat-depth", depth)?;
            let left = 0.5 * self.thickness() - depth;
            if left < 0.25 * self.thickness() {
                return Err(RootError::FlatTooDeep {
                    depth,
                    most: 0.25 * self.thickness(),
                });
            }
            half_small = half_small.min(left);
        }
        if let Some(f) = &self.flange {
            positive("flange.diameter", f.diameter)?;
            positive("flange.thickness", f.thickness)?;
            if !(f.fillet >= 0.0) {
                return Err(RootError::NotPositive {
                    key: "flange.fillet",
                    value: f.fillet,
                });
            }
            if f.thickness + f.fillet >= self.shank_length {
                return Err(RootError::FlangeTooLong {
                    height: f.thickness + f.fillet,
                    shank: self.shank_length,
                });
            }
            let needed = self.shank_diameter.max(self.thickness()) + 2.0 * f.fillet;
            if f.diameter <= needed {
                return Err(RootError::FlangeTooSmall {
                    diameter: f.diameter,
                    needed,
                });
            }
        }
        if let Some(b) = &self.bore {
            positive("bore.diameter", b.diameter)?;
            positive("bore.depth", b.depth)?;
            if !(b.point_angle > 0.0 && b.point_angle <= 180.0) {
                return Err(RootError::NotPositive {
                    key: "bore.point-angle",
                    value: b.point_angle,
                });
            }
            let wall = half_small - 0.5 * b.diameter;
            if wall < self.min_wall {
                return Err(RootError::ThinWall {
                    what: "root.bore.diameter",
                    wall,
                    min: self.min_wall,
                    fix: "use a smaller bore, a shallower flat or a larger shank",
                });
            }
            let wall_end = self.shank_length - (b.depth + self.bore_point_depth());
            if wall_end < self.min_wall {
                return Err(RootError::ThinWall {
                    what: "root.bore.depth",
                    wall: wall_end,
                    min: self.min_wall,
                    fix: "make the bore shallower or the shank longer (the bore must end inside the round shank)",
                });
            }
        }
        self.validate_cross_holes()
    }

    /// Checks the cross holes: round shank without a flat, the wall beside each hole,
    /// toward the root face (or flange), toward the transition, toward the bore's point
    /// and between neighbouring holes.
    fn validate_cross_holes(&self) -> Result<(), RootError> {
        if self.cross_holes.is_empty() {
            return Ok(());
        }
        if self.flat_depth.is_some()
            || (self.thickness() - self.shank_diameter).abs() > 1e-9 * self.shank_diameter
        {
            return Err(RootError::CrossHoleShank);
        }
        let wall = |what, wall: f64, fix| {
            if wall < self.min_wall {
                Err(RootError::ThinWall {
                    what,
                    wall,
                    min: self.min_wall,
                    fix,
                })
            } else {
                Ok(())
            }
        };
        let base = self.flange.as_ref().map_or(0.0, |f| f.thickness + f.fillet);
        let bore_end = self
            .bore
            .as_ref()
            .map_or(0.0, |b| b.depth + self.bore_point_depth());
        let mut spans: Vec<(f64, f64)> = Vec::new();
        for h in &self.cross_holes {
            if !(h.diameter > 0.0 && h.diameter.is_finite()) {
                return Err(RootError::NotPositive {
                    key: "cross-holes.diameter",
                    value: h.diameter,
                });
            }
            if !h.at.is_finite() {
                return Err(RootError::NotPositive {
                    key: "cross-holes.at",
                    value: h.at,
                });
            }
            let r = 0.5 * h.diameter;
            wall(
                "root.cross-holes.diameter",
                0.5 * self.shank_diameter - r,
                "the hole breaks out of the shank's sides: use a smaller hole or a larger shank",
            )?;
            wall(
                "root.cross-holes.at (toward the root face or flange)",
                h.at - r - base,
                "move the hole away from the root face",
            )?;
            wall(
                "root.cross-holes.at (toward the transition)",
                self.shank_length - (h.at + r),
                "move the hole toward the root face or lengthen the shank (holes go through the straight shank only)",
            )?;
            if self.bore.is_some() {
                wall(
                    "root.cross-holes.at (toward the bore's point)",
                    h.at - r - bore_end,
                    "move the hole beyond the bore or make the bore shallower",
                )?;
            }
            for &(lo, hi) in &spans {
                wall(
                    "root.cross-holes.at (between two holes)",
                    (h.at - r - hi).max(lo - (h.at + r)),
                    "space the holes farther apart",
                )?;
            }
            spans.push((h.at - r, h.at + r));
        }
        Ok(())
    }

    /// The genus of the finished part: one per cross hole (pass it to
    /// [`crate::check::CheckOptions::with_expected_genus`]).
    pub fn genus(&self) -> u32 {
        self.cross_holes.len() as u32
    }

    /// Axial depth of the bore's drill-point cone, mm.
    pub fn bore_point_depth(&self) -> f64 {
        self.bore.as_ref().map_or(0.0, |b| {
            if b.point_angle >= 180.0 {
                0.0
            } else {
                0.5 * b.diameter / (0.5 * b.point_angle).to_radians().tan()
            }
        })
    }
}

impl RootSpec {
    /// The mounting features cut into the root beyond the bare shank, in words:
    /// `"flange"`, `"bore"` and `"cross holes"`; empty for a bare shank.
    pub fn mount_features(&self) -> Vec<&'static str> {
        let mut out = Vec::new();
        if self.flange.is_some() {
            out.push("flange");
        }
        if self.bore.is_some() {
            out.push("bore");
        }
        if !self.cross_holes.is_empty() {
            out.push("cross holes");
        }
        out
    }
}
