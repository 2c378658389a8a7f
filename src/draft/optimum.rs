//! Optimum-rotor formulas for turbines: flow angle and chord of the Betz optimum (no wake
//! rotation) and of the Glauert optimum (with wake rotation), Prandtl's tip-loss factor
//! and the ideal power coefficient.
//!
//! Everything here is pure and dimensionless or in consistent units: radii and chords in
//! any one length unit (spanwright passes millimetres), angles in **radians**.
//! `lambda_r` is the local speed ratio `lambda * r / R`.
//!
//! # The two optimum rotors
//!
//! * **Betz optimum, no wake rotation** (axial induction a = 1/3, tangential a' = 0):
//!   momentum `dT = 4 pi r rho V^2 a (1 - a) dr` equals the blade-element thrust
//!   `dT = B (rho/2) W^2 c Cl cos(phi) dr` with `W = V (1 - a) / sin(phi)` and
//!   `tan(phi) = (1 - a) / lambda_r = 2 / (3 lambda_r)`, which gives
//!   `c = 8 pi r a sin^2(phi) / (B Cl (1 - a) cos(phi)) = 4 pi r sin(phi) tan(phi) / (B Cl)`,
//!   the same as `c = 16 pi R / (9 B Cl lambda sqrt(lambda^2 (r/R)^2 + 4/9))`.
//! * **Glauert optimum with wake rotation** (the closed form often credited to Schmitz):
//!   `phi = (2/3) atan(1 / lambda_r)`, `c = 8 pi r (1 - cos(phi)) / (B Cl)`.
//!
//! In both, the section works at its design angle of attack everywhere, so the twist
//! (angle between chord line and plane of rotation, see [`crate::conventions`]) is
//! `phi - alpha_design`.

use std::f64::consts::PI;

/// The Betz limit 16/27: no turbine in an open flow extracts a larger fraction of the
/// power passing through its disc (Betz, 1920).
pub const BETZ_LIMIT: f64 = 16.0 / 27.0;

/// Default number of Simpson panels used by [`power_coefficient`].
pub const DEFAULT_PANELS: usize = 2000;

/// Flow angle of the Betz optimum without wake rotation, radians:
/// `phi = atan(2 / (3 lambda_r))` (a = 1/3, a' = 0).
pub fn betz_flow_angle(lambda_r: f64) -> f64 {
    (2.0_f64 / 3.0).atan2(lambda_r)
}

/// Chord of the Betz optimum without wake rotation at radius `r` with flow angle `phi`
/// (radians, from [`betz_flow_angle`]): `c = 4 pi r sin(phi) tan(phi) / (B Cl)`,
/// in the unit of `r`.
pub fn betz_chord(r: f64, phi: f64, blades: u32, cl: f64) -> f64 {
    4.0 * PI * r * phi.sin() * phi.tan() / (f64::from(blades) * cl)
}

/// Flow angle of the Glauert optimum with wake rotation, radians:
/// `phi = (2/3) atan(1 / lambda_r)`.
pub fn glauert_flow_angle(lambda_r: f64) -> f64 {
    2.0 / 3.0 * 1.0_f64.atan2(lambda_r)
}

/// Chord of the Glauert optimum with wake rotation at radius `r` with flow angle `phi`
/// (radians, from [`glauert_flow_angle`]): `c = 8 pi r (1 - cos(phi)) / (B Cl)`, in the
/// unit of `r`. Written as `16 pi r sin^2(phi / 2) / (B Cl)` to keep precision at small
/// angles (the two forms are equal).
pub fn glauert_chord(r: f64, phi: f64, blades: u32, cl: f64) -> f64 {
    let s = (0.5 * phi).sin();
    16.0 * PI * r * s * s / (f64::from(blades) * cl)
}

/// Prandtl's tip-loss factor (Glauert, 1935, in the form given by Manwell, McGowan and
/// Rogers, *Wind Energy Explained*, 2nd ed., section 3.8):
/// `F = (2/pi) arccos(exp(-B (R - r) / (2 r sin(phi))))`.
///
/// `F` is 0 at the tip and tends to 1 inboard. Returns 1 for `r <= 0` or `phi <= 0`
/// (no tip effect can be computed there) and 0 for `r >= R`.
pub fn prandtl_tip_loss(blades: u32, r: f64, tip_radius: f64, phi: f64) -> f64 {
    if r >= tip_radius {
        return 0.0;
    }
    let denom = 2.0 * r * phi.sin();
    if r <= 0.0 || denom <= 0.0 {
        return 1.0;
    }
    let f = f64::from(blades) * (tip_radius - r) / denom;
    (2.0 / PI) * (-f).exp().clamp(0.0, 1.0).acos()
}

/// Local solidity `B c / (2 pi r)`: the fraction of the annulus at radius `r` covered by
/// blades. Above 1 the blades overlap in the plane of rotation.
pub fn local_solidity(blades: u32, chord: f64, r: f64) -> f64 {
    f64::from(blades) * chord / (2.0 * PI * r)
}

/// Options of [`power_coefficient`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PowerOptions {
    /// Blade count (used by the tip-loss factor).
    pub blades: u32,
    /// Hub radius over tip radius, in `[0, 1)`.
    pub hub_ratio: f64,
    /// Apply Prandtl's tip-loss factor.
    pub tip_loss: bool,
    /// Drag-to-lift ratio Cd/Cl of the section at its design point (0 = no drag).
    pub drag_ratio: f64,
    /// Simpson panels (even, at least 2; default [`DEFAULT_PANELS`]).
    pub panels: usize,
}

/// Ideal power coefficient of the optimum rotor with wake rotation at tip speed ratio
/// `tsr`, integrated over the annuli between hub and tip (Manwell, McGowan and Rogers,
/// *Wind Energy Explained*, 2nd ed., sections 3.10-3.11):
///
/// ```text
/// C_P = (8 / lambda^2) * integral from lambda_h to lambda of
///       F sin^2(phi) (cos(phi) - lambda_r sin(phi)) (sin(phi) + lambda_r cos(phi))
///         * (1 - (Cd/Cl) cot(phi)) * lambda_r^2  d lambda_r
/// ```
///
/// with `phi = (2/3) atan(1 / lambda_r)`; composite Simpson rule. Local contributions
/// that drag would make negative are kept (they are real losses). The result is below
/// the Betz limit [`BETZ_LIMIT`] for every finite `tsr` and tends to it as `tsr` grows;
/// the caller clamps and explains if rounding ever crosses it.
pub fn power_coefficient(tsr: f64, options: &PowerOptions) -> f64 {
    if tsr.is_nan() || tsr <= 0.0 {
        return 0.0;
    }
    let panels = options.panels.max(2).next_multiple_of(2);
    let lo = options.hub_ratio.clamp(0.0, 1.0) * tsr;
    let h = (tsr - lo) / panels as f64;
    let f = |lr: f64| -> f64 {
        let phi = glauert_flow_angle(lr);
        let (s, c) = phi.sin_cos();
        let loss = if options.tip_loss {
            // r / R = lambda_r / lambda.
            prandtl_tip_loss(options.blades, lr / tsr, 1.0, phi)
        } else {
            1.0
        };
        let drag = if options.drag_ratio > 0.0 && s > 0.0 {
            1.0 - options.drag_ratio * c / s
        } else {
            1.0
        };
        loss * s * s * (c - lr * s) * (s + lr * c) * drag * lr * lr
    };
    let mut sum = f(lo) + f(tsr);
    for i in 1..panels {
        let w = if i % 2 == 1 { 4.0 } else { 2.0 };
        sum += w * f(lo + i as f64 * h);
    }
    8.0 / (tsr * tsr) * sum * h / 3.0
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn glauert_chord_forms_agree() {
        // 1 - cos(x) = 2 sin^2(x/2) (trigonometric identity).
        for lr in [0.1, 1.0, 5.0] {
            let phi = glauert_flow_angle(lr);
            let direct = 8.0 * PI * 100.0 * (1.0 - phi.cos()) / (3.0 * 1.0);
            assert!((glauert_chord(100.0, phi, 3, 1.0) - direct).abs() < 1e-9);
        }
    }

    #[test]
    fn tip_loss_ends() {
        let phi = 0.1;
        assert_eq!(prandtl_tip_loss(3, 1.0, 1.0, phi), 0.0);
        assert!(prandtl_tip_loss(3, 0.3, 1.0, phi) > 0.999);
    }

    #[test]
    fn power_without_hub_is_below_betz() {
        let o = PowerOptions {
            blades: 3,
            hub_ratio: 0.0,
            tip_loss: false,
            drag_ratio: 0.0,
            panels: DEFAULT_PANELS,
        };
        let cp = power_coefficient(7.0, &o);
        assert!(cp > 0.5 && cp < BETZ_LIMIT, "{cp}");
    }
}
