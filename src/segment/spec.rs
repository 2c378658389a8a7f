//! The design tables of this stage: `[segments]` (with its `dowels`) and
//! `[spar-channel]`, lengths in the design file's unit (see [`crate::design::Lengths`]).
//!
//! ```toml
//! [segments]
//! split = "auto"          # the fewest segments that fit the printer; or radii: [260, 430]
//! max-count = 12          # most segments "auto" may plan (default 12)
//! min-wall = 1.2          # wall kept around pins and channel (default 0.8)
//! dowels = { diameter = 3, clearance = 0.2, depth = 6 }   # count = 2 by default
//!
//! [spar-channel]
//! diameter = 6            # the rod or tube
//! clearance = 0.2         # the hole is diameter + clearance (default 0.2)
//! min-wall = 1.2          # wall kept to the skin (default 0.8)
//! # start = 70            # radius where the channel begins (default: see below)
//! # end = 380             # stop before the reach (default: as far as the wall holds)
//! # axis = [4.0, 1.5]     # x, y of the channel's axis (default: the rule below)
//! # point-angle = 118     # blind ends: drill-point angle (180: flat)
//! ```
//!
//! Defaults are common practice, not taken from a standard: a wall of two 0.4 mm nozzle
//! widths (0.8 mm); 0.2 mm diametral clearance for a printed hole that takes a rod or a
//! pin; pins sunk two diameters into each side; a 118 degree drill point (the common
//! twist-drill angle, also a roof that prints without support).

use super::SegmentError;
use crate::design::Lengths;
use serde::de::{self, Deserializer, SeqAccess, Visitor};
use serde::Deserialize;
use std::fmt;

/// Most segments a plan may have when `max-count` is not given.
pub const DEFAULT_MAX_COUNT: usize = 12;

/// The `[segments]` table.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct SegmentsSpec {
    /// Where to split: automatically for the printer, or at given radii (mm).
    pub split: Split,
    /// Most segments an automatic plan may have. Default [`DEFAULT_MAX_COUNT`].
    #[serde(default = "default_max_count")]
    pub max_count: usize,
    /// Wall kept between a pin hole and the skin, the channel and the other pins, mm.
    /// Default 0.8 (two 0.4 mm nozzle widths, common practice).
    #[serde(default = "default_wall")]
    pub min_wall: f64,
    /// The alignment pins of every joint.
    #[serde(default)]
    pub dowels: DowelSpec,
}

fn default_max_count() -> usize {
    DEFAULT_MAX_COUNT
}

fn default_wall() -> f64 {
    0.8
}

fn default_clearance() -> f64 {
    0.2
}

fn default_point_angle() -> f64 {
    118.0
}

/// Where a blade is split.
#[derive(Debug, Clone, PartialEq)]
pub enum Split {
    /// Not at all (the command line's `--split none`).
    None,
    /// The fewest segments that fit the printer.
    Auto,
    /// At these radii, mm (sorted on use).
    At(Vec<f64>),
}

impl<'de> Deserialize<'de> for Split {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Split, D::Error> {
        struct V;
        impl<'de> Visitor<'de> for V {
            type Value = Split;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("\"auto\", \"none\" or a list of radii such as [260, 430]")
            }
            fn visit_str<E: de::Error>(self, s: &str) -> Result<Split, E> {
                match s {
                    "auto" => Ok(Split::Auto),
                    "none" => Ok(Split::None),
                    other => Err(E::custom(format!(
                        "\"{other}\" is not a split: give \"auto\", \"none\" or a list of radii such as [260, 430]"
                    ))),
                }
            }
            fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Split, A::Error> {
                let mut out = Vec::new();
                while let Some(r) = seq.next_element::<f64>()? {
                    out.push(r);
                }
                Ok(Split::At(out))
            }
        }
        d.deserialize_any(V)
    }
}

impl std::str::FromStr for Split {
    type Err = String;

    /// `auto`, `none`, or radii in mm separated by commas (`260,430`).
    fn from_str(s: &str) -> Result<Split, String> {
        match s.trim() {
            "auto" => Ok(Split::Auto),
            "none" => Ok(Split::None),
            list => list
                .split(',')
                .map(|r| r.trim().parse::<f64>())
                .collect::<Result<Vec<f64>, _>>()
                .map(Split::At)
                .map_err(|_| {
                    format!(
                        "\"{s}\": give auto, none, or radii in mm separated by commas (260,430)"
                    )
                }),
        }
    }
}

/// Alignment pins (dowels) at every joint: holes of `diameter + clearance`, `depth`
/// deep into each side, ending in a drill point.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct DowelSpec {
    /// Pins per joint. Default 2 where the spar channel crosses the joint (with the rod
    /// they make three holes that fit one way only), 3 where it does not.
    pub count: Option<usize>,
    /// Pin diameter, mm. Default 3.
    #[serde(default = "default_pin")]
    pub diameter: f64,
    /// Added to the diameter for the hole, mm. Default 0.2.
    #[serde(default = "default_clearance")]
    pub clearance: f64,
    /// Depth of the hole's straight part into each side, mm. Default 6 (two diameters).
    #[serde(default = "default_depth")]
    pub depth: f64,
    /// Included angle of the holes' drill point, degrees (180: flat). Default 118.
    #[serde(default = "default_point_angle")]
    pub point_angle: f64,
}

fn default_pin() -> f64 {
    3.0
}

fn default_depth() -> f64 {
    6.0
}

impl Default for DowelSpec {
    fn default() -> Self {
        DowelSpec {
            count: None,
            diameter: default_pin(),
            clearance: default_clearance(),
            depth: default_depth(),
            point_angle: default_point_angle(),
        }
    }
}

/// The `[spar-channel]` table: a straight round channel parallel to the span for a rod
/// or tube, blind at its outer end.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub struct ChannelSpec {
    /// The rod's (or tube's) diameter, mm.
    pub diameter: f64,
    /// Added to the diameter for the hole, mm. Default 0.2.
    #[serde(default = "default_clearance")]
    pub clearance: f64,
    /// Wall kept between the channel and the skin, mm. Default 0.8.
    #[serde(default = "default_wall")]
    pub min_wall: f64,
    /// Radius where the channel begins, mm. Default: the root face when it is a plain
    /// face (no `root.flange`, `root.bore` or `root.cross-holes`), else just beyond
    /// those features (see [`super::channel`]).
    pub start: Option<f64>,
    /// Radius where the channel's straight part ends, mm. Default: as far as the wall
    /// holds (the reach, see [`super::channel`]).
    pub end: Option<f64>,
    /// The axis `[x, y]` in the blade frame, mm. Default: the rule of
    /// [`super::channel`].
    pub axis: Option<[f64; 2]>,
    /// Included angle of the blind ends' drill point, degrees (180: flat). Default 118.
    #[serde(default = "default_point_angle")]
    pub point_angle: f64,
}

impl Lengths for SegmentsSpec {
    fn to_mm(mut self, k: f64) -> Self {
        if let Split::At(r) = &mut self.split {
            for x in r.iter_mut() {
                *x *= k;
            }
        }
        self.min_wall *= k;
        self.dowels.diameter *= k;
        self.dowels.clearance *= k;
        self.dowels.depth *= k;
        self
    }
}

impl Lengths for ChannelSpec {
    fn to_mm(mut self, k: f64) -> Self {
        self.diameter *= k;
        self.clearance *= k;
        self.min_wall *= k;
        self.start = self.start.map(|x| x * k);
        self.end = self.end.map(|x| x * k);
        self.axis = self.axis.map(|[x, y]| [x * k, y * k]);
        self
    }
}

/// A positive finite length, else an error at `key`.
fn positive(key: &str, v: f64) -> Result<(), SegmentError> {
    if v > 0.0 && v.is_finite() {
        Ok(())
    } else {
        Err(SegmentError::key(
            key,
            format!("{v} must be a positive number of millimetres"),
        ))
    }
}

/// A length of 0 or more, else an error at `key`.
fn not_negative(key: &str, v: f64) -> Result<(), SegmentError> {
    if v >= 0.0 && v.is_finite() {
        Ok(())
    } else {
        Err(SegmentError::key(
            key,
            format!("{v} must be 0 or more millimetres"),
        ))
    }
}

fn point_angle(key: &str, a: f64) -> Result<(), SegmentError> {
    if a > 0.0 && a <= 180.0 {
        Ok(())
    } else {
        Err(SegmentError::key(
            key,
            format!("{a} must be an angle in degrees more than 0 and at most 180 (118 is a common drill; 180 a flat bottom)"),
        ))
    }
}

/// Axial depth of a drill point of included angle `angle` (degrees) on a hole of
/// `radius`, mm (0 for a flat bottom).
pub fn point_depth(radius: f64, angle: f64) -> f64 {
    if angle >= 180.0 {
        0.0
    } else {
        radius / (0.5 * angle).to_radians().tan()
    }
}

impl SegmentsSpec {
    /// Checks every value (keys as written in a design file).
    ///
    /// # Errors
    /// [`SegmentError::Key`] naming the key.
    pub fn validate(&self) -> Result<(), SegmentError> {
        if let Split::At(radii) = &self.split {
            for r in radii {
                positive("segments.split", *r)?;
            }
            if radii.is_empty() {
                return Err(SegmentError::key(
                    "segments.split",
                    "the list of radii is empty: give one or more radii, or \"auto\"",
                ));
            }
        }
        if self.max_count < 1 || self.max_count > 64 {
            return Err(SegmentError::key(
                "segments.max-count",
                format!("{} must be a whole number from 1 to 64", self.max_count),
            ));
        }
        positive("segments.min-wall", self.min_wall)?;
        let d = &self.dowels;
        if let Some(n) = d.count {
            if !(2..=6).contains(&n) {
                return Err(SegmentError::key(
                    "segments.dowels.count",
                    format!("{n} pins: give 2 to 6 (two with a spar channel, three without, fit one way only)"),
                ));
            }
        }
        positive("segments.dowels.diameter", d.diameter)?;
        not_negative("segments.dowels.clearance", d.clearance)?;
        positive("segments.dowels.depth", d.depth)?;
        point_angle("segments.dowels.point-angle", d.point_angle)
    }

    /// Radius of a pin hole, mm.
    pub fn pin_hole_radius(&self) -> f64 {
        0.5 * (self.dowels.diameter + self.dowels.clearance)
    }
}

impl ChannelSpec {
    /// Checks every value (keys as written in a design file).
    ///
    /// # Errors
    /// [`SegmentError::Key`] naming the key.
    pub fn validate(&self) -> Result<(), SegmentError> {
        positive("spar-channel.diameter", self.diameter)?;
        not_negative("spar-channel.clearance", self.clearance)?;
        positive("spar-channel.min-wall", self.min_wall)?;
        if let Some(s) = self.start {
            positive("spar-channel.start", s)?;
        }
        if let Some(e) = self.end {
            positive("spar-channel.end", e)?;
            if self.start.is_some_and(|s| e <= s) {
                return Err(SegmentError::key(
                    "spar-channel.end",
                    format!("{e} must lie beyond spar-channel.start"),
                ));
            }
        }
        if let Some([x, y]) = self.axis {
            if !(x.is_finite() && y.is_finite()) {
                return Err(SegmentError::key(
                    "spar-channel.axis",
                    "give two finite numbers [x, y] in millimetres",
                ));
            }
        }
        point_angle("spar-channel.point-angle", self.point_angle)
    }

    /// Radius of the channel's hole, mm.
    pub fn hole_radius(&self) -> f64 {
        0.5 * (self.diameter + self.clearance)
    }
}
