//! The uncertainty panel of the terminal: the expanded figure with its
//! systematic and random standard parts, and each input by name with its
//! share and sensitivity.
//!
//! Independent check: the compressor-speedline demo (invented rig data)
//! reads the inlet total temperature from two probes T1A, T1B in degF with
//! a systematic standard uncertainty of 0.5 degF and a random one of
//! 0.2 degF (the demo's channel map). Station 1's Tt is that given, so its
//! sensitivity to the inlet temperature is exactly 1, the systematic part
//! is 0.5 degF = 0.27778 K and the random part 0.2 degF = 0.11111 K
//! (1 degF = 5/9 K by definition), and U95 = 2 sqrt(b^2 + s^2) = 0.59835 K.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use stationwise::tui::app::App;
use stationwise::tui::render_text;
use stationwise::tui::settings::Settings;
use std::path::Path;

/// The summary block's text, its lines joined by single spaces.
fn summary_text(screen: &str) -> String {
    let lines: Vec<Vec<char>> = screen.lines().map(|l| l.chars().collect()).collect();
    let (y0, x0) = lines
        .iter()
        .enumerate()
        .find_map(|(y, l)| {
            let s: String = l.iter().collect();
            s.find("┌ summary").map(|b| (y, s[..b].chars().count()))
        })
        .expect("a summary block");
    let mut out = Vec::new();
    for l in &lines[y0 + 1..] {
        if l.get(x0) == Some(&'└') {
            break;
        }
        let part: String = l.iter().skip(x0 + 1).take_while(|c| **c != '│').collect();
        out.push(part);
    }
    out.join(" ")
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
}

#[test]
fn the_panel_shows_the_parts_and_the_inputs_by_name() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/compressor-speedline.ron");
    let mut app = App::new(Settings::default());
    app.open(&path).unwrap();
    app.status = None;
    // Station 1 (the compressor face, selected at opening), column Tt.
    let screen = render_text(&app, 120, 40);
    let b = 0.5 * 5.0 / 9.0;
    let s = 0.2 * 5.0 / 9.0;
    let u95 = 2.0 * f64::hypot(b, s);
    assert!((u95 - 0.598_352).abs() < 1e-6);
    let flat = summary_text(&screen);
    for want in [
        "Tt at 1 \u{b1} 0.598 K (95 %, k = 2)".to_string(),
        "systematic 0.278 K, random 0.111 K (standard)".to_string(),
        "100 % inlet tt (T1A+T1B): sensitivity 1.00 K per K".to_string(),
    ] {
        assert!(flat.contains(&want), "missing \"{want}\" in\n{screen}");
    }
    // No internal path is shown as a contributor.
    assert!(!flat.contains("% process.inlet.tt"), "{screen}");
    // Station 2's Tt: four probes, 1 degF systematic and 0.5 degF random
    // (the demo's map): 0.556 K and 0.278 K.
    app.on_key(KeyEvent::new(KeyCode::Char('j'), KeyModifiers::NONE));
    let flat = summary_text(&render_text(&app, 120, 40));
    assert!(
        flat.contains("systematic 0.556 K, random 0.278 K"),
        "{flat}"
    );
    assert!(
        flat.contains("100 % station 2 tt (T2A+T2B+T2C+T2D)"),
        "{flat}"
    );

    // The compressor's isentropic efficiency, selected in the panel: its
    // breakdown in the summary. The demo's gas is calorically perfect, so
    // eta = (T1 PR^((g-1)/g) - T1) / (T2 - T1) and the sensitivity to the
    // exit temperature is d eta / d T2 = -eta / (T2 - T1) exactly.
    use stationwise::tui::app::PanelRow;
    app.on_key(KeyEvent::new(KeyCode::Char('j'), KeyModifiers::NONE));
    app.on_key(KeyEvent::new(KeyCode::Tab, KeyModifiers::NONE));
    let at = app
        .panel_rows()
        .iter()
        .position(|r| *r == PanelRow::Figure("eta_isentropic".into()))
        .expect("the efficiency is a panel row");
    for _ in 0..at {
        app.on_key(KeyEvent::new(KeyCode::Char('j'), KeyModifiers::NONE));
    }
    let e = app.engine.as_ref().unwrap();
    let eta = e
        .value("process.compressor.eta_isentropic")
        .unwrap()
        .unwrap();
    let t1 = e.value("station.1.tt").unwrap().unwrap();
    let t2 = e.value("station.2.tt").unwrap().unwrap();
    let flat = summary_text(&render_text(&app, 120, 40));
    assert!(
        flat.contains("compressor: isentropic efficiency \u{b1}"),
        "{flat}"
    );
    assert!(flat.contains("systematic"), "{flat}");
    let want = format!(
        "station 2 tt (T2A+T2B+T2C+T2D): sensitivity {} per K",
        stationwise::report::sig(-eta / (t2 - t1), 3)
    );
    assert!(flat.contains(&want), "missing \"{want}\" in {flat}");
}
