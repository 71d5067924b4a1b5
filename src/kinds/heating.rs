//! Constant-area heating or cooling (Rayleigh line), by heat or by exit
//! total temperature.

use super::prelude::*;

impl ProcessKind for Heating {
    fn name(&self) -> &'static str {
        "Rayleigh heating"
    }

    fn mode_label(&self) -> String {
        match self {
            Heating::Heat(_) => "Rayleigh heating: heat given",
            Heating::ExitTemperature(_) => "Rayleigh heating: exit Tt given",
        }
        .into()
    }

    givens!(this, f => match this {
        Heating::Heat(x) => f("heat", Quantity::SpecificEnergy, x),
        Heating::ExitTemperature(x) => f("exit_tt", Quantity::Temperature, x),
    });

    fn sets_exit_statics(&self, _exit: &Station) -> bool {
        true
    }

    fn grid_given(&self, station_key: &str) -> Option<&'static str> {
        match (self, station_key) {
            (Heating::ExitTemperature(_), "tt") => Some("exit_tt"),
            _ => None,
        }
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        &[
            "heat", "max_heat", "exit_tt", "mach_in", "mach_out", "recovery",
        ]
    }

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        Some(Kind::Heating(match self {
            Heating::Heat(_) => {
                Heating::ExitTemperature(seed(figure(now, "exit_tt"), 1.0, "K", "1000 K"))
            }
            Heating::ExitTemperature(_) => {
                Heating::Heat(seed(figure(now, "heat"), 1000.0, "kJ/kg", "100 kJ/kg"))
            }
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        heating(ctx, self, io.input()?, io.from, io.to, tr)
    }
}

/// What the kind chooser offers.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "Rayleigh heating",
        Kind::Heating(Heating::Heat(Given::raw("100 kJ/kg"))),
    )]
}

fn heating(
    ctx: &Ctx,
    h: &Heating,
    i: &StationValue,
    from: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let s = need_statics(i, from, "Rayleigh heating")?;
    // The Rayleigh line of a stream at rest is a single point: heat added
    // to still gas in a constant area is not a steady flow process.
    if s.mach.is_nan() || s.mach <= 0.0 {
        return Err(format!(
            "Rayleigh heating needs a moving inlet stream: station \"{from}\" is at Mach {:.4}; use a combustor, or give the station a Mach number, velocity or area",
            s.mach
        ));
    }
    let q = match h {
        Heating::Heat(q) => q.si(),
        Heating::ExitTemperature(t) => {
            let t = positive(t, "exit total temperature")?;
            g.h(t).map_err(|e| e.to_string())? - g.h(i.tt).map_err(|e| e.to_string())?
        }
    };
    let star = rayleigh::sonic_state(&g, s).map_err(fe)?;
    let q_max = g.h(star.tt).map_err(|e| e.to_string())? - g.h(i.tt).map_err(|e| e.to_string())?;
    let out = rayleigh::heat(&g, s, q).map_err(fe)?;
    step!(
        tr,
        "Tt",
        out.tt,
        Temperature,
        "h(Tt_out) = h(Tt_in) + q",
        [("Tt_in", i.tt, Temperature), ("q", q, SpecificEnergy)]
    );
    step!(
        tr,
        "M",
        out.mach,
        Mach,
        "Rayleigh line: rho V and p + rho V^2 constant, same branch; chokes at Mach 1",
        [
            ("M_in", s.mach, Mach),
            ("q", q, SpecificEnergy),
            ("q to choke", q_max, SpecificEnergy)
        ]
    );
    let st = finish(
        &g,
        to,
        i.w,
        out.tt,
        out.pt,
        i.comp,
        Some(out),
        "Rayleigh heating",
        tr,
    )?;
    let mut r = ProcessResult::new(st);
    r.figures = Figures::of(&[
        ("heat", q),
        ("max_heat", q_max),
        ("exit_tt", out.tt),
        ("mach_in", s.mach),
        ("mach_out", out.mach),
        ("recovery", out.pt / i.pt),
    ]);
    Ok(r)
}
