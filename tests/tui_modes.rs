//! Mode switches in the terminal workbook (driven through `App::on_key`,
//! no terminal): every mode of every process of every demo sheet, switched
//! to and back through the mode chooser, restores the process's givens and
//! its exit's measured values exactly; a first switch starts from the state
//! computed now (a duct's measured exit pressure is the one it delivers, a
//! nozzle's given exit area the area it has). The checks are identities on
//! the workbook and the engine's own values before the switch.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use stationwise::book::{Duct, Exit, Kind};
use stationwise::tui::app::{App, ChooseFor, Popup};
use stationwise::tui::settings::Settings;
use std::path::{Path, PathBuf};

fn sheet(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sheets")
        .join(name)
}

fn open(name: &str) -> App {
    let mut app = App::new(Settings::default());
    app.open(&sheet(name)).unwrap();
    app.popups.clear();
    app
}

fn key(c: KeyCode) -> KeyEvent {
    KeyEvent::new(c, KeyModifiers::NONE)
}

/// The chooser's candidate modes (the popup must be open).
fn offered(app: &App) -> Vec<Kind> {
    match app.popups.last() {
        Some(Popup::Choose {
            purpose: ChooseFor::Mode(list),
            ..
        }) => list.clone(),
        other => panic!("expected the mode chooser, got {other:?}"),
    }
}

/// Open the chooser and take entry `i`.
fn take(app: &mut App, i: usize) {
    for _ in 0..i {
        app.on_key(key(KeyCode::Down));
    }
    app.on_key(key(KeyCode::Enter));
}

fn label(k: &Kind) -> String {
    stationwise::kinds::of(k).mode_label()
}

/// The process into station row `row`, and its exit's measured Tt and pt.
fn state(app: &App, row: usize) -> (Kind, Option<String>, Option<String>) {
    let e = app.engine.as_ref().unwrap();
    let b = e.book();
    let p = &b.processes[e.producer_of(row)];
    let st = &b.stations[row];
    (
        p.kind.clone(),
        st.tt.as_ref().map(|g| g.text().to_string()),
        st.pt.as_ref().map(|g| g.text().to_string()),
    )
}

#[test]
fn every_mode_switched_away_and_back_restores_the_givens() {
    let (mut checked, mut refused) = (0, 0);
    for name in [
        "turbojet.ron",
        "turbofan.ron",
        "ramjet.ron",
        "combustor-rig.ron",
        "compressor-rig.ron",
        "tunnel.ron",
        "compressor-speedline.ron",
    ] {
        let mut app = open(name);
        let n = app.book().unwrap().stations.len();
        for row in 0..n {
            app.row = row;
            let original = state(&app, row);
            app.on_key(key(KeyCode::Char('m')));
            if app.popups.is_empty() {
                continue; // one mode only
            }
            let count = offered(&app).len();
            app.on_key(key(KeyCode::Esc));
            for j in 1..count {
                app.on_key(key(KeyCode::Char('m')));
                take(&mut app, j);
                if let Some((msg, true)) = &app.status
                    && msg.starts_with("not done")
                {
                    // A mode whose givens the channel map or a goal names
                    // cannot be left: refused with the reason, nothing changed.
                    assert!(msg.contains("channel") || msg.contains("goal"), "{msg}");
                    assert_eq!(state(&app, row), original);
                    refused += 1;
                    continue;
                }
                assert_ne!(
                    label(&state(&app, row).0),
                    label(&original.0),
                    "{name} row {row}: mode {j} taken"
                );
                app.on_key(key(KeyCode::Char('m')));
                let back = offered(&app)
                    .iter()
                    .position(|k| label(k) == label(&original.0))
                    .unwrap_or_else(|| panic!("{name} row {row}: the original mode is offered"));
                take(&mut app, back);
                assert_eq!(
                    state(&app, row),
                    original,
                    "{name} row {row}: away to mode {j} and back"
                );
                checked += 1;
            }
        }
    }
    assert!(checked >= 20, "{checked} switches checked");
    assert!(refused <= 4, "{refused} switches refused");
}

#[test]
fn a_first_switch_starts_from_the_computed_state() {
    let mut app = open("turbojet.ron");
    // The intake (station 2): recovery 0.99 given.
    app.row = 1;
    let pt2 = app.engine.as_ref().unwrap().station("2").unwrap().pt;
    app.on_key(key(KeyCode::Char('m')));
    let list = offered(&app);
    let measured = list
        .iter()
        .position(|k| matches!(k, Kind::Duct(Duct::MeasuredExit)))
        .unwrap();
    take(&mut app, measured);
    let e = app.engine.as_ref().unwrap();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let pt_given = e.book().stations[1].pt.as_ref().unwrap().si();
    assert!(
        ((pt_given - pt2) / pt2).abs() < 1e-5,
        "measured exit pt starts at the delivered {pt2} Pa, not {pt_given}"
    );
    let rec = e.value("process.intake.recovery").unwrap().unwrap();
    assert!((rec - 0.99).abs() < 1e-5, "recovery stays {rec}");

    // The nozzle (station 9): its exit area given starts at its area now.
    app.row = 5;
    let area = app
        .engine
        .as_ref()
        .unwrap()
        .value("process.nozzle.area")
        .unwrap()
        .unwrap();
    app.on_key(key(KeyCode::Char('m')));
    let list = offered(&app);
    let given = list
        .iter()
        .position(|k| matches!(k, Kind::Nozzle(n) if matches!(n.exit, Exit::Area(_))))
        .unwrap();
    take(&mut app, given);
    let e = app.engine.as_ref().unwrap();
    let p = e
        .book()
        .processes
        .iter()
        .find(|p| p.name == "nozzle")
        .unwrap();
    let Kind::Nozzle(n) = &p.kind else {
        panic!("{:?}", p.kind)
    };
    let Exit::Area(a) = &n.exit else {
        panic!("{:?}", n.exit)
    };
    assert!(
        ((a.si() - area) / area).abs() < 1e-5,
        "exit area starts at {area} m2, not {}",
        a.si()
    );
}

#[test]
fn a_duct_cycled_through_its_modes_comes_back_with_its_recovery() {
    let mut app = open("turbojet.ron");
    app.row = 1;
    let original = state(&app, 1);
    app.on_key(key(KeyCode::Char('m')));
    let n = offered(&app).len();
    app.on_key(key(KeyCode::Esc));
    assert_eq!(n, 5, "a duct has five modes");
    // Each time the next mode in the list (entry 1), round to the start.
    for _ in 0..n {
        app.on_key(key(KeyCode::Char('m')));
        take(&mut app, 1);
    }
    assert_eq!(state(&app, 1), original);
    match &original.0 {
        Kind::Duct(Duct::Recovery { recovery }) => assert_eq!(recovery.text(), "0.99"),
        k => panic!("{k:?}"),
    }
}
