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
        let Compressor { mode, bleed, .. } = this;
        if let Compression::Design {
            pressure_ratio,
            efficiency,
            ..
        } = mode
        {
            f("pressure_ratio", Quantity::Ratio, pressure_ratio);
            f("efficiency", Quantity::Ratio, efficiency);
        }
        if let Some(StageBleed { fraction, position, .. }) = bleed {
            f("bleed_fraction", Quantity::Ratio, fraction);
            f("bleed_position", Quantity::Ratio, position);
        }
    });

    fn figure_keys(&self) -> &'static [&'static str] {
        if self.bleed.is_some() {
            STAGE_FIGURES_BLEED
        } else {
            STAGE_FIGURES
        }
    }

    names!(this, f => {
        let Compressor { shaft, bleed, .. } = this;
        if let Some(s) = shaft {
            f(NameOf::Shaft, s);
        }
        if let Some(StageBleed { station, .. }) = bleed {
            f(NameOf::Output, station);
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
            bleed: self.bleed.clone(),
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        let mut r = compressor(ctx, &self.mode, io.input()?, io.to, tr)?;
        if let Some(b) = &self.bleed {
            stage_bleed(ctx, b, io, &mut r, tr)?;
        }
        Ok(r)
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

/// The same with an interstage bleed.
const STAGE_FIGURES_BLEED: &[&str] = &[
    "pressure_ratio",
    "eta_isentropic",
    "eta_polytropic",
    "work",
    "power",
    "tt_ratio",
    "tt_ideal",
    "wc_in",
    "nc",
    "bleed_flow",
    "bleed_fraction",
    "bleed_tt",
    "bleed_pt",
];

/// An interstage bleed: the machine is computed for its whole inflow (its
/// pressure ratio and efficiency are those of the main path), then the
/// bled air leaves with `position` of the specific work and of the
/// total-pressure rise done on it: `h_b = h_in + x w`,
/// `pt_b = pt_in + x (pt_out - pt_in)`. The exit carries the rest, and the
/// power is `W_out w + W_b x w`.
fn stage_bleed(
    ctx: &Ctx,
    b: &StageBleed,
    io: &Io,
    r: &mut ProcessResult,
    tr: &mut Tracer,
) -> Res<()> {
    let i = io.input()?;
    let f = ratio(&b.fraction, "interstage bleed fraction", 0.0, 1.0)?;
    if f >= 1.0 {
        return Err("an interstage bleed fraction of 1 leaves nothing for the exit".into());
    }
    let x = ratio(&b.position, "interstage bleed position", 0.0, 1.0)?;
    let to2 = io
        .to2
        .ok_or_else(|| format!("bled station \"{}\" is missing", b.station))?;
    let g = gas(ctx, &i.comp)?;
    let work = figure(Some(r), "work").ok_or("the compressor's work is missing")?;
    let h_in = g.h(i.tt).map_err(|e| e.to_string())?;
    let tt_b = crate::gas::invert_h(&g, h_in + x * work, i.tt + x * (r.out.tt - i.tt))
        .map_err(|e| e.to_string())?;
    let pt_b = i.pt + x * (r.out.pt - i.pt);
    let (wb, w_out) = (f * i.w, (1.0 - f) * i.w);
    step!(
        tr,
        "bleed",
        wb,
        MassFlow,
        "interstage bleed: W_b = f W_in at h_b = h_in + x w, pt_b = pt_in + x (pt_out - pt_in); W_out = W_in - W_b; power = W_out w + W_b x w",
        [
            ("f", f, Ratio),
            ("x", x, Ratio),
            ("Tt_b", tt_b, Temperature),
            ("pt_b", pt_b, Pressure)
        ]
    );
    let out = finish(
        &g,
        io.to,
        w_out,
        r.out.tt,
        r.out.pt,
        i.comp,
        None,
        "compressor",
        &mut Tracer::off(),
    )?;
    let bled = finish(
        &g,
        to2,
        wb,
        tt_b,
        pt_b,
        i.comp,
        None,
        "compressor bleed",
        &mut Tracer::off(),
    )?;
    r.out = out;
    r.out2 = Some(Box::new(bled));
    r.power = w_out * work + wb * x * work;
    let mut figs = Figures::new();
    for (k, v) in r.figures.iter() {
        figs.push((k, if *k == "power" { r.power } else { *v }));
    }
    for x in [
        ("bleed_flow", wb),
        ("bleed_fraction", f),
        ("bleed_tt", tt_b),
        ("bleed_pt", pt_b),
    ] {
        figs.push(x);
    }
    r.figures = figs;
    Ok(())
}

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
        Kind::Compressor(Compressor {
            mode,
            shaft: None,
            bleed: None,
        }),
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
