//! Adiabatic duct: total temperature unchanged, total pressure lost by a
//! recovery, a loss coefficient, a measurement, wall friction (Fanno) or
//! the supersonic intake schedule.

use super::prelude::*;

impl ProcessKind for Duct {
    fn name(&self) -> &'static str {
        "duct"
    }

    fn mode_label(&self) -> String {
        match self {
            Duct::Recovery { .. } => "duct: pt recovery given",
            Duct::LossCoefficient { .. } => "duct: loss coefficient on inlet q",
            Duct::MeasuredExit => "duct: measured exit pt, recovery derived",
            Duct::Friction { .. } => "duct: wall friction (Fanno)",
            Duct::IntakeSchedule => "duct: intake recovery schedule from flight Mach",
        }
        .into()
    }

    givens!(this, f => match this {
        Duct::Recovery { recovery } => f("recovery", Quantity::Ratio, recovery),
        Duct::LossCoefficient { k } => f("k", Quantity::Ratio, k),
        Duct::Friction {
            length,
            diameter,
            friction,
        } => {
            f("length", Quantity::Length, length);
            f("diameter", Quantity::Length, diameter);
            f("friction", Quantity::Ratio, friction);
        }
        Duct::MeasuredExit | Duct::IntakeSchedule => {}
    });

    fn sets_exit_statics(&self, _exit: &Station) -> bool {
        matches!(self, Duct::Friction { .. })
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        match self {
            Duct::Friction { .. } => &[
                "recovery",
                "loss",
                "friction_4fl_d",
                "max_4fl_d",
                "mach_out",
            ],
            _ => &["recovery", "loss"],
        }
    }

    fn reads(&self) -> Reads {
        Reads {
            ambient: matches!(self, Duct::IntakeSchedule),
            measured_pt: matches!(self, Duct::MeasuredExit),
            ..Reads::default()
        }
    }

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        Some(Kind::Duct(match self {
            Duct::Recovery { .. } => Duct::LossCoefficient {
                k: Given::raw("0.5"),
            },
            Duct::LossCoefficient { .. } => Duct::MeasuredExit,
            Duct::MeasuredExit => Duct::Friction {
                length: Given::raw("1 m"),
                diameter: Given::raw("0.1 m"),
                friction: Given::raw("0.005"),
            },
            Duct::Friction { .. } => Duct::IntakeSchedule,
            // Back to a given recovery: the one the duct has now.
            Duct::IntakeSchedule => Duct::Recovery {
                recovery: seed(figure(now, "recovery"), 1.0, "", "0.98"),
            },
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        duct(ctx, self, io.input()?, io.from, io.to, tr)
    }
}

/// What the kind chooser offers.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "duct",
        Kind::Duct(Duct::Recovery {
            recovery: Given::raw("0.98"),
        }),
    )]
}

/// MIL-E-5008B intake recovery schedule (from memory): 1 up to Mach 1,
/// then 1 - 0.075 (M - 1)^1.35.
pub fn mil_recovery(m: f64) -> f64 {
    if m <= 1.0 {
        1.0
    } else {
        1.0 - 0.075 * (m - 1.0).powf(1.35)
    }
}

fn duct(
    ctx: &Ctx,
    d: &Duct,
    i: &StationValue,
    from: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let mut figures = Figures::new();
    let (pt, intrinsic) = match d {
        Duct::Recovery { recovery } => {
            let r = recovery.si();
            if !(r.is_finite() && r > 0.0) {
                return Err(format!(
                    "pressure recovery {} must be positive",
                    recovery.shown()
                ));
            }
            if r > 1.0 {
                return Err(format!(
                    "pressure recovery {} is above 1: an adiabatic duct cannot raise total pressure",
                    recovery.shown()
                ));
            }
            step!(
                tr,
                "pt",
                r * i.pt,
                Pressure,
                "pt_out = recovery x pt_in",
                [("pt_in", i.pt, Pressure), ("recovery", r, Ratio)]
            );
            (r * i.pt, None)
        }
        Duct::IntakeSchedule => {
            let m0 = ctx.ambient.flow.mach;
            if m0 >= 5.0 {
                return Err(format!(
                    "the intake recovery schedule covers flight Mach up to 5 (here {m0:.3})"
                ));
            }
            let r = mil_recovery(m0);
            step!(
                tr,
                "recovery",
                r,
                Ratio,
                "MIL-E-5008B schedule: 1 - 0.075 (M0 - 1)^1.35 above Mach 1",
                [("M0", m0, Mach)]
            );
            (r * i.pt, None)
        }
        Duct::LossCoefficient { k } => {
            let k = k.si();
            if !(k.is_finite() && k >= 0.0) {
                return Err("loss coefficient must be zero or positive".into());
            }
            let s = need_statics(i, from, "a loss coefficient on inlet dynamic pressure")?;
            let q = s.dynamic_pressure();
            let pt = i.pt - k * q;
            step!(
                tr,
                "pt",
                pt,
                Pressure,
                "pt_out = pt_in - K q_in, q = rho V^2/2",
                [
                    ("pt_in", i.pt, Pressure),
                    ("K", k, Ratio),
                    ("q_in", q, Pressure)
                ]
            );
            if pt <= 0.0 {
                return Err(format!(
                    "loss coefficient {k} removes all the total pressure"
                ));
            }
            (pt, None)
        }
        Duct::MeasuredExit => {
            let m = measured(&to.pt, &to.name, "the outlet total pressure")?;
            let pt = m.si();
            if pt > i.pt * (1.0 + 1e-9) {
                return Err(format!(
                    "measured outlet pt {} is above the inlet's {:.1} Pa: an adiabatic duct cannot raise total pressure (check the probes)",
                    m.shown(),
                    i.pt
                ));
            }
            (pt, None)
        }
        Duct::Friction {
            length,
            diameter,
            friction,
        } => {
            let l = length.si();
            let dia = positive(diameter, "hydraulic diameter")?;
            let f = friction.si();
            if !(l.is_finite() && l >= 0.0 && f.is_finite() && f >= 0.0) {
                return Err("duct length and friction factor must be zero or positive".into());
            }
            let s = need_statics(i, from, "a friction duct")?;
            let fl = 4.0 * f * l / dia;
            let out = fanno::friction(&g, s, fl).map_err(fe)?;
            let max = fanno::friction_to_sonic(&g, s).map_err(fe)?;
            step!(
                tr,
                "M",
                out.mach,
                Mach,
                "Fanno line: 4fL*/D(M_in) - 4fL/D = 4fL*/D(M_out), same branch",
                [("M_in", s.mach, Mach), ("4fL/D", fl, Ratio)]
            );
            figures.push(("friction_4fl_d", fl));
            figures.push(("max_4fl_d", max));
            figures.push(("mach_out", out.mach));
            (out.pt, Some(out))
        }
    };
    step!(
        tr,
        "Tt",
        i.tt,
        Temperature,
        "adiabatic: total enthalpy, so Tt, unchanged",
        [("Tt_in", i.tt, Temperature)]
    );
    let out = finish(
        &g,
        to,
        i.w,
        i.tt,
        pt,
        i.comp,
        intrinsic,
        "friction duct",
        tr,
    )?;
    let mut r = ProcessResult::new(out);
    figures.insert(0, ("recovery", pt / i.pt));
    figures.insert(1, ("loss", 1.0 - pt / i.pt));
    r.figures = figures;
    Ok(r)
}
