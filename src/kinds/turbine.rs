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
        if self.vane_cooling.is_some() || self.rotor_cooling.is_some() {
            COOLED_FIGURES
        } else {
            STAGE_FIGURES
        }
    }

    names!(this, f => {
        let Turbine {
            shaft,
            vane_cooling,
            rotor_cooling,
            ..
        } = this;
        if let Some(s) = shaft {
            f(NameOf::Shaft, s);
        }
        // Vane cooling first: the inputs arrive in this order.
        if let Some(s) = vane_cooling {
            f(NameOf::Input, s);
        }
        if let Some(s) = rotor_cooling {
            f(NameOf::Input, s);
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
            vane_cooling: self.vane_cooling.clone(),
            rotor_cooling: self.rotor_cooling.clone(),
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        let main = io.input()?;
        let mut rest = io.inputs.iter().skip(1);
        let vane = match &self.vane_cooling {
            Some(_) => Some(
                *rest
                    .next()
                    .ok_or("the vane cooling air's station is missing")?,
            ),
            None => None,
        };
        let rotor = match &self.rotor_cooling {
            Some(_) => Some(
                *rest
                    .next()
                    .ok_or("the rotor cooling air's station is missing")?,
            ),
            None => None,
        };
        turbine(ctx, &self.mode, main, vane, rotor, io.to, tr)
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
            vane_cooling: None,
            rotor_cooling: None,
        }),
    )]
}

/// Figures of a cooled turbine.
const COOLED_FIGURES: &[&str] = &[
    "pressure_ratio",
    "eta_isentropic",
    "eta_polytropic",
    "work",
    "power",
    "tt_ratio",
    "tt_ideal",
    "wc_in",
    "nc",
    "vane_cooling_flow",
    "rotor_cooling_flow",
    "rotor_inlet_tt",
];

/// Two streams mixed at total conditions: flows add, compositions mix by
/// their dry air, sensible enthalpies add (exact for non-reacting species:
/// each species keeps its moles, so formation enthalpies cancel). The
/// total pressure is the main stream's: the cooling air is taken to enter
/// at the pressure it must have to flow in (checked by the caller).
pub(crate) fn mix_totals(
    ctx: &Ctx,
    a: (f64, f64, &Composition),
    b: (f64, f64, &Composition),
) -> Res<(f64, f64, Composition)> {
    let ((wa, ta, ca), (wb, tb, cb)) = (a, b);
    let comp = Composition::mix(ca, wa / ca.mass_per_kg_air(), cb, wb / cb.mass_per_kg_air());
    let (ga, gb, g) = (gas(ctx, ca)?, gas(ctx, cb)?, gas(ctx, &comp)?);
    let e = |gs: &Gas, t: f64| gs.sensible_h(t).map_err(|e| e.to_string());
    let w = wa + wb;
    let hs = (wa * e(&ga, ta)? + wb * e(&gb, tb)?) / w;
    let h_ref = g.h(crate::gas::T_REFERENCE).map_err(|e| e.to_string())?;
    let guess = (wa * ta + wb * tb) / w;
    let t = crate::gas::invert_h(&g, hs + h_ref, guess).map_err(|e| e.to_string())?;
    Ok((w, t, comp))
}

fn turbine(
    ctx: &Ctx,
    mode: &Expansion,
    main: &StationValue,
    vane: Option<&StationValue>,
    rotor: Option<&StationValue>,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    // Vane cooling mixes in ahead of the rotor: the expansion starts from
    // the mixed state (SAE station 41).
    let mixed;
    let i = match vane {
        None => main,
        Some(v) => {
            if v.pt < main.pt {
                return Err(format!(
                    "the vane cooling air arrives at {:.0} Pa, below the turbine entry's {:.0} Pa: it cannot flow in",
                    v.pt, main.pt
                ));
            }
            let (w, tt, comp) =
                mix_totals(ctx, (main.w, main.tt, &main.comp), (v.w, v.tt, &v.comp))?;
            step!(
                tr,
                "Tt rotor in",
                tt,
                Temperature,
                "vane cooling mixed at total conditions: (W + Wv) h(Tt41) = W h(Tt) + Wv h(Tt_v), pt41 = pt",
                [
                    ("W", main.w, MassFlow),
                    ("Tt", main.tt, Temperature),
                    ("Wv", v.w, MassFlow),
                    ("Tt_v", v.tt, Temperature)
                ]
            );
            let mut m = *main;
            m.w = w;
            m.tt = tt;
            m.comp = comp;
            mixed = m;
            &mixed
        }
    };
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
            let mut tt = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let pt = measured(&to.pt, &to.name, "the exit total pressure")?.si();
            if let Some(c) = rotor {
                // The measured exit is after the rotor cooling mixed in:
                // the expansion's own exit has W5 h5 - Wr h_r over W41.
                let out = Composition::mix(
                    &i.comp,
                    i.w / i.comp.mass_per_kg_air(),
                    &c.comp,
                    c.w / c.comp.mass_per_kg_air(),
                );
                let (g5, gc) = (gas(ctx, &out)?, gas(ctx, &c.comp)?);
                let e = |gs: &Gas, t: f64| gs.sensible_h(t).map_err(|e| e.to_string());
                let hs = ((i.w + c.w) * e(&g5, tt)? - c.w * e(&gc, c.tt)?) / i.w;
                let h_ref = g.h(crate::gas::T_REFERENCE).map_err(|e| e.to_string())?;
                tt = crate::gas::invert_h(&g, hs + h_ref, tt).map_err(|e| e.to_string())?;
            }
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
    // Rotor cooling mixes in after the work, at the exit pressure.
    let (w5, tt5, comp5) = match rotor {
        None => (i.w, st.tt_out, i.comp),
        Some(c) => {
            if c.pt < pt {
                return Err(format!(
                    "the rotor cooling air arrives at {:.0} Pa, below the turbine exit's {:.0} Pa: it cannot flow in",
                    c.pt, pt
                ));
            }
            let (w, tt, comp) = mix_totals(ctx, (i.w, st.tt_out, &i.comp), (c.w, c.tt, &c.comp))?;
            step!(
                tr,
                "Tt mixed",
                tt,
                Temperature,
                "rotor cooling mixed after the work: (W41 + Wr) h(Tt5) = W41 h(Tt_out) + Wr h(Tt_r), pt5 = pt_out",
                [
                    ("W41", i.w, MassFlow),
                    ("Tt_out", st.tt_out, Temperature),
                    ("Wr", c.w, MassFlow),
                    ("Tt_r", c.tt, Temperature)
                ]
            );
            (w, tt, comp)
        }
    };
    let g5 = gas(ctx, &comp5)?;
    let out = finish(&g5, to, w5, tt5, pt, comp5, None, "turbine", tr)?;
    let mut r = ProcessResult::new(out);
    r.power = -st.work * i.w;
    r.figures = stage_figures(ctx, &st, i.w, i);
    if vane.is_some() {
        // Flow capacity is the turbine entry's (station 4, ahead of the
        // vane cooling), as turbine maps state it.
        let wc = crate::atmosphere::corrected_flow_to(main.w, main.tt, main.pt, ctx.reference);
        let mut figs = Figures::new();
        for (k, v) in r.figures.iter() {
            figs.push((k, if *k == "wc_in" { wc } else { *v }));
        }
        r.figures = figs;
    }
    if vane.is_some() || rotor.is_some() {
        r.figures
            .push(("vane_cooling_flow", vane.map_or(0.0, |v| v.w)));
        r.figures
            .push(("rotor_cooling_flow", rotor.map_or(0.0, |c| c.w)));
        r.figures.push(("rotor_inlet_tt", i.tt));
    }
    Ok(r)
}
