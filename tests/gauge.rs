//! Gauge pressures where the workbook knows the barometer.
//!
//! The invented compressor-rig demo has a measured ambient block (its
//! barometer, 101 kPa). A pressure typed in psig, barg or kPag is the
//! barometer plus the reading; it keeps its text in the file and follows
//! the barometer when that changes (typed, or set by a scan); without a
//! measured barometer it is refused with the reason.
//!
//! Independent values: 1 psi = 0.45359237 kg x 9.80665 m/s^2 / (0.0254 m)^2
//! = 6894.757293168 Pa, exact from the definitions of the pound, standard
//! gravity and the inch (NIST SP 811, appendix B); 1 bar = 1e5 Pa exactly.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use approx::assert_relative_eq;
use stationwise::engine::Engine;
use stationwise::format;
use std::path::Path;

const PSI: f64 = 0.453_592_37 * 9.806_65 / (0.0254 * 0.0254);

fn sheet(name: &str) -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("sheets")
            .join(name),
    )
    .unwrap()
}

fn rig() -> Engine {
    Engine::new(format::parse(&sheet("compressor-rig.ron")).unwrap()).unwrap()
}

fn given_si(e: &Engine, path: &str) -> f64 {
    e.book().given(path).unwrap().1.si()
}

#[test]
fn a_gauge_pressure_is_the_barometer_plus_the_reading() {
    let mut e = rig();
    e.set_given("station.2.pt", "44 psig").unwrap();
    assert_relative_eq!(
        given_si(&e, "station.2.pt"),
        101e3 + 44.0 * PSI,
        max_relative = 1e-12
    );
    // The exit state uses it: pt of station 2 as computed.
    let pt2 = e.value("station.2.pt").unwrap().unwrap();
    assert_relative_eq!(pt2, 101e3 + 44.0 * PSI, max_relative = 1e-12);
    e.set_given("station.2.pt", "3.03 barg").unwrap();
    assert_relative_eq!(
        given_si(&e, "station.2.pt"),
        101e3 + 3.03e5,
        max_relative = 1e-12
    );
    e.set_given("station.2.pt", "303 kPag").unwrap();
    assert_relative_eq!(
        given_si(&e, "station.2.pt"),
        101e3 + 303e3,
        max_relative = 1e-12
    );
    // The text is kept as typed (the file says what was read).
    assert_eq!(e.book().given("station.2.pt").unwrap().1.text(), "303 kPag");
}

#[test]
fn gauge_givens_follow_a_new_barometer_typed_or_from_a_scan() {
    let mut e = rig();
    e.set_given("station.2.pt", "44 psig").unwrap();
    e.set_given("ambient.pressure", "14.5 psia").unwrap();
    assert_relative_eq!(
        given_si(&e, "station.2.pt"),
        (14.5 + 44.0) * PSI,
        max_relative = 1e-12
    );
    assert_relative_eq!(
        e.value("station.2.pt").unwrap().unwrap(),
        (14.5 + 44.0) * PSI,
        max_relative = 1e-12
    );
    // A scan's barometer reading sets the SI value directly.
    e.set_si("ambient.pressure", 98_000.0).unwrap();
    assert_relative_eq!(
        given_si(&e, "station.2.pt"),
        98_000.0 + 44.0 * PSI,
        max_relative = 1e-12
    );
    assert_relative_eq!(
        e.value("station.2.pt").unwrap().unwrap(),
        98_000.0 + 44.0 * PSI,
        max_relative = 1e-12
    );
}

#[test]
fn a_barometer_that_would_put_a_gauge_given_out_of_range_is_refused_whole() {
    let mut e = rig();
    // -14 psig: 4.5 kPa absolute at 101 kPa ...
    e.set_given("station.1.area", "0.12 m2").unwrap();
    e.set_given("station.2.pt", "-14 psig").unwrap();
    let before = given_si(&e, "station.2.pt");
    // ... and below vacuum with a 95 kPa barometer: refused, nothing moves.
    let err = e.set_given("ambient.pressure", "95 kPa").unwrap_err();
    assert!(err.to_string().contains("station.2.pt"), "{err}");
    assert_relative_eq!(given_si(&e, "ambient.pressure"), 101e3);
    assert_relative_eq!(given_si(&e, "station.2.pt"), before);
}

#[test]
fn without_a_measured_barometer_a_gauge_pressure_is_refused_with_the_reason() {
    // The rig with its ambient made the standard atmosphere: no barometer.
    let text = sheet("compressor-rig.ron").replace(
        "condition: Measured(\n            pressure: \"101 kPa\",\n            temperature: \"288 K\",\n        ),",
        "condition: Standard(altitude: \"0 m\", offset: \"0 K\"),",
    );
    assert!(text.contains("Standard("), "the demo's layout changed");
    let mut e = Engine::new(format::parse(&text).unwrap()).unwrap();
    let err = e
        .set_given("station.2.pt", "44 psig")
        .unwrap_err()
        .to_string();
    assert!(err.contains("gauge") && err.contains("barometer"), "{err}");
    assert_relative_eq!(given_si(&e, "station.2.pt"), 404e3);
    // A file with a gauge given and no barometer is refused at load.
    let bad = text.replace("pt: \"404 kPa\"", "pt: \"44 psig\"");
    let load = format::parse(&bad).unwrap_err().to_string();
    assert!(load.contains("gauge"), "{load}");
}

#[test]
fn a_file_with_a_gauge_given_loads_and_saves_it_as_written() {
    let text = sheet("compressor-rig.ron").replace("pt: \"404 kPa\"", "pt: \"44 psig\"");
    let book = format::parse(&text).unwrap();
    assert_relative_eq!(
        book.given("station.2.pt").unwrap().1.si(),
        101e3 + 44.0 * PSI,
        max_relative = 1e-12
    );
    let out = format::to_text(&book);
    assert!(out.contains("pt: \"44 psig\""), "{out}");
}

#[test]
fn the_terminal_accepts_a_gauge_pressure_and_says_what_it_was_read_from() {
    use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
    use stationwise::tui::app::App;
    use stationwise::tui::settings::Settings;
    let dir = std::env::temp_dir().join(format!("stationwise-gauge-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("rig.ron");
    std::fs::write(&path, sheet("compressor-rig.ron")).unwrap();
    let mut app = App::new(Settings::default());
    app.open(&path).unwrap();
    app.apply_edit("station.2.pt", "44 psig").unwrap();
    let e = app.engine.as_ref().unwrap();
    assert_relative_eq!(
        given_si(e, "station.2.pt"),
        101e3 + 44.0 * PSI,
        max_relative = 1e-12
    );
    // The panel of station 2 shows the reading, the absolute value and the
    // barometer.
    let key = |c| KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE);
    app.on_key(key('j'));
    let screen = stationwise::tui::render_text(&app, 120, 40);
    assert!(
        screen.contains("44 psig (404.369 kPa: barometer 101.000 kPa + reading)"),
        "{screen}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}
