//! A blade-element momentum (BEM) estimate of the power coefficient of a drafted blade at
//! its design point, so the cost of linearising chord and twist can be seen.
//!
//! Per annulus the flow angle `phi` solves Ning's one-variable residual (S. A. Ning, "A
//! simple solution method for the blade element momentum equations with guaranteed
//! convergence", *Wind Energy* 17, 2014):
//!
//! ```text
//! R(phi) = sin(phi) / (1 - a) - cos(phi) / (lambda_r (1 + a')) = 0
//! k  = sigma' c_n / (4 F sin^2 phi),     a  = k / (1 + k)   (Buhl's correction above k = 2/3)
//! k' = sigma' c_t / (4 F sin phi cos phi), a' = k' / (1 - k')
//! c_n = Cl cos phi + Cd sin phi,  c_t = Cl sin phi - Cd cos phi,  sigma' = B c / (2 pi r)
//! ```
//!
//! bracketed on `0 < phi <= pi/2` and solved by bisection. The section is modelled
//! simply: `Cl = Cl_d + 2 pi (alpha - alpha_d)` (thin-airfoil lift slope) up to the stall
//! angle, constant above it; `Cd = Cl_d / (L/D)` constant (0 without a lift-to-drag
//! ratio). Power: `C_P = (lambda / (pi R^3)) int B c c_t (1 - a)^2 r / sin^2(phi) dr`
//! (trapezoid rule). This is a rough estimate for comparing drafts, not a performance
//! prediction: real polars, Reynolds number and three-dimensional effects differ.

use std::f64::consts::{FRAC_PI_2, PI};

/// The blade and operating point the estimate needs. Lengths in one unit (mm), angles in
/// radians.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BemInput {
    /// Blade count.
    pub blades: u32,
    /// Tip radius.
    pub tip_radius: f64,
    /// Hub radius, where the blade starts.
    pub hub_radius: f64,
    /// Tip speed ratio.
    pub tsr: f64,
    /// Design lift coefficient.
    pub cl_design: f64,
    /// Design angle of attack, radians.
    pub alpha_design: f64,
    /// Stall angle of attack, radians; Cl stays at its value there above it.
    pub alpha_stall: f64,
    /// Drag coefficient (constant).
    pub cd: f64,
    /// Apply Prandtl's tip-loss factor in the momentum balance.
    pub tip_loss: bool,
    /// Annuli in the integration (default [`DEFAULT_ANNULI`]).
    pub annuli: usize,
}

/// Default number of annuli of [`power_coefficient`].
pub const DEFAULT_ANNULI: usize = 400;

/// The solved flow at one radius.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AnnulusFlow {
    /// Flow angle, radians.
    pub phi: f64,
    /// Axial induction factor.
    pub a: f64,
    /// Tangential induction factor.
    pub a_prime: f64,
    /// Angle of attack, radians.
    pub alpha: f64,
    /// Tangential force coefficient of the section.
    pub ct: f64,
}

fn lift(input: &BemInput, alpha: f64) -> f64 {
    input.cl_design + 2.0 * PI * (alpha.min(input.alpha_stall) - input.alpha_design)
}

/// Solves the BEM equations at radius `r` for a section of `chord` and `twist` (radians).
/// `None` where no flow angle in `(0, pi/2]` balances them (or the tip-loss factor is 0).
pub fn solve_annulus(input: &BemInput, r: f64, chord: f64, twist: f64) -> Option<AnnulusFlow> {
    let b = f64::from(input.blades);
    let lr = input.tsr * r / input.tip_radius;
    let sigma = b * chord / (2.0 * PI * r);
    if !(lr > 0.0 && sigma > 0.0 && sigma.is_finite()) {
        return None;
    }
    let flow = |phi: f64| -> Option<(f64, AnnulusFlow)> {
        let (s, c) = phi.sin_cos();
        let f = if input.tip_loss {
            super::optimum::prandtl_tip_loss(input.blades, r, input.tip_radius, phi)
        } else {
            1.0
        };
        if f < 1e-9 {
            return None;
        }
        let alpha = phi - twist;
        let cl = lift(input, alpha);
        let cn = cl * c + input.cd * s;
        let ct = cl * s - input.cd * c;
        let k = sigma * cn / (4.0 * f * s * s);
        let a = if k <= 2.0 / 3.0 {
            k / (1.0 + k)
        } else {
            // Buhl's high-induction correction, as arranged by Ning (2014).
            let g1 = 2.0 * f * k - (10.0 / 9.0 - f);
            let g2 = (2.0 * f * k - f * (4.0 / 3.0 - f)).max(0.0);
            let g3 = 2.0 * f * k - (25.0 / 9.0 - 2.0 * f);
            if g3.abs() < 1e-6 {
                1.0 - 1.0 / (2.0 * g2.sqrt())
            } else {
                (g1 - g2.sqrt()) / g3
            }
        };
        let kp = sigma * ct / (4.0 * f * s * c);
        let ap = kp / (1.0 - kp);
        // cos(phi) / (lambda_r (1 + a')) with 1 / (1 + a') = 1 - k', which stays finite
        // as phi -> pi/2.
        let res = s / (1.0 - a) - c * (1.0 - kp) / lr;
        res.is_finite().then_some((
            res,
            AnnulusFlow {
                phi,
                a,
                a_prime: ap,
                alpha,
                ct,
            },
        ))
    };
    let (mut lo, mut hi) = (1e-6, FRAC_PI_2);
    let (mut r_lo, _) = flow(lo)?;
    let (r_hi, _) = flow(hi)?;
    if r_lo * r_hi > 0.0 {
        return None;
    }
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        let (r_mid, _) = flow(mid)?;
        if (r_mid < 0.0) == (r_lo < 0.0) {
            lo = mid;
            r_lo = r_mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-13 {
            break;
        }
    }
    flow(0.5 * (lo + hi)).map(|(_, f)| f)
}

/// Power coefficient of the blade whose chord and twist (radians) at radius `r` are given
/// by `blade(r)`, from hub to tip. Annuli where the equations have no solution count as
/// producing nothing; their number is returned beside the estimate.
pub fn power_coefficient(input: &BemInput, blade: impl Fn(f64) -> (f64, f64)) -> (f64, usize) {
    let n = input.annuli.max(2);
    let (h0, r_tip) = (input.hub_radius, input.tip_radius);
    let dr = (r_tip - h0) / n as f64;
    let b = f64::from(input.blades);
    let mut sum = 0.0;
    let mut failed = 0;
    for i in 0..=n {
        let r = h0 + dr * i as f64;
        let (chord, twist) = blade(r);
        let value = match solve_annulus(input, r, chord, twist) {
            Some(f) => {
                let s = f.phi.sin();
                b * chord * f.ct * (1.0 - f.a).powi(2) * r / (s * s)
            }
            None => {
                // At the tip with tip loss F = 0 there is no load: not a failure.
                if r < r_tip {
                    failed += 1;
                }
                0.0
            }
        };
        let w = if i == 0 || i == n { 0.5 } else { 1.0 };
        sum += w * value * dr;
    }
    (input.tsr / (PI * r_tip.powi(3)) * sum, failed)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::draft::optimum::{glauert_chord, glauert_flow_angle};

    #[test]
    fn optimum_annulus_has_the_optimum_inductions() {
        // Manwell, McGowan & Rogers, *Wind Energy Explained*, 2nd ed., section 3.11 (from
        // memory): on the optimum rotor a' = (1 - 3a) / (4a - 1) and the flow angle is
        // (2/3) atan(1 / lambda_r).
        let input = BemInput {
            blades: 3,
            tip_radius: 1.0,
            hub_radius: 0.1,
            tsr: 6.0,
            cl_design: 1.0,
            alpha_design: 0.1,
            alpha_stall: 0.25,
            cd: 0.0,
            tip_loss: false,
            annuli: DEFAULT_ANNULI,
        };
        for r in [0.2, 0.5, 0.9] {
            let phi = glauert_flow_angle(6.0 * r);
            let f = solve_annulus(&input, r, glauert_chord(r, phi, 3, 1.0), phi - 0.1).unwrap();
            assert!((f.phi - phi).abs() < 1e-9, "{} vs {phi}", f.phi);
            let ap = (1.0 - 3.0 * f.a) / (4.0 * f.a - 1.0);
            assert!((f.a_prime - ap).abs() < 1e-8, "{} vs {ap}", f.a_prime);
            assert!((f.alpha - 0.1).abs() < 1e-9);
        }
    }
}
