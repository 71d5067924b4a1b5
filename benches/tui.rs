//! Speed of drawing the terminal workbook: one frame of the grid view of a
//! 50-station workbook at 120x40, off-screen (ratatui's TestBackend, the
//! same drawing code as the terminal).
//!
//! The workbook is the turbojet demo with 44 ducts inserted between the
//! intake exit and the compressor, built through the library.
//!
//! Run: `cargo bench --bench tui` (short: add
//! `-- --warm-up-time 1 --measurement-time 2`).
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{Criterion, criterion_group, criterion_main};
use stationwise::book::{Duct, Given, Kind, Process, Station, Workbook};
use stationwise::engine::Engine;
use stationwise::tui::app::App;
use stationwise::tui::render_buffer;
use stationwise::tui::settings::Settings;
use std::hint::black_box;
use std::path::Path;

/// The turbojet with `n` ducts after station 2 (6 + n stations).
fn long_workbook(n: usize) -> Workbook {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/turbojet.ron");
    let mut book = stationwise::format::load(&path).unwrap();
    let at = book.stations.iter().position(|s| s.name == "2").unwrap();
    let mut prev = "2".to_string();
    for i in 0..n {
        let name = format!("2.{i:02}");
        book.stations.insert(at + 1 + i, Station::named(&name));
        let pi = book.processes.iter().position(|p| p.to == prev).unwrap();
        book.processes.insert(
            pi + 1,
            Process {
                name: format!("duct {name}"),
                from: Some(prev.clone()),
                to: name.clone(),
                kind: Kind::Duct(Duct::Recovery {
                    recovery: Given::raw("0.9995"),
                }),
                note: String::new(),
            },
        );
        prev = name;
    }
    let comp = book
        .processes
        .iter_mut()
        .find(|p| p.name == "compressor")
        .unwrap();
    comp.from = Some(prev);
    book.resolve().unwrap();
    book
}

fn app_on(book: Workbook, settings: Settings) -> App {
    let engine = Engine::new(book).unwrap();
    assert!(engine.problems().is_empty());
    let mut app = App::new(settings);
    app.engine = Some(engine);
    app
}

fn bench_grid(c: &mut Criterion) {
    let book = long_workbook(44);
    assert_eq!(book.stations.len(), 50);
    let mut g = c.benchmark_group("tui_render_120x40");
    // First station selected; the grid shows its first rows.
    let app = app_on(book.clone(), Settings::default());
    g.bench_function("grid_50_stations", |b| {
        b.iter(|| black_box(render_buffer(black_box(&app), 120, 40)))
    });
    // The compressor exit selected (the grid scrolls), all columns, ASCII.
    let mut app = app_on(
        book,
        Settings {
            ascii: true,
            color: false,
            ..Settings::default()
        },
    );
    app.row = 46;
    for _ in 0..3 {
        app.on_key(crossterm::event::KeyEvent::new(
            crossterm::event::KeyCode::Char('c'),
            crossterm::event::KeyModifiers::NONE,
        ));
    }
    assert_eq!(app.columns.name(), "all");
    g.bench_function("grid_50_stations_all_columns_ascii", |b| {
        b.iter(|| black_box(render_buffer(black_box(&app), 120, 40)))
    });
    g.finish();
}

criterion_group!(benches, bench_grid);
criterion_main!(benches);
