//! Combustor: fuel burnt at a given exit temperature, a given fuel flow,
//! or a given fuel flow with a measured exit temperature.

use super::prelude::*;

impl ProcessKind for Combustor {
    fn name(&self) -> &'static str {
        "combustor"
    }

    fn mode_label(&self) -> String {
        match self.mode {
            Burn::ExitTemperature(_) => "combustor: exit Tt given, fuel derived",
            Burn::FuelFlow(_) => "combustor: fuel flow given, exit Tt derived",
            Burn::Measured(_) => "combustor: measured exit Tt, efficiency derived",
        }
        .into()
    }

    givens!(this, f => {
        let Combustor {
            mode,
            pressure_loss,
            efficiency,
            lhv,
            hc,
        } = this;
        match mode {
            Burn::ExitTemperature(t) => f("exit_tt", Quantity::Temperature, t),
            Burn::FuelFlow(w) | Burn::Measured(w) => f("fuel_flow", Quantity::FuelFlow, w),
        }
        f("pressure_loss", Quantity::Ratio, pressure_loss);
        f("efficiency", Quantity::Ratio, efficiency);
        f("lhv", Quantity::SpecificEnergy, lhv);
        f("hc", Quantity::Ratio, hc);
    });

    fn unread_givens(&self) -> &'static [&'static str] {
        // The measured mode derives the efficiency.
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
            Burn::Measured(_) => {
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

/// What the kind chooser offers.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "combustor",
        Kind::Combustor(Combustor {
            mode: Burn::ExitTemperature(Given::raw("1400 K")),
            pressure_loss: Given::raw("4 %"),
            efficiency: Given::raw("0.99"),
            lhv: Given::raw("43 MJ/kg"),
            hc: Given::raw("1.92"),
        }),
    )]
}

fn combustor(
    ctx: &Ctx,
    c: &Combustor,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let loss = ratio(&c.pressure_loss, "pressure loss", 0.0, 0.5)?;
    let lhv = positive(&c.lhv, "heating value")?;
    let fuel = Fuel::new(c.hc.si()).map_err(|e| e.to_string())?;
    let air = i.w / i.comp.mass_per_kg_air();
    let eta_given = c.efficiency.si();
    let burner = |eta: f64| Burner {
        fuel,
        lhv,
        efficiency: eta,
    };
    let (burn, eta) = match &c.mode {
        Burn::ExitTemperature(t) => {
            let b = combustion::far_for_temperature(
                ctx.model,
                &i.comp,
                i.tt,
                t.si(),
                &burner(eta_given),
            )
            .map_err(fe)?;
            step!(
                tr,
                "far added",
                b.far_added,
                Ratio,
                "energy balance per kg air: (1+f_out) hs_out(Tt_out) = (1+f_in) hs_in(Tt_in) + eta f LHV, hs = h(T) - h(298.15 K), fuel at 298.15 K",
                [
                    ("Tt_in", i.tt, Temperature),
                    ("Tt_out", t.si(), Temperature),
                    ("eta", eta_given, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            (b, eta_given)
        }
        Burn::FuelFlow(wf) => {
            let wf = wf.si();
            if !(wf.is_finite() && wf >= 0.0) {
                return Err("fuel flow must be zero or positive".into());
            }
            let b = combustion::exit_temperature(
                ctx.model,
                &i.comp,
                i.tt,
                wf / air,
                &burner(eta_given),
            )
            .map_err(fe)?;
            step!(
                tr,
                "Tt_out",
                b.tt_out,
                Temperature,
                "energy balance per kg air: (1+f_out) hs_out(Tt_out) = (1+f_in) hs_in(Tt_in) + eta f LHV",
                [
                    ("Tt_in", i.tt, Temperature),
                    ("f added = Wf/W_air", wf / air, Ratio),
                    ("eta", eta_given, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            (b, eta_given)
        }
        Burn::Measured(wf) => {
            let wf = positive(wf, "fuel flow")?;
            let t = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let f = wf / air;
            let eta = combustion::measured_efficiency(ctx.model, &i.comp, i.tt, t, f, fuel, lhv)
                .map_err(fe)?;
            step!(
                tr,
                "efficiency",
                eta,
                Ratio,
                "eta = [(1+f_out) hs_out(Tt_out) - (1+f_in) hs_in(Tt_in)] / (f LHV)",
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
            let out = i
                .comp
                .burnt(i.comp.far + f, fuel)
                .map_err(|e| e.to_string())?;
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
    let pt = i.pt * (1.0 - loss);
    step!(
        tr,
        "fuel flow",
        wf,
        MassFlow,
        "Wf = f_added x W_air",
        [("f added", burn.far_added, Ratio), ("W_air", air, MassFlow)]
    );
    step!(
        tr,
        "pt",
        pt,
        Pressure,
        "pt_out = pt_in (1 - loss)",
        [("pt_in", i.pt, Pressure), ("loss", loss, Ratio)]
    );
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
