//! Isentropic flow: static state from total conditions and back.
//!
//! The general form rests on two facts for a frozen ideal gas: total
//! enthalpy is conserved, `h(Tt) = h(T) + V^2/2`, and an isentropic change
//! obeys `phi(T) - phi(Tt) = R ln(p/pt)`. Sound speed is the frozen one,
//! `a^2 = gamma(T) R T`. Mass flow per unit area `rho V` peaks at Mach 1
//! (for either gas model), which fixes the sonic area and choking.

use super::solve::{self, newton_monotone};
use super::{FlowError, positive};
use crate::gas::{Gas, PerfectGas, Thermo, invert_h, invert_phi};

/// Which root of a double-valued relation: below or above Mach 1.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Branch {
    /// Mach number below one.
    Subsonic,
    /// Mach number above one.
    Supersonic,
}

/// A complete one-dimensional flow state.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FlowState {
    /// Total temperature, K.
    pub tt: f64,
    /// Total pressure, Pa.
    pub pt: f64,
    /// Static temperature, K.
    pub t: f64,
    /// Static pressure, Pa.
    pub p: f64,
    /// Static density, kg/m3.
    pub rho: f64,
    /// Velocity, m/s.
    pub v: f64,
    /// Speed of sound (frozen), m/s.
    pub a: f64,
    /// Mach number.
    pub mach: f64,
}

impl FlowState {
    /// Mass flow per unit area, kg/(s m2).
    pub fn flux(&self) -> f64 {
        self.rho * self.v
    }
    /// Flow function W sqrt(Tt) / (A pt), kg K^0.5 / (s N).
    pub fn flow_function(&self) -> f64 {
        self.flux() * self.tt.sqrt() / self.pt
    }
    /// Dynamic pressure rho V^2 / 2, Pa.
    pub fn dynamic_pressure(&self) -> f64 {
        0.5 * self.rho * self.v * self.v
    }
}

/// Closed forms for a calorically perfect gas (ratios of static to total).
pub mod closed {
    use super::super::solve::newton_monotone;
    use super::super::{FlowError, solve};
    use super::Branch;

    /// T/Tt.
    pub fn t_tt(m: f64, g: f64) -> f64 {
        1.0 / (1.0 + 0.5 * (g - 1.0) * m * m)
    }
    /// p/pt.
    pub fn p_pt(m: f64, g: f64) -> f64 {
        t_tt(m, g).powf(g / (g - 1.0))
    }
    /// rho/rho_t.
    pub fn rho_rhot(m: f64, g: f64) -> f64 {
        t_tt(m, g).powf(1.0 / (g - 1.0))
    }
    /// A/A*, the area ratio to the sonic throat.
    pub fn area_ratio(m: f64, g: f64) -> f64 {
        let e = (g + 1.0) / (2.0 * (g - 1.0));
        (2.0 / (g + 1.0) * (1.0 + 0.5 * (g - 1.0) * m * m)).powf(e) / m
    }
    /// Flow function W sqrt(Tt) / (A pt) for gas constant `r`.
    pub fn flow_function(m: f64, g: f64, r: f64) -> f64 {
        let e = -(g + 1.0) / (2.0 * (g - 1.0));
        (g / r).sqrt() * m * (1.0 + 0.5 * (g - 1.0) * m * m).powf(e)
    }
    /// Mach number from p/pt.
    pub fn mach_from_p_pt(r: f64, g: f64) -> f64 {
        (2.0 / (g - 1.0) * (r.powf(-(g - 1.0) / g) - 1.0))
            .max(0.0)
            .sqrt()
    }
    /// Mach angle, rad (M >= 1).
    pub fn mach_angle(m: f64) -> f64 {
        (1.0 / m).asin()
    }
    /// Prandtl-Meyer function, rad (M >= 1).
    pub fn prandtl_meyer(m: f64, g: f64) -> f64 {
        let k = ((g + 1.0) / (g - 1.0)).sqrt();
        let b = (m * m - 1.0).sqrt();
        k * (b / k).atan() - b.atan()
    }

    /// Mach number from A/A* on a branch (Newton on ln(A/A*) in a bracket).
    pub fn mach_from_area_ratio(ratio: f64, g: f64, branch: Branch) -> Result<f64, FlowError> {
        if !(ratio.is_finite() && ratio >= 1.0) {
            return Err(FlowError::BadInput {
                what: "area ratio A/A*",
                value: ratio,
                why: "it must be at least 1 (the sonic throat is the smallest area)",
            });
        }
        if ratio == 1.0 {
            return Ok(1.0);
        }
        let target = ratio.ln();
        let res = |m: f64| -> Result<(f64, f64), FlowError> {
            let f = area_ratio(m, g).ln() - target;
            let d = (m * m - 1.0) / (m * (1.0 + 0.5 * (g - 1.0) * m * m));
            Ok((f, d))
        };
        let r = match branch {
            Branch::Subsonic => {
                let guess = (1.0 / (ratio * 1.728)).min(0.5);
                newton_monotone(res, 0.0, 1.0, guess, false, 1e-15, 1e-13, 300)
            }
            Branch::Supersonic => {
                let mut hi = 2.0;
                while area_ratio(hi, g) < ratio && hi < 1e6 {
                    hi *= 2.0;
                }
                newton_monotone(res, 1.0, hi, 0.5 * (1.0 + hi), true, 1e-15, 1e-13, 300)
            }
        };
        r.map_err(|e: solve::SolveError<FlowError>| {
            FlowError::from_solve("Mach from area ratio", e)
        })
    }
}

fn check_totals(tt: f64, pt: f64) -> Result<(), FlowError> {
    positive("total temperature", tt)?;
    positive("total pressure", pt)?;
    Ok(())
}

fn check_mach(m: f64) -> Result<f64, FlowError> {
    if m.is_finite() && (0.0..=100.0).contains(&m) {
        Ok(m)
    } else {
        Err(FlowError::BadInput {
            what: "Mach number",
            value: m,
            why: "it must lie between 0 and 100",
        })
    }
}

/// Static state from totals and Mach number, any gas.
pub fn from_mach(gas: &Gas, tt: f64, pt: f64, m: f64) -> Result<FlowState, FlowError> {
    match gas {
        Gas::Perfect(g) => perfect_from_mach(g, tt, pt, m),
        Gas::Thermal(mix) => general::from_mach(mix, tt, pt, m),
    }
}

/// Static state from totals and static pressure, any gas.
pub fn from_pressure(gas: &Gas, tt: f64, pt: f64, p: f64) -> Result<FlowState, FlowError> {
    match gas {
        Gas::Perfect(g) => {
            check_totals(tt, pt)?;
            check_static_pressure(pt, p)?;
            let m = closed::mach_from_p_pt(p / pt, g.gamma_value());
            perfect_from_mach(g, tt, pt, m)
        }
        Gas::Thermal(mix) => general::from_pressure(mix, tt, pt, p),
    }
}

/// Static state from totals and velocity, any gas.
pub fn from_velocity(gas: &Gas, tt: f64, pt: f64, v: f64) -> Result<FlowState, FlowError> {
    general::from_velocity(gas, tt, pt, v)
}

/// Static state from totals, mass flow and area on a branch, any gas.
/// Too little area is [`FlowError::Choked`], stating the maximum flow.
pub fn from_flow(
    gas: &Gas,
    tt: f64,
    pt: f64,
    w: f64,
    area: f64,
    branch: Branch,
) -> Result<FlowState, FlowError> {
    match gas {
        Gas::Perfect(g) => {
            check_totals(tt, pt)?;
            positive("mass flow", w)?;
            positive("area", area)?;
            let gm = g.gamma_value();
            let ff_star = closed::flow_function(1.0, gm, g.r());
            let g_star = ff_star * pt / tt.sqrt();
            let flux = w / area;
            if flux > g_star * (1.0 + 1e-12) {
                return Err(FlowError::Choked {
                    max_flow: g_star * area,
                    flow: w,
                    sonic_area: w / g_star,
                });
            }
            let ratio = (g_star / flux).max(1.0);
            let m = closed::mach_from_area_ratio(ratio, gm, branch)?;
            perfect_from_mach(g, tt, pt, m)
        }
        Gas::Thermal(mix) => general::from_flow(mix, tt, pt, w, area, branch),
    }
}

/// Sonic state (Mach 1) at these totals.
pub fn sonic(gas: &Gas, tt: f64, pt: f64) -> Result<FlowState, FlowError> {
    from_mach(gas, tt, pt, 1.0)
}

/// A/A* at Mach `m` for these totals.
pub fn area_ratio(gas: &Gas, tt: f64, pt: f64, m: f64) -> Result<f64, FlowError> {
    match gas {
        Gas::Perfect(g) => {
            check_mach(m)?;
            Ok(closed::area_ratio(m, g.gamma_value()))
        }
        Gas::Thermal(_) => {
            let s = sonic(gas, tt, pt)?;
            let x = from_mach(gas, tt, pt, m)?;
            Ok(s.flux() / x.flux())
        }
    }
}

/// Totals from a static state and velocity.
pub fn totals(gas: &Gas, t: f64, p: f64, v: f64) -> Result<FlowState, FlowError> {
    general::totals(gas, t, p, v)
}

fn check_static_pressure(pt: f64, p: f64) -> Result<(), FlowError> {
    positive("static pressure", p)?;
    if p > pt * (1.0 + 1e-12) {
        return Err(FlowError::BadInput {
            what: "static pressure",
            value: p,
            why: "static pressure cannot exceed total pressure",
        });
    }
    Ok(())
}

fn perfect_from_mach(g: &PerfectGas, tt: f64, pt: f64, m: f64) -> Result<FlowState, FlowError> {
    check_totals(tt, pt)?;
    let m = check_mach(m)?;
    let gm = g.gamma_value();
    let t = tt * closed::t_tt(m, gm);
    let p = pt * closed::p_pt(m, gm);
    let a = (gm * g.r() * t).sqrt();
    Ok(FlowState {
        tt,
        pt,
        t,
        p,
        rho: p / (g.r() * t),
        v: m * a,
        a,
        mach: m,
    })
}

/// Prandtl-Meyer angle at Mach `m`, rad, any gas (`tt` fixes the
/// thermally perfect isentrope).
pub fn prandtl_meyer(gas: &Gas, tt: f64, m: f64) -> Result<f64, FlowError> {
    if !(m.is_finite() && m >= 1.0) {
        return Err(FlowError::BadInput {
            what: "Mach number",
            value: m,
            why: "the Prandtl-Meyer function needs Mach 1 or above",
        });
    }
    match gas {
        Gas::Perfect(g) => Ok(closed::prandtl_meyer(m, g.gamma_value())),
        Gas::Thermal(mix) => general::prandtl_meyer(mix, tt, m),
    }
}

/// Mach number for a Prandtl-Meyer angle (rad), any gas.
pub fn mach_from_prandtl_meyer(gas: &Gas, tt: f64, nu: f64) -> Result<f64, FlowError> {
    super::non_negative("Prandtl-Meyer angle", nu)?;
    if let Gas::Perfect(g) = gas {
        let gm = g.gamma_value();
        let nu_max = 0.5 * std::f64::consts::PI * (((gm + 1.0) / (gm - 1.0)).sqrt() - 1.0);
        if nu >= nu_max {
            return Err(FlowError::BadInput {
                what: "Prandtl-Meyer angle",
                value: nu,
                why: "it exceeds the maximum turning of an expansion to vacuum",
            });
        }
    }
    let mut hi = 2.0;
    while prandtl_meyer(gas, tt, hi)? < nu {
        hi *= 1.5;
        if hi > 100.0 {
            return Err(FlowError::BadInput {
                what: "Prandtl-Meyer angle",
                value: nu,
                why: "it needs a Mach number beyond 100",
            });
        }
    }
    solve::brent(|m| Ok(prandtl_meyer(gas, tt, m)? - nu), 1.0, hi, 1e-14, 200)
        .map_err(|e| FlowError::from_solve("Mach from Prandtl-Meyer angle", e))
}

/// General (thermally perfect) forms, generic over the gas model so they
/// can be checked on a perfect gas against [`closed`].
pub mod general {
    use super::*;

    /// Static state from totals and Mach number.
    pub fn from_mach<G: Thermo + ?Sized>(
        gas: &G,
        tt: f64,
        pt: f64,
        m: f64,
    ) -> Result<FlowState, FlowError> {
        check_totals(tt, pt)?;
        let m = check_mach(m)?;
        let at_t = gas.state(tt)?;
        let r = gas.r();
        let t = if m == 0.0 {
            tt
        } else {
            let gt = at_t.cp / (at_t.cp - r);
            let guess = tt * closed::t_tt(m, gt);
            let scale = 2.0 * at_t.cp * tt;
            let (lo, _) = gas.range();
            // The exact slope, gamma's change with T included, so Newton
            // converges quadratically and a step of 1e-8 T leaves an error
            // near the last bit (the step is taken before returning).
            let res = |t: f64| -> Result<(f64, f64), FlowError> {
                let (cp, h, dcp) = (gas.cp(t)?, gas.h(t)?, gas.dcp(t)?);
                let cv = cp - r;
                let g = cp / cv;
                let dg = -r * dcp / (cv * cv);
                let f = (2.0 * (at_t.h - h) - m * m * g * r * t) / scale;
                let d = (-2.0 * cp - m * m * r * (g + t * dg)) / scale;
                Ok((f, d))
            };
            newton_monotone(res, lo.max(1e-9), tt, guess, false, 1e-8, 1e-12, 200).map_err(
                |e| match e {
                    solve::SolveError::Stopped(solve::Failure::NoRoot { .. }) => {
                        FlowError::NoSolution {
                            what: "static temperature at this Mach number (below the gas data range)",
                        }
                    }
                    e => FlowError::from_solve("static temperature from Mach number", e),
                },
            )?
        };
        finish(gas, tt, pt, at_t.h, at_t.phi, t)
    }

    /// Build the state at static temperature `t` on the isentrope of (tt, pt).
    pub(super) fn finish<G: Thermo + ?Sized>(
        gas: &G,
        tt: f64,
        pt: f64,
        ht: f64,
        phit: f64,
        t: f64,
    ) -> Result<FlowState, FlowError> {
        let s = gas.state(t)?;
        let r = gas.r();
        let p = pt * ((s.phi - phit) / r).exp();
        let a = (s.cp / (s.cp - r) * r * t).sqrt();
        let v = (2.0 * (ht - s.h)).max(0.0).sqrt();
        Ok(FlowState {
            tt,
            pt,
            t,
            p,
            rho: p / (r * t),
            v,
            a,
            mach: v / a,
        })
    }

    /// Static state from totals and static pressure.
    pub fn from_pressure<G: Thermo + ?Sized>(
        gas: &G,
        tt: f64,
        pt: f64,
        p: f64,
    ) -> Result<FlowState, FlowError> {
        check_totals(tt, pt)?;
        check_static_pressure(pt, p)?;
        let at_t = gas.state(tt)?;
        let r = gas.r();
        let gt = at_t.cp / (at_t.cp - r);
        let guess = tt * (p / pt).powf((gt - 1.0) / gt);
        let t = invert_phi(gas, at_t.phi + r * (p / pt).ln(), guess)?;
        finish(gas, tt, pt, at_t.h, at_t.phi, t.min(tt))
    }

    /// Static state from totals and velocity.
    pub fn from_velocity<G: Thermo + ?Sized>(
        gas: &G,
        tt: f64,
        pt: f64,
        v: f64,
    ) -> Result<FlowState, FlowError> {
        check_totals(tt, pt)?;
        crate::flow::non_negative("velocity", v)?;
        let at_t = gas.state(tt)?;
        let t = invert_h(gas, at_t.h - 0.5 * v * v, tt - 0.5 * v * v / at_t.cp)?;
        finish(gas, tt, pt, at_t.h, at_t.phi, t.min(tt))
    }

    /// Totals from static temperature, static pressure and velocity.
    pub fn totals<G: Thermo + ?Sized>(
        gas: &G,
        t: f64,
        p: f64,
        v: f64,
    ) -> Result<FlowState, FlowError> {
        positive("static temperature", t)?;
        positive("static pressure", p)?;
        crate::flow::non_negative("velocity", v)?;
        let s = gas.state(t)?;
        let r = gas.r();
        // At rest the totals are the statics, exactly (a test stand's free
        // stream): no inversion.
        let (tt, pt) = if v == 0.0 {
            (t, p)
        } else {
            let tt = invert_h(gas, s.h + 0.5 * v * v, t + 0.5 * v * v / s.cp)?;
            let st = gas.state(tt)?;
            (tt, p * ((st.phi - s.phi) / r).exp())
        };
        let a = (s.cp / (s.cp - r) * r * t).sqrt();
        Ok(FlowState {
            tt,
            pt,
            t,
            p,
            rho: p / (r * t),
            v,
            a,
            mach: v / a,
        })
    }

    /// Static state from totals, mass flow and area on a branch.
    pub fn from_flow<G: Thermo + ?Sized>(
        gas: &G,
        tt: f64,
        pt: f64,
        w: f64,
        area: f64,
        branch: Branch,
    ) -> Result<FlowState, FlowError> {
        check_totals(tt, pt)?;
        positive("mass flow", w)?;
        positive("area", area)?;
        // The sonic state bounds the flux; when it lies below the gas data
        // (a cold total temperature), the coldest state in range does, and
        // only the subsonic branch exists in range.
        let at_t = gas.state(tt)?;
        let (t_lo, _) = gas.range();
        let star = match from_mach(gas, tt, pt, 1.0) {
            Ok(s) => s,
            Err(FlowError::NoSolution { .. }) if branch == Branch::Subsonic => {
                finish(gas, tt, pt, at_t.h, at_t.phi, t_lo)?
            }
            Err(e) => return Err(e),
        };
        let g_star = star.flux();
        let flux = w / area;
        if flux > g_star * (1.0 + 1e-10) {
            return Err(FlowError::Choked {
                max_flow: g_star * area,
                flow: w,
                sonic_area: w / g_star,
            });
        }
        if flux >= g_star {
            return Ok(star);
        }
        let r = gas.r();
        let gt = at_t.cp / (at_t.cp - r);
        let m0 = closed::mach_from_area_ratio(g_star / flux, gt, branch).unwrap_or(0.5);
        let ln_target = flux.ln();
        let res = |t: f64| -> Result<(f64, f64), FlowError> {
            let s = gas.state(t)?;
            let p = pt * ((s.phi - at_t.phi) / r).exp();
            let v2 = (2.0 * (at_t.h - s.h)).max(1e-300);
            let lng = (p / (r * t)).ln() + 0.5 * v2.ln();
            let g = s.cp / (s.cp - r);
            let d = 1.0 / ((g - 1.0) * t) - s.cp / v2;
            Ok((lng - ln_target, d))
        };
        let (lo, _) = gas.range();
        let t = match branch {
            Branch::Subsonic => {
                let guess = (tt * closed::t_tt(m0, gt)).clamp(star.t, tt);
                newton_monotone(res, star.t, tt, guess, false, 1e-14, 1e-12, 300)
            }
            Branch::Supersonic => {
                let guess = tt * closed::t_tt(m0, gt);
                newton_monotone(res, lo.max(1e-9), star.t, guess, true, 1e-14, 1e-12, 300)
            }
        }
        .map_err(|e| FlowError::from_solve("Mach number from mass flow and area", e))?;
        finish(gas, tt, pt, at_t.h, at_t.phi, t)
    }

    /// Prandtl-Meyer angle by integrating d(nu) = sqrt(M^2 - 1) dV/V along
    /// the isentrope of total temperature `tt`, rad.
    pub fn prandtl_meyer<G: Thermo + ?Sized>(gas: &G, tt: f64, m: f64) -> Result<f64, FlowError> {
        if m <= 1.0 {
            return Ok(0.0);
        }
        let star = from_mach(gas, tt, 1.0, 1.0)?;
        let end = from_mach(gas, tt, 1.0, m)?;
        let ht = gas.h(tt)?;
        let r = gas.r();
        // T = T* - (T* - T_end) s^2 removes the square-root behaviour at M = 1.
        let span = star.t - end.t;
        let integrand = |s: f64| -> Result<f64, FlowError> {
            if s == 0.0 {
                return Ok(0.0);
            }
            let t = star.t - span * s * s;
            let st = gas.state(t)?;
            let v2 = 2.0 * (ht - st.h);
            let a2 = st.cp / (st.cp - r) * r * t;
            let m2 = v2 / a2;
            Ok((m2 - 1.0).max(0.0).sqrt() * st.cp / v2 * 2.0 * span * s)
        };
        solve::simpson(integrand, 0.0, 1.0, 400)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn thermal_static_state_meets_its_mach_number_to_the_last_bits() {
        // Independent relations: the definition M = V/a with V from the
        // energy equation and the frozen sound speed, and cp' against a
        // central difference of cp.
        use crate::gas::{Composition, Fuel, Thermo};
        let mix = Composition::dry_air()
            .burnt(0.025, Fuel::KEROSENE)
            .unwrap()
            .mixture();
        for t in [250.0, 700.0, 1500.0, 3000.0] {
            let d = 1e-4 * t;
            let fd = (mix.cp(t + d).unwrap() - mix.cp(t - d).unwrap()) / (2.0 * d);
            assert_relative_eq!(mix.dcp(t).unwrap(), fd, max_relative = 1e-6);
        }
        let gas = Gas::Thermal(mix);
        for (tt, m) in [(1450.0, 1.0), (1450.0, 0.3), (2000.0, 2.5), (600.0, 0.8)] {
            let s = from_mach(&gas, tt, 1e6, m).unwrap();
            // V = sqrt(2 (ht - h)) loses digits to cancellation at low Mach
            // (ht/(ht - h) of them, about 150 at M 0.3): 1e-13.
            assert!(
                (s.mach - m).abs() <= 1e-13 * m,
                "M {m} at {tt} K: {}",
                s.mach
            );
        }
    }

    // NACA Report 1135 (Ames Research Staff, 1953), Table I, gamma = 1.4
    // (values from memory, as printed to 5 significant figures):
    // M, p/pt, T/Tt, rho/rho_t, A/A*.
    const NACA_1135_ISENTROPIC: [(f64, f64, f64, f64, f64); 7] = [
        (0.2, 0.97250, 0.99206, 0.98028, 2.9635),
        (0.5, 0.84302, 0.95238, 0.88517, 1.3398),
        (0.8, 0.65602, 0.88652, 0.74000, 1.0382),
        (1.0, 0.52828, 0.83333, 0.63394, 1.0000),
        (1.5, 0.27240, 0.68966, 0.39498, 1.1762),
        (2.0, 0.12780, 0.55556, 0.23005, 1.6875),
        (3.0, 0.027224, 0.35714, 0.076226, 4.2346),
    ];

    #[test]
    fn closed_forms_match_naca_1135_table_i() {
        for (m, p, t, rho, a) in NACA_1135_ISENTROPIC {
            assert_relative_eq!(closed::p_pt(m, 1.4), p, max_relative = 5e-5);
            assert_relative_eq!(closed::t_tt(m, 1.4), t, max_relative = 5e-5);
            assert_relative_eq!(closed::rho_rhot(m, 1.4), rho, max_relative = 5e-5);
            assert_relative_eq!(closed::area_ratio(m, 1.4), a, max_relative = 5e-5);
        }
    }

    #[test]
    fn prandtl_meyer_matches_naca_1135() {
        // NACA 1135 Table I (from memory): nu(2) = 26.380 deg, nu(3) = 49.757 deg;
        // the limit for gamma 1.4 is 130.45 deg.
        assert_relative_eq!(
            closed::prandtl_meyer(2.0, 1.4).to_degrees(),
            26.380,
            max_relative = 5e-5
        );
        assert_relative_eq!(
            closed::prandtl_meyer(3.0, 1.4).to_degrees(),
            49.757,
            max_relative = 5e-5
        );
        let g = Gas::Perfect(PerfectGas::AIR);
        let m = mach_from_prandtl_meyer(&g, 300.0, 26.380f64.to_radians()).unwrap();
        assert_relative_eq!(m, 2.0, max_relative = 1e-4);
    }

    #[test]
    fn general_forms_on_a_perfect_gas_reproduce_closed_forms() {
        let g = PerfectGas::AIR;
        for m in [0.05, 0.5, 1.0, 2.0, 4.5] {
            let s = general::from_mach(&g, 400.0, 2.0e5, m).unwrap();
            assert_relative_eq!(s.t, 400.0 * closed::t_tt(m, 1.4), max_relative = 1e-12);
            assert_relative_eq!(s.p, 2.0e5 * closed::p_pt(m, 1.4), max_relative = 1e-11);
            let nu = general::prandtl_meyer(&g, 400.0, m.max(1.0)).unwrap();
            assert!((nu - closed::prandtl_meyer(m.max(1.0), 1.4)).abs() < 1e-7);
        }
    }

    #[test]
    fn choking_states_the_maximum_flow() {
        let gas = Gas::Perfect(PerfectGas::AIR);
        // Flow function at M 1 for gamma 1.4 and R 287 J/(kg K) is
        // 0.040418 kg K^0.5/(s N) (a common handbook constant, from memory).
        let e = from_flow(&gas, 288.15, 101325.0, 300.0, 1.0, Branch::Subsonic).unwrap_err();
        match e {
            FlowError::Choked { max_flow, .. } => {
                let ff = closed::flow_function(1.0, 1.4, 287.05);
                assert_relative_eq!(
                    max_flow,
                    ff * 101325.0 / 288.15f64.sqrt(),
                    max_relative = 1e-12
                );
                assert!((closed::flow_function(1.0, 1.4, 287.0) - 0.040418).abs() < 1e-6);
            }
            other => panic!("expected choking, got {other:?}"),
        }
    }

    #[test]
    fn thermally_perfect_branches_recover_mach() {
        let gas = Gas::Thermal(crate::gas::Mixture::dry_air());
        for (m, b) in [
            (0.3, Branch::Subsonic),
            (0.95, Branch::Subsonic),
            (1.6, Branch::Supersonic),
        ] {
            let s = from_mach(&gas, 1200.0, 5e5, m).unwrap();
            let area = 10.0 / s.flux();
            let back = from_flow(&gas, 1200.0, 5e5, 10.0, area, b).unwrap();
            assert_relative_eq!(back.mach, m, max_relative = 1e-9);
            let byp = from_pressure(&gas, 1200.0, 5e5, s.p).unwrap();
            assert_relative_eq!(byp.mach, m, max_relative = 1e-9);
        }
    }
}
