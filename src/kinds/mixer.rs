//! Constant-area mixer of the upstream stream and a second stream:
//! mass, momentum and energy conserved, subsonic exit.

use super::prelude::*;

impl ProcessKind for Mixer {
    fn name(&self) -> &'static str {
        "mixer"
    }

    fn mode_label(&self) -> String {
        "constant-area mixer".into()
    }

    givens!(this, f => {
        let Mixer { max_mismatch, .. } = this;
        if let Some(m) = max_mismatch {
            f("max_mismatch", Quantity::Ratio, m);
        }
    });

    fn sets_exit_statics(&self, _exit: &Station) -> bool {
        true
    }

    fn figure_keys(&self) -> &'static [&'static str] {
        &[
            "p_ratio_streams",
            "air_ratio_streams",
            "mach_out",
            "exit_tt",
        ]
    }

    names!(this, f => {
        let Mixer { secondary, .. } = this;
        f(NameOf::Input, secondary);
    });

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        let a = io.input()?;
        let b = io
            .inputs
            .get(1)
            .copied()
            .ok_or_else(|| format!("mixer needs the second stream \"{}\"", self.secondary))?;
        mixer(ctx, a, b, io.from, &self.secondary, io.to, tr)
    }
}

/// What the kind chooser offers: a mixer with no second stream yet (the
/// terminal offers the stations it can take it from).
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "mixer of two streams (picks the second stream's station)",
        Kind::Mixer(Mixer {
            secondary: String::new(),
            max_mismatch: None,
        }),
    )]
}

fn mixer(
    ctx: &Ctx,
    a: &StationValue,
    b: &StationValue,
    a_name: &str,
    b_name: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let sa = need_statics(a, a_name, "a constant-area mixer")?;
    let sb = need_statics(b, b_name, "a constant-area mixer")?;
    let (aa, ab) = (
        a.area.ok_or("mixer needs the primary stream's area")?,
        b.area.ok_or("mixer needs the secondary stream's area")?,
    );
    let ga = gas(ctx, &a.comp)?;
    let gb = gas(ctx, &b.comp)?;
    // Mixed composition per kg dry air, by dry-air flows.
    let air_a = a.w / a.comp.mass_per_kg_air();
    let air_b = b.w / b.comp.mass_per_kg_air();
    let comp = Composition::mix(&a.comp, air_a, &b.comp, air_b);
    let g = gas(ctx, &comp)?;
    let w = a.w + b.w;
    let e = |gs: &Gas, t: f64| gs.sensible_h(t).map_err(|e| e.to_string());
    let ht = (a.w * e(&ga, a.tt)? + b.w * e(&gb, b.tt)?) / w;
    let impulse = sa.p * aa + a.w * sa.v + sb.p * ab + b.w * sb.v;
    let area = aa + ab;
    let h_ref = g.h(crate::gas::T_REFERENCE).map_err(|e| e.to_string())?;
    let tt =
        crate::gas::invert_h(&g, ht + h_ref, 0.5 * (a.tt + b.tt)).map_err(|e| e.to_string())?;
    step!(
        tr,
        "Tt",
        tt,
        Temperature,
        "energy: W ht = W1 ht1 + W2 ht2 (sensible enthalpies)",
        [
            ("W1", a.w, MassFlow),
            ("Tt1", a.tt, Temperature),
            ("W2", b.w, MassFlow),
            ("Tt2", b.tt, Temperature)
        ]
    );
    let out = rayleigh::on_line(&g, w / area, impulse / area, tt, Branch::Subsonic).map_err(fe)?;
    step!(
        tr,
        "p",
        out.p,
        Pressure,
        "momentum: p A + W V = p1 A1 + W1 V1 + p2 A2 + W2 V2 with A = A1 + A2, subsonic root",
        [
            ("p1", sa.p, Pressure),
            ("p2", sb.p, Pressure),
            ("A", area, Area)
        ]
    );
    let st = finish(&g, to, w, tt, out.pt, comp, Some(out), "mixer", tr)?;
    let mut r = ProcessResult::new(st);
    r.figures = Figures::of(&[
        ("p_ratio_streams", sb.p / sa.p),
        // Dry air over dry air: the fuel burnt in either stream is not a
        // bypass flow.
        ("air_ratio_streams", air_b / air_a),
        ("mach_out", out.mach),
        ("exit_tt", tt),
    ]);
    Ok(r)
}
