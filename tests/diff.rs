//! `stationwise diff` for a reviewer: one changed given reads in at most
//! 15 lines with the summary first; CSV and JSON carry the same rows.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::PathBuf;
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn changed_copy(sheet: &str, from: &str, to: &str, tag: &str) -> PathBuf {
    let text = std::fs::read_to_string(root().join("sheets").join(sheet)).unwrap();
    assert!(text.contains(from), "{sheet} no longer has {from}");
    let d = std::env::temp_dir().join(format!("sw-diff-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    let f = d.join(sheet);
    std::fs::write(&f, text.replacen(from, to, 1)).unwrap();
    f
}

fn diff(a: &PathBuf, b: &PathBuf, extra: &[&str]) -> (String, i32) {
    let out = Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .arg("diff")
        .arg(a)
        .arg(b)
        .args(extra)
        .output()
        .unwrap();
    (
        String::from_utf8(out.stdout).unwrap(),
        out.status.code().unwrap(),
    )
}

#[test]
fn one_given_is_a_screenful_summary_first() {
    for (sheet, from, to) in [
        (
            "turbojet.ron",
            "efficiency: \"0.84\"",
            "efficiency: \"0.85\"",
        ),
        (
            "turbofan.ron",
            "efficiency: \"0.89\"",
            "efficiency: \"0.79\"",
        ),
    ] {
        let a = root().join("sheets").join(sheet);
        let b = changed_copy(sheet, from, to, "one");
        let (text, code) = diff(&a, &b, &[]);
        assert_eq!(code, 2, "a difference exits 2");
        let lines: Vec<&str> = text.lines().collect();
        // A count line, the summary figures (at most twelve on an engine
        // sheet), the given, one line for the rest: under a 24-line screen.
        assert!(lines.len() <= 18, "{sheet}: {} lines\n{text}", lines.len());
        assert!(lines[0].starts_with("1 given changed"), "{text}");
        assert_eq!(lines[1], "summary figures", "{text}");
        let givens = lines.iter().position(|l| *l == "givens").unwrap();
        assert!(lines[givens + 1].contains("efficiency"), "{text}");
        assert!(text.contains("(--all lists them)"));
        // --all lists every moved value: the counts agree.
        let (all, _) = diff(&a, &b, &["--all"]);
        let n: usize = lines[0]
            .split(", ")
            .nth(1)
            .and_then(|s| s.split(' ').next())
            .unwrap()
            .parse()
            .unwrap();
        let mut section = "";
        let mut listed = 0;
        for l in all.lines() {
            if !l.starts_with("  ") {
                section = l;
            } else if section == "summary figures" || section == "other derived values" {
                listed += 1;
            }
        }
        assert_eq!(listed, n, "{listed} listed, {n} counted\n{all}");
    }
}

#[test]
fn csv_and_json_hold_the_same_differences() {
    let a = root().join("sheets/turbojet.ron");
    let b = changed_copy(
        "turbojet.ron",
        "efficiency: \"0.84\"",
        "efficiency: \"0.85\"",
        "fmt",
    );
    let (csv_text, _) = diff(&a, &b, &["--format", "csv", "--all"]);
    let mut r = csv::Reader::from_reader(csv_text.as_bytes());
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    let (json_text, _) = diff(&a, &b, &["--format", "json", "--all"]);
    let v: serde_json::Value = serde_json::from_str(&json_text).unwrap();
    let moved = v["summary"]["derived_moved"].as_u64().unwrap() as usize;
    assert_eq!(
        rows.iter()
            .filter(|r| &r[0] == "summary" || &r[0] == "derived")
            .count(),
        moved
    );
    assert_eq!(rows.iter().filter(|r| &r[0] == "given").count(), 1);
    assert_eq!(v["givens"][0]["path"], "process.compressor.efficiency");
}

#[test]
fn no_difference_exits_zero() {
    let a = root().join("sheets/turbojet.ron");
    let (text, code) = diff(&a, &a, &[]);
    assert_eq!(code, 0);
    assert!(text.starts_with("no differences"));
}

#[test]
fn the_same_value_written_another_way_is_not_a_changed_given() {
    // 0 m and 0 ft are the same altitude: listed apart, not counted as a
    // change, and nothing derived moves.
    let a = root().join("sheets/turbojet.ron");
    let b = changed_copy(
        "turbojet.ron",
        "altitude: \"0 m\"",
        "altitude: \"0 ft\"",
        "respelt",
    );
    let (text, code) = diff(&a, &b, &[]);
    assert_eq!(code, 2, "the files differ: {text}");
    let head = text.lines().next().unwrap();
    assert!(
        head.starts_with("0 givens changed, 0 derived values moved"),
        "{head}"
    );
    assert!(
        head.contains("1 given written differently (same value)"),
        "{head}"
    );
    assert!(text.contains("ambient.altitude: 0 m -> 0 ft"), "{text}");
}
