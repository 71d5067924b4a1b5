//! User settings (RON in the config folder) and recent files (data folder).
//!
//! Settings: default unit set, colour on or off, plain ASCII drawing and key
//! overrides merged over the default keymap. A missing or unreadable file
//! means the defaults; a bad file is reported in the status line, never a
//! crash. `NO_COLOR` (any value) turns colour off whatever the file says.

use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// Settings saved between sessions.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Settings {
    /// Start in US customary units.
    pub us_units: bool,
    /// Use colour.
    pub color: bool,
    /// Draw with ASCII only (no box or braille characters).
    pub ascii: bool,
    /// Key overrides: (key, command name), e.g. ("ctrl-g", "open-setup").
    pub keys: Vec<(String, String)>,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            us_units: false,
            color: true,
            ascii: false,
            keys: Vec::new(),
        }
    }
}

fn dirs() -> Option<directories::ProjectDirs> {
    directories::ProjectDirs::from("", "", "stationwise")
}

/// Where the settings file lives.
pub fn settings_path() -> Option<PathBuf> {
    dirs().map(|d| d.config_dir().join("settings.ron"))
}

/// Where the recent-files list lives.
pub fn recent_path() -> Option<PathBuf> {
    dirs().map(|d| d.data_dir().join("recent.ron"))
}

/// Load settings; the error text (if any) goes to the status line.
pub fn load() -> (Settings, Option<String>) {
    let mut s = Settings::default();
    let mut note = None;
    if let Some(p) = settings_path()
        && let Ok(text) = std::fs::read_to_string(&p)
    {
        match ron::from_str::<Settings>(&text) {
            Ok(v) => s = v,
            Err(e) => note = Some(format!("settings {}: {e} (defaults used)", p.display())),
        }
    }
    if std::env::var_os("NO_COLOR").is_some() {
        s.color = false;
    }
    (s, note)
}

/// Parse settings text (for tests and the shipped example).
pub fn parse(text: &str) -> Result<Settings, String> {
    ron::from_str(text).map_err(|e| e.to_string())
}

/// Recent files, most recent first.
pub fn recent() -> Vec<PathBuf> {
    recent_path()
        .and_then(|p| std::fs::read_to_string(p).ok())
        .and_then(|t| ron::from_str::<Vec<PathBuf>>(&t).ok())
        .unwrap_or_default()
}

/// Put a file at the head of the recent list (at most 10 kept).
pub fn remember(file: &Path) {
    let Some(p) = recent_path() else {
        return;
    };
    let abs = std::fs::canonicalize(file).unwrap_or_else(|_| file.to_path_buf());
    let mut list = recent();
    list.retain(|f| f != &abs);
    list.insert(0, abs);
    list.truncate(10);
    if let Some(dir) = p.parent() {
        let _ = std::fs::create_dir_all(dir);
    }
    if let Ok(text) = ron::to_string(&list) {
        let _ = crate::format::write_atomic_with(&p, text.as_bytes(), || Ok(()));
    }
}
