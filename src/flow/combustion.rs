//! Combustion energy balance at constant pressure (the pressure loss is the
//! burner's own parameter, applied by the caller).
//!
//! Per kilogram of dry air, with sensible enthalpies `hs(T) = h(T) - h(298.15 K)`
//! and the fuel bringing its own sensible enthalpy `hs_f` (zero at 298.15 K):
//!
//! `(1 + f_out + w) hs_out(Tt_out) = (1 + f_in + w) hs_in(Tt_in) + (f_out - f_in) (eta LHV + hs_f)`
//!
//! `w` is the water-air ratio. For a fixed temperature the left side is
//! linear in `f_out` (species amounts are linear in the fuel burnt, and so is
//! the mass), so the fuel-air ratio for a target temperature is found exactly
//! from two evaluations, then checked.

use super::FlowError;
use crate::gas::{
    Composition, Fuel, GasModel, MixtureBuilder, SPECIES_COUNT, Species, T_REFERENCE, Thermo,
    equilibrium, invert_h, stoichiometric_far,
};
use crate::roots as solve;

/// The error for an exit temperature the fuel cannot reach: it states the
/// adiabatic flame temperature at the stoichiometric ratio (frozen
/// products).
fn above_flame(
    model: &GasModel,
    inlet: &Composition,
    tt_in: f64,
    tt_out: f64,
    room: f64,
    burner: &Burner,
) -> FlowError {
    match exit_temperature(model, inlet, tt_in, room.max(0.0), burner) {
        Ok(b) => FlowError::AboveFlame {
            asked: tt_out,
            flame: b.tt_out,
            products: "frozen",
        },
        Err(e) => e,
    }
}

/// A burner: fuel, lower heating value and combustion efficiency.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Burner {
    /// The fuel burnt.
    pub fuel: Fuel,
    /// Lower heating value at 298.15 K, J/kg.
    pub lhv: f64,
    /// Combustion efficiency (fraction of the heating value released).
    pub efficiency: f64,
    /// Sensible enthalpy the fuel brings, J per kg of fuel: from 298.15 K
    /// to its entry temperature (zero for fuel at 298.15 K).
    pub fuel_sensible: f64,
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
        if !(self.fuel_sensible.is_finite() && self.fuel_sensible.abs() < 0.5 * self.lhv) {
            return Err(FlowError::BadInput {
                what: "fuel sensible enthalpy",
                value: self.fuel_sensible,
                why: "the fuel's own enthalpy from 298.15 K must be well below its heating value (check the fuel temperature)",
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
    let release = burner.efficiency * burner.lhv + burner.fuel_sensible;
    let target = (e_in + far_added * release) / out.mass_per_kg_air();
    let gas = model.gas(&out)?;
    let h_ref = gas.h(T_REFERENCE)?;
    let guess = tt_in + far_added * release / gas.cp(tt_in)?;
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
        let at_out = inlet.burnt(inlet.far, burner.fuel)?;
        let (base, per_far) = at_out.sensible_h_per_kg_air(tt_out)?;
        let df = (e_in - base) / (per_far - burner.efficiency * burner.lhv - burner.fuel_sensible);
        let room = stoichiometric_far(burner.fuel) - inlet.far;
        if !(df.is_finite() && df > 0.0) || df > room {
            return Err(above_flame(model, inlet, tt_in, tt_out, room, burner));
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
            - df * (burner.efficiency * burner.lhv + burner.fuel_sensible))
    };
    let (a, b) = (1e-3, 2e-2);
    let (ra, rb) = (residual(a)?, residual(b)?);
    let df = a - ra * (b - a) / (rb - ra);
    let room = stoichiometric_far(burner.fuel) - inlet.far;
    if !(df.is_finite() && df > 0.0) || df > room {
        return Err(above_flame(model, inlet, tt_in, tt_out, room, burner));
    }
    let composition = inlet.burnt(inlet.far + df, burner.fuel)?;
    Ok(Burn {
        composition,
        tt_out,
        far_added: df,
    })
}

/// Products in chemical equilibrium (see [`crate::gas::equilibrium`]): the
/// same energy balance in absolute enthalpies, the fuel's formation
/// enthalpy being the one its heating value implies with the same species
/// data, so with complete products it is exactly the sensible form above:
///
/// `H_eq(f_out, Tt_out, pt) = H_in(Tt_in) + f (eta LHV + hs_f + sum_j d_j h_j(298.15 K) / M_f)`
///
/// per kg of dry air, `d_j` the complete products of one kmol of fuel
/// (oxygen negative). Needs the thermally perfect model.
pub struct EquilibriumBurn<'a> {
    /// The stream entering.
    pub inlet: &'a Composition,
    /// Its total temperature, K.
    pub tt_in: f64,
    /// The exit total pressure the products settle at, Pa.
    pub pt: f64,
    /// The burner.
    pub burner: &'a Burner,
}

impl EquilibriumBurn<'_> {
    fn energy_in(&self, df: f64) -> Result<f64, FlowError> {
        let fuel = self.burner.fuel;
        let mut d298 = 0.0;
        for (d, sp) in fuel.products_per_kmol().iter().zip(Species::ALL) {
            if *d != 0.0 {
                d298 += d * sp.molar_h(T_REFERENCE)?;
            }
        }
        let d298 = d298 / fuel.molar_mass();
        let h_in = self.inlet.builder().enthalpy(self.tt_in)?;
        Ok(h_in
            + df * (self.burner.efficiency * self.burner.lhv + self.burner.fuel_sensible + d298))
    }

    /// Equilibrium products of `df` more fuel at `t`: their composition and
    /// absolute enthalpy per kg of dry air.
    fn products(&self, df: f64, t: f64) -> Result<(Composition, f64), FlowError> {
        let mut c = self.inlet.burnt(self.inlet.far + df, self.burner.fuel)?;
        let complete = Composition {
            shift: [0.0; SPECIES_COUNT],
            ..c
        }
        .builder()
        .all_moles();
        let n = equilibrium::solve(&c.builder(), t, self.pt)?;
        let mut b = MixtureBuilder::default();
        for (k, s) in Species::ALL.iter().enumerate() {
            b.add_moles(*s, n[k]);
            c.shift[k] = n[k] - complete[k];
        }
        Ok((c, b.enthalpy(t)?))
    }

    fn check(&self, model: &GasModel) -> Result<(), FlowError> {
        self.burner.check()?;
        if !matches!(model, GasModel::Thermal) {
            return Err(FlowError::BadInput {
                what: "equilibrium products",
                value: 0.0,
                why: "chemical equilibrium needs the thermally perfect gas model",
            });
        }
        super::positive("exit total pressure", self.pt)?;
        Ok(())
    }

    /// Fuel-air ratio that reaches `tt_out`.
    pub fn far_for_temperature(&self, model: &GasModel, tt_out: f64) -> Result<Burn, FlowError> {
        self.check(model)?;
        if !(tt_out.is_finite() && tt_out > self.tt_in) {
            return Err(FlowError::BadInput {
                what: "exit total temperature",
                value: tt_out,
                why: "a burner's exit total temperature must exceed its inlet total temperature",
            });
        }
        let room = stoichiometric_far(self.burner.fuel) - self.inlet.far;
        let residual = |df: f64| -> Result<f64, FlowError> {
            Ok(self.products(df, tt_out)?.1 - self.energy_in(df)?)
        };
        if room.is_nan() || room <= 0.0 || residual(room)? > 0.0 {
            let flame = self.exit_temperature(model, room.max(0.0))?;
            return Err(FlowError::AboveFlame {
                asked: tt_out,
                flame: flame.tt_out,
                products: "equilibrium",
            });
        }
        let df = solve::brent(residual, 0.0, room, 1e-14, 200)
            .map_err(|e| FlowError::from_solve("fuel-air ratio for equilibrium products", e))?;
        let (composition, _) = self.products(df, tt_out)?;
        Ok(Burn {
            composition,
            tt_out,
            far_added: df,
        })
    }

    /// Exit temperature of `df` more fuel burnt.
    pub fn exit_temperature(&self, model: &GasModel, df: f64) -> Result<Burn, FlowError> {
        self.check(model)?;
        super::non_negative("fuel-air ratio added", df)?;
        let target = self.energy_in(df)?;
        let residual = |t: f64| -> Result<f64, FlowError> { Ok(self.products(df, t)?.1 - target) };
        let hi = 5999.0;
        if residual(hi)? < 0.0 {
            return Err(FlowError::NoSolution {
                what: "equilibrium exit temperature (above the 6000 K the species data covers)",
            });
        }
        let lo = self.tt_in.max(200.0);
        let t = solve::brent(residual, lo, hi, 1e-10, 200)
            .map_err(|e| FlowError::from_solve("equilibrium exit temperature", e))?;
        let (composition, _) = self.products(df, t)?;
        Ok(Burn {
            composition,
            tt_out: t,
            far_added: df,
        })
    }

    /// Combustion efficiency from a measured exit temperature.
    pub fn measured_efficiency(
        &self,
        model: &GasModel,
        tt_out: f64,
        df: f64,
    ) -> Result<(f64, Composition), FlowError> {
        self.check(model)?;
        super::positive("fuel-air ratio added", df)?;
        let (c, h_out) = self.products(df, tt_out)?;
        let no_release = EquilibriumBurn {
            burner: &Burner {
                efficiency: 0.0,
                ..*self.burner
            },
            ..*self
        };
        let base = no_release.energy_in(df)?;
        Ok(((h_out - base) / (df * self.burner.lhv), c))
    }
}

/// Combustion efficiency from measured inlet and exit temperatures and fuel
/// burnt (may exceed one with bad data: the caller judges). The burner's
/// own efficiency is not read.
pub fn measured_efficiency(
    model: &GasModel,
    inlet: &Composition,
    tt_in: f64,
    tt_out: f64,
    far_added: f64,
    burner: &Burner,
) -> Result<f64, FlowError> {
    let Burner {
        fuel,
        lhv,
        fuel_sensible,
        ..
    } = *burner;
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
    Ok((e_out - e_in - far_added * fuel_sensible) / (far_added * lhv))
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
            fuel_sensible: 0.0,
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
            fuel_sensible: 0.0,
        };
        let air = Composition::dry_air();
        let burn = far_for_temperature(&model, &air, 600.0, 1450.0, &b).unwrap();
        let back = exit_temperature(&model, &air, 600.0, burn.far_added, &b).unwrap();
        assert_relative_eq!(back.tt_out, 1450.0, max_relative = 1e-11);
        let eta = measured_efficiency(&model, &air, 600.0, 1450.0, burn.far_added, &b).unwrap();
        assert_relative_eq!(eta, 0.995, max_relative = 1e-11);
        // Stoichiometric limit: too hot a target is a rich-mixture error.
        assert!(far_for_temperature(&model, &air, 600.0, 3500.0, &b).is_err());
    }
}
