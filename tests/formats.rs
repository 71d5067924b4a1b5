//! One output discipline for every command: each `--format` a command's
//! help lists must produce output that a CSV or JSON reader takes whole
//! (the `csv` and `serde_json` crates here), CSV headers carry their unit
//! in one style ("key [unit]"), CSV numbers keep to the stated significant
//! figures, and JSON is the same SI text whatever `--units` says.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::PathBuf;
use std::process::{Command, Output};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_stationwise"))
}

fn run(args: &[String]) -> Output {
    bin()
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("cannot run stationwise {args:?}: {e}"))
}

fn sheet(name: &str) -> String {
    format!("{}/sheets/{name}", env!("CARGO_MANIFEST_DIR"))
}

/// The values `--format` lists in a command's `--help`.
fn listed_formats(command: &str) -> Vec<String> {
    let out = run(&[command.to_string(), "--help".to_string()]);
    let help = String::from_utf8(out.stdout).unwrap();
    let Some(at) = help.find("--format <FORMAT>") else {
        return Vec::new();
    };
    let rest = &help[at..];
    let values = rest
        .find("Possible values:")
        .map(|i| &rest[i..])
        .unwrap_or_else(|| panic!("{command}: --format lists no values:\n{help}"));
    values
        .lines()
        .skip(1)
        .map(str::trim)
        .take_while(|l| l.starts_with("- "))
        .map(|l| l[2..].split(':').next().unwrap().trim().to_string())
        .collect()
}

/// Significant digits of a number as printed ("0.012300" has 5).
fn significant_digits(s: &str) -> usize {
    let mantissa = s.split(['e', 'E']).next().unwrap();
    let digits: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    let mut trimmed = digits.trim_start_matches('0');
    if !mantissa.contains('.') {
        // Trailing zeros of a whole number are place holders.
        trimmed = trimmed.trim_end_matches('0');
    }
    trimmed.len()
}

/// Every key of a JSON value, with its place.
fn keys(v: &serde_json::Value) -> Vec<String> {
    let mut out = Vec::new();
    fn walk(v: &serde_json::Value, at: &str, out: &mut Vec<String>) {
        match v {
            serde_json::Value::Object(m) => {
                for (k, x) in m {
                    out.push(format!("{at}.{k}"));
                    walk(x, &format!("{at}.{k}"), out);
                }
            }
            serde_json::Value::Array(a) => {
                for x in a {
                    walk(x, &format!("{at}[]"), out);
                }
            }
            _ => {}
        }
    }
    walk(v, "", &mut out);
    out.sort();
    out.dedup();
    out
}

fn scratch(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("stationwise-formats-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Every command that prints rows, with arguments that make it print.
fn cases(dir: &std::path::Path) -> Vec<(&'static str, Vec<String>)> {
    let edited = dir.join("edited.ron");
    let text = std::fs::read_to_string(sheet("turbojet.ron")).unwrap();
    std::fs::write(
        &edited,
        text.replace("pressure_ratio: \"10\",", "pressure_ratio: \"12\","),
    )
    .unwrap();
    let s = |v: &[&str]| v.iter().map(|x| x.to_string()).collect::<Vec<_>>();
    vec![
        (
            "table",
            s(&[
                "table",
                "isentropic",
                "--gas",
                "air",
                "--tt",
                "300",
                "--mach",
                "0.2,1,2",
            ]),
        ),
        (
            "table",
            s(&[
                "table",
                "oblique-shock",
                "--gamma",
                "1.4",
                "--deflection",
                "10",
                "--mach",
                "2,3",
            ]),
        ),
        (
            "atmosphere",
            s(&["atmosphere", "--altitude", "0:11000:5500"]),
        ),
        ("eval", s(&["eval", &sheet("turbojet.ron")])),
        (
            "diff",
            s(&[
                "diff",
                &sheet("turbojet.ron"),
                edited.to_str().unwrap(),
                "--all",
            ]),
        ),
        (
            "sweep",
            s(&[
                "sweep",
                &sheet("turbojet.ron"),
                "--vary",
                "process.compressor.pressure_ratio=8:12:2",
                "--report",
                "station.4.tt,summary.thrust_net,summary.tsfc",
            ]),
        ),
        (
            "reduce",
            s(&[
                "reduce",
                &sheet("compressor-speedline.ron"),
                "--scans",
                &sheet("compressor-speedline-scans.csv"),
            ]),
        ),
        ("addresses", s(&["addresses", &sheet("turbojet.ron")])),
    ]
}

#[test]
fn every_listed_format_parses_and_json_ignores_the_display_units() {
    let dir = scratch("all");
    let mut seen = Vec::new();
    for (command, args) in cases(&dir) {
        let formats = listed_formats(command);
        assert!(!formats.is_empty(), "{command} lists no --format");
        let help = String::from_utf8(run(&[command.into(), "--help".into()]).stdout).unwrap();
        let has_units = help.contains("--units <UNITS>");
        for f in &formats {
            let mut a = args.clone();
            a.extend(["--format".to_string(), f.clone()]);
            let out = run(&a);
            // 0, or 2 for a difference (diff) or a scan problem (reduce).
            assert!(
                matches!(out.status.code(), Some(0 | 2)),
                "stationwise {a:?}: {}",
                String::from_utf8_lossy(&out.stderr)
            );
            let text = String::from_utf8(out.stdout).unwrap();
            assert!(!text.trim().is_empty(), "{a:?}: nothing printed");
            match f.as_str() {
                "json" => {
                    let _: serde_json::Value = serde_json::from_str(&text)
                        .unwrap_or_else(|e| panic!("{a:?}: not JSON ({e}):\n{text}"));
                    if has_units {
                        // JSON is SI whatever --units: the same bytes.
                        let mut us = a.clone();
                        us.extend(["--units".to_string(), "us".to_string()]);
                        let other = String::from_utf8(run(&us).stdout).unwrap();
                        if command == "atmosphere" {
                            // There --units also reads the altitudes (feet):
                            // the same SI keys, the altitude in metres.
                            let (x, y): (serde_json::Value, serde_json::Value) = (
                                serde_json::from_str(&text).unwrap(),
                                serde_json::from_str(&other).unwrap(),
                            );
                            assert_eq!(keys(&x), keys(&y), "{a:?}: keys follow --units");
                            // 5500 ft = 1676.4 m (the international foot, 0.3048 m exactly).
                            let h = y["rows"][1]["altitude_m"].as_f64().unwrap();
                            assert!((h - 1676.4).abs() < 1e-9, "{h}");
                        } else {
                            assert_eq!(text, other, "{a:?}: JSON follows --units");
                        }
                    }
                }
                "csv" => {
                    let mut r = csv::Reader::from_reader(text.as_bytes());
                    let header = r.headers().unwrap().clone();
                    for h in &header {
                        // One header style: a key, optionally " [unit]".
                        let key = h.split(" [").next().unwrap();
                        assert!(!key.is_empty() && !key.contains(' '), "{a:?}: header {h:?}");
                        if h.contains('[') {
                            assert!(h.ends_with(']'), "{a:?}: header {h:?}");
                        }
                    }
                    let mut rows = 0;
                    for rec in r.records() {
                        let rec = rec.unwrap_or_else(|e| panic!("{a:?}: bad CSV ({e}):\n{text}"));
                        assert_eq!(rec.len(), header.len(), "{a:?}");
                        for cell in &rec {
                            if cell.parse::<f64>().is_ok() {
                                assert!(
                                    significant_digits(cell) <= 6,
                                    "{a:?}: {cell} has more than the 6 stated figures"
                                );
                            }
                        }
                        rows += 1;
                    }
                    assert!(rows > 0, "{a:?}: no rows");
                }
                "text" => {}
                other => panic!("{command}: unexpected format {other}"),
            }
            seen.push(format!("{command} {f}"));
        }
    }
    // Every command that lists a format is among the cases.
    let help = String::from_utf8(run(&["--help".to_string()]).stdout).unwrap();
    let commands: Vec<String> = help
        .lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        .filter_map(|l| l.split_whitespace().next().map(str::to_string))
        .filter(|c| c != "help")
        .collect();
    for c in &commands {
        if !listed_formats(c).is_empty() {
            assert!(
                seen.iter().any(|s| s.starts_with(&format!("{c} "))),
                "{c} lists --format but no case tries it"
            );
        }
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn precision_sets_the_figures_of_csv_numbers() {
    // p/pt at M 1 for gamma 1.4 is (2/2.4)^3.5 = 0.528281787717174 (closed form).
    let args = |p: &str| {
        [
            "table",
            "isentropic",
            "--gamma",
            "1.4",
            "--mach",
            "1",
            "--format",
            "csv",
            "--precision",
            p,
        ]
        .iter()
        .map(|s| s.to_string())
        .collect::<Vec<_>>()
    };
    let col = |p: &str| {
        let text = String::from_utf8(run(&args(p)).stdout).unwrap();
        let mut r = csv::Reader::from_reader(text.as_bytes());
        let i = r
            .headers()
            .unwrap()
            .iter()
            .position(|h| h == "p_pt")
            .unwrap();
        r.records().next().unwrap().unwrap()[i].to_string()
    };
    assert_eq!(col("4"), "0.5283");
    let full: f64 = col("17").parse().unwrap();
    assert!((full - (2.0f64 / 2.4).powf(3.5)).abs() < 1e-15, "{full}");
    let out = run(&args("0"));
    assert_eq!(out.status.code(), Some(1), "precision 0 is refused");
}

#[test]
fn precision_reaches_values_in_sentences_and_zeros_are_kept() {
    let eval = |extra: &[&str]| {
        let mut a = vec!["eval".to_string(), sheet("turbojet.ron")];
        a.extend(extra.iter().map(|s| s.to_string()));
        String::from_utf8(run(&a).stdout).unwrap()
    };
    let line = |text: &str, what: &str| {
        text.lines()
            .find(|l| l.trim_start().starts_with(what))
            .unwrap_or_else(|| panic!("no {what}:\n{text}"))
            .split_whitespace()
            .rev()
            .nth(1)
            .unwrap()
            .to_string()
    };
    // The quantity's display figures by default (5), trailing zeros kept:
    // the free stream's 20 kg/s reads 20.000 kg/s.
    let text = eval(&[]);
    assert_eq!(line(&text, "air flow"), "20.000");
    let thrust = line(&text, "net thrust");
    assert_eq!(significant_digits(&thrust), 5, "{thrust}");
    // --precision 8 reaches the summary as it reaches the tables.
    let text = eval(&["--precision", "8"]);
    let thrust = line(&text, "net thrust");
    assert_eq!(significant_digits(&thrust), 8, "{thrust}");
}
