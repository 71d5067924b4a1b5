//! The scan browser never shows a number that is not the shown scan's.
//!
//! The workbook is the invented compressor-rig demo with one goal added
//! (the face area sized for a face Mach number of 0.35); the scans are the
//! first five of the demo's invented scan file with a note column added.
//! Scan 2 has a NaN probe (T1A) and scan 3 an unterminated quote in its
//! note. Stepping through, scan 2 must show no value at all (every station
//! withheld with the reason, none of scan 1's numbers anywhere on the
//! screen) and scan 3 must be applied: its inlet temperature is the mean of
//! its own recorded probes converted from degF (the conversion written out
//! here), and its repaired line is flagged.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use stationwise::tui::app::{App, Origin, ScanMark};
use stationwise::tui::render_text;
use stationwise::tui::settings::Settings;
use std::path::{Path, PathBuf};

/// A fresh folder with the rig demo (plus a goal) and the doctored scans.
fn rig_with_scans(tag: &str) -> (PathBuf, PathBuf, Vec<Vec<String>>) {
    let dir = std::env::temp_dir().join(format!(
        "stationwise-tui-scans-{}-{tag}",
        std::process::id()
    ));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets");
    let sheet = std::fs::read_to_string(root.join("compressor-speedline.ron")).unwrap();
    let goal = "    goals: [\n        (\n            vary: \"station.1.area\",\n            target: \"station.1.mach\",\n            value: \"0.35\",\n            low: \"0.06 m2\",\n            high: \"1 m2\",\n        ),\n    ],\n    channels: (";
    let sheet = sheet.replacen("    channels: (", goal, 1);
    assert!(sheet.contains("goals:"), "the demo's layout changed");
    let book = dir.join("rig.ron");
    std::fs::write(&book, sheet).unwrap();
    let text = std::fs::read_to_string(root.join("compressor-speedline-scans.csv")).unwrap();
    let mut rows: Vec<Vec<String>> = text
        .lines()
        .take(6)
        .map(|l| l.split(',').map(String::from).collect())
        .collect();
    rows[0].push("NOTE".into());
    for r in rows.iter_mut().skip(1) {
        r.push("steady".into());
    }
    let t1a = rows[0].iter().position(|h| h == "T1A").unwrap();
    rows[2][t1a] = "NaN".into();
    let note = rows[0].len() - 1;
    rows[3][note] = "\"valve at 3".into();
    let scans = dir.join("scans.csv");
    let csv: String = rows.iter().map(|r| r.join(",") + "\n").collect();
    std::fs::write(&scans, csv).unwrap();
    (book, scans, rows)
}

fn key(c: KeyCode) -> KeyEvent {
    KeyEvent::new(c, KeyModifiers::NONE)
}

fn screen(app: &App) -> String {
    render_text(app, 120, 40)
}

/// The numbers of the grid's given cells and of the panel, as drawn: five
/// significant figures (the grid) and the panel's own.
fn numbers_on(screen: &str) -> Vec<String> {
    screen
        .split(|c: char| !(c.is_ascii_digit() || c == '.'))
        .filter(|t| t.len() >= 5 && t.contains('.') && t.chars().any(|c| c != '0' && c != '.'))
        .map(String::from)
        .collect()
}

#[test]
fn a_scan_that_cannot_be_applied_shows_no_other_scans_numbers() {
    let (book, scans, rows) = rig_with_scans("step");
    let mut app = App::new(Settings::default());
    app.open(&book).unwrap();
    app.load_scans(&scans).unwrap();
    let sb = app.scans.as_ref().unwrap();
    assert_eq!(sb.shown, Some(0));
    assert!(
        matches!(sb.marks[1], ScanMark::Unusable(_)),
        "{:?}",
        sb.marks
    );
    assert!(
        matches!(sb.marks[2], ScanMark::Flagged(..)),
        "{:?}",
        sb.marks
    );
    let first = screen(&app);
    // Scan 1's own numbers: those the workbook file does not hold (the
    // file's texts are shown beside a given, whatever the scan).
    let file = std::fs::read_to_string(&book).unwrap();
    let scan1: Vec<String> = numbers_on(&first)
        .into_iter()
        .filter(|n| !file.contains(n.as_str()) && n != "0.12000")
        .collect();
    assert!(scan1.len() >= 10, "scan 1 shows its numbers: {scan1:?}");

    app.on_key(key(KeyCode::Char(']')));
    let e = app.engine.as_ref().unwrap();
    assert!(e.withheld().is_some());
    assert_eq!(e.station("1"), None, "no station value is reported");
    assert_eq!(e.value("station.2.tt").unwrap(), None);
    assert!(e.summary().air_flow.is_none());
    let second = screen(&app);
    assert!(second.contains("scan 2/5 NOT APPLIED"), "{second}");
    assert!(second.contains("\"NaN\" is not a number"), "{second}");
    assert!(second.contains("xx"), "{second}");
    for n in &scan1 {
        assert!(
            !second.contains(n.as_str()),
            "scan 1's {n} is still on screen at scan 2:\n{second}"
        );
    }
    // The channel-fed givens are back at the file's values, and say so.
    assert_eq!(app.origin("process.inlet.tt"), {
        let label = stationwise::tui::app::scan_label(app.scans.as_ref().unwrap(), 1);
        Origin::Withheld(format!("{label} not applied"))
    });
    assert!(matches!(app.origin("station.1.area"), Origin::Withheld(_)));
    let g = app.book().unwrap().given("process.inlet.tt").unwrap().1;
    assert!(!g.is_varied());

    app.on_key(key(KeyCode::Char(']')));
    let sb = app.scans.as_ref().unwrap();
    assert_eq!(sb.shown, Some(2), "scan 3 is applied");
    let e = app.engine.as_ref().unwrap();
    assert!(e.withheld().is_none());
    let col = |n: &str| -> f64 {
        let i = rows[0].iter().position(|h| h == n).unwrap();
        rows[3][i].parse().unwrap()
    };
    // degF to K: (F - 32) 5/9 + 273.15 (the definition of both scales).
    let t_k = ((col("T1A") + col("T1B")) / 2.0 - 32.0) * 5.0 / 9.0 + 273.15;
    let tt = e.value("process.inlet.tt").unwrap().unwrap();
    assert!(
        (tt - t_k).abs() < 1e-9,
        "scan 3 inlet {tt} K, probes {t_k} K"
    );
    assert!(e.station("2").is_some());
    let third = screen(&app);
    assert!(third.contains("scan 3/5 "), "{third}");
    assert!(!third.contains("NOT APPLIED"), "{third}");
    assert!(third.contains("unterminated quote"), "{third}");
    // The goal's given says it is the goal's, a scan's given the scan's.
    assert_eq!(app.origin("station.1.area"), Origin::Goal(1));
    assert!(matches!(app.origin("process.inlet.tt"), Origin::Scan(..)));
    assert!(third.contains("set by goal 1"), "{third}");
}

#[test]
fn the_scan_list_jumps_and_filters_by_flag() {
    let (book, scans, _) = rig_with_scans("list");
    let mut app = App::new(Settings::default());
    app.open(&book).unwrap();
    app.load_scans(&scans).unwrap();
    app.on_key(KeyEvent::new(KeyCode::Char('B'), KeyModifiers::SHIFT));
    let list = screen(&app);
    assert!(
        list.contains("scans of scans.csv (1-5 of 5 listed, 5 in the file)"),
        "{list}"
    );
    assert!(list.contains("NOT USABLE"), "{list}");
    // At 80x24 a long reason is cut in the list and shown whole under it
    // for the selected scan.
    app.on_key(key(KeyCode::Down));
    let narrow = render_text(&app, 80, 24);
    let flat = narrow
        .lines()
        .map(|l| l.trim_matches(|c| c == '│' || c == ' '))
        .collect::<Vec<_>>()
        .join(" ");
    assert!(
        flat.contains(r#"not usable: row 2, column T1A: "NaN" is not a number"#),
        "{narrow}"
    );
    app.on_key(key(KeyCode::Up));
    // End goes to the last scan, PgUp back by the rows shown (all five
    // here, so to the first).
    app.on_key(key(KeyCode::End));
    assert!(matches!(
        app.popups.last(),
        Some(stationwise::tui::app::Popup::ScanList { sel: 4, .. })
    ));
    let _ = screen(&app);
    app.on_key(key(KeyCode::PageUp));
    assert!(matches!(
        app.popups.last(),
        Some(stationwise::tui::app::Popup::ScanList { sel: 0, .. })
    ));
    app.on_key(key(KeyCode::Char('f')));
    let flagged = screen(&app);
    assert!(
        flagged.contains("(1-2 of 2 listed, 5 in the file, flagged only)"),
        "{flagged}"
    );
    // The second flagged scan is scan 3: Down, Enter shows it.
    app.on_key(key(KeyCode::Down));
    app.on_key(key(KeyCode::Enter));
    assert!(app.popups.is_empty());
    assert_eq!(app.scans.as_ref().unwrap().shown, Some(2));
}

/// Screens of the scan browser frozen at 80x24 and 120x40, in colour and
/// plain ASCII (golden files of our own drawing: the withheld scan 2 and
/// the scan list).
#[test]
fn snapshot_scan_browser() {
    for (mode, ascii) in [("color", false), ("ascii", true)] {
        for (what, keys) in [
            ("scan_withheld", vec![KeyCode::Char(']')]),
            ("scan_list", vec![KeyCode::Char('B')]),
            (
                "scan_list_flagged",
                vec![KeyCode::Char('B'), KeyCode::Char('f')],
            ),
        ] {
            let (book, scans, _) = rig_with_scans(&format!("snap-{mode}-{what}"));
            let settings = Settings {
                ascii,
                color: !ascii,
                ..Settings::default()
            };
            let mut app = App::new(settings);
            app.open(&book).unwrap();
            app.load_scans(&scans).unwrap();
            for k in keys {
                app.on_key(key(k));
            }
            app.status = None;
            for (w, h) in [(80u16, 24u16), (120, 40)] {
                insta::assert_snapshot!(format!("{what}_{mode}_{w}x{h}"), render_text(&app, w, h));
            }
        }
    }
}
