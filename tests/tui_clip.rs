//! No panel hides content without saying so. Every view and popup of
//! every demo sheet is drawn at 80x24 and at the smallest size accepted
//! (64x18) and again on a screen large enough for everything (240x100).
//! For each bordered block, every word the large screen shows must be on
//! the small one, unless the block's borders carry a count of what is
//! shown ("lines 1-10 of 18", "columns 1-5 of 7", "(1-9 of 15)") that says
//! something is left out; scrolling that block then brings every word
//! into view. No title runs into its corner (a title cut by the border).
//! The reference is the same drawing at a size where nothing is clipped,
//! so the test checks the drawing against itself, not against a list
//! kept by hand.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

mod common;

use common::{Copy, copy_demo, press};
use ratatui::buffer::Buffer;
use stationwise::tui::app::App;
use stationwise::tui::render_buffer;
use stationwise::tui::settings::Settings;
use std::collections::BTreeSet;

const BIG: (u16, u16) = (240, 100);

fn open(sheet: &str, tag: &str) -> (App, Copy) {
    let copy = copy_demo(sheet, &format!("clip-{tag}"));
    let mut app = App::new(Settings::default());
    app.open(&copy.path).unwrap();
    app.status = None;
    (app, copy)
}

/// A bordered block on screen: its top and bottom border text and the
/// words inside.
#[derive(Debug)]
struct Drawn {
    title: String,
    bottom: String,
    words: BTreeSet<String>,
    /// A title or bottom text runs into a corner.
    cut: bool,
}

fn sym(b: &Buffer, x: u16, y: u16) -> &str {
    b[(x, y)].symbol()
}

/// Every block whose four corners are on screen (a block under a popup
/// loses its corners and is not read).
fn blocks(b: &Buffer) -> Vec<Drawn> {
    let (w, h) = (b.area.width, b.area.height);
    let mut out = Vec::new();
    for y in 0..h {
        for x in 0..w {
            if sym(b, x, y) != "┌" {
                continue;
            }
            let Some(r) = (x + 1..w).find(|&r| sym(b, r, y) == "┐") else {
                continue;
            };
            let Some(bot) = (y + 1..h).find(|&yy| sym(b, x, yy) == "└") else {
                continue;
            };
            if sym(b, r, bot) != "┘" {
                continue;
            }
            let line = |yy: u16| -> String { (x + 1..r).map(|xx| sym(b, xx, yy)).collect() };
            let edge = |yy: u16| {
                let s: Vec<&str> = (x + 1..r).map(|xx| sym(b, xx, yy)).collect();
                // Text right at a corner: the title was cut by the border.
                let at_start = s.first().is_some_and(|c| *c != "─" && *c != " ");
                let at_end = s.last().is_some_and(|c| *c != "─" && *c != " ");
                at_start || at_end
            };
            let mut words = BTreeSet::new();
            for yy in y + 1..bot {
                for wd in line(yy).split_whitespace() {
                    // Pieces of the block's own side borders and popups'
                    // edges are not content.
                    if wd.chars().all(|c| "│─┌┐└┘".contains(c)) {
                        continue;
                    }
                    words.insert(wd.trim_matches('│').to_string());
                }
            }
            out.push(Drawn {
                title: line(y).trim_matches('─').trim().to_string(),
                bottom: line(bot).trim_matches('─').trim().to_string(),
                words,
                cut: edge(y) || edge(bot),
            });
        }
    }
    out
}

/// The block's first word (its name: "summary", "into", "stations").
fn name(d: &Drawn) -> String {
    d.title.split_whitespace().next().unwrap_or("").to_string()
}

/// Its first two words, to tell blocks of one name apart ("sweep set-up"
/// over the "sweep" view).
fn name2(d: &Drawn) -> String {
    d.title
        .split_whitespace()
        .take(2)
        .collect::<Vec<_>>()
        .join(" ")
}

/// A count "a-b of n" in the borders; true when it says not all is shown.
fn counts_less(d: &Drawn) -> Option<bool> {
    let text = format!("{} {}", d.title, d.bottom);
    let mut found = None;
    let t: Vec<&str> = text.split_whitespace().collect();
    for i in 0..t.len().saturating_sub(2) {
        let range = t[i].trim_start_matches('(');
        if t[i + 1] != "of" {
            continue;
        }
        let Some((a, b)) = range.split_once('-') else {
            continue;
        };
        let n = t[i + 2].trim_end_matches([')', ',']);
        if let (Ok(a), Ok(b), Ok(n)) = (a.parse::<usize>(), b.parse::<usize>(), n.parse::<usize>())
        {
            let less = b + 1 - a < n;
            found = Some(found.unwrap_or(false) || less);
        }
    }
    found
}

/// One screen state: keys from the opened sheet, the blocks to check and
/// the key that scrolls them.
struct State {
    what: &'static str,
    keys: &'static str,
    /// Blocks (by first title word) to check; empty: all blocks with
    /// corners on screen.
    only: &'static [&'static str],
    scroll: &'static str,
}

/// The keys that bring a block's hidden part into view, one at a time:
/// the grid scrolls by columns and rows, the rest by their state's key.
fn scroll_keys(block: &str, st: &State) -> String {
    if block == "stations" {
        // Back and forth down the rows, one column further each time.
        let r = |k: &str, n: usize| vec![k; n].join(" ");
        (0..13)
            .map(|c| format!("{} l", r(if c % 2 == 0 { "j" } else { "k" }, 13)))
            .collect::<Vec<_>>()
            .join(" ")
    } else {
        vec![st.scroll; 120].join(" ")
    }
}

const STATES: &[State] = &[
    State {
        what: "grid, first station",
        keys: "",
        only: &[],
        scroll: "PageDown",
    },
    State {
        what: "grid, third station, all columns",
        keys: "j j c c c",
        only: &["stations"],
        scroll: "PageDown",
    },
    State {
        what: "grid, last station, all columns scrolled right",
        keys: "j j j j j j j j j j j j j j j j j j j j c c c l l l l l l l l l l",
        // The grid's every row and column is reached from the states above.
        only: &["into", "summary"],
        scroll: "PageDown",
    },
    State {
        what: "panel focus",
        keys: "j j Tab",
        // j and k move in the panel here: the grid is checked above.
        only: &["into", "summary"],
        scroll: "PageDown",
    },
    State {
        what: "walk",
        keys: "j j 2",
        only: &[],
        scroll: "PageDown",
    },
    State {
        what: "help",
        keys: "?",
        only: &["help:"],
        scroll: "Down",
    },
    State {
        what: "setup",
        keys: "g",
        only: &["workbook,"],
        scroll: "Down",
    },
    State {
        what: "kind chooser",
        keys: "j j K",
        only: &["kind"],
        scroll: "Down",
    },
    State {
        what: "mode chooser",
        keys: "j j m",
        only: &["mode"],
        scroll: "Down",
    },
    State {
        what: "goals",
        keys: "G",
        only: &["goals"],
        scroll: "Down",
    },
    State {
        what: "goal form",
        keys: "G a",
        only: &["new goal"],
        scroll: "Down",
    },
    State {
        what: "sweep set-up",
        keys: "4",
        only: &["sweep set-up"],
        scroll: "Down",
    },
];

fn sizes() -> [(u16, u16); 2] {
    [(80, 24), (64, 18)]
}

/// Every state of one sheet; returns the number of blocks checked.
fn check_sheet(sheet: &str) -> usize {
    let mut checked = 0;
    {
        for st in STATES {
            let (mut app, _copy) = open(sheet, "a");
            press(&mut app, st.keys);
            let big = blocks(&render_buffer(&app, BIG.0, BIG.1));
            for (w, h) in sizes() {
                let small = blocks(&render_buffer(&app, w, h));

                for d in &small {
                    let n = name(d);
                    // An entry of two words names a block by both (the
                    // "sweep set-up" popup over the "sweep" view).
                    let picked = st.only.iter().any(|o| {
                        if o.contains(' ') {
                            *o == name2(d)
                        } else {
                            *o == n
                        }
                    });
                    if !st.only.is_empty() && !picked {
                        continue;
                    }
                    let here = format!("{sheet}, {}, {w}x{h}, block \"{}\"", st.what, d.title);
                    assert!(!d.cut, "{here}: a title or border text is cut\n{d:?}");
                    let Some(r) = big.iter().find(|b| name2(b) == name2(d)) else {
                        continue;
                    };
                    // Content words: not a cut item's stub, not a rule.
                    let content = |w: &&String| !w.ends_with('~') && !w.chars().all(|c| c == '-');
                    let missing: Vec<&String> =
                        r.words.difference(&d.words).filter(content).collect();
                    if missing.is_empty() {
                        checked += 1;
                        continue;
                    }
                    // A count in the border, or an item cut with its ~ mark
                    // (a chooser shows the selected item whole below).
                    let marked = d.words.iter().any(|w| w.ends_with('~'));
                    assert!(
                        counts_less(d) == Some(true) || marked,
                        "{here}: {} word(s) not shown and no count says so: {missing:?}\n{d:?}",
                        missing.len()
                    );
                    // Scrolling brings every word into view.
                    let (mut again, _c2) = open(sheet, "b");
                    press(&mut again, st.keys);
                    let mut seen = d.words.clone();
                    for k in scroll_keys(&n, st).split_whitespace() {
                        press(&mut again, k);
                        if let Some(x) = blocks(&render_buffer(&again, w, h))
                            .into_iter()
                            .find(|b| name2(b) == name2(d))
                        {
                            seen.extend(x.words);
                        }
                        if r.words.iter().filter(content).all(|w| seen.contains(w)) {
                            break;
                        }
                    }
                    // A word shown cut with its ~ mark (a long name in a
                    // narrow column) is shown as far as it fits: the ~ says so.
                    // Station and process names are cut with ~ in a
                    // narrow grid (and shown whole in the panel's title).
                    let book = again.book().unwrap();
                    let name_words: BTreeSet<String> = book
                        .stations
                        .iter()
                        .map(|s| s.name.as_str())
                        .chain(book.processes.iter().map(|p| p.name.as_str()))
                        .flat_map(|n| n.split_whitespace().map(String::from))
                        .collect();
                    let any_cut = seen.iter().any(|s| s.ends_with('~'));
                    let cut_shown = |w: &&String| {
                        let stem_cut = seen.iter().any(|s| {
                            s.strip_suffix('~')
                                .is_some_and(|stem| !stem.is_empty() && w.starts_with(stem))
                        });
                        !(stem_cut || (any_cut && name_words.contains(*w)))
                    };
                    let still: Vec<&String> = r
                        .words
                        .difference(&seen)
                        .filter(content)
                        .filter(cut_shown)
                        .collect();
                    assert!(
                        still.is_empty(),
                        "{here}: never shown by scrolling: {still:?}"
                    );
                    checked += 1;
                }
            }
        }
    }
    checked
}

// One test per demo sheet (they run in parallel).
macro_rules! sheet_tests {
    ($($name:ident: $file:expr),* $(,)?) => {$(
        #[test]
        fn $name() {
            let n = check_sheet($file);
            // Grid, panel, summary and each popup, at two sizes (a sheet
            // whose third process has one mode has no mode chooser).
            assert!(n >= 25, "only {n} blocks checked");
        }
    )*};
}

sheet_tests! {
    turbojet_blocks_show_all_or_say_so: "turbojet.ron",
    turbofan_blocks_show_all_or_say_so: "turbofan.ron",
    combustor_rig_blocks_show_all_or_say_so: "combustor-rig.ron",
    compressor_rig_blocks_show_all_or_say_so: "compressor-rig.ron",
    tunnel_blocks_show_all_or_say_so: "tunnel.ron",
    ramjet_blocks_show_all_or_say_so: "ramjet.ron",
    speedline_blocks_show_all_or_say_so: "compressor-speedline.ron",
}
