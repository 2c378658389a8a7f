//! [`draft`]: a station table (radius, chord, twist, section) from optimum-rotor theory,
//! with the ideal power coefficient and graded remarks; [`DraftTable::write_csv`] writes
//! it in the CSV layout the design input reads.

use super::bem;
use super::line::Line;
use super::optimum::{self, PowerOptions, BETZ_LIMIT, DEFAULT_PANELS};
use super::remark::{Remark, Severity};
use super::spec::{BadValue, DraftSpec, Method, Spacing};
use crate::design::Flow;
use std::f64::consts::PI;
use std::io::Write;

/// The header of the written table, exactly as the design input reads it.
pub const CSV_HEADER: [&str; 4] = ["radius [mm]", "chord [mm]", "twist [deg]", "section"];

/// Uniformly spaced samples of the ideal chord and twist over the linearisation range
/// that the straight lines are fitted to.
pub const LINE_SAMPLES: usize = 101;

/// Usual range of design tip speed ratios for wind turbines (common practice).
pub const TSR_USUAL: (f64, f64) = (1.0, 12.0);
/// Range of design tip speed ratios common for small wind turbines (common practice).
pub const TSR_SMALL_TURBINE: (f64, f64) = (4.0, 8.0);
/// Twist above which a blade is hard to make and the root works far off design, degrees.
pub const TWIST_LIMIT: f64 = 45.0;
/// Tip speed above which noise and leading-edge wear grow quickly on small rotors, m/s
/// (common practice).
pub const TIP_SPEED_CAUTION: f64 = 60.0;
/// Design lift coefficient above which few single-element sections work well at the low
/// Reynolds numbers of small rotors (common practice).
pub const CL_HIGH: f64 = 1.6;

/// Errors of the draft stage.
#[derive(Debug, thiserror::Error)]
pub enum DraftError {
    /// One or more values of the spec are unusable.
    #[error("invalid draft input:{}", list(.0))]
    Invalid(Vec<BadValue>),
    /// A propeller or fan was asked for.
    #[error(
        "`flow` = propeller: the optimum-rotor methods here (Betz, Glauert) are for turbines, \
         which take power from the flow; a propeller or fan needs a propeller method \
         (e.g. minimum induced loss), which spanwright does not draft. Use flow = turbine, \
         or write the propeller's table yourself"
    )]
    Propeller,
    /// The straight-line chord reaches zero or below at some stations.
    #[error(
        "the straight-line chord fitted over {from:.0} %..{to:.0} % of the tip radius is zero \
         or negative at stations {stations} (radius {radii} mm); move the range inboard or \
         draft without linearising"
    )]
    NonPositiveChord {
        /// Range start, percent of the tip radius.
        from: f64,
        /// Range end, percent of the tip radius.
        to: f64,
        /// Offending station indices, as text.
        stations: String,
        /// Their radii, mm, as text.
        radii: String,
    },
    /// A value that should be finite was not (an internal fault; please report it).
    #[error(
        "internal fault: {0} is not finite at radius {1} mm; please report this with the input"
    )]
    NotFinite(&'static str, f64),
    /// Writing the table failed.
    #[error("writing the station table: {0}")]
    Csv(#[from] csv::Error),
    /// Writing the table failed.
    #[error("writing the station table: {0}")]
    Io(#[from] std::io::Error),
}

fn list(problems: &[BadValue]) -> String {
    problems.iter().map(|p| format!("\n  - {p}")).collect()
}

/// One station of a drafted table. Lengths in mm, angles in degrees.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DraftStation {
    /// Distance from the rotor axis, mm.
    pub radius: f64,
    /// Chord written to the table, mm (after tip loss, linearisation and the floor).
    pub chord: f64,
    /// Twist written to the table, degrees: angle between chord line and plane of rotation,
    /// positive turning the leading edge upstream (see [`crate::conventions`]).
    pub twist: f64,
    /// Section name.
    pub section: String,
    /// Flow angle phi of the optimum rotor, degrees, from the plane of rotation.
    pub flow_angle: f64,
    /// Chord of the optimum rotor (with tip loss when asked), before linearisation and
    /// floor, mm.
    pub ideal_chord: f64,
    /// Angle of attack at the design point with the written twist, `phi - twist`, degrees
    /// (flow angle of the optimum rotor; the design angle unless linearised).
    pub alpha: f64,
    /// Prandtl's tip-loss factor F at this station (computed even when not applied).
    pub tip_loss: f64,
    /// Local solidity `B c / (2 pi r)` with the written chord.
    pub solidity: f64,
}

/// A drafted station table with its power estimate and remarks.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DraftTable {
    /// The spec it was drafted from.
    pub spec: DraftSpec,
    /// Stations, root (hub) first, radius strictly increasing.
    pub stations: Vec<DraftStation>,
    /// Ideal power coefficient of the optimum rotor with wake rotation at the design tip
    /// speed ratio between hub and tip (with tip loss and drag when given); never above
    /// the Betz limit 16/27. See [`optimum::power_coefficient`].
    pub power_coefficient: f64,
    /// Rough blade-element momentum estimate of the power coefficient of the blade as
    /// written (linearised chord and twist, tip loss and drag when given), at the design
    /// tip speed ratio; see [`super::bem`]. Never above 16/27.
    pub blade_power_coefficient: f64,
    /// Straight chord line, mm against radius in mm, when linearised.
    pub chord_line: Option<Line>,
    /// Straight twist line, degrees against radius in mm, when linearised.
    pub twist_line: Option<Line>,
    /// Rotor speed at the given wind speed, revolutions per minute:
    /// `rpm = 60 lambda V / (2 pi R)`.
    pub rpm: Option<f64>,
    /// Tip speed at the given wind speed, `lambda V`, m/s.
    pub tip_speed: Option<f64>,
    /// Notes, cautions and warnings, most important first.
    pub remarks: Vec<Remark>,
}

/// Station radii from hub to tip (both included), mm.
pub fn station_radii(hub: f64, tip: f64, count: usize, spacing: Spacing) -> Vec<f64> {
    let n = count.max(2);
    (0..n)
        .map(|i| {
            let t = i as f64 / (n - 1) as f64;
            let s = match spacing {
                Spacing::Uniform => t,
                Spacing::Cosine => (0.5 * PI * t).sin(),
            };
            if i == n - 1 {
                tip
            } else {
                hub + (tip - hub) * s
            }
        })
        .collect()
}

/// Rotor speed in rpm at wind speed `wind` (m/s) for tip speed ratio `tsr` and tip radius
/// `tip_radius` (mm): `rpm = 60 lambda V / (2 pi R)`.
pub fn rotor_rpm(tsr: f64, wind: f64, tip_radius: f64) -> f64 {
    60.0 * tsr * wind / (2.0 * PI * tip_radius * 1e-3)
}

/// The optimum rotor at radius `r` (mm): (flow angle rad, chord mm, tip-loss factor F).
/// The chord includes F when `spec.tip_loss` is set.
fn ideal(spec: &DraftSpec, r: f64) -> (f64, f64, f64) {
    let lr = spec.tip_speed_ratio * r / spec.tip_radius;
    let (phi, chord) = match spec.method {
        Method::Betz => {
            let phi = optimum::betz_flow_angle(lr);
            (
                phi,
                optimum::betz_chord(r, phi, spec.blades, spec.design_cl),
            )
        }
        Method::Glauert => {
            let phi = optimum::glauert_flow_angle(lr);
            (
                phi,
                optimum::glauert_chord(r, phi, spec.blades, spec.design_cl),
            )
        }
    };
    let f = optimum::prandtl_tip_loss(spec.blades, r, spec.tip_radius, phi);
    (phi, if spec.tip_loss { chord * f } else { chord }, f)
}

/// Drafts the station table for `spec`.
///
/// Chord: the chosen optimum rotor's chord, times Prandtl's tip-loss factor F when
/// `tip_loss` is set (`c_F = F c`: the momentum balance of each annulus carries F, so at
/// the same induction the chord scales with F; the flow angle is kept from the rotor
/// without tip loss, an approximation). Twist: `phi - alpha_design`. With `linear`, chord
/// and twist become the least-squares lines through [`LINE_SAMPLES`] uniform samples of
/// the ideal values over the range, applied over the whole blade. Finally no chord is
/// written below [`DraftSpec::chord_floor`].
///
/// # Example
/// ```
/// use spanwright::draft::{draft, DraftSpec};
/// // R = 600 mm, hub 90 mm, 3 blades, tip speed ratio 6, Cl 1.0 at 6 degrees.
/// let table = draft(&DraftSpec::new(600.0, 90.0, 3, 6.0, 1.0, 6.0))?;
/// assert_eq!(table.stations.len(), 20);
/// assert!(table.power_coefficient < 16.0 / 27.0);
/// let mut csv = Vec::new();
/// table.write_csv(&mut csv)?;
/// assert!(csv.starts_with(b"radius [mm],chord [mm],twist [deg],section"));
/// # Ok::<(), spanwright::draft::DraftError>(())
/// ```
///
/// # Errors
/// [`DraftError::Invalid`] listing every bad value, [`DraftError::Propeller`] for
/// `flow = propeller`, [`DraftError::NonPositiveChord`] when the straight chord reaches 0.
pub fn draft(spec: &DraftSpec) -> Result<DraftTable, DraftError> {
    let problems = spec.problems();
    if !problems.is_empty() {
        return Err(DraftError::Invalid(problems));
    }
    if spec.flow == Flow::Propeller {
        return Err(DraftError::Propeller);
    }
    let radii = station_radii(
        spec.inner_radius,
        spec.tip_radius,
        spec.stations,
        spec.spacing,
    );
    let lines = Lines::fit(spec)?;
    let floor = spec.chord_floor();
    let (stations, floored) = draft_stations(spec, &radii, &lines, floor)?;
    let mut remarks = Vec::new();
    let power_coefficient = ideal_power(spec, &mut remarks);
    let blade_power_coefficient = blade_power(spec, &lines, floor, &mut remarks);
    let (rpm, tip_speed) = match spec.wind_speed {
        Some(v) => (
            Some(rotor_rpm(spec.tip_speed_ratio, v, spec.tip_radius)),
            Some(spec.tip_speed_ratio * v),
        ),
        None => (None, None),
    };
    remarks.extend(judge(spec, &stations, &floored, floor, rpm, tip_speed));
    remarks.sort_by_key(|r| std::cmp::Reverse(r.severity));
    Ok(DraftTable {
        spec: spec.clone(),
        stations,
        power_coefficient,
        blade_power_coefficient,
        chord_line: lines.chord,
        twist_line: lines.twist,
        rpm,
        tip_speed,
        remarks,
    })
}

/// The straight chord and twist lines, when linearised.
struct Lines {
    /// Chord, mm against radius in mm.
    chord: Option<Line>,
    /// Twist, degrees against radius in mm.
    twist: Option<Line>,
}

impl Lines {
    /// Straight lines over the chosen range, fitted to uniform samples of the ideal
    /// blade.
    fn fit(spec: &DraftSpec) -> Result<Lines, DraftError> {
        let Some(range) = spec.linear else {
            return Ok(Lines {
                chord: None,
                twist: None,
            });
        };
        let alpha_d = spec.design_alpha.to_radians();
        let (a, b) = (range.from * spec.tip_radius, range.to * spec.tip_radius);
        let xs: Vec<f64> = (0..LINE_SAMPLES)
            .map(|i| a + (b - a) * i as f64 / (LINE_SAMPLES - 1) as f64)
            .collect();
        let (mut cs, mut ts) = (Vec::new(), Vec::new());
        for &x in &xs {
            let (phi, c, _) = ideal(spec, x);
            cs.push(c);
            ts.push((phi - alpha_d).to_degrees());
        }
        let chord = Line::fit(&xs, &cs).ok_or(DraftError::NotFinite("chord line", a))?;
        let twist = Line::fit(&xs, &ts).ok_or(DraftError::NotFinite("twist line", a))?;
        Ok(Lines {
            chord: Some(chord),
            twist: Some(twist),
        })
    }

    /// Chord at radius `r` before the floor: the line's, else the ideal one.
    fn chord_at(&self, r: f64, ideal_chord: f64) -> f64 {
        self.chord.map_or(ideal_chord, |l| l.at(r))
    }

    /// Twist at radius `r`, radians: the line's, else the flow angle `phi` less the
    /// design angle of attack `alpha_d`.
    fn twist_at(&self, r: f64, phi: f64, alpha_d: f64) -> f64 {
        self.twist.map_or(phi - alpha_d, |l| l.at(r).to_radians())
    }
}

/// The stations at `radii` and the indices of those whose chord was raised to the
/// floor.
///
/// # Errors
/// [`DraftError::NotFinite`], or [`DraftError::NonPositiveChord`] listing every station
/// where the straight chord reaches zero.
fn draft_stations(
    spec: &DraftSpec,
    radii: &[f64],
    lines: &Lines,
    floor: f64,
) -> Result<(Vec<DraftStation>, Vec<usize>), DraftError> {
    let alpha_d = spec.design_alpha.to_radians();
    let mut stations = Vec::with_capacity(radii.len());
    let mut floored = Vec::new();
    let mut non_positive = Vec::new();
    for (i, &r) in radii.iter().enumerate() {
        let (phi, ideal_chord, f) = ideal(spec, r);
        let mut chord = lines.chord_at(r, ideal_chord);
        let twist_rad = lines.twist_at(r, phi, alpha_d);
        if !(chord.is_finite() && twist_rad.is_finite()) {
            return Err(DraftError::NotFinite("chord or twist", r));
        }
        if lines.chord.is_some() && chord <= 0.0 {
            non_positive.push(i);
        }
        if chord < floor {
            chord = floor;
            floored.push(i);
        }
        stations.push(DraftStation {
            radius: r,
            chord,
            twist: twist_rad.to_degrees(),
            section: spec.section.clone(),
            flow_angle: phi.to_degrees(),
            ideal_chord,
            alpha: (phi - twist_rad).to_degrees(),
            tip_loss: f,
            solidity: optimum::local_solidity(spec.blades, chord, r),
        });
    }
    if !non_positive.is_empty() {
        let range = spec
            .linear
            .unwrap_or(super::spec::LinearRange { from: 0.0, to: 1.0 });
        return Err(DraftError::NonPositiveChord {
            from: range.from * 100.0,
            to: range.to * 100.0,
            stations: super::remark::index_list(&non_positive),
            radii: non_positive
                .iter()
                .map(|&i| format!("{:.1}", radii[i]))
                .collect::<Vec<_>>()
                .join(", "),
        });
    }
    Ok((stations, floored))
}

/// Ideal power coefficient of the optimum rotor, clamped to the Betz limit (with a
/// warning should rounding take it above).
fn ideal_power(spec: &DraftSpec, remarks: &mut Vec<Remark>) -> f64 {
    let raw_cp = optimum::power_coefficient(
        spec.tip_speed_ratio,
        &PowerOptions {
            blades: spec.blades,
            hub_ratio: spec.inner_radius / spec.tip_radius,
            tip_loss: spec.tip_loss,
            drag_ratio: spec.lift_drag.map_or(0.0, |ld| 1.0 / ld),
            panels: DEFAULT_PANELS,
        },
    );
    if raw_cp > BETZ_LIMIT {
        remarks.push(Remark::new(
            Severity::Warning,
            format!(
                "the power estimate {raw_cp:.4} came out above the Betz limit 16/27 = {BETZ_LIMIT:.4} \
                 (numerical error); no turbine in an open flow can exceed it (Betz, 1920), so it \
                 is clamped to 16/27"
            ),
        ));
        BETZ_LIMIT
    } else {
        raw_cp.max(0.0)
    }
}

/// Rough BEM estimate of the blade as written (chord and twist between the stations
/// follow the same rules as at them), with a note when some annuli found no balance.
fn blade_power(spec: &DraftSpec, lines: &Lines, floor: f64, remarks: &mut Vec<Remark>) -> f64 {
    let alpha_d = spec.design_alpha.to_radians();
    let bem_input = bem::BemInput {
        blades: spec.blades,
        tip_radius: spec.tip_radius,
        hub_radius: spec.inner_radius,
        tsr: spec.tip_speed_ratio,
        cl_design: spec.design_cl,
        alpha_design: alpha_d,
        alpha_stall: spec.stall_alpha.to_radians(),
        cd: spec.lift_drag.map_or(0.0, |ld| spec.design_cl / ld),
        tip_loss: spec.tip_loss,
        annuli: bem::DEFAULT_ANNULI,
    };
    let (blade_cp, failed) = bem::power_coefficient(&bem_input, |r| {
        let (phi, c, _) = ideal(spec, r);
        let chord = lines.chord_at(r, c).max(floor);
        let twist = lines.twist_at(r, phi, alpha_d);
        (chord, twist)
    });
    if failed > 0 {
        remarks.push(Remark::new(
            Severity::Note,
            format!(
                "the blade-element estimate found no flow balance in {failed} of {} annuli \
                 (counted as producing nothing); its C_P is a lower figure",
                bem::DEFAULT_ANNULI + 1
            ),
        ));
    }
    blade_cp.clamp(0.0, BETZ_LIMIT)
}

/// Notes, cautions and warnings on a drafted blade.
fn judge(
    spec: &DraftSpec,
    stations: &[DraftStation],
    floored: &[usize],
    floor: f64,
    rpm: Option<f64>,
    tip_speed: Option<f64>,
) -> Vec<Remark> {
    let mut out = design_point_remarks(spec);
    out.extend(station_remarks(spec, stations));
    if !floored.is_empty() {
        out.push(Remark::at(
            Severity::Note,
            format!(
                "chord raised to the floor {floor:.2} mm (tip loss or the straight line take it \
                 lower); set `min_chord` to change"
            ),
            floored.to_vec(),
        ));
    }
    if let (Some(n), Some(u)) = (rpm, tip_speed) {
        out.extend(speed_remarks(spec, n, u));
    }
    out.push(Remark::new(
        Severity::Caution,
        "this is an aerodynamic draft, not a structural design. Spinning blades store energy \
         and can break and throw parts; printed parts vary in strength with material, print \
         orientation and layer bonding. Provide overspeed protection, keep people out of the \
         plane of rotation, and follow local codes, the standards for small wind turbines \
         (IEC 61400-2) and licensed engineering practice before anything spins",
    ));
    out
}

/// Remarks on the design point: tip speed ratio, lift coefficient, angle of attack.
fn design_point_remarks(spec: &DraftSpec) -> Vec<Remark> {
    let mut out = Vec::new();
    let l = spec.tip_speed_ratio;
    if l < TSR_USUAL.0 || l > TSR_USUAL.1 {
        out.push(Remark::new(
            Severity::Warning,
            format!(
                "tip speed ratio {l} is outside the usual range {}..{} (common practice): below it \
                 the blades are wide, heavily twisted and slow; above it they are slender, fast \
                 and loud, and small errors in twist matter more",
                TSR_USUAL.0, TSR_USUAL.1
            ),
        ));
    } else if l < TSR_SMALL_TURBINE.0 || l > TSR_SMALL_TURBINE.1 {
        out.push(Remark::new(
            Severity::Note,
            format!(
                "tip speed ratio {l}: small wind turbines commonly use {}..{} (common practice)",
                TSR_SMALL_TURBINE.0, TSR_SMALL_TURBINE.1
            ),
        ));
    }
    if spec.design_cl > CL_HIGH {
        out.push(Remark::new(
            Severity::Warning,
            format!(
                "design Cl {} is above {CL_HIGH}, more than most single-element sections give at \
                 small-rotor Reynolds numbers (common practice); check the section's polar",
                spec.design_cl
            ),
        ));
    }
    if spec.design_alpha >= spec.stall_alpha {
        out.push(Remark::new(
            Severity::Warning,
            format!(
                "design angle of attack {}° is at or above the stall angle {}°: the whole blade \
                 would work stalled; take the angle of best lift-to-drag ratio from the polar",
                spec.design_alpha, spec.stall_alpha
            ),
        ));
    }
    out
}

/// Remarks naming stations: overlapping blades, large twist, stall, little load.
fn station_remarks(spec: &DraftSpec, stations: &[DraftStation]) -> Vec<Remark> {
    let mut out = Vec::new();
    let pick = |test: &dyn Fn(&DraftStation) -> bool| -> Vec<usize> {
        stations
            .iter()
            .enumerate()
            .filter(|(_, s)| test(s))
            .map(|(i, _)| i)
            .collect()
    };
    let dense = pick(&|s| s.solidity > 1.0);
    if !dense.is_empty() {
        let worst = dense
            .iter()
            .map(|&i| stations[i].solidity)
            .fold(0.0, f64::max);
        out.push(Remark::at(
            Severity::Warning,
            format!(
                "local solidity B c / (2 pi r) above 1 (up to {worst:.2}): the blades would \
                 overlap in the plane of rotation; raise the inner radius, the tip speed ratio or \
                 the design Cl, or use fewer blades"
            ),
            dense,
        ));
    }
    let twisted = pick(&|s| s.twist.abs() > TWIST_LIMIT);
    if !twisted.is_empty() {
        let worst = twisted
            .iter()
            .map(|&i| stations[i].twist.abs())
            .fold(0.0, f64::max);
        out.push(Remark::at(
            Severity::Warning,
            format!(
                "twist above {TWIST_LIMIT}° (up to {worst:.1}°): hard to make and far from \
                 design off the design point; raise the inner radius or linearise the twist"
            ),
            twisted,
        ));
    }
    let stalled = pick(&|s| s.alpha > spec.stall_alpha);
    if !stalled.is_empty() {
        let worst = stalled
            .iter()
            .map(|&i| stations[i].alpha)
            .fold(f64::MIN, f64::max);
        let root_phi = stations.first().map_or(0.0, |s| s.flow_angle);
        out.push(Remark::at(
            Severity::Warning,
            format!(
                "these stations will stall at the design point: the flow angle (root {root_phi:.1}°) \
                 minus the written twist gives an angle of attack up to {worst:.1}°, above the \
                 stall angle {}°; move the linearisation range inboard, or keep the ideal twist \
                 near the root",
                spec.stall_alpha
            ),
            stalled,
        ));
    }
    let negative = pick(&|s| s.alpha < spec.design_alpha - spec.stall_alpha);
    if !negative.is_empty() {
        out.push(Remark::at(
            Severity::Note,
            "the written twist is far above the flow angle here: these stations work at a \
             low or negative angle of attack and carry little load",
            negative,
        ));
    }
    out
}

/// Cautions on the rotor speed `n` (rpm) and tip speed `u` (m/s) at the given wind.
fn speed_remarks(spec: &DraftSpec, n: f64, u: f64) -> Vec<Remark> {
    let v = spec.wind_speed.unwrap_or(0.0);
    let mut out = vec![Remark::new(
        Severity::Caution,
        format!(
            "at {v} m/s the rotor turns about {n:.0} rpm with a tip speed of {u:.1} m/s. A \
             rotor that loses its load or meets a gust can overspeed, commonly to 1.5 to 2 \
             times the design speed (common practice), i.e. {:.0} to {:.0} rpm; centrifugal \
             loads grow with the square of speed",
            1.5 * n,
            2.0 * n
        ),
    )];
    if u > TIP_SPEED_CAUTION {
        out.push(Remark::new(
            Severity::Caution,
            format!(
                "tip speed {u:.1} m/s is above {TIP_SPEED_CAUTION} m/s: noise, leading-edge \
                 wear and blade loads rise quickly on small rotors (common practice)"
            ),
        ));
    }
    out
}

impl DraftTable {
    /// Writes the table as CSV with the header [`CSV_HEADER`], one row per station,
    /// radius, chord and twist to 3 decimals.
    ///
    /// # Errors
    /// [`DraftError::Csv`] or [`DraftError::Io`] when the writer fails.
    pub fn write_csv<W: Write>(&self, w: W) -> Result<(), DraftError> {
        let mut out = csv::Writer::from_writer(w);
        out.write_record(CSV_HEADER)?;
        for s in &self.stations {
            out.write_record([
                format!("{:.3}", s.radius),
                format!("{:.3}", s.chord),
                format!("{:.3}", s.twist),
                s.section.clone(),
            ])?;
        }
        out.flush()?;
        Ok(())
    }
}
