//! A mixer whose streams meet at unequal static pressures is a problem by
//! default; a goal balancing them converges to equal static pressures.
//!
//! The workbook is the invented turbofan demo made a mixed-flow engine
//! here: the bypass nozzle removed, the bypass stream (17) and the core
//! stream (5) mixed at a constant area into station 6, one nozzle 6 to 9.
//! Independent check: the static pressures of stations 17 and 5, read
//! from the workbook, equal at the balanced point.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::Engine;
use stationwise::format;
use std::path::Path;

fn mixed(extra_goals: &str) -> String {
    let t =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/turbofan.ron"))
            .unwrap();
    let bypass_nozzle = t
        .find("        (\n            name: \"bypass nozzle\",")
        .expect("the demo has a bypass nozzle");
    let end =
        bypass_nozzle + t[bypass_nozzle..].find("\n        ),\n").unwrap() + "\n        ),\n".len();
    let mut t = format!("{}{}", &t[..bypass_nozzle], &t[end..]);
    let swaps = [
        (
            "            name: \"17\",\n            note: \"bypass nozzle entry\",",
            "            name: \"17\",\n            note: \"bypass at the mixer\",\n            statics: Mach(\"0.45\"),",
        ),
        (
            "            name: \"19\",\n            note: \"bypass nozzle exit\",",
            "            name: \"6\",\n            note: \"mixer exit\",",
        ),
        (
            "            name: \"5\",\n            note: \"LP turbine exit\",",
            "            name: \"5\",\n            note: \"LP turbine exit\",\n            statics: Mach(\"0.45\"),",
        ),
        (
            "            name: \"core nozzle\",\n            from: \"5\",",
            "            name: \"mixer\",\n            from: \"5\",\n            to: \"6\",\n            kind: Mixer((\n                secondary: \"17\",\n            )),\n        ),\n        (\n            name: \"core nozzle\",\n            from: \"6\",",
        ),
    ];
    for (a, b) in swaps {
        assert!(t.contains(a), "the demo's layout changed: {a}");
        t = t.replacen(a, b, 1);
    }
    if !extra_goals.is_empty() {
        t = t.replacen(
            "    shafts: [",
            &format!("    goals: [\n{extra_goals}\n    ],\n    shafts: ["),
            1,
        );
    }
    t
}

#[test]
fn an_unbalanced_mixer_is_a_problem_and_a_goal_balances_it() {
    let e = Engine::new(format::parse(&mixed("")).unwrap()).unwrap();
    let ratio = e.value("process.mixer.p_ratio_streams").unwrap().unwrap();
    assert!(
        (ratio - 1.0).abs() > 0.05,
        "the test needs an unbalanced mix: {ratio}"
    );
    let probs = e.problems();
    assert!(
        probs
            .iter()
            .any(|p| p.place.contains("mixer") && p.message.contains("static pressure")),
        "{probs:?}"
    );
    // The balancing goal: vary the bypass ratio so that the streams meet
    // at one static pressure.
    let goal = r#"        (vary: "process.splitter.bypass_ratio", target: "process.mixer.p_ratio_streams", value: "1", low: "1", high: "12"),"#;
    let e = Engine::new(format::parse(&mixed(goal)).unwrap()).unwrap();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let p17 = e.value("station.17.p").unwrap().unwrap();
    let p5 = e.value("station.5.p").unwrap().unwrap();
    assert!((p17 / p5 - 1.0).abs() < 1e-8, "p17 {p17} p5 {p5}");
}
