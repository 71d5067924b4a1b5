//! `stationwise check` finds everything `reduce` and the goals would refuse:
//! each broken channel map and goal below fails the check (exit 2, the
//! channel or goal named), where the unbroken sheet passes.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::process::Command;

fn check(text: &str, tag: &str) -> (Option<i32>, String) {
    let dir = std::env::temp_dir().join(format!("sw-check-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join("sheet.ron");
    std::fs::write(&p, text).unwrap();
    let o = Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .arg("check")
        .arg(&p)
        .output()
        .unwrap();
    let _ = std::fs::remove_dir_all(&dir);
    (
        o.status.code(),
        format!(
            "{}{}",
            String::from_utf8_lossy(&o.stdout),
            String::from_utf8_lossy(&o.stderr)
        ),
    )
}

#[test]
fn broken_channel_maps_and_goals_fail_the_check() {
    let sheet = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/sheets/compressor-speedline.ron"
    ))
    .unwrap();
    assert_eq!(check(&sheet, "good").0, Some(0));
    let p2_weights = "weights: [\n                    0.2,\n                    0.3,\n                    0.3,\n                    0.2,\n                ],";
    assert!(sheet.contains(p2_weights));
    let cases: Vec<(&str, String, &str)> = vec![
        ("garbage uncertainty", sheet.replacen("systematic: \"0.05 psi\"", "systematic: \"banana\"", 1), "not a number"),
        ("negative uncertainty", sheet.replacen("systematic: \"0.05 psi\"", "systematic: \"-0.05 psi\"", 1), "uncertainty"),
        ("negative percentage", sheet.replacen("systematic: \"0.05 %\"", "systematic: \"-5 %\"", 1), "0 to 100 %"),
        ("wrong unit", sheet.replacen("unit: \"rpm\"", "unit: \"psia\"", 1), "not a"),
        ("no such given", sheet.replacen("given: \"shaft.rig.speed\"", "given: \"shaft.rig.bogus\"", 1), "shaft \"rig\" has no given \"bogus\"; its givens are mechanical_efficiency, speed"),
        (
            "zero weights",
            sheet.replacen(p2_weights, "weights: [0, 0, 0, 0],", 1),
            "all zero",
        ),
        (
            "negative weight",
            sheet.replacen(p2_weights, "weights: [0.2, -0.3, 0.3, 0.2],", 1),
            "non-negative",
        ),
        (
            "too few weights",
            sheet.replacen(p2_weights, "weights: [0.5, 0.5],", 1),
            "one finite, non-negative number per column",
        ),
        (
            "a goal with no such target",
            sheet.replacen(
                "    channels:",
                "    goals: [(vary: \"shaft.rig.speed\", target: \"summary.bogus\", value: \"1\", low: \"1000 rpm\", high: \"20000 rpm\")],\n    channels:",
                1,
            ),
            "goal 1 target: summary.bogus: the summary block has no value \"bogus\"; its values are thrust_gross, ram_drag, thrust_net",
        ),
        (
            "two channels on one given",
            sheet.replacen("given: \"station.2.tt\"", "given: \"process.inlet.tt\"", 1),
            "process.inlet.tt: is fed by channel 1 already",
        ),
        (
            "a goal target with a unit but no such key",
            sheet.replacen(
                "    channels:",
                "    goals: [(vary: \"shaft.rig.speed\", target: \"station.2.nonsense\", value: \"1200 K\", low: \"1000 rpm\", high: \"20000 rpm\")],\n    channels:",
                1,
            ),
            "station \"2\" has no value \"nonsense\"",
        ),
    ];
    for (what, text, needle) in cases {
        assert_ne!(text, sheet, "{what}: the edit did not apply");
        let (code, out) = check(&text, "bad");
        assert!(
            code == Some(2) || code == Some(1),
            "{what}: exit {code:?}\n{out}"
        );
        assert!(out.contains(needle), "{what}: {out}");
    }
}
