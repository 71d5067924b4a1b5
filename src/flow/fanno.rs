//! Fanno line: adiabatic constant-area flow with wall friction.
//!
//! Total enthalpy and mass flux are constant; momentum with the wall shear
//! gives `4f dx/D = 2 (1/M^2 - 1) du / (gamma u)`. The sonic point has the
//! static temperature of Mach 1 on the isentrope of the same total
//! temperature. The friction parameter to reach it, `4fL*/D`, is integrated
//! in static temperature for a thermally perfect gas (no inversion of h).
//! A duct longer than `L*` chokes ([`FlowError::FrictionChoke`]).

use super::isentropic::{self, FlowState};
use super::{FlowError, solve};
use crate::gas::{Gas, Thermo};

/// Closed forms for a calorically perfect gas.
pub mod closed {
    /// 4fL*/D, the friction parameter to reach Mach 1.
    pub fn friction(m: f64, g: f64) -> f64 {
        let m2 = m * m;
        (1.0 - m2) / (g * m2)
            + (g + 1.0) / (2.0 * g) * ((g + 1.0) * m2 / (2.0 + (g - 1.0) * m2)).ln()
    }
    /// T/T*.
    pub fn t_tstar(m: f64, g: f64) -> f64 {
        (g + 1.0) / (2.0 + (g - 1.0) * m * m)
    }
    /// p/p*.
    pub fn p_pstar(m: f64, g: f64) -> f64 {
        t_tstar(m, g).sqrt() / m
    }
    /// pt/pt*.
    pub fn pt_ptstar(m: f64, g: f64) -> f64 {
        ((2.0 + (g - 1.0) * m * m) / (g + 1.0)).powf((g + 1.0) / (2.0 * (g - 1.0))) / m
    }
}

/// 4fL*/D from state `s` to the sonic point of its Fanno line.
pub fn friction_to_sonic(gas: &Gas, s: &FlowState) -> Result<f64, FlowError> {
    if let Gas::Perfect(g) = gas {
        return Ok(closed::friction(s.mach, g.gamma_value()));
    }
    let star = isentropic::from_mach(gas, s.tt, s.pt, 1.0)?;
    let ht = gas.h(s.tt)?;
    let r = gas.r();
    // d(4fL/D) = 2 (1/M^2 - 1)/(gamma u) du and du = -cp dT / u.
    let integrand = |t: f64| -> Result<f64, FlowError> {
        let st = gas.state(t)?;
        let u2 = 2.0 * (ht - st.h);
        let gm = st.cp / (st.cp - r);
        let m2 = u2 / (gm * r * t);
        Ok(2.0 * (1.0 / m2 - 1.0) / gm * st.cp / u2)
    };
    let v = solve::simpson(integrand, star.t, s.t, 400)?;
    Ok(v)
}

/// Ratios to the sonic state of the Fanno line: (4fL*/D, T/T*, p/p*, pt/pt*).
pub fn ratios(gas: &Gas, s: &FlowState) -> Result<[f64; 4], FlowError> {
    if let Gas::Perfect(g) = gas {
        let (m, gm) = (s.mach, g.gamma_value());
        return Ok([
            closed::friction(m, gm),
            closed::t_tstar(m, gm),
            closed::p_pstar(m, gm),
            closed::pt_ptstar(m, gm),
        ]);
    }
    let star = isentropic::from_mach(gas, s.tt, s.pt, 1.0)?;
    // On the Fanno line rho u is constant: p* = rho* R T* with rho* = G / a*.
    let g_flux = s.rho * s.v;
    let p_star = g_flux / star.v * gas.r() * star.t;
    let pt_star = p_star * star.pt / star.p;
    Ok([
        friction_to_sonic(gas, s)?,
        s.t / star.t,
        s.p / p_star,
        s.pt / pt_star,
    ])
}

/// Exit state after a duct of friction parameter `fl = 4 f L / D`.
pub fn friction(gas: &Gas, inlet: &FlowState, fl: f64) -> Result<FlowState, FlowError> {
    super::non_negative("friction parameter 4fL/D", fl)?;
    if inlet.mach <= 0.0 {
        return Err(FlowError::BadInput {
            what: "inlet Mach number",
            value: inlet.mach,
            why: "a Fanno duct needs flow",
        });
    }
    let max = friction_to_sonic(gas, inlet)?;
    if fl > max * (1.0 + 1e-12) {
        return Err(FlowError::FrictionChoke { max, asked: fl });
    }
    let target = max - fl;
    let g_flux = inlet.rho * inlet.v;
    let r = gas.r();
    let subsonic = inlet.mach < 1.0;
    // Find the exit Mach number on the same branch with the remaining 4fL*/D.
    let exit_mach = match gas {
        Gas::Perfect(g) => {
            let gm = g.gamma_value();
            let f = |m: f64| -> Result<f64, FlowError> { Ok(closed::friction(m, gm) - target) };
            if subsonic {
                solve::brent(f, inlet.mach, 1.0, 1e-15, 300)
            } else {
                solve::brent(f, 1.0, inlet.mach, 1e-15, 300)
            }
            .map_err(|e| FlowError::from_solve("Fanno exit Mach number", e))?
        }
        Gas::Thermal(_) => {
            let f = |m: f64| -> Result<f64, FlowError> {
                let s = state_on_line(gas, inlet, g_flux, m)?;
                Ok(friction_to_sonic(gas, &s)? - target)
            };
            if subsonic {
                solve::brent(f, inlet.mach, 1.0, 1e-12, 200)
            } else {
                solve::brent(f, 1.0, inlet.mach, 1e-12, 200)
            }
            .map_err(|e| FlowError::from_solve("Fanno exit Mach number", e))?
        }
    };
    let _ = r;
    state_on_line(gas, inlet, g_flux, exit_mach)
}

/// The state of Mach `m` on the Fanno line through `inlet` (same Tt and flux).
fn state_on_line(gas: &Gas, inlet: &FlowState, flux: f64, m: f64) -> Result<FlowState, FlowError> {
    // Static temperature and velocity depend only on Tt and M; the pressure
    // level follows from the constant mass flux.
    let unit = isentropic::from_mach(gas, inlet.tt, 1.0, m)?;
    let rho = flux / unit.v;
    let p = rho * gas.r() * unit.t;
    let pt = p / unit.p;
    Ok(FlowState { pt, p, rho, ..unit })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::PerfectGas;
    use approx::assert_relative_eq;

    // NACA Report 1135 Fanno-line table (gamma 1.4), from memory:
    // M, 4fL*/D, T/T*, p/p*, pt/pt*.
    const NACA_1135_FANNO: [(f64, f64, f64, f64, f64); 4] = [
        (0.5, 1.0691, 1.1429, 2.1381, 1.3398),
        (0.8, 0.07229, 1.0638, 1.2893, 1.0382),
        (1.5, 0.13605, 0.82759, 0.60648, 1.1762),
        (2.0, 0.30500, 0.66667, 0.40825, 1.6875),
    ];

    #[test]
    fn closed_forms_match_naca_1135() {
        for (m, fl, t, p, pt) in NACA_1135_FANNO {
            assert_relative_eq!(closed::friction(m, 1.4), fl, max_relative = 2e-4);
            assert_relative_eq!(closed::t_tstar(m, 1.4), t, max_relative = 5e-5);
            assert_relative_eq!(closed::p_pstar(m, 1.4), p, max_relative = 5e-5);
            assert_relative_eq!(closed::pt_ptstar(m, 1.4), pt, max_relative = 5e-5);
        }
    }

    #[test]
    fn friction_duct_keeps_tt_and_chokes_past_the_limit() {
        let gas = Gas::Perfect(PerfectGas::AIR);
        let inlet = isentropic::from_mach(&gas, 300.0, 1e5, 0.5).unwrap();
        // 4fL*/D at M 0.5 minus that at M 0.8 (NACA 1135 rows above, from
        // memory): a duct of that length takes M 0.5 to M 0.8.
        let out = friction(&gas, &inlet, 1.0691 - 0.07229).unwrap();
        assert_relative_eq!(out.mach, 0.8, max_relative = 2e-4);
        assert_relative_eq!(out.tt, 300.0, max_relative = 1e-12);
        let e = friction(&gas, &inlet, 1.2).unwrap_err();
        assert!(matches!(e, FlowError::FrictionChoke { .. }));
    }

    #[test]
    fn thermally_perfect_integral_with_constant_cp_matches_closed_form() {
        let cp = PerfectGas::AIR.cp_value();
        let poly = crate::gas::Polynomial::constant_cp(cp, 50.0, 5000.0);
        let mix = crate::gas::Mixture::from_polynomial(poly, 287.05, "constant cp");
        let gas = Gas::Thermal(mix);
        for m in [0.3, 0.7, 1.5, 2.5] {
            let s = isentropic::from_mach(&gas, 600.0, 1e5, m).unwrap();
            let fl = friction_to_sonic(&gas, &s).unwrap();
            assert_relative_eq!(fl, closed::friction(m, 1.4), max_relative = 1e-7);
        }
    }
}
