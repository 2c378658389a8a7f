//! How numbers are written in the report's HTML page and pictures: one convention.
//!
//! * **Plain decimal notation**, never an exponent (`178 580`, not `1.7858e5`): a reader
//!   compares rows of a column at a glance.
//! * **A fixed number of decimals per unit** ([`Decimals`]), so a column lines up and a
//!   number shows only the digits the model can stand behind: lengths to 0.01 mm,
//!   masses to 0.01 g, volumes and second moments to whole units, stresses to 0.01 MPa.
//!   A value smaller than the last decimal shows as zero (the JSON report keeps every
//!   digit).
//! * **Digits grouped in threes** before the decimal point with a narrow no-break space
//!   when the whole part has five or more digits (`50 391`, but `5939`), as the SI
//!   Brochure recommends (BIPM, *The International System of Units*, 9th edition, 2019,
//!   section 5.4.4: groups of three separated by a thin space, a lone fourth digit not
//!   separated). The decimal marker is the point.
//! * **Units with superscripts** (`mm²`, `mm³`, `mm⁴`, `g/cm³`, `g mm²`).
//!
//! Non-finite values are written as `-`.

/// Decimals per unit (see the module docs).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Decimals {
    /// Lengths and deflections, mm: 2.
    Mm,
    /// Areas, mm²: 1.
    Mm2,
    /// Volumes, mm³: 0.
    Mm3,
    /// Second moments of area, mm⁴: 0.
    Mm4,
    /// Masses, g: 2.
    G,
    /// Moments of inertia, g mm²: 0.
    GMm2,
    /// Static imbalance, g mm: 1.
    GMm,
    /// Forces, N: 3.
    N,
    /// Bending moments, N mm: 1.
    NMm,
    /// Stresses, MPa: 2.
    Mpa,
    /// Angles, degrees: 2.
    Deg,
    /// Ratios (fill fraction, safety factor): 2.
    Ratio,
    /// Speeds, m/s: 1.
    MPerS,
    /// Rotor speed, rev/min: 0.
    Rpm,
    /// Densities, g/cm³ and kg/m³: 3.
    Density,
    /// Material strength and modulus, MPa: 0.
    Strength,
    /// Percentages: 0.
    Percent,
    /// Counts (triangles): 0.
    Count,
}

impl Decimals {
    /// Digits after the decimal point.
    pub const fn places(self) -> usize {
        match self {
            Decimals::Mm3 | Decimals::Mm4 | Decimals::GMm2 | Decimals::Rpm => 0,
            Decimals::Strength | Decimals::Percent | Decimals::Count => 0,
            Decimals::Mm2 | Decimals::GMm | Decimals::NMm | Decimals::MPerS => 1,
            Decimals::Mm | Decimals::G | Decimals::Mpa | Decimals::Deg | Decimals::Ratio => 2,
            Decimals::N | Decimals::Density => 3,
        }
    }
}

/// The group separator: U+202F NARROW NO-BREAK SPACE (a thin space that never breaks a
/// number across lines).
pub const GROUP: char = '\u{202f}';

/// `v` written by the report's convention with the decimals of `unit`.
pub fn number(v: f64, unit: Decimals) -> String {
    fixed(v, unit.places())
}

/// `v` with `places` decimals, digits grouped as the module docs say; `-` when not
/// finite. Negative zero (also after rounding) is written without a sign.
pub fn fixed(v: f64, places: usize) -> String {
    if !v.is_finite() {
        return "-".into();
    }
    let s = format!("{:.*}", places, v.abs());
    let (whole, frac) = s.split_once('.').unwrap_or((&s, ""));
    let zero = s.bytes().all(|b| b == b'0' || b == b'.');
    let mut out = String::with_capacity(s.len() + 8);
    if v < 0.0 && !zero {
        out.push('-');
    }
    if whole.len() >= 5 {
        for (i, ch) in whole.chars().enumerate() {
            if i > 0 && (whole.len() - i) % 3 == 0 {
                out.push(GROUP);
            }
            out.push(ch);
        }
    } else {
        out.push_str(whole);
    }
    if !frac.is_empty() {
        out.push('.');
        out.push_str(frac);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn si_brochure_grouping() {
        // SI Brochure, 9th edition (2019), 5.4.4: "43 279.168 29" style groups; a
        // four-digit number is not split.
        let g = |s: &str| s.replace(' ', &GROUP.to_string());
        assert_eq!(fixed(43279.168, 3), g("43 279.168"));
        assert_eq!(fixed(5939.0, 0), "5939");
        assert_eq!(fixed(1_785_800.4, 0), g("1 785 800"));
        assert_eq!(fixed(-123_456.0, 1), g("-123 456.0"));
        assert_eq!(fixed(99_999.5, 0), g("100 000"));
        assert_eq!(fixed(3.0848e-8, 3), "0.000");
        assert_eq!(fixed(-1e-9, 2), "0.00");
        assert_eq!(fixed(f64::NAN, 2), "-");
        assert_eq!(number(50391.28, Decimals::Mm3), g("50 391"));
        assert_eq!(number(10.029, Decimals::Ratio), "10.03");
        assert!(!number(1.7858e5, Decimals::GMm2).contains('e'));
    }
}
