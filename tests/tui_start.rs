//! The start screen (no workbook named), frozen at 80x24 and 120x40 in
//! colour and ASCII. Its list depends on the user's recent files and any
//! recovery of an untitled workbook, so this test binary runs with its own
//! empty home, configuration and data folders: the list is the templates.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::tui::app::{App, Popup};
use stationwise::tui::render_text;
use stationwise::tui::settings::Settings;

#[test]
fn snapshot_start_screen() {
    let home = std::env::temp_dir().join(format!("stationwise-start-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&home);
    std::fs::create_dir_all(&home).unwrap();
    // SAFETY: the only test of this binary; no other thread reads the
    // environment while it is set.
    unsafe {
        std::env::set_var("HOME", &home);
        std::env::set_var("XDG_CONFIG_HOME", home.join("config"));
        std::env::set_var("XDG_DATA_HOME", home.join("data"));
        std::env::set_var("XDG_STATE_HOME", home.join("state"));
        std::env::set_var("XDG_CACHE_HOME", home.join("cache"));
    }
    for (mode, ascii) in [("color", false), ("ascii", true)] {
        let mut app = App::new(Settings {
            ascii,
            color: !ascii,
            ..Settings::default()
        });
        app.start_screen();
        assert!(matches!(app.popups.last(), Some(Popup::Choose { .. })));
        for (w, h) in [(80u16, 24u16), (120, 40)] {
            insta::assert_snapshot!(format!("start_{mode}_{w}x{h}"), render_text(&app, w, h));
        }
    }
    let _ = std::fs::remove_dir_all(&home);
}
