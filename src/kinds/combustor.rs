//! Combustor: fuel burnt at a given exit temperature, a given fuel flow,
//! or a given fuel flow with a measured exit temperature.

use super::prelude::*;
use crate::book::{FuelAtoms, Products};

impl ProcessKind for Combustor {
    fn name(&self) -> &'static str {
        "combustor"
    }

    fn mode_label(&self) -> String {
        let mode = match self.mode {
            Burn::ExitTemperature(_) => "combustor: exit Tt given, fuel derived",
            Burn::FuelFlow(_) => "combustor: fuel flow given, exit Tt derived",
            Burn::Measured(_) => "combustor: measured exit Tt, efficiency derived",
        };
        match self.products {
            Products::Frozen => mode.into(),
            Products::Equilibrium => format!("{mode}, equilibrium products"),
        }
    }

    givens!(this, f => {
        let Combustor {
            mode,
            pressure_loss,
            efficiency,
            lhv,
            hc,
            fuel,
            fuel_tt,
            fuel_cp,
            products: _,
        } = this;
        match mode {
            Burn::ExitTemperature(t) => f("exit_tt", Quantity::Temperature, t),
            Burn::FuelFlow(w) | Burn::Measured(w) => f("fuel_flow", Quantity::FuelFlow, w),
        }
        f("pressure_loss", Quantity::Ratio, pressure_loss);
        f("efficiency", Quantity::Ratio, efficiency);
        f("lhv", Quantity::SpecificEnergy, lhv);
        if let Some(hc) = hc {
            f("hc", Quantity::Ratio, hc);
        }
        if let Some(FuelAtoms { c, h, o, n }) = fuel {
            f("fuel_c", Quantity::Ratio, c);
            f("fuel_h", Quantity::Ratio, h);
            f("fuel_o", Quantity::Ratio, o);
            f("fuel_n", Quantity::Ratio, n);
        }
        if let Some(t) = fuel_tt {
            f("fuel_tt", Quantity::Temperature, t);
        }
        if let Some(cp) = fuel_cp {
            f("fuel_cp", Quantity::SpecificHeat, cp);
        }
    });

    fn unread_givens(&self) -> &'static [&'static str] {
        // The measured mode derives the efficiency (and the loss, where
        // the exit total pressure is measured: that depends on the
        // station, so the loss stays listed).
        match self.mode {
            Burn::Measured(_) => &["efficiency"],
            _ => &[],
        }
    }

    fn grid_given(&self, station_key: &str) -> Option<&'static str> {
        match (&self.mode, station_key) {
            (Burn::ExitTemperature(_), "tt") => Some("exit_tt"),
            _ => None,
        }
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        &[
            "fuel_flow",
            "far_added",
            "exit_tt",
            "efficiency",
            "tt_ratio",
            "loss",
            "far_stoich",
            "equivalence_ratio",
        ]
    }

    fn reads(&self) -> Reads {
        Reads {
            measured_tt: matches!(self.mode, Burn::Measured(_)),
            ..Reads::default()
        }
    }

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        let mut c = self.clone();
        c.mode = match &self.mode {
            Burn::ExitTemperature(_) => {
                Burn::FuelFlow(seed(figure(now, "fuel_flow"), 1.0, "kg/s", "0.5 kg/s"))
            }
            Burn::FuelFlow(w) => Burn::Measured(w.clone()),
            // After the three modes with frozen products come the same
            // three with products in equilibrium.
            Burn::Measured(_) => {
                c.products = match self.products {
                    Products::Frozen => Products::Equilibrium,
                    Products::Equilibrium => Products::Frozen,
                };
                // The efficiency the measurement gave becomes the one given.
                if let Some(eta) = figure(now, "efficiency").filter(|e| *e > 0.0 && *e <= 1.0) {
                    c.efficiency = seed(Some(eta), 1.0, "", "0.99");
                }
                Burn::ExitTemperature(seed(figure(now, "exit_tt"), 1.0, "K", "1400 K"))
            }
        };
        Some(Kind::Combustor(c))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        combustor(ctx, self, io.input()?, io.to, tr)
    }
}

/// What the kind chooser offers: kerosene-like, hydrogen and methane.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    let base = |lhv: &str| Combustor {
        mode: Burn::ExitTemperature(Given::raw("1400 K")),
        pressure_loss: Given::raw("4 %"),
        efficiency: Given::raw("0.99"),
        lhv: Given::raw(lhv),
        hc: None,
        fuel: None,
        fuel_tt: None,
        fuel_cp: None,
        products: Products::Frozen,
    };
    let atoms = |c: &str, h: &str| {
        Some(FuelAtoms {
            c: Given::raw(c),
            h: Given::raw(h),
            o: Given::zero(),
            n: Given::zero(),
        })
    };
    vec![
        (
            "combustor (kerosene-like fuel, H/C 1.92)",
            Kind::Combustor(Combustor {
                hc: Some(Given::raw("1.92")),
                ..base("43 MJ/kg")
            }),
        ),
        (
            // LHV of hydrogen and methane: the values the species data
            // gives (tests/data/cantera_combustion.json), rounded.
            "combustor (hydrogen H2)",
            Kind::Combustor(Combustor {
                fuel: atoms("0", "2"),
                ..base("119.95 MJ/kg")
            }),
        ),
        (
            "combustor (methane CH4)",
            Kind::Combustor(Combustor {
                fuel: atoms("1", "4"),
                ..base("50.03 MJ/kg")
            }),
        ),
    ]
}

/// The fuel a combustor burns: by its atoms, by its H/C, or kerosene-like.
pub(crate) fn fuel_of(c: &Combustor) -> Res<Fuel> {
    match (&c.fuel, &c.hc) {
        (Some(_), Some(_)) => Err(
            "the fuel is given both by its H/C ratio (hc) and by its atoms (fuel): keep one".into(),
        ),
        (Some(a), None) => {
            Fuel::atoms(a.c.si(), a.h.si(), a.o.si(), a.n.si()).map_err(|e| e.to_string())
        }
        (None, Some(hc)) => Fuel::new(hc.si()).map_err(|e| e.to_string()),
        (None, None) => Ok(Fuel::KEROSENE),
    }
}

/// A fuel's specific heat when it has no polynomial of its own and none
/// is given: 2.0 kJ/(kg K), about that of liquid kerosene near room
/// temperature (from memory).
const FUEL_CP_DEFAULT: f64 = 2000.0;

/// The sensible enthalpy the fuel brings from 298.15 K, J/kg, and how.
fn fuel_sensible(c: &Combustor, fuel: &Fuel) -> Res<(f64, f64, &'static str)> {
    let Some(t) = &c.fuel_tt else {
        return Ok((crate::gas::T_REFERENCE, 0.0, "fuel at 298.15 K"));
    };
    let t = t.si();
    if let (None, Some(h)) = (&c.fuel_cp, fuel.own_sensible_h(t)) {
        let h = h.map_err(|e| format!("fuel temperature: {e}"))?;
        return Ok((t, h, "the fuel's own polynomial (gas)"));
    }
    let cp = c.fuel_cp.as_ref().map_or(FUEL_CP_DEFAULT, |g| g.si());
    Ok((
        t,
        cp * (t - crate::gas::T_REFERENCE),
        "cp_fuel (Tf - 298.15 K)",
    ))
}

/// Frozen products above this exit temperature carry a note: dissociation
/// then takes a part of the heat that matters (about 1.4 % more fuel for
/// the same exit temperature at 2000 K with kerosene, from the Cantera
/// reference in tests/data/cantera_combustion.json).
pub const DISSOCIATION_NOTE_T: f64 = 1900.0;

fn combustor(
    ctx: &Ctx,
    c: &Combustor,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let lhv = positive(&c.lhv, "heating value")?;
    let fuel = fuel_of(c)?;
    let (fuel_t, hs_fuel, hs_how) = fuel_sensible(c, &fuel)?;
    let air = i.w / i.comp.mass_per_kg_air();
    let eta_given = c.efficiency.si();
    let burner = |eta: f64| Burner {
        fuel,
        lhv,
        efficiency: eta,
        fuel_sensible: hs_fuel,
    };
    let equilibrium = c.products == Products::Equilibrium;
    // A measured exit total pressure sets the loss in the measured mode.
    let measured_pt = match (&c.mode, &to.pt) {
        (Burn::Measured(_), Some(p)) => Some(p.si()),
        _ => None,
    };
    let loss = match measured_pt {
        Some(p) => {
            let l = 1.0 - p / i.pt;
            if !(l.is_finite() && l > -0.05 && l < 0.5) {
                return Err(format!(
                    "the measured exit total pressure {:.0} Pa against {:.0} Pa at entry gives a pressure loss of {:.2} %, outside -5 to 50 %: check the readings",
                    p,
                    i.pt,
                    100.0 * l
                ));
            }
            l
        }
        None => ratio(&c.pressure_loss, "pressure loss", 0.0, 0.5)?,
    };
    let pt = i.pt * (1.0 - loss);
    let balance = if equilibrium {
        "products in chemical equilibrium at (Tt_out, pt_out), absolute enthalpies per kg air: H_eq(Tt_out) = H_in(Tt_in) + f (eta LHV + hs_fuel + formation of complete products per kg fuel)"
    } else {
        "energy balance per kg air: (1+f_out) hs_out(Tt_out) = (1+f_in) hs_in(Tt_in) + f (eta LHV + hs_fuel), hs = h(T) - h(298.15 K)"
    };
    if hs_fuel != 0.0 {
        step!(
            tr,
            "hs fuel",
            hs_fuel,
            SpecificEnergy,
            hs_how,
            [("T fuel", fuel_t, Temperature)]
        );
    }
    fn eq<'a>(i: &'a StationValue, pt: f64, b: &'a Burner) -> combustion::EquilibriumBurn<'a> {
        combustion::EquilibriumBurn {
            inlet: &i.comp,
            tt_in: i.tt,
            pt,
            burner: b,
        }
    }
    let (burn, eta) = match &c.mode {
        Burn::ExitTemperature(t) => {
            let b = burner(eta_given);
            let out = if equilibrium {
                eq(i, pt, &b).far_for_temperature(ctx.model, t.si())
            } else {
                combustion::far_for_temperature(ctx.model, &i.comp, i.tt, t.si(), &b)
            }
            .map_err(fe)?;
            step!(
                tr,
                "far added",
                out.far_added,
                Ratio,
                balance,
                [
                    ("Tt_in", i.tt, Temperature),
                    ("Tt_out", t.si(), Temperature),
                    ("eta", eta_given, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            (out, eta_given)
        }
        Burn::FuelFlow(wf) => {
            let wf = wf.si();
            if !(wf.is_finite() && wf >= 0.0) {
                return Err("fuel flow must be zero or positive".into());
            }
            let b = burner(eta_given);
            let out = if equilibrium {
                eq(i, pt, &b).exit_temperature(ctx.model, wf / air)
            } else {
                combustion::exit_temperature(ctx.model, &i.comp, i.tt, wf / air, &b)
            }
            .map_err(fe)?;
            step!(
                tr,
                "Tt_out",
                out.tt_out,
                Temperature,
                balance,
                [
                    ("Tt_in", i.tt, Temperature),
                    ("f added = Wf/W_air", wf / air, Ratio),
                    ("eta", eta_given, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            (out, eta_given)
        }
        Burn::Measured(wf) => {
            let wf = positive(wf, "fuel flow")?;
            let t = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let f = wf / air;
            let b = burner(1.0);
            let (eta, out) = if equilibrium {
                eq(i, pt, &b)
                    .measured_efficiency(ctx.model, t, f)
                    .map_err(fe)?
            } else {
                let eta = combustion::measured_efficiency(ctx.model, &i.comp, i.tt, t, f, &b)
                    .map_err(fe)?;
                let out = i
                    .comp
                    .burnt(i.comp.far + f, fuel)
                    .map_err(|e| e.to_string())?;
                (eta, out)
            };
            step!(
                tr,
                "efficiency",
                eta,
                Ratio,
                "eta = [(1+f_out) hs_out(Tt_out) - (1+f_in) hs_in(Tt_in) - f hs_fuel] / (f LHV)",
                [
                    ("Tt_in", i.tt, Temperature),
                    ("Tt_out measured", t, Temperature),
                    ("f added", f, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            if eta > 1.0 {
                return Err(format!(
                    "combustion efficiency {eta:.4} from the measured values is above 1: check the exit temperature and fuel flow readings"
                ));
            }
            if eta <= 0.0 {
                return Err(format!(
                    "combustion efficiency {eta:.4} from the measured values is not positive: exit colder than inlet?"
                ));
            }
            (
                combustion::Burn {
                    composition: out,
                    tt_out: t,
                    far_added: f,
                },
                eta,
            )
        }
    };
    let wf = burn.far_added * air;
    step!(
        tr,
        "fuel flow",
        wf,
        MassFlow,
        "Wf = f_added x W_air",
        [("f added", burn.far_added, Ratio), ("W_air", air, MassFlow)]
    );
    if measured_pt.is_some() {
        step!(
            tr,
            "loss",
            loss,
            Ratio,
            "loss = 1 - pt_out measured / pt_in",
            [("pt_in", i.pt, Pressure), ("pt_out", pt, Pressure)]
        );
    } else {
        step!(
            tr,
            "pt",
            pt,
            Pressure,
            "pt_out = pt_in (1 - loss)",
            [("pt_in", i.pt, Pressure), ("loss", loss, Ratio)]
        );
    }
    let g = gas(ctx, &burn.composition)?;
    let out = finish(
        &g,
        to,
        i.w + wf,
        burn.tt_out,
        pt,
        burn.composition,
        None,
        "combustor",
        tr,
    )?;
    let mut r = ProcessResult::new(out);
    r.fuel = wf;
    r.heat_release = wf * lhv;
    if !equilibrium && burn.tt_out > DISSOCIATION_NOTE_T && burn.far_added > 0.0 {
        r.note = Some(
            "frozen products above 1900 K: dissociation matters there (about 1.4 % more fuel for the same exit temperature at 2000 K); choose equilibrium products",
        );
    }
    // Equivalence ratio of the exit stream: its fuel-air ratio over the
    // stoichiometric one of the fuel.
    let stoich = crate::gas::stoichiometric_far(fuel);
    r.figures = Figures::of(&[
        ("fuel_flow", wf),
        ("far_added", burn.far_added),
        ("exit_tt", burn.tt_out),
        ("efficiency", eta),
        ("tt_ratio", burn.tt_out / i.tt),
        ("loss", loss),
        ("far_stoich", stoich),
        ("equivalence_ratio", burn.composition.far / stoich),
    ]);
    Ok(r)
}
