//! Normal and oblique shocks.
//!
//! Calorically perfect gas: the Rankine-Hugoniot closed forms. Thermally
//! perfect gas: mass, momentum and energy conservation solved for the density
//! ratio `x = rho1/rho2` with the gas's `h(T)`; the trivial root `x = 1` is
//! excluded by bracketing below the perfect-gas estimate's neighbourhood.
//! Oblique shocks apply the normal shock to the normal velocity component and
//! find the wave angle from `tan(beta - theta) = x tan(beta)` (the closed
//! theta-beta-M relation for a perfect gas); the largest deflection comes
//! from a golden-section search and splits the weak and strong roots.

use super::isentropic::FlowState;
use super::{FlowError, solve};
use crate::gas::{Gas, Thermo};
use std::f64::consts::FRAC_PI_2;

/// Rankine-Hugoniot closed forms (calorically perfect gas).
pub mod closed {
    /// Downstream Mach number.
    pub fn m2(m1: f64, g: f64) -> f64 {
        ((1.0 + 0.5 * (g - 1.0) * m1 * m1) / (g * m1 * m1 - 0.5 * (g - 1.0))).sqrt()
    }
    /// Static pressure ratio p2/p1.
    pub fn p2_p1(m1: f64, g: f64) -> f64 {
        1.0 + 2.0 * g / (g + 1.0) * (m1 * m1 - 1.0)
    }
    /// Density ratio rho2/rho1.
    pub fn rho2_rho1(m1: f64, g: f64) -> f64 {
        (g + 1.0) * m1 * m1 / ((g - 1.0) * m1 * m1 + 2.0)
    }
    /// Static temperature ratio T2/T1.
    pub fn t2_t1(m1: f64, g: f64) -> f64 {
        p2_p1(m1, g) / rho2_rho1(m1, g)
    }
    /// Total pressure ratio pt2/pt1.
    pub fn pt2_pt1(m1: f64, g: f64) -> f64 {
        rho2_rho1(m1, g).powf(g / (g - 1.0)) * (1.0 / p2_p1(m1, g)).powf(1.0 / (g - 1.0))
    }
    /// Deflection angle for wave angle `beta` (rad), the theta-beta-M relation.
    pub fn deflection(m1: f64, beta: f64, g: f64) -> f64 {
        let s = beta.sin();
        let num = 2.0 / beta.tan() * (m1 * m1 * s * s - 1.0);
        let den = m1 * m1 * (g + (2.0 * beta).cos()) + 2.0;
        (num / den).atan()
    }
}

/// Downstream state of a normal shock.
pub fn normal(gas: &Gas, up: &FlowState) -> Result<FlowState, FlowError> {
    // At Mach 1 exactly the shock has vanished: the state passes unchanged.
    if (up.mach - 1.0).abs() <= 1e-9 {
        return Ok(*up);
    }
    if !(up.mach.is_finite() && up.mach > 1.0) {
        return Err(FlowError::SubsonicShock { mach: up.mach });
    }
    match gas {
        Gas::Perfect(g) => {
            let gm = g.gamma_value();
            let m1 = up.mach;
            let t = up.t * closed::t2_t1(m1, gm);
            let p = up.p * closed::p2_p1(m1, gm);
            let m2 = closed::m2(m1, gm);
            let a = (gm * g.r() * t).sqrt();
            super::finite_state(
                "state after the normal shock",
                FlowState {
                    tt: up.tt,
                    pt: up.pt * closed::pt2_pt1(m1, gm),
                    t,
                    p,
                    rho: p / (g.r() * t),
                    v: m2 * a,
                    a,
                    mach: m2,
                },
            )
        }
        Gas::Thermal(m) => general::normal(m, up)
            .and_then(|s| super::finite_state("state after the normal shock", s)),
    }
}

/// Result of an oblique shock.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Oblique {
    /// Wave angle, rad.
    pub beta: f64,
    /// Downstream state.
    pub down: FlowState,
    /// Largest deflection for this upstream Mach number, rad.
    pub max_deflection: f64,
}

/// Which oblique-shock root.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Strength {
    /// The smaller wave angle (supersonic downstream, usually seen).
    Weak,
    /// The larger wave angle (subsonic downstream).
    Strong,
}

/// An oblique shock turning the flow by `theta` (rad).
pub fn oblique(
    gas: &Gas,
    up: &FlowState,
    theta: f64,
    strength: Strength,
) -> Result<Oblique, FlowError> {
    if !(up.mach.is_finite() && up.mach > 1.0) {
        return Err(FlowError::SubsonicShock { mach: up.mach });
    }
    if !(theta.is_finite() && (0.0..FRAC_PI_2).contains(&theta)) {
        return Err(FlowError::BadInput {
            what: "deflection angle",
            value: theta.to_degrees(),
            why: "it must be at least 0 and below 90 degrees",
        });
    }
    let mu = (1.0 / up.mach).asin();
    let defl = |beta: f64| -> Result<f64, FlowError> {
        match gas {
            Gas::Perfect(g) => Ok(closed::deflection(up.mach, beta, g.gamma_value())),
            Gas::Thermal(m) => {
                let un = up.v * beta.sin();
                if un <= up.a {
                    return Ok(0.0);
                }
                let (_, _, x) = general::jump(m, up.t, up.p, un)?;
                Ok(beta - (x * beta.tan()).atan())
            }
        }
    };
    let lo = mu + 1e-12;
    let hi = FRAC_PI_2 - 1e-12;
    let (beta_max, theta_max) = solve::maximise(defl, lo, hi, 1e-13, 300)?;
    if theta > theta_max {
        return Err(FlowError::Detached {
            deflection_deg: theta.to_degrees(),
            max_deg: theta_max.to_degrees(),
            mach: up.mach,
        });
    }
    let beta = if theta == 0.0 {
        match strength {
            Strength::Weak => mu,
            Strength::Strong => FRAC_PI_2,
        }
    } else {
        let (a, b) = match strength {
            Strength::Weak => (mu, beta_max),
            Strength::Strong => (beta_max, FRAC_PI_2),
        };
        solve::brent(|bt| Ok(defl(bt)? - theta), a, b, 1e-15, 200)
            .map_err(|e| FlowError::from_solve("oblique shock wave angle", e))?
    };
    // Normal component through a normal shock; tangential component unchanged.
    let un = up.v * beta.sin();
    let ut = up.v * beta.cos();
    let normal_up = FlowState {
        v: un,
        mach: un / up.a,
        ..*up
    };
    let down = if normal_up.mach <= 1.0 {
        *up
    } else {
        let dn = normal(gas, &normal_up)?;
        let v = (dn.v * dn.v + ut * ut).sqrt();
        let pt = match gas {
            Gas::Perfect(_) => up.pt * dn.pt / normal_up.pt,
            Gas::Thermal(m) => general::total_pressure(m, up.tt, dn.t, dn.p)?,
        };
        FlowState {
            tt: up.tt,
            pt,
            v,
            mach: v / dn.a,
            ..dn
        }
    };
    Ok(Oblique {
        beta,
        down,
        max_deflection: theta_max,
    })
}

/// General (thermally perfect) shock relations.
pub mod general {
    use super::*;

    /// Normal Mach number above 1 below which a wave is solved in closed
    /// form at the upstream gamma (see [`jump`]).
    pub const WEAK_WAVE: f64 = 2e-5;

    /// Solve the jump conditions for upstream static `t1`, `p1` and normal
    /// velocity `u1`: returns downstream (T2, p2, x = rho1/rho2).
    pub fn jump<G: Thermo + ?Sized>(
        gas: &G,
        t1: f64,
        p1: f64,
        u1: f64,
    ) -> Result<(f64, f64, f64), FlowError> {
        let r = gas.r();
        let s1 = gas.state(t1)?;
        let rho1 = p1 / (r * t1);
        let g1 = s1.cp / (s1.cp - r);
        let m1 = u1 / (g1 * r * t1).sqrt();
        if m1 <= 1.0 {
            return Err(FlowError::SubsonicShock { mach: m1 });
        }
        let mom = rho1 * u1 * u1;
        let t2 = |x: f64| x * (p1 + mom * (1.0 - x)) / (rho1 * r);
        // A wave barely above Mach 1 (an oblique shock's wave angle next
        // to the Mach angle): the jump residual between the shock root and
        // the trivial one at x = 1 is of order (M1 - 1)^3, below round-off,
        // so no bracket can be found. Across so weak a wave the temperature
        // rises by a few parts in 1e5 and gamma by less than 1e-7, so the
        // closed form at the upstream gamma is exact to about 1e-11 in x.
        if m1 < 1.0 + WEAK_WAVE {
            let x = 1.0 / closed::rho2_rho1(m1, g1);
            return Ok((t2(x), p1 + mom * (1.0 - x), x));
        }
        let scale = s1.h.abs().max(0.5 * u1 * u1);
        let f = |x: f64| -> Result<f64, FlowError> {
            Ok((gas.h(t2(x))? - s1.h - 0.5 * u1 * u1 * (1.0 - x * x)) / scale)
        };
        let mut x0 = 1.0 / closed::rho2_rho1(m1, g1);
        // Where T2(x) would exceed the gas data, f is positive anyway
        // (h(T2) > h(Tt)); cap the bracket below that band so no trial
        // leaves the data range.
        let (_, t_max) = gas.range();
        let disc = (p1 + mom).powi(2) - 4.0 * mom * rho1 * r * t_max;
        let cap = if disc > 0.0 && t_max.is_finite() {
            let xa = ((p1 + mom) - disc.sqrt()) / (2.0 * mom);
            let xb = ((p1 + mom) + disc.sqrt()) / (2.0 * mom);
            if x0 > xb {
                1.0
            } else {
                x0 = x0.min(0.9 * xa);
                xa * (1.0 - 1e-12)
            }
        } else {
            1.0
        };
        // Upper end: between the estimate and the trivial root, where f > 0.
        let mut hi = (x0 + 0.5 * (1.0 - x0)).min(cap);
        let mut tries = 0;
        while f(hi)? <= 0.0 {
            if hi >= cap {
                return Err(FlowError::NoSolution {
                    what: "normal shock density ratio",
                });
            }
            hi = (hi + 0.5 * (1.0 - hi)).min(cap);
            tries += 1;
            if tries > 60 {
                return Err(FlowError::NoSolution {
                    what: "normal shock density ratio",
                });
            }
        }
        let mut lo = 0.7 * x0;
        tries = 0;
        loop {
            match f(lo) {
                Ok(v) if v < 0.0 => break,
                Ok(_) => lo *= 0.7,
                Err(_) => lo = 0.5 * (lo + x0),
            }
            tries += 1;
            if tries > 60 {
                return Err(FlowError::NoSolution {
                    what: "normal shock density ratio",
                });
            }
        }
        let x = solve::brent(f, lo, hi, 1e-15, 200)
            .map_err(|e| FlowError::from_solve("normal shock density ratio", e))?;
        Ok((t2(x), p1 + mom * (1.0 - x), x))
    }

    /// Total pressure of a static state on the total temperature `tt`.
    pub fn total_pressure<G: Thermo + ?Sized>(
        gas: &G,
        tt: f64,
        t: f64,
        p: f64,
    ) -> Result<f64, FlowError> {
        Ok(p * ((gas.phi(tt)? - gas.phi(t)?) / gas.r()).exp())
    }

    /// Downstream state of a normal shock, any gas model.
    pub fn normal<G: Thermo + ?Sized>(gas: &G, up: &FlowState) -> Result<FlowState, FlowError> {
        let (t, p, x) = jump(gas, up.t, up.p, up.v)?;
        let r = gas.r();
        let s = gas.state(t)?;
        let a = (s.cp / (s.cp - r) * r * t).sqrt();
        let v = up.v * x;
        Ok(FlowState {
            tt: up.tt,
            pt: total_pressure(gas, up.tt, t, p)?,
            t,
            p,
            rho: p / (r * t),
            v,
            a,
            mach: v / a,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::flow::isentropic;
    use crate::gas::PerfectGas;
    use approx::assert_relative_eq;

    // NACA Report 1135, Table II (normal shock, gamma 1.4), from memory:
    // M1, M2, p2/p1, rho2/rho1, T2/T1, pt2/pt1.
    const NACA_1135_NORMAL: [(f64, f64, f64, f64, f64, f64); 5] = [
        (1.5, 0.70109, 2.4583, 1.8621, 1.3202, 0.92978),
        (2.0, 0.57735, 4.5000, 2.6667, 1.6875, 0.72087),
        (2.5, 0.51299, 7.1250, 3.3333, 2.1375, 0.49902),
        (3.0, 0.47519, 10.333, 3.8571, 2.6790, 0.32834),
        (5.0, 0.41523, 29.000, 5.0000, 5.8000, 0.061716),
    ];

    #[test]
    fn closed_forms_match_naca_1135_table_ii() {
        for (m1, m2, p, rho, t, pt) in NACA_1135_NORMAL {
            assert_relative_eq!(closed::m2(m1, 1.4), m2, max_relative = 5e-5);
            assert_relative_eq!(closed::p2_p1(m1, 1.4), p, max_relative = 5e-5);
            assert_relative_eq!(closed::rho2_rho1(m1, 1.4), rho, max_relative = 5e-5);
            assert_relative_eq!(closed::t2_t1(m1, 1.4), t, max_relative = 5e-5);
            assert_relative_eq!(closed::pt2_pt1(m1, 1.4), pt, max_relative = 5e-5);
        }
    }

    #[test]
    fn general_shock_on_perfect_gas_matches_closed_form() {
        let g = PerfectGas::AIR;
        for m1 in [1.05, 1.5, 2.0, 4.0, 8.0] {
            let up = isentropic::general::from_mach(&g, 600.0, 1e5, m1).unwrap();
            let dn = general::normal(&g, &up).unwrap();
            assert_relative_eq!(dn.mach, closed::m2(m1, 1.4), max_relative = 1e-9);
            assert_relative_eq!(dn.pt / up.pt, closed::pt2_pt1(m1, 1.4), max_relative = 1e-9);
        }
    }

    #[test]
    fn oblique_shock_matches_naca_1135_chart_values() {
        // M 2, deflection 10 deg: weak wave angle 39.31 deg, M2 1.641,
        // p2/p1 1.707 (NACA 1135 oblique-shock charts, from memory).
        let gas = Gas::Perfect(PerfectGas::AIR);
        let up = isentropic::from_mach(&gas, 300.0, 1e5, 2.0).unwrap();
        let ob = oblique(&gas, &up, 10f64.to_radians(), Strength::Weak).unwrap();
        assert_relative_eq!(ob.beta.to_degrees(), 39.31, max_relative = 5e-4);
        assert_relative_eq!(ob.down.mach, 1.641, max_relative = 1e-3);
        assert_relative_eq!(ob.down.p / up.p, 1.707, max_relative = 1e-3);
        // Maximum deflection at M 2 is 22.97 deg (from memory).
        assert_relative_eq!(ob.max_deflection.to_degrees(), 22.97, max_relative = 5e-4);
        let e = oblique(&gas, &up, 40f64.to_radians(), Strength::Weak).unwrap_err();
        assert!(matches!(e, FlowError::Detached { .. }));
    }

    #[test]
    fn subsonic_upstream_is_an_error() {
        let gas = Gas::Perfect(PerfectGas::AIR);
        let up = isentropic::from_mach(&gas, 300.0, 1e5, 0.8).unwrap();
        assert!(matches!(
            normal(&gas, &up),
            Err(FlowError::SubsonicShock { .. })
        ));
    }
}
