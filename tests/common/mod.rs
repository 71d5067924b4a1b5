//! What the terminal tests share: keys typed as tokens and a demo sheet
//! copied to a folder of its own.
#![allow(dead_code, clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use stationwise::tui::app::App;
use std::path::{Path, PathBuf};

/// A key token as tui-drive writes it: `j`, `G`, `Enter`, `Esc`, `Tab`,
/// `Down`, `Up`, `Left`, `Right`, `Backspace`, `Space`, `PageDown`,
/// `ctrl-u`.
pub fn key(tok: &str) -> KeyEvent {
    let none = KeyModifiers::NONE;
    if let Some(c) = tok.strip_prefix("ctrl-")
        && c.chars().count() == 1
    {
        return KeyEvent::new(
            KeyCode::Char(c.chars().next().unwrap()),
            KeyModifiers::CONTROL,
        );
    }
    let code = match tok {
        "Enter" => KeyCode::Enter,
        "Esc" => KeyCode::Esc,
        "Tab" => KeyCode::Tab,
        "Down" => KeyCode::Down,
        "Up" => KeyCode::Up,
        "Left" => KeyCode::Left,
        "Right" => KeyCode::Right,
        "Backspace" => KeyCode::Backspace,
        "PageDown" => KeyCode::PageDown,
        "Space" => KeyCode::Char(' '),
        t if t.chars().count() == 1 => {
            let c = t.chars().next().unwrap();
            let m = if c.is_ascii_uppercase() {
                KeyModifiers::SHIFT
            } else {
                none
            };
            return KeyEvent::new(KeyCode::Char(c), m);
        }
        t => panic!("unknown key token {t}"),
    };
    KeyEvent::new(code, none)
}

/// Type tokens separated by spaces; `text:a\sb` types a literal string
/// (`\s` is a space).
pub fn press(app: &mut App, keys: &str) {
    for tok in keys.split_whitespace() {
        if let Some(t) = tok.strip_prefix("text:") {
            for c in t.replace("\\s", " ").chars() {
                app.on_key(KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE));
            }
            continue;
        }
        app.on_key(key(tok));
    }
}

/// A demo sheet copied into a folder of its own, removed on drop.
pub struct Copy {
    /// The copy.
    pub path: PathBuf,
    dir: PathBuf,
}

impl Drop for Copy {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.dir);
    }
}

/// Copy `sheets/NAME` to a fresh folder named by `tag`.
pub fn copy_demo(name: &str, tag: &str) -> Copy {
    let dir = std::env::temp_dir().join(format!("stationwise-{tag}-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(name);
    std::fs::copy(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("sheets")
            .join(name),
        &path,
    )
    .unwrap();
    Copy { path, dir }
}
