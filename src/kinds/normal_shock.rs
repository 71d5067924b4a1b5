//! Normal shock: the Rankine-Hugoniot jump from a supersonic upstream state.

use super::prelude::*;

/// The normal shock has no givens and one mode.
pub struct NormalShock;

impl ProcessKind for NormalShock {
    fn name(&self) -> &'static str {
        "normal shock"
    }

    fn mode_label(&self) -> String {
        "normal shock".into()
    }

    givens!(this, f => {
        let _ = (this, f);
    });

    fn sets_exit_statics(&self, _exit: &Station) -> bool {
        true
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        &["mach_in", "mach_out", "recovery", "p_ratio"]
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        normal_shock(ctx, io.input()?, io.from, io.to, tr)
    }
}

/// What the kind chooser offers (listed with the oblique shock).
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![("normal shock", Kind::NormalShock)]
}

fn normal_shock(
    ctx: &Ctx,
    i: &StationValue,
    from: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let up = need_statics(i, from, "a normal shock")?;
    let dn = shock::normal(&g, up).map_err(fe)?;
    step!(
        tr,
        "M",
        dn.mach,
        Mach,
        match g {
            Gas::Perfect(_) => "Rankine-Hugoniot: M2^2 = (1 + (g-1)/2 M1^2)/(g M1^2 - (g-1)/2)",
            Gas::Thermal(_) =>
                "mass, momentum and energy conserved across the shock, solved for rho1/rho2 with h(T)",
        },
        [
            ("M1", up.mach, Mach),
            ("T1", up.t, Temperature),
            ("p1", up.p, Pressure)
        ]
    );
    step!(
        tr,
        "pt",
        dn.pt,
        Pressure,
        "pt2 = p2 exp((phi(Tt) - phi(T2))/R), Tt unchanged",
        [("p2", dn.p, Pressure), ("T2", dn.t, Temperature)]
    );
    let out = finish(
        &g,
        to,
        i.w,
        i.tt,
        dn.pt,
        i.comp,
        Some(dn),
        "normal shock",
        tr,
    )?;
    let mut r = ProcessResult::new(out);
    r.figures = Figures::of(&[
        ("mach_in", up.mach),
        ("mach_out", dn.mach),
        ("recovery", dn.pt / up.pt),
        ("p_ratio", dn.p / up.p),
    ]);
    Ok(r)
}
