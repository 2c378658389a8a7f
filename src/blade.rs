//! The blade model: spanwise interpolation of the design table, stacking and twist.
//!
//! A [`Blade`] knows, at any radius between root and tip, the section shape (unit chord),
//! chord, twist and offsets, and places the section in the blade frame of
//! [`crate::conventions`]. It samples the span into *rings* (placed sections with one
//! common point structure) for the lofter.
//!
//! Spanwise interpolation is monotone cubic ([`crate::interp::Monotone`]): chord, twist,
//! offsets and every section ordinate vary C1 between stations and never overshoot the
//! neighbouring station values, so where the section changes along the span its shape
//! is blended point by point.

use crate::airfoil::Section;
use crate::design::{BladeOptions, Flow, Rotation, Station};
use crate::interp::Monotone;
use nalgebra::{Point2, Point3};

/// Why a blade could not be built from its stations.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BladeError {
    /// Sections of different point structure were given.
    #[error("station sections must be resampled to one point structure (got {0})")]
    Incompatible(String),
    /// Fewer than two stations, radii not increasing, or a non-finite value.
    #[error("invalid stations: {0}")]
    Stations(String),
}

/// The spanwise-interpolated blade.
#[derive(Debug, Clone)]
pub struct Blade {
    radii: Vec<f64>,
    chord: Monotone,
    twist: Monotone,
    sweep: Monotone,
    prebend: Monotone,
    /// One interpolant per section coordinate: `shape[k]` = (x, y) of point `k`.
    shape: Vec<(Monotone, Monotone)>,
    le_index: usize,
    name: String,
    stacking: f64,
    side: f64,
    mirror: bool,
}

/// A section placed in the blade frame at one radius.
#[derive(Debug, Clone, PartialEq)]
pub struct Ring {
    /// Radius (z), mm.
    pub radius: f64,
    /// Chord, mm.
    pub chord: f64,
    /// Twist, degrees.
    pub twist: f64,
    /// The placed points, same order as the section's.
    pub points: Vec<Point3<f64>>,
}

impl Blade {
    /// Builds the blade from validated stations and their sections (one per station, all
    /// resampled to the same point structure, see [`Section::resample`]).
    pub fn new(
        stations: &[Station],
        sections: &[Section],
        opts: &BladeOptions,
    ) -> Result<Blade, BladeError> {
        if stations.len() < 2 || sections.len() != stations.len() {
            return Err(BladeError::Stations(format!(
                "{} stations and {} sections; at least two of each, one per station",
                stations.len(),
                sections.len()
            )));
        }
        if let Some(bad) = sections.iter().find(|s| !s.is_compatible(&sections[0])) {
            return Err(BladeError::Incompatible(format!(
                "{} has {} points, {} has {}",
                sections[0].name(),
                sections[0].points().len(),
                bad.name(),
                bad.points().len()
            )));
        }
        let radii: Vec<f64> = stations.iter().map(|s| s.radius).collect();
        let curve = |f: &dyn Fn(&Station) -> f64| -> Result<Monotone, BladeError> {
            let ys: Vec<f64> = stations.iter().map(f).collect();
            Monotone::new(&radii, &ys).ok_or_else(|| {
                BladeError::Stations("radii must increase strictly and values be finite".into())
            })
        };
        let n = sections[0].points().len();
        let mut shape = Vec::with_capacity(n);
        for k in 0..n {
            let xs: Vec<f64> = sections.iter().map(|s| s.points()[k].x).collect();
            let ys: Vec<f64> = sections.iter().map(|s| s.points()[k].y).collect();
            let fx = Monotone::new(&radii, &xs)
                .ok_or_else(|| BladeError::Stations("non-finite section point".into()))?;
            let fy = Monotone::new(&radii, &ys)
                .ok_or_else(|| BladeError::Stations("non-finite section point".into()))?;
            shape.push((fx, fy));
        }
        Ok(Blade {
            chord: curve(&|s| s.chord)?,
            twist: curve(&|s| s.twist)?,
            sweep: curve(&|s| s.sweep)?,
            prebend: curve(&|s| s.prebend)?,
            shape,
            le_index: sections[0].leading_edge_index(),
            name: sections[0].name().to_string(),
            radii,
            stacking: opts.stacking.chord_fraction,
            side: match opts.flow {
                Flow::Turbine => 1.0,
                Flow::Propeller => -1.0,
            },
            mirror: opts.rotation == Rotation::Cw,
        })
    }

    /// Root radius (first station), mm.
    pub fn root_radius(&self) -> f64 {
        self.radii[0]
    }

    /// Tip radius (last station), mm.
    pub fn tip_radius(&self) -> f64 {
        self.radii[self.radii.len() - 1]
    }

    /// Station radii, mm.
    pub fn station_radii(&self) -> &[f64] {
        &self.radii
    }

    /// Index of the leading-edge point in every section.
    pub fn le_index(&self) -> usize {
        self.le_index
    }

    /// Chord at radius `r`, mm.
    pub fn chord_at(&self, r: f64) -> f64 {
        self.chord.eval(r)
    }

    /// Twist at radius `r`, degrees.
    pub fn twist_at(&self, r: f64) -> f64 {
        self.twist.eval(r)
    }

    /// The section shape (unit chord) at radius `r`.
    pub fn section_at(&self, r: f64) -> Section {
        let pts: Vec<Point2<f64>> = self
            .shape
            .iter()
            .map(|(fx, fy)| Point2::new(fx.eval(r), fy.eval(r)))
            .collect();
        Section::from_ordered(self.name.clone(), pts, self.le_index)
            .expect("structure checked in Blade::new")
    }

    /// Places a unit-chord section at radius `r` with the given chord and twist (degrees)
    /// and the interpolated offsets, following [`crate::conventions`].
    pub fn place(&self, section: &Section, r: f64, chord: f64, twist_deg: f64) -> Vec<Point3<f64>> {
        let (s, c) = twist_deg.to_radians().sin_cos();
        let (dx, dy) = (self.sweep.eval(r), self.prebend.eval(r));
        let mirror = if self.mirror { -1.0 } else { 1.0 };
        section
            .points()
            .iter()
            .map(|p| {
                let u = (p.x - self.stacking) * chord;
                let v = self.side * p.y * chord;
                Point3::new(mirror * (u * c - v * s + dx), u * s + v * c + dy, r)
            })
            .collect()
    }

    /// The placed section at radius `r`.
    pub fn ring(&self, r: f64) -> Ring {
        let chord = self.chord_at(r);
        let twist = self.twist_at(r);
        Ring {
            radius: r,
            chord,
            twist,
            points: self.place(&self.section_at(r), r, chord, twist),
        }
    }

    /// Radii at which to sample rings for the loft: every station plus evenly spaced
    /// radii between stations, no farther apart than `max_spacing` (mm).
    pub fn ring_radii(&self, max_spacing: f64) -> Vec<f64> {
        let mut out = vec![self.radii[0]];
        for w in self.radii.windows(2) {
            let k = ((w[1] - w[0]) / max_spacing).ceil().max(1.0) as usize;
            for i in 1..=k {
                out.push(w[0] + (w[1] - w[0]) * i as f64 / k as f64);
            }
        }
        out
    }
}
