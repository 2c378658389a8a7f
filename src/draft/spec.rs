//! [`DraftSpec`]: what a drafted rotor should be (size, blades, tip speed ratio, section
//! design point, method and options), in millimetres and degrees, with its validation.

use crate::design::Flow;
use std::fmt;

/// Which optimum rotor gives the planform.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Method {
    /// Betz optimum without wake rotation (a = 1/3, a' = 0).
    Betz,
    /// Glauert optimum with wake rotation (default).
    #[default]
    Glauert,
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Method::Betz => "Betz optimum without wake rotation",
            Method::Glauert => "Glauert optimum with wake rotation",
        })
    }
}

/// How stations are spread between hub and tip.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Spacing {
    /// Equal steps in radius (default).
    #[default]
    Uniform,
    /// Half-cosine spacing, closer toward the tip where chord and twist change fastest:
    /// `r_i = r_hub + (R - r_hub) sin(pi/2 * i / (n - 1))`.
    Cosine,
}

/// The span range a straight chord and twist are fitted over, as fractions of the tip
/// radius (e.g. 0.5 to 0.9).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LinearRange {
    /// Inner end, fraction of the tip radius; at least inner radius / tip radius.
    pub from: f64,
    /// Outer end, fraction of the tip radius; above `from`, at most 1.
    pub to: f64,
}

/// Default number of stations.
pub const DEFAULT_STATIONS: usize = 20;
/// Default section name written to the table.
pub const DEFAULT_SECTION: &str = "naca4412";
/// Default angle of attack above which a section is taken to stall, degrees. Common
/// practice for NACA 4-digit sections at the low Reynolds numbers of small rotors; give
/// the value of your section's polar.
pub const DEFAULT_STALL_ALPHA: f64 = 14.0;
/// Default floor on the chord, as a fraction of the tip radius (1 %): tip loss drives the
/// ideal chord to zero at the tip, which cannot be built. Our choice; set `min_chord`.
pub const DEFAULT_MIN_CHORD_FRACTION: f64 = 0.01;

fn default_name() -> String {
    "draft".to_owned()
}
fn default_stations() -> usize {
    DEFAULT_STATIONS
}
fn default_section() -> String {
    DEFAULT_SECTION.to_owned()
}
fn default_stall() -> f64 {
    DEFAULT_STALL_ALPHA
}

/// What to draft. Lengths in mm, angles in degrees, speeds in m/s.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DraftSpec {
    /// Design name; names the output file. Default `draft`.
    #[serde(default = "default_name")]
    pub name: String,
    /// Tip radius R, mm.
    pub tip_radius: f64,
    /// Radius of the first (innermost) station, where the drafted blade starts, mm; above 0
    /// and below `tip_radius`. The momentum theory integrates from here to the tip. Files
    /// may still spell it `hub_radius` (its old name).
    #[serde(alias = "hub_radius")]
    pub inner_radius: f64,
    /// Blade count B.
    pub blades: u32,
    /// Design tip speed ratio lambda = (tip speed) / (wind speed).
    pub tip_speed_ratio: f64,
    /// Design lift coefficient Cl of the section.
    pub design_cl: f64,
    /// Design angle of attack of the section, degrees.
    pub design_alpha: f64,
    /// Optimum rotor giving the planform (default Glauert, with wake rotation).
    #[serde(default)]
    pub method: Method,
    /// Multiply the chord by Prandtl's tip-loss factor (default off).
    #[serde(default)]
    pub tip_loss: bool,
    /// Replace chord and twist by straight lines fitted over this range (default none).
    #[serde(default)]
    pub linear: Option<LinearRange>,
    /// Number of stations, hub and tip included (default [`DEFAULT_STATIONS`]).
    #[serde(default = "default_stations")]
    pub stations: usize,
    /// Station spacing (default uniform).
    #[serde(default)]
    pub spacing: Spacing,
    /// Wind speed for the rotor speed and tip speed, m/s (default none).
    #[serde(default)]
    pub wind_speed: Option<f64>,
    /// Section name written in the table's `section` column (default
    /// [`DEFAULT_SECTION`]).
    #[serde(default = "default_section")]
    pub section: String,
    /// Flow mode; only `turbine` is drafted here.
    #[serde(default)]
    pub flow: Flow,
    /// Lift-to-drag ratio Cl/Cd of the section at its design point, for the power
    /// estimate (default none: no drag).
    #[serde(default)]
    pub lift_drag: Option<f64>,
    /// Smallest chord written, mm (default [`DEFAULT_MIN_CHORD_FRACTION`] of the tip
    /// radius).
    #[serde(default)]
    pub min_chord: Option<f64>,
    /// Angle of attack above which the section stalls, degrees (default
    /// [`DEFAULT_STALL_ALPHA`]).
    #[serde(default = "default_stall")]
    pub stall_alpha: f64,
}

impl DraftSpec {
    /// A spec with the required values and every option at its default.
    pub fn new(
        tip_radius: f64,
        inner_radius: f64,
        blades: u32,
        tip_speed_ratio: f64,
        design_cl: f64,
        design_alpha: f64,
    ) -> Self {
        Self {
            name: default_name(),
            tip_radius,
            inner_radius,
            blades,
            tip_speed_ratio,
            design_cl,
            design_alpha,
            method: Method::default(),
            tip_loss: false,
            linear: None,
            stations: DEFAULT_STATIONS,
            spacing: Spacing::default(),
            wind_speed: None,
            section: default_section(),
            flow: Flow::default(),
            lift_drag: None,
            min_chord: None,
            stall_alpha: DEFAULT_STALL_ALPHA,
        }
    }

    /// The chord floor in mm: `min_chord`, or the default fraction of the tip radius.
    pub fn chord_floor(&self) -> f64 {
        self.min_chord
            .unwrap_or(DEFAULT_MIN_CHORD_FRACTION * self.tip_radius)
    }

    /// Every problem with the values, all at once (empty when the spec is usable).
    pub fn problems(&self) -> Vec<BadValue> {
        let mut out = Problems(Vec::new());
        self.size_problems(&mut out);
        self.design_point_problems(&mut out);
        if !(2..=10_000).contains(&self.stations) {
            out.bad(
                "stations",
                self.stations.to_string(),
                "must be between 2 and 10000",
            );
        }
        self.linear_problems(&mut out);
        if let Some(v) = self.wind_speed {
            out.positive("wind_speed", v, "must be a positive speed in m/s");
        }
        if self.section.trim().is_empty() || self.section.contains(['\n', '\r']) {
            out.bad(
                "section",
                format!("{:?}", self.section),
                "must name a section, e.g. naca4412",
            );
        }
        if let Some(ld) = self.lift_drag {
            out.positive("lift_drag", ld, "must be a positive ratio Cl/Cd, e.g. 50");
        }
        if let Some(m) = self.min_chord {
            out.positive(
                "min_chord",
                m,
                "must be a positive length in mm (a zero chord cannot be built)",
            );
        }
        out.0
    }

    /// The name, the radii and the blade count.
    fn size_problems(&self, out: &mut Problems) {
        if self.name.trim().is_empty() || self.name.contains(['/', '\\']) {
            out.bad(
                "name",
                format!("{:?}", self.name),
                "must be a plain, non-empty file name (it names the output file)",
            );
        }
        let (r, h) = (self.tip_radius, self.inner_radius);
        out.positive("tip_radius", r, "must be a positive length in mm, e.g. 600");
        if !(h.is_finite() && h > 0.0) {
            out.bad("inner_radius", h.to_string(), "must be a positive length in mm (the radius of the first station, where the blade leaves the hub), e.g. 10 to 20 % of the tip radius");
        } else if r.is_finite() && h >= r {
            out.bad(
                "inner_radius",
                h.to_string(),
                format!("must be below the tip radius ({r} mm)"),
            );
        }
        if self.blades == 0 {
            out.bad("blades", "0".into(), "needs at least 1 blade");
        }
    }

    /// The design point: tip speed ratio, lift coefficient, angles of attack.
    fn design_point_problems(&self, out: &mut Problems) {
        out.positive(
            "tip_speed_ratio",
            self.tip_speed_ratio,
            "must be positive; small wind turbines commonly use 4 to 8",
        );
        let cl = self.design_cl;
        if !(cl.is_finite() && cl > 0.0 && cl <= 3.0) {
            out.bad(
                "design_cl",
                cl.to_string(),
                "must be above 0 and at most 3; take the lift coefficient at the best lift-to-drag ratio of the section's polar (often 0.8 to 1.2)",
            );
        }
        let a = self.design_alpha;
        if !(a.is_finite() && a > -20.0 && a < 30.0) {
            out.bad(
                "design_alpha",
                a.to_string(),
                "must be an angle of attack in degrees between -20 and 30, from the section's polar",
            );
        }
        let s = self.stall_alpha;
        if !(s.is_finite() && s > 0.0 && s < 45.0) {
            out.bad(
                "stall_alpha",
                s.to_string(),
                "must be an angle in degrees between 0 and 45",
            );
        }
    }

    /// The linearisation range: fractions in order, outside the hub.
    fn linear_problems(&self, out: &mut Problems) {
        let Some(range) = self.linear else {
            return;
        };
        let (r, h) = (self.tip_radius, self.inner_radius);
        let ok = range.from.is_finite()
            && range.to.is_finite()
            && range.from < range.to
            && range.to <= 1.0;
        if !ok {
            out.bad(
                "linear",
                format!("{}..{}", range.from, range.to),
                "must be fractions of the tip radius with from < to <= 1, e.g. 0.5..0.9",
            );
        } else if r.is_finite() && r > 0.0 && h.is_finite() && range.from * r < h {
            out.bad(
                "linear",
                format!("{}..{}", range.from, range.to),
                format!(
                    "starts inside the hub, below the first station: from must be at least \
                     inner radius / tip radius = {:.3}",
                    h / r
                ),
            );
        }
    }
}

/// The problems found so far.
struct Problems(Vec<BadValue>);

impl Problems {
    fn bad(&mut self, key: &str, value: String, message: impl Into<String>) {
        self.0.push(BadValue {
            key: key.to_owned(),
            value,
            message: message.into(),
        });
    }

    /// A problem unless `v` is finite and positive.
    fn positive(&mut self, key: &str, v: f64, message: &str) {
        if !(v.is_finite() && v > 0.0) {
            self.bad(key, v.to_string(), message);
        }
    }
}

/// One bad value in a [`DraftSpec`].
#[derive(Debug, Clone, PartialEq)]
pub struct BadValue {
    /// The spec key (field name), e.g. `tip_radius`.
    pub key: String,
    /// The value given, as text.
    pub value: String,
    /// What is wrong and how to fix it.
    pub message: String,
}

impl fmt::Display for BadValue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "`{}` = {}: {}", self.key, self.value, self.message)
    }
}
