//! Renaming a station and a process in the terminal workbook (driven
//! through `App::on_key`, no terminal) reaches every reference: a goal, the
//! channel map feeding a scan, and the uncertainty column keep working
//! under the new names, and undo brings the old names back everywhere.
//!
//! The workbook is the invented compressor-rig demo with one goal added.
//! The checks are independent relations: a met goal reaches its target,
//! a scan's averaged probe reading reaches the given it is mapped to, and
//! an uncertainty fed by a channel is not zero.

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use stationwise::tui::app::App;
use stationwise::tui::settings::Settings;
use std::path::{Path, PathBuf};

/// A fresh folder with the speed-line demo (plus a goal) and its scans.
fn rig_copy(tag: &str) -> (PathBuf, PathBuf) {
    let dir = std::env::temp_dir().join(format!("stationwise-rename-{}-{tag}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets");
    let sheet = std::fs::read_to_string(root.join("compressor-speedline.ron")).unwrap();
    // The goal: size the compressor-face area for a face Mach number of 0.35.
    let goal = "    goals: [\n        (\n            vary: \"station.1.area\",\n            target: \"station.1.mach\",\n            value: \"0.35\",\n            low: \"0.06 m2\",\n            high: \"1 m2\",\n        ),\n    ],\n    channels: (";
    let sheet = sheet.replacen("    channels: (", goal, 1);
    assert!(sheet.contains("goals:"), "the demo's layout changed");
    let book = dir.join("rig.ron");
    std::fs::write(&book, sheet).unwrap();
    let scans = dir.join("scans.csv");
    std::fs::copy(root.join("compressor-speedline-scans.csv"), &scans).unwrap();
    (book, scans)
}

fn press(app: &mut App, keys: &[KeyEvent]) {
    for k in keys {
        app.on_key(*k);
    }
}

fn key(c: KeyCode) -> KeyEvent {
    KeyEvent::new(c, KeyModifiers::NONE)
}

/// r, clear the field, type the new name, Enter.
fn rename_keys(new: &str) -> Vec<KeyEvent> {
    let mut v = vec![
        key(KeyCode::Char('r')),
        KeyEvent::new(KeyCode::Char('u'), KeyModifiers::CONTROL),
    ];
    v.extend(new.chars().map(|c| key(KeyCode::Char(c))));
    v.push(key(KeyCode::Enter));
    v
}

fn value(app: &App, path: &str) -> f64 {
    app.engine
        .as_ref()
        .unwrap()
        .value(path)
        .unwrap()
        .unwrap_or(f64::NAN)
}

/// The goal, the scan browser and the uncertainty column all work under
/// the names the workbook has now; `face` and `feed` name the renamed
/// station and process.
fn all_three_work(app: &mut App, scans: &Path, face: &str, feed: &str) {
    let e = app.engine.as_ref().unwrap();
    let goal = &e.book().goals[0];
    assert_eq!(goal.vary, format!("station.{face}.area"));
    assert_eq!(goal.target, format!("station.{face}.mach"));
    let outcome = &e.goal_outcomes()[0];
    assert!(outcome.problem.is_none(), "{:?}", outcome.problem);
    let mach = value(app, &format!("station.{face}.mach"));
    assert!((mach - 0.35).abs() < 1e-6, "goal met: face Mach {mach}");

    app.load_scans(scans).unwrap();
    let (msg, err) = app.status.clone().unwrap();
    assert!(!err, "scan 1 applied: {msg}");
    assert_eq!(app.scans.as_ref().unwrap().shown, Some(0));
    // The first scan's inlet probes (T1A, T1B, degF) reach the inlet given
    // of process `feed`: the mean of the recorded columns, in kelvin.
    let text = std::fs::read_to_string(scans).unwrap();
    let mut lines = text.lines();
    let head: Vec<&str> = lines.next().unwrap().split(',').collect();
    let row: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = |n: &str| -> f64 {
        let i = head.iter().position(|h| h.trim() == n).unwrap();
        row[i].trim().parse().unwrap()
    };
    let t_f = (col("T1A") + col("T1B")) / 2.0;
    let t_k = (t_f - 32.0) * 5.0 / 9.0 + 273.15;
    let tt = value(app, &format!("process.{feed}.tt"));
    assert!((tt - t_k).abs() < 1e-9, "scan value {tt} K, probes {t_k} K");

    let u = app
        .uncertainties()
        .expect("the channel map carries uncertainties");
    let tt_face = u
        .get(&format!("station.{face}.tt"))
        .unwrap_or_else(|| panic!("no uncertainty for station.{face}.tt"));
    assert!(tt_face.u95 > 0.0, "the inlet tt channel contributes");
    app.scans = None;
}

#[test]
fn renaming_a_station_and_a_process_keeps_goal_channels_and_uncertainty_and_undo_restores() {
    let (book, scans) = rig_copy("all");
    let mut app = App::new(Settings::default());
    app.open(&book).unwrap();
    all_three_work(&mut app, &scans, "1", "inlet");

    // Station 1 is the first row; r renames it. In the panel (Tab), r
    // renames the process that produces it.
    press(&mut app, &rename_keys("face"));
    assert!(!app.status.clone().unwrap().1, "{:?}", app.status);
    press(&mut app, &[key(KeyCode::Tab)]);
    press(&mut app, &rename_keys("feed"));
    assert!(!app.status.clone().unwrap().1, "{:?}", app.status);
    press(&mut app, &[key(KeyCode::Esc)]);
    let b = app.book().unwrap();
    let channels: Vec<&str> = b
        .channels
        .as_ref()
        .unwrap()
        .map
        .iter()
        .map(|c| c.given.as_str())
        .collect();
    assert!(channels.contains(&"process.feed.tt"), "{channels:?}");
    assert!(
        !channels.iter().any(|c| c.contains("inlet")),
        "{channels:?}"
    );
    all_three_work(&mut app, &scans, "face", "feed");

    // Two undos: the process name, then the station name.
    press(
        &mut app,
        &[key(KeyCode::Char('z')), key(KeyCode::Char('z'))],
    );
    let b = app.book().unwrap();
    assert_eq!(b.stations[0].name, "1");
    assert_eq!(b.processes[0].name, "inlet");
    assert!(
        b.channels
            .as_ref()
            .unwrap()
            .map
            .iter()
            .any(|c| c.given == "process.inlet.tt")
    );
    all_three_work(&mut app, &scans, "1", "inlet");
    let _ = std::fs::remove_dir_all(book.parent().unwrap());
}

#[test]
fn a_rename_to_a_taken_name_is_refused_and_changes_nothing() {
    let (book, _scans) = rig_copy("taken");
    let mut app = App::new(Settings::default());
    app.open(&book).unwrap();
    let before = app.book().unwrap().clone();
    press(&mut app, &rename_keys("2"));
    let (msg, err) = app.status.clone().unwrap();
    assert!(err, "{msg}");
    assert!(msg.contains('2'), "{msg}");
    assert_eq!(app.book().unwrap(), &before);
    let _ = std::fs::remove_dir_all(book.parent().unwrap());
}
