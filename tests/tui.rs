//! The terminal workbook driven without a terminal: key sequences into
//! `App::on_key` on a temporary copy of the turbojet demo, the engine's
//! values and the file checked after each; the screen rendered off-screen
//! (`render_text`, `render_buffer`) and pinned by insta snapshots of every
//! view at two sizes, in colour and in plain ASCII.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::style::{Color, Modifier};
use stationwise::book::{Compression, Kind, Workbook};
use stationwise::format;
use stationwise::tui::app::{App, Focus, Pending, Popup, View};
use stationwise::tui::keymap::COMMANDS;
use stationwise::tui::settings::Settings;
use stationwise::tui::{render_buffer, render_text};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::{Duration, SystemTime};

// ---------------------------------------------------------------- helpers

static DIRS: AtomicUsize = AtomicUsize::new(0);

/// A copy of the turbojet demo in a folder of its own, removed on drop.
struct TempSheet(PathBuf);

impl std::ops::Deref for TempSheet {
    type Target = Path;
    fn deref(&self) -> &Path {
        &self.0
    }
}

impl AsRef<Path> for TempSheet {
    fn as_ref(&self) -> &Path {
        &self.0
    }
}

impl Drop for TempSheet {
    fn drop(&mut self) {
        if let Some(dir) = self.0.parent() {
            let _ = std::fs::remove_dir_all(dir);
        }
    }
}

/// A fresh folder with a copy of the turbojet demo; returns the copy.
fn sheet_copy() -> TempSheet {
    let n = DIRS.fetch_add(1, Ordering::SeqCst);
    let dir = std::env::temp_dir().join(format!("stationwise-tui-{}-{n}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("turbojet.ron");
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/turbojet.ron");
    std::fs::copy(src, &path).unwrap();
    TempSheet(path)
}

/// The app on a fresh copy of the turbojet, with the "opened PATH" status
/// cleared so the screen does not depend on the temporary folder's name.
fn open_with(settings: Settings) -> (App, TempSheet) {
    let path = sheet_copy();
    let mut app = App::new(settings);
    app.open(&path).unwrap();
    assert!(app.popups.is_empty(), "no recovery offer on a fresh copy");
    app.status = None;
    (app, path)
}

fn open() -> (App, TempSheet) {
    open_with(Settings::default())
}

fn ascii() -> Settings {
    Settings {
        ascii: true,
        color: false,
        ..Settings::default()
    }
}

fn ev(code: KeyCode, m: KeyModifiers) -> KeyEvent {
    KeyEvent::new(code, m)
}

/// Type key tokens, as written for tui-drive: `j`, `K`, `Tab`, `Enter`,
/// `Esc`, `Backspace`, `Up`, `Left`, `F1`, `ctrl-z`, and `text:a\sb` for a
/// literal string (`\s` is a space).
fn press(app: &mut App, keys: &str) {
    for tok in keys.split_whitespace() {
        if let Some(t) = tok.strip_prefix("text:") {
            for c in t.replace("\\s", " ").chars() {
                app.on_key(char_key(c));
            }
            continue;
        }
        let none = KeyModifiers::NONE;
        let k = match tok {
            "Enter" => ev(KeyCode::Enter, none),
            "Esc" => ev(KeyCode::Esc, none),
            "Tab" => ev(KeyCode::Tab, none),
            "BackTab" => ev(KeyCode::BackTab, KeyModifiers::SHIFT),
            "Backspace" => ev(KeyCode::Backspace, none),
            "Up" => ev(KeyCode::Up, none),
            "Down" => ev(KeyCode::Down, none),
            "Left" => ev(KeyCode::Left, none),
            "Right" => ev(KeyCode::Right, none),
            "PageDown" => ev(KeyCode::PageDown, none),
            "F1" => ev(KeyCode::F(1), none),
            t if t.starts_with("ctrl-") && t.chars().count() == 6 => ev(
                KeyCode::Char(t.chars().last().unwrap()),
                KeyModifiers::CONTROL,
            ),
            t if t.chars().count() == 1 => char_key(t.chars().next().unwrap()),
            t => panic!("unknown key token {t}"),
        };
        app.on_key(k);
    }
}

/// A typed character as a terminal reports it (upper case with SHIFT).
fn char_key(c: char) -> KeyEvent {
    let m = if c.is_ascii_uppercase() {
        KeyModifiers::SHIFT
    } else {
        KeyModifiers::NONE
    };
    ev(KeyCode::Char(c), m)
}

fn book(app: &App) -> &Workbook {
    app.book().expect("a workbook is open")
}

/// The text of a given as typed.
fn given_text(b: &Workbook, path: &str) -> Option<String> {
    b.givens()
        .into_iter()
        .find(|(p, ..)| p == path)
        .map(|(_, _, t, _)| t)
}

/// A derived value in SI.
fn val(app: &App, path: &str) -> f64 {
    app.engine
        .as_ref()
        .unwrap()
        .value(path)
        .unwrap()
        .unwrap_or_else(|| panic!("{path} not computed"))
}

fn thrust(app: &App) -> f64 {
    app.engine.as_ref().unwrap().summary().thrust_net.unwrap()
}

fn station_names(app: &App) -> Vec<String> {
    book(app).stations.iter().map(|s| s.name.clone()).collect()
}

fn process<'a>(app: &'a App, name: &str) -> &'a stationwise::book::Process {
    book(app)
        .processes
        .iter()
        .find(|p| p.name == name)
        .unwrap_or_else(|| panic!("no process {name}"))
}

fn status(app: &App) -> (String, bool) {
    app.status.clone().expect("a status message")
}

const PR: &str = "process.compressor.pressure_ratio";
/// Keys from the start: to the compressor exit (station 3), Tab into the
/// panel, down to the pressure ratio (below the static-state and branch rows).
const TO_PR: &str = "j j Tab j j";
/// Values downstream of the compressor that its pressure ratio moves.
const DOWNSTREAM: [&str; 7] = [
    "station.3.pt",
    "station.4.pt",
    "station.4.w",
    "station.5.tt",
    "station.5.pt",
    "station.9.tt",
    "station.9.pt",
];

fn rel_change(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

// --------------------------------------------------------------- editing

#[test]
fn editing_the_compressor_pressure_ratio_recomputes_downstream_and_the_screen() {
    let (mut app, _) = open();
    let before: Vec<f64> = DOWNSTREAM.iter().map(|p| val(&app, p)).collect();
    let t0 = thrust(&app);
    press(&mut app, TO_PR);
    assert_eq!(app.row, 2);
    assert_eq!(app.focus, Focus::Panel);
    press(&mut app, "Enter");
    match app.popups.last() {
        Some(Popup::Edit { path, input, .. }) => {
            assert_eq!(path, PR);
            assert_eq!(input.text(), "10", "the edit starts from the text as typed");
            assert!(input.is_selected(), "and selected, so typing replaces it");
        }
        other => panic!("expected the edit popup, got {other:?}"),
    }
    // No ctrl-u: typing replaces the selected value rather than appending.
    press(&mut app, "1 1 Enter");
    assert!(app.popups.is_empty());
    assert_eq!(given_text(book(&app), PR).as_deref(), Some("11"));
    for (p, b) in DOWNSTREAM.iter().zip(&before) {
        let a = val(&app, p);
        assert!(rel_change(a, *b) > 1e-4, "{p} did not change: {b} -> {a}");
    }
    // The turbine entry temperature is a given: it must not move.
    assert_eq!(val(&app, "station.4.tt"), 1450.0);
    let t1 = thrust(&app);
    assert!(rel_change(t1, t0) > 1e-4, "thrust {t0} -> {t1}");
    assert!(app.modified);
    let (msg, err) = status(&app);
    assert!(!err && msg.contains("recomputed"), "{msg}");

    let screen = render_text(&app, 80, 24);
    assert!(screen.contains("pressure_ratio = 11"), "{screen}");
    let pt3 = stationwise::report::sig(val(&app, "station.3.pt") / 1000.0, 5);
    let row3 = screen.lines().find(|l| l.contains("> 3")).unwrap();
    assert!(
        row3.contains(&pt3),
        "station 3 row shows the new pt {pt3}: {row3}"
    );
    let kn = stationwise::report::sig(t1 / 1000.0, 5);
    let net = screen.lines().find(|l| l.contains("net thrust ")).unwrap();
    assert!(net.contains(&format!(" {kn} kN")), "{net}");
    assert!(
        screen.contains("turbojet.ron *"),
        "title marks unsaved changes"
    );
}

#[test]
fn invalid_values_keep_the_old_one_and_say_why() {
    for (bad, why) in [("abc", "not a number"), ("10 K", "temperature unit")] {
        let (mut app, _) = open();
        let t0 = thrust(&app);
        press(&mut app, &format!("{TO_PR} Enter ctrl-u"));
        press(&mut app, &format!("text:{}", bad.replace(' ', "\\s")));
        press(&mut app, "Enter");
        // The popup stays open with the text, so it can be corrected.
        match app.popups.last() {
            Some(Popup::Edit { input, .. }) => assert_eq!(input.text(), bad),
            other => panic!("{bad}: expected the edit popup to stay, got {other:?}"),
        }
        let (msg, err) = status(&app);
        assert!(err, "{bad}: the status is an error");
        assert!(msg.contains(why), "{bad}: {msg}");
        assert!(msg.contains("old value kept"), "{bad}: {msg}");
        assert_eq!(given_text(book(&app), PR).as_deref(), Some("10"));
        assert_eq!(thrust(&app).to_bits(), t0.to_bits());
        assert!(!app.modified && app.undo.is_empty());
        // The reason is on screen whole, inside the popup, even at 80 columns.
        let screen = render_text(&app, 80, 24);
        assert!(screen.contains(why), "{bad}: {screen}");
        press(&mut app, "Esc");
        assert!(app.popups.is_empty());
        assert_eq!(given_text(book(&app), PR).as_deref(), Some("10"));
    }
}

#[test]
fn escape_cancels_an_edit() {
    let (mut app, _) = open();
    let t0 = thrust(&app);
    press(&mut app, &format!("{TO_PR} Enter ctrl-u 1 2 Esc"));
    assert!(app.popups.is_empty());
    assert_eq!(status(&app).0, "edit cancelled");
    assert_eq!(given_text(book(&app), PR).as_deref(), Some("10"));
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
    assert!(!app.modified);
    assert!(app.undo.is_empty());
}

#[test]
fn a_derived_cell_is_not_editable_and_says_where_it_comes_from() {
    let (mut app, _) = open();
    press(&mut app, "j j Enter");
    assert!(app.popups.is_empty());
    let (msg, _) = status(&app);
    assert!(msg.contains("derived by \"compressor\""), "{msg}");
    // The free-stream mass flow in the W column is a given: editable.
    press(&mut app, "k k l l Enter");
    match app.popups.last() {
        Some(Popup::Edit { path, .. }) => assert_eq!(path, "process.freestream.w"),
        other => panic!("{other:?}"),
    }
}

#[test]
fn undo_restores_the_thrust_exactly_and_redo_reapplies() {
    let (mut app, _) = open();
    let t0 = thrust(&app);
    press(&mut app, &format!("{TO_PR} Enter ctrl-u 1 1 Enter"));
    let t1 = thrust(&app);
    assert_ne!(t0.to_bits(), t1.to_bits());
    press(&mut app, "z");
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
    assert_eq!(given_text(book(&app), PR).as_deref(), Some("10"));
    assert_eq!(status(&app).0, "undone");
    // Back at the state opened: nothing to save, no modified mark.
    assert!(!app.modified);
    press(&mut app, "Z");
    assert_eq!(thrust(&app).to_bits(), t1.to_bits());
    assert_eq!(status(&app).0, "redone");
    assert!(app.modified);
    press(&mut app, "ctrl-z");
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
    press(&mut app, "ctrl-y");
    assert_eq!(thrust(&app).to_bits(), t1.to_bits());
    press(&mut app, "z z");
    assert_eq!(status(&app).0, "nothing to undo");
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
    // A new change clears the redo stack.
    press(&mut app, "Enter ctrl-u 9 Enter Z");
    assert_eq!(status(&app).0, "nothing to redo");
    assert_eq!(given_text(book(&app), PR).as_deref(), Some("9"));
}

// ------------------------------------------------------- structural edits

const ORIGINAL: [&str; 6] = ["0", "2", "3", "4", "5", "9"];

#[test]
fn insert_a_station_then_undo_and_redo() {
    let (mut app, _) = open();
    let t0 = thrust(&app);
    press(&mut app, "j j a");
    match app.popups.last() {
        Some(Popup::Text { input, title, .. }) => {
            assert_eq!(
                input.text(),
                "",
                "the name starts empty: typing replaces nothing"
            );
            assert!(title.contains("Enter alone: 3a"), "{title}");
        }
        other => panic!("{other:?}"),
    }
    press(&mut app, "Enter");
    assert_eq!(station_names(&app), ["0", "2", "3", "3a", "4", "5", "9"]);
    let d = process(&app, "duct 3a");
    assert_eq!((d.from.as_deref(), d.to.as_str()), (Some("3"), "3a"));
    assert_eq!(process(&app, "combustor").from.as_deref(), Some("3a"));
    assert_eq!(app.row, 3, "the new station is selected");
    // A loss-free duct changes nothing downstream.
    assert!(rel_change(thrust(&app), t0) < 1e-9);
    assert!(render_text(&app, 80, 24).contains("> 3a         duct 3a"));
    press(&mut app, "z");
    assert_eq!(station_names(&app), ORIGINAL);
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
    press(&mut app, "Z");
    assert_eq!(station_names(&app).len(), 7);
    // A name in use is refused.
    press(&mut app, "a ctrl-u 4 Enter");
    assert!(status(&app).1 && status(&app).0.contains("already used"));
    assert_eq!(station_names(&app).len(), 7);
}

#[test]
fn rename_a_station_and_a_process_then_undo() {
    let (mut app, _) = open();
    press(&mut app, "j j r ctrl-u text:3x Enter");
    assert_eq!(station_names(&app), ["0", "2", "3x", "4", "5", "9"]);
    assert_eq!(process(&app, "compressor").to, "3x");
    assert_eq!(process(&app, "combustor").from.as_deref(), Some("3x"));
    assert!(render_text(&app, 80, 24).contains("> 3x"));
    press(&mut app, "z");
    assert_eq!(station_names(&app), ORIGINAL);
    assert_eq!(process(&app, "combustor").from.as_deref(), Some("3"));

    // In the panel, r renames the process; its givens move with it.
    press(&mut app, "Tab r ctrl-u text:hpc Enter");
    assert!(book(&app).processes.iter().any(|p| p.name == "hpc"));
    assert_eq!(
        given_text(book(&app), "process.hpc.pressure_ratio").as_deref(),
        Some("10")
    );
    assert!(render_text(&app, 80, 24).contains("compressor \"hpc\""));
    press(&mut app, "z");
    assert!(book(&app).processes.iter().any(|p| p.name == "compressor"));
}

#[test]
fn delete_a_station_then_undo() {
    let (mut app, _) = open();
    let t0 = thrust(&app);
    press(&mut app, "j j x");
    assert_eq!(station_names(&app), ["0", "2", "4", "5", "9"]);
    assert!(!book(&app).processes.iter().any(|p| p.name == "compressor"));
    assert_eq!(process(&app, "combustor").from.as_deref(), Some("2"));
    assert!(status(&app).0.contains("deleted station 3"));
    press(&mut app, "z");
    assert_eq!(station_names(&app), ORIGINAL);
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
    // The entry station cannot go while the intake reads it.
    press(&mut app, "k k x");
    assert!(status(&app).1, "{:?}", app.status);
    assert_eq!(station_names(&app), ORIGINAL);
}

/// Every kind of edit the keyboard can make, each undone by one `z` to the
/// file's exact text (and redone by `Z`); the workbook text is the
/// independent record (what a save would write).
#[test]
fn every_edit_is_undone_by_one_z() {
    let edits: &[(&str, &str)] = &[
        ("a given", &format!("{TO_PR} Enter ctrl-u 1 1 Enter")),
        ("a station renamed", "j j r ctrl-u text:3a Enter"),
        ("a process renamed", "j j Tab r ctrl-u text:hpc Enter"),
        ("a station inserted", "j j a text:2a Enter"),
        ("a station deleted", "j j x"),
        ("a kind changed", "j j K Enter"),
        ("a mode changed", "j j m Down Enter"),
        ("the static state", "j j Tab Enter Down Enter"),
        ("the branch", "j j Tab j Enter"),
        ("a shaft offtake added", "j j Tab j j j j j j Enter"),
        ("the title", "g Enter ctrl-u text:rig\\sday Enter"),
        ("the note", "g j Enter ctrl-u text:scan\\s7 Enter"),
        ("the ambient condition", "g j j Enter"),
        (
            "an ambient given",
            "g j j j Enter ctrl-u text:100\\sm Enter",
        ),
        ("the gas model", "g j j j j j j j Enter"),
        (
            "a goal added",
            "G a Enter text:freestream.w Enter Enter text:thrust_net Enter Enter",
        ),
    ];
    for (what, keys) in edits {
        let (mut app, _) = open();
        let before = format::to_text(book(&app));
        press(&mut app, keys);
        // Close whatever popup the edit leaves open (the set-up, the goal
        // list) so that z reaches the workbook.
        while !app.popups.is_empty() {
            press(&mut app, "Esc");
        }
        let after = format::to_text(book(&app));
        assert_ne!(
            before, after,
            "{what}: the keys changed nothing ({:?})",
            app.status
        );
        press(&mut app, "z");
        assert_eq!(
            format::to_text(book(&app)),
            before,
            "{what}: z did not undo it"
        );
        press(&mut app, "Z");
        assert_eq!(
            format::to_text(book(&app)),
            after,
            "{what}: Z did not redo it"
        );
    }
}

#[test]
fn change_mode_then_undo() {
    let (mut app, _) = open();
    let t0 = thrust(&app);
    let pt3 = val(&app, "station.3.pt");
    // The chooser lists the design mode (now), the design mode on the
    // polytropic basis, then the measured mode.
    press(&mut app, "j j m Down Down Enter");
    match &process(&app, "compressor").kind {
        Kind::Compressor(c) => assert_eq!(c.mode, Compression::Measured),
        k => panic!("{k:?}"),
    }
    // The measured mode reads the exit Tt and pt, so they are put on the
    // station from the values computed before: the cycle stays computed.
    let st = &book(&app).stations[2];
    assert!(st.tt.is_some() && st.pt.is_some());
    assert!(app.engine.as_ref().unwrap().problems().is_empty());
    assert!(rel_change(val(&app, "station.3.pt"), pt3) < 1e-5);
    assert!(rel_change(thrust(&app), t0) < 1e-4);
    let screen = render_text(&app, 80, 24);
    assert!(screen.contains("compressor: measured exit"), "{screen}");
    // And back to the design mode, which reads no station values.
    press(&mut app, "m Down Enter");
    assert!(book(&app).stations[2].tt.is_none());
    assert!(app.engine.as_ref().unwrap().problems().is_empty());
    press(&mut app, "z z");
    match &process(&app, "compressor").kind {
        Kind::Compressor(c) => assert!(matches!(c.mode, Compression::Design { .. })),
        k => panic!("{k:?}"),
    }
    assert!(book(&app).stations[2].tt.is_none());
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
}

#[test]
fn change_kind_then_undo() {
    let (mut app, _) = open();
    let t0 = thrust(&app);
    press(&mut app, "j j K");
    match app.popups.last() {
        Some(Popup::Choose { items, sel, .. }) => {
            assert_eq!(*sel, 0);
            assert_eq!(items[0], "duct");
        }
        other => panic!("{other:?}"),
    }
    press(&mut app, "Enter");
    assert!(matches!(process(&app, "compressor").kind, Kind::Duct(_)));
    assert!(status(&app).0.contains("now: duct"));
    assert!(render_text(&app, 80, 24).contains("into 3: duct \"compressor\""));
    press(&mut app, "z");
    assert!(matches!(
        process(&app, "compressor").kind,
        Kind::Compressor(_)
    ));
    assert_eq!(thrust(&app).to_bits(), t0.to_bits());
    // An entry kind is refused for a station that has an upstream one.
    press(&mut app, "K text:entry Enter");
    assert!(status(&app).1, "{:?}", app.status);
    assert!(matches!(
        process(&app, "compressor").kind,
        Kind::Compressor(_)
    ));
}

// ------------------------------------------------------------------ files

fn inode(p: &Path) -> u64 {
    use std::os::unix::fs::MetadataExt;
    std::fs::metadata(p).unwrap().ino()
}

fn dir_entries(p: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(p.parent().unwrap())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().to_string())
        .collect();
    v.sort();
    v
}

#[test]
fn save_writes_the_file_atomically() {
    let (mut app, path) = open();
    let ino = inode(&path);
    press(&mut app, &format!("{TO_PR} Enter ctrl-u 1 1 Enter ctrl-s"));
    let (msg, err) = status(&app);
    assert!(!err && msg.starts_with("saved"), "{msg}");
    assert!(!app.modified);
    assert!(!render_text(&app, 80, 24).contains("turbojet.ron *"));
    let loaded = format::load(&path).unwrap();
    assert_eq!(given_text(&loaded, PR).as_deref(), Some("11"));
    // Written beside and renamed over: a new inode, no temporary left.
    assert_ne!(
        inode(&path),
        ino,
        "the file was replaced, not rewritten in place"
    );
    assert_eq!(dir_entries(&path), ["turbojet.ron"]);
    // What was saved evaluates to what the screen showed.
    let e = stationwise::engine::Engine::new(loaded).unwrap();
    assert_eq!(e.summary().thrust_net, Some(thrust(&app)));
}

#[test]
fn saving_over_a_file_changed_on_disk_asks_first() {
    let (mut app, path) = open();
    press(&mut app, &format!("{TO_PR} Enter ctrl-u 1 1 Enter"));
    // Someone else edits the file: new bytes, new modification time.
    let mut text = std::fs::read_to_string(&path).unwrap();
    text.push_str("// edited elsewhere\n");
    std::fs::write(&path, &text).unwrap();
    let f = std::fs::File::options().write(true).open(&path).unwrap();
    f.set_modified(SystemTime::now() - Duration::from_secs(3600))
        .unwrap();
    drop(f);

    press(&mut app, "ctrl-s");
    match app.popups.last() {
        Some(Popup::Confirm { text, then }) => {
            assert_eq!(*then, Pending::SaveOver);
            assert!(text.contains("changed on disk"), "{text}");
        }
        other => panic!("expected a confirmation, got {other:?}"),
    }
    assert!(render_text(&app, 80, 24).contains("changed on disk"));
    // No: nothing written.
    press(&mut app, "n");
    assert!(app.popups.is_empty());
    assert!(app.modified);
    assert!(
        std::fs::read_to_string(&path)
            .unwrap()
            .contains("edited elsewhere")
    );
    // Yes: saved over it.
    press(&mut app, "ctrl-s y");
    assert!(app.popups.is_empty());
    assert!(!app.modified);
    let now = std::fs::read_to_string(&path).unwrap();
    assert!(!now.contains("edited elsewhere"));
    assert_eq!(
        given_text(&format::load(&path).unwrap(), PR).as_deref(),
        Some("11")
    );
    // Saved and unchanged since: the next save does not ask.
    press(&mut app, "ctrl-s");
    assert!(app.popups.is_empty());
}

#[test]
fn quitting_with_unsaved_changes_asks_first() {
    let (mut app, _) = open();
    press(&mut app, "q");
    assert!(app.quit, "nothing unsaved: q quits at once");

    let (mut app, _) = open();
    press(&mut app, &format!("{TO_PR} Enter ctrl-u 1 1 Enter q"));
    assert!(!app.quit);
    match app.popups.last() {
        Some(Popup::Confirm { then, text }) => {
            assert_eq!(*then, Pending::Quit);
            assert!(text.contains("unsaved changes"));
        }
        other => panic!("{other:?}"),
    }
    press(&mut app, "n");
    assert!(!app.quit && app.popups.is_empty());
    press(&mut app, "ctrl-q Esc");
    assert!(!app.quit && app.popups.is_empty());
    press(&mut app, "q y");
    assert!(app.quit);
}

#[test]
fn a_recovery_file_is_written_and_offered_at_the_next_open() {
    let (mut app, path) = open();
    assert_eq!(
        app.write_recovery(),
        None,
        "nothing unsaved, nothing written"
    );
    press(&mut app, &format!("{TO_PR} Enter ctrl-u 1 1 Enter"));
    let rp = app.write_recovery().unwrap();
    assert_eq!(rp, path.with_file_name("turbojet.ron.recovery"));

    let mut again = App::new(Settings::default());
    again.open(&path).unwrap();
    match again.popups.last() {
        Some(Popup::Confirm { text, .. }) => assert!(text.contains("recovery file"), "{text}"),
        other => panic!("{other:?}"),
    }
    assert!(render_text(&again, 80, 24).contains("recovery file"));
    press(&mut again, "y");
    assert_eq!(given_text(book(&again), PR).as_deref(), Some("11"));
    assert!(again.modified, "recovered changes still need a save");
    assert!(!rp.exists());

    // n deletes the recovery file and keeps the file's own values.
    app.write_recovery().unwrap();
    let mut third = App::new(Settings::default());
    third.open(&path).unwrap();
    press(&mut third, "n");
    assert!(!rp.exists());
    assert_eq!(given_text(book(&third), PR).as_deref(), Some("10"));
}

// --------------------------------------------------------- views and help

#[test]
fn help_lists_every_command_with_its_keys() {
    let (mut app, _) = open();
    press(&mut app, "?");
    assert!(matches!(app.popups.last(), Some(Popup::Help { .. })));
    // Every screen of help, scrolled through.
    let mut screen = render_text(&app, 120, 40);
    for _ in 0..20 {
        app.on_key(ev(KeyCode::Down, KeyModifiers::NONE));
        screen.push_str(&render_text(&app, 120, 40));
    }
    press(&mut app, "Esc ?");
    for (_, name, doc, keys) in COMMANDS {
        let keys = keys.join(", ");
        let line = screen
            .lines()
            .find(|l| l.contains(&format!(" {name} ")) && l.contains(doc))
            .unwrap_or_else(|| panic!("help lacks {name}:\n{screen}"));
        let (before, _) = line.split_once(&format!(" {name} ")).unwrap();
        assert!(
            before.ends_with(&format!("{keys:<16}")),
            "{name}: keys {keys} not shown: {line}"
        );
    }
    // Any other key closes help and does nothing else.
    press(&mut app, "x");
    assert!(app.popups.is_empty());
    assert_eq!(station_names(&app), ORIGINAL);
    press(&mut app, "F1");
    assert!(matches!(app.popups.last(), Some(Popup::Help { .. })));
}

#[test]
fn views_switch_and_the_walk_follows_the_selection() {
    let (mut app, _) = open();
    press(&mut app, "j j 2");
    assert_eq!(app.view, View::Walk);
    let s = render_text(&app, 120, 40);
    assert!(s.contains("station 3: from compressor"), "{s}");
    press(&mut app, "j");
    let s = render_text(&app, 120, 40);
    assert!(s.contains("station 4: from combustor"), "{s}");
    press(&mut app, "3");
    assert_eq!(app.view, View::Chart);
    let s = render_text(&app, 80, 24);
    assert!(s.contains("total temperature Tt [K]") && s.contains("entropy s ["));
    press(&mut app, "1");
    assert_eq!(app.view, View::Grid);
}

#[test]
fn a_sweep_runs_through_the_form_and_can_be_changed() {
    let (mut app, _) = open();
    press(&mut app, &format!("{TO_PR} 4"));
    assert_eq!(app.view, View::Sweep);
    match app.popups.last() {
        Some(Popup::SweepForm { fields, .. }) => {
            assert_eq!(fields[0], PR, "the panel's given is proposed");
            assert_eq!(fields[3], "20");
        }
        other => panic!("{other:?}"),
    }
    press(&mut app, "Tab Tab Tab ctrl-u 8 Enter");
    assert!(app.popups.is_empty());
    let sw = app.sweep.as_ref().unwrap();
    assert_eq!(sw.rows.len(), 9);
    assert!((sw.rows[0].0 - 8.0).abs() < 1e-9 && (sw.rows[8].0 - 12.0).abs() < 1e-9);
    assert!(sw.rows.iter().all(|(_, ys)| ys.iter().all(|y| y.is_some())));
    // The sweep leaves the workbook alone.
    assert_eq!(given_text(book(&app), PR).as_deref(), Some("10"));
    assert!(!app.modified);
    let s = render_text(&app, 120, 40);
    assert!(s.contains("thrust_net") && s.contains("12.000"), "{s}");
    // Enter in the sweep view reopens the form with the sweep shown.
    press(&mut app, "Enter");
    match app.popups.last() {
        Some(Popup::SweepForm { fields, .. }) => {
            assert_eq!(fields[0], PR);
            assert_eq!(fields[3], "8");
            assert_eq!(fields[8], "summary.thrust_net, summary.tsfc");
        }
        other => panic!("Enter did not reopen the sweep form: {other:?}"),
    }
    // A bad field is refused with the reason, and the form stays.
    press(&mut app, "Tab Tab Tab ctrl-u text:many Enter");
    assert!(matches!(app.popups.last(), Some(Popup::SweepForm { .. })));
    assert!(status(&app).1 && status(&app).0.contains("intervals"));
    press(&mut app, "Esc");
    assert_eq!(app.sweep.as_ref().unwrap().rows.len(), 9);
}

// ------------------------------------------------ styles that carry meaning

/// The row of the buffer whose text contains `needle`.
fn row_of(b: &ratatui::buffer::Buffer, needle: &str) -> u16 {
    let w = b.area.width;
    (0..b.area.height)
        .find(|&y| {
            let line: String = (0..w).map(|x| b[(x, y)].symbol()).collect();
            line.contains(needle)
        })
        .unwrap_or_else(|| panic!("no row with {needle}"))
}

/// The x of the first cell of `needle` in row y.
fn col_of(b: &ratatui::buffer::Buffer, y: u16, needle: &str) -> u16 {
    let line: Vec<&str> = (0..b.area.width).map(|x| b[(x, y)].symbol()).collect();
    let text: String = line.concat();
    let byte = text.find(needle).unwrap();
    // Symbols may be multi-byte: count cells up to that byte.
    let mut acc = 0;
    for (x, s) in line.iter().enumerate() {
        if acc == byte {
            return x as u16;
        }
        acc += s.len();
    }
    panic!("{needle} not at a cell boundary");
}

#[test]
fn given_and_derived_are_told_apart_without_colour() {
    let (app, _) = open_with(ascii());
    let b = render_buffer(&app, 80, 24);
    let y4 = row_of(&b, "  4          combustor");
    let x = col_of(&b, y4, "*1450.0");
    assert!(
        b[(x, y4)].modifier.contains(Modifier::BOLD),
        "given is bold"
    );
    assert_eq!(b[(x, y4)].fg, Color::Reset, "no colour in this mode");
    // A derived value: no marker, not bold.
    let y3 = row_of(&b, "  3          compressor");
    let x = col_of(&b, y3, "600.98");
    assert_eq!(b[(x - 1, y3)].symbol(), " ", "derived has no = marker");
    assert!(!b[(x, y3)].modifier.contains(Modifier::BOLD));
    // The given mass flow of the free stream carries its marker too.
    let y0 = row_of(&b, "> 0          freestream");
    assert!(col_of(&b, y0, "*20.000") > 0);
    // In colour the given also has a colour.
    let (app, _) = open();
    let b = render_buffer(&app, 80, 24);
    let y4 = row_of(&b, "  4          combustor");
    let x = col_of(&b, y4, "*1450.0");
    assert_eq!(b[(x, y4)].fg, Color::Cyan);
}

#[test]
fn the_selection_is_reversed_and_marked() {
    let (mut app, _) = open_with(ascii());
    press(&mut app, "j j");
    let b = render_buffer(&app, 80, 24);
    let y = row_of(&b, "> 3          compressor");
    let x = col_of(&b, y, "600.98");
    assert!(
        b[(x, y)].modifier.contains(Modifier::REVERSED),
        "selected cell"
    );
    // The row's name is underlined; its other cells are plain; other rows
    // plain.
    assert!(
        b[(col_of(&b, y, "3 "), y)]
            .modifier
            .contains(Modifier::UNDERLINED)
    );
    let x2 = col_of(&b, y, "1003.1");
    assert!(!b[(x2, y)].modifier.contains(Modifier::REVERSED));
    let y2 = row_of(&b, "  2          intake");
    assert!((0..80).all(|x| !b[(x, y2)].modifier.contains(Modifier::REVERSED)));
    // In the panel the selected row is reversed, with its > marker.
    press(&mut app, "Tab j j");
    let b = render_buffer(&app, 80, 24);
    let y = row_of(&b, "> pressure_ratio = 10");
    let x = col_of(&b, y, "pressure_ratio");
    assert!(b[(x, y)].modifier.contains(Modifier::REVERSED));
    let y = row_of(&b, "  efficiency     = 0.84");
    let x = col_of(&b, y, "efficiency");
    assert!(!b[(x, y)].modifier.contains(Modifier::REVERSED));
    // The walk's flow path reverses the selected station.
    press(&mut app, "2");
    let b = render_buffer(&app, 80, 24);
    let y = row_of(&b, "> 3");
    assert!(
        b[(col_of(&b, y, "> 3"), y)]
            .modifier
            .contains(Modifier::REVERSED)
    );
    let y = row_of(&b, "  4 ");
    assert!(
        !b[(col_of(&b, y, "  4 "), y)]
            .modifier
            .contains(Modifier::REVERSED)
    );
}

#[test]
fn a_failed_station_shows_its_problem() {
    let (mut app, _) = open_with(ascii());
    press(
        &mut app,
        &format!("{TO_PR} Enter ctrl-u 1 0 0 0 Enter j Enter ctrl-u 0 . 0 5 Enter"),
    );
    assert_eq!(app.engine.as_ref().unwrap().problems().len(), 1);
    assert!(status(&app).1, "an edit that leaves a problem is an error");
    let b = render_buffer(&app, 80, 24);
    let y = row_of(&b, "> 3          compressor");
    let x = col_of(&b, y, "!!");
    assert!(b[(x, y)].modifier.contains(Modifier::BOLD));
    let y = row_of(&b, "  4          combustor");
    assert!(col_of(&b, y, "..") > 0, "downstream is blocked");
    // The reason is in the panel, whole.
    let s = render_text(&app, 80, 24);
    assert!(s.contains("6000 K"), "{s}");
    // In colour, problem cells are red.
    let (mut app, _) = open();
    press(
        &mut app,
        &format!("{TO_PR} Enter ctrl-u 1 0 0 0 Enter j Enter ctrl-u 0 . 0 5 Enter"),
    );
    let b = render_buffer(&app, 80, 24);
    let y = row_of(&b, "> 3          compressor");
    assert_eq!(b[(col_of(&b, y, "!!"), y)].fg, Color::Red);
}

#[test]
fn too_small_a_terminal_says_so() {
    let (app, _) = open();
    let s = render_text(&app, 40, 10);
    let flat = s.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(
        flat.contains("The terminal is 40x10; stationwise needs at least 64x18."),
        "{s}"
    );
    assert!(flat.contains("q quits"));
    // The smallest accepted size draws the grid.
    assert!(render_text(&app, 64, 18).contains("stations ("));
}

// -------------------------------------------------------------- snapshots

/// Snapshot a state at 80x24 and 120x40, in colour and in ASCII; the ASCII
/// text must be ASCII only.
fn snap_all(name: &str, keys: &str) {
    for (mode, settings) in [("color", Settings::default()), ("ascii", ascii())] {
        let (mut app, _) = open_with(settings);
        press(&mut app, keys);
        for (w, h) in [(80u16, 24u16), (120, 40)] {
            let text = render_text(&app, w, h);
            if mode == "ascii" {
                let bad: Vec<char> = text.chars().filter(|c| !c.is_ascii()).collect();
                assert!(bad.is_empty(), "{name} {w}x{h}: not ASCII: {bad:?}\n{text}");
            }
            insta::assert_snapshot!(format!("{name}_{mode}_{w}x{h}"), text);
        }
    }
}

// Screen snapshots are golden files of our own drawing (not an outside
// source): they freeze the layout at 80x24 and 120x40 in colour and ASCII
// so that a change shows in review; meaning is asserted on styled cells by
// the tests above.
#[test]
fn snapshot_grid_totals() {
    snap_all("grid_totals", "j j");
}

#[test]
fn snapshot_grid_statics() {
    snap_all("grid_statics", "j j c");
}

#[test]
fn snapshot_grid_flow() {
    snap_all("grid_flow", "j j c c");
}

#[test]
fn snapshot_grid_all() {
    snap_all("grid_all", "j j c c c");
}

#[test]
fn snapshot_grid_all_scrolled_right() {
    snap_all("grid_all_right", "j j c c c l l l l l l l l l l l");
}

#[test]
fn snapshot_grid_panel_focus() {
    snap_all("grid_panel", TO_PR);
}

#[test]
fn snapshot_walk() {
    snap_all("walk", "j j 2");
}

#[test]
fn snapshot_ts_chart() {
    snap_all("ts_chart", "3");
}

#[test]
fn snapshot_sweep() {
    snap_all("sweep", &format!("{TO_PR} 4 Tab Tab Tab ctrl-u 8 Enter"));
}

#[test]
fn snapshot_help() {
    snap_all("help", "?");
}

#[test]
fn snapshot_setup() {
    snap_all("setup", "g");
}

#[test]
fn snapshot_edit_popup() {
    snap_all("edit", &format!("{TO_PR} Enter ctrl-u 1 1"));
}

#[test]
fn snapshot_edit_refused() {
    snap_all(
        "edit_refused",
        &format!("{TO_PR} Enter ctrl-u text:10\\sK Enter"),
    );
}

#[test]
fn snapshot_problem() {
    snap_all(
        "problem",
        &format!("{TO_PR} Enter ctrl-u 1 0 0 0 Enter j Enter ctrl-u 0 . 0 5 Enter"),
    );
}

#[test]
fn a_carpet_is_set_up_from_the_choosers_and_its_table_scrolls_sideways() {
    let (mut app, _) = open();
    press(&mut app, "4");
    // Typing on the vary row opens the chooser of givens with that search.
    press(&mut app, "text:nozzle.cfg");
    match app.popups.last() {
        Some(Popup::Choose { search, .. }) => assert_eq!(search, "nozzle.cfg"),
        other => panic!("no chooser: {other:?}"),
    }
    press(&mut app, "Enter");
    let cv = book(&app).given("process.nozzle.cfg").unwrap().1.si();
    match app.popups.last() {
        Some(Popup::SweepForm { fields, sel }) => {
            assert_eq!(fields[0], "process.nozzle.cfg");
            // From and to follow the path: 80 % of its value up to the
            // highest a velocity coefficient can be (1).
            let from: f64 = fields[1].parse().unwrap();
            let to: f64 = fields[2].parse().unwrap();
            assert!(
                (from - 0.8 * cv).abs() < 1e-9 && (to - 1.0).abs() < 1e-9,
                "{fields:?}"
            );
            assert_eq!(*sel, 1);
        }
        other => panic!("{other:?}"),
    }
    // A second given: the compressor's pressure ratio, 8 to 12 (its value
    // 10 +- 20 %), 4 steps.
    press(&mut app, "Tab Tab Tab Enter text:pressure_ratio Enter");
    // A third reported value, the nozzle exit velocity.
    press(&mut app, r"Tab Tab Tab Enter text:station.9.v\s Enter");
    match app.popups.last() {
        Some(Popup::SweepForm { fields, .. }) => {
            assert_eq!(fields[4], "process.compressor.pressure_ratio");
            assert_eq!(
                (fields[5].as_str(), fields[6].as_str()),
                ("8.0000", "12.000")
            );
            assert_eq!(fields[8], "summary.thrust_net, summary.tsfc, station.9.v");
        }
        other => panic!("{other:?}"),
    }
    // Enter on a value row runs it.
    press(&mut app, "Up Enter");
    assert!(app.popups.is_empty(), "{:?}", app.status);
    let sw = app.sweep.as_ref().unwrap();
    let (p2, x2) = sw.second.clone().unwrap();
    assert_eq!(p2, "process.compressor.pressure_ratio");
    assert_eq!(x2.len(), 5);
    assert_eq!(sw.rows.len(), 21 * 5);
    // Each point equals the workbook evaluated with both givens set
    // (independent of the sweep machinery): the last line, last point.
    let (x, ys) = sw.rows.last().unwrap().clone();
    let mut e = app.engine.as_ref().unwrap().clone();
    e.set_si("process.compressor.pressure_ratio", 12.0).unwrap();
    e.set_si("process.nozzle.cfg", x).unwrap();
    let f = e.value("summary.thrust_net").unwrap().unwrap();
    assert!((ys[0].unwrap() - f).abs() <= 1e-9 * f.abs());
    // The workbook is left alone.
    assert_eq!(given_text(book(&app), PR).as_deref(), Some("10"));
    // At 80x24 the table shows what fits and counts the columns; Right
    // brings the velocity column into view.
    let s = render_text(&app, 80, 24);
    assert!(s.contains("col 1-1 of 3"), "{s}");
    assert!(!s.contains(" v "), "{s}");
    press(&mut app, "Right Right");
    let s = render_text(&app, 80, 24);
    assert!(s.contains("col 3-3 of 3"), "{s}");
    assert!(s.contains("[m/s]"), "{s}");
    // The chart says it is a carpet.
    assert!(render_text(&app, 120, 40).contains("carpet"));
}

#[test]
fn failed_sweep_points_are_counted_with_their_reason_and_marked() {
    // The combustor's exit Tt from 500 K (below the compressor's exit,
    // 601 K: no heat can be added to get there) to 1500 K in 2 intervals.
    let (mut app, _) = open();
    press(&mut app, "4 text:combustor.exit_tt Enter");
    match app.popups.last_mut() {
        Some(Popup::SweepForm { fields, .. }) => {
            fields[1] = "500 K".into();
            fields[2] = "1500 K".into();
            fields[3] = "2".into();
        }
        other => panic!("{other:?}"),
    }
    press(&mut app, "Enter");
    let (msg, err) = status(&app);
    assert!(
        err && msg.contains("1 of 3 points could not be computed"),
        "{msg}"
    );
    assert!(msg.contains("the first:"), "{msg}");
    let s = render_text(&app, 120, 40);
    assert!(s.contains("!!"), "{s}");
}

#[test]
fn snapshot_goals() {
    snap_all("goals", "G");
}

#[test]
fn snapshot_goal_form() {
    snap_all("goal_form", "G a");
}

#[test]
fn snapshot_channels() {
    let to_map = format!("g {} Enter", vec!["Down"; 20].join(" "));
    snap_all("channels", &to_map);
    snap_all("channel_form", &format!("{to_map} Enter"));
}

#[test]
fn snapshot_confirm_quit() {
    snap_all("confirm", &format!("{TO_PR} Enter ctrl-u 1 1 Enter q"));
}

#[test]
fn snapshot_rename() {
    snap_all("rename", "j j r");
}

#[test]
fn snapshot_kind_chooser() {
    snap_all("kind_chooser", "j j K");
}

#[test]
fn snapshot_kind_chooser_searched() {
    snap_all("kind_chooser_search", "j j K text:sho");
}

#[test]
fn snapshot_mode_chooser() {
    snap_all("mode_chooser", "j j m");
}

#[test]
fn snapshot_statics_chooser() {
    snap_all("statics_chooser", "j j Tab Enter");
}

#[test]
fn snapshot_sweep_form() {
    snap_all("sweep_form", &format!("{TO_PR} 4"));
}

#[test]
fn snapshot_walk_summary() {
    snap_all("walk_summary", "2 j j j j j j j j j");
}

#[test]
fn snapshot_us_units() {
    snap_all("grid_us", "j j u");
}

#[test]
fn a_mode_change_starts_from_the_figures_computed_now() {
    // The nozzle goes from a derived exit area to a given one: the given
    // starts at the area it has (six significant figures, taken as the
    // sonic area it is), so thrust and flow stay as they were and no
    // problem appears. Independent check: the thrust before the change.
    let (mut app, _) = open();
    let t0 = thrust(&app);
    press(&mut app, "j j j j j Tab m Down Enter");
    let b = book(&app);
    assert_eq!(
        given_text(b, "process.nozzle.area").as_deref(),
        Some("0.0485565 m2")
    );
    assert!(app.engine.as_ref().unwrap().problems().is_empty());
    assert!(
        rel_change(thrust(&app), t0) < 1e-6,
        "{} vs {t0}",
        thrust(&app)
    );
    // Back on the compressor, measured then design again: the design mode
    // starts from the pressure ratio and efficiency the machine has now.
    press(&mut app, "Tab k k k m Down Down Enter m Down Enter");
    let b = book(&app);
    assert_eq!(
        given_text(b, "process.compressor.pressure_ratio").as_deref(),
        Some("10")
    );
}
