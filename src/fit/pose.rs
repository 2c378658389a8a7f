//! Pose classes of a blade on the bed: which end or side faces down.
//!
//! Our own names, from the blade's directions in its frame (see [`crate::conventions`]):
//!
//! ```text
//!   root-down            the span points up within 45 degrees of vertical
//!   tip-down             the span points down within 45 degrees of vertical
//!   otherwise the span lies within 45 degrees of the bed, and the side facing the bed
//!   (the down direction turned about the span) names the pose, in four 90 degree
//!   sectors centred on:
//!   pressure-side-down   the pressure side's outward direction
//!   leading-edge-down    the leading edge's direction
//!   suction-side-down    the suction side's outward direction
//!   trailing-edge-down   the trailing edge's direction
//! ```
//!
//! A sector's boundary belongs to the class named first in the list above.

use crate::design::{Flow, Rotation};
use nalgebra::Vector3;

/// A class of poses of a blade (see the module docs).
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize, serde::Deserialize,
)]
#[serde(rename_all = "kebab-case")]
pub enum PoseClass {
    /// The root end on the bed, the span standing up: layers run across the span.
    RootDown,
    /// Lying flat on the pressure side.
    PressureSideDown,
    /// Standing on the leading edge.
    LeadingEdgeDown,
    /// Lying flat on the suction side.
    SuctionSideDown,
    /// Standing on the trailing edge.
    TrailingEdgeDown,
    /// The tip on the bed.
    TipDown,
}

impl PoseClass {
    /// Every class, in the order the module docs list them.
    pub const ALL: [PoseClass; 6] = [
        PoseClass::RootDown,
        PoseClass::TipDown,
        PoseClass::PressureSideDown,
        PoseClass::LeadingEdgeDown,
        PoseClass::SuctionSideDown,
        PoseClass::TrailingEdgeDown,
    ];

    /// The class's name (as read by [`std::str::FromStr`]).
    pub fn name(self) -> &'static str {
        match self {
            PoseClass::RootDown => "root-down",
            PoseClass::PressureSideDown => "pressure-side-down",
            PoseClass::LeadingEdgeDown => "leading-edge-down",
            PoseClass::SuctionSideDown => "suction-side-down",
            PoseClass::TrailingEdgeDown => "trailing-edge-down",
            PoseClass::TipDown => "tip-down",
        }
    }

    /// Every name, comma separated (for messages).
    pub fn names() -> String {
        PoseClass::ALL.map(PoseClass::name).join(", ")
    }
}

impl std::fmt::Display for PoseClass {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// A pose class name that is not one of ours.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("unknown pose \"{0}\": use one of {names}", names = PoseClass::names())]
pub struct UnknownPose(pub String);

impl std::str::FromStr for PoseClass {
    type Err = UnknownPose;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let key = s.trim().to_ascii_lowercase().replace('_', "-");
        PoseClass::ALL
            .into_iter()
            .find(|c| c.name() == key)
            .ok_or_else(|| UnknownPose(s.to_string()))
    }
}

/// A blade's directions in the part's frame (unit vectors): what the pose classes and the
/// layer direction are measured against.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct BladeAxes {
    /// Root to tip: the direction of the main stress (bending about the chord and
    /// centrifugal tension both stress the blade along its span).
    pub span: [f64; 3],
    /// From the stacking axis toward the leading edge, across the span.
    pub leading_edge: [f64; 3],
    /// Outward from the pressure side, across the span and the chord.
    pub pressure_side: [f64; 3],
}

impl BladeAxes {
    /// The axes of a blade in the blade frame of [`crate::conventions`]: span +z; at
    /// twist `twist_deg` the leading edge points along `(-cos t, -sin t, 0)` and the
    /// pressure side, facing upstream on a turbine and downstream on a propeller, along
    /// `+-(sin t, -cos t, 0)`; a clockwise rotor mirrors x. `twist_deg` is a
    /// representative twist (see [`BladeAxes::mean_twist`]).
    pub fn of_blade(flow: Flow, rotation: Rotation, twist_deg: f64) -> BladeAxes {
        let t = twist_deg.to_radians();
        let (c, s) = (t.cos(), t.sin());
        let mirror = match rotation {
            Rotation::Ccw => 1.0,
            Rotation::Cw => -1.0,
        };
        let side = match flow {
            Flow::Turbine => 1.0,
            Flow::Propeller => -1.0,
        };
        BladeAxes {
            span: [0.0, 0.0, 1.0],
            leading_edge: [-c * mirror, -s, 0.0],
            pressure_side: [side * s * mirror, -side * c, 0.0],
        }
    }

    /// The axes of the blade a design builds (its flow, rotation and the chord-weighted
    /// mean twist of its stations), in the blade frame the pipeline builds it in.
    pub fn of_design(design: &crate::design::Design) -> BladeAxes {
        let st: Vec<(f64, f64, f64)> = design
            .stations
            .iter()
            .map(|s| (s.radius, s.chord, s.twist))
            .collect();
        BladeAxes::of_blade(
            design.blade.flow,
            design.blade.rotation,
            BladeAxes::mean_twist(&st),
        )
    }

    /// Chord-weighted mean twist over the span, degrees (trapezoidal rule over the
    /// stations `(radius, chord, twist)`): the twist of the planform's mean chord. Returns
    /// 0 for fewer than two stations.
    pub fn mean_twist(stations: &[(f64, f64, f64)]) -> f64 {
        let (mut num, mut den) = (0.0, 0.0);
        for w in stations.windows(2) {
            let dr = (w[1].0 - w[0].0).abs();
            num += 0.5 * dr * (w[0].1 * w[0].2 + w[1].1 * w[1].2);
            den += 0.5 * dr * (w[0].1 + w[1].1);
        }
        if den > 0.0 {
            num / den
        } else {
            0.0
        }
    }

    /// The axes as orthonormal vectors `(span, leading edge, pressure side)` (the leading
    /// edge and pressure side are made perpendicular to the span, then to each other).
    pub fn frame(&self) -> Option<(Vector3<f64>, Vector3<f64>, Vector3<f64>)> {
        let s = Vector3::from(self.span).try_normalize(1e-12)?;
        let l = Vector3::from(self.leading_edge);
        let l = (l - s * s.dot(&l)).try_normalize(1e-12)?;
        let p = Vector3::from(self.pressure_side);
        let p = (p - s * s.dot(&p) - l * l.dot(&p)).try_normalize(1e-12)?;
        Some((s, l, p))
    }

    /// The class of the pose whose `up` (part frame) points away from the bed.
    pub fn classify(&self, up: &Vector3<f64>) -> Option<PoseClass> {
        let (s, l, p) = self.frame()?;
        let u = up.try_normalize(0.0)?;
        let lim = std::f64::consts::FRAC_1_SQRT_2;
        let along = s.dot(&u);
        if along >= lim {
            return Some(PoseClass::RootDown);
        }
        if along <= -lim {
            return Some(PoseClass::TipDown);
        }
        // Which side faces the bed: the down direction's angle about the span, from the
        // pressure side toward the leading edge.
        let d = -u;
        let psi = d.dot(&l).atan2(d.dot(&p)).to_degrees();
        Some(if psi.abs() <= 45.0 {
            PoseClass::PressureSideDown
        } else if (45.0..=135.0).contains(&psi) {
            PoseClass::LeadingEdgeDown
        } else if psi.abs() >= 135.0 {
            PoseClass::SuctionSideDown
        } else {
            PoseClass::TrailingEdgeDown
        })
    }

    /// The `up` direction at the centre of a class: e.g. for `leading-edge-down` the
    /// opposite of the leading edge.
    pub fn centre(&self, class: PoseClass) -> Option<Vector3<f64>> {
        let (s, l, p) = self.frame()?;
        Some(match class {
            PoseClass::RootDown => s,
            PoseClass::TipDown => -s,
            PoseClass::PressureSideDown => -p,
            PoseClass::LeadingEdgeDown => -l,
            PoseClass::SuctionSideDown => p,
            PoseClass::TrailingEdgeDown => l,
        })
    }

    /// `sin^2` of the angle between the span (the main stress) and the layers (the bed
    /// plane) for a pose with `up` pointing away from the bed: the share of the spanwise
    /// stress that acts across the layer boundaries (see [`super::orient`]).
    pub fn across_layers(&self, up: &Vector3<f64>) -> f64 {
        match (self.frame(), up.try_normalize(0.0)) {
            (Some((s, _, _)), Some(u)) => s.dot(&u).powi(2),
            _ => 0.0,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn classes_of_the_centres_and_names_round_trip() {
        for (flow, rot, twist) in [
            (Flow::Turbine, Rotation::Ccw, 0.0),
            (Flow::Propeller, Rotation::Cw, 25.0),
        ] {
            let ax = BladeAxes::of_blade(flow, rot, twist);
            for c in PoseClass::ALL {
                assert_eq!(ax.classify(&ax.centre(c).unwrap()), Some(c));
                assert_eq!(c.name().parse::<PoseClass>(), Ok(c));
            }
        }
        assert!("on-its-side".parse::<PoseClass>().is_err());
    }

    #[test]
    fn turbine_pressure_side_faces_upstream() {
        // Conventions (src/conventions.rs): turbine pressure side upstream (-y), leading
        // edge toward -x at zero twist.
        let ax = BladeAxes::of_blade(Flow::Turbine, Rotation::Ccw, 0.0);
        assert_eq!(ax.pressure_side, [0.0, -1.0, 0.0]);
        assert_eq!(ax.leading_edge, [-1.0, 0.0, 0.0]);
        // Lying with -y down (up = +y) is lying on the pressure side.
        assert_eq!(
            ax.classify(&Vector3::y()),
            Some(PoseClass::PressureSideDown)
        );
        // Twist 90 (LE upstream): the leading edge points along -y.
        let ax = BladeAxes::of_blade(Flow::Turbine, Rotation::Ccw, 90.0);
        assert!((Vector3::from(ax.leading_edge) + Vector3::y()).norm() < 1e-12);
    }
}
