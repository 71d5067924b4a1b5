//! Goals edited from the keyboard: added from choosers, solved, switched
//! off and on, deleted, each undoable, and written to the file.
//!
//! Independent check: a goal on the net thrust is met when the workbook,
//! evaluated with the varied given at the value found, gives the target
//! thrust (the engine's own evaluation with that one value set, not the
//! goal solver's report); switched off, the workbook gives what it gives
//! without the goal.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

mod common;

use common::{copy_demo, press};
use stationwise::format;
use stationwise::tui::app::{App, Popup};
use stationwise::tui::settings::Settings;

fn value(app: &App, path: &str) -> f64 {
    app.engine.as_ref().unwrap().value(path).unwrap().unwrap()
}

#[test]
fn a_goal_is_added_solved_switched_off_and_deleted_each_undoable() {
    let copy = copy_demo("turbojet.ron", "goals");
    let mut app = App::new(Settings::default());
    app.open(&copy.path).unwrap();
    let thrust0 = value(&app, "summary.thrust_net");
    let w0 = value(&app, "station.0.w");

    // G lists the goals (none); a adds; the varied given and the target
    // are picked from the choosers by typed search.
    press(&mut app, "G a Enter text:freestream.w Enter");
    match app.popups.last() {
        Some(Popup::GoalForm { fields, sel, .. }) => {
            assert_eq!(fields[0], "process.freestream.w");
            // The bracket follows the given: half to twice 20 kg/s.
            assert_eq!(
                (fields[3].as_str(), fields[4].as_str()),
                ("10.000 kg/s", "40.000 kg/s")
            );
            assert_eq!(*sel, 1);
        }
        other => panic!("{other:?}"),
    }
    press(&mut app, "Enter text:thrust_net Enter");
    match app.popups.last() {
        Some(Popup::GoalForm { fields, .. }) => {
            assert_eq!(fields[1], "summary.thrust_net");
            assert!(fields[2].ends_with("kN"), "{fields:?}");
        }
        other => panic!("{other:?}"),
    }
    // A bare number under a shown unit is refused (20 is not 20 N here).
    press(&mut app, "ctrl-u text:20 Enter");
    assert!(matches!(app.popups.last(), Some(Popup::GoalForm { .. })));
    let (msg, err) = app.status.clone().unwrap();
    assert!(err && msg.contains("say the unit"), "{msg}");
    // A bad value is refused with the reason; the form stays.
    press(&mut app, "ctrl-u text:lots Enter");
    assert!(matches!(app.popups.last(), Some(Popup::GoalForm { .. })));
    assert!(app.status.as_ref().unwrap().1, "{:?}", app.status);
    press(&mut app, r"ctrl-u text:20\skN Enter");
    assert!(
        matches!(app.popups.last(), Some(Popup::Goals { .. })),
        "{:?}",
        app.status
    );
    let b = app.book().unwrap();
    assert_eq!(b.goals.len(), 1);
    // Met: the thrust is 20 kN, and evaluating the workbook with the flow
    // found gives the same thrust.
    let w = value(&app, "station.0.w");
    assert!((value(&app, "summary.thrust_net") - 20e3).abs() < 1e-6 * 20e3);
    let mut e = app.engine.as_ref().unwrap().clone();
    let mut nb = e.book().clone();
    nb.goals.clear();
    e.replace_book(nb).unwrap();
    e.set_si("process.freestream.w", w).unwrap();
    assert!((e.value("summary.thrust_net").unwrap().unwrap() - 20e3).abs() < 1e-6 * 20e3);
    assert!(
        app.goal_lines()[0].contains("met with"),
        "{:?}",
        app.goal_lines()
    );

    // Space switches it off: the file's flow and thrust are back; the file
    // says off.
    press(&mut app, "Space");
    assert!(app.book().unwrap().goals[0].off);
    assert!((value(&app, "station.0.w") - w0).abs() < 1e-12);
    assert!((value(&app, "summary.thrust_net") - thrust0).abs() < 1e-9 * thrust0);
    assert!(format::to_text(app.book().unwrap()).contains("off: true"));
    assert!(app.goal_lines()[0].contains("[off]"));
    // Undo switches it on again.
    press(&mut app, "Esc z");
    assert!(!app.book().unwrap().goals[0].off);
    assert!((value(&app, "summary.thrust_net") - 20e3).abs() < 1e-6 * 20e3);
    // x deletes; undo brings it back.
    press(&mut app, "G x");
    assert!(app.book().unwrap().goals.is_empty());
    press(&mut app, "Esc z");
    assert_eq!(app.book().unwrap().goals.len(), 1);
    // z and Z work inside the list too.
    press(&mut app, "G x");
    assert!(app.book().unwrap().goals.is_empty());
    press(&mut app, "z");
    assert_eq!(app.book().unwrap().goals.len(), 1);
    assert!(matches!(app.popups.last(), Some(Popup::Goals { .. })));
    // A second goal varying the same given is refused.
    press(
        &mut app,
        r"a Enter text:freestream.w Enter Enter text:tsfc Enter Enter",
    );
    let (msg, err) = app.status.clone().unwrap();
    assert!(
        err && msg.contains("varies process.freestream.w already"),
        "{msg}"
    );
    assert_eq!(app.book().unwrap().goals.len(), 1);
    press(&mut app, "Esc Esc");
    // Edit: Enter on the goal opens its form with its texts.
    press(&mut app, "G Enter");
    match app.popups.last() {
        Some(Popup::GoalForm { index, fields, .. }) => {
            assert_eq!(*index, Some(0));
            assert_eq!(fields[2], "20 kN");
        }
        other => panic!("{other:?}"),
    }
    press(&mut app, r"Down Down ctrl-u text:18\skN Enter");
    assert!((value(&app, "summary.thrust_net") - 18e3).abs() < 1e-6 * 18e3);
}
