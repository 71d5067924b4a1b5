//! Fuels by their atoms and equilibrium products, against Cantera 3.2.0.
//!
//! Reference: `tests/data/cantera_combustion.json`, written by
//! `tests/gen/reference_cantera.py` (its "source" field says how each value
//! was computed: absolute enthalpies of Cantera's species thermo, hydrogen
//! and methane as species of the data file, equilibrium by Cantera's
//! `equilibrate("TP")` with the standard state at 1e5 Pa). Only the species
//! coefficients are shared; the energy balance, the atom bookkeeping and the
//! equilibrium solver here are this crate's own.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use serde_json::Value;
use stationwise::book::Workbook;
use stationwise::engine::Engine;
use stationwise::flow::FlowError;
use stationwise::flow::combustion::{self, Burner, EquilibriumBurn};
use stationwise::gas::{Composition, Fuel, GasModel, Species, stoichiometric_far};

fn data() -> Value {
    let path = format!(
        "{}/tests/data/cantera_combustion.json",
        env!("CARGO_MANIFEST_DIR")
    );
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn num(v: &Value, k: &str) -> f64 {
    v[k].as_f64().unwrap_or_else(|| panic!("{k} in {v}"))
}

fn fuel_of(v: &Value) -> Fuel {
    let a: Vec<f64> = v["atoms"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect();
    Fuel::atoms(a[0], a[1], a[2], a[3]).unwrap()
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

#[test]
fn hydrogen_and_methane_frozen_match_cantera() {
    let d = data();
    let mut seen = 0;
    for c in d["cases"].as_array().unwrap() {
        if c["products"] != "frozen" {
            continue;
        }
        let fuel = fuel_of(c);
        let t_fuel = num(c, "fuel_t");
        // The fuel's own polynomial gives its sensible enthalpy.
        let hs = fuel.own_sensible_h(t_fuel).unwrap().unwrap();
        assert!(
            (hs - num(c, "fuel_sensible_h")).abs() <= 1e-9 * num(c, "lhv"),
            "{c}"
        );
        assert!(rel(stoichiometric_far(fuel), num(c, "far_stoich")) < 1e-12);
        let b = Burner {
            fuel,
            lhv: num(c, "lhv"),
            efficiency: 1.0,
            fuel_sensible: hs,
        };
        let burn = combustion::far_for_temperature(
            &GasModel::Thermal,
            &Composition::dry_air(),
            num(c, "tt_in"),
            num(c, "tt_out"),
            &b,
        )
        .unwrap();
        let e = rel(burn.far_added, num(c, "far"));
        assert!(
            e < 1e-9,
            "{}: far {} vs {} ({e:e})",
            c["fuel"],
            burn.far_added,
            c["far"]
        );
        seen += 1;
    }
    assert_eq!(seen, 4);
}

#[test]
fn hydrogen_combustor_in_a_workbook() {
    // The same first case through a workbook: fuel by atoms, its own
    // temperature, the exit temperature given.
    let d = data();
    let c = &d["cases"][1];
    assert_eq!(c["fuel"], "H2");
    let text = format!(
        r#"#![enable(implicit_some)]
(
    format: 1,
    title: "hydrogen burner (test)",
    ambient: (
        condition: Measured(pressure: "101.325 kPa", temperature: "288.15 K"),
        flight: Mach("0"),
    ),
    gas: ThermallyPerfect,
    stations: [(name: "3"), (name: "4")],
    processes: [
        (name: "supply", to: "3", kind: Entry(Plenum(tt: "{} K", pt: "2 MPa", w: "5 kg/s"))),
        (name: "burner", from: "3", to: "4", kind: Combustor((
            mode: ExitTemperature("{} K"),
            pressure_loss: "4 %",
            efficiency: "1",
            lhv: "{} J/kg",
            fuel: (c: "0", h: "2"),
            fuel_tt: "{} K",
        ))),
    ],
)"#,
        num(c, "tt_in"),
        num(c, "tt_out"),
        num(c, "lhv"),
        num(c, "fuel_t")
    );
    let book: Workbook = stationwise::format::parse(&text).unwrap();
    let e = Engine::new(book).unwrap();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let far = e.value("process.burner.far_added").unwrap().unwrap();
    assert!(rel(far, num(c, "far")) < 1e-9, "{far}");
    let st = e.value("process.burner.far_stoich").unwrap().unwrap();
    assert!(rel(st, num(c, "far_stoich")) < 1e-12);
    let phi = e
        .value("process.burner.equivalence_ratio")
        .unwrap()
        .unwrap();
    assert!(rel(phi, far / st) < 1e-12);
}

#[test]
fn equilibrium_fuel_air_ratio_and_composition_match_cantera() {
    let d = data();
    let mut seen = 0;
    for c in d["cases"].as_array().unwrap() {
        if c["products"] != "equilibrium" {
            continue;
        }
        let b = Burner {
            fuel: fuel_of(c),
            lhv: num(c, "lhv"),
            efficiency: 1.0,
            fuel_sensible: 0.0,
        };
        let air = Composition::dry_air();
        let eq = EquilibriumBurn {
            inlet: &air,
            tt_in: num(c, "tt_in"),
            pt: num(c, "pt"),
            burner: &b,
        };
        let t_out = num(c, "tt_out");
        let burn = eq.far_for_temperature(&GasModel::Thermal, t_out).unwrap();
        let e = rel(burn.far_added, num(c, "far"));
        assert!(
            e < 1e-9,
            "{t_out} K: far {} vs {}",
            burn.far_added,
            c["far"]
        );
        let n = burn.composition.builder().all_moles();
        let total: f64 = n.iter().sum();
        let mut worst = 0f64;
        for (k, s) in Species::ALL.iter().enumerate() {
            let want = c["mole_fractions"][s.name()].as_f64().unwrap();
            let got = n[k] / total;
            worst = worst.max(rel(got, want));
            assert!(
                rel(got, want) < 1e-9,
                "{t_out} K {}: {got:e} vs {want:e}",
                s.name()
            );
        }
        eprintln!("{t_out} K: far relative error {e:.1e}, worst mole fraction {worst:.1e}");
        // Frozen mode is unchanged: it still gives the complete-products
        // answer.
        let frozen =
            combustion::far_for_temperature(&GasModel::Thermal, &air, num(c, "tt_in"), t_out, &b)
                .unwrap();
        assert!(rel(frozen.far_added, num(c, "far_frozen")) < 1e-9);
        // Back: the exit temperature of that fuel is the target.
        let back = eq
            .exit_temperature(&GasModel::Thermal, burn.far_added)
            .unwrap();
        assert!((back.tt_out - t_out).abs() < 1e-6, "{}", back.tt_out);
        seen += 1;
    }
    assert_eq!(seen, 3);
}

#[test]
fn an_exit_temperature_no_lean_mixture_reaches_states_the_flame_temperature() {
    let d = data();
    let f = &d["flame"];
    let b = Burner {
        fuel: Fuel::KEROSENE,
        lhv: num(f, "lhv"),
        efficiency: 1.0,
        fuel_sensible: 0.0,
    };
    let air = Composition::dry_air();
    let eq = EquilibriumBurn {
        inlet: &air,
        tt_in: num(f, "tt_in"),
        pt: num(f, "pt"),
        burner: &b,
    };
    match eq.far_for_temperature(&GasModel::Thermal, 2700.0) {
        Err(FlowError::AboveFlame { flame, .. }) => {
            assert!(
                (flame - num(f, "t_adiabatic_equilibrium")).abs() < 0.01,
                "{flame}"
            )
        }
        other => panic!("{other:?}"),
    }
    // Frozen products reach hotter (no dissociation), and say so too.
    match combustion::far_for_temperature(&GasModel::Thermal, &air, num(f, "tt_in"), 3200.0, &b) {
        Err(FlowError::AboveFlame {
            flame, products, ..
        }) => {
            assert_eq!(products, "frozen");
            assert!(flame > num(f, "t_adiabatic_equilibrium"), "{flame}");
        }
        other => panic!("{other:?}"),
    }
}
