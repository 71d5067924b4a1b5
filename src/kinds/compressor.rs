//! Compressor or fan: design pressure ratio and efficiency, or measured
//! exit totals with the efficiencies derived.

use super::prelude::*;

impl ProcessKind for Compressor {
    fn name(&self) -> &'static str {
        "compressor"
    }

    fn mode_label(&self) -> String {
        match self.mode {
            Compression::Design {
                basis: Basis::Isentropic,
                ..
            } => "compressor: pressure ratio and isentropic efficiency given",
            Compression::Design {
                basis: Basis::Polytropic,
                ..
            } => "compressor: pressure ratio and polytropic efficiency given",
            Compression::Measured => "compressor: measured exit, PR and efficiencies derived",
        }
        .into()
    }

    givens!(this, f => {
        let Compressor { mode, .. } = this;
        if let Compression::Design {
            pressure_ratio,
            efficiency,
            ..
        } = mode
        {
            f("pressure_ratio", Quantity::Ratio, pressure_ratio);
            f("efficiency", Quantity::Ratio, efficiency);
        }
    });

    fn figure_keys(&self) -> &'static [&'static str] {
        STAGE_FIGURES
    }

    names!(this, f => {
        if let Compressor { shaft: Some(s), .. } = this {
            f(NameOf::Shaft, s);
        }
    });

    fn reads(&self) -> Reads {
        let m = self.mode == Compression::Measured;
        Reads {
            measured_tt: m,
            measured_pt: m,
            ..Reads::default()
        }
    }

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        Some(Kind::Compressor(Compressor {
            mode: match &self.mode {
                // The other efficiency basis, its value the machine's now.
                Compression::Design {
                    pressure_ratio,
                    basis: Basis::Isentropic,
                    ..
                } => Compression::Design {
                    pressure_ratio: pressure_ratio.clone(),
                    efficiency: seed_efficiency(now, Basis::Polytropic, "0.9"),
                    basis: Basis::Polytropic,
                },
                Compression::Design { .. } => Compression::Measured,
                // Back to design: start from the machine's figures now.
                Compression::Measured => Compression::Design {
                    pressure_ratio: seed(figure(now, "pressure_ratio"), 1.0, "", "4"),
                    efficiency: seed_efficiency(now, Basis::Isentropic, "0.86"),
                    basis: Basis::Isentropic,
                },
            },
            shaft: self.shaft.clone(),
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        compressor(ctx, &self.mode, io.input()?, io.to, tr)
    }
}

/// Figures of a compressor or turbine stage.
pub(super) const STAGE_FIGURES: &[&str] = &[
    "pressure_ratio",
    "eta_isentropic",
    "eta_polytropic",
    "work",
    "power",
    "tt_ratio",
    "tt_ideal",
    "wc_in",
    "nc",
];

/// An efficiency started from the machine's figure on `basis`, when it
/// is a real one (above 0, at most 1).
pub(super) fn seed_efficiency(now: Option<&ProcessResult>, basis: Basis, fallback: &str) -> Given {
    let key = match basis {
        Basis::Isentropic => "eta_isentropic",
        Basis::Polytropic => "eta_polytropic",
    };
    let v = figure(now, key).filter(|e| *e > 0.0 && *e <= 1.0);
    seed(v, 1.0, "", fallback)
}

/// What the kind chooser offers: a pressure ratio of 4 at 0.86.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    let (pressure_ratio, efficiency) = (Given::raw("4"), Given::raw("0.86"));
    let mode = Compression::Design {
        pressure_ratio,
        efficiency,
        basis: Basis::Isentropic,
    };
    vec![(
        "compressor",
        Kind::Compressor(Compressor { mode, shaft: None }),
    )]
}

fn compressor(
    ctx: &Ctx,
    mode: &Compression,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let (st, pt) = match mode {
        Compression::Design {
            pressure_ratio,
            efficiency: e,
            basis,
        } => {
            let pr = ratio(pressure_ratio, "compressor pressure ratio", 1.0, 1000.0)?;
            let eff = efficiency(e, *basis, "compressor")?;
            let st = turbo::compress(&g, i.tt, pr, eff).map_err(fe)?;
            (st, i.pt * pr)
        }
        Compression::Measured => {
            let tt = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let pt = measured(&to.pt, &to.name, "the exit total pressure")?.si();
            if pt < i.pt {
                return Err(format!(
                    "measured exit pt {pt:.1} Pa is below the inlet's {:.1} Pa: this is not a compression",
                    i.pt
                ));
            }
            let st = turbo::measured_compression(&g, i.tt, tt, pt / i.pt).map_err(fe)?;
            if st.eta_isentropic > 1.0 {
                return Err(format!(
                    "isentropic efficiency {:.4} from the measured values is above 1: check the exit temperature and pressure readings",
                    st.eta_isentropic
                ));
            }
            (st, pt)
        }
    };
    let pr = st.pressure_ratio;
    step!(
        tr,
        "Tt_ideal",
        st.tt_ideal,
        Temperature,
        "isentropic exit: phi(Tt_ideal) = phi(Tt_in) + R ln(PR)",
        [
            ("Tt_in", i.tt, Temperature),
            ("PR", pr, Ratio),
            ("R", g.r(), SpecificHeat)
        ]
    );
    let how = if *mode == Compression::Measured {
        "measured; eta_is = (h(Tt_ideal) - h(Tt_in))/(h(Tt_out) - h(Tt_in)), eta_p = R ln(PR)/(phi(Tt_out) - phi(Tt_in))"
    } else {
        "h(Tt_out) = h(Tt_in) + (h(Tt_ideal) - h(Tt_in))/eta_is; polytropic: phi(Tt_out) = phi(Tt_in) + R ln(PR)/eta_p"
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
        "work",
        st.work,
        SpecificEnergy,
        "w = h(Tt_out) - h(Tt_in)",
        [
            ("Tt_in", i.tt, Temperature),
            ("Tt_out", st.tt_out, Temperature)
        ]
    );
    step!(
        tr,
        "pt",
        pt,
        Pressure,
        "pt_out = PR x pt_in",
        [("pt_in", i.pt, Pressure), ("PR", pr, Ratio)]
    );
    let out = finish(&g, to, i.w, st.tt_out, pt, i.comp, None, "compressor", tr)?;
    let mut r = ProcessResult::new(out);
    r.power = st.work * i.w;
    r.figures = stage_figures(ctx, &st, i.w, i);
    Ok(r)
}
