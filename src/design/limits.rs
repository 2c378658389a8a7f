//! The stated limits of a design's values: plain input sanity, checked while reading so an
//! absurd value is refused with the figure, the limit and a hint instead of running for
//! minutes or exhausting memory. Each limit is listed, with its reason, in the key
//! reference of [`super`].
//!
//! These limits are about the input values themselves. How much work a valid design will
//! take (triangles and memory, from its size against its tolerance) is a separate
//! estimate made before meshing.

/// Largest design file (TOML or CSV) read, bytes (4 MiB). A table of a thousand stations
/// is about 50 kB; anything near this size is not a design table.
pub const MAX_FILE_BYTES: u64 = 4 << 20;

/// Most stations in a design. Every station is a ring of the loft and a section to
/// resolve; a thousand already describes any blade finer than it can be printed or
/// machined.
pub const MAX_STATIONS: usize = 1000;

/// Largest radius, chord, sweep or prebend, mm (10 m). spanwright is for small rotors:
/// a larger value is almost always a unit slip (metres or inches with millimetre numbers).
pub const MAX_LENGTH_MM: f64 = 10_000.0;

/// Smallest mesh tolerance, mm (1 micrometre): what precision machining holds (common
/// practice), so no printed or machined part needs less. Below it the promise that the
/// mesh stays within the tolerance of the design cannot be kept for every valid design:
/// the skin follows a corner in the design's own law (a shank meeting its transition)
/// only to a few ten-thousandths of a millimetre ([`crate::rings`]), single-precision
/// STL rounds the coordinates of a 0.6 m blade by up to 3e-5 mm (IEEE 754 binary32,
/// 24-bit significand), and a round tip's closing rows crowd into slivers. The mesh
/// grows with the inverse of the tolerance.
pub const MIN_TOLERANCE_MM: f64 = 1e-3;

/// Largest mesh tolerance, mm.
pub const MAX_TOLERANCE_MM: f64 = 10.0;

/// Smallest chord in tolerances. Each surface of the mesh may lie up to one tolerance
/// inside the exact surface, so a section must be thicker than two tolerances for its
/// two sides to stay apart; at 20 tolerances of chord a 10 %-thick section is.
pub const MIN_CHORD_TOLERANCES: f64 = 20.0;

/// Smallest span (first to last station) in tolerances, for the same reason as the chord:
/// the blade must be thicker, along the span too, than two mesh deviations, with room to
/// spare (a blade 20 tolerances long).
pub const MIN_SPAN_TOLERANCES: f64 = 20.0;

/// Smallest gap between neighbouring stations, in tolerances: stations closer than the
/// tolerance cannot be told apart by the mesh.
pub const MIN_GAP_TOLERANCES: f64 = 1.0;

/// Default thinnest trailing edge, mm: the width of a 0.4 mm nozzle, the most common
/// size (common practice).
pub const DEFAULT_MIN_TE_MM: f64 = 0.4;

/// Largest `min-te-thickness` as a fraction of every station's chord (10 %): a thicker
/// "trailing edge" is no longer an edge but a cut-off section.
pub const MAX_TE_CHORD_FRACTION: f64 = 0.1;

/// A number for a message: up to six significant digits, trailing zeros dropped, in
/// exponent form when very large or very small (`1e12`, `1e-9`, `0.001`, `280`).
pub(crate) fn show_number(v: f64) -> String {
    if !v.is_finite() || v == 0.0 {
        return v.to_string();
    }
    let a = v.abs();
    if !(1e-4..1e9).contains(&a) {
        let s = format!("{v:.5e}");
        let (mantissa, exp) = s.split_once('e').unwrap_or((&s, "0"));
        let mantissa = mantissa.trim_end_matches('0').trim_end_matches('.');
        return format!("{mantissa}e{exp}");
    }
    let decimals = (5 - a.log10().floor() as i32).clamp(0, 12) as usize;
    let s = format!("{v:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// A hint for a length over [`MAX_LENGTH_MM`] written in a unit other than millimetres
/// when the same number would be a valid length in millimetres: the likely unit slip.
/// `said` tells where the unit came from (e.g. `units = { length = "m" }`).
pub(crate) fn unit_slip_hint(raw: f64, unit: &str, said: &str) -> Option<String> {
    (unit != "mm" && raw.abs() <= MAX_LENGTH_MM)
        .then(|| format!("did you mean millimetres? the value is read in {unit} because {said}"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_read_as_written() {
        assert_eq!(show_number(1e12), "1e12");
        assert_eq!(show_number(1e-9), "1e-9");
        assert_eq!(show_number(0.000_999_999_999_997_669_4), "0.001");
        assert_eq!(show_number(280.0), "280");
        assert_eq!(show_number(-12.5), "-12.5");
        assert_eq!(show_number(0.01), "0.01");
        assert_eq!(show_number(25.4 * 3.0), "76.2");
    }

    #[test]
    fn chord_limit_keeps_a_ten_percent_section_two_tolerances_thick() {
        // Invariant of the rule as stated: 10 % of the smallest chord is two tolerances.
        assert!((0.1 * MIN_CHORD_TOLERANCES - 2.0).abs() < 1e-12);
        assert!(unit_slip_hint(280.0, "m", "units.length = \"m\"")
            .unwrap()
            .contains("millimetres"));
        assert!(unit_slip_hint(280.0, "mm", "x").is_none());
        assert!(unit_slip_hint(2e4, "m", "x").is_none());
    }
}
