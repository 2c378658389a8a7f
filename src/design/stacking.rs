//! [`Stacking`]: where the stacking axis passes through a section, as a design names it
//! (`blade.stacking`, `station[i].stacking`, the CSV column `stacking`).
//!
//! A value is either a chord fraction (a number in 0..=1: the point on the chord line
//! that far from the leading edge) or the name of a rule resolved from each section's
//! own shape by the blade (see [`crate::blade`] and [`crate::conventions`]):
//!
//! | value | point | why |
//! |-------|-------|-----|
//! | `0.3` (any number in 0..=1) | on the chord line at 30 % chord | a chosen axis |
//! | `"quarter-chord"` | on the chord line at 25 % chord | the aerodynamic centre of thin-airfoil theory (Abbott & von Doenhoff, *Theory of Wing Sections*, 1959, ch. 4): pitching moment about it does not change with the angle of attack |
//! | `"centroid"` | the area centroid of the section | stacked on centroids, the centrifugal force on each section passes through the axis and does not bend the blade (common practice) |
//! | `"thickest"` | on the chord line at the point of maximum thickness | a straight rod or spar along the axis stays in the thick part |
//!
//! `"aerodynamic-centre"` (and `"aerodynamic-center"`) are accepted for
//! `"quarter-chord"`. Names are case-insensitive. `0.25` and `"quarter-chord"` give the
//! same blade, byte for byte; 0.25 was the only stacking before the named rules existed
//! and the quarter chord stays the default.

use std::fmt;

use super::suggest;

/// Where the stacking axis passes through a section.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum Stacking {
    /// The point on the chord line at this chord fraction (0 leading edge, 1 trailing
    /// edge).
    ChordFraction(f64),
    /// The aerodynamic centre of thin-airfoil theory: the quarter chord, on the chord line
    /// (the default).
    #[default]
    QuarterChord,
    /// The area centroid of the section.
    Centroid,
    /// The point of maximum thickness (measured perpendicular to the chord line), on the
    /// chord line.
    Thickest,
}

impl Stacking {
    /// Rule names accepted in design files (canonical spellings), for messages.
    pub const NAMES: [&'static str; 3] = ["quarter-chord", "centroid", "thickest"];

    /// Reads a rule name (case-insensitive; `aerodynamic-centre` and `aerodynamic-center`
    /// mean `quarter-chord`). Numbers are not names: see [`Stacking::parse`].
    pub fn from_name(name: &str) -> Option<Stacking> {
        match name.trim().to_ascii_lowercase().as_str() {
            "quarter-chord" | "aerodynamic-centre" | "aerodynamic-center" => {
                Some(Stacking::QuarterChord)
            }
            "centroid" => Some(Stacking::Centroid),
            "thickest" => Some(Stacking::Thickest),
            _ => None,
        }
    }

    /// A chord fraction, checked to lie in 0..=1.
    pub fn fraction(f: f64) -> Result<Stacking, StackingValueError> {
        if (0.0..=1.0).contains(&f) {
            Ok(Stacking::ChordFraction(f))
        } else {
            Err(StackingValueError::OutOfRange(f))
        }
    }

    /// Reads a value as written in a CSV cell or a TOML string: a chord fraction
    /// (`scale` converts it, 1 for a fraction, 0.01 for percent) or a rule name.
    pub fn parse(text: &str, scale: f64) -> Result<Stacking, StackingValueError> {
        let t = text.trim();
        if let Ok(f) = t.parse::<f64>() {
            return Stacking::fraction(f * scale);
        }
        Stacking::from_name(t).ok_or_else(|| StackingValueError::UnknownName(t.to_string()))
    }

    /// The chord fraction, when the rule is a fixed point on the chord line (a fraction,
    /// or the quarter chord).
    pub fn chord_fraction(&self) -> Option<f64> {
        match self {
            Stacking::ChordFraction(f) => Some(*f),
            Stacking::QuarterChord => Some(0.25),
            Stacking::Centroid | Stacking::Thickest => None,
        }
    }
}

/// Written as in a design file: the number, or the rule name.
impl fmt::Display for Stacking {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Stacking::ChordFraction(v) => write!(f, "{v}"),
            Stacking::QuarterChord => f.write_str("quarter-chord"),
            Stacking::Centroid => f.write_str("centroid"),
            Stacking::Thickest => f.write_str("thickest"),
        }
    }
}

/// Serialised as in a design file: a number for a chord fraction, else the rule name.
impl serde::Serialize for Stacking {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        match self {
            Stacking::ChordFraction(v) => s.serialize_f64(*v),
            other => s.serialize_str(&other.to_string()),
        }
    }
}

/// Why a stacking value was refused (the reader adds the file, line and key).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{}", self.message())]
pub enum StackingValueError {
    /// A chord fraction outside 0..=1 (or not finite).
    OutOfRange(f64),
    /// Neither a number nor a known rule name.
    UnknownName(String),
}

impl StackingValueError {
    /// The message, naming the value.
    pub fn message(&self) -> String {
        match self {
            StackingValueError::OutOfRange(f) => format!("stacking {f} is outside 0..1"),
            StackingValueError::UnknownName(s) => {
                format!("stacking \"{s}\" is neither a chord fraction nor a stacking rule")
            }
        }
    }

    /// How to fix it: "did you mean" for a near miss, else what is accepted.
    pub fn hint(&self) -> String {
        let accepted = format!(
            "give a chord fraction from 0 at the leading edge to 1 at the trailing edge, \
             e.g. 0.25, or one of: {}",
            Stacking::NAMES.join(", ")
        );
        match self {
            // Percent written where a fraction is meant (25 for 25 %).
            StackingValueError::OutOfRange(f) if (5.0..=100.0).contains(f) => {
                let fraction = format!("{:.6}", f / 100.0);
                let fraction = fraction.trim_end_matches('0');
                format!(
                    "a chord fraction is 0..1: for {f} % of chord write {fraction}, or mark a \
                     CSV column 'stacking [%]'"
                )
            }
            StackingValueError::OutOfRange(_) => accepted,
            StackingValueError::UnknownName(s) => {
                let names = [
                    Stacking::NAMES.as_slice(),
                    &["aerodynamic-centre", "aerodynamic-center"],
                ]
                .concat();
                match suggest::closest(&s.to_ascii_lowercase(), &names) {
                    Some(c) => format!("did you mean '{c}'?"),
                    None => accepted,
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_fractions_and_names() {
        assert_eq!(
            Stacking::parse(" 0.3 ", 1.0),
            Ok(Stacking::ChordFraction(0.3))
        );
        assert_eq!(
            Stacking::parse("30", 0.01),
            Ok(Stacking::ChordFraction(0.3))
        );
        assert_eq!(Stacking::parse("Centroid", 1.0), Ok(Stacking::Centroid));
        assert_eq!(
            Stacking::parse("aerodynamic-centre", 1.0),
            Ok(Stacking::QuarterChord)
        );
        assert_eq!(
            Stacking::parse("1.5", 1.0),
            Err(StackingValueError::OutOfRange(1.5))
        );
        assert!(matches!(
            Stacking::parse("NaN", 1.0),
            Err(StackingValueError::OutOfRange(_))
        ));
        let e = Stacking::parse("centriod", 1.0).unwrap_err();
        assert_eq!(e.hint(), "did you mean 'centroid'?");
        assert!(StackingValueError::OutOfRange(32.5)
            .hint()
            .contains("write 0.325,"));
        assert!(!StackingValueError::OutOfRange(1.3).hint().contains('%'));
        // The quarter chord is the default and is the chord fraction 0.25.
        assert_eq!(Stacking::default().chord_fraction(), Some(0.25));
        assert_eq!(Stacking::Thickest.to_string(), "thickest");
    }
}
