//! Application state and its update: keys become commands, commands change
//! the state through the engine. Views read `&App` and never change it.

pub use super::field::Field;
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
const HELP_SCROLL_MAX: u16 = 3 * super::keymap::COMMANDS.len() as u16 + 16;

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
    /// Name of the new bypass station of a split into station (index).
    SplitBypass(usize),
    /// The new station a bleed's air goes to, for the station at this row.
    BleedStation(usize),
    /// The workbook's title.
    Title,
    /// The workbook's note.
    Note,
    /// Name of a new shaft for the machine into station (index).
    NewShaft(usize),
}

/// What a choice list is for.
#[derive(Debug, Clone, PartialEq)]
pub enum ChooseFor {
    /// A process kind for the process into the selected station.
    Kind,
    /// A mode of the process into the selected station (the candidates,
    /// the current one first).
    Mode(Vec<Kind>),
    /// What fixes the selected station's static state.
    Statics,
    /// The second stream of a mixer into station (index): station names.
    MixerSecondary(usize, Vec<String>),
    /// The shaft of the machine into station (index): shaft names, then
    /// "none" and "new".
    Shaft(usize, Vec<String>),
    /// The start screen: recent files and templates.
    Start(Vec<StartItem>),
    /// A path for the sweep form under the chooser: its row (the varied
    /// given, the second one, or a reported value to add), and the paths
    /// listed.
    SweepPath(usize, Vec<String>),
    /// A path for the goal form under the chooser: its row (0 varied
    /// given, 1 target) and the paths listed.
    GoalPath(usize, Vec<String>),
    /// The given a channel feeds, for the channel form under the chooser.
    ChannelGiven(Vec<String>),
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
        input: Field,
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
        input: Field,
        /// What it is for.
        purpose: TextFor,
    },
    /// Pick one of a list.
    Choose {
        /// Title.
        title: String,
        /// Items shown.
        items: Vec<String>,
        /// Selected item (index into `items`).
        sel: usize,
        /// Typed search: only items containing it (any case) are listed.
        search: String,
        /// What it is for.
        purpose: ChooseFor,
    },
    /// Ambient block and gas model.
    Setup {
        /// Selected row.
        sel: usize,
    },
    /// Sweep set-up form: vary, from, to, steps; a second variable (a
    /// carpet) with its from, to, steps; the reported values (see
    /// [`sweep_form::ROWS`]).
    SweepForm {
        /// Field texts.
        fields: [String; 9],
        /// Focused field.
        sel: usize,
    },
    /// The loaded scans: jump to one, or list only the flagged ones.
    ScanList {
        /// Selected entry (index into the list shown).
        sel: usize,
        /// Only scans with flags or that cannot be used.
        flagged: bool,
    },
    /// The workbook's goals: add, edit, switch off and on, delete.
    Goals {
        /// Selected goal (the goal count: the "add" row).
        sel: usize,
    },
    /// One goal's form (see [`goals::GOAL_ROWS`]).
    GoalForm {
        /// The goal edited (None: a new one).
        index: Option<usize>,
        /// Field texts: vary, target, value, low, high.
        fields: [String; 5],
        /// Focused field.
        sel: usize,
    },
    /// The channel map: the barometer and the channels feeding givens.
    Channels {
        /// Selected line (channels, then the "add" rows).
        sel: usize,
    },
    /// One channel's form (see [`channels::CHANNEL_ROWS`]).
    ChannelForm {
        /// The channel edited.
        at: channels::ChannelAt,
        /// Field texts: given, columns, unit, weights, systematic, random.
        fields: [String; 6],
        /// Focused field.
        sel: usize,
    },
    /// Help overlay.
    Help {
        /// Scroll offset.
        scroll: u16,
    },
}

impl Popup {
    /// A choice list with nothing typed yet.
    pub fn choose(title: impl Into<String>, items: Vec<String>, purpose: ChooseFor) -> Popup {
        Popup::Choose {
            title: title.into(),
            items,
            sel: 0,
            search: String::new(),
            purpose,
        }
    }
}

/// The items of a choice list that contain the typed search (any case).
pub fn choose_listed(items: &[String], search: &str) -> Vec<usize> {
    let s = search.to_lowercase();
    items
        .iter()
        .enumerate()
        .filter(|(_, t)| s.is_empty() || t.to_lowercase().contains(&s))
        .map(|(i, _)| i)
        .collect()
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
    /// The shaft a compressor or turbine is on (Enter picks).
    Shaft,
    /// An optional shaft value ("offtake", "speed"): Enter adds or removes it.
    ShaftOptional(&'static str),
    /// A figure the process derives (selecting it shows its uncertainty
    /// in the summary; Enter says how to change it).
    Figure(String),
}

/// A computed sweep.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepData {
    /// Path varied.
    pub vary: String,
    /// Paths reported.
    pub report: Vec<String>,
    /// Rows: for a carpet, every value of `vary` at the first value of the
    /// second variable, then at the next.
    pub rows: Vec<sweep::Row>,
    /// The second variable of a carpet and its values.
    pub second: Option<(String, Vec<f64>)>,
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
    /// First reported column of the sweep table shown (Left/Right).
    pub sweep_col: usize,
    /// How many points of the last sweep failed and the first reason.
    pub sweep_note: Option<String>,
    /// Uncertainties and explanations, computed once per workbook state
    /// and selection rather than in every frame.
    pub derived: Derived,
    /// The canonical text of the workbook as last opened or saved (undo
    /// back to it clears the modified mark).
    pub saved_text: Option<String>,
    /// The givens of each mode a process was switched away from (by
    /// process name and mode label, with its exit station's measured Tt
    /// and pt), so switching back restores them.
    pub mode_memory: std::collections::HashMap<(String, String), ModeMemory>,
    /// The walk shows the summary's explanation (below the last station).
    pub walk_summary: bool,
}

/// A mode left behind: the process's kind and its exit's measured Tt, pt.
pub type ModeMemory = (Kind, Option<Given>, Option<Given>);

/// Uncertainties of the grid's values, by path.
pub type UncertaintyMap = std::collections::HashMap<String, crate::reduce::Uncertainty>;

/// Results too costly to compute in every frame (an uncertainty column is
/// two evaluations per channel; an explanation re-runs a process with the
/// tracer on), each kept with the workbook state and selection it was
/// computed for and computed again only when those change.
#[derive(Debug, Default)]
pub struct Derived {
    /// What the last frame could scroll: the smallest page of the blocks
    /// that scroll together and the furthest useful offset, so that a page
    /// key moves by what is shown and never past the end.
    pub scroll_room: std::cell::Cell<(u16, u16)>,
    /// Rows the last frame's scan list showed (its page keys move by it).
    pub list_page: std::cell::Cell<u16>,
    uncertainty: std::cell::RefCell<Option<UncertaintyEntry>>,
    walk: std::cell::RefCell<Option<WalkEntry>>,
}

/// Uncertainties with the workbook state, selected row and columns they
/// were computed for.
type UncertaintyEntry = (Workbook, usize, Columns, Option<UncertaintyMap>);

/// An explanation with the workbook state, station and units it was
/// computed for.
type WalkEntry = (Workbook, String, UnitSystem, Result<Vec<String>, String>);

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
    /// The scan applied to the workbook (None: the selected scan could not
    /// be applied, and every value is withheld).
    pub shown: Option<usize>,
    /// What the channel map makes of each scan (for the scan list).
    pub marks: Vec<ScanMark>,
}

/// What the channel map makes of one scan.
#[derive(Debug, Clone, PartialEq)]
pub enum ScanMark {
    /// Every channel read.
    Ok,
    /// Usable, with probes left out (the first reason and the count).
    Flagged(String, usize),
    /// Not usable (the reasons).
    Unusable(String),
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

mod edits;
mod files;
mod scans;
pub use scans::{Origin, scan_label};
pub mod channels;
mod forms;
pub mod goals;
pub mod sweep_form;

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
            sweep_col: 0,
            sweep_note: None,
            derived: Derived::default(),
            saved_text: None,
            mode_memory: Default::default(),
            walk_summary: false,
        };
        if !bad.is_empty() {
            app.error(format!("settings: keys not understood: {}", bad.join("; ")));
        }
        app
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
        // A machine's shaft, and the shaft's own values.
        if let Some(p) = producer
            && matches!(p.kind, Kind::Compressor(_) | Kind::Turbine(_))
        {
            rows.push(PanelRow::Shaft);
            if let Some(s) = crate::kinds::of(&p.kind).shaft() {
                let sp = format!("shaft.{s}.");
                for (path, ..) in b.givens() {
                    if path.starts_with(&sp) {
                        rows.push(PanelRow::Given(path));
                    }
                }
                rows.push(PanelRow::ShaftOptional("offtake"));
                rows.push(PanelRow::ShaftOptional("speed"));
            }
        }
        // The figures it derives, last.
        if let (Some(e), Some(p)) = (e, producer)
            && let Some(r) = e.process(&p.name)
        {
            for (k, _) in &r.figures {
                rows.push(PanelRow::Figure((*k).to_string()));
            }
        }
        rows
    }

    /// The path whose uncertainty the summary shows: the selected figure
    /// in the panel, else the selected grid cell.
    pub fn uncertainty_path(&self) -> Option<String> {
        let e = self.engine.as_ref()?;
        if self.focus == Focus::Panel
            && let Some(PanelRow::Figure(k)) = self.panel_rows().get(self.panel)
        {
            let p = &e.book().processes[e.producer_of(self.row)];
            return Some(format!("process.{}.{k}", p.name));
        }
        let keys = self.columns.keys();
        let key = keys.get(self.col.min(keys.len().saturating_sub(1)))?;
        let st = e.stations().get(self.row)?;
        Some(format!("station.{}.{key}", st.name))
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
            // In the sweep view the arrows scroll the table's columns.
            Command::Left if self.view == View::Sweep => {
                self.sweep_col = self.sweep_col.saturating_sub(1)
            }
            Command::Right if self.view == View::Sweep => {
                let n = self.sweep.as_ref().map_or(0, |s| s.report.len());
                self.sweep_col = (self.sweep_col + 1).min(n.saturating_sub(1))
            }
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
            Command::PageDown => {
                let (page, max) = self.derived.scroll_room.get();
                self.scroll = self.scroll.saturating_add(page.max(1)).min(max);
            }
            Command::PageUp => {
                let (page, max) = self.derived.scroll_room.get();
                self.scroll = self.scroll.min(max).saturating_sub(page.max(1));
            }
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
                input: Field::with(
                    self.path
                        .as_ref()
                        .map_or("workbook.ron".into(), |p| p.display().to_string()),
                ),
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
                    input: Field::default(),
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
                    search: String::new(),
                    purpose: ChooseFor::Kind,
                });
            }
            Command::Mode => self.choose_mode(),
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
                    input: Field::with(guess),
                    purpose: TextFor::Scans,
                });
            }
            Command::ScanPrev => self.step_scan(-1),
            Command::ScanNext => self.step_scan(1),
            Command::Goals => self.open_goals(),
            Command::ScanList => match &self.scans {
                Some(sb) => {
                    let sel = sb.at;
                    self.popups.push(Popup::ScanList {
                        sel,
                        flagged: false,
                    })
                }
                None => self.info("no scans loaded: b loads a scan file"),
            },
        }
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
            // The panel follows its selection again (a page key scrolled
            // away from it).
            self.scroll = 0;
            return;
        }
        let n = self.n_stations();
        // The walk lists the summary after the last station: a mark of its
        // own, so the selected row always names a station.
        if self.view == View::Walk {
            if d > 0 && self.row + 1 >= n {
                self.walk_summary = true;
                return;
            }
            if d < 0 && self.walk_summary {
                self.walk_summary = false;
                return;
            }
        }
        if n > 0 {
            self.row = (self.row as isize + d).clamp(0, n as isize - 1) as usize;
        }
        self.panel = 0;
        if self.view == View::Grid {
            self.scroll = 0;
        }
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
                Some(PanelRow::Shaft) => {
                    self.choose_shaft();
                    return;
                }
                Some(PanelRow::ShaftOptional(what)) => {
                    self.toggle_shaft_value(what);
                    return;
                }
                Some(PanelRow::Figure(_)) => {
                    self.info(
                        "a figure this process derives: change the givens above (or m for a mode that takes it as a given)",
                    );
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
            input: Field::with(text),
        });
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
                    if let Err(e) = self.apply_edit(&path, input.text()) {
                        self.error(format!("{e} (old value kept)"));
                        self.popups.push(Popup::Edit {
                            path,
                            quantity,
                            input,
                        });
                    }
                }
                _ => {
                    input.key(code, ctrl);
                    self.popups.push(Popup::Edit {
                        path,
                        quantity,
                        input,
                    });
                }
            },
            Popup::Text {
                title,
                mut input,
                purpose,
            } => match code {
                KeyCode::Esc => {}
                KeyCode::Enter => self.text_done(purpose, input.text()),
                _ => {
                    input.key(code, ctrl);
                    self.popups.push(Popup::Text {
                        title,
                        input,
                        purpose,
                    });
                }
            },
            Popup::Choose {
                title,
                items,
                mut sel,
                mut search,
                purpose,
            } => {
                let listed = choose_listed(&items, &search);
                let at = listed.iter().position(|&i| i == sel);
                let keep = |app: &mut App, sel, search, purpose| {
                    app.popups.push(Popup::Choose {
                        title: title.clone(),
                        items: items.clone(),
                        sel,
                        search,
                        purpose,
                    })
                };
                match code {
                    KeyCode::Esc if !search.is_empty() => {
                        keep(self, sel, String::new(), purpose);
                    }
                    KeyCode::Esc => {
                        if matches!(purpose, ChooseFor::Start(_)) && self.engine.is_none() {
                            self.quit = true;
                        }
                    }
                    KeyCode::Char('q')
                        if matches!(purpose, ChooseFor::Start(_)) && search.is_empty() =>
                    {
                        self.quit = true
                    }
                    KeyCode::Up | KeyCode::PageUp => {
                        let step = if code == KeyCode::Up { 1 } else { 10 };
                        let i = at.unwrap_or(0).saturating_sub(step);
                        sel = listed.get(i).copied().unwrap_or(sel);
                        keep(self, sel, search, purpose);
                    }
                    KeyCode::Down | KeyCode::PageDown => {
                        let step = if code == KeyCode::Down { 1 } else { 10 };
                        let i = at
                            .map_or(0, |a| a + step)
                            .min(listed.len().saturating_sub(1));
                        sel = listed.get(i).copied().unwrap_or(sel);
                        keep(self, sel, search, purpose);
                    }
                    KeyCode::Backspace => {
                        search.pop();
                        let l = choose_listed(&items, &search);
                        if !l.contains(&sel) {
                            sel = l.first().copied().unwrap_or(sel);
                        }
                        keep(self, sel, search, purpose);
                    }
                    KeyCode::Char(c) if !ctrl => {
                        search.push(c);
                        let l = choose_listed(&items, &search);
                        if !l.contains(&sel) {
                            sel = l.first().copied().unwrap_or(sel);
                        }
                        keep(self, sel, search, purpose);
                    }
                    KeyCode::Enter if at.is_none() => {
                        self.error(format!("nothing matches \"{search}\""));
                        keep(self, sel, search, purpose);
                    }
                    KeyCode::Enter => match purpose {
                        ChooseFor::Kind => self.set_kind(sel),
                        ChooseFor::Mode(list) => {
                            if let Some(k) = list.into_iter().nth(sel) {
                                self.set_mode(k);
                            }
                        }
                        ChooseFor::Statics => self.set_statics(sel),
                        ChooseFor::MixerSecondary(row, names) => {
                            if let Some(n) = names.get(sel) {
                                self.make_mixer(row, n);
                            }
                        }
                        ChooseFor::Shaft(row, names) => self.pick_shaft(row, &names, sel),
                        ChooseFor::SweepPath(row, paths) => {
                            self.sweep_path_chosen(row, paths.get(sel).cloned())
                        }
                        ChooseFor::GoalPath(row, paths) => {
                            self.goal_path_chosen(row, paths.get(sel).cloned())
                        }
                        ChooseFor::ChannelGiven(paths) => {
                            self.channel_given_chosen(paths.get(sel).cloned())
                        }
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
                                keep(self, sel, search, ChooseFor::Start(list));
                            }
                        }
                    },
                    _ => keep(self, sel, search, purpose),
                }
            }
            Popup::ScanList { mut sel, flagged } => {
                let n = self.scans.as_ref().map_or(0, |sb| sb.listed(flagged).len());
                match code {
                    KeyCode::Esc | KeyCode::Char('q') => {}
                    KeyCode::Up | KeyCode::Char('k') => {
                        sel = sel.saturating_sub(1);
                        self.popups.push(Popup::ScanList { sel, flagged });
                    }
                    KeyCode::Down | KeyCode::Char('j') => {
                        sel = (sel + 1).min(n.saturating_sub(1));
                        self.popups.push(Popup::ScanList { sel, flagged });
                    }
                    // Page keys move by the rows shown; Home and End go to
                    // the first and last scan.
                    KeyCode::PageUp => {
                        let page = usize::from(self.derived.list_page.get().max(1));
                        sel = sel.saturating_sub(page);
                        self.popups.push(Popup::ScanList { sel, flagged });
                    }
                    KeyCode::PageDown => {
                        let page = usize::from(self.derived.list_page.get().max(1));
                        sel = (sel + page).min(n.saturating_sub(1));
                        self.popups.push(Popup::ScanList { sel, flagged });
                    }
                    KeyCode::Home => {
                        self.popups.push(Popup::ScanList { sel: 0, flagged });
                    }
                    KeyCode::End => {
                        self.popups.push(Popup::ScanList {
                            sel: n.saturating_sub(1),
                            flagged,
                        });
                    }
                    KeyCode::Char('f') => {
                        // Keep the selected scan selected when it stays listed.
                        let cur = self
                            .scans
                            .as_ref()
                            .and_then(|sb| sb.listed(flagged).get(sel).copied());
                        let list = self
                            .scans
                            .as_ref()
                            .map_or(Vec::new(), |sb| sb.listed(!flagged));
                        let sel = cur
                            .and_then(|c| list.iter().position(|&i| i >= c))
                            .unwrap_or(0);
                        if list.is_empty() {
                            self.info("no scan has a flag");
                            self.popups.push(Popup::ScanList { sel: 0, flagged });
                        } else {
                            self.popups.push(Popup::ScanList {
                                sel,
                                flagged: !flagged,
                            });
                        }
                    }
                    KeyCode::Enter => {
                        if let Some(i) = self
                            .scans
                            .as_ref()
                            .and_then(|sb| sb.listed(flagged).get(sel).copied())
                        {
                            self.goto_scan(i);
                        }
                    }
                    _ => self.popups.push(Popup::ScanList { sel, flagged }),
                }
            }
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
                                        input: Field::with(t),
                                    });
                                }
                            }
                            Some(SetupRow::Goals) => self.open_goals(),
                            Some(SetupRow::Channels) => {
                                self.popups.push(Popup::Channels { sel: 0 })
                            }
                            Some(SetupRow::Title) => {
                                let t = self.book().map_or(String::new(), |b| b.title.clone());
                                self.popups.push(Popup::Text {
                                    title: "title of the workbook".into(),
                                    input: Field::with(t),
                                    purpose: TextFor::Title,
                                });
                            }
                            Some(SetupRow::Note) => {
                                let t = self.book().map_or(String::new(), |b| b.note.clone());
                                self.popups.push(Popup::Text {
                                    title:
                                        "note (what the workbook is for, where its data came from)"
                                            .into(),
                                    input: Field::with(t),
                                    purpose: TextFor::Note,
                                });
                            }
                            Some(r) => self.toggle_setup(r.clone()),
                            None => {}
                        }
                    }
                    _ => self.popups.push(Popup::Setup { sel }),
                }
            }
            Popup::SweepForm { fields, sel } => self.sweep_form_key(fields, sel, code, ctrl),
            Popup::Goals { sel } => self.goals_key(sel, code),
            Popup::Channels { sel } => self.channels_key(sel, code),
            Popup::ChannelForm { at, fields, sel } => {
                self.channel_form_key(at, fields, sel, code, ctrl)
            }
            Popup::GoalForm { index, fields, sel } => {
                self.goal_form_key(index, fields, sel, code, ctrl)
            }
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
            TextFor::SplitBypass(row) => self.make_split(row, input.trim()),
            TextFor::BleedStation(row) => self.make_bleed(row, input.trim()),
            TextFor::NewShaft(row) => self.new_shaft(row, input.trim()),
            TextFor::Title => {
                if let Some(mut nb) = self.book().cloned() {
                    nb.title = input.trim().to_string();
                    self.commit(nb, "title changed");
                }
            }
            TextFor::Note => {
                if let Some(mut nb) = self.book().cloned() {
                    nb.note = input.trim().to_string();
                    self.commit(nb, "note changed");
                }
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

    /// Rows of the set-up popup.
    pub fn setup_rows(&self) -> Vec<SetupRow> {
        let mut rows = vec![SetupRow::Title, SetupRow::Note, SetupRow::Condition];
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
            rows.push(SetupRow::Goals);
            rows.push(SetupRow::Channels);
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
            SetupRow::Given(_)
            | SetupRow::Title
            | SetupRow::Note
            | SetupRow::Goals
            | SetupRow::Channels => return,
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
    /// The workbook's title (Enter edits).
    Title,
    /// The workbook's note (Enter edits).
    Note,
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
    /// The goals (Enter lists them).
    Goals,
    /// The channel map (Enter lists it).
    Channels,
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
        StationStatus::Withheld(why) => Some(format!("no values shown: {why}")),
    }
}
