//! Commands and the keys bound to them: one table drives input and help.
//!
//! Each command has a name, a one-line description and its default keys.
//! The keymap resolves a key press to a command; user overrides from the
//! settings file are merged over the defaults. The help overlay is generated
//! from the same table, so it cannot drift from the real keys.

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};

/// Everything a key can ask for outside a popup.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Command {
    /// Move the selection up.
    Up,
    /// Move the selection down.
    Down,
    /// Move left (grid column).
    Left,
    /// Move right (grid column).
    Right,
    /// Scroll the walk text or the sweep table down a page.
    PageDown,
    /// Scroll up a page.
    PageUp,
    /// Edit the selected given.
    Edit,
    /// Switch between the grid and the process panel.
    Focus,
    /// The station grid.
    ViewGrid,
    /// Walk the flow path with explanations.
    ViewWalk,
    /// Temperature-entropy chart.
    ViewChart,
    /// Sweep a given.
    ViewSweep,
    /// Toggle SI and US customary units.
    Units,
    /// Next set of grid columns.
    Columns,
    /// Undo.
    Undo,
    /// Redo.
    Redo,
    /// Save.
    Save,
    /// Save under a new name.
    SaveAs,
    /// Open a workbook.
    Open,
    /// Insert a station (and a duct into it) after the selected one.
    Insert,
    /// Delete the selected station and the process into it.
    Delete,
    /// Rename the selected station (or process, in the panel).
    Rename,
    /// Change the kind of the process into the selected station.
    Kind,
    /// Cycle the mode of the process into the selected station.
    Mode,
    /// Ambient block and gas model.
    Setup,
    /// Help overlay.
    Help,
    /// Load a scan file into the scan browser.
    Scans,
    /// Previous scan.
    ScanPrev,
    /// Next scan.
    ScanNext,
    /// The scan list.
    ScanList,
    /// The goals: add, edit, switch off, delete.
    Goals,
    /// Quit.
    Quit,
}

/// The command table: name, description, default keys.
pub const COMMANDS: &[(Command, &str, &str, &[&str])] = &[
    (
        Command::Up,
        "up",
        "move up (previous station in the walk)",
        &["Up", "k"],
    ),
    (
        Command::Down,
        "down",
        "move down (next station in the walk)",
        &["Down", "j"],
    ),
    (Command::Left, "left", "previous column", &["Left", "h"]),
    (Command::Right, "right", "next column", &["Right", "l"]),
    (
        Command::Edit,
        "edit-value",
        "edit the selected given (type a value, with or without unit)",
        &["Enter", "e"],
    ),
    (
        Command::Focus,
        "switch-focus",
        "switch between station grid and process panel",
        &["Tab"],
    ),
    (
        Command::ViewGrid,
        "show-grid",
        "station grid with process panel and summary",
        &["1"],
    ),
    (
        Command::ViewWalk,
        "show-walk",
        "walk the flow path station by station with explanations",
        &["2"],
    ),
    (
        Command::ViewChart,
        "show-ts-chart",
        "total temperature versus entropy chart",
        &["3"],
    ),
    (
        Command::ViewSweep,
        "show-sweep",
        "sweep a given and plot derived values",
        &["4"],
    ),
    (
        Command::Units,
        "toggle-units",
        "SI or US customary display",
        &["u"],
    ),
    (
        Command::Columns,
        "next-columns",
        "grid columns: totals, statics, flow, all",
        &["c"],
    ),
    (
        Command::Undo,
        "undo",
        "undo the last change",
        &["ctrl-z", "z"],
    ),
    (Command::Redo, "redo", "redo", &["ctrl-y", "Z"]),
    (
        Command::Save,
        "save",
        "save the workbook (atomic write)",
        &["ctrl-s"],
    ),
    (Command::SaveAs, "save-as", "save under a new name", &["S"]),
    (Command::Open, "open-file", "open another workbook", &["o"]),
    (
        Command::Insert,
        "insert-station",
        "insert a station and a duct into it after the selection",
        &["a"],
    ),
    (
        Command::Delete,
        "delete-station",
        "delete the selected station and the process into it",
        &["x"],
    ),
    (
        Command::Rename,
        "rename",
        "rename the selected station, or the process when in the panel",
        &["r"],
    ),
    (
        Command::Kind,
        "change-kind",
        "change the kind of the process into the selected station",
        &["K"],
    ),
    (
        Command::Mode,
        "change-mode",
        "choose the mode of the process (each says what you give and what it derives)",
        &["m"],
    ),
    (
        Command::Setup,
        "open-setup",
        "title, note, ambient block and gas model",
        &["g"],
    ),
    (
        Command::Scans,
        "load-scans",
        "load a recorded scan file (CSV/TSV) through the channel map",
        &["b"],
    ),
    (
        Command::ScanPrev,
        "previous-scan",
        "show the previous scan",
        &["["],
    ),
    (Command::ScanNext, "next-scan", "show the next scan", &["]"]),
    (
        Command::Goals,
        "goals",
        "goals (vary a given to meet a value): a adds, Enter edits, Space off/on, x deletes",
        &["G"],
    ),
    (
        Command::ScanList,
        "list-scans",
        "list the loaded scans with their flags: jump to one, f shows only flagged ones",
        &["B"],
    ),
    (
        Command::PageDown,
        "page-down",
        "scroll down: the walk explanation, the sweep table, the grid's panel and summary",
        &["PageDown", "ctrl-f"],
    ),
    (
        Command::PageUp,
        "page-up",
        "scroll up: the walk explanation, the sweep table, the grid's panel and summary",
        &["PageUp", "ctrl-b"],
    ),
    (Command::Help, "help", "this help", &["?", "F1"]),
    (
        Command::Quit,
        "quit",
        "quit (asks first when there are unsaved changes)",
        &["q", "ctrl-q"],
    ),
];

/// A key as written in the table and in settings ("ctrl-s", "Enter", "K").
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Key {
    code: KeyCode,
    ctrl: bool,
}

/// Parse a key name.
pub fn parse_key(s: &str) -> Option<Key> {
    let (ctrl, rest) = match s.strip_prefix("ctrl-") {
        Some(r) => (true, r),
        None => (false, s),
    };
    let code = match rest {
        "Up" => KeyCode::Up,
        "Down" => KeyCode::Down,
        "Left" => KeyCode::Left,
        "Right" => KeyCode::Right,
        "Enter" => KeyCode::Enter,
        "Tab" => KeyCode::Tab,
        "Esc" => KeyCode::Esc,
        "PageUp" => KeyCode::PageUp,
        "PageDown" => KeyCode::PageDown,
        "Home" => KeyCode::Home,
        "End" => KeyCode::End,
        f if f.starts_with('F') && f.len() > 1 => KeyCode::F(f[1..].parse().ok()?),
        c if c.chars().count() == 1 => KeyCode::Char(c.chars().next()?),
        _ => return None,
    };
    Some(Key { code, ctrl })
}

/// The key of a terminal event.
pub fn key_of(ev: &KeyEvent) -> Key {
    let ctrl = ev.modifiers.contains(KeyModifiers::CONTROL);
    let code = match ev.code {
        // Shifted letters arrive as upper case with SHIFT; keep the letter.
        KeyCode::Char(c) if ctrl => KeyCode::Char(c.to_ascii_lowercase()),
        c => c,
    };
    Key { code, ctrl }
}

/// Keys to commands.
#[derive(Debug, Clone)]
pub struct Keymap {
    binds: Vec<(Key, Command)>,
}

impl Keymap {
    /// The defaults, with user overrides merged over them. Returns the
    /// overrides that could not be understood, for the status line.
    pub fn with_overrides(overrides: &[(String, String)]) -> (Keymap, Vec<String>) {
        let mut binds = Vec::new();
        for (c, _, _, keys) in COMMANDS {
            for k in *keys {
                if let Some(k) = parse_key(k) {
                    binds.push((k, *c));
                }
            }
        }
        let mut bad = Vec::new();
        for (key, name) in overrides {
            let cmd = COMMANDS.iter().find(|(_, n, _, _)| n == name).map(|x| x.0);
            match (parse_key(key), cmd) {
                (Some(k), Some(c)) => {
                    binds.retain(|(bk, _)| *bk != k);
                    binds.push((k, c));
                }
                _ => bad.push(format!("{key} = {name}")),
            }
        }
        (Keymap { binds }, bad)
    }

    /// The command of a key.
    pub fn command(&self, key: Key) -> Option<Command> {
        self.binds.iter().find(|(k, _)| *k == key).map(|(_, c)| *c)
    }

    /// The keys bound to a command, as text ("Enter, e").
    pub fn keys_of(&self, c: Command) -> String {
        self.binds
            .iter()
            .filter(|(_, bc)| *bc == c)
            .map(|(k, _)| describe(*k))
            .collect::<Vec<_>>()
            .join(", ")
    }
}

/// A key's name for help.
pub fn describe(k: Key) -> String {
    let base = match k.code {
        KeyCode::Char(' ') => "Space".to_string(),
        KeyCode::Char(c) => c.to_string(),
        KeyCode::F(n) => format!("F{n}"),
        KeyCode::Up => "Up".into(),
        KeyCode::Down => "Down".into(),
        KeyCode::Left => "Left".into(),
        KeyCode::Right => "Right".into(),
        KeyCode::Enter => "Enter".into(),
        KeyCode::Tab => "Tab".into(),
        KeyCode::Esc => "Esc".into(),
        other => format!("{other:?}"),
    };
    if k.ctrl { format!("ctrl-{base}") } else { base }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_default_key_parses_and_no_key_is_bound_twice() {
        let (km, bad) = Keymap::with_overrides(&[]);
        assert!(bad.is_empty());
        let mut seen = std::collections::HashSet::new();
        for (k, _) in &km.binds {
            assert!(seen.insert(*k), "{k:?} bound twice");
        }
        assert_eq!(
            km.command(parse_key("ctrl-s").unwrap()),
            Some(Command::Save)
        );
    }

    #[test]
    fn overrides_replace_defaults_and_bad_ones_are_reported() {
        let (km, bad) = Keymap::with_overrides(&[
            ("ctrl-g".into(), "open-setup".into()),
            ("nope".into(), "quit".into()),
            ("q".into(), "no-such-command".into()),
        ]);
        assert_eq!(
            km.command(parse_key("ctrl-g").unwrap()),
            Some(Command::Setup)
        );
        assert_eq!(bad.len(), 2);
    }

    #[test]
    fn shipped_example_settings_parse() {
        let text = include_str!("../../examples/settings.ron");
        let s = super::super::settings::parse(text).unwrap();
        let (_, bad) = Keymap::with_overrides(&s.keys);
        assert!(bad.is_empty(), "{bad:?}");
    }
}
