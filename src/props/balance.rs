//! Static balance of a rotor made of several parts.
//!
//! Static imbalance is the offset of the total centre of mass from the rotor axis (the y
//! axis, see [`crate::conventions`]) times the total mass, in g mm. Dynamic (couple)
//! imbalance is not estimated. Balance the real rotor: printed parts vary in mass.

use nalgebra::Point3;

use super::MassProps;

/// Static balance of a set of parts placed around the rotor axis.
#[derive(Debug, Clone, PartialEq)]
pub struct Balance {
    /// Mass of each part, g, in input order.
    pub masses: Vec<f64>,
    /// Total mass, g.
    pub total_mass: f64,
    /// Centre of mass of all parts together, mm.
    pub centroid: Point3<f64>,
    /// Distance of the total centre of mass from the rotor axis, mm.
    pub offset: f64,
    /// Static imbalance, total mass x offset, g mm.
    pub imbalance: f64,
    /// Largest minus smallest part mass, g.
    pub mass_spread: f64,
    /// Index of the heaviest part.
    pub heaviest: usize,
    /// Index of the lightest part.
    pub lightest: usize,
}

impl Balance {
    /// Balance of the given parts (each already placed in the rotor frame). `None` when
    /// the list is empty or the total mass is not positive.
    pub fn of_parts(parts: &[MassProps]) -> Option<Balance> {
        let total_mass: f64 = parts.iter().map(|p| p.mass).sum();
        if parts.is_empty() || total_mass.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
            return None;
        }
        let sum = parts.iter().fold(nalgebra::Vector3::zeros(), |s, p| {
            s + p.centroid.coords * p.mass
        });
        let centroid = Point3::from(sum / total_mass);
        let offset = centroid.x.hypot(centroid.z);
        let masses: Vec<f64> = parts.iter().map(|p| p.mass).collect();
        let by = |f: fn(f64, f64) -> bool| {
            (0..masses.len())
                .reduce(|a, b| if f(masses[b], masses[a]) { b } else { a })
                .unwrap_or(0)
        };
        let heaviest = by(|a, b| a > b);
        let lightest = by(|a, b| a < b);
        Some(Balance {
            mass_spread: masses[heaviest] - masses[lightest],
            masses,
            total_mass,
            centroid,
            offset,
            imbalance: total_mass * offset,
            heaviest,
            lightest,
        })
    }
}
