//! Turbine: design expansion ratio and efficiency, work from its shaft's
//! balance, or measured exit totals with the efficiency derived.

use super::compressor::{STAGE_FIGURES, seed_efficiency};
use super::prelude::*;

impl ProcessKind for Turbine {
    fn name(&self) -> &'static str {
        "turbine"
    }

    fn mode_label(&self) -> String {
        match self.mode {
            Expansion::Design {
                basis: Basis::Isentropic,
                ..
            } => "turbine: expansion ratio and isentropic efficiency given",
            Expansion::Design {
                basis: Basis::Polytropic,
                ..
            } => "turbine: expansion ratio and polytropic efficiency given",
            Expansion::ShaftWork {
                basis: Basis::Isentropic,
                ..
            } => "turbine: work from the shaft balance, isentropic efficiency given",
            Expansion::ShaftWork {
                basis: Basis::Polytropic,
                ..
            } => "turbine: work from the shaft balance, polytropic efficiency given",
            Expansion::Measured => "turbine: measured exit, efficiency derived",
        }
        .into()
    }

    givens!(this, f => {
        let Turbine { mode, .. } = this;
        match mode {
            Expansion::Design {
                pressure_ratio,
                efficiency,
                ..
            } => {
                f("pressure_ratio", Quantity::Ratio, pressure_ratio);
                f("efficiency", Quantity::Ratio, efficiency);
            }
            Expansion::ShaftWork { efficiency, .. } => f("efficiency", Quantity::Ratio, efficiency),
            Expansion::Measured => {}
        }
    });

    fn figure_keys(&self) -> &'static [&'static str] {
        STAGE_FIGURES
    }

    names!(this, f => {
        if let Turbine { shaft: Some(s), .. } = this {
            f(NameOf::Shaft, s);
        }
    });

    fn takes_shaft_work(&self) -> bool {
        matches!(self.mode, Expansion::ShaftWork { .. })
    }

    fn reads(&self) -> Reads {
        let m = self.mode == Expansion::Measured;
        Reads {
            measured_tt: m,
            measured_pt: m,
            ..Reads::default()
        }
    }

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        Some(Kind::Turbine(Turbine {
            mode: match &self.mode {
                Expansion::Design {
                    pressure_ratio,
                    basis: Basis::Isentropic,
                    ..
                } => Expansion::Design {
                    pressure_ratio: pressure_ratio.clone(),
                    efficiency: seed_efficiency(now, Basis::Polytropic, "0.9"),
                    basis: Basis::Polytropic,
                },
                Expansion::Design { .. } => Expansion::ShaftWork {
                    efficiency: seed_efficiency(now, Basis::Isentropic, "0.9"),
                    basis: Basis::Isentropic,
                },
                Expansion::ShaftWork {
                    basis: Basis::Isentropic,
                    ..
                } => Expansion::ShaftWork {
                    efficiency: seed_efficiency(now, Basis::Polytropic, "0.9"),
                    basis: Basis::Polytropic,
                },
                Expansion::ShaftWork { .. } => Expansion::Measured,
                // Back to design: start from the machine's figures now.
                Expansion::Measured => Expansion::Design {
                    pressure_ratio: seed(figure(now, "pressure_ratio"), 1.0, "", "2"),
                    efficiency: seed_efficiency(now, Basis::Isentropic, "0.9"),
                    basis: Basis::Isentropic,
                },
            },
            shaft: self.shaft.clone(),
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        turbine(ctx, &self.mode, io.input()?, io.to, tr)
    }
}

/// What the kind chooser offers.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "turbine",
        Kind::Turbine(Turbine {
            mode: Expansion::Design {
                pressure_ratio: Given::raw("2"),
                efficiency: Given::raw("0.9"),
                basis: Basis::Isentropic,
            },
            shaft: None,
        }),
    )]
}

fn turbine(
    ctx: &Ctx,
    mode: &Expansion,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let st = match mode {
        Expansion::Design {
            pressure_ratio,
            efficiency: e,
            basis,
        } => {
            let pr = ratio(pressure_ratio, "turbine expansion ratio", 1.0, 1000.0)?;
            turbo::expand(&g, i.tt, pr, efficiency(e, *basis, "turbine")?).map_err(fe)?
        }
        Expansion::ShaftWork {
            efficiency: e,
            basis,
        } => {
            let need = ctx
                .shaft_need
                .ok_or_else(|| "a shaft-work turbine must be on a shaft".to_string())?;
            if need <= 0.0 {
                return Err(format!(
                    "the shaft needs {need:.1} W from this turbine: the other machines on it already balance (check the shaft)"
                ));
            }
            let work = need / i.w;
            step!(
                tr,
                "work",
                work,
                SpecificEnergy,
                "shaft balance: W_t w_t eta_m = sum of compressor powers + offtake - other turbines' powers x eta_m",
                [("power needed", need, Power), ("W_t", i.w, MassFlow)]
            );
            turbo::expand_for_work(&g, i.tt, work, efficiency(e, *basis, "turbine")?).map_err(fe)?
        }
        Expansion::Measured => {
            let tt = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let pt = measured(&to.pt, &to.name, "the exit total pressure")?.si();
            if pt > i.pt {
                return Err(
                    "measured exit pt is above the inlet's: this is not an expansion".into(),
                );
            }
            let st = turbo::measured_expansion(&g, i.tt, tt, i.pt / pt).map_err(fe)?;
            if st.eta_isentropic > 1.0 {
                return Err(format!(
                    "turbine isentropic efficiency {:.4} from the measured values is above 1: check the readings",
                    st.eta_isentropic
                ));
            }
            st
        }
    };
    let pt = i.pt / st.pressure_ratio;
    step!(
        tr,
        "Tt_ideal",
        st.tt_ideal,
        Temperature,
        "isentropic exit: phi(Tt_ideal) = phi(Tt_in) - R ln(pt_in/pt_out)",
        [
            ("Tt_in", i.tt, Temperature),
            ("ER", st.pressure_ratio, Ratio),
            ("R", g.r(), SpecificHeat)
        ]
    );
    let how = match mode {
        Expansion::Measured => {
            "measured; eta_is = (h(Tt_in) - h(Tt_out))/(h(Tt_in) - h(Tt_ideal)), eta_p = (phi(Tt_in) - phi(Tt_out))/(R ln ER)"
        }
        Expansion::ShaftWork { .. } => {
            "h(Tt_out) = h(Tt_in) - work; the ideal exit h(Tt_ideal) = h(Tt_in) - work/eta_is fixes ER"
        }
        Expansion::Design { .. } => "h(Tt_out) = h(Tt_in) - eta_is (h(Tt_in) - h(Tt_ideal))",
    };
    step!(
        tr,
        "Tt",
        st.tt_out,
        Temperature,
        how,
        [
            ("eta_is", st.eta_isentropic, Ratio),
            ("eta_p", st.eta_polytropic, Ratio)
        ]
    );
    step!(
        tr,
        "pt",
        pt,
        Pressure,
        "pt_out = pt_in / ER",
        [("pt_in", i.pt, Pressure), ("ER", st.pressure_ratio, Ratio)]
    );
    let out = finish(&g, to, i.w, st.tt_out, pt, i.comp, None, "turbine", tr)?;
    let mut r = ProcessResult::new(out);
    r.power = -st.work * i.w;
    r.figures = stage_figures(ctx, &st, i.w, i);
    Ok(r)
}
