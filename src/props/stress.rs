//! Spanwise stress estimate of one blade: centrifugal tension plus flapwise bending
//! from thrust, against the material's strength with a safety factor, and the tip
//! deflection as a cantilever.
//!
//! **This is an estimate, not a certification.** See [`CAUTIONS`] and
//! [`StressTable::assumptions`]. Units: mm, N, MPa (= N/mm^2), g.
//!
//! * Centrifugal force at radius r: `F(r) = rho_eff omega^2 integral(z dV)` over the part
//!   outboard of the plane `z = r` ([`Outboard`], exact for the mesh); only the spanwise
//!   component `m omega^2 z` is kept. Stress `F / A`.
//! * Thrust (momentum theory): `T = 0.5 rho_air (pi R^2) V^2 C_T`, `C_T = 8/9` at the Betz
//!   optimum by default, shared by `B` blades and spread over the blade's span either in
//!   proportion to the annulus area (`q ~ r`) or uniformly. Using the whole disc
//!   `pi R^2` puts the hub's share on the blades: conservative.
//! * Bending moment `M(r) = integral_r^R q(s) (s - r) ds` about the x axis; stress at every
//!   cut vertex by unsymmetrical bending ([`SectionProps::flap_bending`]); combined with the
//!   centrifugal stress at the extreme fibres.
//! * Tip deflection: `w'' = M / (E I_flap)`, integrated twice from the root (clamped) by the
//!   trapezoidal rule.
//! * Printed parts: the mass is the printed part's ([`FilledMass`]: a shell of the wall
//!   thickness plus infill), spread uniformly for the centrifugal load; section stresses
//!   are divided by the section's material fraction ([`Fill::fraction_of_section`], the
//!   section's inward offset by the wall filled to the infill); this treats the section as
//!   uniformly thinned, which overstates bending stress for a shell (conservative).

use super::{
    Fill, FilledMass, Material, Outboard, SectionProps, ShellError, ShellOptions, Slice, SliceError,
};
use crate::mesh::TriMesh;

/// Cautions printed with every stress result.
pub const CAUTIONS: [&str; 5] = [
    "Spinning parts can kill: a blade that fails at speed leaves with great energy. Keep \
     people out of the plane of rotation and test behind a guard.",
    "This is an estimate, not a certification. It neglects gusts, overspeed, fatigue, \
     vibration, edgewise (torque and gravity) loads, stress concentrations at the root \
     fixing, creep and ageing.",
    "Printed parts are weaker than the bulk material and anisotropic: layers bond less \
     well than the filament is strong, so strength across layers can be a fraction of the \
     values used here. Material values are typical values (common practice), not data \
     for your filament.",
    "Follow local codes, the applicable standards for small wind turbines (e.g. IEC \
     61400-2) and licensed engineering practice; have a qualified engineer check any \
     rotor that could hurt someone.",
    "Balance the real rotor: printed blades differ in mass and imbalance grows with the \
     square of the speed.",
];

/// How the thrust is spread along the span.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum ThrustSpread {
    /// In proportion to the swept annulus, `q(r) ~ r` (momentum theory, uniform loading
    /// per unit disc area). The default.
    #[default]
    Annulus,
    /// Uniform along the span.
    Uniform,
}

/// Operating point and factors of the estimate.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LoadCase {
    /// Rotor speed, rev/min (0: no centrifugal load).
    pub rpm: f64,
    /// Wind (free-stream) speed, m/s (0: no thrust unless `thrust` is given).
    pub wind: f64,
    /// Number of blades sharing the thrust. Default 3.
    pub blades: u32,
    /// Air density, kg/m^3. Default 1.225 (ISA sea level, common practice).
    pub air_density: f64,
    /// Thrust coefficient. Default 8/9 (Betz optimum, momentum theory).
    pub thrust_coefficient: f64,
    /// Thrust per blade, N, overriding momentum theory when given.
    pub thrust: Option<f64>,
    /// How the thrust is spread along the span.
    pub spread: ThrustSpread,
    /// Required safety factor on the material strength. Default 3 (common practice for a
    /// first estimate of printed parts; your code or standard may ask for more).
    pub safety_factor: f64,
}

impl Default for LoadCase {
    fn default() -> Self {
        LoadCase {
            rpm: 0.0,
            wind: 0.0,
            blades: 3,
            air_density: 1.225,
            thrust_coefficient: 8.0 / 9.0,
            thrust: None,
            spread: ThrustSpread::Annulus,
            safety_factor: 3.0,
        }
    }
}

/// Stress and deflection at one radius.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct StressRow {
    /// Section properties of the solid cut.
    pub section: SectionProps,
    /// Material fraction of the section (shell plus infill), 0..=1.
    pub fill: f64,
    /// Mass outboard of this radius, g.
    pub outboard_mass: f64,
    /// Centrifugal (spanwise) force, N.
    pub centrifugal_force: f64,
    /// Centrifugal stress, MPa.
    pub centrifugal_stress: f64,
    /// Flapwise bending moment, N mm.
    pub bending_moment: f64,
    /// Largest tensile stress (centrifugal + bending) at an extreme fibre, MPa.
    pub max_tension: f64,
    /// Largest compressive stress, MPa (positive number; 0 when none).
    pub max_compression: f64,
    /// Strength / largest stress magnitude (infinite without load).
    pub safety_factor: f64,
    /// Flapwise deflection (toward +y, downstream), mm.
    pub deflection: f64,
}

/// The stress estimate along the span.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct StressTable {
    /// Material used.
    pub material: Material,
    /// Fill model used.
    pub fill: Fill,
    /// Operating point.
    pub load: LoadCase,
    /// Thrust carried by this blade, N.
    pub thrust_per_blade: f64,
    /// Part mass, g (with the fill model).
    pub mass: f64,
    /// Rows from root to tip.
    pub rows: Vec<StressRow>,
    /// Smallest safety factor along the span.
    pub min_safety_factor: f64,
    /// Radius of the smallest safety factor, mm.
    pub critical_radius: f64,
    /// Tip deflection, mm.
    pub tip_deflection: f64,
    /// True when the smallest safety factor reaches the required one.
    pub passes: bool,
    /// The assumptions, in words.
    pub assumptions: Vec<String>,
    /// The cautions ([`CAUTIONS`]).
    pub cautions: Vec<String>,
}

/// Why the estimate could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum StressError {
    /// The mesh encloses no volume.
    #[error("the part encloses no volume: the mesh is empty, open or inside-out (check and repair it, or flip its triangles)")]
    NoVolume,
    /// A cut failed.
    #[error(transparent)]
    Slice(#[from] SliceError),
    /// The shell model failed (a part too tall for its wall).
    #[error(transparent)]
    Shell(ShellError),
    /// A cut inside the span found no material.
    #[error("no material at radius {0} mm: the part is not one blade along z (see the conventions), or it is in pieces")]
    EmptySection(f64),
    /// A load-case value is out of range.
    #[error("{key} = {value} is out of range: {hint}")]
    BadValue {
        /// Option name.
        key: &'static str,
        /// Offending value.
        value: f64,
        /// What is allowed.
        hint: &'static str,
    },
}

/// Evenly spaced radii over the part's span, `n >= 2`, the first and last moved inward by
/// 1e-6 of the span: a plane through the root face finds no section (see [`Slice::cut`]),
/// and end caps are flat only to rounding.
pub fn span_radii(mesh: &TriMesh, n: usize) -> Vec<f64> {
    let Some(bb) = mesh.bounding_box() else {
        return Vec::new();
    };
    let n = n.max(2);
    let eps = (bb.max.z - bb.min.z).abs().max(1e-3) * 1e-6;
    let (r0, r1) = (bb.min.z + eps, bb.max.z - eps);
    (0..n)
        .map(|i| r0 + (r1 - r0) * i as f64 / (n - 1) as f64)
        .collect()
}

impl LoadCase {
    fn validate(&self) -> Result<(), StressError> {
        let bad = |key, value, hint| Err(StressError::BadValue { key, value, hint });
        if !(self.rpm >= 0.0 && self.rpm.is_finite()) {
            return bad("rpm", self.rpm, "give a speed of 0 or more rev/min");
        }
        if !(self.wind >= 0.0 && self.wind.is_finite()) {
            return bad("wind", self.wind, "give a wind speed of 0 or more m/s");
        }
        if self.blades == 0 {
            return bad("blades", 0.0, "a rotor has at least one blade");
        }
        if self.safety_factor.is_nan() || self.safety_factor < 1.0 {
            return bad(
                "safety factor",
                self.safety_factor,
                "use 1 or more (3 or more for printed parts)",
            );
        }
        if self.air_density.is_nan() || self.air_density <= 0.0 {
            return bad(
                "air density",
                self.air_density,
                "use a positive density in kg/m^3 (1.225 at sea level)",
            );
        }
        Ok(())
    }

    /// Thrust per blade, N, for a rotor of tip radius `tip` (mm).
    pub fn thrust_per_blade(&self, tip: f64) -> f64 {
        self.thrust.unwrap_or_else(|| {
            let r = tip * 1e-3;
            0.5 * self.air_density
                * std::f64::consts::PI
                * r
                * r
                * self.wind
                * self.wind
                * self.thrust_coefficient
                / self.blades.max(1) as f64
        })
    }
}

/// Bending moment at `r` (N mm) of a load `t` (N) spread over `[r0, r1]` (mm).
fn moment(spread: ThrustSpread, t: f64, r0: f64, r1: f64, r: f64) -> f64 {
    let r = r.clamp(r0, r1);
    match spread {
        ThrustSpread::Uniform => t / (r1 - r0) * (r1 - r).powi(2) / 2.0,
        ThrustSpread::Annulus => {
            // q(s) = k s with integral_r0^r1 q = t.
            let k = 2.0 * t / (r1 * r1 - r0 * r0);
            k * ((r1.powi(3) - r.powi(3)) / 3.0 - r * (r1 * r1 - r * r) / 2.0)
        }
    }
}

impl StressTable {
    /// Estimates stresses of one blade `mesh` (closed, outward, blade frame) at `radii`
    /// (mm, sorted here; see [`span_radii`]); the root is clamped at the smallest radius.
    pub fn estimate(
        mesh: &TriMesh,
        radii: &[f64],
        material: &Material,
        fill: Fill,
        load: &LoadCase,
    ) -> Result<StressTable, StressError> {
        load.validate()?;
        let radii = sorted_radii(radii);
        let filled = filled_mass(mesh, fill)?;
        let bb = mesh.bounding_box().ok_or(StressError::NoVolume)?;
        let loading = Loading::new(material, filled.fraction, load, bb.min.z, bb.max.z);
        let mut rows = Vec::with_capacity(radii.len());
        let mut curvature = Vec::with_capacity(radii.len());
        for &r in &radii {
            let cut = loading.cut(mesh, r, material, fill)?;
            curvature.push(cut.curvature);
            rows.push(cut.row);
        }
        add_deflections(&mut rows, &radii, &curvature);
        let (critical, min_sf) = weakest(&rows, loading.r0);
        Ok(StressTable {
            material: material.clone(),
            fill,
            load: load.clone(),
            thrust_per_blade: loading.thrust,
            mass: filled.solid.volume * material.density_g_mm3() * filled.fraction,
            tip_deflection: rows.last().map_or(0.0, |r| r.deflection),
            passes: min_sf >= load.safety_factor,
            min_safety_factor: min_sf,
            critical_radius: critical,
            rows,
            assumptions: assumptions(material, fill, &filled, load, loading.r1),
            cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
        })
    }
}

/// Radius and value of the smallest safety factor (the first of equals; `r0` and
/// infinity without rows).
fn weakest(rows: &[StressRow], r0: f64) -> (f64, f64) {
    rows.iter()
        .map(|r| (r.section.radius, r.safety_factor))
        .fold((r0, f64::INFINITY), |a, b| if b.1 < a.1 { b } else { a })
}

/// The finite radii, sorted, each once.
fn sorted_radii(radii: &[f64]) -> Vec<f64> {
    let mut radii = radii.to_vec();
    radii.retain(|r| r.is_finite());
    radii.sort_by(f64::total_cmp);
    radii.dedup();
    radii
}

/// The part's mass properties with the fill model.
fn filled_mass(mesh: &TriMesh, fill: Fill) -> Result<FilledMass, StressError> {
    FilledMass::of_mesh(mesh, 1.0, fill, &ShellOptions::DEFAULT).map_err(|e| match e {
        ShellError::NoVolume => StressError::NoVolume,
        ShellError::Slice(s) => StressError::Slice(s),
        other => StressError::Shell(other),
    })
}

/// The loads on the blade at the operating point.
struct Loading {
    /// Density with the fill model, kg/mm^3.
    rho: f64,
    /// Angular speed, rad/s.
    omega: f64,
    /// Thrust on this blade, N.
    thrust: f64,
    /// How the thrust is spread along the span.
    spread: ThrustSpread,
    /// Radius of the root end (clamped), mm.
    r0: f64,
    /// Radius of the tip end, mm.
    r1: f64,
}

/// One cut's row and the flapwise curvature there (1/mm).
struct Cut {
    row: StressRow,
    curvature: f64,
}

impl Loading {
    fn new(material: &Material, fraction: f64, load: &LoadCase, r0: f64, r1: f64) -> Self {
        Loading {
            // kg/mm^3 with the fill model.
            rho: material.density * 1e-6 * fraction,
            omega: load.rpm * std::f64::consts::TAU / 60.0,
            thrust: load.thrust_per_blade(r1),
            spread: load.spread,
            r0,
            r1,
        }
    }

    /// The stresses on the cut at `r`: centrifugal force over the section plus flapwise
    /// bending, at every point of the section's outline.
    fn cut(
        &self,
        mesh: &TriMesh,
        r: f64,
        material: &Material,
        fill: Fill,
    ) -> Result<Cut, StressError> {
        let (rho, omega) = (self.rho, self.omega);
        let slice = Slice::cut(mesh, r)?;
        let sec = SectionProps::of_slice(&slice).ok_or(StressError::EmptySection(r))?;
        let out = Outboard::of_mesh(mesh, r);
        let sfill = fill.fraction_of_section(&slice.loops);
        // kg mm/s^2 = 1e-3 N.
        let force = rho * omega * omega * out.moment * 1e-3;
        let m = moment(self.spread, self.thrust, self.r0, self.r1, r);
        let sc = force / sec.area / sfill;
        let (b, c) = sec.flap_bending(m);
        let (mut hi, mut lo) = (sc, sc);
        for p in slice.points() {
            let s = sc + (b * (p.x - sec.cx) + c * (p.y - sec.cy)) / sfill;
            hi = hi.max(s);
            lo = lo.min(s);
        }
        let worst = hi.abs().max(lo.abs());
        let sf = if worst > 0.0 {
            material.strength / worst
        } else {
            f64::INFINITY
        };
        let curvature = m / (material.modulus * sfill * sec.flap_stiffness());
        Ok(Cut {
            row: StressRow {
                section: sec,
                fill: sfill,
                outboard_mass: out.volume * rho * 1e3,
                centrifugal_force: force,
                centrifugal_stress: sc,
                bending_moment: m,
                max_tension: hi.max(0.0),
                max_compression: (-lo).max(0.0),
                safety_factor: sf,
                deflection: 0.0,
            },
            curvature,
        })
    }
}

/// Each row's deflection: the curvature integrated twice by the trapezoidal rule,
/// clamped at the first radius (slope and deflection zero there).
fn add_deflections(rows: &mut [StressRow], radii: &[f64], curvature: &[f64]) {
    let (mut slope, mut w) = (0.0, 0.0);
    for i in 1..rows.len() {
        let h = radii[i] - radii[i - 1];
        let new_slope = slope + 0.5 * h * (curvature[i] + curvature[i - 1]);
        w += 0.5 * h * (slope + new_slope);
        slope = new_slope;
        rows[i].deflection = w;
    }
}

/// The estimate's assumptions, in words; `r1` is the tip radius, mm.
fn assumptions(
    material: &Material,
    fill: Fill,
    filled: &FilledMass,
    load: &LoadCase,
    r1: f64,
) -> Vec<String> {
    vec![
        format!(
            "material: {} - {}",
            material.name, material.note
        ),
        format!(
            "fill: {:.2} mm walls, {:.0} % infill; shell = material within the wall of the surface (inward offset of slices every {:.2} mm); material fraction {:.3} of the solid; mass spread uniformly for the centrifugal load",
            fill.wall,
            fill.infill * 100.0,
            filled.step,
            filled.fraction
        ),
        "section stresses divided by the section's material fraction (its inward offset by the wall filled to the infill, the rest solid): conservative for bending".into(),
        format!(
            "centrifugal load: spanwise component m omega^2 z of the part outboard of each section, at {} rpm",
            load.rpm
        ),
        match load.thrust {
            Some(t) => format!("thrust: {t} N per blade, given"),
            None => format!(
                "thrust: momentum theory T = 0.5 rho A V^2 C_T with rho = {} kg/m^3, A = pi R^2 (R = {:.1} mm, hub share included: conservative), V = {} m/s, C_T = {:.4}, shared by {} blades",
                load.air_density, r1, load.wind, load.thrust_coefficient, load.blades
            ),
        },
        match load.spread {
            ThrustSpread::Annulus => "thrust spread along the span in proportion to the annulus area (q ~ r)".into(),
            ThrustSpread::Uniform => "thrust spread uniformly along the span".into(),
        },
        "flapwise bending only (about the x axis), plane sections stay plane; root clamped at the first section".into(),
        "tip deflection: cantilever, M/(E I) integrated twice by the trapezoidal rule".into(),
    ]
}
