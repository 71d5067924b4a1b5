//! Secondary air: the cooled turbojet demo (5 % of the air bled overboard
//! at compressor delivery, 3 % cooling the turbine's vanes, 2 % its rotor)
//! against an independent calculation written here: the same species
//! polynomials (through `Composition::mixture`), the mixing done by hand
//! (fuel-air ratios weighted by dry air, sensible enthalpies added, each
//! temperature found by bisection), the shaft balance and the turbine's
//! isentropic efficiency from their definitions.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::Engine;
use stationwise::format;
use stationwise::gas::{Composition, Fuel, Mixture, T_REFERENCE, Thermo};

fn engine() -> Engine {
    let path = format!("{}/sheets/cooled-turbojet.ron", env!("CARGO_MANIFEST_DIR"));
    let book = format::load(std::path::Path::new(&path)).unwrap();
    Engine::new(book).unwrap()
}

fn v(e: &Engine, path: &str) -> f64 {
    e.value(path)
        .unwrap_or_else(|err| panic!("{path}: {err}"))
        .unwrap_or_else(|| panic!("{path}: no value"))
}

fn gas(far: f64) -> Mixture {
    Composition::dry_air()
        .burnt(far, Fuel::KEROSENE)
        .unwrap()
        .mixture()
}

/// Sensible enthalpy per kg of mixture.
fn hs(m: &Mixture, t: f64) -> f64 {
    m.h(t).unwrap() - m.h(T_REFERENCE).unwrap()
}

/// Temperature of a sensible enthalpy, by bisection to 1e-12 K.
fn t_of(m: &Mixture, h: f64) -> f64 {
    let (mut lo, mut hi) = (200.0, 3000.0);
    while hi - lo > 1e-12 * hi {
        let mid = 0.5 * (lo + hi);
        if hs(m, mid) < h {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

#[test]
fn mass_energy_and_shaft_balance_close() {
    let e = engine();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let w0 = v(&e, "station.0.w");
    let wf = v(&e, "process.combustor.fuel_flow");
    let w_out = v(&e, "station.3c.w");
    let w9 = v(&e, "station.9.w");
    // Mass: what comes in leaves through the nozzle or overboard.
    assert!(rel(w9 + w_out, w0 + wf) < 1e-12, "{w9} {w_out} {w0} {wf}");
    assert!(rel(w_out, 0.05 * w0) < 1e-12);
    assert!(rel(v(&e, "station.3v.w"), 0.03 * w0) < 1e-12);
    assert!(rel(v(&e, "station.3r.w"), 0.02 * w0) < 1e-12);
    // The summary lists the bleed.
    assert!(rel(e.summary().get("bleed_overboard").unwrap(), w_out) < 1e-12);
    // Shaft: turbine power x mechanical efficiency = compressor power.
    let pc = v(&e, "process.compressor.power");
    let pt = v(&e, "process.turbine.power");
    assert!((pt * 0.99 - pc).abs() < 1e-9 * pc, "{pt} {pc}");
    // Energy over the whole engine (sensible enthalpy flows, W):
    // air in + heat released + compressor - turbine = jet + bleed.
    let air = gas(0.0);
    let far9 = v(&e, "station.9.far");
    let inflow = w0 * hs(&air, v(&e, "station.0.tt"));
    let heat = wf * 0.995 * 43.1e6;
    let jet = w9 * hs(&gas(far9), v(&e, "station.9.tt"));
    let bled = w_out * hs(&air, v(&e, "station.3c.tt"));
    let residual = inflow + heat + pc - pt - jet - bled;
    assert!(residual.abs() < 1e-9 * heat, "{residual}");
}

#[test]
fn turbine_entry_and_exit_match_a_hand_calculation() {
    let e = engine();
    let (w4, tt4, pt4, far4) = (
        v(&e, "station.4.w"),
        v(&e, "station.4.tt"),
        v(&e, "station.4.pt"),
        v(&e, "station.4.far"),
    );
    let (wv, tv) = (v(&e, "station.3v.w"), v(&e, "station.3v.tt"));
    let (wr, tr) = (v(&e, "station.3r.w"), v(&e, "station.3r.tt"));
    let air4 = w4 / (1.0 + far4);
    // Vane cooling mixed in: the rotor inlet.
    let far41 = far4 * air4 / (air4 + wv);
    let g41 = gas(far41);
    let h41 = (w4 * hs(&gas(far4), tt4) + wv * hs(&gas(0.0), tv)) / (w4 + wv);
    let tt41 = t_of(&g41, h41);
    assert!(
        rel(v(&e, "process.turbine.rotor_inlet_tt"), tt41) < 1e-9,
        "{tt41}"
    );
    // Work from the shaft balance, on the flow through the rotor.
    let pc = v(&e, "process.compressor.power");
    let work = pc / 0.99 / (w4 + wv);
    let t_exp = t_of(&g41, h41 - work);
    let t_ideal = t_of(&g41, h41 - work / 0.89);
    let pt5 = pt4 * ((g41.phi(t_ideal).unwrap() - g41.phi(tt41).unwrap()) / g41.r()).exp();
    // Rotor cooling mixed in after the work.
    let far5 = far4 * air4 / (air4 + wv + wr);
    let g5 = gas(far5);
    let h5 = ((w4 + wv) * hs(&g41, t_exp) + wr * hs(&gas(0.0), tr)) / (w4 + wv + wr);
    let tt5 = t_of(&g5, h5);
    assert!(rel(v(&e, "station.5.tt"), tt5) < 1e-9, "{tt5}");
    assert!(rel(v(&e, "station.5.pt"), pt5) < 1e-9, "{pt5}");
    assert!(rel(v(&e, "station.5.far"), far5) < 1e-12, "{far5}");
    assert!(rel(v(&e, "station.5.w"), w4 + wv + wr) < 1e-12);
}

#[test]
fn interstage_bleed_takes_its_share_of_the_work() {
    // A compressor bleeding 10 % at 40 % of its rise: the bled air has
    // h_in + 0.4 w and pt_in + 0.4 (pt_out - pt_in); the power is the
    // exit flow's full work plus the bled flow's part (the definition).
    let path = format!("{}/sheets/turbojet.ron", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(path).unwrap();
    let text = text
        .replace(
            "        (\n            name: \"4\",",
            "        (\n            name: \"25\",\n        ),\n        (\n            name: \"4\",",
        )
        .replace(
            "                shaft: \"spool\",\n            )),\n        ),\n        (\n            name: \"combustor\",",
            "                shaft: \"spool\",\n                bleed: (station: \"25\", fraction: \"0.1\", position: \"0.4\"),\n            )),\n        ),\n        (\n            name: \"combustor\",",
        );
    assert!(text.contains("bleed: (station"), "the edit did not apply");
    let e = Engine::new(format::parse(&text).unwrap()).unwrap();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let (w2, tt2, pt2) = (
        v(&e, "station.2.w"),
        v(&e, "station.2.tt"),
        v(&e, "station.2.pt"),
    );
    let (tt3, pt3) = (v(&e, "station.3.tt"), v(&e, "station.3.pt"));
    let air = gas(0.0);
    let work = hs(&air, tt3) - hs(&air, tt2);
    assert!(rel(v(&e, "station.3.w"), 0.9 * w2) < 1e-12);
    assert!(rel(v(&e, "station.25.w"), 0.1 * w2) < 1e-12);
    let tb = t_of(&air, hs(&air, tt2) + 0.4 * work);
    assert!(rel(v(&e, "station.25.tt"), tb) < 1e-9, "{tb}");
    assert!(rel(v(&e, "station.25.pt"), pt2 + 0.4 * (pt3 - pt2)) < 1e-12);
    let power = 0.9 * w2 * work + 0.1 * w2 * 0.4 * work;
    assert!(rel(v(&e, "process.compressor.power"), power) < 1e-9);
    // The shaft still balances, with the bled air's work in it.
    assert!(rel(v(&e, "process.turbine.power") * 0.99, power) < 1e-9);
    assert!(rel(e.summary().get("bleed_overboard").unwrap(), 0.1 * w2) < 1e-12);
}
