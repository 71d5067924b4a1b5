//! Acceptance tests of the `table` and `atmosphere` commands, run on the
//! built binary.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use serde_json::Value;
use std::process::{Command, Output};

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("cannot run stationwise {args:?}: {e}"))
}

fn stdout_ok(args: &[&str]) -> String {
    let out = run(args);
    assert!(
        out.status.success(),
        "stationwise {args:?} failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

/// The rows of a `--format json` run.
fn json_rows(args: &[&str]) -> Vec<Value> {
    let text = stdout_ok(args);
    let v: Value =
        serde_json::from_str(&text).unwrap_or_else(|e| panic!("{args:?}: bad JSON {e}: {text}"));
    v["rows"].as_array().unwrap().clone()
}

fn field(row: &Value, key: &str) -> f64 {
    row[key]
        .as_f64()
        .unwrap_or_else(|| panic!("no number {key:?} in {row}"))
}

/// `value` equals `want` to `decimals` decimal places (rounding of a table).
fn to_decimals(what: &str, value: f64, want: f64, decimals: i32) {
    let half = 0.5 * 10f64.powi(-decimals);
    assert!(
        (value - want).abs() <= half,
        "{what}: {value} is not {want} to {decimals} decimals"
    );
}

/// `value` equals `want` to `sig` significant figures.
fn to_significant(what: &str, value: f64, want: f64, sig: i32) {
    let mag = want.abs().log10().floor() as i32;
    let half = 0.5 * 10f64.powi(mag - sig + 1);
    assert!(
        (value - want).abs() <= half,
        "{what}: {value} is not {want} to {sig} significant figures"
    );
}

#[test]
fn isentropic_gamma_14_mach_2_matches_naca_1135() {
    // NACA Report 1135 Table I (from memory), gamma 1.4, M 2:
    // p/pt 0.12780, A/A* 1.6875.
    let rows = json_rows(&[
        "table",
        "isentropic",
        "--gamma",
        "1.4",
        "--mach",
        "2",
        "--format",
        "json",
    ]);
    assert_eq!(rows.len(), 1);
    to_decimals("p_pt", field(&rows[0], "p_pt"), 0.12780, 4);
    to_decimals("a_astar", field(&rows[0], "a_astar"), 1.6875, 4);
    // Closed form: T/Tt = 1/(1 + 0.2 * 4) = 5/9.
    to_decimals("t_tt", field(&rows[0], "t_tt"), 5.0 / 9.0, 10);
}

#[test]
fn area_ratio_rows_invert_to_mach_2() {
    // NACA Report 1135 Table I (from memory): A/A* 1.6875 at M 2, gamma 1.4.
    let rows = json_rows(&[
        "table",
        "isentropic",
        "--gamma",
        "1.4",
        "--area-ratio",
        "1.6875",
        "--branch",
        "supersonic",
        "--format",
        "json",
    ]);
    assert_eq!(rows.len(), 1);
    to_decimals("mach", field(&rows[0], "mach"), 2.0, 4);
}

#[test]
fn normal_shock_gamma_14_mach_2_matches_naca_1135() {
    // NACA Report 1135 Table II (from memory), gamma 1.4, M1 2:
    // M2 0.57735, pt2/pt1 0.72087 (and p2/p1 4.5000).
    let rows = json_rows(&[
        "table",
        "normal-shock",
        "--gamma",
        "1.4",
        "--mach",
        "2",
        "--format",
        "json",
    ]);
    assert_eq!(rows.len(), 1);
    to_decimals("mach2", field(&rows[0], "mach2"), 0.57735, 5);
    to_decimals("pt2_pt1", field(&rows[0], "pt2_pt1"), 0.72087, 5);
    to_decimals("p2_p1", field(&rows[0], "p2_p1"), 4.5, 4);
}

/// The Cantera T/Tt and p/pt of the dry-air Tt 1500 K case at Mach `m`.
fn cantera_air_1500(m: f64) -> (f64, f64) {
    let path = format!(
        "{}/tests/data/cantera_isentropic.json",
        env!("CARGO_MANIFEST_DIR")
    );
    let d: Value = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    let case = d["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["name"] == "dry_air" && c["tt"] == 1500.0)
        .unwrap();
    let (tt, pt) = (field(case, "tt"), field(case, "pt"));
    let p = case["points"]
        .as_array()
        .unwrap()
        .iter()
        .find(|p| p["mach"] == m)
        .unwrap();
    (field(p, "t") / tt, field(p, "p") / pt)
}

#[test]
fn thermally_perfect_air_table_differs_from_gamma_14_and_matches_cantera() {
    let air = json_rows(&[
        "table",
        "isentropic",
        "--gas",
        "air",
        "--tt",
        "1500",
        "--mach",
        "0.5,2",
        "--format",
        "json",
    ]);
    let perfect = json_rows(&[
        "table",
        "isentropic",
        "--gamma",
        "1.4",
        "--mach",
        "0.5,2",
        "--format",
        "json",
    ]);
    assert_eq!((air.len(), perfect.len()), (2, 2));
    for (i, m) in [0.5, 2.0].into_iter().enumerate() {
        assert_eq!(field(&air[i], "mach"), m);
        // Hot air has gamma well below 1.4: T/Tt moves by more than 1e-3.
        let (ta, tp) = (field(&air[i], "t_tt"), field(&perfect[i], "t_tt"));
        assert!((ta - tp).abs() > 1e-3, "M {m}: t_tt {ta} vs gamma-1.4 {tp}");
        // Cantera 3.2.0 (tests/data/cantera_isentropic.json, dry air, Tt 1500 K).
        let (t_ref, p_ref) = cantera_air_1500(m);
        assert!(
            (ta - t_ref).abs() <= 1e-4,
            "M {m}: t_tt {ta} vs Cantera {t_ref}"
        );
        let pa = field(&air[i], "p_pt");
        assert!(
            (pa - p_ref).abs() <= 1e-4,
            "M {m}: p_pt {pa} vs Cantera {p_ref}"
        );
    }
}

#[test]
fn atmosphere_matches_us_standard_1976() {
    // U.S. Standard Atmosphere 1976 tables (from memory), geopotential
    // altitude: 0 m 288.15 K 101325 Pa; 11000 m 216.65 K 22632 Pa;
    // 20000 m 216.65 K 5474.9 Pa. Five significant figures.
    let rows = json_rows(&[
        "atmosphere",
        "--altitude",
        "0,11000,20000",
        "--format",
        "json",
    ]);
    assert_eq!(rows.len(), 3);
    let want = [
        (0.0, 288.15, 101325.0),
        (11000.0, 216.65, 22632.0),
        (20000.0, 216.65, 5474.9),
    ];
    for (row, (h, t, p)) in rows.iter().zip(want) {
        assert_eq!(field(row, "altitude_m"), h);
        to_significant(&format!("T at {h} m"), field(row, "temperature_k"), t, 5);
        to_significant(&format!("p at {h} m"), field(row, "pressure_pa"), p, 5);
    }
}

#[test]
fn atmosphere_geometric_altitude_matches_us_standard_1976() {
    // U.S. Standard Atmosphere 1976 tables (from memory), geometric altitude
    // 11000 m: 216.77 K, 22700 Pa (as the tables round them: 0.01 K, and
    // 2.2700e4 Pa to five significant figures).
    let rows = json_rows(&[
        "atmosphere",
        "--altitude",
        "11000",
        "--geometric",
        "--format",
        "json",
    ]);
    assert_eq!(rows.len(), 1);
    to_decimals("T", field(&rows[0], "temperature_k"), 216.77, 2);
    to_significant("p", field(&rows[0], "pressure_pa"), 22700.0, 5);
}

#[test]
fn a_row_that_cannot_be_computed_keeps_its_place_with_its_reason() {
    let cases: [(&[&str], &str); 3] = [
        // Subsonic upstream flow has no normal shock.
        (
            &["table", "normal-shock", "--gamma", "1.4", "--mach", "0.8"],
            "0.8",
        ),
        // Beyond the maximum deflection at M 2 (about 23 deg): detached.
        (
            &[
                "table",
                "oblique-shock",
                "--gamma",
                "1.4",
                "--mach",
                "2",
                "--deflection",
                "40",
            ],
            "detach",
        ),
        // Below the 200 K floor of the gas data.
        (
            &[
                "table",
                "isentropic",
                "--gas",
                "air",
                "--tt",
                "50",
                "--mach",
                "1",
            ],
            "range",
        ),
    ];
    for (args, why) in cases {
        let out = run(args);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
        assert!(!err.contains("panicked"), "{args:?} panicked: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "{args:?}: {err:?}");
        let text = String::from_utf8(out.stdout).unwrap();
        assert_eq!(
            text.lines().count(),
            2,
            "{args:?}: header and the row:\n{text}"
        );
        assert!(
            text.lines().nth(1).unwrap().contains(why),
            "{args:?}: {text}"
        );
    }
    // Mach 0 to 3 in air at Tt 300 K: the static temperatures at M 2 and 3
    // (167 K and 107 K, T/Tt = 1/(1 + 0.2 M^2) near gamma 1.4) lie below the
    // 200 K gas data, so three rows are computed and two keep their place
    // with the reason, in CSV with a problem.
    let mut a = vec![
        "table",
        "isentropic",
        "--gas",
        "air",
        "--tt",
        "300",
        "--mach",
        "0,0.5,1,2,3",
    ];
    a.extend(["--format", "csv"]);
    let out = run(&a);
    assert_eq!(out.status.code(), Some(2));
    let text = String::from_utf8(out.stdout).unwrap();
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let h = r.headers().unwrap().clone();
    let pi = h.iter().position(|k| k == "problem").unwrap();
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(rows.len(), 5);
    let failed: Vec<&str> = rows
        .iter()
        .filter(|r| !r[pi].is_empty())
        .map(|r| &r[0])
        .collect();
    assert_eq!(failed, ["2.00000", "3.00000"]);
    assert!(rows[3][pi].contains("M 2"), "{}", &rows[3][pi]);
    assert!(rows[3][1].is_empty(), "no value in a failed row");
    let json = run(&[
        "table",
        "isentropic",
        "--gas",
        "air",
        "--tt",
        "300",
        "--mach",
        "0,2",
        "--format",
        "json",
    ]);
    let v: Value = serde_json::from_slice(&json.stdout).unwrap();
    assert!(v["rows"][0]["problem"].is_null());
    assert!(v["rows"][1]["t_tt"].is_null());
    assert!(
        v["rows"][1]["problem"]
            .as_str()
            .unwrap()
            .contains("below the gas data")
    );
}

#[test]
fn bad_requests_give_one_line_errors() {
    for args in [
        &["table", "isentropic", "--mach", "abc"][..],
        &["table", "isentropic", "--given", "bogus=1"],
        &["table", "isentropic", "--given", "p_pt"],
    ] {
        let out = run(args);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "{args:?}: {err}");
        assert!(!err.contains("panicked"), "{args:?} panicked: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "{args:?}: {err:?}");
        assert!(out.stdout.is_empty(), "{args:?} printed a table anyway");
    }
}

#[test]
fn every_subcommand_help_exits_zero() {
    for args in [
        &["--help"][..],
        &["table", "--help"],
        &["atmosphere", "--help"],
        &["help", "table"],
    ] {
        let text = stdout_ok(args);
        assert!(text.contains("Usage"), "{args:?}: no usage text");
    }
    // Every subcommand listed by the top-level help has a help of its own.
    let top = stdout_ok(&["--help"]);
    let commands: Vec<String> = top
        .lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        .filter_map(|l| l.split_whitespace().next().map(str::to_string))
        .filter(|c| c != "help")
        .collect();
    assert!(
        commands.iter().any(|c| c == "table") && commands.iter().any(|c| c == "atmosphere"),
        "{commands:?}"
    );
    for c in &commands {
        stdout_ok(&[c.as_str(), "--help"]);
    }
}

#[test]
fn csv_has_a_header_of_keys_and_one_line_per_row() {
    let text = stdout_ok(&[
        "table",
        "isentropic",
        "--gamma",
        "1.4",
        "--mach",
        "0.5,1,2",
        "--format",
        "csv",
        "--precision",
        "15",
    ]);
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines.len(), 4, "{text}");
    assert!(lines[0].starts_with("mach,t_tt,p_pt"), "{}", lines[0]);
    let width = lines[0].split(',').count();
    for l in &lines[1..] {
        assert_eq!(l.split(',').count(), width, "{l}");
    }
    // Closed form: T/Tt at M 1 is 2/(gamma + 1) = 0.8333...
    let t_tt: f64 = lines[2].split(',').nth(1).unwrap().parse().unwrap();
    to_decimals("t_tt at M 1", t_tt, 2.0 / 2.4, 12);

    let atm = stdout_ok(&["atmosphere", "--altitude", "0:3000:1000", "--format", "csv"]);
    let lines: Vec<&str> = atm.lines().collect();
    assert_eq!(lines.len(), 5, "{atm}");
    assert!(
        lines[0].starts_with("altitude [m],temperature [K]"),
        "{}",
        lines[0]
    );
}

#[test]
fn text_has_a_header_and_one_line_per_row() {
    let text = stdout_ok(&[
        "table",
        "normal-shock",
        "--gamma",
        "1.4",
        "--mach",
        "1.5,2,3",
    ]);
    let lines: Vec<&str> = text.lines().collect();
    // Ratios carry no units, so the header is one line of labels.
    assert_eq!(lines.len(), 4, "{text}");
    assert!(
        lines[0].contains("M1") && lines[0].contains("pt2/pt1"),
        "{}",
        lines[0]
    );
    // NACA Report 1135 Table II (from memory): M2 at M1 2 is 0.57735, shown
    // to six significant figures.
    assert!(lines[2].contains("0.577350"), "{}", lines[2]);

    let atm = stdout_ok(&["atmosphere", "--altitude", "0,11000"]);
    let lines: Vec<&str> = atm.lines().collect();
    // Labels, then a line of units, then the rows.
    assert_eq!(lines.len(), 4, "{atm}");
    assert!(lines[0].contains("temperature"), "{}", lines[0]);
    assert!(
        lines[1].contains("[K]") && lines[1].contains("[Pa]"),
        "{}",
        lines[1]
    );
    assert!(
        lines[2].contains("288.150") && lines[3].contains("216.650"),
        "{atm}"
    );
}
