//! Split: one stream into a core stream (`to`) and a bypass stream by a
//! bypass ratio, both at the upstream totals.

use super::prelude::*;

impl ProcessKind for Split {
    fn name(&self) -> &'static str {
        "split"
    }

    fn mode_label(&self) -> String {
        "split by bypass ratio".into()
    }

    givens!(this, f => {
        let Split { bypass_ratio, .. } = this;
        f("bypass_ratio", Quantity::Ratio, bypass_ratio);
    });

    fn figure_keys(&self) -> &'static [&'static str] {
        &["bypass_ratio", "w"]
    }

    names!(this, f => {
        let Split { bypass, .. } = this;
        f(NameOf::Output, bypass);
    });

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        split(ctx, self, io, tr)
    }
}

/// What the kind chooser offers: a split with no bypass station yet (the
/// terminal asks for the new station's name and adds it).
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "split into core and bypass (adds the bypass station)",
        Kind::Split(Split {
            bypass_ratio: Given::raw("1"),
            bypass: String::new(),
        }),
    )]
}

fn split(ctx: &Ctx, s: &Split, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
    let i = io.input()?;
    let bpr = ratio(&s.bypass_ratio, "bypass ratio", 0.0, 100.0)?;
    let to2 = io
        .to2
        .ok_or_else(|| format!("bypass station \"{}\" is missing", s.bypass))?;
    let g = gas(ctx, &i.comp)?;
    let wc = i.w / (1.0 + bpr);
    step!(
        tr,
        "W core",
        wc,
        MassFlow,
        "W_core = W/(1 + BPR)",
        [("W", i.w, MassFlow), ("BPR", bpr, Ratio)]
    );
    step!(
        tr,
        "W bypass",
        i.w - wc,
        MassFlow,
        "W_bypass = W - W_core (same Tt and pt in both streams)",
        [("W", i.w, MassFlow), ("W core", wc, MassFlow)]
    );
    let core = finish(&g, io.to, wc, i.tt, i.pt, i.comp, None, "split", tr)?;
    let byp = finish(
        &g,
        to2,
        i.w - wc,
        i.tt,
        i.pt,
        i.comp,
        None,
        "split",
        &mut Tracer::off(),
    )?;
    let mut r = ProcessResult::new(core);
    r.out2 = Some(Box::new(byp));
    r.figures = Figures::of(&[("bypass_ratio", bpr), ("w", i.w)]);
    Ok(r)
}
