//! Nozzle to the ambient: convergent or convergent-divergent, exit area
//! matched or given, with velocity and discharge coefficients.

use super::prelude::*;

impl ProcessKind for Nozzle {
    fn name(&self) -> &'static str {
        "nozzle"
    }

    fn mode_label(&self) -> String {
        format!(
            "nozzle: {}, {}",
            match self.shape {
                Shape::Convergent => "convergent",
                Shape::ConvergentDivergent => "convergent-divergent",
            },
            match self.exit {
                Exit::Matched => "exit area derived",
                Exit::Area(_) => "exit area given",
            }
        )
    }

    givens!(this, f => {
        let Nozzle { exit, cfg, cd, .. } = this;
        if let Exit::Area(a) = exit {
            f("area", Quantity::Area, a);
        }
        f("cfg", Quantity::Ratio, cfg);
        f("cd", Quantity::Ratio, cd);
    });

    fn sets_exit_statics(&self, _exit: &Station) -> bool {
        true
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        &[
            "thrust",
            "area",
            "throat_area",
            "required_area",
            "mach_out",
            "v_effective",
            "v_ideal",
            "thrust_ideal",
            "exit_p_ratio",
            "npr",
            "choked",
        ]
    }

    fn discharges(&self) -> bool {
        true
    }

    fn reads(&self) -> Reads {
        Reads {
            ambient: true,
            ..Reads::default()
        }
    }

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        // A given exit area starts from the area the nozzle has now.
        let area_now = || Exit::Area(seed(figure(now, "area"), 1.0, "m2", "0.05 m2"));
        let (shape, exit) = match (&self.shape, &self.exit) {
            (Shape::Convergent, Exit::Matched) => (Shape::Convergent, area_now()),
            (Shape::Convergent, Exit::Area(a)) => {
                (Shape::ConvergentDivergent, Exit::Area(a.clone()))
            }
            (Shape::ConvergentDivergent, Exit::Area(_)) => {
                (Shape::ConvergentDivergent, Exit::Matched)
            }
            (Shape::ConvergentDivergent, Exit::Matched) => (Shape::Convergent, Exit::Matched),
        };
        Some(Kind::Nozzle(Nozzle {
            shape,
            exit,
            cfg: self.cfg.clone(),
            cd: self.cd.clone(),
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        nozzle(ctx, self, io.input()?, io.to, tr)
    }
}

/// What the kind chooser offers.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "nozzle",
        Kind::Nozzle(Nozzle {
            shape: Shape::Convergent,
            exit: Exit::Matched,
            cfg: Given::raw("0.98"),
            cd: Given::raw("0.98"),
        }),
    )]
}

fn nozzle(
    ctx: &Ctx,
    n: &Nozzle,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let cfg = ratio(&n.cfg, "gross thrust coefficient", 0.5, 1.0)?;
    let cd = ratio(&n.cd, "discharge coefficient", 0.5, 1.0)?;
    let p_amb = ctx.ambient.flow.p;
    if i.pt <= p_amb {
        return Err(format!(
            "the nozzle cannot discharge: total pressure {:.0} Pa is not above the ambient {p_amb:.0} Pa (reverse flow)",
            i.pt
        ));
    }
    let star = isentropic::sonic(&g, i.tt, i.pt).map_err(fe)?;
    let npr = i.pt / p_amb;
    let choked = star.p >= p_amb;
    step!(
        tr,
        "p*",
        star.p,
        Pressure,
        "sonic static pressure on the isentrope of (Tt, pt); choked when p* >= p_ambient",
        [
            ("Tt", i.tt, Temperature),
            ("pt", i.pt, Pressure),
            ("p ambient", p_amb, Pressure)
        ]
    );
    let throat_eff = if choked { i.w / star.flux() } else { f64::NAN };
    let (exit, area_eff) = match (&n.shape, &n.exit) {
        (Shape::Convergent, Exit::Matched) => {
            let e = if choked {
                star
            } else {
                isentropic::from_pressure(&g, i.tt, i.pt, p_amb).map_err(fe)?
            };
            (e, i.w / e.flux())
        }
        (Shape::ConvergentDivergent, Exit::Matched) => {
            let e = isentropic::from_pressure(&g, i.tt, i.pt, p_amb.min(i.pt)).map_err(fe)?;
            (e, i.w / e.flux())
        }
        (shape, Exit::Area(a)) => {
            let a_eff = positive(a, "nozzle exit area")? * cd;
            let branch = if *shape == Shape::ConvergentDivergent && choked {
                Branch::Supersonic
            } else {
                Branch::Subsonic
            };
            // An area given to six significant figures that is the sonic
            // area (a user copying the derived area, or switching to a
            // given area from a matched one) passes the flow at Mach 1:
            // within 1e-6 the area is taken as exactly sonic.
            let sonic_area = i.w / star.flux();
            let e = if (a_eff - sonic_area).abs() <= 1e-6 * sonic_area {
                Ok(star)
            } else {
                isentropic::from_flow(&g, i.tt, i.pt, i.w, a_eff, branch)
            }
            .map_err(|e| match e {
                FlowError::Choked { max_flow, .. } => format!(
                    "the nozzle is too small for the flow: at these total conditions it passes at most {max_flow:.4} kg/s, and {:.4} kg/s arrives",
                    i.w
                ),
                e => e.to_string(),
            })?;
            if e.mach < 1.0 - 1e-9 && (e.p / p_amb - 1.0).abs() > 5e-3 {
                return Err(format!(
                    "the exit area does not match the flow: a subsonic exit at p/p_ambient = {:.4}, but a subsonic jet leaves at ambient pressure; let the area be derived (exit: Matched) or vary an upstream given with a goal",
                    e.p / p_amb
                ));
            }
            if *shape == Shape::ConvergentDivergent && e.mach > 1.0 {
                let after = shock::normal(&g, &e).map_err(fe)?;
                if after.p < p_amb {
                    return Err(format!(
                        "over-expanded beyond a normal shock at the exit (p after a shock {:.0} Pa is below ambient {p_amb:.0} Pa): a shock stands inside the divergent section",
                        after.p
                    ));
                }
            }
            (e, a_eff)
        }
    };
    // The ideal nozzle of this shape at the same total state, flow and
    // pressure ratio, then the gross thrust coefficient on its thrust.
    let ideal = i.w * exit.v + (exit.p - p_amb) * area_eff;
    let thrust = cfg * ideal;
    step!(
        tr,
        "ideal gross thrust",
        ideal,
        Force,
        "F_ideal = W V_ideal + (p_exit - p_ambient) A_effective, V_ideal = sqrt(2 (h(Tt) - h(T_exit))), A_effective = Cd A",
        [
            ("W", i.w, MassFlow),
            ("V ideal", exit.v, Velocity),
            ("p exit", exit.p, Pressure),
            ("p ambient", p_amb, Pressure),
            ("A effective", area_eff, Area)
        ]
    );
    step!(
        tr,
        "gross thrust",
        thrust,
        Force,
        "F = Cfg F_ideal",
        [("Cfg", cfg, Ratio), ("F ideal", ideal, Force)]
    );
    // The station shows the ideal (isentropic) exit state, consistent in
    // itself, through the effective area, so rho V A = W there; the
    // geometric area, the effective jet velocity F/W and the ideal thrust
    // are figures.
    let out = StationValue {
        w: i.w,
        tt: i.tt,
        pt: i.pt,
        comp: i.comp,
        flow: Some(exit),
        area: Some(area_eff),
    };
    if to.statics.is_some() {
        return Err(format!(
            "station \"{}\" gives its static state, but the nozzle sets it; remove the station's static given",
            to.name
        ));
    }
    let mut r = ProcessResult::new(out);
    r.thrust = thrust;
    // Kinetic energy at the effective jet velocity F/W, so pressure thrust counts.
    r.exit_ke = 0.5 * thrust * thrust / i.w;
    r.figures = Figures::of(&[
        ("thrust", thrust),
        ("area", area_eff / cd),
        ("throat_area", throat_eff / cd),
        (
            "required_area",
            i.w / (if choked { star.flux() } else { exit.flux() }) / cd,
        ),
        ("mach_out", exit.mach),
        ("v_effective", thrust / i.w),
        ("v_ideal", exit.v),
        ("thrust_ideal", ideal),
        ("exit_p_ratio", exit.p / p_amb),
        ("npr", npr),
        ("choked", if choked { 1.0 } else { 0.0 }),
    ]);
    // An unchoked nozzle has no sonic throat: the figure is absent, not NaN.
    if !choked {
        r.figures.retain(|(k, _)| *k != "throat_area");
    }
    Ok(r)
}
