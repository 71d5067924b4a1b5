//! Oblique shock: a weak or strong solution of the theta-beta-M relation
//! for a given deflection.

use super::prelude::*;

impl ProcessKind for Oblique {
    fn name(&self) -> &'static str {
        "oblique shock"
    }

    fn mode_label(&self) -> String {
        match self.strength {
            Strength::Weak => "oblique shock (weak solution)",
            Strength::Strong => "oblique shock (strong solution)",
        }
        .into()
    }

    givens!(this, f => {
        let Oblique { deflection, .. } = this;
        f("deflection", Quantity::Angle, deflection);
    });

    fn sets_exit_statics(&self, _exit: &Station) -> bool {
        true
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        &[
            "beta",
            "max_deflection",
            "mach_in",
            "mach_out",
            "recovery",
            "p_ratio",
        ]
    }

    fn next_mode(&self, _now: Option<&ProcessResult>) -> Option<Kind> {
        Some(Kind::ObliqueShock(Oblique {
            deflection: self.deflection.clone(),
            strength: match self.strength {
                Strength::Weak => Strength::Strong,
                Strength::Strong => Strength::Weak,
            },
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        oblique(ctx, self, io, tr)
    }
}

/// What the kind chooser offers: both shocks, normal first.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    let mut v = super::normal_shock::fresh();
    v.push((
        "oblique shock",
        Kind::ObliqueShock(Oblique {
            deflection: Given::raw("10 deg"),
            strength: Strength::Weak,
        }),
    ));
    v
}

fn oblique(ctx: &Ctx, o: &Oblique, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
    let s = io.input()?;
    let g = gas(ctx, &s.comp)?;
    let up = need_statics(s, io.from, "an oblique shock")?;
    let theta = o.deflection.si();
    let ob = shock::oblique(&g, up, theta, o.strength).map_err(fe)?;
    step!(
        tr,
        "beta",
        ob.beta,
        Angle,
        "theta-beta-M relation: tan(beta - theta) = tan(beta) rho1/rho2 with the normal shock on M1 sin(beta)",
        [("M1", up.mach, Mach), ("theta", theta, Angle)]
    );
    let out = finish(
        &g,
        io.to,
        s.w,
        s.tt,
        ob.down.pt,
        s.comp,
        Some(ob.down),
        "oblique shock",
        tr,
    )?;
    let mut r = ProcessResult::new(out);
    r.figures = Figures::of(&[
        ("beta", ob.beta),
        ("max_deflection", ob.max_deflection),
        ("mach_in", up.mach),
        ("mach_out", ob.down.mach),
        ("recovery", ob.down.pt / up.pt),
        ("p_ratio", ob.down.p / up.p),
    ]);
    Ok(r)
}
