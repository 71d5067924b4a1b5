//! Entry: where flow enters the workbook (free stream, plenum, choked plenum).

use super::prelude::*;

impl ProcessKind for Entry {
    fn name(&self) -> &'static str {
        "entry"
    }

    fn mode_label(&self) -> String {
        match self {
            Entry::Freestream { .. } => "entry: free stream from the ambient block",
            Entry::Plenum { .. } => "entry: given Tt, pt and mass flow",
            Entry::ChokedPlenum { .. } => "entry: given Tt, pt; flow from a choked throat",
        }
        .into()
    }

    givens!(this, f => match this {
        Entry::Freestream { w } => f("w", Quantity::MassFlow, w),
        Entry::Plenum { tt, pt, w } => {
            f("tt", Quantity::Temperature, tt);
            f("pt", Quantity::Pressure, pt);
            f("w", Quantity::MassFlow, w);
        }
        Entry::ChokedPlenum {
            tt,
            pt,
            throat_area,
        } => {
            f("tt", Quantity::Temperature, tt);
            f("pt", Quantity::Pressure, pt);
            f("throat_area", Quantity::Area, throat_area);
        }
    });

    fn sets_exit_statics(&self, exit: &Station) -> bool {
        matches!(self, Entry::Freestream { .. }) && exit.statics.is_none()
    }

    fn grid_given(&self, station_key: &str) -> Option<&'static str> {
        match (self, station_key) {
            (Entry::Plenum { .. } | Entry::ChokedPlenum { .. }, "tt") => Some("tt"),
            (Entry::Plenum { .. } | Entry::ChokedPlenum { .. }, "pt") => Some("pt"),
            (Entry::Plenum { .. } | Entry::Freestream { .. }, "w") => Some("w"),
            _ => None,
        }
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        match self {
            Entry::Freestream { .. } => &["w", "mach_out"],
            Entry::Plenum { .. } => &["w"],
            Entry::ChokedPlenum { .. } => &["w", "throat_area"],
        }
    }

    fn is_entry(&self) -> bool {
        true
    }

    fn reads(&self) -> Reads {
        Reads {
            ambient: true,
            ..Reads::default()
        }
    }

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        let out = now.map(|r| r.out);
        let tt = || seed(out.map(|o| o.tt), 1.0, "K", "288.15 K");
        let pt = || seed(out.map(|o| o.pt), 1000.0, "kPa", "101.325 kPa");
        let w = || seed(out.map(|o| o.w), 1.0, "kg/s", "10 kg/s");
        Some(Kind::Entry(match self {
            Entry::Freestream { w } => Entry::Plenum {
                tt: tt(),
                pt: pt(),
                w: w.clone(),
            },
            Entry::Plenum { tt, pt, .. } => Entry::ChokedPlenum {
                tt: tt.clone(),
                pt: pt.clone(),
                // A plenum reports no sonic area, so the throat starts from
                // a default; sizing it to today's flow is left to a goal.
                throat_area: Given::raw("0.01 m2"),
            },
            Entry::ChokedPlenum { .. } => Entry::Freestream { w: w() },
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        entry(ctx, self, io.to, tr)
    }
}

/// What the kind chooser offers.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "entry (plenum)",
        Kind::Entry(Entry::Plenum {
            tt: Given::raw("288.15 K"),
            pt: Given::raw("101.325 kPa"),
            w: Given::raw("10 kg/s"),
        }),
    )]
}

fn entry(ctx: &Ctx, e: &Entry, to: &Station, tr: &mut Tracer) -> Res<ProcessResult> {
    let air = ctx.ambient.air;
    let g = gas(ctx, &air)?;
    let mut r = match e {
        Entry::Freestream { w } => {
            let w = positive(w, "captured mass flow")?;
            let a = ctx.ambient;
            step!(
                tr,
                "Tt",
                a.flow.tt,
                Temperature,
                "h(Tt) = h(T0) + V0^2/2 (free stream brought to rest adiabatically)",
                [("T0", a.flow.t, Temperature), ("V0", a.flow.v, Velocity)]
            );
            step!(
                tr,
                "pt",
                a.flow.pt,
                Pressure,
                "pt = p0 exp((phi(Tt) - phi(T0))/R) (isentropic)",
                [
                    ("p0", a.flow.p, Pressure),
                    ("Tt", a.flow.tt, Temperature),
                    ("T0", a.flow.t, Temperature)
                ]
            );
            let intrinsic = if to.statics.is_none() {
                Some(a.flow)
            } else {
                None
            };
            let out = finish(
                &g,
                to,
                w,
                a.flow.tt,
                a.flow.pt,
                air,
                intrinsic,
                "free stream",
                tr,
            )?;
            let mut r = ProcessResult::new(out);
            r.ram_drag = w * a.flow.v;
            r.entry_ke = 0.5 * w * a.flow.v * a.flow.v;
            r.air_in = w / air.mass_per_kg_air();
            r.figures = Figures::of(&[("w", w), ("mach_out", a.flow.mach)]);
            r
        }
        Entry::Plenum { tt, pt, w } => {
            let (tt, pt, w) = (
                positive(tt, "total temperature")?,
                positive(pt, "total pressure")?,
                positive(w, "mass flow")?,
            );
            let out = finish(&g, to, w, tt, pt, air, None, "entry", tr)?;
            let mut r = ProcessResult::new(out);
            r.air_in = w / air.mass_per_kg_air();
            r.figures = Figures::of(&[("w", w)]);
            r
        }
        Entry::ChokedPlenum {
            tt,
            pt,
            throat_area,
        } => {
            let (tt, pt, at) = (
                positive(tt, "total temperature")?,
                positive(pt, "total pressure")?,
                positive(throat_area, "throat area")?,
            );
            let star = isentropic::sonic(&g, tt, pt).map_err(fe)?;
            let w = star.flux() * at;
            step!(
                tr,
                "W",
                w,
                MassFlow,
                "choked throat: W = rho* a* A* at Mach 1 on the isentrope of (Tt, pt)",
                [
                    ("Tt", tt, Temperature),
                    ("pt", pt, Pressure),
                    ("A*", at, Area)
                ]
            );
            let out = finish(&g, to, w, tt, pt, air, None, "entry", tr)?;
            let mut r = ProcessResult::new(out);
            r.air_in = w / air.mass_per_kg_air();
            r.figures = Figures::of(&[("w", w), ("throat_area", at)]);
            r
        }
    };
    if r.out.w <= 0.0 {
        return Err("mass flow must be positive".into());
    }
    r.out.comp = air;
    Ok(r)
}
