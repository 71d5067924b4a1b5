//! Addresses: `stationwise addresses` lists every path of each demo sheet;
//! every path it lists can be read by `sweep --report` (and reads the same
//! value the listing shows), and every given it lists can be varied. Paths
//! that name nothing are refused with exit 1 and the keys of that place.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::Command;

fn run(args: &[&str]) -> (Option<i32>, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args(args)
        .output()
        .unwrap();
    (
        o.status.code(),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

fn sheets() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "ron"))
        .collect();
    v.sort();
    v
}

struct Listed {
    path: String,
    given: bool,
    unit: String,
    value: Option<f64>,
}

fn listing(sheet: &Path) -> Vec<Listed> {
    let (code, out, err) = run(&["addresses", sheet.to_str().unwrap(), "--format", "json"]);
    assert_eq!(code, Some(0), "{}: {err}", sheet.display());
    let v: Value = serde_json::from_str(&out).unwrap();
    v["rows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| Listed {
            path: r["path"].as_str().unwrap().to_string(),
            given: r["kind"] == "given",
            unit: r["unit"].as_str().unwrap().to_string(),
            value: r["value"].as_f64(),
        })
        .collect()
}

/// `PATH=V:V:1` at the given's current SI value, in its SI unit.
fn at_current(g: &Listed) -> String {
    let v = g.value.unwrap();
    let text = if g.unit.is_empty() {
        format!("{v}")
    } else {
        format!("{v} {}", g.unit)
    };
    format!("{}={text}:{text}:1", g.path)
}

#[test]
fn every_listed_address_reads_back_through_sweep_and_every_given_varies() {
    let mut checked = 0;
    for sheet in sheets() {
        let file = sheet.to_str().unwrap();
        let all = listing(&sheet);
        assert!(all.iter().any(|a| a.path.starts_with("station.")), "{file}");
        assert!(all.iter().any(|a| a.path.starts_with("summary.")), "{file}");
        let givens: Vec<&Listed> = all.iter().filter(|a| a.given).collect();
        assert!(!givens.is_empty(), "{file}");
        // One sweep point at today's value of the first given reports
        // every listed path, with the value the listing shows.
        let report: Vec<&str> = all.iter().map(|a| a.path.as_str()).collect();
        let vary = at_current(givens[0]);
        let (code, out, err) = run(&[
            "sweep",
            file,
            "--vary",
            &vary,
            "--report",
            &report.join(","),
            "--format",
            "json",
        ]);
        assert_eq!(code, Some(0), "{file}: {err}");
        let v: Value = serde_json::from_str(&out).unwrap();
        let row = &v["rows"][0];
        for a in &all {
            let got = row[a.path.as_str()].as_f64();
            match (a.value, got) {
                (Some(x), Some(y)) => assert!(
                    (x - y).abs() <= 1e-9 * x.abs().max(1e-300),
                    "{file}: {} listed {x}, swept {y}",
                    a.path
                ),
                (None, None) => {}
                (x, y) => panic!("{file}: {} listed {x:?}, swept {y:?}", a.path),
            }
            checked += 1;
        }
        // Every given can be varied.
        for g in &givens {
            let vary = at_current(g);
            let (code, _, err) = run(&["sweep", file, "--vary", &vary, "--report", "summary.fuel"]);
            assert_eq!(code, Some(0), "{file}: --vary {vary}: {err}");
        }
    }
    assert!(checked > 500, "only {checked} addresses checked");
}

fn with_text(sheet: &str, from: &str, to: &str, tag: &str) -> PathBuf {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets");
    let text = std::fs::read_to_string(root.join(sheet)).unwrap();
    let changed = text.replacen(from, to, 1);
    assert_ne!(changed, text, "the edit did not apply");
    let dir = std::env::temp_dir().join(format!("sw-addr-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(sheet);
    std::fs::write(&p, changed).unwrap();
    p
}

#[test]
fn paths_that_name_nothing_are_refused_with_the_keys_of_that_place() {
    let turbojet = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/turbojet.ron");
    let tj = turbojet.to_str().unwrap();

    // A report path naming no figure of the nozzle.
    let (code, out, err) = run(&[
        "sweep",
        tj,
        "--vary",
        "process.compressor.pressure_ratio=8:12:2",
        "--report",
        "process.nozzle.bogus",
    ]);
    assert_eq!(code, Some(1), "{out}{err}");
    assert!(out.is_empty(), "no column of blanks: {out}");
    assert!(
        err.contains("process \"nozzle\"")
            && err.contains("\"bogus\"")
            && err.contains("thrust, area, throat_area"),
        "{err}"
    );

    // A station that does not exist: the stations there are.
    let (code, _, err) = run(&[
        "sweep",
        tj,
        "--vary",
        "process.compressor.pressure_ratio=8:12:2",
        "--report",
        "station.99.tt",
    ]);
    assert_eq!(code, Some(1), "{err}");
    assert!(
        err.contains("no station named \"99\"") && err.contains("0, 2, 3, 4, 5, 9"),
        "{err}"
    );

    // A goal whose target is no summary key: refused when loaded.
    let p = with_text(
        "turbojet.ron",
        "    shafts:",
        "    goals: [(vary: \"process.freestream.w\", target: \"summary.bogus\", value: \"1\", low: \"1 kg/s\", high: \"100 kg/s\")],\n    shafts:",
        "goal",
    );
    let (code, out, err) = run(&["eval", p.to_str().unwrap()]);
    assert_eq!(code, Some(1), "{out}{err}");
    assert!(
        err.contains("goal 1 target: summary.bogus")
            && err.contains("thrust_net")
            && err.contains("tsfc"),
        "{err}"
    );
    let _ = std::fs::remove_dir_all(p.parent().unwrap());

    // A goal varying a given the compressor does not have.
    let p = with_text(
        "turbojet.ron",
        "    shafts:",
        "    goals: [(vary: \"process.compressor.bogus\", target: \"summary.thrust_net\", value: \"15 kN\", low: \"1\", high: \"2\")],\n    shafts:",
        "vary",
    );
    let (code, _, err) = run(&["eval", p.to_str().unwrap()]);
    assert_eq!(code, Some(1), "{err}");
    assert!(
        err.contains("goal 1 vary: process.compressor.bogus")
            && err.contains("its givens are pressure_ratio, efficiency"),
        "{err}"
    );
    let _ = std::fs::remove_dir_all(p.parent().unwrap());

    // A channel feeding a given the compressor does not have.
    let p = with_text(
        "turbojet.ron",
        "    shafts:",
        "    channels: (map: [(given: \"process.compressor.bogus\", columns: [\"PR\"], unit: \"\")]),\n    shafts:",
        "channel",
    );
    let scans = p.with_file_name("scans.csv");
    std::fs::write(&scans, "PR\n10\n").unwrap();
    let (code, out, err) = run(&[
        "reduce",
        p.to_str().unwrap(),
        "--scans",
        scans.to_str().unwrap(),
    ]);
    assert_eq!(code, Some(1), "{out}{err}");
    assert!(
        err.contains("process.compressor.bogus")
            && err.contains("its givens are pressure_ratio, efficiency"),
        "{err}"
    );
    let _ = std::fs::remove_dir_all(p.parent().unwrap());
}
