//! Nozzle coefficients in the trade's definitions, derived back from a
//! "measured" thrust and area.
//!
//! The invented turbojet demo is evaluated with a gross thrust
//! coefficient of 0.985 and a flow coefficient of 0.97; its gross thrust
//! and geometric exit area are then the "measurements". A copy with both
//! coefficients at 1 and two goals (vary cfg for the thrust, cd for the
//! area) must return 0.985 and 0.97 to 1e-9.
//!
//! Independent relations: F = Cfg F_ideal and A_geometric = A_effective /
//! Cd, with the ideal nozzle unchanged by either coefficient, so the ratios
//! of the figures give the coefficients directly as well.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::Engine;
use stationwise::format;
use std::path::Path;

fn turbojet(cfg: &str, cd: &str, goals: &str) -> String {
    let t =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/turbojet.ron"))
            .unwrap();
    let a = "                cfg: \"1\",\n                cd: \"1\",";
    assert!(t.contains(a), "the demo's layout changed");
    let mut t = t.replacen(
        a,
        &format!("                cfg: \"{cfg}\",\n                cd: \"{cd}\","),
        1,
    );
    if !goals.is_empty() {
        t = t.replacen(
            "    shafts: [",
            &format!("    goals: [\n{goals}\n    ],\n    shafts: ["),
            1,
        );
    }
    t
}

#[test]
fn measured_thrust_and_area_return_the_coefficients() {
    let e = Engine::new(format::parse(&turbojet("0.985", "0.97", "")).unwrap()).unwrap();
    let v = |e: &Engine, p: &str| e.value(p).unwrap().unwrap();
    let thrust = v(&e, "process.nozzle.thrust");
    let area = v(&e, "process.nozzle.area");
    // The relations on the figures themselves.
    assert!((thrust / v(&e, "process.nozzle.thrust_ideal") - 0.985).abs() < 1e-12);
    let a_eff = v(&e, "station.9.area");
    assert!((a_eff / area - 0.97).abs() < 1e-12);
    // rho V A = W at the exit station.
    let (rho, vel, w) = (
        v(&e, "station.9.rho"),
        v(&e, "station.9.v"),
        v(&e, "station.9.w"),
    );
    assert!((rho * vel * a_eff / w - 1.0).abs() < 1e-9);

    let goals = format!(
        r#"        (vary: "process.nozzle.cfg", target: "process.nozzle.thrust", value: "{thrust} N", low: "0.9", high: "1"),
        (vary: "process.nozzle.cd", target: "process.nozzle.area", value: "{area} m2", low: "0.9", high: "1"),"#
    );
    let d = Engine::new(format::parse(&turbojet("1", "1", &goals)).unwrap()).unwrap();
    assert!(d.problems().is_empty(), "{:?}", d.problems());
    let out = d.goal_outcomes();
    let (cfg, cd) = (out[0].value.unwrap(), out[1].value.unwrap());
    assert!((cfg - 0.985).abs() < 1e-9, "cfg {cfg}");
    assert!((cd - 0.97).abs() < 1e-9, "cd {cd}");
}
