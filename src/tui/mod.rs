//! The terminal workbook: set-up and restore, the event loop, signals.
//!
//! Shape: key -> keymap -> command -> `App` update (through the engine) ->
//! views draw from `&App`. The loop redraws only after input or a resize
//! and otherwise sleeps in `poll`, so an idle session costs nothing on an
//! SSH link. The terminal is restored on quit, on error, on a panic (hook)
//! and on SIGTERM or SIGHUP; on a dropped session unsaved changes go to a
//! recovery file beside the workbook, offered at the next open.

pub mod app;
pub mod field;
pub mod keymap;
pub mod lifeline;
pub mod plot;
pub mod settings;
pub mod thin;
pub mod ui;

use app::App;
use crossterm::event::{self, Event, KeyEventKind};
use crossterm::execute;
use crossterm::terminal::{self, EnterAlternateScreen};
use ratatui::Terminal;
use ratatui::backend::CrosstermBackend;
use std::io;
use std::path::Path;
use std::time::Duration;

/// Leave raw mode and the alternate screen (ratatui's own restore), and
/// show the cursor. Errors are ignored: on a dropped link there is no
/// terminal left to restore. ratatui's `init` is not used for set-up
/// because its panic hook reports a failed restore with `eprintln!`, which
/// itself panics when standard error is the terminal that went away.
fn restore() {
    let _ = ratatui::try_restore();
    let _ = execute!(io::stdout(), crossterm::cursor::Show);
}

/// Options from the command line.
#[derive(Debug, Clone, Copy, Default)]
pub struct Options {
    /// Force ASCII drawing.
    pub ascii: bool,
    /// Force colour off.
    pub no_color: bool,
    /// Start in US units.
    pub us: bool,
}

/// Run the terminal workbook on a file (or the start screen).
pub fn run(file: Option<&Path>, opts: Options) -> Result<(), String> {
    let (mut s, note) = settings::load();
    if opts.ascii {
        s.ascii = true;
    }
    if opts.no_color {
        s.color = false;
    }
    if opts.us {
        s.us_units = true;
    }
    let mut app = App::new(s);
    match file {
        // A file that does not exist yet: start it from a demo and save there.
        // A name without an extension is more likely a mistyped command
        // ("chek") than a new workbook.
        Some(f) if !f.exists() && f.extension().is_none() => {
            return Err(format!(
                "{}: no such file or command (see stationwise --help; a new workbook needs a name such as {}.ron)",
                f.display(),
                f.display()
            ));
        }
        Some(f) if !f.exists() => {
            app.path = Some(f.to_path_buf());
            app.start_screen();
            app.status = Some((
                format!(
                    "{} does not exist yet: pick a demo to start it from",
                    f.display()
                ),
                false,
            ));
        }
        Some(f) => app.open(f)?,
        None => app.start_screen(),
    }
    // A bad settings file is said last, so opening a file does not hide it.
    if let Some(n) = note {
        app.status = Some((n, true));
    }
    let mut line =
        lifeline::Lifeline::start().map_err(|e| format!("cannot watch this terminal: {e}"))?;
    let prev = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        restore();
        prev(info);
    }));
    terminal::enable_raw_mode().map_err(|e| format!("cannot use this terminal: {e}"))?;
    if let Err(e) = execute!(io::stdout(), EnterAlternateScreen) {
        restore();
        return Err(format!("cannot use this terminal: {e}"));
    }
    let backend = thin::ThinLink::new(CrosstermBackend::new(io::stdout()));
    let mut term = match Terminal::new(backend) {
        Ok(t) => t,
        Err(e) => {
            restore();
            return Err(format!("cannot use this terminal: {e}"));
        }
    };
    let result = event_loop(&mut app, &mut line, &mut term);
    line.finish();
    if result.is_err() {
        // The terminal may be gone: ratatui's drop shows the cursor and
        // prints (which panics on a dead terminal) when that fails.
        std::mem::forget(term);
    } else {
        drop(term);
    }
    restore();
    result
}

fn on_cut(app: &App, why: &str) -> String {
    match app.write_recovery() {
        Some(p) => format!("{why}: unsaved changes written to {}", p.display()),
        None => format!("{why}: nothing unsaved"),
    }
}

type Term = Terminal<thin::ThinLink<CrosstermBackend<io::Stdout>>>;

fn event_loop(app: &mut App, line: &mut lifeline::Lifeline, term: &mut Term) -> Result<(), String> {
    use lifeline::Wake;
    let _ = term.clear();
    let mut redraw = true;
    let cut = |app: &App, wake: Wake| -> Option<String> {
        match wake {
            Wake::Signal(sig) if sig == signal_hook::consts::SIGHUP => {
                Some(on_cut(app, "session hung up"))
            }
            Wake::Signal(_) => Some(on_cut(app, "terminated")),
            Wake::Lost => Some(on_cut(app, "terminal closed")),
            _ => None,
        }
    };
    loop {
        if app.quit {
            return Ok(());
        }
        if redraw {
            if let Err(e) = term.draw(|f| ui::draw(f, app)) {
                return Err(on_cut(app, &format!("terminal lost ({e})")));
            }
            redraw = false;
        }
        // Every event that is ready is handled before one redraw, so a
        // paste of thousands of characters costs one frame. The terminal is
        // checked before each read: the terminal crate's reader never
        // returns from a closed descriptor, so it must never be given one.
        let mut handled = false;
        loop {
            if let Some(m) = cut(app, line.wait(Some(Duration::ZERO))) {
                return Err(m);
            }
            match event::poll(Duration::ZERO) {
                Ok(true) => {}
                Ok(false) => break,
                Err(e) => return Err(on_cut(app, &format!("terminal input lost ({e})"))),
            }
            match event::read() {
                Ok(Event::Key(k)) if k.kind == KeyEventKind::Press => {
                    app.on_key(k);
                    handled = true;
                }
                Ok(Event::Resize(_, _)) => {
                    let _ = term.autoresize();
                    handled = true;
                }
                Ok(_) => {}
                Err(e) => return Err(on_cut(app, &format!("terminal input lost ({e})"))),
            }
            if app.quit {
                break;
            }
        }
        if handled {
            line.keep(app.recovery_snapshot());
            redraw = true;
            continue;
        }
        if let Some(m) = cut(app, line.wait(None)) {
            return Err(m);
        }
    }
}

/// Draw the app into an off-screen buffer of `w` x `h` cells (tests,
/// benchmarks): the same drawing code as the terminal.
pub fn render_buffer(app: &App, w: u16, h: u16) -> ratatui::buffer::Buffer {
    let backend = ratatui::backend::TestBackend::new(w, h);
    match Terminal::new(backend) {
        Ok(mut t) => {
            let _ = t.draw(|f| ui::draw(f, app));
            t.backend().buffer().clone()
        }
        Err(_) => ratatui::buffer::Buffer::empty(ratatui::layout::Rect::new(0, 0, w, h)),
    }
}

/// The screen text of [`render_buffer`], one line per row, trailing spaces kept.
pub fn render_text(app: &App, w: u16, h: u16) -> String {
    let b = render_buffer(app, w, h);
    let mut out = String::new();
    for y in 0..h {
        for x in 0..w {
            out.push_str(b[(x, y)].symbol());
        }
        out.push('\n');
    }
    out
}
