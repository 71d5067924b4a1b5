//! Application state and its update: keys become commands, commands change
//! the state through the engine. Views read `&App` and never change it.

use super::keymap::{Command, Keymap, key_of};
use super::settings::{self, Settings};
use crate::book::{Duct, Given, Kind, Process, Statics, Station, Workbook};
use crate::engine::{Engine, StationStatus, sweep};
use crate::flow::Branch;
use crate::format;
use crate::units::{self, Quantity, UnitSystem};
use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use std::path::{Path, PathBuf};
use std::time::SystemTime;

/// Lines the help overlay can scroll by (about its length, so scrolling
/// down never runs into blank pages).
const HELP_SCROLL_MAX: u16 = super::keymap::COMMANDS.len() as u16 + 8;

/// The main views.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum View {
    /// Station grid, process panel, summary.
    Grid,
    /// Station-by-station explanations.
    Walk,
    /// Tt-s chart.
    Chart,
    /// Sweep chart and table.
    Sweep,
}

/// Which pane of the grid view has the keys.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Focus {
    /// The station grid.
    Grid,
    /// The process panel.
    Panel,
}

/// Column sets of the grid.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Columns {
    /// Totals and flow.
    Totals,
    /// Static state.
    Statics,
    /// Flow and area.
    Flow,
    /// Everything.
    All,
}

impl Columns {
    /// The station keys shown.
    pub fn keys(self) -> &'static [&'static str] {
        match self {
            Columns::Totals => &["tt", "pt", "w", "far", "wc", "ht"],
            Columns::Statics => &["t", "p", "mach", "v", "rho", "a"],
            Columns::Flow => &["w", "area", "mach", "wc", "q", "flow_function"],
            Columns::All => &[
                "tt", "pt", "t", "p", "mach", "v", "w", "area", "far", "wc", "rho", "s",
            ],
        }
    }
    /// Name for the title bar.
    pub fn name(self) -> &'static str {
        match self {
            Columns::Totals => "totals",
            Columns::Statics => "statics",
            Columns::Flow => "flow",
            Columns::All => "all",
        }
    }
    fn next(self) -> Columns {
        match self {
            Columns::Totals => Columns::Statics,
            Columns::Statics => Columns::Flow,
            Columns::Flow => Columns::All,
            Columns::All => Columns::Totals,
        }
    }
}

/// What a confirmation leads to.
#[derive(Debug, Clone, PartialEq)]
pub enum Pending {
    /// Quit without saving.
    Quit,
    /// Save over a file that changed on disk.
    SaveOver,
    /// Save over a read-only or hard-linked file.
    SaveForced(PathBuf),
    /// Load the recovery file of this workbook.
    LoadRecovery(PathBuf),
    /// Discard changes, then ask for a file to open.
    OpenOther,
}

/// What a text prompt is for.
#[derive(Debug, Clone, PartialEq)]
pub enum TextFor {
    /// Rename station (index).
    RenameStation(usize),
    /// Rename process (index).
    RenameProcess(usize),
    /// Save under a path.
    SaveAs,
    /// Open a path.
    Open,
    /// Load a scan file.
    Scans,
    /// Name of a new station after the given index.
    Insert(usize),
}

/// What a choice list is for.
#[derive(Debug, Clone, PartialEq)]
pub enum ChooseFor {
    /// A process kind for the process into the selected station.
    Kind,
    /// What fixes the selected station's static state.
    Statics,
    /// The start screen: recent files and templates.
    Start(Vec<StartItem>),
}

/// An entry of the start screen.
#[derive(Debug, Clone, PartialEq)]
pub enum StartItem {
    /// A recent file.
    File(PathBuf),
    /// A template by name.
    Template(&'static str),
    /// The recovery file of a new or untitled workbook whose session was
    /// cut, and the file it was to be saved as (None: untitled).
    Recovery(PathBuf, Option<PathBuf>),
}

/// Popups, drawn as layers over the view; the top one takes the keys.
#[derive(Debug, Clone, PartialEq)]
pub enum Popup {
    /// Edit a given.
    Edit {
        /// Path of the given.
        path: String,
        /// Its quantity (for the accepted units hint).
        quantity: Quantity,
        /// The text being typed.
        input: String,
    },
    /// A yes/no question.
    Confirm {
        /// The question.
        text: String,
        /// What yes does.
        then: Pending,
    },
    /// A line of text.
    Text {
        /// Title.
        title: String,
        /// The text being typed.
        input: String,
        /// What it is for.
        purpose: TextFor,
    },
    /// Pick one of a list.
    Choose {
        /// Title.
        title: String,
        /// Items shown.
        items: Vec<String>,
        /// Selected item.
        sel: usize,
        /// What it is for.
        purpose: ChooseFor,
    },
    /// Ambient block and gas model.
    Setup {
        /// Selected row.
        sel: usize,
    },
    /// Sweep set-up form: vary, from, to, steps, report.
    SweepForm {
        /// Field texts.
        fields: [String; 5],
        /// Focused field.
        sel: usize,
    },
    /// Help overlay.
    Help {
        /// Scroll offset.
        scroll: u16,
    },
}

/// A row of the process panel.
#[derive(Debug, Clone, PartialEq)]
pub enum PanelRow {
    /// A given of the station or the process.
    Given(String),
    /// How the station's static state is fixed (cycles on Enter).
    Statics,
    /// Subsonic or supersonic branch (toggles on Enter).
    Branch,
}

/// A computed sweep.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepData {
    /// Path varied.
    pub vary: String,
    /// Paths reported.
    pub report: Vec<String>,
    /// Rows.
    pub rows: Vec<sweep::Row>,
}

/// The whole application state.
pub struct App {
    /// The engine over the open workbook (None on the start screen).
    pub engine: Option<Engine>,
    /// File of the workbook.
    pub path: Option<PathBuf>,
    /// Unsaved changes.
    pub modified: bool,
    /// Modification time and length of the file when read or saved.
    pub disk: Option<(SystemTime, u64)>,
    /// Current view.
    pub view: View,
    /// Focus in the grid view.
    pub focus: Focus,
    /// Selected station.
    pub row: usize,
    /// Selected grid column.
    pub col: usize,
    /// Selected panel row.
    pub panel: usize,
    /// Grid columns.
    pub columns: Columns,
    /// Display units.
    pub system: UnitSystem,
    /// Undo stack (workbooks before each change).
    pub undo: Vec<Workbook>,
    /// Redo stack.
    pub redo: Vec<Workbook>,
    /// Popups, top last.
    pub popups: Vec<Popup>,
    /// Status message and whether it is an error.
    pub status: Option<(String, bool)>,
    /// Keymap.
    pub keymap: Keymap,
    /// Settings.
    pub settings: Settings,
    /// Last sweep.
    pub sweep: Option<SweepData>,
    /// Set when the app should end.
    pub quit: bool,
    /// Loaded scans (scan browser).
    pub scans: Option<ScanBrowser>,
    /// Scroll offset of the walk text and the sweep table.
    pub scroll: u16,
}

/// Scans loaded for browsing.
pub struct ScanBrowser {
    /// The scan file.
    pub path: PathBuf,
    /// Its header.
    pub header: Vec<String>,
    /// Its rows (at most [`MAX_BROWSE`]).
    pub rows: Vec<crate::reduce::ScanLine>,
    /// The compiled channel map.
    pub plan: crate::reduce::Plan,
    /// The scan selected (index into rows).
    pub at: usize,
    /// The scan whose values the workbook holds (None: none yet). It
    /// differs from `at` when the selected scan could not be applied, and
    /// the title then says whose values are on screen.
    pub shown: Option<usize>,
}

/// Most scans the browser holds in memory (the `reduce` command streams any length).
pub const MAX_BROWSE: usize = 200_000;

fn stamp(p: &Path) -> Option<(SystemTime, u64)> {
    let m = std::fs::metadata(p).ok()?;
    Some((m.modified().ok()?, m.len()))
}

/// The recovery file written beside a workbook when the session is cut.
pub fn recovery_path(path: Option<&Path>) -> Option<PathBuf> {
    match path {
        Some(p) => {
            let name = p.file_name()?.to_string_lossy().to_string();
            Some(p.with_file_name(format!("{name}.recovery")))
        }
        None => settings::recent_path().map(|r| r.with_file_name("untitled.ron.recovery")),
    }
}

/// Write a recovery file (its folder made when missing); whether it worked.
pub fn write_recovery_text(rp: &Path, text: &str) -> bool {
    if let Some(d) = rp.parent() {
        let _ = std::fs::create_dir_all(d);
    }
    format::atomic::write(rp, text.as_bytes(), format::WriteOptions { force: true }).is_ok()
}

impl App {
    /// An app with settings, on the start screen.
    pub fn new(settings: Settings) -> App {
        let (keymap, bad) = Keymap::with_overrides(&settings.keys);
        let mut app = App {
            engine: None,
            path: None,
            modified: false,
            disk: None,
            view: View::Grid,
            focus: Focus::Grid,
            row: 0,
            col: 0,
            panel: 0,
            columns: Columns::Totals,
            system: if settings.us_units {
                UnitSystem::Us
            } else {
                UnitSystem::Si
            },
            undo: Vec::new(),
            redo: Vec::new(),
            popups: Vec::new(),
            status: None,
            keymap,
            settings,
            sweep: None,
            quit: false,
            scans: None,
            scroll: 0,
        };
        if !bad.is_empty() {
            app.error(format!("settings: keys not understood: {}", bad.join("; ")));
        }
        app
    }

    /// Show the start screen (recent files and templates).
    pub fn start_screen(&mut self) {
        let mut items = Vec::new();
        let mut labels = Vec::new();
        // Starting a named new file: only the demos make sense.
        let new_file = self.path.as_ref().is_some_and(|p| !p.exists());
        // Unsaved work of a cut session that had no file of its own yet
        // comes first: the new file named on the command line, or the
        // untitled workbook.
        let mut targets = vec![None];
        if new_file {
            targets.insert(0, self.path.clone());
        }
        for target in targets {
            if let Some(rp) = recovery_path(target.as_deref())
                && rp.is_file()
            {
                labels.push(match &target {
                    Some(t) => format!(
                        "recover unsaved work for {} (interrupted session)",
                        t.display()
                    ),
                    None => "recover the untitled workbook (interrupted session)".into(),
                });
                items.push(StartItem::Recovery(rp, target));
            }
        }
        for f in settings::recent()
            .into_iter()
            .filter(|f| f.exists() && !new_file)
        {
            labels.push(format!("open   {}", f.display()));
            items.push(StartItem::File(f));
        }
        for (n, d, _) in crate::templates::TEMPLATES {
            labels.push(format!("new    {n}: {d}"));
            items.push(StartItem::Template(n));
        }
        self.popups.push(Popup::Choose {
            title: "stationwise: open a recent workbook or start from a demo".into(),
            items: labels,
            sel: 0,
            purpose: ChooseFor::Start(items),
        });
    }

    /// Open a workbook file (offers its recovery file when one exists).
    pub fn open(&mut self, path: &Path) -> Result<(), String> {
        let book = format::load(path).map_err(|e| format!("{}: {e}", path.display()))?;
        let engine = Engine::new(book).map_err(|e| crate::present::join(&e))?;
        self.engine = Some(engine);
        self.path = Some(path.to_path_buf());
        self.disk = stamp(path);
        self.modified = false;
        self.undo.clear();
        self.redo.clear();
        self.row = 0;
        self.panel = 0;
        self.sweep = None;
        settings::remember(path);
        self.info(format!("opened {}", path.display()));
        if let Some(rp) = recovery_path(Some(path))
            && rp.exists()
        {
            self.popups.push(Popup::Confirm {
                    text: format!(
                        "A recovery file from an interrupted session exists ({}). Load it? y loads it (then save to keep it), n deletes it.",
                        rp.display()
                    ),
                    then: Pending::LoadRecovery(rp),
                });
        }
        Ok(())
    }

    /// Start from a template (untitled until saved).
    pub fn open_template(&mut self, name: &str) -> Result<(), String> {
        let text = crate::templates::get(name).ok_or("no such template")?;
        let book = format::parse(text).map_err(|e| e.to_string())?;
        self.engine = Some(Engine::new(book).map_err(|e| crate::present::join(&e))?);
        // Keep a path the user named for a new file; otherwise untitled.
        if self.path.as_ref().is_some_and(|p| p.exists()) {
            self.path = None;
        }
        self.disk = None;
        self.modified = true;
        self.undo.clear();
        self.redo.clear();
        self.row = 0;
        let target = self
            .path
            .as_ref()
            .map_or("save with ctrl-s".to_string(), |p| {
                format!("ctrl-s saves it as {}", p.display())
            });
        self.info(format!("new workbook from the {name} demo ({target})"));
        Ok(())
    }

    /// Load the recovery file of a new or untitled workbook as unsaved
    /// changes (the recovery file is removed once loaded).
    pub fn open_recovered(&mut self, rp: &Path, target: Option<PathBuf>) -> Result<(), String> {
        let text = std::fs::read_to_string(rp).map_err(|e| format!("{}: {e}", rp.display()))?;
        let book = format::parse(&text).map_err(|e| format!("{}: {e}", rp.display()))?;
        self.engine = Some(Engine::new(book).map_err(|e| crate::present::join(&e))?);
        self.path = target;
        self.disk = None;
        self.modified = true;
        self.undo.clear();
        self.redo.clear();
        self.row = 0;
        let _ = std::fs::remove_file(rp);
        self.info("recovered the interrupted session's changes (save to keep them)");
        Ok(())
    }

    fn info(&mut self, m: impl Into<String>) {
        self.status = Some((m.into(), false));
    }
    fn error(&mut self, m: impl Into<String>) {
        self.status = Some((m.into(), true));
    }

    /// The open workbook.
    pub fn book(&self) -> Option<&Workbook> {
        self.engine.as_ref().map(|e| e.book())
    }

    /// Handle a key press.
    pub fn on_key(&mut self, ev: KeyEvent) {
        if !self.popups.is_empty() {
            self.popup_key(ev);
            return;
        }
        if self.engine.is_none() {
            if let Some(Command::Quit) = self.keymap.command(key_of(&ev)) {
                self.quit = true;
            } else {
                self.start_screen();
            }
            return;
        }
        if let Some(c) = self.keymap.command(key_of(&ev)) {
            self.status = None;
            self.run(c);
        }
    }

    /// Number of stations.
    fn n_stations(&self) -> usize {
        self.book().map_or(0, |b| b.stations.len())
    }

    /// Rows of the process panel for the selected station.
    pub fn panel_rows(&self) -> Vec<PanelRow> {
        let Some(b) = self.book() else {
            return Vec::new();
        };
        let Some(st) = b.stations.get(self.row) else {
            return Vec::new();
        };
        let mut rows = Vec::new();
        let sp = format!("station.{}.", st.name);
        let e = self.engine.as_ref();
        let producer = e.map(|e| &b.processes[e.producer_of(self.row)]);
        let pp = producer.map(|p| format!("process.{}.", p.name));
        for (path, ..) in b.givens() {
            if path.starts_with(&sp) && path[sp.len()..].find('.').is_none() {
                rows.push(PanelRow::Given(path));
            }
        }
        let kind = producer.map(|p| crate::kinds::of(&p.kind));
        if !kind.is_some_and(|k| k.sets_exit_statics(st)) {
            rows.push(PanelRow::Statics);
            rows.push(PanelRow::Branch);
        }
        // A given the current mode does not read is not offered.
        let unread = |path: &str| {
            kind.is_some_and(|k| {
                k.unread_givens().iter().any(|u| {
                    pp.as_deref()
                        .is_some_and(|pp| path.strip_prefix(pp) == Some(*u))
                })
            })
        };
        if let Some(pp) = &pp {
            for (path, ..) in b.givens() {
                if path.starts_with(pp.as_str()) && !unread(&path) {
                    rows.push(PanelRow::Given(path));
                }
            }
        }
        rows
    }

    /// The given path behind a grid cell, if the cell is a given.
    pub fn cell_given(&self, station: usize, key: &str) -> Option<String> {
        let b = self.book()?;
        let e = self.engine.as_ref()?;
        let st = b.stations.get(station)?;
        let own = format!("station.{}.{key}", st.name);
        let p = &b.processes[e.producer_of(station)];
        let proc_key = crate::kinds::of(&p.kind).grid_given(key);
        // The station's own givens, read off the station (the same ones
        // `Workbook::givens` lists, without copying the workbook per cell:
        // that made one frame of a 50-station grid cost milliseconds).
        let own_given = match key {
            "tt" => st.tt.is_some(),
            "pt" => st.pt.is_some(),
            "mach" => matches!(st.statics, Some(Statics::Mach(_))),
            "p" => matches!(st.statics, Some(Statics::Pressure(_))),
            "v" => matches!(st.statics, Some(Statics::Velocity(_))),
            "area" => matches!(st.statics, Some(Statics::Area(_))),
            _ => false,
        };
        if own_given {
            return Some(own);
        }
        proc_key.map(|k| format!("process.{}.{k}", p.name))
    }

    fn run(&mut self, c: Command) {
        match c {
            Command::Quit => {
                if self.modified {
                    self.popups.push(Popup::Confirm {
                        text: "There are unsaved changes. Quit without saving? (y/n)".into(),
                        then: Pending::Quit,
                    });
                } else {
                    self.quit = true;
                }
            }
            Command::Up => self.move_sel(-1),
            Command::Down => self.move_sel(1),
            Command::Left => self.col = self.col.saturating_sub(1),
            Command::Right => {
                self.col = (self.col + 1).min(self.columns.keys().len().saturating_sub(1))
            }
            Command::Focus => {
                if self.view == View::Grid {
                    self.focus = match self.focus {
                        Focus::Grid => Focus::Panel,
                        Focus::Panel => Focus::Grid,
                    };
                    self.panel = 0;
                }
            }
            Command::Edit if self.view == View::Sweep => self.open_sweep_form(),
            Command::Edit => self.edit_selected(),
            Command::PageDown => self.scroll = self.scroll.saturating_add(10),
            Command::PageUp => self.scroll = self.scroll.saturating_sub(10),
            Command::ViewGrid => self.view = View::Grid,
            Command::ViewWalk => {
                self.view = View::Walk;
                self.scroll = 0;
            }
            Command::ViewChart => self.view = View::Chart,
            Command::ViewSweep => {
                self.view = View::Sweep;
                if self.sweep.is_none() {
                    self.open_sweep_form();
                }
            }
            Command::Units => {
                self.system = match self.system {
                    UnitSystem::Si => UnitSystem::Us,
                    UnitSystem::Us => UnitSystem::Si,
                };
                self.info(match self.system {
                    UnitSystem::Si => "SI units",
                    UnitSystem::Us => "US customary units",
                });
            }
            Command::Columns => {
                self.columns = self.columns.next();
                self.col = self.col.min(self.columns.keys().len() - 1);
            }
            Command::Undo => self.undo(),
            Command::Redo => self.redo(),
            Command::Save => self.save(false),
            Command::SaveAs => self.popups.push(Popup::Text {
                title: "save as (file path)".into(),
                input: self
                    .path
                    .as_ref()
                    .map_or("workbook.ron".into(), |p| p.display().to_string()),
                purpose: TextFor::SaveAs,
            }),
            Command::Open => {
                if self.modified {
                    self.popups.push(Popup::Confirm {
                        text: "Discard unsaved changes and open another workbook? (y/n)".into(),
                        then: Pending::OpenOther,
                    });
                } else {
                    self.ask_open();
                }
            }
            Command::Insert => {
                let name = self
                    .book()
                    .and_then(|b| b.stations.get(self.row))
                    .map_or("new".into(), |s| format!("{}a", s.name));
                // Start empty: typing gives the name, Enter alone takes the
                // suggestion.
                self.popups.push(Popup::Text {
                    title: format!(
                        "name of the new station (a duct leads into it; Enter alone: {name})"
                    ),
                    input: String::new(),
                    purpose: TextFor::Insert(self.row),
                });
            }
            Command::Delete => self.delete_station(),
            Command::Rename => self.rename(),
            Command::Kind => {
                let items = crate::kinds::offered()
                    .into_iter()
                    .map(|(label, _)| label.to_string())
                    .collect();
                self.popups.push(Popup::Choose {
                    title: "kind of the process into this station".into(),
                    items,
                    sel: 0,
                    purpose: ChooseFor::Kind,
                });
            }
            Command::Mode => self.cycle_mode(),
            Command::Setup => self.popups.push(Popup::Setup { sel: 0 }),
            Command::Help => self.popups.push(Popup::Help { scroll: 0 }),
            Command::Scans => {
                let guess = self
                    .path
                    .as_ref()
                    .map(|p| {
                        let stem = p
                            .file_stem()
                            .map_or(String::new(), |s| s.to_string_lossy().to_string());
                        p.with_file_name(format!("{stem}-scans.csv"))
                            .display()
                            .to_string()
                    })
                    .unwrap_or_default();
                self.popups.push(Popup::Text {
                    title: "scan file to browse (CSV or tab-separated)".into(),
                    input: guess,
                    purpose: TextFor::Scans,
                });
            }
            Command::ScanPrev => self.step_scan(-1),
            Command::ScanNext => self.step_scan(1),
        }
    }

    fn ask_open(&mut self) {
        self.popups.push(Popup::Text {
            title: "open workbook (file path)".into(),
            input: String::new(),
            purpose: TextFor::Open,
        });
    }

    fn move_sel(&mut self, d: isize) {
        if self.view == View::Walk {
            self.scroll = 0;
        }
        if self.view == View::Grid && self.focus == Focus::Panel {
            let n = self.panel_rows().len();
            if n > 0 {
                self.panel = (self.panel as isize + d).clamp(0, n as isize - 1) as usize;
            }
            return;
        }
        let n = self.n_stations();
        if n > 0 {
            self.row = (self.row as isize + d).clamp(0, n as isize - 1) as usize;
        }
        self.panel = 0;
    }

    fn edit_selected(&mut self) {
        if self.view != View::Grid {
            return;
        }
        let path = match self.focus {
            Focus::Grid => {
                let key = self.columns.keys()[self.col.min(self.columns.keys().len() - 1)];
                match self.cell_given(self.row, key) {
                    Some(p) => p,
                    None => {
                        let by = self.book().and_then(|b| {
                            let e = self.engine.as_ref()?;
                            Some(b.processes[e.producer_of(self.row)].name.clone())
                        });
                        self.info(format!(
                            "this value is derived by \"{}\"; Tab to edit its parameters",
                            by.unwrap_or_default()
                        ));
                        return;
                    }
                }
            }
            Focus::Panel => match self.panel_rows().get(self.panel).cloned() {
                Some(PanelRow::Given(p)) => p,
                Some(PanelRow::Statics) => {
                    self.choose_statics();
                    return;
                }
                Some(PanelRow::Branch) => {
                    self.toggle_branch();
                    return;
                }
                None => return,
            },
        };
        let Some((_, q, text, _)) = self
            .book()
            .and_then(|b| b.givens().into_iter().find(|(p, ..)| *p == path))
        else {
            return;
        };
        self.popups.push(Popup::Edit {
            path,
            quantity: q,
            input: text,
        });
    }

    /// Apply a typed value to a given: recompute at once, or refuse and keep the old one.
    pub fn apply_edit(&mut self, path: &str, text: &str) -> Result<(), String> {
        let Some(engine) = self.engine.as_mut() else {
            return Err("no workbook".into());
        };
        let before = engine.book().clone();
        engine.set_given(path, text).map_err(|e| e.to_string())?;
        self.undo.push(before);
        self.redo.clear();
        self.modified = true;
        let problems = self.engine.as_ref().map_or(0, |e| e.problems().len());
        if problems > 0 {
            self.error(format!(
                "{path} = {text}: recomputed; {problems} problem(s), see the marked stations"
            ));
        } else {
            self.info(format!("{path} = {text}: recomputed"));
        }
        Ok(())
    }

    /// Replace the workbook after a structural edit (kept undoable).
    pub fn commit(&mut self, book: Workbook, what: &str) {
        let Some(engine) = self.engine.as_mut() else {
            return;
        };
        let before = engine.book().clone();
        match engine.replace_book(book) {
            Ok(()) => {
                self.undo.push(before);
                self.redo.clear();
                self.modified = true;
                self.info(what.to_string());
                self.follow_book();
            }
            Err(e) => {
                let _ = engine.replace_book(before);
                self.error(format!("not done: {}", crate::present::join(&e)));
            }
        }
        self.row = self.row.min(self.n_stations().saturating_sub(1));
        self.panel = 0;
    }

    /// After the workbook was replaced (an edit, undo or redo): the scan
    /// browser's channel map is compiled again from the new workbook, so
    /// renamed givens stay fed; a sweep whose varied given is gone is put
    /// away rather than shown under a name that no longer exists.
    fn follow_book(&mut self) {
        let Some(book) = self.engine.as_ref().map(|e| e.book()) else {
            return;
        };
        let mut closed = None;
        if let Some(sb) = &mut self.scans {
            match crate::reduce::Plan::new(book, &sb.header) {
                Ok(plan) => sb.plan = plan,
                Err(e) => closed = Some(e.to_string()),
            }
        }
        if self
            .sweep
            .as_ref()
            .is_some_and(|sw| book.given(&sw.vary).is_none())
        {
            self.sweep = None;
        }
        if let Some(e) = closed {
            self.scans = None;
            self.error(format!("scan browser closed: {e}"));
        }
    }

    fn undo(&mut self) {
        let Some(prev) = self.undo.pop() else {
            self.info("nothing to undo");
            return;
        };
        if let Some(e) = self.engine.as_mut() {
            let cur = e.book().clone();
            if e.replace_book(prev).is_ok() {
                self.redo.push(cur);
                self.modified = true;
                self.info("undone");
                self.follow_book();
            }
        }
        self.row = self.row.min(self.n_stations().saturating_sub(1));
        self.panel = self.panel.min(self.panel_rows().len().saturating_sub(1));
    }

    fn redo(&mut self) {
        let Some(next) = self.redo.pop() else {
            self.info("nothing to redo");
            return;
        };
        if let Some(e) = self.engine.as_mut() {
            let cur = e.book().clone();
            if e.replace_book(next).is_ok() {
                self.undo.push(cur);
                self.modified = true;
                self.info("redone");
                self.follow_book();
            }
        }
        self.row = self.row.min(self.n_stations().saturating_sub(1));
        self.panel = self.panel.min(self.panel_rows().len().saturating_sub(1));
    }

    /// Save (asks first when the file changed on disk since it was read).
    pub fn save(&mut self, force: bool) {
        let Some(path) = self.path.clone() else {
            self.run(Command::SaveAs);
            return;
        };
        if !force && self.disk.is_some() && stamp(&path) != self.disk {
            self.popups.push(Popup::Confirm {
                text: format!(
                    "{} changed on disk since it was opened. Save over it? (y/n)",
                    path.display()
                ),
                then: Pending::SaveOver,
            });
            return;
        }
        self.save_to(&path, format::WriteOptions::default());
    }

    fn save_to(&mut self, path: &Path, opts: format::WriteOptions) {
        let Some(engine) = self.engine.as_ref() else {
            return;
        };
        let mut book = engine.book().clone();
        format::refresh_results(&mut book, engine);
        match format::save_with(path, &book, opts) {
            Ok(()) => {
                self.path = Some(path.to_path_buf());
                self.disk = stamp(path);
                self.modified = false;
                settings::remember(path);
                if let Some(rp) = recovery_path(Some(path)) {
                    let _ = std::fs::remove_file(rp);
                }
                self.info(format!("saved {}", path.display()));
            }
            Err(
                e @ (format::WriteError::ReadOnly { .. } | format::WriteError::HardLinked { .. }),
            ) => {
                let text = match &e {
                    format::WriteError::ReadOnly { .. } => format!(
                        "{} is read-only. Save anyway, keeping it read-only? (y/n)",
                        path.display()
                    ),
                    _ => format!("{e}. Save anyway, as a separate copy under this name? (y/n)"),
                };
                self.popups.push(Popup::Confirm {
                    text,
                    then: Pending::SaveForced(path.to_path_buf()),
                });
            }
            Err(e) => self.error(format!("cannot save: {e}")),
        }
    }

    /// Where the recovery file would go and what it would hold, when there
    /// are unsaved changes.
    pub fn recovery_snapshot(&self) -> Option<(PathBuf, String)> {
        if !self.modified {
            return None;
        }
        let book = self.book()?;
        Some((recovery_path(self.path.as_deref())?, format::to_text(book)))
    }

    /// Write the recovery file (on a dropped session). Returns its path.
    pub fn write_recovery(&self) -> Option<PathBuf> {
        let (rp, text) = self.recovery_snapshot()?;
        write_recovery_text(&rp, &text).then_some(rp)
    }

    fn station_name(&self, i: usize) -> Option<String> {
        self.book()?.stations.get(i).map(|s| s.name.clone())
    }

    fn delete_station(&mut self) {
        let Some(b) = self.book().cloned() else {
            return;
        };
        let Some(name) = self.station_name(self.row) else {
            return;
        };
        let Some(pi) = b.processes.iter().position(|p| p.to == name) else {
            self.error(
                "this station is a split's second stream: delete or change the split instead",
            );
            return;
        };
        let p = &b.processes[pi];
        let readers = b
            .processes
            .iter()
            .filter(|q| q.from.as_deref() == Some(&name))
            .count();
        let Some(upstream) = p.from.clone() else {
            if readers > 0 {
                self.error("cannot delete the entry station while processes read it");
                return;
            }
            let mut nb = b.clone();
            nb.processes.remove(pi);
            nb.stations.retain(|s| s.name != name);
            self.commit(nb, &format!("deleted station {name}"));
            return;
        };
        let kind = crate::kinds::of(&p.kind);
        if kind.second_input().is_some() || kind.second_output().is_some() {
            self.error("delete the second stream's stations first, or change this process's kind");
            return;
        }
        let mut nb = b.clone();
        nb.processes.remove(pi);
        nb.stations.retain(|s| s.name != name);
        for q in &mut nb.processes {
            if q.from.as_deref() == Some(&name) {
                q.from = Some(upstream.clone());
            }
            crate::kinds::of_mut(&mut q.kind).visit_names_mut(&mut |of, s| {
                if of == crate::kinds::NameOf::Input && *s == name {
                    *s = upstream.clone();
                }
            });
        }
        nb.results = None;
        self.commit(
            nb,
            &format!("deleted station {name} and the process into it"),
        );
    }

    fn insert_station(&mut self, after: usize, name: &str) {
        let Some(b) = self.book().cloned() else {
            return;
        };
        let name = name.trim();
        if name.is_empty() || b.stations.iter().any(|s| s.name == name) {
            self.error(format!("station name \"{name}\" is empty or already used"));
            return;
        }
        let Some(sel) = b.stations.get(after).map(|s| s.name.clone()) else {
            return;
        };
        let mut nb = b.clone();
        for q in &mut nb.processes {
            if q.from.as_deref() == Some(&sel) {
                q.from = Some(name.to_string());
            }
            crate::kinds::of_mut(&mut q.kind).visit_names_mut(&mut |of, s| {
                if of == crate::kinds::NameOf::Input && *s == sel {
                    *s = name.to_string();
                }
            });
        }
        let mut pname = format!("duct {name}");
        while nb.processes.iter().any(|p| p.name == pname) {
            pname.push('\'');
        }
        let at = nb
            .processes
            .iter()
            .position(|p| p.to == sel)
            .map_or(nb.processes.len(), |i| i + 1);
        nb.processes.insert(
            at,
            Process {
                name: pname,
                from: Some(sel),
                to: name.to_string(),
                kind: Kind::Duct(Duct::Recovery {
                    recovery: Given::raw("1"),
                }),
                note: String::new(),
            },
        );
        nb.stations.insert(after + 1, Station::named(name));
        if nb.resolve().is_err() {
            self.error("internal: new station did not resolve");
            return;
        }
        nb.results = None;
        self.commit(
            nb,
            &format!("inserted station {name} with a loss-free duct into it"),
        );
        self.row = (after + 1).min(self.n_stations().saturating_sub(1));
    }

    fn rename(&mut self) {
        let Some(b) = self.book() else {
            return;
        };
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        if self.focus == Focus::Panel && self.view == View::Grid {
            let pi = e.producer_of(self.row);
            self.popups.push(Popup::Text {
                title: "new name of the process".into(),
                input: b.processes[pi].name.clone(),
                purpose: TextFor::RenameProcess(pi),
            });
        } else if let Some(s) = b.stations.get(self.row) {
            self.popups.push(Popup::Text {
                title: "new name of the station".into(),
                input: s.name.clone(),
                purpose: TextFor::RenameStation(self.row),
            });
        }
    }

    fn do_rename_station(&mut self, i: usize, new: &str) {
        let Some(old) = self
            .book()
            .and_then(|b| b.stations.get(i))
            .map(|s| s.name.clone())
        else {
            return;
        };
        self.rename_everywhere(crate::book::paths::Scope::Station, &old, new.trim());
    }

    fn do_rename_process(&mut self, i: usize, new: &str) {
        let Some(old) = self
            .book()
            .and_then(|b| b.processes.get(i))
            .map(|p| p.name.clone())
        else {
            return;
        };
        self.rename_everywhere(crate::book::paths::Scope::Process, &old, new.trim());
    }

    /// Rename a station or process in one undoable step: the workbook
    /// updates its processes, goals, channel map and stored results; the
    /// sweep shown follows the new name too.
    fn rename_everywhere(&mut self, scope: crate::book::paths::Scope, old: &str, new: &str) {
        use crate::book::paths::Scope;
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let (what, done) = match scope {
            Scope::Station => ("station", nb.rename_station(old, new)),
            Scope::Process => ("process", nb.rename_process(old, new)),
            _ => ("shaft", nb.rename_shaft(old, new)),
        };
        if let Err(e) = done {
            self.error(e.to_string());
            return;
        }
        if let Some(sw) = &mut self.sweep {
            for p in std::iter::once(&mut sw.vary).chain(sw.report.iter_mut()) {
                crate::book::edit::rename_in_path(p, scope, old, new);
            }
        }
        self.commit(nb, &format!("renamed {what} {old} to {new}"));
    }

    fn choose_statics(&mut self) {
        let cur = self
            .book()
            .and_then(|b| b.stations.get(self.row))
            .map_or(0, |s| match s.statics {
                None => 0,
                Some(Statics::Mach(_)) => 1,
                Some(Statics::Pressure(_)) => 2,
                Some(Statics::Velocity(_)) => 3,
                Some(Statics::Area(_)) => 4,
            });
        self.popups.push(Popup::Choose {
            title: "what fixes this station's static state".into(),
            items: [
                "nothing here (totals only)",
                "Mach number",
                "static pressure",
                "velocity",
                "flow area (Mach on the station's branch)",
            ]
            .iter()
            .map(|s| s.to_string())
            .collect(),
            sel: cur,
            purpose: ChooseFor::Statics,
        });
    }

    fn set_statics(&mut self, choice: usize) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let v = e.station(&nb.stations[self.row].name).copied();
        let st = &mut nb.stations[self.row];
        let f = v.and_then(|v| v.flow);
        // New givens start from the values computed now, so the cycle
        // stays where it was until the user edits them.
        let next = match choice {
            1 => Some(Statics::Mach(Given::raw(&fmt_num(
                f.map_or(0.5, |f| f.mach),
            )))),
            2 => Some(Statics::Pressure(Given::raw(&format!(
                "{} kPa",
                fmt_num(f.map_or(100.0, |f| f.p / 1000.0))
            )))),
            3 => Some(Statics::Velocity(Given::raw(&format!(
                "{} m/s",
                fmt_num(f.map_or(100.0, |f| f.v))
            )))),
            4 => Some(Statics::Area(Given::raw(&format!(
                "{} m2",
                fmt_num(v.and_then(|v| v.area).unwrap_or(0.1))
            )))),
            _ => None,
        };
        st.statics = next;
        let what = match &st.statics {
            None => "static state not fixed at this station".to_string(),
            Some(s) => format!("static state fixed by {}", statics_name(s)),
        };
        if nb.resolve().is_ok() {
            self.commit(nb, &what);
        }
    }

    fn toggle_branch(&mut self) {
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let st = &mut nb.stations[self.row];
        st.branch = match st.branch {
            Some(Branch::Supersonic) => None,
            _ => Some(Branch::Supersonic),
        };
        let what = if st.branch.is_some() {
            "supersonic branch"
        } else {
            "subsonic branch"
        };
        self.commit(nb, what);
    }

    fn cycle_mode(&mut self) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let pi = e.producer_of(self.row);
        let p = &mut nb.processes[pi];
        // The new mode starts from the process's figures now.
        let next = crate::kinds::of(&p.kind).next_mode(e.process(&p.name));
        let Some(k) = next else {
            self.info("this kind of process has one mode");
            return;
        };
        p.kind = k;
        let label = crate::kinds::of(&p.kind).mode_label();
        self.sync_measured(&mut nb, pi);
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        self.commit(nb, &format!("mode: {label}"));
        self.panel = 0;
    }

    /// Give the process's exit station the measured Tt and pt its new mode
    /// reads (starting from the values computed now), and drop the ones it
    /// no longer reads: the engine refuses a measured value that nothing
    /// reads, and the panel offers no other way to add or remove them.
    fn sync_measured(&self, nb: &mut Workbook, pi: usize) {
        let Some(p) = nb.processes.get(pi) else {
            return;
        };
        let reads = crate::kinds::of(&p.kind).reads();
        let (uses_tt, uses_pt) = (reads.measured_tt, reads.measured_pt);
        let to = p.to.clone();
        let now = self.engine.as_ref().and_then(|e| e.station(&to)).copied();
        let Some(st) = nb.stations.iter_mut().find(|s| s.name == to) else {
            return;
        };
        if !uses_tt {
            st.tt = None;
        } else if st.tt.is_none() {
            let tt = now.map_or(288.15, |v| v.tt);
            st.tt = Some(Given::raw(&format!("{} K", crate::report::sig(tt, 6))));
        }
        if !uses_pt {
            st.pt = None;
        } else if st.pt.is_none() {
            let pt = now.map_or(101_325.0, |v| v.pt);
            st.pt = Some(Given::raw(&format!(
                "{} kPa",
                crate::report::sig(pt / 1000.0, 6)
            )));
        }
    }

    fn set_kind(&mut self, idx: usize) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let pi = e.producer_of(self.row);
        let Some((label, kind)) = crate::kinds::offered().into_iter().nth(idx) else {
            return;
        };
        let is_entry = crate::kinds::of(&kind).is_entry();
        let p = &mut nb.processes[pi];
        if is_entry != p.from.is_none() {
            self.error(if is_entry {
                "an entry takes no upstream station: pick it for the first station only"
            } else {
                "the first station needs an entry"
            });
            return;
        }
        p.kind = kind;
        self.sync_measured(&mut nb, pi);
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        self.commit(nb, &format!("process is now a {label}"));
    }

    fn open_sweep_form(&mut self) {
        let Some(b) = self.book() else {
            return;
        };
        // Changing a sweep starts from the one shown.
        if let Some(sw) = &self.sweep
            && let Some((_, q, ..)) = b.givens().into_iter().find(|(p, ..)| *p == sw.vary)
        {
            let u = crate::present::unit_of(q, self.system);
            let sym = if matches!(q, Quantity::Ratio | Quantity::Mach) {
                ""
            } else {
                u.symbol
            };
            let end = |x: f64| {
                format!("{} {sym}", fmt_num(units::from_si(x, u)))
                    .trim()
                    .to_string()
            };
            let (from, to) = match (sw.rows.first(), sw.rows.last()) {
                (Some(a), Some(z)) => (end(a.0), end(z.0)),
                _ => (String::new(), String::new()),
            };
            self.popups.push(Popup::SweepForm {
                fields: [
                    sw.vary.clone(),
                    from,
                    to,
                    sw.rows.len().saturating_sub(1).max(1).to_string(),
                    sw.report.join(", "),
                ],
                sel: 0,
            });
            return;
        }
        let givens = b.givens();
        let pick = match self.panel_rows().get(self.panel) {
            Some(PanelRow::Given(p)) if self.focus == Focus::Panel => Some(p.clone()),
            _ => None,
        }
        .or_else(|| {
            givens
                .iter()
                .find(|(p, ..)| p.starts_with("process."))
                .map(|(p, ..)| p.clone())
        })
        .unwrap_or_default();
        let cur = givens.iter().find(|(p, ..)| *p == pick);
        let (from, to) = cur.map_or((String::new(), String::new()), |(_, q, _, si)| {
            let u = crate::present::unit_of(*q, self.system);
            let v = units::from_si(*si, u);
            let sym = if matches!(q, Quantity::Ratio | Quantity::Mach) {
                ""
            } else {
                u.symbol
            };
            (
                format!("{} {sym}", fmt_num(v * 0.8)).trim().to_string(),
                format!("{} {sym}", fmt_num(v * 1.2)).trim().to_string(),
            )
        });
        let report = if self
            .engine
            .as_ref()
            .is_some_and(|e| e.summary().thrust_net.is_some())
        {
            "summary.thrust_net, summary.tsfc".to_string()
        } else {
            let last = b.stations.last().map_or(String::new(), |s| s.name.clone());
            format!("station.{last}.tt, station.{last}.pt")
        };
        self.popups.push(Popup::SweepForm {
            fields: [pick, from, to, "20".into(), report],
            sel: 0,
        });
    }

    fn run_sweep(&mut self, fields: &[String; 5]) -> Result<(), String> {
        let e = self.engine.as_ref().ok_or("no workbook")?;
        let vary = fields[0].trim().to_string();
        let (_, q, ..) = e
            .book()
            .givens()
            .into_iter()
            .find(|(p, ..)| *p == vary)
            .ok_or(format!("no given at \"{vary}\""))?;
        let from = units::parse(&fields[1], q, "from")
            .map_err(|e| e.to_string())?
            .si;
        let to = units::parse(&fields[2], q, "to")
            .map_err(|e| e.to_string())?
            .si;
        let steps: usize = fields[3]
            .trim()
            .parse()
            .map_err(|_| "steps: a whole number".to_string())?;
        if !(1..=2000).contains(&steps) {
            return Err("steps: 1 to 2000 in the terminal (use the sweep command for more)".into());
        }
        let report: Vec<String> = fields[4]
            .split(',')
            .map(|s| s.trim().to_string())
            .filter(|s| !s.is_empty())
            .collect();
        if report.is_empty() {
            return Err("report: at least one derived value path".into());
        }
        let rows = sweep::run(e, &vary, &sweep::linspace(from, to, steps), &report)
            .map_err(|e| e.to_string())?;
        self.sweep = Some(SweepData { vary, report, rows });
        Ok(())
    }

    fn popup_key(&mut self, ev: KeyEvent) {
        let Some(top) = self.popups.pop() else {
            return;
        };
        let code = ev.code;
        let ctrl = ev.modifiers.contains(KeyModifiers::CONTROL);
        match top {
            Popup::Help { scroll } => match code {
                KeyCode::Down | KeyCode::Char('j') => self.popups.push(Popup::Help {
                    scroll: (scroll + 1).min(HELP_SCROLL_MAX),
                }),
                KeyCode::Up | KeyCode::Char('k') => self.popups.push(Popup::Help {
                    scroll: scroll.saturating_sub(1),
                }),
                KeyCode::PageDown => self.popups.push(Popup::Help {
                    scroll: (scroll + 10).min(HELP_SCROLL_MAX),
                }),
                KeyCode::PageUp => self.popups.push(Popup::Help {
                    scroll: scroll.saturating_sub(10),
                }),
                _ => {}
            },
            Popup::Confirm { text, then } => match code {
                KeyCode::Char('y') | KeyCode::Char('Y') => self.confirmed(then),
                KeyCode::Char('n') | KeyCode::Char('N') => {
                    if let Pending::LoadRecovery(p) = &then {
                        let _ = std::fs::remove_file(p);
                        self.info("recovery file deleted");
                    }
                }
                KeyCode::Esc => {}
                _ => self.popups.push(Popup::Confirm { text, then }),
            },
            Popup::Edit {
                path,
                quantity,
                mut input,
            } => match code {
                KeyCode::Esc => self.info("edit cancelled"),
                KeyCode::Enter => {
                    if let Err(e) = self.apply_edit(&path, &input) {
                        self.error(format!("{e} (old value kept)"));
                        self.popups.push(Popup::Edit {
                            path,
                            quantity,
                            input,
                        });
                    }
                }
                KeyCode::Backspace => {
                    input.pop();
                    self.popups.push(Popup::Edit {
                        path,
                        quantity,
                        input,
                    });
                }
                KeyCode::Char('u') if ctrl => {
                    input.clear();
                    self.popups.push(Popup::Edit {
                        path,
                        quantity,
                        input,
                    });
                }
                KeyCode::Char(c) if !ctrl => {
                    input.push(c);
                    self.popups.push(Popup::Edit {
                        path,
                        quantity,
                        input,
                    });
                }
                _ => self.popups.push(Popup::Edit {
                    path,
                    quantity,
                    input,
                }),
            },
            Popup::Text {
                title,
                mut input,
                purpose,
            } => match code {
                KeyCode::Esc => {}
                KeyCode::Enter => self.text_done(purpose, &input),
                KeyCode::Backspace => {
                    input.pop();
                    self.popups.push(Popup::Text {
                        title,
                        input,
                        purpose,
                    });
                }
                KeyCode::Char('u') if ctrl => {
                    input.clear();
                    self.popups.push(Popup::Text {
                        title,
                        input,
                        purpose,
                    });
                }
                KeyCode::Char(c) if !ctrl => {
                    input.push(c);
                    self.popups.push(Popup::Text {
                        title,
                        input,
                        purpose,
                    });
                }
                _ => self.popups.push(Popup::Text {
                    title,
                    input,
                    purpose,
                }),
            },
            Popup::Choose {
                title,
                items,
                mut sel,
                purpose,
            } => match code {
                KeyCode::Esc => {
                    if matches!(purpose, ChooseFor::Start(_)) && self.engine.is_none() {
                        self.quit = true;
                    }
                }
                KeyCode::Char('q') if matches!(purpose, ChooseFor::Start(_)) => self.quit = true,
                KeyCode::Up | KeyCode::Char('k') => {
                    sel = sel.saturating_sub(1);
                    self.popups.push(Popup::Choose {
                        title,
                        items,
                        sel,
                        purpose,
                    });
                }
                KeyCode::Down | KeyCode::Char('j') => {
                    sel = (sel + 1).min(items.len().saturating_sub(1));
                    self.popups.push(Popup::Choose {
                        title,
                        items,
                        sel,
                        purpose,
                    });
                }
                KeyCode::Enter => match purpose {
                    ChooseFor::Kind => self.set_kind(sel),
                    ChooseFor::Statics => self.set_statics(sel),
                    ChooseFor::Start(list) => {
                        let r = match list.get(sel) {
                            Some(StartItem::File(f)) => self.open(f),
                            Some(StartItem::Template(t)) => self.open_template(t),
                            Some(StartItem::Recovery(rp, target)) => {
                                let (rp, target) = (rp.clone(), target.clone());
                                self.open_recovered(&rp, target)
                            }
                            None => Ok(()),
                        };
                        if let Err(e) = r {
                            self.error(e);
                            self.popups.push(Popup::Choose {
                                title,
                                items,
                                sel,
                                purpose: ChooseFor::Start(list),
                            });
                        }
                    }
                },
                _ => self.popups.push(Popup::Choose {
                    title,
                    items,
                    sel,
                    purpose,
                }),
            },
            Popup::Setup { mut sel } => {
                let rows = self.setup_rows();
                match code {
                    KeyCode::Esc | KeyCode::Char('q') => {}
                    KeyCode::Up | KeyCode::Char('k') => {
                        sel = sel.saturating_sub(1);
                        self.popups.push(Popup::Setup { sel });
                    }
                    KeyCode::Down | KeyCode::Char('j') => {
                        sel = (sel + 1).min(rows.len().saturating_sub(1));
                        self.popups.push(Popup::Setup { sel });
                    }
                    KeyCode::Enter | KeyCode::Char('e') | KeyCode::Char('m') => {
                        self.popups.push(Popup::Setup { sel });
                        match rows.get(sel) {
                            Some(SetupRow::Given(p)) => {
                                if let Some((_, q, t, _)) = self
                                    .book()
                                    .and_then(|b| b.givens().into_iter().find(|(g, ..)| g == p))
                                {
                                    self.popups.push(Popup::Edit {
                                        path: p.clone(),
                                        quantity: q,
                                        input: t,
                                    });
                                }
                            }
                            Some(r) => self.toggle_setup(r.clone()),
                            None => {}
                        }
                    }
                    _ => self.popups.push(Popup::Setup { sel }),
                }
            }
            Popup::SweepForm {
                mut fields,
                mut sel,
            } => match code {
                KeyCode::Esc => {
                    if self.sweep.is_none() {
                        self.view = View::Grid;
                    }
                }
                KeyCode::Tab | KeyCode::Down => {
                    sel = (sel + 1) % 5;
                    self.popups.push(Popup::SweepForm { fields, sel });
                }
                KeyCode::BackTab | KeyCode::Up => {
                    sel = (sel + 4) % 5;
                    self.popups.push(Popup::SweepForm { fields, sel });
                }
                KeyCode::Enter => {
                    if let Err(e) = self.run_sweep(&fields) {
                        self.error(e);
                        self.popups.push(Popup::SweepForm { fields, sel });
                    } else {
                        self.info("sweep done; Enter in this view changes it");
                    }
                }
                KeyCode::Backspace => {
                    fields[sel].pop();
                    self.popups.push(Popup::SweepForm { fields, sel });
                }
                KeyCode::Char('u') if ctrl => {
                    fields[sel].clear();
                    self.popups.push(Popup::SweepForm { fields, sel });
                }
                KeyCode::Char(c) if !ctrl => {
                    fields[sel].push(c);
                    self.popups.push(Popup::SweepForm { fields, sel });
                }
                _ => self.popups.push(Popup::SweepForm { fields, sel }),
            },
        }
        // In the sweep view, Enter with no popup reopens the form.
    }

    fn confirmed(&mut self, then: Pending) {
        match then {
            Pending::Quit => self.quit = true,
            Pending::SaveOver => self.save(true),
            Pending::SaveForced(p) => self.save_to(&p, format::WriteOptions { force: true }),
            Pending::OpenOther => self.ask_open(),
            Pending::LoadRecovery(p) => {
                match std::fs::read_to_string(&p)
                    .map_err(|e| e.to_string())
                    .and_then(|t| format::parse(&t).map_err(|e| e.to_string()))
                {
                    Ok(book) => {
                        self.commit(
                            book,
                            "recovered the interrupted session's changes (save to keep them)",
                        );
                        let _ = std::fs::remove_file(&p);
                    }
                    Err(e) => self.error(format!("recovery file unreadable: {e}")),
                }
            }
        }
    }

    fn text_done(&mut self, purpose: TextFor, input: &str) {
        match purpose {
            TextFor::RenameStation(i) => self.do_rename_station(i, input),
            TextFor::RenameProcess(i) => self.do_rename_process(i, input),
            TextFor::Insert(i) => {
                let name = if input.trim().is_empty() {
                    self.book()
                        .and_then(|b| b.stations.get(i))
                        .map_or("new".into(), |s| format!("{}a", s.name))
                } else {
                    input.to_string()
                };
                self.insert_station(i, &name)
            }
            TextFor::SaveAs => {
                let p = PathBuf::from(input.trim());
                if p.as_os_str().is_empty() {
                    self.error("no file name given");
                } else {
                    self.save_to(&p, format::WriteOptions::default());
                }
            }
            TextFor::Scans => {
                let p = PathBuf::from(input.trim());
                if let Err(e) = self.load_scans(&p) {
                    self.error(e);
                }
            }
            TextFor::Open => {
                let p = PathBuf::from(input.trim());
                if let Err(e) = self.open(&p) {
                    self.error(e);
                }
            }
        }
    }

    /// Load a scan file for browsing and show its first scan.
    pub fn load_scans(&mut self, path: &Path) -> Result<(), String> {
        let book = self.book().ok_or("no workbook")?.clone();
        let mut rdr = crate::reduce::open_scans(path).map_err(|e| e.to_string())?;
        let header: Vec<String> = rdr.header().to_vec();
        let plan = crate::reduce::Plan::new(&book, &header).map_err(|e| e.to_string())?;
        let mut rows = Vec::new();
        while rows.len() < MAX_BROWSE {
            match rdr.next_line().map_err(|e| e.to_string())? {
                Some(line) => rows.push(line),
                None => break,
            }
        }
        if rows.is_empty() {
            return Err(format!("{}: no scans after the header", path.display()));
        }
        self.scans = Some(ScanBrowser {
            path: path.to_path_buf(),
            header,
            rows,
            plan,
            at: 0,
            shown: None,
        });
        self.step_scan(0);
        Ok(())
    }

    fn step_scan(&mut self, d: isize) {
        let Some(sb) = self.scans.as_mut() else {
            self.info("no scans loaded: b loads a scan file");
            return;
        };
        let n = sb.rows.len();
        sb.at = (sb.at as isize + d).clamp(0, n as isize - 1) as usize;
        let row = sb.at as u64 + 1;
        let inputs = match &sb.rows[sb.at] {
            crate::reduce::ScanLine::Record(rec) => sb.plan.inputs(&sb.header, rec, row),
            crate::reduce::ScanLine::Bad(why) => Err(vec![format!("unreadable line ({why})")]),
        };
        let at = sb.at;
        let (msg, err) = match (inputs, self.engine.as_mut()) {
            (Ok(i), Some(e)) => match sb.plan.apply(e, &i) {
                Ok(()) => {
                    sb.shown = Some(at);
                    let probs = e.problems();
                    if probs.is_empty() {
                        (format!("scan {row} of {n}"), false)
                    } else {
                        (
                            format!(
                                "scan {row} of {n}: {}: {}",
                                probs[0].place, probs[0].message
                            ),
                            true,
                        )
                    }
                }
                Err(m) => (format!("scan {row}: {m}"), true),
            },
            (Err(p), _) => (
                format!("scan {row} of {n} not shown: {}", p.join("; ")),
                true,
            ),
            (Ok(_), None) => return,
        };
        self.status = Some((msg, err));
    }

    /// Linearised uncertainties of the grid's values and the selected
    /// process's figures, when the workbook's channel map carries
    /// uncertainties (computed on a copy of the engine).
    pub fn uncertainties(
        &self,
    ) -> Option<std::collections::HashMap<String, crate::reduce::Uncertainty>> {
        let e = self.engine.as_ref()?;
        let ch = e.book().channels.as_ref()?;
        if !ch
            .map
            .iter()
            .any(|c| c.systematic.is_some() || c.random.is_some())
        {
            return None;
        }
        let plan = crate::reduce::Plan::without_scans(e.book()).ok()?;
        let mut report = Vec::new();
        for s in e.stations() {
            for k in self.columns.keys() {
                report.push(format!("station.{}.{k}", s.name));
            }
        }
        let p =
            &e.book().processes[e.producer_of(self.row.min(e.stations().len().saturating_sub(1)))];
        if let Some(r) = e.process(&p.name) {
            for (k, _) in &r.figures {
                report.push(format!("process.{}.{k}", p.name));
            }
        }
        let mut eng = e.clone();
        let inputs = plan.nominal(e);
        let unc = crate::reduce::linear(&mut eng, &plan, &inputs, &report);
        Some(
            report
                .into_iter()
                .zip(unc)
                .filter_map(|(r, u)| u.map(|u| (r, u)))
                .collect(),
        )
    }

    /// Rows of the set-up popup.
    pub fn setup_rows(&self) -> Vec<SetupRow> {
        let mut rows = vec![SetupRow::Condition];
        if let Some(b) = self.book() {
            for (p, ..) in b.givens() {
                if p.starts_with("ambient.")
                    && p != "ambient.flight_mach"
                    && p != "ambient.flight_speed"
                {
                    rows.push(SetupRow::Given(p));
                }
            }
            rows.push(SetupRow::Flight);
            for (p, ..) in b.givens() {
                if p == "ambient.flight_mach" || p == "ambient.flight_speed" {
                    rows.push(SetupRow::Given(p));
                }
            }
            rows.push(SetupRow::Humidity);
            rows.push(SetupRow::Gas);
            for (p, ..) in b.givens() {
                if p.starts_with("gas.") {
                    rows.push(SetupRow::Given(p));
                }
            }
            rows.push(SetupRow::KeepResults);
        }
        rows
    }

    fn toggle_setup(&mut self, r: SetupRow) {
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        use crate::book::{Condition, Flight, GasSettings};
        let what = match r {
            SetupRow::Condition => {
                nb.ambient.condition = match nb.ambient.condition {
                    Condition::Standard { .. } => Condition::Measured {
                        pressure: Given::raw("101.325 kPa"),
                        temperature: Given::raw("288.15 K"),
                    },
                    Condition::Measured { .. } => Condition::Standard {
                        altitude: Given::raw("0 m"),
                        offset: Given::raw("0 K"),
                        geometric: false,
                    },
                };
                "ambient condition changed"
            }
            SetupRow::Flight => {
                nb.ambient.flight = match nb.ambient.flight {
                    Flight::Mach(_) => Flight::Speed(Given::raw("0 m/s")),
                    Flight::Speed(_) => Flight::Mach(Given::raw("0")),
                };
                "flight condition changed"
            }
            SetupRow::Humidity => {
                nb.ambient.humidity = match nb.ambient.humidity {
                    None => Some(Given::raw("0.005")),
                    Some(_) => None,
                };
                "humidity changed"
            }
            SetupRow::Gas => {
                nb.gas = match nb.gas {
                    GasSettings::ThermallyPerfect => GasSettings::CaloricallyPerfect {
                        gamma: Given::raw("1.4"),
                        r: Given::raw("287.05"),
                        hot_gamma: Some(Given::raw("1.33")),
                        hot_r: None,
                    },
                    GasSettings::CaloricallyPerfect { .. } => GasSettings::ThermallyPerfect,
                };
                "gas model changed"
            }
            SetupRow::KeepResults => {
                nb.keep_results = !nb.keep_results;
                if nb.keep_results {
                    "results will be stored in the file on save"
                } else {
                    "results will not be stored"
                }
            }
            SetupRow::Given(_) => return,
        };
        if let Err(e) = nb.resolve() {
            self.error(crate::present::join(&e));
            return;
        }
        self.commit(nb, what);
    }
}

/// Rows of the set-up popup.
#[derive(Debug, Clone, PartialEq)]
pub enum SetupRow {
    /// Standard atmosphere or measured ambient (toggles).
    Condition,
    /// Flight Mach or speed (toggles).
    Flight,
    /// Humidity on or off.
    Humidity,
    /// Gas model (toggles).
    Gas,
    /// Store results in the file.
    KeepResults,
    /// A given.
    Given(String),
}

fn fmt_num(v: f64) -> String {
    crate::report::sig(v, 5)
}

fn statics_name(s: &Statics) -> &'static str {
    match s {
        Statics::Mach(_) => "Mach number",
        Statics::Pressure(_) => "static pressure",
        Statics::Velocity(_) => "velocity",
        Statics::Area(_) => "area",
    }
}

/// Status of the selected station for the status line.
pub fn station_problem(app: &App) -> Option<String> {
    let e = app.engine.as_ref()?;
    match e.station_status(app.row) {
        StationStatus::Ok(_) => None,
        StationStatus::Failed(p) => e
            .problems()
            .into_iter()
            .find(|x| x.place.ends_with(&format!("\"{p}\"")))
            .map(|x| format!("{}: {}", x.place, x.message)),
        StationStatus::Blocked(p) => {
            Some(format!("not computed: blocked by the problem in \"{p}\""))
        }
    }
}
