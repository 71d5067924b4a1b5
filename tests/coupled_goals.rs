//! Two coupled goals solved together: the nozzle exit area by the air
//! flow and the net thrust by the turbine entry temperature, on the
//! invented turbojet demo. Met one after another, the second moves the
//! first off its target; solved together both hold.
//!
//! Independent check: the workbook evaluated afresh with both varied
//! givens set to the values found (no goals), read for both targets.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::Engine;
use stationwise::format;
use std::path::Path;

fn turbojet() -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/turbojet.ron"))
        .unwrap()
}

#[test]
fn two_coupled_goals_both_meet_their_targets() {
    let base = Engine::new(format::parse(&turbojet()).unwrap()).unwrap();
    let area0 = base.value("process.nozzle.area").unwrap().unwrap();
    let thrust0 = base.value("summary.thrust_net").unwrap().unwrap();
    // Targets away from the demo's point: 10 % more area, 5 % more thrust.
    let (area_t, thrust_t) = (1.10 * area0, 1.05 * thrust0);
    let goals = format!(
        r#"    goals: [
        (vary: "process.freestream.w", target: "process.nozzle.area", value: "{area_t} m2", low: "10 kg/s", high: "40 kg/s"),
        (vary: "process.combustor.exit_tt", target: "summary.thrust_net", value: "{thrust_t} N", low: "1000 K", high: "1800 K"),
    ],
    shafts: ["#
    );
    let text = turbojet().replacen("    shafts: [", &goals, 1);
    assert!(text.contains("goals: ["), "the demo's layout changed");
    let e = Engine::new(format::parse(&text).unwrap()).unwrap();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let out = e.goal_outcomes();
    for (o, t) in out.iter().zip([area_t, thrust_t]) {
        let r = o.residual.unwrap();
        assert!(r.abs() <= 1e-9, "residual {r}");
        assert!((o.reached.unwrap() - t).abs() <= 1e-9 * t);
        assert!(o.iterations > 0);
    }
    // Afresh, without goals, at the values found: both targets hold.
    let (w, tt4) = (out[0].value.unwrap(), out[1].value.unwrap());
    let mut plain = Engine::new(format::parse(&turbojet()).unwrap()).unwrap();
    plain.set_si("process.freestream.w", w).unwrap();
    plain.set_si("process.combustor.exit_tt", tt4).unwrap();
    let a = plain.value("process.nozzle.area").unwrap().unwrap();
    let f = plain.value("summary.thrust_net").unwrap().unwrap();
    assert!((a - area_t).abs() <= 1e-8 * area_t, "area {a} vs {area_t}");
    assert!(
        (f - thrust_t).abs() <= 1e-8 * thrust_t,
        "thrust {f} vs {thrust_t}"
    );
}

#[test]
fn eval_json_reports_each_goal() {
    let base = Engine::new(format::parse(&turbojet()).unwrap()).unwrap();
    let thrust0 = base.value("summary.thrust_net").unwrap().unwrap();
    let goals = format!(
        r#"    goals: [
        (vary: "process.combustor.exit_tt", target: "summary.thrust_net", value: "{} N", low: "1000 K", high: "1800 K"),
    ],
    shafts: ["#,
        1.05 * thrust0
    );
    let dir = std::env::temp_dir().join(format!("stationwise-coupled-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("tj.ron");
    std::fs::write(&file, turbojet().replacen("    shafts: [", &goals, 1)).unwrap();
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args(["eval", "--format", "json"])
        .arg(&file)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let g = &v["goals"][0];
    assert_eq!(g["vary"], "process.combustor.exit_tt");
    assert_eq!(g["target"], "summary.thrust_net");
    assert_eq!(g["met"], true);
    let reached = g["reached"].as_f64().unwrap();
    assert!((reached - 1.05 * thrust0).abs() <= 1e-9 * thrust0);
    assert!(g["residual"].as_f64().unwrap().abs() <= 1e-9);
    assert!(g["iterations"].as_u64().unwrap() > 0);
    // The text output says what was reached and the residual.
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .arg("eval")
        .arg(&file)
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("residual") && text.contains("evaluations"),
        "{text}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}
