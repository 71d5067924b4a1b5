//! A trivial kind that exists only in the unit tests: an adiabatic
//! total-pressure tap that keeps a given fraction of the total pressure.
//! It shows what a new kind costs: this file, its variant in `Kind` (the
//! file format) and one line in the registry; the engine, the workbook
//! walk over givens, paths, explanations and summaries need nothing else.

use super::prelude::*;
use serde::{Deserialize, Serialize};

/// The tap's one given.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Probe {
    /// pt_out/pt_in.
    pub keep: Given,
    /// When set, the kept fraction goes through a root finder held to
    /// this many iterations (x^3 = keep^3, a root the solver must find):
    /// how the tests force a solver that does not converge.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cap: Option<u32>,
}

impl ProcessKind for Probe {
    fn name(&self) -> &'static str {
        "probe"
    }

    fn mode_label(&self) -> String {
        "probe: keeps a fraction of pt".into()
    }

    givens!(this, f => {
        let Probe { keep, .. } = this;
        f("keep", Quantity::Ratio, keep);
    });

    fn figure_keys(&self) -> &'static [&'static str] {
        &["recovery"]
    }

    fn run(&self, ctx: &Ctx, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
        let i = io.input()?;
        let mut keep = ratio(&self.keep, "kept fraction", 0.0, 1.0)?;
        if let Some(cap) = self.cap {
            let k3 = keep.powi(3);
            keep = crate::roots::newton_monotone(
                |x| Ok::<_, crate::flow::FlowError>((x * x * x - k3, 3.0 * x * x)),
                0.0,
                1.0,
                0.999,
                true,
                1e-14,
                1e-15,
                cap,
            )
            .map_err(|e| crate::flow::FlowError::from_solve("kept fraction from its cube", e))
            .map_err(fe)?;
        }
        let pt = keep * i.pt;
        step!(
            tr,
            "pt",
            pt,
            Pressure,
            "pt_out = keep pt_in",
            [("pt_in", i.pt, Pressure), ("keep", keep, Ratio)]
        );
        let g = gas(ctx, &i.comp)?;
        let out = finish(&g, io.to, i.w, i.tt, pt, i.comp, None, "probe", tr)?;
        let mut r = ProcessResult::new(out);
        r.figures = Figures::of(&[("recovery", keep)]);
        Ok(r)
    }
}

/// The chooser does not offer the test kind.
pub fn fresh() -> Vec<(&'static str, Kind)> {
    Vec::new()
}

#[cfg(test)]
mod tests {
    use crate::engine::Engine;

    const SHEET: &str = r#"(
    format: 1,
    title: "probe kind test (invented)",
    ambient: (
        condition: Measured(pressure: "101325 Pa", temperature: "288.15 K"),
        flight: Mach("0"),
    ),
    gas: CaloricallyPerfect(gamma: "1.4", r: "287.05 J/(kg K)"),
    stations: [(name: "1"), (name: "2")],
    processes: [
        (name: "plenum", to: "1", kind: Entry(Plenum(tt: "300 K", pt: "200 kPa", w: "2 kg/s"))),
        (name: "tap", from: "1", to: "2", kind: Probe((keep: "0.95"))),
    ],
)"#;

    #[test]
    fn a_kind_added_through_the_registry_evaluates_and_is_addressable() {
        let book = crate::format::parse(SHEET).unwrap();
        let mut e = Engine::new(book).unwrap();
        assert!(e.problems().is_empty(), "{:?}", e.problems());
        // Independent relation: pt2 = keep * pt1, Tt and W unchanged.
        assert_eq!(e.value("station.2.pt").unwrap(), Some(190_000.0));
        assert_eq!(e.value("station.2.tt").unwrap(), Some(300.0));
        assert_eq!(e.value("process.tap.recovery").unwrap(), Some(0.95));
        // Its given is walked, settable by path and checked like any other.
        e.set_given("process.tap.keep", "0.5").unwrap();
        assert_eq!(e.value("station.2.pt").unwrap(), Some(100_000.0));
        assert!(
            e.book()
                .givens()
                .iter()
                .any(|(p, ..)| p == "process.tap.keep")
        );
        // The name in problems and explanations comes from the kind.
        e.set_given("process.tap.keep", "1.5").unwrap();
        let p = e.problems();
        assert!(p[0].place.starts_with("probe \"tap\""), "{p:?}");
        // The file format writes it back.
        let text = crate::format::to_text(e.book());
        let back = crate::format::parse(&text).unwrap();
        assert!(text.contains("Probe("), "{text}");
        assert_eq!(back.given("process.tap.keep").unwrap().1.text(), "1.5");
    }

    #[test]
    fn a_solver_held_below_convergence_is_a_problem_naming_the_process_and_the_stop() {
        // Forced: one Newton step from 0.999 cannot reach the cube root
        // of 0.5^3; the stop reason reaches the problem list on the
        // process, and the station after it is blocked rather than given
        // the last iterate.
        let text = SHEET.replace("Probe((keep: \"0.95\"))", "Probe((keep: \"0.5\", cap: 1))");
        let e = Engine::new(crate::format::parse(&text).unwrap()).unwrap();
        let p = e.problems();
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].place, "probe \"tap\"");
        assert!(
            p[0].message.contains("kept fraction from its cube")
                && p[0]
                    .message
                    .contains("no converged solution after 1 iterations"),
            "{}",
            p[0].message
        );
        assert_eq!(e.value("station.2.pt").unwrap(), None);
        // With room to converge the same process computes pt2 = 0.5 pt1.
        let text = text.replace("cap: 1", "cap: 60");
        let e = Engine::new(crate::format::parse(&text).unwrap()).unwrap();
        assert!(e.problems().is_empty(), "{:?}", e.problems());
        let pt = e.value("station.2.pt").unwrap().unwrap();
        assert!((pt - 100_000.0).abs() < 1e-6, "{pt}");
    }
}
