//! A two-spool separate-flow turbofan built from the blank template by keys
//! only (driven through `App::on_key`, no terminal): stations, kinds (a
//! split among them), modes, shafts and the title, then saved. The saved
//! file, evaluated on its own, must give the turbofan demo's numbers with
//! the same givens: every station's totals, statics and flow, and the
//! summary, to 1e-9 relative (the same physics on the same inputs, so only
//! round-off may differ).
//!
//! The key tokens are those of tui-drive (`text:` a literal, `\s` a space):
//! `SW_PRINT_KEYS=1` prints the whole sequence, which the end-to-end script
//! `tests/e2e/build_turbofan.py` types into the real binary in a pty.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use stationwise::engine::Engine;
use stationwise::format;
use stationwise::tui::app::{App, Focus, PanelRow, Popup};
use stationwise::tui::settings::Settings;
use std::path::Path;

/// The app and every token typed so far.
struct Driver {
    app: App,
    typed: Vec<String>,
}

fn char_key(c: char) -> KeyEvent {
    let m = if c.is_ascii_uppercase() {
        KeyModifiers::SHIFT
    } else {
        KeyModifiers::NONE
    };
    KeyEvent::new(KeyCode::Char(c), m)
}

impl Driver {
    fn press(&mut self, keys: &str) {
        for tok in keys.split_whitespace() {
            self.typed.push(tok.to_string());
            if let Some(t) = tok.strip_prefix("text:") {
                for c in t.replace("\\s", " ").chars() {
                    self.app.on_key(char_key(c));
                }
                continue;
            }
            let none = KeyModifiers::NONE;
            let k = match tok {
                "Enter" => KeyEvent::new(KeyCode::Enter, none),
                "Esc" => KeyEvent::new(KeyCode::Esc, none),
                "Tab" => KeyEvent::new(KeyCode::Tab, none),
                "Down" => KeyEvent::new(KeyCode::Down, none),
                "Up" => KeyEvent::new(KeyCode::Up, none),
                "ctrl-s" => KeyEvent::new(KeyCode::Char('s'), KeyModifiers::CONTROL),
                t if t.chars().count() == 1 => char_key(t.chars().next().unwrap()),
                t => panic!("unknown token {t}"),
            };
            self.app.on_key(k);
        }
        if let Some((m, true)) = &self.app.status {
            panic!("after {keys}: {m}");
        }
    }

    fn row_of(&self, name: &str) -> usize {
        self.app
            .book()
            .unwrap()
            .stations
            .iter()
            .position(|s| s.name == name)
            .unwrap_or_else(|| panic!("no station {name}"))
    }

    /// Select station `name` in the grid.
    fn go(&mut self, name: &str) {
        if self.app.focus == Focus::Panel {
            self.press("Tab");
        }
        let to = self.row_of(name);
        while self.app.row != to {
            self.press(if self.app.row < to { "j" } else { "k" });
        }
    }

    /// Move the panel selection to a row.
    fn panel_to(&mut self, want: &PanelRow) {
        if self.app.focus == Focus::Grid {
            self.press("Tab");
        }
        let at = self
            .app
            .panel_rows()
            .iter()
            .position(|r| r == want)
            .unwrap_or_else(|| panic!("no panel row {want:?}: {:?}", self.app.panel_rows()));
        while self.app.panel != at {
            self.press(if self.app.panel < at { "j" } else { "k" });
        }
    }

    /// Set a given of the selected station's process from the panel.
    fn set(&mut self, key: &str, value: &str) {
        let e = self.app.engine.as_ref().unwrap();
        let p = &e.book().processes[e.producer_of(self.app.row)];
        let path = if key.contains('.') {
            key.to_string()
        } else {
            format!("process.{}.{key}", p.name)
        };
        self.panel_to(&PanelRow::Given(path.clone()));
        self.press(&format!("Enter text:{} Enter", value.replace(' ', "\\s")));
        let g = self.app.book().unwrap().given(&path).unwrap().1;
        assert_eq!(g.text(), value, "{path}");
        self.press("Tab");
    }

    fn kind(&mut self, search: &str) {
        self.press(&format!("K text:{} Enter", search.replace(' ', "\\s")));
    }

    fn mode(&mut self, search: &str) {
        self.press(&format!("m text:{} Enter", search.replace(' ', "\\s")));
    }

    fn insert(&mut self, name: &str) {
        self.press(&format!("a text:{name} Enter"));
        assert_eq!(self.app.row, self.row_of(name));
    }

    /// Put the selected machine on a shaft, new or existing.
    fn shaft(&mut self, name: &str, new: bool) {
        self.panel_to(&PanelRow::Shaft);
        if new {
            self.press(&format!("Enter text:new\\sshaft Enter text:{name} Enter"));
        } else {
            self.press(&format!("Enter text:shaft\\s{name} Enter"));
        }
        self.press("Tab");
    }
}

/// Build the turbofan; returns the driver (saved to `path`).
fn build(path: &Path) -> Driver {
    let mut app = App::new(Settings::default());
    app.path = Some(path.to_path_buf());
    app.start_screen();
    let mut d = Driver {
        app,
        typed: Vec::new(),
    };
    d.press("text:blank Enter");
    // Title, altitude and flight Mach number in the set-up popup.
    d.press("g Enter text:Turbofan\\sbuilt\\sfrom\\sthe\\skeyboard Enter");
    let rows = d.app.setup_rows();
    let alt = rows
        .iter()
        .position(|r| format!("{r:?}").contains("ambient.altitude"))
        .unwrap();
    let mach = rows
        .iter()
        .position(|r| format!("{r:?}").contains("ambient.flight_mach"))
        .unwrap();
    let downs = |n: usize| vec!["Down"; n].join(" ");
    d.press(&format!("{} Enter text:11000\\sm Enter", downs(alt)));
    d.press(&format!("{} Enter text:0.8 Enter Esc", downs(mach - alt)));
    assert!(d.app.popups.is_empty());

    d.set("w", "100 kg/s");
    d.insert("2");
    d.set("recovery", "0.995");
    d.insert("21");
    d.kind("compressor");
    d.set("pressure_ratio", "1.6");
    d.set("efficiency", "0.89");
    d.shaft("low", true);
    d.insert("25");
    d.kind("split");
    d.press("text:13 Enter");
    d.set("bypass_ratio", "5");

    d.go("13");
    d.insert("17");
    d.set("recovery", "0.98");
    d.insert("19");
    d.kind("nozzle");
    d.set("cfg", "0.99");
    d.set("cd", "1");

    d.go("25");
    d.insert("3");
    d.kind("compressor");
    d.mode("polytropic efficiency given");
    d.set("pressure_ratio", "20");
    d.set("efficiency", "0.90");
    d.shaft("high", true);
    d.insert("4");
    d.kind("combustor");
    d.set("exit_tt", "1500 K");
    d.set("pressure_loss", "4 %");
    d.set("efficiency", "0.995");
    d.set("lhv", "43.1 MJ/kg");
    d.insert("45");
    d.kind("turbine");
    // On its shaft first: a turbine worked by the shaft balance needs one.
    d.shaft("high", false);
    d.mode("shaft balance, isentropic");
    d.set("efficiency", "0.90");
    d.insert("5");
    d.kind("turbine");
    d.shaft("low", false);
    d.mode("shaft balance, isentropic");
    d.set("efficiency", "0.91");
    d.insert("9");
    d.kind("nozzle");
    d.set("cfg", "0.99");
    d.set("cd", "1");
    d.press("ctrl-s");
    assert!(!d.app.modified, "saved: {:?}", d.app.status);
    assert!(
        !matches!(d.app.popups.last(), Some(Popup::Confirm { .. })),
        "no question"
    );
    d
}

fn relative(a: f64, b: f64) -> f64 {
    if a == b {
        0.0
    } else {
        (a - b).abs() / a.abs().max(b.abs())
    }
}

#[test]
fn a_turbofan_built_by_keys_matches_the_demo() {
    let dir = std::env::temp_dir().join(format!("stationwise-build-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("built.ron");
    let d = build(&path);
    let keys = d.typed.join(" ");
    if std::env::var_os("SW_PRINT_KEYS").is_some() {
        println!("KEYS {keys}");
    } else {
        // The pty script types the same keys into the real binary.
        let file = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/e2e/turbofan_keys.txt");
        let text = std::fs::read_to_string(&file).unwrap();
        assert_eq!(
            text.trim(),
            keys,
            "tests/e2e/turbofan_keys.txt is stale: regenerate with SW_PRINT_KEYS=1 (see the top of this file)"
        );
    }
    let built = Engine::new(format::load(&path).unwrap()).unwrap();
    assert_eq!(built.book().title, "Turbofan built from the keyboard");
    assert!(built.problems().is_empty(), "{:?}", built.problems());
    let demo_path = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/turbofan.ron");
    let demo = Engine::new(format::load(&demo_path).unwrap()).unwrap();
    let mut compared = 0;
    for s in demo.stations() {
        for key in [
            "tt", "pt", "t", "p", "mach", "v", "w", "area", "far", "wc", "rho",
        ] {
            let path = format!("station.{}.{key}", s.name);
            let a = demo.value(&path).unwrap();
            let b = built.value(&path).unwrap();
            match (a, b) {
                (Some(a), Some(b)) => {
                    assert!(relative(a, b) < 1e-9, "{path}: demo {a}, built {b}");
                    compared += 1;
                }
                (None, None) => {}
                _ => panic!("{path}: demo {a:?}, built {b:?}"),
            }
        }
    }
    for key in ["thrust_net", "thrust_gross", "fuel", "tsfc", "air_flow"] {
        let path = format!("summary.{key}");
        let a = demo.value(&path).unwrap().unwrap();
        let b = built.value(&path).unwrap().unwrap();
        assert!(relative(a, b) < 1e-9, "{path}: demo {a}, built {b}");
        compared += 1;
    }
    assert!(compared > 70, "{compared} values compared");
    let _ = std::fs::remove_dir_all(&dir);
}
