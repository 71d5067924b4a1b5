//! Compression and expansion with an isentropic or polytropic efficiency.
//!
//! Exact for a thermally perfect gas through the entropy function: the ideal
//! (isentropic) exit satisfies `phi(T2s) = phi(T1) + R ln(PR)`; a polytropic
//! efficiency `e` applies to each small step, `dh = v dp / e` for a
//! compressor, which integrates to `phi(T2) = phi(T1) + R ln(PR) / e`
//! (and `phi(T1) - phi(T2) = e R ln(PR)` for a turbine). Work is the change
//! in total enthalpy per unit mass of the gas that flows.

use super::FlowError;
use crate::gas::{Thermo, invert_h, invert_phi};

/// How an efficiency is stated.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub enum Efficiency {
    /// Isentropic (adiabatic) efficiency over the whole machine.
    Isentropic(f64),
    /// Polytropic (small-stage) efficiency.
    Polytropic(f64),
}

impl Efficiency {
    fn value(self) -> Result<f64, FlowError> {
        let v = match self {
            Efficiency::Isentropic(v) | Efficiency::Polytropic(v) => v,
        };
        if v.is_finite() && v > 0.0 && v <= 1.0 {
            Ok(v)
        } else {
            Err(FlowError::BadInput {
                what: "efficiency",
                value: v,
                why: "an efficiency must lie above 0 and at most 1",
            })
        }
    }
}

/// Outcome of a compression or an expansion.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stage {
    /// Exit total temperature, K.
    pub tt_out: f64,
    /// Ideal (isentropic) exit total temperature, K.
    pub tt_ideal: f64,
    /// Pressure ratio, always at least 1 (pt_out/pt_in for a compressor,
    /// pt_in/pt_out for a turbine).
    pub pressure_ratio: f64,
    /// Specific work, J/kg, positive: absorbed by a compressor, delivered by a turbine.
    pub work: f64,
    /// Isentropic efficiency.
    pub eta_isentropic: f64,
    /// Polytropic efficiency.
    pub eta_polytropic: f64,
}

fn check_ratio(pr: f64) -> Result<f64, FlowError> {
    if pr.is_finite() && (1.0..1e4).contains(&pr) {
        Ok(pr)
    } else {
        Err(FlowError::BadInput {
            what: "pressure ratio",
            value: pr,
            why: "it must be at least 1 and finite",
        })
    }
}

/// Compress from `tt_in` by `pr` with efficiency `eff`.
pub fn compress<G: Thermo + ?Sized>(
    gas: &G,
    tt_in: f64,
    pr: f64,
    eff: Efficiency,
) -> Result<Stage, FlowError> {
    let pr = check_ratio(pr)?;
    let eta = eff.value()?;
    let s1 = gas.state(tt_in)?;
    let r = gas.r();
    let ln_pr = pr.ln();
    let rl = r * ln_pr;
    // Guess through cp at the mean temperature of a first estimate.
    let t_a = tt_in * (ln_pr * r / s1.cp).exp();
    let cp_m = gas.cp(0.5 * (tt_in + t_a)).unwrap_or(s1.cp);
    let t_ideal = invert_phi(gas, s1.phi + rl, tt_in * (ln_pr * r / cp_m).exp())?;
    let h_ideal = gas.h(t_ideal)?;
    // First guesses through the mean cp of the ideal process (a secant):
    // within a fraction of a kelvin, so Newton needs one or two steps.
    let tt_out = match eff {
        Efficiency::Isentropic(_) => invert_h(
            gas,
            s1.h + (h_ideal - s1.h) / eta,
            tt_in + (t_ideal - tt_in) / eta,
        )?,
        Efficiency::Polytropic(_) => invert_phi(gas, s1.phi + rl / eta, t_ideal)?,
    };
    stage_from(gas, &s1, tt_out, pr, ln_pr, t_ideal, h_ideal, true)
}

/// Efficiencies and work of a compression from measured exit temperature.
/// An efficiency above one is returned as computed: the caller decides
/// whether it is a problem (test data can show it).
pub fn measured_compression<G: Thermo + ?Sized>(
    gas: &G,
    tt_in: f64,
    tt_out: f64,
    pr: f64,
) -> Result<Stage, FlowError> {
    stage(gas, tt_in, tt_out, pr, None, true)
}

/// Expand from `tt_in` by `pr` (= pt_in/pt_out) with efficiency `eff`.
pub fn expand<G: Thermo + ?Sized>(
    gas: &G,
    tt_in: f64,
    pr: f64,
    eff: Efficiency,
) -> Result<Stage, FlowError> {
    let pr = check_ratio(pr)?;
    let eta = eff.value()?;
    let s1 = gas.state(tt_in)?;
    let r = gas.r();
    let ln_pr = pr.ln();
    let rl = r * ln_pr;
    let t_a = tt_in * (-ln_pr * r / s1.cp).exp();
    let cp_m = gas.cp(0.5 * (tt_in + t_a)).unwrap_or(s1.cp);
    let t_ideal = invert_phi(gas, s1.phi - rl, tt_in * (-ln_pr * r / cp_m).exp())?;
    let h_ideal = gas.h(t_ideal)?;
    let tt_out = match eff {
        Efficiency::Isentropic(_) => invert_h(
            gas,
            s1.h - eta * (s1.h - h_ideal),
            tt_in - eta * (tt_in - t_ideal),
        )?,
        Efficiency::Polytropic(_) => invert_phi(gas, s1.phi - eta * rl, t_ideal)?,
    };
    stage_from(gas, &s1, tt_out, pr, ln_pr, t_ideal, h_ideal, false)
}

/// Efficiencies and work of an expansion from measured exit temperature.
pub fn measured_expansion<G: Thermo + ?Sized>(
    gas: &G,
    tt_in: f64,
    tt_out: f64,
    pr: f64,
) -> Result<Stage, FlowError> {
    stage(gas, tt_in, tt_out, pr, None, false)
}

/// Work and both efficiencies of a stage between two total temperatures.
/// `t_ideal` is the isentropic exit when the caller already has it.
fn stage<G: Thermo + ?Sized>(
    gas: &G,
    tt_in: f64,
    tt_out: f64,
    pr: f64,
    t_ideal: Option<f64>,
    compression: bool,
) -> Result<Stage, FlowError> {
    let pr = check_ratio(pr)?;
    let s1 = gas.state(tt_in)?;
    let r = gas.r();
    let sense = if compression { 1.0 } else { -1.0 };
    let ln_pr = pr.ln();
    let (t_ideal, h_ideal) = match t_ideal {
        Some(t) => (t, gas.h(t)?),
        None => {
            let t = invert_phi(
                gas,
                s1.phi + sense * r * ln_pr,
                tt_in * (sense * ln_pr * r / s1.cp).exp(),
            )?;
            (t, gas.h(t)?)
        }
    };
    stage_from(gas, &s1, tt_out, pr, ln_pr, t_ideal, h_ideal, compression)
}

/// [`stage`] from what the caller has already evaluated: the inlet state,
/// ln of the pressure ratio, and the ideal exit temperature with its
/// enthalpy (one state less, one enthalpy less, one logarithm less).
#[allow(clippy::too_many_arguments)]
fn stage_from<G: Thermo + ?Sized>(
    gas: &G,
    s1: &crate::gas::ThermoPoint,
    tt_out: f64,
    pr: f64,
    ln_pr: f64,
    t_ideal: f64,
    h_ideal: f64,
    compression: bool,
) -> Result<Stage, FlowError> {
    let s2 = gas.state(tt_out)?;
    let r = gas.r();
    // +1 for a compression (entropy function rises along the isentrope with
    // the pressure), -1 for an expansion.
    let sense = if compression { 1.0 } else { -1.0 };
    let rl = r * ln_pr;
    let ideal_work = sense * (h_ideal - s1.h);
    let work = sense * (s2.h - s1.h);
    if work <= 0.0 && pr > 1.0 {
        return Err(FlowError::BadInput {
            what: "exit total temperature",
            value: tt_out,
            why: if compression {
                "a compressor with pressure rise must raise the total temperature"
            } else {
                "a turbine with pressure drop must lower the total temperature"
            },
        });
    }
    let dphi = sense * (s2.phi - s1.phi);
    let (eta_is, eta_p) = match (pr == 1.0, compression) {
        (true, _) => (1.0, 1.0),
        (false, true) => (ideal_work / work, rl / dphi),
        (false, false) => (work / ideal_work, dphi / rl),
    };
    Ok(Stage {
        tt_out,
        tt_ideal: t_ideal,
        pressure_ratio: pr,
        work,
        eta_isentropic: eta_is,
        eta_polytropic: eta_p,
    })
}

/// Expansion that delivers `work` J/kg at efficiency `eff`: the pressure
/// ratio follows.
pub fn expand_for_work<G: Thermo + ?Sized>(
    gas: &G,
    tt_in: f64,
    work: f64,
    eff: Efficiency,
) -> Result<Stage, FlowError> {
    let eta = eff.value()?;
    super::non_negative("turbine work", work)?;
    let s1 = gas.state(tt_in)?;
    // Guess through cp at the mean temperature of a first estimate.
    let cp_m = gas
        .cp((tt_in - 0.5 * work / s1.cp).max(gas.range().0))
        .unwrap_or(s1.cp);
    let tt_out =
        invert_h(gas, s1.h - work, tt_in - work / cp_m).map_err(|_| FlowError::BadInput {
            what: "turbine work",
            value: work,
            why: "it takes the exit total temperature below the gas data range",
        })?;
    let r = gas.r();
    let (rl, t_ideal) = match eff {
        Efficiency::Isentropic(_) => {
            let h_ideal = s1.h - work / eta;
            // The secant cp of the actual expansion guesses the ideal one.
            let guess = tt_in - (tt_in - tt_out) / eta;
            let t_ideal = invert_h(gas, h_ideal, guess).map_err(|_| FlowError::BadInput {
                what: "turbine work",
                value: work,
                why: "the ideal expansion leaves the gas data range: too much work for this efficiency",
            })?;
            (s1.phi - gas.phi(t_ideal)?, Some((t_ideal, h_ideal)))
        }
        Efficiency::Polytropic(_) => ((s1.phi - gas.phi(tt_out)?) / eta, None),
    };
    let pr = (rl / r).exp();
    match t_ideal {
        // The ideal exit's enthalpy is the inversion's own target.
        Some((t, h)) => stage_from(gas, &s1, tt_out, pr, rl / r, t, h, false),
        None => stage(gas, tt_in, tt_out, pr, None, false),
    }
}

/// Compression that absorbs `work` J/kg at efficiency `eff`.
pub fn compress_for_work<G: Thermo + ?Sized>(
    gas: &G,
    tt_in: f64,
    work: f64,
    eff: Efficiency,
) -> Result<Stage, FlowError> {
    let eta = eff.value()?;
    super::non_negative("compressor work", work)?;
    let s1 = gas.state(tt_in)?;
    let tt_out = invert_h(gas, s1.h + work, tt_in + work / s1.cp)?;
    let s2 = gas.state(tt_out)?;
    let rl = match eff {
        Efficiency::Isentropic(_) => {
            let t_ideal = invert_h(gas, s1.h + work * eta, tt_out)?;
            gas.phi(t_ideal)? - s1.phi
        }
        Efficiency::Polytropic(_) => (s2.phi - s1.phi) * eta,
    };
    let pr = (rl / gas.r()).exp();
    measured_compression(gas, tt_in, tt_out, pr)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::{Mixture, PerfectGas};
    use approx::assert_relative_eq;

    #[test]
    fn perfect_gas_compression_matches_closed_form() {
        // Closed form: Tt2/Tt1 = 1 + (PR^((g-1)/g) - 1)/eta;
        // polytropic: Tt2/Tt1 = PR^((g-1)/(g eta_p)).
        let g = PerfectGas::AIR;
        let s = compress(&g, 288.15, 10.0, Efficiency::Isentropic(0.85)).unwrap();
        let tau = 1.0 + (10f64.powf(0.4 / 1.4) - 1.0) / 0.85;
        assert_relative_eq!(s.tt_out, 288.15 * tau, max_relative = 1e-12);
        let p = compress(&g, 288.15, 10.0, Efficiency::Polytropic(0.9)).unwrap();
        assert_relative_eq!(
            p.tt_out,
            288.15 * 10f64.powf(0.4 / 1.4 / 0.9),
            max_relative = 1e-12
        );
        assert_relative_eq!(p.eta_polytropic, 0.9, max_relative = 1e-12);
        // Isentropic efficiency below polytropic for a compressor (common practice).
        assert!(p.eta_isentropic < 0.9);
    }

    #[test]
    fn thermally_perfect_round_trips() {
        let air = Mixture::dry_air();
        let c = compress(&air, 300.0, 12.0, Efficiency::Polytropic(0.9)).unwrap();
        let back = measured_compression(&air, 300.0, c.tt_out, 12.0).unwrap();
        assert_relative_eq!(back.eta_polytropic, 0.9, max_relative = 1e-10);
        let t = expand(&air, 1500.0, 4.0, Efficiency::Isentropic(0.9)).unwrap();
        let w = expand_for_work(&air, 1500.0, t.work, Efficiency::Isentropic(0.9)).unwrap();
        assert_relative_eq!(w.pressure_ratio, 4.0, max_relative = 1e-10);
        assert!(expand(&air, 1500.0, 4.0, Efficiency::Isentropic(1.2)).is_err());
    }
}
