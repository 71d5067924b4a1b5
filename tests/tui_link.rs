//! What the terminal workbook sends over the link: the frames the app
//! draws, encoded as a terminal receives them (`thin::Wire`), once plainly
//! and once through `thin::ThinLink`, which fills short gaps instead of
//! moving the cursor. Both byte streams are read by an independent
//! terminal emulator (the vt100 crate, 0.18) and each screen must equal
//! the frame drawn, cell by cell: text, colours, bold, underline, reverse.
//! The byte count per cursor move is the figure of issue 13 (under 1,000
//! at 120x40); pty-bytes measures the same on the real binary.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::Terminal;
use ratatui::buffer::Buffer;
use ratatui::style::{Color, Modifier};
use stationwise::tui::app::App;
use stationwise::tui::settings::Settings;
use stationwise::tui::thin::{ThinLink, Wire};
use stationwise::tui::ui;
use std::path::Path;

fn key(c: char) -> KeyEvent {
    KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE)
}

/// The 256-colour index vt100 reports for a ratatui colour, as crossterm
/// encodes it (`38;5;n`); `None` for the terminal's default.
fn index(c: Color) -> Option<u8> {
    Some(match c {
        Color::Reset => return None,
        Color::Black => 0,
        Color::Red => 1,
        Color::Green => 2,
        Color::Yellow => 3,
        Color::Blue => 4,
        Color::Magenta => 5,
        Color::Cyan => 6,
        Color::Gray => 7,
        Color::DarkGray => 8,
        Color::LightRed => 9,
        Color::LightGreen => 10,
        Color::LightYellow => 11,
        Color::LightBlue => 12,
        Color::LightMagenta => 13,
        Color::LightCyan => 14,
        Color::White => 15,
        Color::Indexed(n) => n,
        Color::Rgb(..) => panic!("no RGB colours are drawn"),
    })
}

fn vt_index(c: vt100::Color) -> Option<u8> {
    match c {
        vt100::Color::Default => None,
        vt100::Color::Idx(n) => Some(n),
        vt100::Color::Rgb(..) => panic!("no RGB colours are sent"),
    }
}

/// The emulated screen equals the frame, cell by cell.
fn same_screen(frame: &Buffer, screen: &vt100::Screen, what: &str) {
    let a = frame.area;
    for y in 0..a.height {
        for x in 0..a.width {
            let want = &frame[(x, y)];
            let got = screen.cell(y, x).unwrap();
            if got.is_wide_continuation() {
                continue;
            }
            let text = if got.has_contents() {
                got.contents()
            } else {
                " "
            };
            let here = format!("{what}: cell ({x},{y})");
            assert_eq!(text, want.symbol(), "{here} text");
            assert_eq!(vt_index(got.fgcolor()), index(want.fg), "{here} fg");
            assert_eq!(vt_index(got.bgcolor()), index(want.bg), "{here} bg");
            let m = want.modifier;
            assert_eq!(got.bold(), m.contains(Modifier::BOLD), "{here} bold");
            assert_eq!(
                got.underline(),
                m.contains(Modifier::UNDERLINED),
                "{here} underline"
            );
            assert_eq!(
                got.inverse(),
                m.contains(Modifier::REVERSED),
                "{here} reverse"
            );
        }
    }
}

struct Link<B: ratatui::backend::Backend> {
    term: Terminal<B>,
    vt: vt100::Parser,
    bytes: Vec<usize>,
}

/// Draw the app through two links and check both screens; the bytes of
/// each frame are recorded.
fn frame(app: &App, plain: &mut Link<Wire>, thin: &mut Link<ThinLink<Wire>>, what: &str) {
    let drawn = plain
        .term
        .draw(|f| ui::draw(f, app))
        .unwrap()
        .buffer
        .clone();
    let out = plain.term.backend_mut().take();
    plain.vt.process(&out);
    plain.bytes.push(out.len());
    same_screen(&drawn, plain.vt.screen(), &format!("plain {what}"));

    thin.term.draw(|f| ui::draw(f, app)).unwrap();
    let out = thin.term.backend_mut().inner_mut().take();
    thin.vt.process(&out);
    thin.bytes.push(out.len());
    same_screen(&drawn, thin.vt.screen(), &format!("thin {what}"));
}

fn emulator(w: u16, h: u16) -> vt100::Parser {
    use std::num::NonZeroU16;
    vt100::Parser::new(NonZeroU16::new(h).unwrap(), NonZeroU16::new(w).unwrap(), 0)
}

fn median(v: &[usize]) -> usize {
    let mut v = v.to_vec();
    v.sort_unstable();
    v[v.len() / 2]
}

/// Cursor moves through a demo at a size, in colour and in ASCII; every
/// frame is checked and the per-key bytes returned (plain, thin).
fn walk(sheet: &str, settings: Settings, w: u16, h: u16, keys: &str) -> (Vec<usize>, Vec<usize>) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sheets")
        .join(sheet);
    let mut app = App::new(settings);
    app.open(&path).unwrap();
    app.status = None;
    let mut plain = Link {
        term: Terminal::new(Wire::new(w, h)).unwrap(),
        vt: emulator(w, h),
        bytes: Vec::new(),
    };
    let mut thin = Link {
        term: Terminal::new(ThinLink::new(Wire::new(w, h))).unwrap(),
        vt: emulator(w, h),
        bytes: Vec::new(),
    };
    plain.term.clear().unwrap();
    thin.term.clear().unwrap();
    frame(&app, &mut plain, &mut thin, "first frame");
    for (i, k) in keys.chars().filter(|c| !c.is_whitespace()).enumerate() {
        app.on_key(key(k));
        frame(
            &app,
            &mut plain,
            &mut thin,
            &format!("{sheet} key {i} '{k}'"),
        );
    }
    (plain.bytes[1..].to_vec(), thin.bytes[1..].to_vec())
}

#[test]
fn the_thin_link_draws_the_same_screens_with_fewer_bytes() {
    let ascii = Settings {
        ascii: true,
        color: false,
        ..Settings::default()
    };
    for (sheet, settings) in [
        ("turbojet.ron", Settings::default()),
        ("turbofan.ron", Settings::default()),
        ("turbojet.ron", ascii),
    ] {
        for (w, h) in [(120, 40), (80, 24)] {
            // Cursor moves, a column set, the panel, the other views.
            let (plain, thin) = walk(sheet, settings.clone(), w, h, "jjjjkkkk c c u u 2 j 3 4 1");
            for (i, (p, t)) in plain.iter().zip(&thin).enumerate() {
                assert!(t <= p, "{sheet} {w}x{h} key {i}: {t} bytes thin, {p} plain");
            }
        }
    }
}

#[test]
fn a_cursor_move_costs_under_a_thousand_bytes_at_120x40() {
    // Issue 13's figure, on the turbojet demo (what pty-bytes measures on
    // the binary, without the pty).
    let (plain, thin) = walk("turbojet.ron", Settings::default(), 120, 40, "jjjjkkkk");
    let m = median(&thin);
    println!(
        "median bytes per cursor move at 120x40: {m} (plain {})",
        median(&plain)
    );
    assert!(
        m < 1000,
        "median {m} bytes per cursor move (plain {})",
        median(&plain)
    );
}
