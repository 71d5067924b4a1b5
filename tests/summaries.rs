//! Summaries by what the sheet is: propulsion figures only for an engine
//! (a free-stream entry and a nozzle), test-section figures for a tunnel,
//! the components' figures for a rig; each summary figure explained.
//!
//! Independent checks: the normal-shock total-pressure ratio and the
//! dynamic pressure of a perfect gas in closed form (NACA Report 1135),
//! Sutherland's law with the U.S. Standard Atmosphere 1976 constants, the
//! stoichiometry of CHy in air, all written out here.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::{Engine, SheetKind};
use stationwise::format;
use stationwise::present::{summary_explanation, summary_lines};
use stationwise::tui::app::App;
use stationwise::tui::render_text;
use stationwise::tui::settings::Settings;
use stationwise::units::UnitSystem;
use std::path::{Path, PathBuf};

fn sheet(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sheets")
        .join(name)
}

fn engine(name: &str) -> Engine {
    Engine::new(format::load(&sheet(name)).unwrap()).unwrap()
}

const PROPULSION: [&str; 9] = [
    "thrust_gross",
    "ram_drag",
    "thrust_net",
    "tsfc",
    "specific_thrust",
    "eta_thermal",
    "eta_propulsive",
    "eta_overall",
    "thrust_corrected",
];

fn assert_no_propulsion(e: &Engine, what: &str) {
    for k in PROPULSION {
        assert_eq!(e.summary().get(k), None, "{what}: summary.{k}");
    }
    for l in summary_lines(e) {
        for word in ["thrust", "TSFC", "propulsive", "thermal efficiency"] {
            assert!(!l.label.contains(word), "{what}: {}", l.label);
        }
    }
}

#[test]
fn a_combustor_rig_gets_its_combustor_figures_and_no_propulsion() {
    let e = engine("combustor-rig.ron");
    assert_eq!(e.summary().sheet, SheetKind::Rig);
    assert_no_propulsion(&e, "combustor rig");
    let lines = summary_lines(&e);
    let get = |path: &str| lines.iter().find(|l| l.path == path).map(|l| l.value);
    let eta = get("process.combustor.efficiency").expect("combustion efficiency");
    assert!(eta > 0.9 && eta <= 1.0, "{eta}");
    // Equivalence ratio: the fuel-air ratio over CHy's stoichiometric one,
    // CHy + (1 + y/4) O2 -> CO2 + y/2 H2O with 23.14 % oxygen by mass in
    // dry air (from memory), C 12.011, H 1.008, O2 31.998 (IUPAC).
    let y = 1.92;
    let stoich = (12.011 + y * 1.008) / ((1.0 + y / 4.0) * 31.998 / 0.2314);
    let far = get("process.combustor.far_added").unwrap();
    let phi = get("process.combustor.equivalence_ratio").unwrap();
    assert!(
        (phi - far / stoich).abs() < 2e-3 * phi,
        "phi {phi}, far {far} / stoich {stoich}"
    );
    assert!(get("process.combustor.loss").is_some());
    // Fuel is burnt here, so it is listed; the air flow too.
    assert!(get("summary.fuel").is_some() && get("summary.air_flow").is_some());
}

#[test]
fn a_nozzle_on_a_rig_adds_no_propulsion_figure() {
    // The combustor rig with a convergent nozzle after the exit rake: a
    // plenum-fed nozzle has a thrust of its own, but the sheet is no engine.
    let text = std::fs::read_to_string(sheet("combustor-rig.ron")).unwrap();
    let text = text.replacen(
        "    ],\n    processes: [",
        "        (\n            name: \"9\",\n        ),\n    ],\n    processes: [",
        1,
    );
    let text = text.replacen(
        "            note: \"efficiency is derived in the measured mode\",\n        ),\n",
        "            note: \"efficiency is derived in the measured mode\",\n        ),\n        (\n            name: \"nozzle\",\n            from: \"4\",\n            to: \"9\",\n            kind: Nozzle((\n                shape: Convergent,\n                exit: Matched,\n                cfg: \"0.98\",\n                cd: \"0.98\",\n            )),\n        ),\n",
        1,
    );
    let e = Engine::new(format::parse(&text).unwrap()).unwrap();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    assert!(e.process("nozzle").is_some(), "the nozzle was added");
    assert_eq!(e.summary().sheet, SheetKind::Rig);
    assert_no_propulsion(&e, "combustor rig with a nozzle");
}

#[test]
fn a_compressor_rig_gets_its_machine_figures() {
    let e = engine("compressor-rig.ron");
    assert_eq!(e.summary().sheet, SheetKind::Rig);
    assert_no_propulsion(&e, "compressor rig");
    let lines = summary_lines(&e);
    let keys: Vec<&str> = lines
        .iter()
        .filter_map(|l| l.path.rsplit('.').next())
        .collect();
    for k in [
        "pressure_ratio",
        "eta_isentropic",
        "eta_polytropic",
        "wc_in",
        "power",
    ] {
        assert!(keys.contains(&k), "{k} in {keys:?}");
    }
    // Each line reads back through its own path.
    for l in &lines {
        assert_eq!(e.value(&l.path).unwrap(), Some(l.value), "{}", l.path);
    }
    assert!(
        e.summary().fuel.is_none(),
        "no fuel flow 0 on a rig that burns none"
    );
}

#[test]
fn a_tunnel_gets_its_test_section_figures() {
    let e = engine("tunnel.ron");
    let s = *e.summary();
    assert_eq!(s.sheet, SheetKind::Tunnel);
    assert_no_propulsion(&e, "tunnel");
    let i = s.test_station.unwrap();
    assert_eq!(e.stations()[i].name, "test section");
    let f = e.station("test section").unwrap().flow.unwrap();
    let m = f.mach;
    assert_eq!(s.test_mach, Some(m));
    // Calorically perfect air, gamma 1.4: q = gamma p M^2 / 2.
    let g: f64 = 1.4;
    let q = g * f.p * m * m / 2.0;
    assert!(
        (s.test_q.unwrap() - q).abs() < 1e-9 * q,
        "{:?} vs {q}",
        s.test_q
    );
    // Sutherland: mu = 1.458e-6 T^1.5 / (T + 110.4).
    let mu = 1.458e-6 * f.t.powf(1.5) / (f.t + 110.4);
    let re = f.rho * f.v / mu;
    assert!((s.test_re.unwrap() - re).abs() < 1e-9 * re);
    // NACA 1135 eq. 99: pt2/pt1 across a normal shock.
    let a = ((g + 1.0) * m * m / ((g - 1.0) * m * m + 2.0)).powf(g / (g - 1.0));
    let b = ((g + 1.0) / (2.0 * g * m * m - (g - 1.0))).powf(1.0 / (g - 1.0));
    let ratio = a * b;
    assert!((s.start_pt_ratio.unwrap() - ratio).abs() < 1e-9);
    assert!((s.start_throat_ratio.unwrap() - 1.0 / ratio).abs() < 1e-9);
    // At Mach 2 the table gives 0.72087 (NACA 1135, from memory).
    assert!((ratio - 0.72087).abs() < 0.002, "{ratio} at M {m}");
    assert!(s.fuel.is_none(), "no fuel flow 0 on a tunnel");
}

#[test]
fn sutherland_viscosity_of_sea_level_air() {
    // U.S. Standard Atmosphere 1976, sea level: 1.7894e-5 N s/m2 (from memory).
    let mu = stationwise::atmosphere::air_viscosity(288.15);
    assert!((mu - 1.7894e-5).abs() < 2e-9, "{mu}");
}

#[test]
fn an_engine_keeps_its_propulsion_figures_and_every_summary_figure_is_explained() {
    for name in [
        "turbojet.ron",
        "turbofan.ron",
        "ramjet.ron",
        "tunnel.ron",
        "combustor-rig.ron",
        "compressor-rig.ron",
    ] {
        let e = engine(name);
        if !name.contains("rig") && !name.contains("tunnel") {
            assert_eq!(e.summary().sheet, SheetKind::Engine, "{name}");
            assert!(e.summary().thrust_net.is_some(), "{name}");
        }
        let text = summary_explanation(&e, UnitSystem::Si).join("\n");
        for l in summary_lines(&e) {
            assert!(
                text.contains(&format!("  {} = ", l.label)),
                "{name}: {} is not explained:\n{text}",
                l.label
            );
        }
    }
}

#[test]
fn the_terminal_shows_each_sheets_own_summary() {
    for (name, must, never) in [
        ("combustor-rig.ron", "equivalence ratio", "TSFC"),
        ("compressor-rig.ron", "isentropic efficiency", "thrust"),
        ("tunnel.ron", "test-section Mach", "thrust"),
        ("turbojet.ron", "net thrust", "test-section"),
    ] {
        let mut app = App::new(Settings::default());
        app.open(&sheet(name)).unwrap();
        for (w, h) in [(80, 24), (120, 40)] {
            let screen = render_text(&app, w, h);
            let summary: String = screen
                .lines()
                .map(|l| {
                    l.chars()
                        .skip(l.chars().count() * 62 / 100)
                        .collect::<String>()
                })
                .collect::<Vec<_>>()
                .join("\n");
            assert!(summary.contains(must), "{name} {w}x{h}:\n{screen}");
            assert!(!summary.contains(never), "{name} {w}x{h}:\n{screen}");
        }
    }
}

#[test]
fn propulsive_efficiency_is_thrust_power_over_the_jets_kinetic_power_gain() {
    // The turbofan demo (Mach 0.8) with velocity coefficients of 1 (the
    // jets' velocities are the stations' own) and 500 kW taken off the
    // high-pressure shaft. The definition, written out here: thrust power
    // F_net V0 over the gain in the jets' kinetic power,
    // sum(W_e V_e^2 / 2) - W_0 V0^2 / 2, each jet at its effective velocity
    // V_e = F_gross,e / W_e (its pressure thrust counted; common practice);
    // the offtake is not a jet's.
    let text = std::fs::read_to_string(sheet("turbofan.ron"))
        .unwrap()
        .replace("cfg: \"0.99\"", "cfg: \"1\"")
        .replace(
            "name: \"high\",\n            mechanical_efficiency: \"0.99\",",
            "name: \"high\",\n            mechanical_efficiency: \"0.99\",\n            offtake: \"500 kW\",",
        );
    assert!(
        text.contains("offtake: \"500 kW\""),
        "the demo's layout changed"
    );
    let e = Engine::new(format::parse(&text).unwrap()).unwrap();
    let v = |p: &str| e.value(p).unwrap().unwrap();
    let v0 = v("station.0.v");
    let ke_in = 0.5 * v("station.0.w") * v0 * v0;
    let ke_out: f64 = [("19", "bypass nozzle"), ("9", "core nozzle")]
        .iter()
        .map(|(s, n)| {
            let w = v(&format!("station.{s}.w"));
            let ve = v(&format!("process.{n}.thrust")) / w;
            0.5 * w * ve * ve
        })
        .sum();
    let want = v("summary.thrust_net") * v0 / (ke_out - ke_in);
    let got = e.summary().eta_propulsive.unwrap();
    assert!((got - want).abs() < 1e-9 * want, "{got} vs {want}");
    // With the offtake in the denominator (the old convention) it would be
    // lower by the offtake's share: the test tells them apart.
    let with_offtake = v("summary.thrust_net") * v0 / (ke_out - ke_in + 500e3);
    assert!(want - with_offtake > 1e-3, "{want} vs {with_offtake}");
}
