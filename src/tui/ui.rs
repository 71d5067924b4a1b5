//! Drawing: every view and popup from `&App`. Nothing here changes state.
//!
//! Given values (typed by the user, or set by a scan or a goal) carry a
//! `*` before the number and a bold attribute, explained in the grid's
//! unit row and in help;
//! values that could not be computed show `!!` (own process failed) or
//! `..` (blocked upstream); undefined ones show `-`. The selection has a `>`
//! marker as well as the reverse attribute, so none of this relies on colour.

use super::app::{
    App, Focus, Origin, PanelRow, Popup, ScanMark, SetupRow, View, choose_listed, scan_label,
    station_problem,
};
use super::keymap::COMMANDS;
use super::plot::{self, Series};
use crate::book::paths::STATION_KEYS;
use crate::engine::StationStatus;
use crate::present::{self, figure_meta, unit_label, with_unit};
use crate::units::{self, Quantity};
use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::{Color, Modifier, Style};
use ratatui::symbols::border;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders, Clear, Paragraph, Wrap};

/// Smallest usable terminal.
pub const MIN_SIZE: (u16, u16) = (64, 18);

/// The caution shown in help (and the README).
pub const CAUTION: &str = "Results are engineering estimates. They do not replace the facility's procedures, local codes or licensed engineering review; pressure, fuel, hot gas and rotating machinery can hurt people.";

const ASCII_BORDER: border::Set = border::Set {
    top_left: "+",
    top_right: "+",
    bottom_left: "+",
    bottom_right: "+",
    vertical_left: "|",
    vertical_right: "|",
    horizontal_top: "-",
    horizontal_bottom: "-",
};

struct Theme {
    ascii: bool,
    color: bool,
}

impl Theme {
    fn block<'a>(&self, title: impl Into<Line<'a>>) -> Block<'a> {
        let b = Block::default().borders(Borders::ALL).title(title);
        if self.ascii {
            b.border_set(ASCII_BORDER)
        } else {
            b.border_set(border::PLAIN)
        }
    }
    fn given(&self) -> Style {
        let s = Style::default().add_modifier(Modifier::BOLD);
        if self.color { s.fg(Color::Cyan) } else { s }
    }
    fn bad(&self) -> Style {
        if self.color {
            Style::default().fg(Color::Red)
        } else {
            Style::default().add_modifier(Modifier::BOLD)
        }
    }
    fn dim(&self) -> Style {
        if self.color {
            Style::default().fg(Color::DarkGray)
        } else {
            Style::default()
        }
    }
    fn sel(&self) -> Style {
        Style::default().add_modifier(Modifier::REVERSED)
    }
}

/// Draw the whole screen.
pub fn draw(f: &mut Frame, app: &App) {
    let area = f.area();
    let th = Theme {
        ascii: app.settings.ascii,
        color: app.settings.color,
    };
    if area.width < MIN_SIZE.0 || area.height < MIN_SIZE.1 {
        let msg = format!(
            "The terminal is {}x{}; stationwise needs at least {}x{}. Enlarge it (q quits).",
            area.width, area.height, MIN_SIZE.0, MIN_SIZE.1
        );
        f.render_widget(Paragraph::new(msg).wrap(Wrap { trim: true }), area);
        return;
    }
    // Nothing scrolls until a block says it does.
    app.derived.scroll_room.set((u16::MAX, 0));
    let (msg, err) = match (&app.status, station_problem(app)) {
        (Some((m, e)), _) => (m.clone(), *e),
        (None, Some(p)) => (p, true),
        (None, None) if app.engine.is_none() => {
            ("Up/Down choose, Enter opens, q quits".to_string(), false)
        }
        (None, None) => (
            "Tab panel  Enter edit  1-4 views  u units  c columns  q quit".to_string(),
            false,
        ),
    };
    // A long message (a problem, a refused value) gets a second line
    // rather than being cut at the edge.
    // A long message (a problem, a refused value) gets up to three lines,
    // wrapped at words, rather than being cut at the edge.
    let status_h = hang(&msg, area.width as usize, 0).len().clamp(1, 3) as u16;
    let [top, body, status] = Layout::vertical([
        Constraint::Length(1),
        Constraint::Min(5),
        Constraint::Length(status_h),
    ])
    .areas(area);
    f.render_widget(Paragraph::new(title_line(app)), top);
    if app.engine.is_some() {
        match app.view {
            View::Grid => grid_view(f, app, &th, body),
            View::Walk => walk_view(f, app, &th, body),
            View::Chart => chart_view(f, app, &th, body),
            View::Sweep => sweep_view(f, app, &th, body),
        }
    }
    let style = if err { th.bad() } else { Style::default() };
    f.render_widget(
        Paragraph::new(Span::styled(msg, style)).wrap(Wrap { trim: true }),
        status,
    );
    for p in &app.popups {
        popup(f, app, &th, p, body);
    }
    if th.ascii {
        ascii_only(f.buffer_mut());
    }
}

/// Plain ASCII drawing promises ASCII on screen: whatever text from the
/// engine or the workbook still has other characters (labels, explanations,
/// names) is replaced cell by cell.
fn ascii_only(b: &mut ratatui::buffer::Buffer) {
    for c in b.content.iter_mut() {
        if !c.symbol().is_ascii() {
            let s = match c.symbol() {
                "\u{b7}" | "\u{2022}" | "\u{25cf}" => "*",
                "\u{2013}" | "\u{2014}" | "\u{2212}" | "\u{2500}" => "-",
                "\u{2502}" => "|",
                "\u{b1}" => "~",
                "\u{b0}" => "o",
                _ => "?",
            };
            c.set_symbol(s);
        }
    }
}

fn title_line(app: &App) -> Line<'static> {
    let name = app
        .path
        .as_ref()
        .and_then(|p| p.file_name())
        .map_or("(untitled)".to_string(), |n| {
            n.to_string_lossy().to_string()
        });
    let star = if app.modified { " *" } else { "" };
    let view = match app.view {
        View::Grid => "grid",
        View::Walk => "walk",
        View::Chart => "T-s",
        View::Sweep => "sweep",
    };
    let units = match app.system {
        units::UnitSystem::Si => "SI",
        units::UnitSystem::Us => "US",
    };
    // Whose values are on screen is never left to the status line: a scan
    // that could not be applied says so in the title.
    let scan = app
        .scans
        .as_ref()
        .map_or(String::new(), |sb| match sb.shown {
            Some(s) if s == sb.at => format!(" scan {}/{}", sb.at + 1, sb.rows.len()),
            _ => format!(
                " scan {}/{} NOT APPLIED: values withheld",
                sb.at + 1,
                sb.rows.len()
            ),
        });
    Line::from(vec![
        Span::styled(
            " stationwise ",
            Style::default().add_modifier(Modifier::REVERSED),
        ),
        Span::raw(format!(
            " {name}{star}{scan}  view:{view}  {units}  cols:{}  ? help",
            app.columns.name()
        )),
    ])
}

fn key_meta(k: &str) -> (&'static str, Quantity) {
    STATION_KEYS
        .iter()
        .find(|(kk, _, _)| *kk == k)
        .map_or(("?", Quantity::Ratio), |(_, l, q)| (*l, *q))
}

const NAME_W: usize = 12;
const VIA_W: usize = 12;
const CELL_W: usize = 10;

fn fit(s: &str, w: usize) -> String {
    let n = s.chars().count();
    if n > w {
        s.chars().take(w.saturating_sub(1)).collect::<String>() + "~"
    } else {
        format!("{s:>w$}")
    }
}

/// A grid cell: right-aligned in CELL_W with at least one space before it,
/// so long labels or values never run into the column to their left.
fn cell(s: &str) -> String {
    cell_w(s, CELL_W)
}

/// A grid cell `w` wide.
fn cell_w(s: &str, w: usize) -> String {
    format!(" {}", fit(s, w - 1))
}

/// Width of a grid column: CELL_W, or its unit in brackets and a space.
fn col_width(key: &str, system: units::UnitSystem) -> usize {
    let (_, q) = key_meta(key);
    CELL_W.max(unit_label(q, system).chars().count() + 3)
}

/// The column's header in the grid: short enough for its cell, ASCII in
/// plain drawing.
fn grid_label(key: &str, label: &str, ascii: bool) -> String {
    match key {
        "flow_function" if ascii => "W.rtTt/Apt".into(),
        "flow_function" => "W\u{221a}Tt/Apt".into(),
        _ if ascii && !label.is_ascii() => key.into(),
        _ => label.into(),
    }
}

fn fit_left(s: &str, w: usize) -> String {
    let n = s.chars().count();
    if n > w {
        s.chars().take(w.saturating_sub(1)).collect::<String>() + "~"
    } else {
        format!("{s:<w$}")
    }
}

fn grid_view(f: &mut Frame, app: &App, th: &Theme, area: Rect) {
    let Some(e) = app.engine.as_ref() else {
        return;
    };
    let n = e.stations().len() as u16;
    let grid_h = (n + 4).min(area.height.saturating_sub(8)).max(5);
    let [ga, lower] =
        Layout::vertical([Constraint::Length(grid_h), Constraint::Min(3)]).areas(area);
    let keys = app.columns.keys();
    let unc = app.uncertainties();
    let pm = if th.ascii { "+/-" } else { "\u{b1}" };
    let inner_w = ga.width.saturating_sub(2) as usize;
    let sel_key = keys[app.col.min(keys.len() - 1)];
    // Each column as wide as its unit needs (at least CELL_W); the
    // uncertainty column beside the selected one takes a cell too.
    let width_of = |k: &str| {
        let w = col_width(k, app.system);
        if unc.is_some() && k == sel_key {
            w + CELL_W
        } else {
            w
        }
    };
    // Station and process names as wide as they are (up to 20), where the
    // screen has room for them beside at least five value columns.
    let longest_station = e
        .stations()
        .iter()
        .map(|s| s.name.chars().count())
        .max()
        .unwrap_or(0);
    let longest_process = e
        .book()
        .processes
        .iter()
        .map(|p| p.name.chars().count())
        .max()
        .unwrap_or(0);
    let want_name = (longest_station + 3).clamp(NAME_W, 20);
    let want_via = (longest_process + 2).clamp(VIA_W, 22);
    let spare = inner_w.saturating_sub(NAME_W + VIA_W + 2 + 5 * CELL_W);
    let grow_name = (want_name - NAME_W).min(spare);
    let grow_via = (want_via - VIA_W).min(spare - grow_name);
    let (name_w, via_w) = (NAME_W + grow_name, VIA_W + grow_via);
    let room = inner_w.saturating_sub(name_w + via_w + 2);
    let col = app.col.min(keys.len() - 1);
    // The first column shown: as far left as lets the selected one fit.
    let mut first = col;
    let mut used = width_of(keys[col]);
    while first > 0 && used + width_of(keys[first - 1]) <= room {
        first -= 1;
        used += width_of(keys[first]);
    }
    let mut shown: Vec<&str> = Vec::new();
    let mut used = 0;
    for k in keys.iter().skip(first) {
        if !shown.is_empty() && used + width_of(k) > room {
            break;
        }
        used += width_of(k);
        shown.push(k);
    }
    let mut lines = Vec::new();
    let mut head = format!(
        "  {}{}",
        fit_left("station", name_w - 2),
        fit_left(" via", via_w)
    );
    // The legend of the given mark, where the unit row has room.
    let mut unit_row = fit_left(&format!("  {GIVEN_MARK} given"), name_w + via_w);
    for k in &shown {
        let (label, q) = key_meta(k);
        // Plain ASCII drawing: a label with other characters ("W√Tt/(A p)")
        // falls back to a plain one.
        let label = grid_label(k, label, th.ascii);
        let u = unit_label(q, app.system);
        let u = if u.is_empty() {
            String::new()
        } else {
            format!("[{u}]")
        };
        let w = col_width(k, app.system);
        head.push_str(&cell_w(&label, w));
        unit_row.push_str(&cell_w(&u, w));
        if unc.is_some() && *k == sel_key {
            head.push_str(&cell(&format!("{pm}{label}")));
            unit_row.push_str(&cell(&format!("{u} 95%")));
        }
    }
    lines.push(Line::from(Span::styled(
        head,
        Style::default().add_modifier(Modifier::BOLD),
    )));
    lines.push(Line::from(Span::styled(unit_row, th.dim())));
    let visible = (ga.height as usize).saturating_sub(4);
    let skip = if app.row >= visible {
        app.row + 1 - visible
    } else {
        0
    };
    for (i, s) in e.stations().iter().enumerate().skip(skip).take(visible) {
        let sel = i == app.row;
        let p = &e.book().processes[e.producer_of(i)];
        let status = e.station_status(i);
        let marker = if sel { "> " } else { "  " };
        // The selected row: its marker, its name and process underlined
        // and the selected cell reversed (values are not underlined: a
        // cursor move then redraws two names, not two rows of numbers).
        let mut spans = vec![
            Span::raw(marker),
            Span::styled(
                format!(
                    "{}{}",
                    fit_left(&s.name, name_w - 2),
                    fit_left(&format!(" {}", p.name), via_w)
                ),
                if sel {
                    Style::default().add_modifier(Modifier::UNDERLINED)
                } else {
                    Style::default()
                },
            ),
        ];
        for (ci, k) in shown.iter().enumerate() {
            let (_, q) = key_meta(k);
            let given = app.cell_given(i, k).is_some();
            let text = match status {
                StationStatus::Ok(v) => match e.station_key(v, k) {
                    Some(x) => {
                        let shownv = present::shown(x, q, app.system);
                        let t = crate::report::sig(shownv, 5);
                        if given { format!("{GIVEN_MARK}{t}") } else { t }
                    }
                    None => "-".to_string(),
                },
                StationStatus::Failed(_) => "!!".to_string(),
                StationStatus::Blocked(_) => "..".to_string(),
                StationStatus::Withheld(_) => "xx".to_string(),
            };
            let mut style = match status {
                StationStatus::Ok(_) if given => th.given(),
                StationStatus::Ok(_) => Style::default(),
                _ => th.bad(),
            };
            if sel && app.focus == Focus::Grid && first + ci == app.col {
                style = style.add_modifier(Modifier::REVERSED);
            }
            spans.push(Span::styled(cell_w(&text, col_width(k, app.system)), style));
            if let Some(u) = unc.as_ref().filter(|_| *k == sel_key) {
                let t = u
                    .get(&format!("station.{}.{k}", s.name))
                    .map_or("-".to_string(), |u| {
                        crate::report::sig(span_of(u.u95, q, app.system), 3)
                    });
                spans.push(Span::styled(cell(&t), th.dim()));
            }
        }
        lines.push(Line::from(spans));
    }
    let n_st = e.stations().len();
    let rows_note = if n_st > visible {
        format!(
            ", rows {}-{} of {n_st}",
            skip + 1,
            (skip + visible).min(n_st)
        )
    } else {
        String::new()
    };
    // What is shown, counted as the user sees it: value columns of the
    // set, plus the uncertainty column when there is one.
    let title_with = |hint: &str| {
        format!(
            " stations (columns {}-{} of {}{}{hint}{rows_note}) ",
            first + 1,
            first + shown.len(),
            keys.len(),
            if unc.is_some() {
                format!(", {pm}95% of {}", key_meta(sel_key).0)
            } else {
                String::new()
            },
        )
    };
    // The scroll hint goes first when the title would not fit whole.
    let mut title = title_with(if keys.len() > shown.len() {
        ", Left/Right scroll"
    } else {
        ""
    });
    if title.chars().count() + 2 > ga.width as usize {
        title = title_with("");
    }
    f.render_widget(Paragraph::new(lines).block(th.block(title)), ga);
    let [pa, sa] =
        Layout::horizontal([Constraint::Percentage(62), Constraint::Percentage(38)]).areas(lower);
    panel(f, app, th, pa, unc.as_ref());
    summary(f, app, th, sa, unc.as_ref().zip(app.uncertainty_path()));
}

fn given_line(app: &App, path: &str) -> Option<(String, String)> {
    let b = app.book()?;
    let (q, g) = b.given(path)?;
    let text = g.text();
    let field = path.rsplit('.').next().unwrap_or(path).to_string();
    let shown = with_unit(g.si(), q, app.system);
    // A scan, goal or sweep sets the value in use apart from the file's
    // text: say which, and for a scan its raw readings.
    let value = match app.origin(path) {
        Origin::Typed
            if text.trim() == shown.trim() || matches!(q, Quantity::Ratio | Quantity::Mach) =>
        {
            text.to_string()
        }
        // A gauge reading: the absolute value and the barometer it is from.
        Origin::Typed if g.gauge().is_some() => format!(
            "{text}  ({shown}: barometer {} + reading)",
            b.barometer()
                .map_or("?".into(), |p| with_unit(p, Quantity::Pressure, app.system))
        ),
        Origin::Typed => format!("{text}  ({shown})"),
        Origin::Scan(label, cells, unit) => {
            let raw: Vec<String> = cells.iter().map(|(c, v)| format!("{c} {v}")).collect();
            format!(
                "{shown}  ({label}: {} {unit}; file: {text})",
                raw.join(", ")
            )
        }
        Origin::Withheld(why) => format!("xx  ({why}; file: {text})"),
        Origin::Goal(k) => format!("{shown}  (set by goal {k}; file: {text})"),
        Origin::Varied => format!("{shown}  (varied; file: {text})"),
    };
    Some((field, value))
}

type UncMap = std::collections::HashMap<String, crate::reduce::Uncertainty>;

fn panel(f: &mut Frame, app: &App, th: &Theme, area: Rect, unc: Option<&UncMap>) {
    let Some(e) = app.engine.as_ref() else {
        return;
    };
    let Some(st) = e.stations().get(app.row) else {
        return;
    };
    let p = &e.book().processes[e.producer_of(app.row)];
    let mut lines = vec![Line::from(Span::styled(
        crate::kinds::of(&p.kind).mode_label().to_string(),
        th.dim(),
    ))];
    // Why the station is not computed, whole (the status line may cut it).
    if let Some(problem) = station_problem(app) {
        lines.push(Line::from(Span::styled(problem, th.bad())));
    }
    let rows = app.panel_rows();
    let mut keep = None;
    for (i, r) in rows.iter().enumerate() {
        let sel = app.focus == Focus::Panel && i == app.panel;
        let marker = if sel { ">" } else { " " };
        let (text, style) = match r {
            PanelRow::Given(path) => match given_line(app, path) {
                Some((field, val)) => {
                    // Whose given it is, when not the process's own.
                    let owner = if path.starts_with("station.") {
                        format!("[station {}]", st.name)
                    } else if let Some(rest) = path.strip_prefix("shaft.") {
                        format!("[shaft {}]", rest.rsplit_once('.').map_or(rest, |(n, _)| n))
                    } else {
                        String::new()
                    };
                    (
                        format!("{marker} {:<14} = {val} {owner}", field),
                        th.given(),
                    )
                }
                None => continue,
            },
            PanelRow::Statics => (
                format!(
                    "{marker} static state   : {} (Enter picks)",
                    match &st.statics {
                        None => "not fixed here",
                        Some(crate::book::Statics::Mach(_)) => "by Mach number",
                        Some(crate::book::Statics::Pressure(_)) => "by static pressure",
                        Some(crate::book::Statics::Velocity(_)) => "by velocity",
                        Some(crate::book::Statics::Area(_)) => "by area",
                    }
                ),
                Style::default(),
            ),
            PanelRow::Shaft => (
                format!(
                    "{marker} shaft          : {} (Enter picks)",
                    crate::kinds::of(&p.kind).shaft().unwrap_or("none")
                ),
                Style::default(),
            ),
            PanelRow::ShaftOptional(what) => {
                let has = crate::kinds::of(&p.kind)
                    .shaft()
                    .and_then(|s| e.book().shafts.iter().find(|x| x.name == s))
                    .is_some_and(|sh| match *what {
                        "offtake" => sh.offtake.is_some(),
                        _ => sh.speed.is_some(),
                    });
                (
                    format!(
                        "{marker} shaft {what:<8} : {}",
                        if has {
                            "given (Enter removes)"
                        } else {
                            "none (Enter adds)"
                        }
                    ),
                    Style::default(),
                )
            }
            PanelRow::Figure(k) => {
                let Some(v) = e.process(&p.name).and_then(|r| {
                    r.figures
                        .iter()
                        .find(|(fk, _)| *fk == k.as_str())
                        .map(|x| x.1)
                }) else {
                    continue;
                };
                let (label, q) = figure_meta(k);
                let pm = unc
                    .and_then(|m| m.get(&format!("process.{}.{k}", p.name)))
                    .map_or(String::new(), |u| {
                        let unit = unit_label(q, app.system);
                        format!(
                            " {} {}{}",
                            if th.ascii { "+/-" } else { "\u{b1}" },
                            crate::report::sig(span_of(u.u95, q, app.system), 3),
                            if unit.is_empty() {
                                String::new()
                            } else {
                                format!(" {unit}")
                            }
                        )
                    });
                (
                    format!("{marker} {label:<22} {}{pm}", with_unit(v, q, app.system)),
                    Style::default(),
                )
            }
            PanelRow::Branch => (
                format!(
                    "{marker} branch         : {} (Enter toggles)",
                    match st.branch {
                        Some(crate::flow::Branch::Supersonic) => "supersonic",
                        _ => "subsonic",
                    }
                ),
                Style::default(),
            ),
        };
        if sel {
            keep = Some(lines.len());
        }
        lines.push(Line::from(Span::styled(
            text,
            if sel { style.patch(th.sel()) } else { style },
        )));
    }
    let kind = crate::kinds::of(&p.kind).name();
    let tab = if app.focus == Focus::Panel {
        "(Tab: grid) "
    } else {
        "(Tab: edit) "
    };
    // The longest title that fits: the Tab hint, then the kind go first.
    let title = fit_title(
        &[
            format!(" into {}: {kind} \"{}\" {tab}", st.name, p.name),
            format!(" into {}: {kind} \"{}\" ", st.name, p.name),
            format!(" into {}: \"{}\" ", st.name, p.name),
            format!(" into {} ", st.name),
        ],
        area.width,
    );
    let (lines, more) = window(app, lines, area, Some(app.scroll as usize), keep);
    // The keys that change the process stay in one place in the border
    // (nothing to redraw when the next station is shown).
    f.render_widget(
        Paragraph::new(lines).block(
            th.block(title)
                .title_bottom(Line::from(" m mode  K kind ").left_aligned())
                .title_bottom(Line::from(more).right_aligned()),
        ),
        area,
    );
}

/// A block that scrolls with the page keys shows `page` lines and can go
/// `max` lines down: the page keys move by the smallest page and stop at
/// the furthest end of this frame's blocks.
fn scrolls(app: &App, page: usize, max: usize) {
    let (p, m) = app.derived.scroll_room.get();
    let page = page.min(u16::MAX as usize) as u16;
    let max = max.min(u16::MAX as usize) as u16;
    app.derived.scroll_room.set((p.min(page), m.max(max)));
}

/// The first of `titles` (longest first) that fits a block `width` wide
/// with a border cell left at each end; the last one otherwise.
fn fit_title(titles: &[String], width: u16) -> String {
    titles
        .iter()
        .find(|t| t.chars().count() + 4 <= width as usize)
        .or(titles.last())
        .cloned()
        .unwrap_or_default()
}

/// Lines wrapped to the inside of `area` (a continuation indented by two),
/// then the part that fits: from `scroll` down (page keys; `None` for a
/// list that only follows its selection), moved so that line `keep`
/// (before wrapping) is shown while nothing is scrolled. When not all fit,
/// the second value says which lines are shown and how to scroll, for the
/// block's border.
fn window(
    app: &App,
    lines: Vec<Line<'static>>,
    area: Rect,
    scroll: Option<usize>,
    keep: Option<usize>,
) -> (Vec<Line<'static>>, String) {
    let width = area.width.saturating_sub(2) as usize;
    let height = area.height.saturating_sub(2) as usize;
    let mut out: Vec<Line<'static>> = Vec::new();
    let mut keep_at = None;
    for (i, l) in lines.into_iter().enumerate() {
        if Some(i) == keep {
            keep_at = Some(out.len());
        }
        let text: String = l.spans.iter().map(|s| s.content.as_ref()).collect();
        if text.chars().count() <= width || l.spans.len() != 1 {
            out.push(l);
            continue;
        }
        let style = l.spans[0].style.patch(l.style);
        // Keep the line's own indent; continuations two further in.
        let lead = text
            .chars()
            .take_while(|c| *c == ' ')
            .count()
            .min(width / 2);
        for (j, part) in hang(text.trim_start(), width, lead + 2)
            .into_iter()
            .enumerate()
        {
            let part = if j == 0 {
                format!("{}{}", " ".repeat(lead), part.trim_start())
            } else {
                part
            };
            out.push(Line::from(Span::styled(part, style)));
        }
    }
    let n = out.len();
    if n <= height || height == 0 {
        return (out, String::new());
    }
    // A list that follows its selection (no page scroll) is not counted.
    let paged = scroll.is_some();
    let scroll = match scroll {
        Some(s) => {
            scrolls(app, height, n - height);
            s
        }
        None => 0,
    };
    let mut top = scroll.min(n - height);
    // The selected line is kept in view until a page key scrolls away.
    if let Some(k) = keep_at.filter(|_| scroll == 0) {
        if k < top {
            top = k;
        } else if k >= top + height {
            top = k + 1 - height;
        }
    }
    let shown: Vec<Line<'static>> = out.into_iter().skip(top).take(height).collect();
    let up = if top > 0 { " ^" } else { "" };
    let down = top + height < n;
    let long = format!(
        " lines {}-{} of {n}{up}{} ",
        top + 1,
        top + height,
        match (paged, down) {
            (true, true) => " v PgDn",
            (true, false) => " PgUp",
            (false, true) => " v",
            (false, false) => "",
        }
    );
    // A narrow block keeps the count and the arrows, whole.
    let short = format!(
        " {}-{} of {n}{up}{} ",
        top + 1,
        top + height,
        if down { " v" } else { "" }
    );
    let more = fit_title(&[long, short], area.width);
    (shown, more)
}

fn summary(f: &mut Frame, app: &App, th: &Theme, area: Rect, unc: Option<(&UncMap, String)>) {
    let Some(e) = app.engine.as_ref() else {
        return;
    };
    let mut lines = Vec::new();
    if let Some((m, path)) = unc {
        match m.get(&path) {
            Some(u) => lines.extend(uncertainty_lines(app, th, &path, u)),
            None => lines.push(Line::from(format!("{path}: no uncertainty"))),
        }
    }
    // Values whole; a label too long for its line goes on a line of its
    // own above the value, never cut.
    let inner = area.width.saturating_sub(2) as usize;
    let entries: Vec<(String, String)> = present::summary_lines(e)
        .into_iter()
        .map(|l| (l.label, with_unit(l.value, l.quantity, app.system)))
        .collect();
    // A rig's component figures ("combustor: pt loss") under one heading
    // per component.
    let mut group: Option<String> = None;
    for (label, value) in entries {
        let label = match label.split_once(": ") {
            Some((g, rest)) => {
                if group.as_deref() != Some(g) {
                    lines.push(Line::from(Span::styled(
                        g.to_string(),
                        Style::default().add_modifier(Modifier::BOLD),
                    )));
                    group = Some(g.to_string());
                }
                format!(" {rest}")
            }
            None => {
                group = None;
                label
            }
        };
        let (l, v) = (label.chars().count(), value.chars().count());
        if l + 1 + v <= inner {
            lines.push(Line::from(format!("{label}{value:>w$}", w = inner - l)));
        } else {
            lines.push(Line::from(label));
            lines.push(Line::from(format!("{value:>inner$}")));
        }
    }
    for s in &e.book().shafts {
        if let Some(b) = e.shaft(&s.name) {
            lines.push(Line::from(format!(
                "shaft {}: {}",
                s.name,
                with_unit(b.compressor_power, Quantity::Power, app.system)
            )));
        }
    }
    for n in e.notes() {
        lines.push(Line::from(format!("note, {}: {}", n.place, n.message)));
    }
    let problems = e.problems();
    if !problems.is_empty() {
        lines.push(Line::from(Span::styled(
            format!("{} problem(s):", problems.len()),
            th.bad(),
        )));
        for p in problems.iter().take(4) {
            lines.push(Line::from(Span::styled(format!(" {}", p.place), th.bad())));
        }
    }
    let (lines, more) = window(app, lines, area, Some(app.scroll as usize), None);
    f.render_widget(
        Paragraph::new(lines).block(
            th.block(" summary ")
                .title_bottom(Line::from(more).right_aligned()),
        ),
        area,
    );
}

/// A value in display units as a difference (an uncertainty, a
/// sensitivity's scale): no offset of a temperature scale.
fn span_of(si: f64, q: Quantity, system: units::UnitSystem) -> f64 {
    present::shown(si, q, system) - present::shown(0.0, q, system)
}

/// The uncertainty of the selected value: expanded (95 %, k = 2) with its
/// systematic and random standard parts, then each input that matters,
/// by name, with its share of the variance and its sensitivity.
fn uncertainty_lines(
    app: &App,
    th: &Theme,
    path: &str,
    u: &crate::reduce::Uncertainty,
) -> Vec<Line<'static>> {
    let sys = app.system;
    let q = present::quantity(path);
    let uy = unit_label(q, sys);
    let pm = if th.ascii { "+/-" } else { "\u{b1}" };
    let what = match path.split('.').collect::<Vec<_>>().as_slice() {
        ["station", name, key] => format!("{} at {name}", key_meta(key).0),
        ["process", name, key] => format!("{name}: {}", figure_meta(key).0),
        _ => path.to_string(),
    };
    let mut out = vec![Line::from(Span::styled(
        format!(
            "{what} {pm} {} {uy} (95 %, k = 2)",
            crate::report::sig(span_of(u.u95, q, sys), 3)
        ),
        Style::default().add_modifier(Modifier::BOLD),
    ))];
    out.push(Line::from(format!(
        " systematic {} {uy}, random {} {uy} (standard)",
        crate::report::sig(span_of(u.systematic, q, sys), 3),
        crate::report::sig(span_of(u.random, q, sys), 3)
    )));
    for p in u.parts.iter().take(4).filter(|p| p.share > 0.0) {
        // The input's quantity: the given it feeds (the barometer's is a
        // pressure).
        let qx = app
            .book()
            .and_then(|b| b.given(&p.path))
            .map_or(Quantity::Pressure, |(q, _)| q);
        let ux = unit_label(qx, sys);
        let scale_x = span_of(1.0, qx, sys);
        let theta = if scale_x != 0.0 {
            p.sensitivity * span_of(1.0, q, sys) / scale_x
        } else {
            p.sensitivity
        };
        let per = match (uy.is_empty(), ux.is_empty()) {
            (true, true) => String::new(),
            (false, true) => format!(" {uy}"),
            (true, false) => format!(" per {ux}"),
            (false, false) => format!(" {uy} per {ux}"),
        };
        out.push(Line::from(format!(
            " {:>3.0} % {}: sensitivity {}{per}",
            p.share * 100.0,
            p.name,
            crate::report::sig(theta, 3)
        )));
    }
    out
}

fn walk_view(f: &mut Frame, app: &App, th: &Theme, area: Rect) {
    let Some(e) = app.engine.as_ref() else {
        return;
    };
    let [la, ra] = Layout::horizontal([Constraint::Length(20), Constraint::Min(20)]).areas(area);
    let mut lines = Vec::new();
    for (i, s) in e.stations().iter().enumerate() {
        let mark = match e.station_status(i) {
            StationStatus::Ok(_) => " ",
            StationStatus::Failed(_) => "!",
            StationStatus::Blocked(_) => ".",
            StationStatus::Withheld(_) => "x",
        };
        let here = i == app.row && !app.walk_summary;
        let text = format!("{}{mark}{}", if here { ">" } else { " " }, s.name);
        let style = if here { th.sel() } else { Style::default() };
        lines.push(Line::from(Span::styled(text, style)));
    }
    // After the stations, the summary: how each of its figures was obtained.
    let n = e.stations().len();
    let on_summary = app.walk_summary;
    lines.push(Line::from(Span::styled(
        format!("{} summary", if on_summary { ">" } else { " " }),
        if on_summary { th.sel() } else { th.dim() },
    )));
    let (lines, more) = window(
        app,
        lines,
        la,
        None,
        Some(if on_summary { n } else { app.row }),
    );
    f.render_widget(
        Paragraph::new(lines).block(
            th.block(" flow path ")
                .title_bottom(Line::from(more).right_aligned()),
        ),
        la,
    );
    let body: Vec<Line<'static>> = if on_summary {
        present::summary_explanation(e, app.system)
            .into_iter()
            .map(Line::from)
            .collect()
    } else {
        let name = e
            .stations()
            .get(app.row)
            .map_or(String::new(), |s| s.name.clone());
        match app.explanation(&name) {
            Ok(ls) => ls.into_iter().map(Line::from).collect(),
            Err(m) => vec![Line::from(Span::styled(
                format!("station {name}: {m}"),
                th.bad(),
            ))],
        }
    };
    let (body, more) = window(app, body, ra, Some(app.scroll as usize), None);
    f.render_widget(
        Paragraph::new(body).block(
            th.block(fit_title(
                &[
                    " how each value was obtained (Up/Down station, PgUp/PgDn scroll) ".into(),
                    " how each value was obtained ".into(),
                    " how obtained ".into(),
                ],
                ra.width,
            ))
            .title_bottom(Line::from(more).right_aligned()),
        ),
        ra,
    );
}

fn chart_view(f: &mut Frame, app: &App, th: &Theme, area: Rect) {
    let Some(e) = app.engine.as_ref() else {
        return;
    };
    let sys = app.system;
    let to_shown = |(s, t): (f64, f64)| {
        (
            present::shown(s, Quantity::SpecificHeat, sys),
            present::shown(t, Quantity::Temperature, sys),
        )
    };
    let mut pts = Vec::new();
    let mut labels = Vec::new();
    let names: Vec<String> = e.stations().iter().map(|s| s.name.clone()).collect();
    let value = |i: usize| match e.station_status(i) {
        StationStatus::Ok(v) => Some(v),
        _ => None,
    };
    for (i, s) in e.stations().iter().enumerate() {
        let v = value(i);
        match v.and_then(|v| Some((e.entropy_of(v)?, v.tt))) {
            Some(p) => pts.push(to_shown(p)),
            None => pts.push((f64::NAN, f64::NAN)),
        }
        labels.push(s.name.as_str());
    }
    // Each process along its path between the stations it joins (the
    // second stream of a mixer or split too).
    let mut pairs = Vec::new();
    for p in &e.book().processes {
        let to = names.iter().position(|n| *n == p.to);
        let from = p
            .from
            .as_ref()
            .and_then(|f| names.iter().position(|n| n == f));
        if let (Some(a), Some(b)) = (from, to) {
            pairs.push((a, b));
        }
        let kind = crate::kinds::of(&p.kind);
        if let Some(second) = kind.second_input()
            && let (Some(a), Some(b)) = (names.iter().position(|n| *n == second), to)
        {
            pairs.push((a, b));
        }
        if let Some(second) = kind.second_output()
            && let (Some(a), Some(b)) = (from, names.iter().position(|n| *n == second))
        {
            pairs.push((a, b));
        }
    }
    let mut paths = Vec::new();
    for (a, b) in pairs {
        if let (Some(va), Some(vb)) = (value(a), value(b)) {
            let path: Vec<(f64, f64)> = e
                .ts_path(va, vb, 24)
                .into_iter()
                .map(|p| p.map_or((f64::NAN, f64::NAN), to_shown))
                .collect();
            paths.push(path);
        }
    }
    // A few isobars of the ambient air for orientation: round pressures
    // spanning the stations' total pressures.
    let (mut pmin, mut pmax, mut tmin, mut tmax) = (f64::INFINITY, 0.0f64, f64::INFINITY, 0.0f64);
    for i in 0..names.len() {
        if let Some(v) = value(i) {
            pmin = pmin.min(v.pt);
            pmax = pmax.max(v.pt);
            tmin = tmin.min(v.tt);
            tmax = tmax.max(v.tt);
        }
    }
    let mut guides = Vec::new();
    if pmax > 0.0 && tmax > tmin {
        for (p, label) in isobar_pressures(pmin, pmax, sys) {
            let line: Vec<(f64, f64)> = e
                .isobar(p, tmin, tmax, 24)
                .into_iter()
                .map(|q| q.map_or((f64::NAN, f64::NAN), to_shown))
                .collect();
            guides.push(plot::Guide {
                points: line,
                label,
            });
        }
    }
    // (In ASCII a station is #: * marks a given in the grid.)
    let mark = if th.ascii { '#' } else { '\u{25cf}' };
    let series = [Series {
        polylines: paths,
        labels,
        ..Series::points(pts, mark)
    }];
    let inner = Rect {
        x: area.x + 1,
        y: area.y + 1,
        width: area.width.saturating_sub(2),
        height: area.height.saturating_sub(2),
    };
    let lines = plot::render_with(
        &series,
        &guides,
        inner.width as usize,
        inner.height as usize,
        th.ascii,
        &format!(
            "entropy s [{}] from 298.15 K, 101.325 kPa",
            unit_label(Quantity::SpecificHeat, sys)
        ),
        &format!(
            "total temperature Tt [{}]; {} process paths, : isobars of air",
            unit_label(Quantity::Temperature, sys),
            if th.ascii { "o" } else { "\u{2218}" }
        ),
    );
    f.render_widget(
        Paragraph::new(lines.into_iter().map(Line::from).collect::<Vec<_>>())
            .block(th.block(" Tt-s diagram of the stations ")),
        area,
    );
}

/// Up to four round pressures (1, 2 or 5 times a power of ten in the
/// display unit) between the lowest and highest total pressure, ends
/// included where they are round already.
fn isobar_pressures(pmin: f64, pmax: f64, sys: units::UnitSystem) -> Vec<(f64, String)> {
    let scale = span_of(1.0, Quantity::Pressure, sys);
    if !(scale > 0.0 && pmin > 0.0 && pmax >= pmin) {
        return Vec::new();
    }
    let (lo, hi) = (pmin * scale, pmax * scale);
    let mut round: Vec<(f64, String)> = Vec::new();
    let mut k = lo.log10().floor() as i32 - 1;
    while round.len() < 64 && 10f64.powi(k) <= hi * 10.0 {
        for m in [1u32, 2, 5] {
            let v = f64::from(m) * 10f64.powi(k);
            // The round pressure just below the lowest (ambient, say) too.
            if v >= lo * 0.8 && v <= hi * 1.001 {
                // Written as the round number it is: "200", "0.5".
                let text = if k >= 0 {
                    format!("{}", m as u64 * 10u64.pow(k as u32))
                } else {
                    format!("{:.*}", (-k) as usize, v)
                };
                round.push((v, text));
            }
        }
        k += 1;
    }
    // Spread: at most four, evenly through the list.
    let n = round.len();
    let pick: Vec<(f64, String)> = if n <= 4 {
        round
    } else {
        (0..4).map(|i| round[i * (n - 1) / 3].clone()).collect()
    };
    let unit = unit_label(Quantity::Pressure, sys);
    pick.into_iter()
        .map(|(v, t)| (v / scale, format!("{t} {unit}")))
        .collect()
}

/// An axis label with its unit in brackets (none for plain numbers).
fn labelled(name: &str, unit: impl AsRef<str>) -> String {
    match unit.as_ref() {
        "" => name.to_string(),
        u => format!("{name} [{u}]"),
    }
}

fn sweep_view(f: &mut Frame, app: &App, th: &Theme, area: Rect) {
    let Some(sw) = &app.sweep else {
        f.render_widget(
            Paragraph::new("No sweep yet: press 4 to set one up.").block(th.block(" sweep ")),
            area,
        );
        return;
    };
    let sys = app.system;
    let [ca, ta] =
        Layout::horizontal([Constraint::Percentage(58), Constraint::Percentage(42)]).areas(area);
    let given_q = |p: &str| {
        app.book()
            .and_then(|b| b.given(p).map(|(q, _)| q))
            .unwrap_or(Quantity::Ratio)
    };
    let qv = given_q(&sw.vary);
    let qr = present::quantity(&sw.report[0]);
    // The carpet's lines: one per value of the second given.
    let seconds: Vec<Option<f64>> = match &sw.second {
        Some((_, xs)) => xs.iter().map(|x| Some(*x)).collect(),
        None => vec![None],
    };
    let n1 = sw.rows.len() / seconds.len().max(1);
    let q2 = sw.second.as_ref().map(|(p, _)| given_q(p));
    let mut pts = Vec::new();
    let mut segs = Vec::new();
    let mut labels: Vec<String> = Vec::new();
    for (j, x2) in seconds.iter().enumerate() {
        for (k, (x, ys)) in sw.rows.iter().skip(j * n1).take(n1).enumerate() {
            pts.push((
                present::shown(*x, qv, sys),
                ys[0].map_or(f64::NAN, |y| present::shown(y, qr, sys)),
            ));
            if k > 0 {
                segs.push((pts.len() - 2, pts.len() - 1));
            }
            // Each carpet line is labelled with its second value at its end.
            let last = k + 1 == n1;
            labels.push(match (x2, q2, last) {
                (Some(v), Some(q), true) => crate::report::sig(present::shown(*v, q, sys), 5),
                _ => String::new(),
            });
        }
    }
    // A point that could not be computed is marked on the x axis.
    let failed: Vec<f64> = sw
        .rows
        .iter()
        .filter(|(_, ys)| ys[0].is_none())
        .map(|(x, _)| present::shown(*x, qv, sys))
        .collect();
    let mark = if th.ascii { '*' } else { '\u{25cf}' };
    let inner_w = ca.width.saturating_sub(2) as usize;
    let inner_h = ca.height.saturating_sub(2) as usize;
    let lines = plot::render(
        &[Series {
            segments: segs,
            failed: failed.clone(),
            labels: labels.iter().map(String::as_str).collect(),
            ..Series::points(pts, mark)
        }],
        inner_w,
        inner_h,
        th.ascii,
        &labelled(&sw.vary, unit_label(qv, sys)),
        &labelled(&sw.report[0], unit_label(qr, sys)),
    );
    let mut title = match (&sw.second, q2) {
        (Some((p, _)), Some(q)) => format!(
            " carpet: first reported value, a line per {} ",
            labelled(p, unit_label(q, sys))
        ),
        _ => " sweep: first reported value (Enter: change) ".to_string(),
    };
    if !failed.is_empty() {
        title.push_str(&format!("{} failed (x) ", failed.len()));
    }
    let short = match &sw.second {
        Some((p, _)) => format!(" carpet: a line per {} ", p.rsplit('.').next().unwrap_or(p)),
        None => " sweep ".into(),
    };
    let fallback = if sw.second.is_some() {
        " carpet "
    } else {
        " sweep "
    };
    f.render_widget(
        Paragraph::new(lines.into_iter().map(Line::from).collect::<Vec<_>>())
            .block(th.block(fit_title(&[title, short, fallback.into()], ca.width))),
        ca,
    );
    // The table: the varied value(s), then the reported values from the
    // first one scrolled to (Left/Right) as many as fit.
    let field = |p: &str| p.rsplit('.').next().unwrap_or(p).to_string();
    let unit = |q: Quantity| {
        let u = unit_label(q, sys);
        if u.is_empty() {
            String::new()
        } else {
            format!("[{u}]")
        }
    };
    let inner = ta.width.saturating_sub(2) as usize;
    let mut lead_w = 10;
    // Each heading keeps a blank before it (long field names are cut
    // with ~, never run into the next).
    let cell = |t: &str, w: usize| format!(" {}", fit(t, w - 1));
    let mut head = cell(&field(&sw.vary), 10);
    let mut units_row = cell(&unit(qv), 10);
    if let (Some((p2, _)), Some(q)) = (&sw.second, q2) {
        head.push_str(&cell(&field(p2), 10));
        units_row.push_str(&cell(&unit(q), 10));
        lead_w += 10;
    }
    let fit_n = (inner.saturating_sub(lead_w) / 11).max(1);
    let first_col = app.sweep_col.min(sw.report.len().saturating_sub(1));
    let cols: Vec<usize> = (first_col..sw.report.len()).take(fit_n).collect();
    for &c in &cols {
        head.push_str(&cell(&field(&sw.report[c]), 11));
        units_row.push_str(&cell(&unit(present::quantity(&sw.report[c])), 11));
    }
    let mut tl = vec![
        Line::from(Span::styled(
            head,
            Style::default().add_modifier(Modifier::BOLD),
        )),
        Line::from(Span::styled(units_row, th.dim())),
    ];
    let room = (ta.height as usize).saturating_sub(4);
    if sw.rows.len() > room {
        scrolls(app, room, sw.rows.len() - room);
    }
    let first = (app.scroll as usize).min(sw.rows.len().saturating_sub(room));
    for (i, (x, ys)) in sw.rows.iter().enumerate().skip(first).take(room) {
        let mut l = fit(&crate::report::sig(present::shown(*x, qv, sys), 5), 10);
        if let (Some((_, xs)), Some(q)) = (&sw.second, q2) {
            let x2 = xs.get(i / n1.max(1)).copied().unwrap_or(f64::NAN);
            l.push_str(&fit(&crate::report::sig(present::shown(x2, q, sys), 5), 10));
        }
        for &c in &cols {
            let q = present::quantity(&sw.report[c]);
            l.push_str(&fit(
                // A point that could not be computed: !! (the reason is in
                // the status line when the sweep ran).
                &ys.get(c).copied().flatten().map_or("!!".into(), |y| {
                    crate::report::sig(present::shown(y, q, sys), 5)
                }),
                11,
            ));
        }
        tl.push(Line::from(l));
    }
    // What is shown, counted: rows and reported columns.
    let mut parts = Vec::new();
    if sw.rows.len() > room {
        parts.push(format!(
            "rows {}-{} of {}",
            first + 1,
            (first + room).min(sw.rows.len()),
            sw.rows.len()
        ));
    }
    if cols.len() < sw.report.len() {
        parts.push(format!(
            "columns {}-{} of {}",
            first_col + 1,
            first_col + cols.len(),
            sw.report.len()
        ));
    }
    let title = if parts.is_empty() {
        " table ".to_string()
    } else {
        let short: Vec<String> = parts
            .iter()
            .map(|p| p.replace("rows ", "").replace("columns ", "col "))
            .collect();
        fit_title(
            &[
                format!(" table, {} (PgUp/PgDn, Left/Right) ", parts.join(", ")),
                format!(" table, {} ", parts.join(", ")),
                format!(" {} ", parts.join(", ")),
                format!(" {} ", short.join(", ")),
            ],
            ta.width,
        )
    };
    f.render_widget(Paragraph::new(tl).block(th.block(title)), ta);
}

/// The mark before a given value in the grid (with bold): "typed by you".
const GIVEN_MARK: &str = "*";

/// Paragraphs after the key table in help.
const HELP_NOTES: &[&str] = &[
    "In a popup: type a value with or without unit (\"14.7 psia\", \"59 degF\"); the field opens with the value selected, so typing replaces it; Left/Right, Home/End move; ctrl-u clears; Enter applies, Esc cancels.",
    "Marks in the grid: a value in bold after * is a given (typed by you, or set by the scan or a goal shown; the panel says which); !! marks a station whose process has a problem; .. one blocked by a problem upstream; xx a value withheld (the selected scan could not be applied); - a value that is not defined there.",
    "Keys can be changed in the settings file (see the README).",
];

/// Word-wrap `text` to `width` columns; every line after the first starts
/// with `indent` spaces (the first is padded too, for the caller to
/// replace). A word longer than a line is cut.
pub fn hang(text: &str, width: usize, indent: usize) -> Vec<String> {
    let room = width.saturating_sub(indent).max(8);
    let pad = " ".repeat(indent);
    let mut out = Vec::new();
    let mut cur = String::new();
    for word in text.split_whitespace() {
        let mut word = word.to_string();
        while word.chars().count() > room {
            if !cur.is_empty() {
                out.push(format!("{pad}{cur}"));
                cur.clear();
            }
            let head: String = word.chars().take(room).collect();
            out.push(format!("{pad}{head}"));
            word = word.chars().skip(room).collect();
        }
        let need = cur.chars().count() + usize::from(!cur.is_empty()) + word.chars().count();
        if need > room && !cur.is_empty() {
            out.push(format!("{pad}{cur}"));
            cur.clear();
        }
        if !cur.is_empty() {
            cur.push(' ');
        }
        cur.push_str(&word);
    }
    if !cur.is_empty() || out.is_empty() {
        out.push(format!("{pad}{cur}"));
    }
    out
}

/// An input field as drawn: all of its text highlighted while it is
/// selected (the next key typed replaces it), else the character under the
/// cursor highlighted.
fn field_line(f: &super::field::Field, th: &Theme) -> Line<'static> {
    if f.is_selected() {
        return Line::from(vec![
            Span::styled(f.text().to_string(), th.sel()),
            Span::raw(" "),
        ]);
    }
    let (before, at, after) = f.parts();
    Line::from(vec![
        Span::raw(before),
        Span::styled(at, th.sel()),
        Span::raw(after),
    ])
}

/// Clear a popup's area and a margin of two columns and one row around it
/// (within `area`), so no fragment of the view behind shows at its sides.
fn clear_around(f: &mut Frame, r: Rect, area: Rect) {
    let x0 = r.x.saturating_sub(2).max(area.x);
    let y0 = r.y.saturating_sub(1).max(area.y);
    let x1 = (r.x + r.width + 2).min(area.x + area.width);
    let y1 = (r.y + r.height + 1).min(area.y + area.height);
    f.render_widget(
        Clear,
        Rect {
            x: x0,
            y: y0,
            width: x1 - x0,
            height: y1 - y0,
        },
    );
}

fn centered(area: Rect, w: u16, h: u16) -> Rect {
    let w = w.min(area.width);
    let h = h.min(area.height);
    Rect {
        x: area.x + (area.width - w) / 2,
        y: area.y + (area.height - h) / 2,
        width: w,
        height: h,
    }
}

/// A form popup: one row per field (`>` marks a row picked from a
/// chooser), the focused one reversed with the cursor on typed rows, the
/// keys in the bottom border. `idle` rows are dim (not in use).
#[allow(clippy::too_many_arguments)]
fn draw_form(
    f: &mut Frame,
    app: &App,
    th: &Theme,
    area: Rect,
    title: String,
    rows: &[(&str, bool)],
    fields: &[String],
    sel: usize,
    idle: &dyn Fn(usize) -> bool,
    keys: [&str; 2],
) {
    let cursor = if th.ascii { "_" } else { "\u{2588}" };
    let label_w = rows
        .iter()
        .map(|(l, _)| l.chars().count())
        .max()
        .unwrap_or(0)
        + 1;
    let h = (rows.len() as u16 + 2).min(area.height);
    let r = centered(area, 76.min(area.width), h);
    clear_around(f, r, area);
    let mut lines = Vec::new();
    for (i, ((l, path), v)) in rows.iter().zip(fields.iter()).enumerate() {
        let c = if i == sel && !path { cursor } else { "" };
        let shown = if *path && v.trim().is_empty() {
            "(Enter picks)".to_string()
        } else {
            v.clone()
        };
        let style = if i == sel {
            th.sel()
        } else if idle(i) {
            th.dim()
        } else {
            Style::default()
        };
        let pick = if *path { "> " } else { "  " };
        lines.push(Line::from(Span::styled(
            format!("{l:<label_w$}{pick}{shown}{c}"),
            style,
        )));
    }
    // A long path or list wraps rather than running off; the keys stay in
    // the border.
    let (lines, more) = window(app, lines, r, None, Some(sel));
    let keys = fit_title(
        &[keys[0].to_string(), keys[1].to_string()],
        r.width.saturating_sub(more.chars().count() as u16 + 2),
    );
    f.render_widget(
        Paragraph::new(lines).block(
            th.block(title)
                .title_bottom(Line::from(keys).left_aligned())
                .title_bottom(Line::from(more).right_aligned()),
        ),
        r,
    );
}

/// A list popup over the whole body: lines with a selection (`>` and
/// reversed), an optional style per line, keys in the bottom border.
#[allow(clippy::too_many_arguments)]
fn draw_list(
    f: &mut Frame,
    app: &App,
    th: &Theme,
    area: Rect,
    title: String,
    lines_in: Vec<(String, Style)>,
    sel: usize,
    keys: [&str; 2],
) {
    let r = centered(area, 100.min(area.width), area.height);
    clear_around(f, r, area);
    let mut lines = Vec::new();
    for (i, (l, style)) in lines_in.into_iter().enumerate() {
        let (marker, style) = if i == sel {
            ("> ", th.sel())
        } else {
            ("  ", style)
        };
        lines.push(Line::from(Span::styled(format!("{marker}{l}"), style)));
    }
    let (lines, more) = window(app, lines, r, None, Some(sel));
    let keys = fit_title(
        &[keys[0].to_string(), keys[1].to_string()],
        r.width.saturating_sub(more.chars().count() as u16 + 2),
    );
    f.render_widget(
        Paragraph::new(lines).block(
            th.block(title)
                .title_bottom(Line::from(keys).left_aligned())
                .title_bottom(Line::from(more).right_aligned()),
        ),
        r,
    );
}

fn popup(f: &mut Frame, app: &App, th: &Theme, p: &Popup, area: Rect) {
    match p {
        Popup::Edit {
            path,
            quantity,
            input,
        } => {
            // The reason a value was refused is shown here, whole: the
            // status line cuts long messages on a narrow terminal.
            let refused = match &app.status {
                Some((m, true)) => Some(m.clone()),
                _ => None,
            };
            let r = centered(area, 70, if refused.is_some() { 9 } else { 7 });
            clear_around(f, r, area);
            let lines = vec![
                field_line(input, th),
                match refused {
                    Some(m) => Line::from(Span::styled(m, th.bad())),
                    None => Line::from(""),
                },
                Line::from(Span::styled(
                    format!("accepts {}", units::accepted(*quantity)),
                    th.dim(),
                )),
                Line::from(Span::styled(
                    "typing replaces the value; Left/Right/Home/End move; ctrl-u clears; Enter applies and recomputes; Esc cancels",
                    th.dim(),
                )),
            ];
            f.render_widget(
                Paragraph::new(lines)
                    .block(th.block(format!(" edit {path} ")))
                    .wrap(Wrap { trim: true }),
                r,
            );
        }
        Popup::Confirm { text, .. } => {
            let r = centered(area, 66, 6);
            clear_around(f, r, area);
            f.render_widget(
                Paragraph::new(text.clone())
                    .block(th.block(" confirm (y/n) "))
                    .wrap(Wrap { trim: true }),
                r,
            );
        }
        Popup::Text { title, input, .. } => {
            let r = centered(area, 66, 5);
            clear_around(f, r, area);
            let lines = vec![
                field_line(input, th),
                Line::from(Span::styled(
                    "typing replaces; Left/Right/Home/End move; ctrl-u clears; Enter accepts; Esc cancels",
                    th.dim(),
                )),
            ];
            f.render_widget(
                Paragraph::new(lines).block(th.block(format!(" {title} "))),
                r,
            );
        }
        Popup::Choose {
            title,
            items,
            sel,
            search,
            ..
        } => {
            let listed = choose_listed(items, search);
            let w = 76.min(area.width);
            let inner = w.saturating_sub(2) as usize;
            // An item wider than the popup is cut with a ~, and the selected
            // one is shown whole under the list.
            let detail = items
                .get(*sel)
                .filter(|s| s.chars().count() + 2 > inner && listed.contains(sel))
                .map(|s| hang(s, inner, 0))
                .unwrap_or_default();
            let extra = if detail.is_empty() {
                0
            } else {
                detail.len() as u16 + 1
            };
            let h = (listed.len().max(1) as u16 + 3 + extra).min(area.height);
            let r = centered(area, w, h);
            clear_around(f, r, area);
            let visible = h.saturating_sub(3 + extra) as usize;
            let at = listed.iter().position(|i| i == sel).unwrap_or(0);
            let skip = if at >= visible { at + 1 - visible } else { 0 };
            let mut lines: Vec<Line> = listed
                .iter()
                .skip(skip)
                .take(visible)
                .map(|&i| {
                    let t = fit_left(&items[i], inner.saturating_sub(2));
                    if i == *sel {
                        Line::from(Span::styled(format!("> {t}"), th.sel()))
                    } else {
                        Line::from(format!("  {t}"))
                    }
                })
                .collect();
            if listed.is_empty() {
                lines.push(Line::from(Span::styled(
                    format!("  nothing contains \"{search}\""),
                    th.bad(),
                )));
            }
            if !detail.is_empty() {
                lines.push(Line::from(Span::styled("-".repeat(inner), th.dim())));
                lines.extend(detail.into_iter().map(Line::from));
            }
            let more = if listed.len() > visible {
                format!(
                    " ({}-{} of {})",
                    skip + 1,
                    (skip + visible).min(listed.len()),
                    listed.len()
                )
            } else {
                String::new()
            };
            lines.push(Line::from(Span::styled(
                if search.is_empty() {
                    "Up/Down choose, type to search, Enter take, Esc back".to_string()
                } else {
                    format!("search: {search}  (Backspace edits, Esc clears)")
                },
                th.dim(),
            )));
            // A title too long for the popup loses its explanation in
            // parentheses, never the count.
            let plain = title.split(" (").next().unwrap_or(title);
            let head = fit_title(
                &[format!(" {title}{more} "), format!(" {plain}{more} ")],
                r.width,
            );
            f.render_widget(Paragraph::new(lines).block(th.block(head)), r);
        }
        Popup::Setup { sel } => {
            let rows = app.setup_rows();
            let b = app.book();
            let mut lines = Vec::new();
            let mut keep = None;
            for (i, row) in rows.iter().enumerate() {
                let text = match (row, b) {
                    (SetupRow::Title, Some(b)) => format!("title            : {}", b.title),
                    (SetupRow::Note, Some(b)) => format!(
                        "note             : {}",
                        if b.note.is_empty() { "(none)" } else { &b.note }
                    ),
                    (SetupRow::Condition, Some(b)) => format!(
                        "ambient          : {}",
                        match b.ambient.condition {
                            crate::book::Condition::Standard { .. } => "standard atmosphere",
                            crate::book::Condition::Measured { .. } => "measured p and T",
                        }
                    ),
                    (SetupRow::Flight, Some(b)) => format!(
                        "flight given by  : {}",
                        match b.ambient.flight {
                            crate::book::Flight::Mach(_) => "Mach number",
                            crate::book::Flight::Speed(_) => "speed",
                        }
                    ),
                    (SetupRow::Humidity, Some(b)) => format!(
                        "humidity         : {}",
                        if b.ambient.humidity.is_some() {
                            "on"
                        } else {
                            "dry air"
                        }
                    ),
                    (SetupRow::Gas, Some(b)) => format!(
                        "gas model        : {}",
                        match b.gas {
                            crate::book::GasSettings::ThermallyPerfect => "thermally perfect",
                            crate::book::GasSettings::CaloricallyPerfect { .. } =>
                                "calorically perfect",
                        }
                    ),
                    (SetupRow::KeepResults, Some(b)) => format!(
                        "store results    : {}",
                        if b.keep_results { "yes" } else { "no" }
                    ),
                    (SetupRow::Goals, Some(b)) => {
                        format!("goals            : {} (Enter lists)", b.goals.len())
                    }
                    (SetupRow::Channels, Some(b)) => format!(
                        "channel map      : {} (Enter lists)",
                        b.channels.as_ref().map_or("none".to_string(), |c| format!(
                            "{} channel(s){}",
                            c.map.len(),
                            if c.barometer.is_some() {
                                " and a barometer"
                            } else {
                                ""
                            }
                        ))
                    ),
                    (SetupRow::Given(p), _) => match given_line(app, p) {
                        Some((field, val)) => format!("  {field:<15}= {val}"),
                        None => continue,
                    },
                    _ => continue,
                };
                let marker = if i == *sel { "> " } else { "  " };
                let style = if i == *sel {
                    keep = Some(lines.len());
                    th.sel()
                } else if matches!(row, SetupRow::Given(_)) {
                    th.given()
                } else {
                    Style::default()
                };
                lines.push(Line::from(Span::styled(format!("{marker}{text}"), style)));
            }
            // As high as the lines need once wrapped (long titles and
            // notes); a list longer than the screen follows the selection
            // and says which lines are shown.
            let w = 70.min(area.width);
            let inner = w.saturating_sub(2).max(1) as usize;
            let wrapped: usize = lines
                .iter()
                .map(|l| {
                    let n: usize = l.spans.iter().map(|s| s.content.chars().count()).sum();
                    n.div_ceil(inner).max(1) + usize::from(n > inner)
                })
                .sum();
            let h = (wrapped as u16 + 2).min(area.height);
            let r = centered(area, w, h);
            clear_around(f, r, area);
            let (lines, more) = window(app, lines, r, None, keep);
            f.render_widget(
                Paragraph::new(lines).block(
                    th.block(" workbook, ambient and gas ")
                        .title_bottom(Line::from(" Enter edits, Esc closes ").left_aligned())
                        .title_bottom(Line::from(more).right_aligned()),
                ),
                r,
            );
        }
        Popup::SweepForm { fields, sel } => {
            let carpet = !fields[4].trim().is_empty();
            let mut shown = fields.clone();
            if !carpet {
                shown[4] = "none (Enter picks one)".into();
            }
            draw_form(
                f,
                app,
                th,
                area,
                " sweep set-up ".into(),
                &super::app::sweep_form::ROWS,
                &shown,
                *sel,
                // The second variable's rows are dim while there is none.
                &|i| !carpet && (5..=7).contains(&i),
                [
                    " > rows: Enter or typing picks, Backspace removes; Enter runs ",
                    " > Enter picks; Enter runs ",
                ],
            );
        }
        Popup::Goals { sel } => {
            let goal_lines = app.goal_lines();
            let n = goal_lines.len();
            let mut items: Vec<(String, Style)> = goal_lines
                .into_iter()
                .map(|l| {
                    let style = if l.contains("NOT MET") {
                        th.bad()
                    } else if l.contains("[off]") {
                        th.dim()
                    } else {
                        Style::default()
                    };
                    (l, style)
                })
                .collect();
            items.push(("+ add a goal".into(), th.dim()));
            draw_list(
                f,
                app,
                th,
                area,
                format!(" goals ({n}) "),
                items,
                *sel,
                [
                    " Enter edits, a adds, Space on/off, x deletes, Esc closes ",
                    " Enter, a, Space, x ",
                ],
            );
        }
        Popup::GoalForm { index, fields, sel } => {
            let title = match index {
                Some(i) => format!(" goal {} ", i + 1),
                None => " new goal ".to_string(),
            };
            draw_form(
                f,
                app,
                th,
                area,
                title,
                &super::app::goals::GOAL_ROWS,
                fields,
                *sel,
                &|_| false,
                [
                    " > rows: Enter or typing picks; Enter applies; Esc back ",
                    " > Enter picks; Enter applies ",
                ],
            );
        }
        Popup::Channels { sel } => {
            let mut items: Vec<(String, Style)> = app
                .channel_lines()
                .into_iter()
                .map(|(_, l)| (l, Style::default()))
                .collect();
            let n = items.len();
            items.extend(
                app.channel_adds()
                    .into_iter()
                    .map(|(_, l)| (l.to_string(), th.dim())),
            );
            draw_list(
                f,
                app,
                th,
                area,
                format!(" channel map ({n}) "),
                items,
                *sel,
                [
                    " Enter edits, a adds, x deletes, Esc closes ",
                    " Enter, a, x ",
                ],
            );
        }
        Popup::ChannelForm { at, fields, sel } => {
            use super::app::channels::ChannelAt;
            let title = match at {
                ChannelAt::Barometer => " barometer channel ".to_string(),
                ChannelAt::Map(Some(i)) => format!(" channel {} ", i + 1),
                ChannelAt::Map(None) => " new channel ".to_string(),
            };
            let baro = *at == ChannelAt::Barometer;
            let mut shown = fields.clone();
            if baro {
                shown[0] = "(the barometer: every gauge reading)".into();
            }
            draw_form(
                f,
                app,
                th,
                area,
                title,
                &super::app::channels::CHANNEL_ROWS,
                &shown,
                *sel,
                &|i| baro && i == 0,
                [
                    " columns, weights: comma separated; u: unit or %; Enter applies ",
                    " Enter applies; Esc back ",
                ],
            );
        }
        Popup::ScanList { sel, flagged } => {
            let Some(sb) = &app.scans else {
                return;
            };
            let list = sb.listed(*flagged);
            let h = area.height;
            let r = area;
            clear_around(f, r, area);
            let w = r.width.saturating_sub(4) as usize;
            // The selected scan's flags or reason, whole, under the list.
            let detail: Vec<String> = list
                .get(*sel)
                .and_then(|&i| sb.marks.get(i))
                .map(|m| match m {
                    ScanMark::Ok => Vec::new(),
                    ScanMark::Flagged(first, n) => hang(&format!("{n} flag(s): {first}"), w, 2),
                    ScanMark::Unusable(why) => hang(&format!("not usable: {why}"), w, 2),
                })
                .unwrap_or_default();
            let extra = if detail.is_empty() {
                0
            } else {
                detail.len() + 1
            };
            let help = hang(
                "Up/Down, PgUp/PgDn, Home/End choose, Enter shows, f flagged only, Esc closes; @ on screen",
                w + 2,
                2,
            );
            let visible = (h as usize).saturating_sub(2 + help.len() + extra).max(1);
            app.derived
                .list_page
                .set(visible.min(u16::MAX as usize) as u16);
            let skip = if *sel >= visible {
                sel + 1 - visible
            } else {
                0
            };
            let mut lines: Vec<Line> = Vec::new();
            for (li, &i) in list.iter().enumerate().skip(skip).take(visible) {
                let mark = match sb.marks.get(i) {
                    Some(ScanMark::Ok) | None => "ok".to_string(),
                    Some(ScanMark::Flagged(first, n)) => format!("{n} flag(s): {first}"),
                    Some(ScanMark::Unusable(why)) => format!("NOT USABLE: {why}"),
                };
                let here = if Some(i) == sb.shown { "@" } else { " " };
                let text = fit_left(
                    &format!("{here}{}  {mark}", scan_label(sb, i)),
                    w.saturating_sub(2),
                );
                let style = if li == *sel {
                    th.sel()
                } else if matches!(sb.marks.get(i), Some(ScanMark::Unusable(_))) {
                    th.bad()
                } else {
                    Style::default()
                };
                let marker = if li == *sel { "> " } else { "  " };
                lines.push(Line::from(Span::styled(format!("{marker}{text}"), style)));
            }
            if !detail.is_empty() {
                lines.push(Line::from(Span::styled("-".repeat(w + 2), th.dim())));
                lines.extend(detail.into_iter().map(Line::from));
            }
            for l in &help {
                lines.push(Line::from(Span::styled(l.clone(), th.dim())));
            }
            let name = sb
                .path
                .file_name()
                .map_or(String::new(), |n| n.to_string_lossy().to_string());
            let only = if *flagged { ", flagged only" } else { "" };
            let (a, b) = (skip + 1, (skip + visible).min(list.len()));
            let title = fit_title(
                &[
                    format!(
                        " scans of {name} ({a}-{b} of {} listed, {} in the file{only}) ",
                        list.len(),
                        sb.rows.len()
                    ),
                    format!(" scans ({a}-{b} of {}{only}) ", list.len()),
                ],
                r.width,
            );
            f.render_widget(Paragraph::new(lines).block(th.block(title)), r);
        }
        Popup::Help { scroll } => {
            let r = area;
            clear_around(f, r, area);
            let w = r.width.saturating_sub(2) as usize;
            let mut lines: Vec<Line> = hang(CAUTION, w, 0)
                .into_iter()
                .map(|l| Line::from(Span::styled(l, th.bad())))
                .collect();
            lines.push(Line::from(""));
            // Keys and command name in two columns; the description wraps
            // under itself, never back to the left edge.
            for (c, name, doc, _) in COMMANDS {
                let head = format!("{:<16} {:<16} ", app.keymap.keys_of(*c), name);
                let indent = head.chars().count();
                for (i, l) in hang(doc, w, indent).into_iter().enumerate() {
                    lines.push(Line::from(if i == 0 {
                        format!("{head}{}", l.trim_start())
                    } else {
                        l
                    }));
                }
            }
            lines.push(Line::from(""));
            for para in HELP_NOTES {
                lines.extend(hang(para, w, 0).into_iter().map(Line::from));
            }
            let visible = r.height.saturating_sub(2) as usize;
            let top = (*scroll as usize).min(lines.len().saturating_sub(visible));
            let (a, b, n) = (top + 1, (top + visible).min(lines.len()), lines.len());
            let title = fit_title(
                &[
                    format!(" help: lines {a}-{b} of {n} (Up/Down scroll, any other key closes) "),
                    format!(" help: lines {a}-{b} of {n} (Up/Down scroll) "),
                    format!(" help: {a}-{b} of {n} "),
                ],
                r.width,
            );
            f.render_widget(
                Paragraph::new(lines)
                    .block(th.block(title))
                    .scroll((top as u16, 0)),
                r,
            );
        }
    }
}
