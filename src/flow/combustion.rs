//! Combustion energy balance at constant pressure (the pressure loss is the
//! burner's own parameter, applied by the caller).
//!
//! Per kilogram of dry air, with sensible enthalpies `hs(T) = h(T) - h(298.15 K)`
//! and the fuel entering at 298.15 K (its sensible enthalpy neglected):
//!
//! `(1 + f_out + w) hs_out(Tt_out) = (1 + f_in + w) hs_in(Tt_in) + eta (f_out - f_in) LHV`
//!
//! `w` is the water-air ratio. For a fixed temperature the left side is
//! linear in `f_out` (species amounts are linear in the fuel burnt, and so is
//! the mass), so the fuel-air ratio for a target temperature is found exactly
//! from two evaluations, then checked.

use super::FlowError;
use crate::gas::{Composition, Fuel, GasModel, T_REFERENCE, Thermo, invert_h};

/// A burner: fuel, lower heating value and combustion efficiency.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Burner {
    /// The fuel burnt.
    pub fuel: Fuel,
    /// Lower heating value at 298.15 K, J/kg.
    pub lhv: f64,
    /// Combustion efficiency (fraction of the heating value released).
    pub efficiency: f64,
}

impl Burner {
    fn check(&self) -> Result<(), FlowError> {
        if !(self.lhv.is_finite() && self.lhv > 1e6 && self.lhv < 2e8) {
            return Err(FlowError::BadInput {
                what: "fuel lower heating value",
                value: self.lhv,
                why: "expected between 1 and 200 MJ/kg",
            });
        }
        if !(self.efficiency.is_finite() && self.efficiency > 0.0 && self.efficiency <= 1.0) {
            return Err(FlowError::BadInput {
                what: "combustion efficiency",
                value: self.efficiency,
                why: "it must lie above 0 and at most 1",
            });
        }
        Ok(())
    }
}

/// Outcome of a burn.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Burn {
    /// Exit composition.
    pub composition: Composition,
    /// Exit total temperature, K.
    pub tt_out: f64,
    /// Fuel-air ratio added by this burner (kg fuel per kg dry air).
    pub far_added: f64,
}

/// Sensible energy per kg dry air of a composition at `t`.
pub fn sensible_energy(model: &GasModel, c: &Composition, t: f64) -> Result<f64, FlowError> {
    let gas = model.gas(c)?;
    Ok(c.mass_per_kg_air() * gas.sensible_h(t)?)
}

/// Exit temperature for `far_added` fuel burnt in a stream of composition
/// `inlet` at `tt_in`.
pub fn exit_temperature(
    model: &GasModel,
    inlet: &Composition,
    tt_in: f64,
    far_added: f64,
    burner: &Burner,
) -> Result<Burn, FlowError> {
    burner.check()?;
    super::non_negative("fuel-air ratio added", far_added)?;
    let out = inlet.burnt(inlet.far + far_added, burner.fuel)?;
    let e_in = sensible_energy(model, inlet, tt_in)?;
    let target = (e_in + burner.efficiency * far_added * burner.lhv) / out.mass_per_kg_air();
    let gas = model.gas(&out)?;
    let h_ref = gas.h(T_REFERENCE)?;
    let guess = tt_in + burner.efficiency * far_added * burner.lhv / gas.cp(tt_in)?;
    let tt_out = invert_h(&gas, target + h_ref, guess)?;
    Ok(Burn {
        composition: out,
        tt_out,
        far_added,
    })
}

/// Fuel-air ratio needed to reach `tt_out` from `tt_in`.
pub fn far_for_temperature(
    model: &GasModel,
    inlet: &Composition,
    tt_in: f64,
    tt_out: f64,
    burner: &Burner,
) -> Result<Burn, FlowError> {
    burner.check()?;
    if !(tt_out.is_finite() && tt_out > tt_in) {
        return Err(FlowError::BadInput {
            what: "exit total temperature",
            value: tt_out,
            why: "a burner's exit total temperature must exceed its inlet total temperature",
        });
    }
    if let GasModel::Thermal = model {
        // The products' enthalpy per kg of air is linear in the fuel burnt:
        // the energy balance solves in one step from the species'
        // polynomials, no mixture built per trial.
        let (e_in, _) = inlet.sensible_h_per_kg_air(tt_in)?;
        let at_out = Composition {
            fuel: burner.fuel,
            ..*inlet
        };
        let (base, per_far) = at_out.sensible_h_per_kg_air(tt_out)?;
        let df = (e_in - base) / (per_far - burner.efficiency * burner.lhv);
        if !(df.is_finite() && df > 0.0) {
            return Err(FlowError::NoSolution {
                what: "fuel-air ratio for the exit temperature (the fuel cannot reach it)",
            });
        }
        let composition = inlet.burnt(inlet.far + df, burner.fuel)?;
        return Ok(Burn {
            composition,
            tt_out,
            far_added: df,
        });
    }
    let e_in = sensible_energy(model, inlet, tt_in)?;
    let residual = |df: f64| -> Result<f64, FlowError> {
        let c = Composition {
            far: inlet.far + df,
            fuel: burner.fuel,
            ..*inlet
        };
        // Evaluate without the rich check: the line is extrapolated and the
        // root checked afterwards.
        let gas = match model {
            GasModel::Thermal => crate::gas::Gas::Thermal(c.mixture()),
            _ => model.gas(&Composition {
                far: df.max(1e-9),
                ..c
            })?,
        };
        Ok(c.mass_per_kg_air() * gas.sensible_h(tt_out)?
            - e_in
            - burner.efficiency * df * burner.lhv)
    };
    let (a, b) = (1e-3, 2e-2);
    let (ra, rb) = (residual(a)?, residual(b)?);
    let df = a - ra * (b - a) / (rb - ra);
    if !(df.is_finite() && df > 0.0) {
        return Err(FlowError::NoSolution {
            what: "fuel-air ratio for the exit temperature (the fuel cannot reach it)",
        });
    }
    let composition = inlet.burnt(inlet.far + df, burner.fuel)?;
    Ok(Burn {
        composition,
        tt_out,
        far_added: df,
    })
}

/// Combustion efficiency from measured inlet and exit temperatures and fuel
/// burnt (may exceed one with bad data: the caller judges).
pub fn measured_efficiency(
    model: &GasModel,
    inlet: &Composition,
    tt_in: f64,
    tt_out: f64,
    far_added: f64,
    fuel: Fuel,
    lhv: f64,
) -> Result<f64, FlowError> {
    if !(far_added.is_finite() && far_added > 0.0) {
        return Err(FlowError::BadInput {
            what: "fuel-air ratio added",
            value: far_added,
            why: "a burner efficiency needs fuel burnt",
        });
    }
    let out = inlet.burnt(inlet.far + far_added, fuel)?;
    let e_in = sensible_energy(model, inlet, tt_in)?;
    let e_out = sensible_energy(model, &out, tt_out)?;
    Ok((e_out - e_in) / (far_added * lhv))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::PerfectGas;
    use approx::assert_relative_eq;

    #[test]
    fn perfect_gas_balance_matches_hand_algebra() {
        // With one constant cp: (1+f) cp (T4 - Tr) = cp (T3 - Tr) + eta f LHV, so
        // f = cp (T4 - T3) / (eta LHV - cp (T4 - Tr)) (derived by hand).
        let model = GasModel::Perfect {
            cold: PerfectGas::AIR,
            hot: None,
        };
        let b = Burner {
            fuel: Fuel::KEROSENE,
            lhv: 43.0e6,
            efficiency: 0.98,
        };
        let air = Composition::dry_air();
        let burn = far_for_temperature(&model, &air, 700.0, 1500.0, &b).unwrap();
        let cp = PerfectGas::AIR.cp_value();
        let want = cp * 800.0 / (0.98 * 43.0e6 - cp * (1500.0 - T_REFERENCE));
        assert_relative_eq!(burn.far_added, want, max_relative = 1e-12);
        let back = exit_temperature(&model, &air, 700.0, want, &b).unwrap();
        assert_relative_eq!(back.tt_out, 1500.0, max_relative = 1e-12);
    }

    #[test]
    fn thermally_perfect_inverse_and_efficiency_round_trip() {
        let model = GasModel::Thermal;
        let b = Burner {
            fuel: Fuel::KEROSENE,
            lhv: 43.1e6,
            efficiency: 0.995,
        };
        let air = Composition::dry_air();
        let burn = far_for_temperature(&model, &air, 600.0, 1450.0, &b).unwrap();
        let back = exit_temperature(&model, &air, 600.0, burn.far_added, &b).unwrap();
        assert_relative_eq!(back.tt_out, 1450.0, max_relative = 1e-11);
        let eta = measured_efficiency(&model, &air, 600.0, 1450.0, burn.far_added, b.fuel, b.lhv)
            .unwrap();
        assert_relative_eq!(eta, 0.995, max_relative = 1e-11);
        // Stoichiometric limit: too hot a target is a rich-mixture error.
        assert!(far_for_temperature(&model, &air, 600.0, 3500.0, &b).is_err());
    }
}
