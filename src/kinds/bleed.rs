//! Bleed: part of a stream taken off at its total state, by a fraction of
//! the flow entering or by a mass flow. The rest goes on (`to`); the bled
//! air goes to its own station, which a turbine may take as cooling air;
//! when nothing takes it, it leaves the engine (overboard or customer
//! bleed) and the summary counts it.

use super::prelude::*;

impl ProcessKind for Bleed {
    fn name(&self) -> &'static str {
        "bleed"
    }

    fn mode_label(&self) -> String {
        match self.amount {
            BleedAmount::Fraction(_) => "bleed: fraction of the flow given",
            BleedAmount::Flow(_) => "bleed: bled flow given",
        }
        .into()
    }

    givens!(this, f => {
        let Bleed { amount, .. } = this;
        match amount {
            BleedAmount::Fraction(x) => f("bleed_fraction", Quantity::Ratio, x),
            BleedAmount::Flow(w) => f("bleed_flow", Quantity::MassFlow, w),
        }
    });

    fn figure_keys(&self) -> &'static [&'static str] {
        &["bleed_flow", "bleed_fraction", "w"]
    }

    names!(this, f => {
        let Bleed { bled, .. } = this;
        f(NameOf::Output, bled);
    });

    fn next_mode(&self, now: Option<&ProcessResult>) -> Option<Kind> {
        Some(Kind::Bleed(Bleed {
            amount: match &self.amount {
                BleedAmount::Fraction(_) => {
                    BleedAmount::Flow(seed(figure(now, "bleed_flow"), 1.0, "kg/s", "0.5 kg/s"))
                }
                BleedAmount::Flow(_) => {
                    BleedAmount::Fraction(seed(figure(now, "bleed_fraction"), 1.0, "", "0.05"))
                }
            },
            bled: self.bled.clone(),
        }))
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        bleed(ctx, self, io, tr)
    }
}

/// What the kind chooser offers: a bleed with no bled station yet (the
/// terminal asks for the new station's name and adds it).
pub fn fresh() -> Vec<(&'static str, Kind)> {
    vec![(
        "bleed (adds the bled air's station)",
        Kind::Bleed(Bleed {
            amount: BleedAmount::Fraction(Given::raw("0.05")),
            bled: String::new(),
        }),
    )]
}

fn bleed(ctx: &Ctx, b: &Bleed, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
    let i = io.input()?;
    let to2 = io
        .to2
        .ok_or_else(|| format!("bled station \"{}\" is missing", b.bled))?;
    let wb = match &b.amount {
        BleedAmount::Fraction(x) => i.w * ratio(x, "bled fraction", 0.0, 1.0)?,
        BleedAmount::Flow(w) => {
            let w = w.si();
            if !(w.is_finite() && w >= 0.0) {
                return Err("a bled flow is zero or positive".into());
            }
            w
        }
    };
    if wb >= i.w {
        return Err(format!(
            "the bleed takes {wb:.4} kg/s of the {:.4} kg/s entering: nothing would go on",
            i.w
        ));
    }
    let g = gas(ctx, &i.comp)?;
    step!(
        tr,
        "W bled",
        wb,
        MassFlow,
        "W_bled = fraction x W (or given); same Tt, pt and composition as the inflow",
        [("W", i.w, MassFlow)]
    );
    step!(
        tr,
        "W",
        i.w - wb,
        MassFlow,
        "W_out = W - W_bled",
        [("W", i.w, MassFlow), ("W bled", wb, MassFlow)]
    );
    let main = finish(&g, io.to, i.w - wb, i.tt, i.pt, i.comp, None, "bleed", tr)?;
    let bled = finish(
        &g,
        to2,
        wb,
        i.tt,
        i.pt,
        i.comp,
        None,
        "bleed",
        &mut Tracer::off(),
    )?;
    let mut r = ProcessResult::new(main);
    r.out2 = Some(Box::new(bled));
    r.figures = Figures::of(&[("bleed_flow", wb), ("bleed_fraction", wb / i.w), ("w", i.w)]);
    Ok(r)
}
