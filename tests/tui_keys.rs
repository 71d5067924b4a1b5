//! Nothing a user types may panic: random key sequences (a fixed seed, so
//! a failure repeats) over every demo sheet, drawing the screen at 80x24
//! and 64x18 as they go, with every popup, chooser and form reachable from
//! the keys in the alphabet. Files are copies; saving is left out of the
//! alphabet (ctrl-s would write the copy, which is harmless but slow).
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

mod common;

use common::{copy_demo, key};
use stationwise::reduce::Rng;
use stationwise::tui::app::App;
use stationwise::tui::render_buffer;
use stationwise::tui::settings::Settings;

const KEYS: &[&str] = &[
    "j",
    "k",
    "h",
    "l",
    "Enter",
    "Esc",
    "Tab",
    "Down",
    "Up",
    "Left",
    "Right",
    "Backspace",
    "Space",
    "PageDown",
    "1",
    "2",
    "3",
    "4",
    "u",
    "c",
    "z",
    "Z",
    "a",
    "x",
    "r",
    "K",
    "m",
    "g",
    "G",
    "B",
    "[",
    "]",
    "?",
    "f",
    "0",
    "5",
    ".",
    "-",
    "e",
    "%",
    "ctrl-u",
    "q",
    "n",
    "y",
];

#[test]
fn random_keys_never_panic_on_any_demo() {
    let sheets = [
        "turbojet.ron",
        "turbofan.ron",
        "ramjet.ron",
        "tunnel.ron",
        "compressor-rig.ron",
        "combustor-rig.ron",
        "compressor-speedline.ron",
    ];
    // SW_KEYS_SEED=N tries another sequence (exploration; CI uses the fixed one).
    let seed = std::env::var("SW_KEYS_SEED")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(20_261_203);
    let mut rng = Rng::new(seed);
    for sheet in sheets {
        for run in 0..3 {
            let copy = copy_demo(sheet, &format!("keys-{run}"));
            let mut app = App::new(Settings::default());
            app.open(&copy.path).unwrap();
            let mut typed = Vec::new();
            for i in 0..400 {
                let k = KEYS[(rng.next_u64() % KEYS.len() as u64) as usize];
                typed.push(k);
                // q then y would quit; keep the session going.
                if app.quit {
                    break;
                }
                app.on_key(key(k));
                if i % 7 == 0 {
                    let (w, h) = if i % 2 == 0 { (80, 24) } else { (64, 18) };
                    let _ = render_buffer(&app, w, h);
                }
            }
            let _ = render_buffer(&app, 120, 40);
            assert!(
                app.engine.is_some() || app.quit || !app.popups.is_empty(),
                "{sheet} run {run}: the workbook went away after {typed:?}"
            );
        }
    }
}
