//! Rayleigh line: frictionless constant-area flow with heat addition or
//! removal (composition frozen).
//!
//! Mass flux `G = rho u` and impulse `I = p + rho u^2` are constant, so the
//! static temperature on the line is `T(u) = (I - G u) u / (G R)`. Total
//! enthalpy `h(T) + u^2/2` peaks where the line touches an isentrope, which
//! is Mach 1 for any frozen ideal gas: heat beyond that peak chokes the duct
//! ([`FlowError::ThermalChoke`], stating the maximum). Subsonic flow stays
//! subsonic and supersonic stays supersonic.

use super::isentropic::{Branch, FlowState};
use super::{FlowError, solve};
use crate::gas::{Gas, Thermo};

/// Closed forms for a calorically perfect gas, ratios to the sonic state.
pub mod closed {
    /// p/p*.
    pub fn p_pstar(m: f64, g: f64) -> f64 {
        (1.0 + g) / (1.0 + g * m * m)
    }
    /// T/T*.
    pub fn t_tstar(m: f64, g: f64) -> f64 {
        let x = m * (1.0 + g) / (1.0 + g * m * m);
        x * x
    }
    /// Tt/Tt*.
    pub fn tt_ttstar(m: f64, g: f64) -> f64 {
        2.0 * (g + 1.0) * m * m * (1.0 + 0.5 * (g - 1.0) * m * m) / (1.0 + g * m * m).powi(2)
    }
    /// pt/pt*.
    pub fn pt_ptstar(m: f64, g: f64) -> f64 {
        p_pstar(m, g) * (2.0 / (g + 1.0) * (1.0 + 0.5 * (g - 1.0) * m * m)).powf(g / (g - 1.0))
    }
    /// V/V* (= rho*/rho).
    pub fn v_vstar(m: f64, g: f64) -> f64 {
        (1.0 + g) * m * m / (1.0 + g * m * m)
    }
}

/// The constants of a Rayleigh line through a state.
struct Line {
    g: f64,
    i: f64,
    r: f64,
}

impl Line {
    fn through<T: Thermo + ?Sized>(gas: &T, s: &FlowState) -> Line {
        let g = s.rho * s.v;
        Line {
            g,
            i: s.p + g * s.v,
            r: gas.r(),
        }
    }
    fn t(&self, u: f64) -> f64 {
        (self.i - self.g * u) * u / (self.g * self.r)
    }
    /// Velocities where T(u) equals `t` (low and high roots).
    fn u_at_t(&self, t: f64) -> (f64, f64) {
        let disc = (self.i * self.i - 4.0 * self.g * self.g * self.r * t).max(0.0);
        let s = disc.sqrt();
        ((self.i - s) / (2.0 * self.g), (self.i + s) / (2.0 * self.g))
    }
    fn state<T: Thermo + ?Sized>(&self, gas: &T, u: f64) -> Result<FlowState, FlowError> {
        let t = self.t(u);
        let st = gas.state(t)?;
        let a = (st.cp / (st.cp - self.r) * self.r * t).sqrt();
        let p = self.i - self.g * u;
        let h0 = st.h + 0.5 * u * u;
        let tt = crate::gas::invert_h(gas, h0, t + 0.5 * u * u / st.cp)?;
        let pt = p * ((gas.phi(tt)? - st.phi) / self.r).exp();
        Ok(FlowState {
            tt,
            pt,
            t,
            p,
            rho: self.g / u,
            v: u,
            a,
            mach: u / a,
        })
    }
    fn ht<T: Thermo + ?Sized>(&self, gas: &T, u: f64) -> Result<f64, FlowError> {
        Ok(gas.h(self.t(u))? + 0.5 * u * u)
    }
    /// The sonic point of the line.
    fn sonic<T: Thermo + ?Sized>(&self, gas: &T) -> Result<f64, FlowError> {
        let (lo_t, _) = gas.range();
        let u_tmax = self.i / (2.0 * self.g);
        let (_, u_hi) = self.u_at_t(lo_t.max(1e-9) * 1.000001);
        let res = |u: f64| -> Result<f64, FlowError> {
            let t = self.t(u);
            let gm = gas.gamma(t)?;
            Ok(u * u / (gm * self.r * t) - 1.0)
        };
        solve::brent(res, u_tmax, u_hi, 1e-15, 200)
            .map_err(|e| FlowError::from_solve("sonic point of the Rayleigh line", e))
    }
}

/// The sonic reference state of the Rayleigh line through `s`.
pub fn sonic_state(gas: &Gas, s: &FlowState) -> Result<FlowState, FlowError> {
    let line = Line::through(gas, s);
    let u = line.sonic(gas)?;
    line.state(gas, u)
}

/// Exit state after adding `q` J/kg (negative removes heat).
pub fn heat(gas: &Gas, inlet: &FlowState, q: f64) -> Result<FlowState, FlowError> {
    if !q.is_finite() {
        return Err(FlowError::BadInput {
            what: "heat added",
            value: q,
            why: "it must be a finite number",
        });
    }
    let line = Line::through(gas, inlet);
    let u_star = line.sonic(gas)?;
    let ht1 = line.ht(gas, inlet.v)?;
    let ht_star = line.ht(gas, u_star)?;
    let target = ht1 + q;
    if target > ht_star * (1.0 + 1e-13) {
        let star = line.state(gas, u_star)?;
        return Err(FlowError::ThermalChoke {
            max_heat: ht_star - ht1,
            max_tt: star.tt,
            heat: q,
        });
    }
    let branch = if inlet.mach < 1.0 {
        Branch::Subsonic
    } else {
        Branch::Supersonic
    };
    let (lo_t, _) = gas.range();
    let (u_lo, u_hi) = line.u_at_t(lo_t.max(1e-9) * 1.000001);
    let f = |u: f64| -> Result<f64, FlowError> { Ok((line.ht(gas, u)? - target) / ht_star.abs()) };
    let (a, b) = match branch {
        Branch::Subsonic => (u_lo.max(inlet.v * 1e-6), u_star),
        Branch::Supersonic => (u_star, u_hi),
    };
    let u = solve::brent(f, a, b, 1e-15, 300).map_err(|e| match e {
        solve::SolveError::Stopped(solve::Failure::NoRoot { .. }) => FlowError::NoSolution {
            what: "Rayleigh exit state (heat removal beyond the gas data range)",
        },
        e => FlowError::from_solve("Rayleigh exit state", e),
    })?;
    line.state(gas, u)
}

/// The state with mass flux `flux`, impulse per area `impulse` (p + rho V^2)
/// and total temperature `tt`, on a branch: a constant-area mixer's exit.
pub fn on_line(
    gas: &Gas,
    flux: f64,
    impulse: f64,
    tt: f64,
    branch: Branch,
) -> Result<FlowState, FlowError> {
    if !(flux > 0.0 && impulse > 0.0 && tt > 0.0) {
        return Err(FlowError::BadInput {
            what: "mixer flux, impulse or total temperature",
            value: flux.min(impulse).min(tt),
            why: "they must be positive",
        });
    }
    let line = Line {
        g: flux,
        i: impulse,
        r: gas.r(),
    };
    let u_star = line.sonic(gas)?;
    let ht_star = line.ht(gas, u_star)?;
    let target = gas.h(tt)?;
    if target > ht_star {
        return Err(FlowError::NoSolution {
            what: "mixed-out state (the streams' momentum and energy cannot fit the area: choked)",
        });
    }
    let (lo_t, _) = gas.range();
    let (u_lo, u_hi) = line.u_at_t(lo_t.max(1e-9) * 1.000001);
    let f = |u: f64| -> Result<f64, FlowError> { Ok((line.ht(gas, u)? - target) / ht_star.abs()) };
    let (a, b) = match branch {
        Branch::Subsonic => (u_lo, u_star),
        Branch::Supersonic => (u_star, u_hi),
    };
    let u = solve::brent(f, a, b, 1e-15, 300)
        .map_err(|e| FlowError::from_solve("mixed-out state", e))?;
    line.state(gas, u)
}

/// Ratios to the sonic state of the line through `s`: (Tt/Tt*, T/T*, p/p*, pt/pt*).
pub fn ratios(gas: &Gas, s: &FlowState) -> Result<[f64; 4], FlowError> {
    if let Gas::Perfect(g) = gas {
        let (m, gm) = (s.mach, g.gamma_value());
        return Ok([
            closed::tt_ttstar(m, gm),
            closed::t_tstar(m, gm),
            closed::p_pstar(m, gm),
            closed::pt_ptstar(m, gm),
        ]);
    }
    let star = sonic_state(gas, s)?;
    Ok([s.tt / star.tt, s.t / star.t, s.p / star.p, s.pt / star.pt])
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::flow::isentropic;
    use crate::gas::PerfectGas;
    use approx::assert_relative_eq;

    // NACA Report 1135, Table (Rayleigh line, gamma 1.4), from memory:
    // M, Tt/Tt*, T/T*, p/p*, pt/pt*.
    const NACA_1135_RAYLEIGH: [(f64, f64, f64, f64, f64); 4] = [
        (0.5, 0.69136, 0.79012, 1.7778, 1.1141),
        (0.8, 0.96395, 1.0255, 1.2658, 1.0193),
        (1.5, 0.90928, 0.75250, 0.57831, 1.1215),
        (2.0, 0.79339, 0.52893, 0.36364, 1.5031),
    ];

    #[test]
    fn closed_forms_match_naca_1135() {
        for (m, tt, t, p, pt) in NACA_1135_RAYLEIGH {
            assert_relative_eq!(closed::tt_ttstar(m, 1.4), tt, max_relative = 5e-5);
            assert_relative_eq!(closed::t_tstar(m, 1.4), t, max_relative = 5e-5);
            assert_relative_eq!(closed::p_pstar(m, 1.4), p, max_relative = 5e-5);
            assert_relative_eq!(closed::pt_ptstar(m, 1.4), pt, max_relative = 5e-5);
        }
    }

    #[test]
    fn general_line_on_perfect_gas_matches_closed_form() {
        let g = PerfectGas::AIR;
        let gas = Gas::Perfect(g);
        let inlet = isentropic::from_mach(&gas, 500.0, 2e5, 0.3).unwrap();
        let line = Line::through(&g, &inlet);
        let u = line.sonic(&g).unwrap();
        let star = line.state(&g, u).unwrap();
        assert_relative_eq!(
            inlet.tt / star.tt,
            closed::tt_ttstar(0.3, 1.4),
            max_relative = 1e-9
        );
        // Heat to double the total temperature, then the closed form exit Mach.
        let q = g.cp_value() * 500.0 * 0.5;
        let out = heat(&gas, &inlet, q).unwrap();
        assert_relative_eq!(out.tt, 750.0, max_relative = 1e-9);
        let want = closed::tt_ttstar(0.3, 1.4) * 1.5;
        assert_relative_eq!(closed::tt_ttstar(out.mach, 1.4), want, max_relative = 1e-9);
    }

    #[test]
    fn too_much_heat_chokes_and_states_the_maximum() {
        let gas = Gas::Perfect(PerfectGas::AIR);
        let inlet = isentropic::from_mach(&gas, 500.0, 2e5, 0.3).unwrap();
        let e = heat(&gas, &inlet, 2.0e6).unwrap_err();
        match e {
            FlowError::ThermalChoke { max_heat, .. } => {
                let cp = PerfectGas::AIR.cp_value();
                let want = cp * 500.0 * (1.0 / closed::tt_ttstar(0.3, 1.4) - 1.0);
                assert_relative_eq!(max_heat, want, max_relative = 1e-9);
            }
            other => panic!("expected thermal choke, got {other:?}"),
        }
    }
}
