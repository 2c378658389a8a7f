//! Units a design file may use, and their factors to millimetres and degrees.

/// Length unit of a design file or of one CSV column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum LengthUnit {
    /// Millimetre (the default).
    #[default]
    Mm,
    /// Centimetre, 10 mm.
    Cm,
    /// Metre, 1000 mm.
    M,
    /// Inch, exactly 25.4 mm (NIST SP 811, 2008, Appendix B).
    In,
}

impl LengthUnit {
    /// Spellings accepted in files, for messages.
    pub const NAMES: &'static str = "mm, cm, m or in";

    /// Reads a unit name (`mm`, `cm`, `m`, `in`, case-insensitive; `inch` also works).
    pub fn parse(name: &str) -> Option<Self> {
        match name.trim().to_ascii_lowercase().as_str() {
            "mm" => Some(Self::Mm),
            "cm" => Some(Self::Cm),
            "m" => Some(Self::M),
            "in" | "inch" | "inches" => Some(Self::In),
            _ => None,
        }
    }

    /// Millimetres per unit.
    pub fn to_mm(self) -> f64 {
        match self {
            Self::Mm => 1.0,
            Self::Cm => 10.0,
            Self::M => 1000.0,
            Self::In => 25.4,
        }
    }

    /// The unit's short name.
    pub fn name(self) -> &'static str {
        match self {
            Self::Mm => "mm",
            Self::Cm => "cm",
            Self::M => "m",
            Self::In => "in",
        }
    }
}

/// Angle unit of a design file or of one CSV column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum AngleUnit {
    /// Degree (the default).
    #[default]
    Deg,
    /// Radian, 180/pi degrees.
    Rad,
}

impl AngleUnit {
    /// Spellings accepted in files, for messages.
    pub const NAMES: &'static str = "deg or rad";

    /// Reads a unit name (`deg`, `rad`, case-insensitive; `°`, `degree(s)`, `radian(s)` also
    /// work).
    pub fn parse(name: &str) -> Option<Self> {
        match name.trim().to_ascii_lowercase().as_str() {
            "deg" | "degree" | "degrees" | "°" => Some(Self::Deg),
            "rad" | "radian" | "radians" => Some(Self::Rad),
            _ => None,
        }
    }

    /// Degrees per unit.
    pub fn to_deg(self) -> f64 {
        match self {
            Self::Deg => 1.0,
            Self::Rad => 180.0 / std::f64::consts::PI,
        }
    }

    /// The unit's short name.
    pub fn name(self) -> &'static str {
        match self {
            Self::Deg => "deg",
            Self::Rad => "rad",
        }
    }
}

/// How a relative thickness is written: percent of chord (the default) or a fraction.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum RatioUnit {
    /// Percent of chord: `12` means 12 %.
    #[default]
    Percent,
    /// Fraction of chord: `0.12` means 12 %.
    Fraction,
}

impl RatioUnit {
    /// Spellings accepted in CSV headers, for messages.
    pub const NAMES: &'static str = "% or fraction";

    /// Reads `%` or `fraction` (also `-` and `1`, as spreadsheets write unitless columns).
    pub fn parse(name: &str) -> Option<Self> {
        match name.trim().to_ascii_lowercase().as_str() {
            "%" | "percent" | "pct" => Some(Self::Percent),
            "fraction" | "-" | "1" => Some(Self::Fraction),
            _ => None,
        }
    }

    /// Percent per unit.
    pub fn to_percent(self) -> f64 {
        match self {
            Self::Percent => 1.0,
            Self::Fraction => 100.0,
        }
    }

    /// The unit's short name.
    pub fn name(self) -> &'static str {
        match self {
            Self::Percent => "%",
            Self::Fraction => "fraction",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn factors() {
        // 1 in = 25.4 mm exactly, 1 m = 1000 mm: NIST SP 811 (2008), Appendix B.
        assert_eq!(LengthUnit::parse(" IN "), Some(LengthUnit::In));
        assert!((LengthUnit::In.to_mm() - 25.4).abs() < 1e-15);
        assert!((LengthUnit::M.to_mm() - 1000.0).abs() < 1e-12);
        // 1 rad = 57.29578 deg (NIST SP 811, 2008, Appendix B.9, "plane angle").
        assert!((AngleUnit::Rad.to_deg() - 57.29578).abs() < 1e-5);
        assert_eq!(LengthUnit::parse("ft"), None);
        assert_eq!(AngleUnit::parse("grad"), None);
    }
}
