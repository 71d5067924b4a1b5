//! The channel map edited from the keyboard, then used on a scan.
//!
//! On the invented compressor-rig demo (no channel map): a channel for the
//! exit total pressure from two probes recorded in psig, weighted 1 and 2,
//! is refused while there is no barometer (a gauge reading needs one), is
//! taken once the barometer channel is added, and a scan reduced through
//! it gives the barometer plus the weighted mean of the probes. Each step
//! is undoable.
//!
//! Independent values: 1 psi = 6894.757293168 Pa (exact from the pound,
//! standard gravity and the inch, NIST SP 811); the weighted mean is
//! (1 a + 2 b) / 3.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

mod common;

use common::{copy_demo, press};
use stationwise::tui::app::{App, Popup};
use stationwise::tui::settings::Settings;

const PSI: f64 = 0.453_592_37 * 9.806_65 / (0.0254 * 0.0254);

#[test]
fn a_channel_is_added_refused_without_a_barometer_then_reduces_a_scan() {
    let copy = copy_demo("compressor-rig.ron", "channels");
    let mut app = App::new(Settings::default());
    app.open(&copy.path).unwrap();
    assert!(app.book().unwrap().channels.is_none());
    // g, then the channel map row (the last), Enter lists it.
    press(&mut app, "g");
    for _ in 0..30 {
        press(&mut app, "Down");
    }
    press(&mut app, "Enter");
    assert!(
        matches!(app.popups.last(), Some(Popup::Channels { sel: 0 })),
        "{:?}",
        app.popups.last()
    );
    // The first row adds a channel; its given is picked by typed search.
    press(&mut app, "Enter Enter text:station.2.pt Enter");
    match app.popups.last() {
        Some(Popup::ChannelForm { fields, sel, .. }) => {
            assert_eq!(fields[0], "station.2.pt");
            assert_eq!(fields[2], "kPa", "the unit starts as the one shown");
            assert_eq!(*sel, 1);
        }
        other => panic!("{other:?}"),
    }
    press(
        &mut app,
        r"text:P2A,\sP2B Tab Backspace Backspace Backspace text:psig Tab text:1,\s2 Tab text:0.1\spsi Tab text:0.5\s%",
    );
    press(&mut app, "Enter");
    // Refused: a gauge channel and no barometer; the form stays.
    assert!(matches!(app.popups.last(), Some(Popup::ChannelForm { .. })));
    let (msg, err) = app.status.clone().unwrap();
    assert!(err && msg.contains("barometer"), "{msg}");
    assert!(app.book().unwrap().channels.is_none());
    let form = app.popups.pop().unwrap();
    // Add the barometer (the list's last row), in kPa.
    press(&mut app, "Down Enter Enter");
    let ch = app.book().unwrap().channels.clone().unwrap();
    assert_eq!(ch.barometer.unwrap().columns, vec!["BARO".to_string()]);
    // The channel again: taken now.
    app.popups.push(form);
    press(&mut app, "Enter");
    let ch = app.book().unwrap().channels.clone().unwrap();
    assert_eq!(ch.map.len(), 1, "{:?}", app.status);
    assert_eq!(ch.map[0].weights, vec![1.0, 2.0]);
    assert_eq!(ch.map[0].random.as_deref(), Some("0.5 %"));
    // A scan through the map: barometer 100 kPa, probes 40 and 43 psig.
    let scans = copy.path.with_file_name("scans.csv");
    std::fs::write(&scans, "BARO,P2A,P2B\n100,40,43\n").unwrap();
    press(&mut app, "Esc Esc");
    app.load_scans(&scans).unwrap();
    let pt = app.book().unwrap().given("station.2.pt").unwrap().1.si();
    let want = 100e3 + (40.0 + 2.0 * 43.0) / 3.0 * PSI;
    assert!((pt - want).abs() < 1e-9 * want, "{pt} vs {want}");
    // Undo takes the channel away, then the barometer.
    app.scans = None;
    press(&mut app, "z");
    assert!(
        app.book()
            .unwrap()
            .channels
            .as_ref()
            .unwrap()
            .map
            .is_empty()
    );
    press(&mut app, "z");
    assert!(app.book().unwrap().channels.is_none());
}
